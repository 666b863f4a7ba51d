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
        let next = self.added_unchecked(w_old, w, x);
        (all_finite(&next.mean) && all_finite(&next.comoment)).then_some(next)
    }

    /// [`Self::added`] without the range check, for inputs shown to stay in range.
    #[inline]
    fn added_unchecked(&self, w_old: T, w: T, x: &[T; N]) -> Self {
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
        next
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

/// Samples in one recent block before it is folded into the past summary: 2^16, exact in `f32`
/// and near the square root of the longest run (2^32), which balances the rounding inside a
/// block against the rounding of the folds.
const BLOCK: u32 = 1 << 16;

/// A sample is "moderate" below `2^moderate::<T>()` (2^40 in `f32`, 2^488 in `f64`), a past
/// summary "tame" when its means are moderate and its co-moment diagonal is below
/// `2^roomy::<T>()` (2^120, 2^1016). From a tame past and a block of at most 2^16 moderate
/// samples no update, fold or read can leave the float range: every deviation is below
/// `2^(moderate + 1)`, a block's co-moment and the fold's cross term below `2^(2 moderate + 19)`,
/// far under `2^MAX_EXP - 2^roomy`. Such pushes skip the range checks; others take them.
fn moderate<T: Real>() -> i32 {
    T::MAX_EXP / 2 - 24
}

fn roomy<T: Real>() -> i32 {
    T::MAX_EXP - 8
}

impl<T: Real, const N: usize, const L: usize> Core<T, N, L> {
    fn is_tame(&self) -> bool {
        self.mean.iter().all(|m| m.below_pow2(moderate::<T>()))
            && pairs::<N>()
                .zip(self.comoment.iter())
                .all(|((i, j), c)| i != j || c.below_pow2(roomy::<T>()))
    }
}

/// Running count, mean vector and co-moment matrix of float samples (Welford 1962).
///
/// `T` is `f32` or `f64`; `N` the dimension (1..=6); `L = N (N + 1) / 2`, checked at compile
/// time (use the aliases [`Moments2`](crate::Moments2) and friends).
///
/// Long runs: samples go into a recent block of at most 2^16 samples, which is folded into the
/// summary of the past with the pairwise merge of Chan, Golub & LeVeque once full; reads merge
/// the two. Every weight in a block update is then exact in `f32`, and each fold adds a
/// block's co-moment (2^16 samples' worth) to the past one, so nothing stagnates before the
/// counter ends. (A single running co-moment in `f32` stops growing near 2^24 samples, two
/// days at 100 Hz: each new term falls below half an ulp of the total, and the covariance then
/// shrinks like 1/n: 18 % low at 2^26.) Host test `long_runs` follows 2^26 samples against
/// an `f64` pass: every covariance entry stays within 5e-5 of the larger variance and the mean
/// within 2e-6 standard deviations (measured 1.0e-5 and 3.4e-7).
///
/// The counter's limit: the count is a `u32`; the 2^32-th sample is refused with
/// [`SampleError::Overflow`] and changes nothing (it never wraps). That is 497 days at 100 Hz,
/// 13.6 years at 10 Hz: a node that runs longer sends its summary (a report frame) and starts a
/// new one, and the host merges the summaries.
///
/// Accuracy: the update works on deviations from the running mean, so the co-moment does not
/// suffer the cancellation of the sum-of-squares formula; the mean itself is held in `T`, so
/// samples with a large common offset should go through [`Pivoted`](crate::Pivoted). On the
/// NIST StRD NumAcc sets the `f64` form keeps more than 8 digits of the standard deviation on
/// NumAcc4 and the `f32` form behind a pivot about 7 (host test `strd_numacc`).
///
/// Two accumulators are equal (`==`) when they hold the same count, mean and co-moment, however
/// those are split between the past and the recent block (a decoded report frame equals the
/// accumulator it was encoded from).
#[derive(Clone, Copy, Debug)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Moments<T, const N: usize, const L: usize> {
    /// All samples taken.
    count: u32,
    /// Samples in the recent block (below `BLOCK`); the past holds `count - recent`.
    recent: u16,
    /// The past is tame and every sample in the block moderate (see [`moderate`]).
    tame: bool,
    past: Core<T, N, L>,
    block: Core<T, N, L>,
}

impl<T: Real, const N: usize, const L: usize> PartialEq for Moments<T, N, L> {
    fn eq(&self, other: &Self) -> bool {
        self.count == other.count
            && match (self.whole(), other.whole()) {
                (Ok(a), Ok(b)) => a == b,
                _ => self.past == other.past && self.block == other.block,
            }
    }
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
            recent: 0,
            tame: true,
            past: Core::EMPTY,
            block: Core::EMPTY,
        }
    }

    /// Adds one sample. NaN or infinite coordinates give [`SampleError::NotFinite`]; a count
    /// or a result that would overflow gives [`SampleError::Overflow`]. Either way nothing
    /// changes.
    pub fn push(&mut self, x: [T; N]) -> Result<(), SampleError> {
        let n = self.count.checked_add(1).ok_or(SampleError::Overflow)?;
        let recent = u32::from(self.recent) + 1;
        let w_old = T::from_u32(u32::from(self.recent));
        let fast = self.tame && x.iter().all(|v| v.below_pow2(moderate::<T>()));
        let block = if fast {
            // In range by construction (see `moderate`): no checks needed.
            self.block.added_unchecked(w_old, T::ONE, &x)
        } else {
            if !all_finite(&x) {
                return Err(SampleError::NotFinite);
            }
            let block = self
                .block
                .added(w_old, T::ONE, &x)
                .ok_or(SampleError::Overflow)?;
            // The whole summary must stay readable too (a full block is checked by its fold
            // below).
            if recent != BLOCK {
                self.folded(&block, recent).ok_or(SampleError::Overflow)?;
            }
            block
        };
        if recent == BLOCK {
            // Fold the full block into the past; the new block starts empty.
            let past = self.folded(&block, recent).ok_or(SampleError::Overflow)?;
            self.past = past;
            self.block = Core::EMPTY;
            self.recent = 0;
            self.tame = past.is_tame();
        } else {
            self.block = block;
            self.recent = recent as u16;
            self.tame = fast;
        }
        self.count = n;
        Ok(())
    }

    /// The past merged with `block` of `recent` samples; `None` if that leaves the float range.
    fn folded(&self, block: &Core<T, N, L>, recent: u32) -> Option<Core<T, N, L>> {
        let past = self.count - u32::from(self.recent);
        match (past, recent) {
            (_, 0) => Some(self.past),
            (0, _) => Some(*block),
            _ => self
                .past
                .merged(T::from_u32(past), block, T::from_u32(recent)),
        }
    }

    /// The summary of all samples: the past merged with the recent block. Every operation that
    /// changes the accumulator keeps this in range (or refuses), so the `None` arm of the reads
    /// below is not reachable through the API.
    fn whole(&self) -> Result<Core<T, N, L>, EstimateError> {
        self.folded(&self.block, u32::from(self.recent))
            .ok_or(EstimateError::OutOfRange)
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
        let past = Core { mean, comoment };
        Ok(Moments {
            count,
            recent: 0,
            tame: past.is_tame(),
            past,
            block: Core::EMPTY,
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
        Ok(self.whole()?.mean)
    }

    /// The co-moment matrix `sum (x - mean)(x - mean)'`, packed upper triangle row by row
    /// (zeros when empty).
    pub fn comoment(&self) -> Result<[T; L], EstimateError> {
        Ok(self.whole()?.comoment)
    }

    /// Sample (unbiased) covariance `C / (n - 1)`; needs two samples.
    pub fn sample_covariance(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.count < 2 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.whole()?.covariance(T::from_u32(self.count - 1)))
    }

    /// Population (maximum-likelihood) covariance `C / n`; needs one sample.
    pub fn population_covariance(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.count < 1 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.whole()?.covariance(T::from_u32(self.count)))
    }
}

impl<T: Real, const N: usize, const L: usize> Merge for Moments<T, N, L> {
    /// Pairwise merge (Chan, Golub & LeVeque 1979); equal to one pass over both streams up to
    /// rounding. The result holds everything in its past summary (its recent block is empty).
    fn merge(&mut self, other: &Self) -> Result<(), SampleError> {
        if other.count == 0 {
            return Ok(());
        }
        let n = self
            .count
            .checked_add(other.count)
            .ok_or(SampleError::Overflow)?;
        let theirs = other.whole().map_err(|_| SampleError::Overflow)?;
        let core = if self.count == 0 {
            theirs
        } else {
            self.whole()
                .map_err(|_| SampleError::Overflow)?
                .merged(T::from_u32(self.count), &theirs, T::from_u32(other.count))
                .ok_or(SampleError::Overflow)?
        };
        *self = Moments {
            count: n,
            recent: 0,
            tame: core.is_tame(),
            past: core,
            block: Core::EMPTY,
        };
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
        let mut next = *self;
        if self.count > u32::from(self.recent) {
            next.past = self.past.shifted(&delta).ok_or(SampleError::Overflow)?;
        }
        if self.recent > 0 {
            next.block = self.block.shifted(&delta).ok_or(SampleError::Overflow)?;
        }
        next.whole().map_err(|_| SampleError::Overflow)?;
        // The block's samples moved by `delta` too: the next fold decides tameness again.
        next.tame = self.recent == 0 && next.past.is_tame();
        *self = next;
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

    /// The same representation, field by field (stricter than `==`, which compares summaries).
    fn same<T: Real, const N: usize, const L: usize>(
        a: &Moments<T, N, L>,
        b: &Moments<T, N, L>,
    ) -> bool {
        (a.count, a.recent, a.tame) == (b.count, b.recent, b.tame)
            && a.past == b.past
            && a.block == b.block
    }

    #[test]
    fn two_points_by_hand() {
        let mut m = Moments2::<f64>::new();
        m.push([1.0, 2.0]).unwrap();
        m.push([3.0, 6.0]).unwrap();
        assert_eq!(m.mean().unwrap(), [2.0, 4.0]);
        // Deviations (-1,-2), (1,2): C = [2 4; 4 8], sample cov = C / 1.
        assert_eq!(m.comoment(), Ok([2.0, 4.0, 8.0]));
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
        assert!(same(&m, &before));
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
        let (a, b) = (w.comoment(), m.comoment().unwrap());
        for k in 0..3 {
            assert!((a[k] - b[k]).abs() < 1e-12, "{a:?} {b:?}");
        }
        assert_eq!(w.push([0.0, 0.0], 0.0), Err(SampleError::BadWeight));
    }

    #[test]
    fn exponent_test_matches_the_comparison() {
        for k in [1, 40, 64, 127, 128] {
            let edge = libm::ldexpf(1.0, k);
            let below = f32::from_bits(edge.to_bits() - 1);
            assert!(below.below_pow2(k) && (-below).below_pow2(k), "{k}");
            assert!(!edge.below_pow2(k) && !(-edge).below_pow2(k), "{k}");
        }
        for v in [f32::INFINITY, f32::NEG_INFINITY, f32::NAN] {
            assert!(!v.below_pow2(128));
        }
        assert!(f32::MAX.below_pow2(128) && 0.0f32.below_pow2(1));
        assert!(libm::ldexp(1.0, 488).below_pow2(489) && !libm::ldexp(1.0, 488).below_pow2(488));
        assert!(f64::MAX.below_pow2(1024) && !f64::NAN.below_pow2(1024));
    }

    /// A block boundary changes nothing but rounding: the same stream read before and after
    /// the fold, and against one f64 pass.
    #[test]
    fn fold_at_the_block_boundary() {
        let mut m = Moments2::<f32>::new();
        let mut r = Moments2::<f64>::new();
        let mut state = 12345u32;
        for k in 0..(2 * BLOCK + 7) {
            state = state.wrapping_mul(1_664_525).wrapping_add(1_013_904_223);
            let u = (state >> 8) as f32 / 16_777_216.0;
            let x = [u - 0.5, 0.25 * u + 0.1 * (k % 3) as f32];
            m.push(x).unwrap();
            r.push(x.map(f64::from)).unwrap();
            if k + 1 == BLOCK {
                assert_eq!((m.recent, m.count), (0, BLOCK), "folded");
            }
        }
        assert_eq!(m.count(), 2 * BLOCK + 7);
        let (c, cr) = (m.comoment().unwrap(), r.comoment().unwrap());
        for k in 0..3 {
            let rel = (f64::from(c[k]) - cr[k]).abs() / cr[0].max(cr[2]);
            assert!(rel < 1e-5, "{k}: {} vs {}", c[k], cr[k]);
        }
    }

    /// Huge samples take the checked path: refused when the whole summary would overflow,
    /// accepted (and readable) otherwise; the accumulator never holds an unreadable state.
    #[test]
    fn huge_samples_are_checked() {
        let mut m = Moments2::<f32>::new();
        m.push([3.0e38, 0.0]).unwrap();
        assert!(!m.tame);
        let before = m;
        assert_eq!(m.push([-3.0e38, 0.0]), Err(SampleError::Overflow));
        assert!(same(&m, &before));
        m.push([3.0e38, 1.0]).unwrap();
        assert_eq!(m.mean(), Ok([3.0e38, 0.5]));
        // Past huge, block moderate: the fold's cross term is checked as well.
        let mut p = Moments2::<f32>::from_parts(10, [1.0e15, 0.0], [0.0; 3]).unwrap();
        assert!(!p.tame);
        assert_eq!(p.push([-1.0e30, 0.0]), Err(SampleError::Overflow));
        p.push([1.0, 2.0]).unwrap();
        let c = p.sample_covariance().unwrap();
        assert!(c.matrix()[0][0] > 1.0e28 && c.matrix()[0][0].is_finite());
    }

    /// The counter's limit: refused with Overflow, nothing changes, no wrap.
    #[test]
    fn count_limit_refuses() {
        let mut m = Moments2::<f32>::from_parts(u32::MAX - 1, [1.0, 2.0], [4.0, 0.5, 9.0]).unwrap();
        m.push([1.5, 2.5]).unwrap();
        assert_eq!(m.count(), u32::MAX);
        let before = m;
        assert_eq!(m.push([1.0, 2.0]), Err(SampleError::Overflow));
        assert!(same(&m, &before));
        let one = {
            let mut o = Moments2::<f32>::new();
            o.push([0.0, 0.0]).unwrap();
            o
        };
        assert_eq!(m.merge(&one), Err(SampleError::Overflow));
        assert!(same(&m, &before));
    }
}
