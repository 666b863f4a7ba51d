//! The go / no-go adapter against mocked pins (embedded-hal-mock): fail-safe start, order of
//! transitions, polarity, and the safe state after a pin error.

use covgate::signal::{GoNoGo, Lines, OutputError, Polarity};
use covgate::{Distance, Reason, SampleError, Verdict};
use embedded_hal_mock::eh1::digital::{Mock, State, Transaction as T};
use embedded_hal_mock::eh1::MockError;

fn go() -> Verdict<f32> {
    Verdict::Go(Distance {
        d2: 1.0,
        tail: None,
    })
}

#[test]
fn active_high_sequence() {
    // Start: go low, no-go high. Go verdict: release no-go, then raise go. No-go verdict:
    // release go, then raise no-go. Not ready: no-go.
    let go_pin = Mock::new(&[
        T::set(State::Low),
        T::set(State::High),
        T::set(State::Low),
        T::set(State::Low),
    ]);
    let nogo_pin = Mock::new(&[
        T::set(State::High),
        T::set(State::Low),
        T::set(State::High),
        T::set(State::High),
    ]);
    let mut out = GoNoGo::new(go_pin, nogo_pin, Polarity::ActiveHigh).unwrap();
    assert_eq!(out.lines(), Lines::SAFE);
    out.apply(&go()).unwrap();
    assert_eq!(
        out.lines(),
        Lines {
            go: true,
            nogo: false
        }
    );
    out.apply(&Verdict::<f32>::NoGo(Reason::InvalidSample(
        SampleError::NotFinite,
    )))
    .unwrap();
    out.apply(&Verdict::<f32>::NotReady).unwrap();
    assert_eq!(out.lines(), Lines::SAFE);
    let (mut g, mut n) = out.release();
    g.done();
    n.done();
}

#[test]
fn active_low_and_pin_error_falls_safe() {
    // Active low: safe state is go high (released), no-go low (active).
    let go_pin = Mock::new(&[
        T::set(State::High),
        T::set(State::Low).with_error(MockError::Io(std::io::ErrorKind::NotConnected)),
        T::set(State::High),
    ]);
    let nogo_pin = Mock::new(&[T::set(State::Low), T::set(State::High), T::set(State::Low)]);
    let mut out = GoNoGo::new(go_pin, nogo_pin, Polarity::ActiveLow).unwrap();
    let e = out.apply(&go());
    assert!(matches!(e, Err(OutputError::Go(_))), "{e:?}");
    assert_eq!(out.lines(), Lines::SAFE);
    let (mut g, mut n) = out.release();
    g.done();
    n.done();
}
