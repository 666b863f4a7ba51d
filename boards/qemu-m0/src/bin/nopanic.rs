//! Panic-freedom check: the panic handler calls a symbol that is defined nowhere, so this
//! binary links only if no panic path survives in the release build of everything
//! `covgate_firmware::exercise_everything` calls. Built by CI, never run.
#![no_std]
#![no_main]

use cortex_m_rt::entry;

extern "C" {
    /// Deliberately undefined: a reachable panic turns into a link error naming it.
    fn covgate_panic_path_is_reachable() -> !;
}

#[entry]
fn main() -> ! {
    let mut n = 0u32;
    loop {
        n = n.wrapping_add(covgate_firmware::exercise_everything(n));
        core::hint::black_box(n);
    }
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    // SAFETY: never called when the link check passes; the symbol does not exist.
    unsafe { covgate_panic_path_is_reachable() }
}
