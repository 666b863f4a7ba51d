//! Learning a baseline from the first samples, then gating the rest.

use super::{Gate, Limit, Reason, Verdict};
use crate::gaussian::FreezeError;
use crate::math::{phase2_limit, LimitError, Real};
use crate::moments::{Moments, Pivoted, Source};
use crate::Baseline;

/// The smallest learn-then-gate loop: the first `m` samples build a baseline, then every sample
/// is judged against the exact Phase II limit for a baseline of `m` observations.
///
/// Precision: the learned covariance goes through a first-sample pivot and keeps its digits at
/// any offset, but the gate computes `x - mean` in `T`. In `f32`, give samples already
/// relative to a nominal when the offset is large against the spread (an offset of 1e4 with
/// a spread of 1e-3 leaves no digits in `f32`).
///
/// While learning, every sample gets [`Verdict::NotReady`]. If the baseline cannot be frozen
/// at `m` (degenerate spread, say), the learner keeps collecting and tries again at each new
/// sample, still answering `NotReady`, and [`last_error`](Self::last_error) says why. A
/// refused sample (NaN) gets `NoGo(InvalidSample)` and changes nothing.
#[derive(Clone, Copy, Debug)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Learner<T, const N: usize, const L: usize> {
    moments: Pivoted<Moments<T, N, L>, T, N>,
    target: u32,
    alpha: T,
    resolution: [T; N],
    gate: Option<Gate<T, N>>,
    last_error: Option<FreezeError>,
}

impl<T: Real, const N: usize, const L: usize> PartialEq for Learner<T, N, L> {
    fn eq(&self, other: &Self) -> bool {
        self.moments == other.moments
            && self.target == other.target
            && self.alpha == other.alpha
            && self.resolution == other.resolution
            && self.gate == other.gate
            && self.last_error == other.last_error
    }
}

impl<T: Real + Source<T>, const N: usize, const L: usize> Learner<T, N, L> {
    /// A learner that freezes after `m` samples and gates with false-alarm rate `alpha`; the
    /// resolution (use zeros for none) is added as `q^2 / 12` variance, see
    /// [`Baseline::with_resolution`]. Errors: those of [`phase2_limit`] for `(N, m, alpha)`,
    /// checked now so that arming later cannot fail on them.
    pub fn new(m: u32, alpha: T, resolution: [T; N]) -> Result<Self, LimitError> {
        let p = u32::try_from(N).map_err(|_| LimitError::BadDimension)?;
        phase2_limit(p, m, alpha)?;
        Ok(Learner {
            moments: Pivoted::first_sample(Moments::new()),
            target: m,
            alpha,
            resolution,
            gate: None,
            last_error: None,
        })
    }

    /// Judges one sample (learning while no gate exists).
    pub fn push(&mut self, x: [T; N]) -> Verdict<T> {
        if let Some(g) = &self.gate {
            return g.verdict(&x);
        }
        if let Err(e) = self.moments.push(x) {
            return Verdict::NoGo(Reason::InvalidSample(e));
        }
        if self.moments.count() >= self.target {
            match self.freeze() {
                Ok(g) => {
                    self.gate = Some(g);
                    self.last_error = None;
                }
                Err(e) => self.last_error = Some(e),
            }
        }
        Verdict::NotReady
    }

    fn freeze(&self) -> Result<Gate<T, N>, FreezeError> {
        let mean = self.moments.mean_f64()?.map(T::from_f64);
        let cov = self.moments.inner().sample_covariance()?;
        let base = Baseline::with_resolution(mean, &cov, self.resolution)?;
        let m = self.moments.count();
        let limit = Limit::PhaseII {
            m,
            alpha: self.alpha,
        };
        // The limit was validated for the target m in `new`; a larger m is valid too.
        Gate::new(base, limit).map_err(|_| FreezeError::TooFewSamples)
    }

    /// The gate, once armed.
    pub fn gate(&self) -> Option<&Gate<T, N>> {
        self.gate.as_ref()
    }

    /// Samples learned so far.
    pub fn learned(&self) -> u32 {
        self.moments.count()
    }

    /// Why the last attempt to freeze failed, while still learning.
    pub fn last_error(&self) -> Option<FreezeError> {
        self.last_error
    }

    /// Forgets the baseline and starts learning again.
    pub fn relearn(&mut self) {
        self.moments = Pivoted::first_sample(Moments::new());
        self.gate = None;
        self.last_error = None;
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::SampleError;

    #[test]
    fn learns_then_gates_and_refuses_bad_samples() {
        let mut l = Learner::<f64, 2, 3>::new(4, 0.01, [0.0; 2]).unwrap();
        assert_eq!(
            l.push([f64::NAN, 0.0]),
            Verdict::NoGo(Reason::InvalidSample(SampleError::NotFinite))
        );
        for x in [[0.0, 0.0], [1.0, 0.5], [0.0, 1.0], [1.0, 1.5]] {
            assert_eq!(l.push(x), Verdict::NotReady);
        }
        assert!(l.gate().is_some());
        assert!(l.push([0.5, 0.75]).is_go());
        assert!(!l.push([40.0, -40.0]).is_go());
        l.relearn();
        assert_eq!(l.push([0.0, 0.0]), Verdict::NotReady);
        assert!(Learner::<f32, 2, 3>::new(2, 0.01, [0.0; 2]).is_err());
    }

    #[test]
    fn a_stuck_reading_waits_unless_a_resolution_is_given() {
        let mut l = Learner::<f32, 2, 3>::new(5, 0.01, [0.0; 2]).unwrap();
        for _ in 0..8 {
            assert_eq!(l.push([3.0, 4.0]), Verdict::NotReady);
        }
        assert_eq!(l.last_error(), Some(FreezeError::Degenerate));
        let mut l = Learner::<f32, 2, 3>::new(5, 0.01, [0.5; 2]).unwrap();
        for _ in 0..5 {
            l.push([3.0, 4.0]);
        }
        assert!(l.push([3.0, 4.0]).is_go());
    }
}
