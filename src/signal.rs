//! Go / no-go outputs: which lines a verdict drives, and (feature `embedded-hal`) an adapter
//! that drives them through `embedded_hal::digital::OutputPin`.
//!
//! Defaults to no-go by design (what "fail-safe" means here, and nothing more): only
//! [`Verdict::Go`] activates the go line; every other verdict (no-go for any reason, not ready)
//! activates the no-go line. On a change the line being released is released first, so for an
//! instant both are inactive, which downstream wiring must read as no-go. After a pin error the
//! physical state of the lines is not known (a go line that failed to release may still be
//! active while no-go is driven active): downstream wiring must let no-go win when both are
//! asserted. The adapter then latches a fault: it keeps driving the safe state (go released,
//! no-go active) and refuses to drive go again until [`GoNoGo::clear_fault`] succeeds.
//!
//! This drives signals; it is not a rated safety function (no SIL or PL rating): wiring and the
//! use of these lines follow local codes and licensed practice (see the README).

use crate::Verdict;

/// The levels a verdict asks of the two lines (`true` = active).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Lines {
    /// The go line.
    pub go: bool,
    /// The no-go line.
    pub nogo: bool,
}

impl Lines {
    /// The safe state: go released, no-go active.
    pub const SAFE: Lines = Lines {
        go: false,
        nogo: true,
    };

    /// The lines for a verdict.
    pub fn for_verdict<T>(v: &Verdict<T>) -> Lines {
        if v.is_go() {
            Lines {
                go: true,
                nogo: false,
            }
        } else {
            Lines::SAFE
        }
    }
}

/// Electrical sense of "active".
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Polarity {
    /// Active = pin high.
    ActiveHigh,
    /// Active = pin low (open-drain to a pulled-up input, for example).
    ActiveLow,
}

#[cfg(feature = "embedded-hal")]
mod hal {
    use super::{Lines, Polarity};
    use crate::Verdict;
    use embedded_hal::digital::{ErrorType, OutputPin};

    /// Which pin failed, or that a fault is latched.
    #[derive(Clone, Copy, Debug, PartialEq, Eq)]
    pub enum OutputError<G, N> {
        /// The go pin returned an error.
        Go(G),
        /// The no-go pin returned an error.
        NoGo(N),
        /// An earlier pin error latched the safe state; call [`GoNoGo::clear_fault`].
        Latched,
    }

    impl<G: core::fmt::Debug, N: core::fmt::Debug> core::fmt::Display for OutputError<G, N> {
        fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
            match self {
                OutputError::Go(e) => write!(f, "go line: {e:?}"),
                OutputError::NoGo(e) => write!(f, "no-go line: {e:?}"),
                OutputError::Latched => f.write_str("output fault latched"),
            }
        }
    }

    /// Two output pins driven from verdicts, defaulting to no-go (see the module docs; not a
    /// rated safety function).
    pub struct GoNoGo<G, N> {
        go: G,
        nogo: N,
        polarity: Polarity,
        /// `None` while a fault is latched: the physical state is not known.
        state: Option<Lines>,
    }

    /// What [`GoNoGo::new`] hands back when it could not drive the safe state: the error and
    /// both pins.
    pub type Refused<G, N> = (
        OutputError<<G as ErrorType>::Error, <N as ErrorType>::Error>,
        G,
        N,
    );

    impl<G: OutputPin, N: OutputPin> GoNoGo<G, N> {
        /// Takes the pins and drives the safe state at once (go released, no-go active). Both
        /// writes are attempted even if the first fails; on an error the pins come back with it.
        pub fn new(go: G, nogo: N, polarity: Polarity) -> Result<Self, Refused<G, N>> {
            let mut s = GoNoGo {
                go,
                nogo,
                polarity,
                state: None,
            };
            match s.drive_safe() {
                Ok(()) => {
                    s.state = Some(Lines::SAFE);
                    Ok(s)
                }
                Err(e) => Err((e, s.go, s.nogo)),
            }
        }

        /// Releases go and activates no-go, attempting both; the first error is returned.
        fn drive_safe(&mut self) -> Result<(), OutputError<G::Error, N::Error>> {
            let a = self.set_go(false);
            let b = self.set_nogo(true);
            a.and(b)
        }

        fn level(&self, active: bool) -> bool {
            active == (self.polarity == Polarity::ActiveHigh)
        }

        fn set_go(&mut self, active: bool) -> Result<(), OutputError<G::Error, N::Error>> {
            let r = if self.level(active) {
                self.go.set_high()
            } else {
                self.go.set_low()
            };
            r.map_err(OutputError::Go)
        }

        fn set_nogo(&mut self, active: bool) -> Result<(), OutputError<G::Error, N::Error>> {
            let r = if self.level(active) {
                self.nogo.set_high()
            } else {
                self.nogo.set_low()
            };
            r.map_err(OutputError::NoGo)
        }

        /// Drives the lines for a verdict: release first, then activate. On a pin error, drives
        /// the safe state (best effort), latches the fault and returns the error; while latched,
        /// every call drives the safe state and returns [`OutputError::Latched`].
        pub fn apply<T>(&mut self, v: &Verdict<T>) -> Result<(), OutputError<G::Error, N::Error>> {
            if self.state.is_none() {
                let _ = self.drive_safe();
                return Err(OutputError::Latched);
            }
            let want = Lines::for_verdict(v);
            let r = if want.go {
                self.set_nogo(false).and_then(|()| self.set_go(true))
            } else {
                self.set_go(false).and_then(|()| self.set_nogo(true))
            };
            match r {
                Ok(()) => {
                    self.state = Some(want);
                    Ok(())
                }
                Err(e) => {
                    let _ = self.drive_safe();
                    self.state = None;
                    Err(e)
                }
            }
        }

        /// Retries the safe state; on success the fault is cleared and `apply` works again.
        pub fn clear_fault(&mut self) -> Result<(), OutputError<G::Error, N::Error>> {
            self.drive_safe()?;
            self.state = Some(Lines::SAFE);
            Ok(())
        }

        /// The lines last driven successfully; `None` while a fault is latched (the physical
        /// state is not known).
        pub fn lines(&self) -> Option<Lines> {
            self.state
        }

        /// Gives the pins back.
        pub fn release(self) -> (G, N) {
            (self.go, self.nogo)
        }
    }
}

#[cfg(feature = "embedded-hal")]
pub use hal::{GoNoGo, OutputError, Refused};
