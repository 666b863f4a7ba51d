//! covgate firmware on QEMU mps2-an386 (cortex-m4): the shared firmware body, exiting through semihosting
//! with its result.
#![no_std]
#![no_main]

use cortex_m_rt::entry;

#[entry]
fn main() -> ! {
    covgate_firmware::board::run_board("qemu-m4f (cortex-m4, QEMU mps2-an386)")
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    cortex_m_semihosting::debug::exit(cortex_m_semihosting::debug::EXIT_FAILURE);
    loop {}
}
