//! covgate firmware on QEMU microbit (cortex-m0): the shared firmware body, exiting through semihosting
//! with its result.
#![no_std]
#![no_main]

use cortex_m_rt::entry;

#[entry]
fn main() -> ! {
    covgate_firmware::board::run_board("qemu-m0 (cortex-m0, QEMU microbit)")
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    cortex_m_semihosting::debug::exit(cortex_m_semihosting::debug::EXIT_FAILURE);
    loop {}
}
