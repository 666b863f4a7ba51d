//! Go / no-go outputs: which lines a verdict drives, and (feature `embedded-hal`) an adapter
//! that drives them through `embedded_hal::digital::OutputPin`.
//!
//! Fail-safe by design: only [`Verdict::Go`] activates the go line; every other verdict
//! (no-go for any reason, not ready) activates the no-go line. Both lines are never active
//! together: on a change the line being released is released first, so for an instant both
//! are inactive, which downstream wiring must read as no-go. A pin error leaves the adapter
//! trying to reach the safe state (go released, no-go active) and is reported.
//!
//! This drives signals, not a safety function: wiring and the use of these lines follow local
//! codes and licensed practice (see the README).

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
    use embedded_hal::digital::OutputPin;

    /// Which pin failed.
    #[derive(Clone, Copy, Debug, PartialEq, Eq)]
    pub enum OutputError<G, N> {
        /// The go pin returned an error.
        Go(G),
        /// The no-go pin returned an error.
        NoGo(N),
    }

    impl<G: core::fmt::Debug, N: core::fmt::Debug> core::fmt::Display for OutputError<G, N> {
        fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
            match self {
                OutputError::Go(e) => write!(f, "go line: {e:?}"),
                OutputError::NoGo(e) => write!(f, "no-go line: {e:?}"),
            }
        }
    }

    /// Two output pins driven from verdicts, fail-safe (see the module docs).
    pub struct GoNoGo<G, N> {
        go: G,
        nogo: N,
        polarity: Polarity,
        state: Lines,
    }

    impl<G: OutputPin, N: OutputPin> GoNoGo<G, N> {
        /// Takes the pins and drives the safe state at once (go released, no-go active).
        pub fn new(
            go: G,
            nogo: N,
            polarity: Polarity,
        ) -> Result<Self, OutputError<G::Error, N::Error>> {
            let mut s = GoNoGo {
                go,
                nogo,
                polarity,
                state: Lines::SAFE,
            };
            s.set_go(false)?;
            s.set_nogo(true)?;
            Ok(s)
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

        /// Drives the lines for a verdict: release first, then activate. On a pin error, tries
        /// the safe state and returns the first error.
        pub fn apply<T>(&mut self, v: &Verdict<T>) -> Result<(), OutputError<G::Error, N::Error>> {
            let want = Lines::for_verdict(v);
            let r = if want.go {
                self.set_nogo(false).and_then(|()| self.set_go(true))
            } else {
                self.set_go(false).and_then(|()| self.set_nogo(true))
            };
            match r {
                Ok(()) => {
                    self.state = want;
                    Ok(())
                }
                Err(e) => {
                    let _ = self.set_go(false);
                    let _ = self.set_nogo(true);
                    self.state = Lines::SAFE;
                    Err(e)
                }
            }
        }

        /// The lines last driven successfully (or the safe state after an error).
        pub fn lines(&self) -> Lines {
            self.state
        }

        /// Gives the pins back.
        pub fn release(self) -> (G, N) {
            (self.go, self.nogo)
        }
    }
}

#[cfg(feature = "embedded-hal")]
pub use hal::{GoNoGo, OutputError};
