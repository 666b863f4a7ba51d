//! covgate firmware on QEMU microbit (cortex-m0): runs the shared firmware body and exits through
//! semihosting with its result.
#![no_std]
#![no_main]

use core::fmt::Write;

use cortex_m::peripheral::syst::SystClkSource;
use cortex_m_rt::entry;
use cortex_m_semihosting::{debug, hio};

struct SysTick(cortex_m::peripheral::SYST);

impl covgate_firmware::Ticks for SysTick {
    fn now(&mut self) -> u32 {
        cortex_m::peripheral::SYST::get_current()
    }
    fn known_loop(&mut self, n: u32) {
        // cortex-m's delay: a two-instruction loop run about n / 2 times.
        cortex_m::asm::delay(n);
    }
}

struct Console(Option<hio::HostStream>);

impl Write for Console {
    fn write_str(&mut self, s: &str) -> core::fmt::Result {
        match &mut self.0 {
            Some(h) => h.write_str(s),
            None => Ok(()),
        }
    }
}

#[entry]
fn main() -> ! {
    let mut p = cortex_m::Peripherals::take().expect("first and only take");
    p.SYST.set_clock_source(SystClkSource::Core);
    p.SYST.set_reload(0x00FF_FFFF);
    p.SYST.clear_current();
    p.SYST.enable_counter();
    let mut clock = SysTick(p.SYST);
    let mut out = Console(hio::hstdout().ok());
    let fails = covgate_firmware::run(&mut out, &mut clock, "qemu-m0 (cortex-m0, QEMU microbit)");
    debug::exit(if fails == 0 {
        debug::EXIT_SUCCESS
    } else {
        debug::EXIT_FAILURE
    });
    loop {
        cortex_m::asm::wfi();
    }
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    debug::exit(debug::EXIT_FAILURE);
    loop {}
}
