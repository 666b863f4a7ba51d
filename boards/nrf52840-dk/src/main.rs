//! covgate on an nRF52840 development kit.
//!
//! The drilling-cell demo capture (hole offsets in micrometres) is streamed at 10 samples a
//! second through a `Watch` (learn 100 parts, Phase II gate at alpha 0.0027, 60 um positional
//! tolerance circle, MEWMA drift chart). Every verdict is shown on the two LEDs and logged
//! over RTT with defmt.
//!
//! The go / no-go output lines are taken by `covgate::signal::GoNoGo`, which drives them to
//! the safe state (go released, no-go active) at start. In the default build the demo data never
//! drives them: they stay at no-go for as long as the firmware runs. Only with the cargo feature
//! `drive-outputs-from-demo` do they follow the verdicts. Never connect the lines to equipment
//! while demo data drives them; they are not a rated safety function (see README.md).
//!
//! Pins (see README.md for wiring and cautions):
//! - go line: P1.01, active high; LED 1 (P0.13) on for a go verdict
//! - no-go line: P1.02, active high; LED 2 (P0.14) on for a no-go verdict (with the feature,
//!   the LEDs mirror the lines as driven, and LED 2 also lights on an output fault)
//! - button 1 (P0.11): re-learn the baseline from the next 100 samples
//! - button 2 (P0.12): acknowledge a latched drift alarm
//!
//! Buttons act on the press (the high-to-low edge seen between two samples), once per press.
//! A watchdog (0.5 s, also running while a debugger halts the core) resets the chip if the loop
//! stops, for example after a panic: the pins then return to inputs, so the go line must be
//! pulled down at the receiver (see README.md).
//!
//! To gate a real sensor, replace `next_sample` with its reading in the same units as the
//! zone.

#![no_std]
#![no_main]

use cortex_m_rt::entry;
use covgate::signal::{GoNoGo, Lines, Polarity};
use covgate::{CircleZone, Verdict, Watch, WatchConfig, Zone};
use defmt_rtt as _;
use embedded_hal::digital::{InputPin, OutputPin};
use nrf52840_hal::gpio::{p0, p1, Level};
use nrf52840_hal::pac;
use nrf52840_hal::wdt::{count, Watchdog};
use panic_probe as _;

/// Core clock after reset (HFINT), for the sample period.
const CORE_HZ: u32 = 64_000_000;
/// Samples per second.
const RATE_HZ: u32 = 10;

/// Watchdog period in ticks of the 32.768 kHz low-frequency clock: 0.5 s, five sample periods.
const WATCHDOG_TICKS: u32 = 16_384;

/// What the go / no-go output lines do in this build (logged at start).
#[cfg(feature = "drive-outputs-from-demo")]
const OUTPUTS: &str = "go / no-go lines follow the verdicts (feature drive-outputs-from-demo)";
/// What the go / no-go output lines do in this build (logged at start).
#[cfg(not(feature = "drive-outputs-from-demo"))]
const OUTPUTS: &str = "go / no-go lines held at no-go; the LEDs show the verdicts";

/// A button on a pulled-up input: `true` once per press (a high-to-low change between polls).
struct Button<P> {
    pin: P,
    was_down: bool,
}

impl<P: InputPin> Button<P> {
    fn new(pin: P) -> Self {
        Button {
            pin,
            was_down: true, // a button held through reset does not count as a press
        }
    }

    fn pressed(&mut self) -> bool {
        let down = self.pin.is_low().unwrap_or(false);
        let press = down && !self.was_down;
        self.was_down = down;
        press
    }
}

/// Feature `drive-outputs-from-demo`: the output lines follow the verdict. Returns the lines as
/// last driven, `None` while an output fault is latched (the physical state is not known).
#[cfg(feature = "drive-outputs-from-demo")]
fn outputs<G: OutputPin, N: OutputPin, T>(
    lines: &mut GoNoGo<G, N>,
    verdict: &Verdict<T>,
) -> Option<Lines> {
    if let Err(e) = lines.apply(verdict) {
        defmt::error!(
            "output fault, lines held in the safe state: {}",
            defmt::Debug2Format(&e)
        );
    }
    lines.lines()
}

/// Default build: the output lines are never driven from the verdicts and stay in the safe
/// state `GoNoGo::new` drove (go released, no-go active). Returns the lines the verdict asks
/// for, which only the LEDs show.
#[cfg(not(feature = "drive-outputs-from-demo"))]
fn outputs<G: OutputPin, N: OutputPin, T>(
    _lines: &mut GoNoGo<G, N>,
    verdict: &Verdict<T>,
) -> Option<Lines> {
    Some(Lines::for_verdict(verdict))
}

/// The LEDs of the kit are active low: on for an active line.
fn mirror<P: OutputPin>(led: &mut P, active: bool) {
    let _ = if active {
        led.set_low()
    } else {
        led.set_high()
    };
}

#[entry]
fn main() -> ! {
    let Some(p) = pac::Peripherals::take() else {
        defmt::error!("peripherals already taken");
        loop {
            cortex_m::asm::wfi();
        }
    };
    let port0 = p0::Parts::new(p.P0);
    let port1 = p1::Parts::new(p.P1);
    let go = port1.p1_01.into_push_pull_output(Level::Low).degrade();
    let nogo = port1.p1_02.into_push_pull_output(Level::High).degrade();
    let mut led_go = port0.p0_13.into_push_pull_output(Level::High).degrade();
    let mut led_nogo = port0.p0_14.into_push_pull_output(Level::Low).degrade();
    let mut relearn = Button::new(port0.p0_11.into_pullup_input().degrade());
    let mut acknowledge = Button::new(port0.p0_12.into_pullup_input().degrade());
    // After a watchdog reset the watchdog is still running: take it over as it is.
    let mut dog = match Watchdog::try_new(p.WDT) {
        Ok(mut w) => {
            w.set_lfosc_ticks(WATCHDOG_TICKS);
            w.run_during_debug_halt(true);
            Some(w.activate::<count::One>().handles.0)
        }
        Err(wdt) => Watchdog::try_recover::<count::One>(wdt)
            .ok()
            .map(|parts| parts.handles.0),
    };

    let Ok(mut lines) = GoNoGo::new(go, nogo, Polarity::ActiveHigh) else {
        defmt::error!("cannot drive the output lines; halted with no-go");
        loop {
            cortex_m::asm::wfi();
        }
    };
    let mut cfg = WatchConfig::<f32, 2>::new(100, 0.0027);
    cfg.zone = CircleZone::new([0.0, 0.0], 60.0).ok().map(Zone::Circle);
    cfg.mewma = Some((0.1, 12.34, false));
    let Ok(mut watch) = Watch::<f32, 2, 128>::new(cfg) else {
        defmt::error!("watch configuration refused; halted with no-go");
        loop {
            cortex_m::asm::wfi();
        }
    };
    defmt::info!("covgate nrf52840-dk: learning 100 samples; {}", OUTPUTS);

    let mut samples = covgate_firmware::samples();
    let mut index: u32 = 0;
    loop {
        let x = match next_sample(&mut samples) {
            Some(x) => x,
            None => {
                samples = covgate_firmware::samples();
                continue;
            }
        };
        if let Some(d) = dog.as_mut() {
            d.pet();
        }
        if relearn.pressed() {
            watch.relearn();
            defmt::info!("re-learn requested: learning the next 100 samples");
        }
        if acknowledge.pressed() && watch.monitor().is_some_and(|m| m.alarm().is_some()) {
            watch.acknowledge();
            defmt::info!("alarm acknowledged");
        }
        let step = watch.push(x);
        let state = outputs(&mut lines, &step.verdict);
        mirror(&mut led_go, state.is_some_and(|l| l.go));
        mirror(&mut led_nogo, state.is_none_or(|l| l.nogo));
        match &step.verdict {
            Verdict::Go(d) => defmt::debug!("#{} go d2 {}", index, d.d2),
            v => defmt::info!("#{} {}", index, v),
        }
        if let Some(a) = &step.alarm {
            defmt::warn!("#{} drift alarm {}", index, a);
        }
        index = index.wrapping_add(1);
        cortex_m::asm::delay(CORE_HZ / RATE_HZ);
    }
}

/// The next measurement: here the demo capture; on a real station the sensor reading.
fn next_sample(source: &mut impl Iterator<Item = [f32; 2]>) -> Option<[f32; 2]> {
    source.next()
}
