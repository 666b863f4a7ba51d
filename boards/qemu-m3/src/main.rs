//! covgate firmware on QEMU lm3s6965evb (cortex-m3): the shared firmware body, exiting through semihosting
//! with its result.
#![no_std]
#![no_main]

use cortex_m_rt::entry;

#[entry]
fn main() -> ! {
    covgate_firmware::board::run_board("qemu-m3 (cortex-m3, QEMU lm3s6965evb)")
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    cortex_m_semihosting::debug::exit(cortex_m_semihosting::debug::EXIT_FAILURE);
    loop {}
}
