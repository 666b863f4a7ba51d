//! The Mahalanobis gate: does this sample belong to the learned process?
//!
//! A [`Gate`] is a frozen [`Baseline`] plus a limit on `d^2`. The limit comes from one of the
//! published distributions ([`Limit`]): chi-square when the baseline's parameters are known
//! (or estimated from many samples), the exact Phase II limit for a new observation judged
//! against a baseline of only `m` observations, or the Phase I limit for screening the
//! baseline's own observations. With small `m` the chi-square limit raises far too many
//! alarms: for `p = 2`, `m = 20`, `alpha = 0.01` it is 9.21 against the exact 13.33.
//!
//! Where the limits are computed: the chi-square limits for the usual coverages are a const
//! table ([`CHI2_LIMITS`](crate::CHI2_LIMITS)) that needs no code at run time; any other
//! limit is computed once, when the gate is built (on the host, or at freeze time on the
//! device, where it costs a few hundred to a few thousand float operations, in soft float on
//! a core without FPU). The per-sample path never computes a quantile.

mod integer;
mod learner;

pub use integer::{IntGate, IntGate2};
pub use learner::Learner;

use crate::math::{phase1_limit, phase2_limit, phase2_tail, Beta, ChiSquare, LimitError, Real};
use crate::{Baseline, SampleError};

/// Which limit a gate uses, and so how its tail probability is read.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Limit<T> {
    /// `chi^2(1 - alpha; p)`: baseline parameters known, or estimated from very many samples.
    ChiSquare {
        /// False-alarm rate per sample.
        alpha: T,
    },
    /// Phase II: a new individual observation against a baseline of `m` observations
    /// (NIST/SEMATECH e-Handbook 6.5.4.3, F distribution).
    PhaseII {
        /// Observations behind the baseline.
        m: u32,
        /// False-alarm rate per sample.
        alpha: T,
    },
    /// Phase I: one of the baseline's own `m` observations (Tracy, Young & Mason 1992, beta
    /// distribution).
    PhaseI {
        /// Observations behind the baseline.
        m: u32,
        /// False-alarm rate per sample.
        alpha: T,
    },
    /// A limit value chosen by the caller; the tail probability is read as chi-square.
    Fixed(T),
}

impl<T: Real> Limit<T> {
    /// The limit on `d^2` for dimension `p`.
    pub fn value(&self, p: u32) -> Result<T, LimitError> {
        match *self {
            Limit::ChiSquare { alpha } => ChiSquare::new(p)?.quantile_upper(alpha),
            Limit::PhaseII { m, alpha } => phase2_limit(p, m, alpha),
            Limit::PhaseI { m, alpha } => phase1_limit(p, m, alpha),
            Limit::Fixed(v) => {
                ChiSquare::new(p)?;
                if v.is_finite() && v > T::ZERO {
                    Ok(v)
                } else {
                    Err(LimitError::BadParameter)
                }
            }
        }
    }

    /// The probability, under the in-control process, of a `d^2` at least this large.
    pub fn tail(&self, p: u32, d2: T) -> Result<T, LimitError> {
        match *self {
            Limit::ChiSquare { .. } | Limit::Fixed(_) => Ok(ChiSquare::new(p)?.upper(d2)),
            Limit::PhaseII { m, .. } => phase2_tail(p, m, d2),
            Limit::PhaseI { m, .. } => {
                // d2 m / (m - 1)^2 ~ Beta(p / 2, (m - p - 1) / 2).
                if m <= p + 1 {
                    return Err(LimitError::BaselineTooSmall);
                }
                let (pt, mt) = (T::from_u32(p), T::from_u32(m));
                let half = T::from_f64(0.5);
                let beta = Beta::new(pt * half, (mt - pt - T::ONE) * half)?;
                Ok(beta.tails(d2 * mt / ((mt - T::ONE) * (mt - T::ONE))).1)
            }
        }
    }
}

/// How far a sample lies from the baseline: `d^2` and, where it was computed, its tail
/// probability under the gate's limit distribution.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Distance<T> {
    /// Mahalanobis distance squared.
    pub d2: T,
    /// Probability of a distance at least this large from the in-control process:
    /// `Some` from [`Gate::verdict`]; `None` from the monitor's per-sample path, which skips
    /// the incomplete beta (call [`Limit::tail`] when it is wanted).
    pub tail: Option<T>,
}

/// Which check raised a process alarm.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Chart {
    /// Gate exceedances under the k-of-n rule.
    Gate,
    /// Multivariate EWMA.
    Mewma,
    /// Crosier's multivariate CUSUM.
    Mcusum,
    /// The EWMA of `d^2` (dispersion check).
    Dispersion,
    /// Hotelling's T^2 of a subgroup mean.
    Subgroup,
    /// The monitor's own state failed its consistency check (the verdict defaults to no-go).
    Fault,
}

impl Chart {
    /// The one-byte code of snapshots and report frames: 1 gate, 2 MEWMA, 3 MCUSUM,
    /// 4 dispersion, 5 subgroup, 6 fault (0 stands for "no alarm").
    pub fn code(self) -> u8 {
        match self {
            Chart::Gate => 1,
            Chart::Mewma => 2,
            Chart::Mcusum => 3,
            Chart::Dispersion => 4,
            Chart::Subgroup => 5,
            Chart::Fault => 6,
        }
    }

    /// `Some(None)` for 0, `Some(Some(chart))` for a chart's code, `None` for anything else.
    pub fn from_code(code: u8) -> Option<Option<Chart>> {
        Some(match code {
            0 => None,
            1 => Some(Chart::Gate),
            2 => Some(Chart::Mewma),
            3 => Some(Chart::Mcusum),
            4 => Some(Chart::Dispersion),
            5 => Some(Chart::Subgroup),
            6 => Some(Chart::Fault),
            _ => return None,
        })
    }
}

/// Why a sample is no-go.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Reason<T> {
    /// `d^2` above the gate's limit.
    OutsideGate(Distance<T>),
    /// Outside the tolerance zone.
    OutsideZone(Distance<T>),
    /// The process is in alarm (latched until acknowledged): no part passes.
    Alarm(Chart),
    /// The sample itself was refused (NaN, infinity, overflow): no-go by default.
    InvalidSample(SampleError),
}

/// The decision for one sample.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Verdict<T> {
    /// Belongs to the process.
    Go(Distance<T>),
    /// Does not, with the reason.
    NoGo(Reason<T>),
    /// No baseline yet (still learning): treat as no-go where a decision is required.
    NotReady,
}

impl<T> Verdict<T> {
    /// `true` only for [`Verdict::Go`]: not-ready counts as no (defaults to no-go).
    pub fn is_go(&self) -> bool {
        matches!(self, Verdict::Go(_))
    }
}

/// A Mahalanobis gate: a baseline and a limit on `d^2`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Gate<T, const N: usize> {
    baseline: Baseline<T, N>,
    limit: T,
    kind: Limit<T>,
}

impl<T: Real, const N: usize> Gate<T, N> {
    /// Builds the gate, computing the limit value once. Errors as [`Limit::value`].
    pub fn new(baseline: Baseline<T, N>, limit: Limit<T>) -> Result<Self, LimitError> {
        let p = u32::try_from(N).map_err(|_| LimitError::BadDimension)?;
        Ok(Gate {
            baseline,
            limit: limit.value(p)?,
            kind: limit,
        })
    }

    /// The frozen baseline.
    pub fn baseline(&self) -> &Baseline<T, N> {
        &self.baseline
    }

    /// The limit on `d^2`.
    pub fn limit(&self) -> T {
        self.limit
    }

    /// The number of observations behind the baseline, when the limit names it (Phase I and
    /// Phase II limits); `None` for a chi-square or fixed limit.
    pub fn baseline_size(&self) -> Option<u32> {
        match self.kind {
            Limit::PhaseII { m, .. } | Limit::PhaseI { m, .. } => Some(m),
            Limit::ChiSquare { .. } | Limit::Fixed(_) => None,
        }
    }

    /// Which limit this is.
    pub fn kind(&self) -> Limit<T> {
        self.kind
    }

    /// The per-sample test: `d^2 <= limit`. A NaN coordinate gives `false` (defaults to no-go).
    #[inline]
    pub fn passes(&self, x: &[T; N]) -> bool {
        self.baseline.mahalanobis2(x) <= self.limit
    }

    /// The full decision, with `d^2` and its tail probability (which costs an `exp`/`erfc`,
    /// or an incomplete beta for the Phase limits: use [`passes`](Self::passes) on the hot
    /// path). A NaN or infinite coordinate gives `NoGo(InvalidSample(NotFinite))`.
    pub fn verdict(&self, x: &[T; N]) -> Verdict<T> {
        if !x.iter().all(|v| v.is_finite()) {
            return Verdict::NoGo(Reason::InvalidSample(SampleError::NotFinite));
        }
        let d2 = self.baseline.mahalanobis2(x);
        if !d2.is_finite() {
            return Verdict::NoGo(Reason::InvalidSample(SampleError::Overflow));
        }
        // N is 1..=6 for any gate that was built, so the tail cannot fail (`None` if it did).
        let p = N as u32;
        let tail = self.kind.tail(p, d2).ok();
        let dist = Distance { d2, tail };
        if d2 <= self.limit {
            Verdict::Go(dist)
        } else {
            Verdict::NoGo(Reason::OutsideGate(dist))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::Covariance;

    #[test]
    fn verdicts_around_a_known_limit() {
        let cov = Covariance::from_matrix([[1.0f64, 0.0], [0.0, 1.0]]);
        let b = Baseline::new([0.0, 0.0], &cov).unwrap();
        let g = Gate::new(b, Limit::ChiSquare { alpha: 0.01 }).unwrap();
        assert!((g.limit() - (-2.0 * 0.01f64.ln())).abs() < 1e-12);
        let Verdict::Go(d) = g.verdict(&[1.0, 1.0]) else {
            panic!("inside")
        };
        assert_eq!(d.d2, 2.0);
        assert!((d.tail.unwrap() - (-1.0f64).exp()).abs() < 1e-15);
        assert!(matches!(
            g.verdict(&[3.0, 2.0]),
            Verdict::NoGo(Reason::OutsideGate(_))
        ));
        assert!(matches!(
            g.verdict(&[f64::NAN, 0.0]),
            Verdict::NoGo(Reason::InvalidSample(SampleError::NotFinite))
        ));
        assert!(!g.passes(&[f64::NAN, 0.0]));
        assert!(Gate::new(b, Limit::Fixed(-1.0)).is_err());
        assert!(!Verdict::<f32>::NotReady.is_go());
    }
}
