//! Exponentially weighted running mean and covariance.

use super::{pairs, unpack, Accumulator, BadFactor, Covariance, EstimateError, SampleError, Shape};
use crate::math::Real;

/// Exponentially weighted mean and covariance with forgetting factor `a` in (0, 1].
///
/// Update (Finch 2009, "Incremental calculation of weighted mean and variance"):
/// `d = x - mean; mean += a d; S = (1 - a)(S + a d d')`. `S` stays positive semi-definite by
/// construction (a sum of non-negative multiples of outer products). The first sample sets the
/// mean and leaves `S` at zero. After `n` samples, a sample `k` steps old has weight
/// `a (1 - a)^k`, except the first sample, whose weight is `(1 - a)^(n - 1)`; they sum to 1.
///
/// [`effective_window`](Self::effective_window) is `(2 - a) / a`: the number of equally
/// weighted samples whose mean has the same variance as this exponentially weighted mean
/// (`Var = a / (2 - a) sigma^2`, common practice for EWMA charts).
///
/// There is no merge: two exponentially weighted summaries of different streams have no
/// common "all samples" to agree with.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct EwMoments<T, const N: usize, const L: usize> {
    factor: T,
    count: u32,
    mean: [T; N],
    cov: [T; L],
}

impl<T: Real, const N: usize, const L: usize> EwMoments<T, N, L> {
    /// An empty accumulator with forgetting factor `a`; [`BadFactor`] unless `0 < a <= 1`.
    pub fn new(a: T) -> Result<Self, BadFactor> {
        let () = Shape::<N, L>::CHECK;
        if !(a > T::ZERO && a <= T::ONE) {
            return Err(BadFactor);
        }
        Ok(EwMoments {
            factor: a,
            count: 0,
            mean: [T::ZERO; N],
            cov: [T::ZERO; L],
        })
    }

    /// The forgetting factor `a`.
    pub fn factor(&self) -> T {
        self.factor
    }

    /// `(2 - a) / a`: the equivalent number of equally weighted samples (see the type docs).
    pub fn effective_window(&self) -> T {
        (T::ONE + T::ONE - self.factor) / self.factor
    }

    /// Number of samples taken (saturates at `u32::MAX`; it only tells warm-up).
    pub fn count(&self) -> u32 {
        self.count
    }

    /// Adds one sample; [`SampleError::NotFinite`] or [`SampleError::Overflow`] leave the
    /// accumulator unchanged.
    pub fn push(&mut self, x: [T; N]) -> Result<(), SampleError> {
        if !x.iter().all(|v| v.is_finite()) {
            return Err(SampleError::NotFinite);
        }
        let mut next = *self;
        next.count = self.count.saturating_add(1);
        if self.count == 0 {
            next.mean = x;
            *self = next;
            return Ok(());
        }
        let a = self.factor;
        let keep = T::ONE - a;
        let mut d = [T::ZERO; N];
        for i in 0..N {
            d[i] = x[i] - self.mean[i];
            next.mean[i] = self.mean[i] + a * d[i];
        }
        for ((i, j), s) in pairs::<N>().zip(next.cov.iter_mut()) {
            *s = keep * (*s + a * d[i] * d[j]);
        }
        let finite = next
            .mean
            .iter()
            .chain(next.cov.iter())
            .all(|v| v.is_finite());
        if !finite {
            return Err(SampleError::Overflow);
        }
        *self = next;
        Ok(())
    }

    /// The exponentially weighted mean.
    pub fn mean(&self) -> Result<[T; N], EstimateError> {
        if self.count == 0 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.mean)
    }

    /// The exponentially weighted covariance `S` (a population-style estimate: no `n - 1`).
    pub fn covariance(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.count == 0 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(Covariance::from_matrix(unpack(&self.cov)))
    }
}

impl<T: Real, const N: usize, const L: usize> Accumulator<N> for EwMoments<T, N, L> {
    type Value = T;
    fn push(&mut self, x: [T; N]) -> Result<(), SampleError> {
        EwMoments::push(self, x)
    }
    fn count(&self) -> u32 {
        self.count
    }
    fn recenter(&mut self, delta: [T; N]) -> Result<(), SampleError> {
        if !delta.iter().all(|v| v.is_finite()) {
            return Err(SampleError::NotFinite);
        }
        let mut mean = self.mean;
        for (m, &d) in mean.iter_mut().zip(delta.iter()) {
            *m += d;
        }
        if !mean.iter().all(|v| v.is_finite()) {
            return Err(SampleError::Overflow);
        }
        self.mean = mean;
        Ok(())
    }
    fn mean_f64(&self) -> Result<[f64; N], EstimateError> {
        Ok(self.mean()?.map(T::to_f64))
    }
}

#[cfg(test)]
mod tests {
    use crate::{EwMoments2, SampleError};

    #[test]
    fn factor_one_tracks_the_last_sample() {
        let mut e = EwMoments2::<f64>::new(1.0).unwrap();
        e.push([1.0, 2.0]).unwrap();
        e.push([5.0, -1.0]).unwrap();
        assert_eq!(e.mean().unwrap(), [5.0, -1.0]);
        assert_eq!(e.covariance().unwrap().matrix(), &[[0.0, 0.0], [0.0, 0.0]]);
        assert_eq!(e.effective_window(), 1.0);
        assert!(EwMoments2::<f32>::new(0.0).is_err());
        assert!(EwMoments2::<f32>::new(1.5).is_err());
        assert!(EwMoments2::<f32>::new(f32::NAN).is_err());
    }

    #[test]
    fn two_samples_by_hand() {
        // a = 0.5: d = (2, 4); mean = (1, 2); S = 0.5 * 0.5 * d d' = [1 2; 2 4].
        let mut e = EwMoments2::<f64>::new(0.5).unwrap();
        e.push([0.0, 0.0]).unwrap();
        e.push([2.0, 4.0]).unwrap();
        assert_eq!(e.mean().unwrap(), [1.0, 2.0]);
        assert_eq!(e.covariance().unwrap().matrix(), &[[1.0, 2.0], [2.0, 4.0]]);
        let before = e;
        assert_eq!(e.push([f64::INFINITY, 0.0]), Err(SampleError::NotFinite));
        assert_eq!(e, before);
    }
}
