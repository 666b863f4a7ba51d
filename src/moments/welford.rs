//! Float running moments: Welford's one-pass update, West's weighted form, and the pairwise
//! merge of Chan, Golub & LeVeque.

use super::{pairs, unpack, Accumulator, Covariance, EstimateError, Merge, SampleError, Shape};
use crate::math::Real;

/// Mean and packed co-moment triangle, the part shared by the counted and weighted forms.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
struct Core<T, const N: usize, const L: usize> {
    mean: [T; N],
    comoment: [T; L],
}

/// With hardware float: `x - x` is 0 for every finite `x` and NaN for an infinity or a NaN,
/// so one compare of the sum checks the lot (cheaper than a test per value). In software
/// float the per-value test, an integer test of the exponent bits, is the cheaper one.
#[inline]
#[allow(clippy::eq_op)] // `v - v` is the test, not a slip
fn all_finite<T: Real>(xs: &[T]) -> bool {
    if T::NATIVE {
        let mut acc = T::ZERO;
        for &v in xs {
            acc += v - v;
        }
        acc == T::ZERO
    } else {
        xs.iter().all(|v| v.is_finite())
    }
}

impl<T: Real, const N: usize, const L: usize> Core<T, N, L> {
    const EMPTY: Self = Core {
        mean: [T::ZERO; N],
        comoment: [T::ZERO; L],
    };

    /// West (1979), CACM 22(9): with old weight `w_old`, new weight `w`, `W = w_old + w`,
    /// `d = x - mean`, `r = d w / W`: `mean += r`, `C += w_old d r'`. With `w = 1` this is
    /// Welford (1962). Returns the updated copy; `None` if a result is not finite.
    fn added(&self, w_old: T, w: T, x: &[T; N]) -> Option<Self> {
        let total = w_old + w;
        let mut next = *self;
        let mut d = [T::ZERO; N];
        let mut r = [T::ZERO; N];
        for i in 0..N {
            d[i] = x[i] - self.mean[i];
            r[i] = d[i] * w / total;
            next.mean[i] = self.mean[i] + r[i];
        }
        for ((i, j), c) in pairs::<N>().zip(next.comoment.iter_mut()) {
            *c += w_old * d[i] * r[j];
        }
        (all_finite(&next.mean) && all_finite(&next.comoment)).then_some(next)
    }

    /// Chan, Golub & LeVeque (1979): `W = wa + wb`, `d = mean_b - mean_a`,
    /// `mean = mean_a + d wb / W`, `C = Ca + Cb + d d' wa wb / W`.
    fn merged(&self, wa: T, other: &Self, wb: T) -> Option<Self> {
        let total = wa + wb;
        let mut next = *self;
        let mut d = [T::ZERO; N];
        for ((di, m), (&ma, &mb)) in d
            .iter_mut()
            .zip(next.mean.iter_mut())
            .zip(self.mean.iter().zip(other.mean.iter()))
        {
            *di = mb - ma;
            *m = ma + *di * (wb / total);
        }
        let f = wa * wb / total;
        for (((i, j), c), cb) in pairs::<N>()
            .zip(next.comoment.iter_mut())
            .zip(other.comoment.iter())
        {
            *c = *c + *cb + d[i] * d[j] * f;
        }
        (all_finite(&next.mean) && all_finite(&next.comoment)).then_some(next)
    }

    fn shifted(&self, delta: &[T; N]) -> Option<Self> {
        let mut next = *self;
        for (m, &d) in next.mean.iter_mut().zip(delta.iter()) {
            *m += d;
        }
        all_finite(&next.mean).then_some(next)
    }

    fn covariance(&self, divisor: T) -> Covariance<T, N> {
        let mut m: [[T; N]; N] = unpack(&self.comoment);
        for row in m.iter_mut() {
            for v in row.iter_mut() {
                *v /= divisor;
            }
        }
        Covariance::from_matrix(m)
    }
}

/// Running count, mean vector and co-moment matrix of float samples (Welford 1962).
///
/// `T` is `f32` or `f64`; `N` the dimension (1..=6); `L = N (N + 1) / 2`, checked at compile
/// time (use the aliases [`Moments2`](crate::Moments2) and friends). The count is a `u32`;
/// the 2^32-th sample is refused with [`SampleError::Overflow`].
///
/// Accuracy: the update works on deviations from the running mean, so the co-moment does not
/// suffer the cancellation of the sum-of-squares formula; the mean itself is held in `T`, so
/// samples with a large common offset should go through [`Pivoted`](crate::Pivoted). On the
/// NIST StRD NumAcc sets the `f64` form keeps more than 8 digits of the standard deviation on
/// NumAcc4 and the `f32` form behind a pivot about 7 (host test `strd_numacc`).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Moments<T, const N: usize, const L: usize> {
    count: u32,
    core: Core<T, N, L>,
}

impl<T: Real, const N: usize, const L: usize> Default for Moments<T, N, L> {
    fn default() -> Self {
        Self::new()
    }
}

impl<T: Real, const N: usize, const L: usize> Moments<T, N, L> {
    /// An empty accumulator.
    pub const fn new() -> Self {
        let () = Shape::<N, L>::CHECK;
        Moments {
            count: 0,
            core: Core::EMPTY,
        }
    }

    /// Adds one sample. NaN or infinite coordinates give [`SampleError::NotFinite`]; a count
    /// or a result that would overflow gives [`SampleError::Overflow`]. Either way nothing
    /// changes.
    pub fn push(&mut self, x: [T; N]) -> Result<(), SampleError> {
        if !all_finite(&x) {
            return Err(SampleError::NotFinite);
        }
        let n = self.count.checked_add(1).ok_or(SampleError::Overflow)?;
        let core = self
            .core
            .added(T::from_u32(self.count), T::ONE, &x)
            .ok_or(SampleError::Overflow)?;
        self.count = n;
        self.core = core;
        Ok(())
    }

    /// Rebuilds an accumulator from its parts (a decoded report frame, say): the count, the
    /// mean and the packed co-moment. [`SampleError::NotFinite`] for a non-finite value,
    /// [`SampleError::BadWeight`] for a negative variance term or a non-empty summary of zero
    /// samples.
    pub fn from_parts(count: u32, mean: [T; N], comoment: [T; L]) -> Result<Self, SampleError> {
        let () = Shape::<N, L>::CHECK;
        if !(all_finite(&mean) && all_finite(&comoment)) {
            return Err(SampleError::NotFinite);
        }
        let diag_ok = pairs::<N>()
            .zip(comoment.iter())
            .all(|((i, j), &c)| i != j || c >= T::ZERO);
        let empty_ok = count > 0 || mean.iter().chain(comoment.iter()).all(|&v| v == T::ZERO);
        if !(diag_ok && empty_ok) {
            return Err(SampleError::BadWeight);
        }
        Ok(Moments {
            count,
            core: Core { mean, comoment },
        })
    }

    /// Number of samples taken.
    pub fn count(&self) -> u32 {
        self.count
    }

    /// Mean vector; [`EstimateError::TooFewSamples`] when empty.
    pub fn mean(&self) -> Result<[T; N], EstimateError> {
        if self.count == 0 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.core.mean)
    }

    /// The co-moment matrix `sum (x - mean)(x - mean)'`, packed upper triangle row by row.
    pub fn comoment(&self) -> &[T; L] {
        &self.core.comoment
    }

    /// Sample (unbiased) covariance `C / (n - 1)`; needs two samples.
    pub fn sample_covariance(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.count < 2 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.core.covariance(T::from_u32(self.count - 1)))
    }

    /// Population (maximum-likelihood) covariance `C / n`; needs one sample.
    pub fn population_covariance(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.count < 1 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.core.covariance(T::from_u32(self.count)))
    }
}

impl<T: Real, const N: usize, const L: usize> Merge for Moments<T, N, L> {
    /// Pairwise merge (Chan, Golub & LeVeque 1979); equal to one pass over both streams up to
    /// rounding.
    fn merge(&mut self, other: &Self) -> Result<(), SampleError> {
        if other.count == 0 {
            return Ok(());
        }
        let n = self
            .count
            .checked_add(other.count)
            .ok_or(SampleError::Overflow)?;
        let core = self
            .core
            .merged(
                T::from_u32(self.count),
                &other.core,
                T::from_u32(other.count),
            )
            .ok_or(SampleError::Overflow)?;
        self.count = n;
        self.core = core;
        Ok(())
    }
}

impl<T: Real, const N: usize, const L: usize> Accumulator<N> for Moments<T, N, L> {
    type Value = T;
    fn push(&mut self, x: [T; N]) -> Result<(), SampleError> {
        Moments::push(self, x)
    }
    fn count(&self) -> u32 {
        self.count
    }
    fn recenter(&mut self, delta: [T; N]) -> Result<(), SampleError> {
        if !all_finite(&delta) {
            return Err(SampleError::NotFinite);
        }
        if self.count > 0 {
            self.core = self.core.shifted(&delta).ok_or(SampleError::Overflow)?;
        }
        Ok(())
    }
    fn mean_f64(&self) -> Result<[f64; N], EstimateError> {
        Ok(self.mean()?.map(T::to_f64))
    }
}

/// Running weighted mean and co-moment (West 1979), with frequency weights: a weight `w` counts
/// as `w` identical samples. The sample covariance is `C / (W - 1)` for a weight sum `W > 1`.
///
/// The weight sum is held in `T`; in `f32` it stops growing exactly past 2^24, so use `f64` or
/// [`Moments`] for long unweighted streams.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct WeightedMoments<T, const N: usize, const L: usize> {
    weight: T,
    core: Core<T, N, L>,
}

impl<T: Real, const N: usize, const L: usize> Default for WeightedMoments<T, N, L> {
    fn default() -> Self {
        Self::new()
    }
}

impl<T: Real, const N: usize, const L: usize> WeightedMoments<T, N, L> {
    /// An empty accumulator.
    pub const fn new() -> Self {
        let () = Shape::<N, L>::CHECK;
        WeightedMoments {
            weight: T::ZERO,
            core: Core::EMPTY,
        }
    }

    /// Adds one sample with weight `w > 0`. Errors: [`SampleError::NotFinite`],
    /// [`SampleError::BadWeight`], [`SampleError::Overflow`]; nothing changes on error.
    pub fn push(&mut self, x: [T; N], w: T) -> Result<(), SampleError> {
        if !all_finite(&x) {
            return Err(SampleError::NotFinite);
        }
        if !(w.is_finite() && w > T::ZERO) {
            return Err(SampleError::BadWeight);
        }
        let total = self.weight + w;
        if !total.is_finite() {
            return Err(SampleError::Overflow);
        }
        self.core = self
            .core
            .added(self.weight, w, &x)
            .ok_or(SampleError::Overflow)?;
        self.weight = total;
        Ok(())
    }

    /// Sum of the weights taken.
    pub fn weight(&self) -> T {
        self.weight
    }

    /// Weighted mean; [`EstimateError::TooFewSamples`] when empty.
    pub fn mean(&self) -> Result<[T; N], EstimateError> {
        if self.weight > T::ZERO {
            Ok(self.core.mean)
        } else {
            Err(EstimateError::TooFewSamples)
        }
    }

    /// The weighted co-moment matrix, packed upper triangle.
    pub fn comoment(&self) -> &[T; L] {
        &self.core.comoment
    }

    /// Frequency-weighted sample covariance `C / (W - 1)`; needs `W > 1`.
    pub fn sample_covariance(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.weight > T::ONE {
            Ok(self.core.covariance(self.weight - T::ONE))
        } else {
            Err(EstimateError::TooFewSamples)
        }
    }

    /// Weighted population covariance `C / W`.
    pub fn population_covariance(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.weight > T::ZERO {
            Ok(self.core.covariance(self.weight))
        } else {
            Err(EstimateError::TooFewSamples)
        }
    }
}

impl<T: Real, const N: usize, const L: usize> Merge for WeightedMoments<T, N, L> {
    fn merge(&mut self, other: &Self) -> Result<(), SampleError> {
        if other.weight <= T::ZERO {
            return Ok(());
        }
        if self.weight <= T::ZERO {
            *self = *other;
            return Ok(());
        }
        let total = self.weight + other.weight;
        if !total.is_finite() {
            return Err(SampleError::Overflow);
        }
        self.core = self
            .core
            .merged(self.weight, &other.core, other.weight)
            .ok_or(SampleError::Overflow)?;
        self.weight = total;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::Moments2;

    #[test]
    fn two_points_by_hand() {
        let mut m = Moments2::<f64>::new();
        m.push([1.0, 2.0]).unwrap();
        m.push([3.0, 6.0]).unwrap();
        assert_eq!(m.mean().unwrap(), [2.0, 4.0]);
        // Deviations (-1,-2), (1,2): C = [2 4; 4 8], sample cov = C / 1.
        assert_eq!(m.comoment(), &[2.0, 4.0, 8.0]);
        assert_eq!(
            m.sample_covariance().unwrap().matrix(),
            &[[2.0, 4.0], [4.0, 8.0]]
        );
    }

    #[test]
    fn rejected_sample_changes_nothing() {
        let mut m = Moments2::<f32>::new();
        m.push([1.0, 2.0]).unwrap();
        let before = m;
        assert_eq!(m.push([f32::NAN, 0.0]), Err(SampleError::NotFinite));
        assert_eq!(m.push([3.0e38, -3.0e38]), Err(SampleError::Overflow));
        assert_eq!(m, before);
    }

    #[test]
    fn weight_two_equals_two_pushes() {
        let mut w = WeightedMoments::<f64, 2, 3>::new();
        let mut m = Moments2::<f64>::new();
        for (x, k) in [([1.0, 0.5], 2u32), ([4.0, -1.0], 1), ([2.5, 3.0], 3)] {
            w.push(x, f64::from(k)).unwrap();
            for _ in 0..k {
                m.push(x).unwrap();
            }
        }
        let (a, b) = (w.comoment(), m.comoment());
        for k in 0..3 {
            assert!((a[k] - b[k]).abs() < 1e-12, "{a:?} {b:?}");
        }
        assert_eq!(w.push([0.0, 0.0], 0.0), Err(SampleError::BadWeight));
    }
}
