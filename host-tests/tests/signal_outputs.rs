//! The go / no-go adapter: no-go at start, release-before-activate across both pins,
//! polarity, and the latched safe state after a pin error. One test uses embedded-hal-mock;
//! the ordering tests use pins that write into one shared log, so the order across the two
//! pins is checked, not only each pin's own sequence.

use std::cell::RefCell;
use std::rc::Rc;

use covgate::signal::{GoNoGo, Lines, OutputError, Polarity};
use covgate::{Distance, Reason, SampleError, Verdict};
use embedded_hal::digital::{ErrorKind, ErrorType, OutputPin};
use embedded_hal_mock::eh1::digital::{Mock, State, Transaction as T};

fn go() -> Verdict<f32> {
    Verdict::Go(Distance {
        d2: 1.0,
        tail: None,
    })
}

fn nogo() -> Verdict<f32> {
    Verdict::NoGo(Reason::InvalidSample(SampleError::NotFinite))
}

#[test]
fn mocked_pins_active_high() {
    let go_pin = Mock::new(&[T::set(State::Low), T::set(State::High), T::set(State::Low)]);
    let nogo_pin = Mock::new(&[T::set(State::High), T::set(State::Low), T::set(State::High)]);
    let mut out = GoNoGo::new(go_pin, nogo_pin, Polarity::ActiveHigh).unwrap();
    assert_eq!(out.lines(), Some(Lines::SAFE));
    out.apply(&go()).unwrap();
    out.apply(&nogo()).unwrap();
    let (mut g, mut n) = out.release();
    g.done();
    n.done();
}

type Log = Rc<RefCell<Vec<(&'static str, bool)>>>;

/// A pin that records `(name, level)` in a shared log and fails its `fail_at`-th write.
#[derive(Debug)]
struct LogPin {
    name: &'static str,
    log: Log,
    writes: u32,
    fail_at: Option<u32>,
}

#[derive(Debug)]
struct PinFault;

impl embedded_hal::digital::Error for PinFault {
    fn kind(&self) -> ErrorKind {
        ErrorKind::Other
    }
}

impl ErrorType for LogPin {
    type Error = PinFault;
}

impl LogPin {
    fn write(&mut self, level: bool) -> Result<(), PinFault> {
        self.writes += 1;
        if Some(self.writes) == self.fail_at {
            return Err(PinFault);
        }
        self.log.borrow_mut().push((self.name, level));
        Ok(())
    }
}

impl OutputPin for LogPin {
    fn set_low(&mut self) -> Result<(), PinFault> {
        self.write(false)
    }
    fn set_high(&mut self) -> Result<(), PinFault> {
        self.write(true)
    }
}

fn pins(go_fail: Option<u32>, nogo_fail: Option<u32>) -> (LogPin, LogPin, Log) {
    let log: Log = Rc::default();
    let g = LogPin {
        name: "go",
        log: log.clone(),
        writes: 0,
        fail_at: go_fail,
    };
    let n = LogPin {
        name: "nogo",
        log: log.clone(),
        writes: 0,
        fail_at: nogo_fail,
    };
    (g, n, log)
}

#[test]
fn release_comes_before_activate_across_both_pins() {
    let (g, n, log) = pins(None, None);
    let mut out = GoNoGo::new(g, n, Polarity::ActiveLow).unwrap();
    out.apply(&go()).unwrap();
    out.apply(&Verdict::<f32>::NotReady).unwrap();
    // Active low: safe = go high (released), no-go low (active).
    assert_eq!(
        *log.borrow(),
        vec![
            ("go", true),
            ("nogo", false), // new: safe state
            ("nogo", true),
            ("go", false), // go: release no-go, then activate go
            ("go", true),
            ("nogo", false), // not ready: release go, then activate no-go
        ]
    );
}

#[test]
fn a_pin_error_latches_the_safe_state() {
    // The go pin fails its second write (the activation for the first Go verdict).
    let (g, n, log) = pins(Some(2), None);
    let mut out = GoNoGo::new(g, n, Polarity::ActiveHigh).unwrap();
    assert!(matches!(out.apply(&go()), Err(OutputError::Go(_))));
    assert_eq!(out.lines(), None, "state unknown after a pin error");
    // Latched: a Go verdict does not drive go again; the safe state is driven instead.
    let before = log.borrow().len();
    assert!(matches!(out.apply(&go()), Err(OutputError::Latched)));
    assert!(log.borrow()[before..]
        .iter()
        .all(|&(p, l)| (p == "go" && !l) || (p == "nogo" && l)));
    out.clear_fault().unwrap();
    assert_eq!(out.lines(), Some(Lines::SAFE));
    out.apply(&go()).unwrap();
    assert_eq!(
        out.lines(),
        Some(Lines {
            go: true,
            nogo: false
        })
    );
}

#[test]
fn a_failing_start_hands_the_pins_back() {
    let (g, n, log) = pins(Some(1), None);
    let Err((e, _g, _n)) = GoNoGo::new(g, n, Polarity::ActiveHigh) else {
        panic!("the first write fails");
    };
    assert!(matches!(e, OutputError::Go(_)));
    // The no-go line was still driven active.
    assert_eq!(*log.borrow(), vec![("nogo", true)]);
}
