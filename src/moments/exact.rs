//! Exact integer running moments for `i32` samples.

use super::{pairs, unpack, Accumulator, Covariance, EstimateError, Merge, SampleError, Shape};
use crate::math::Real;

/// Exact sums of integer samples: the count, `sum x_i` and `sum x_i x_j` in `i64`.
///
/// Exact until an overflow, which is detected and refused ([`SampleError::Overflow`], nothing
/// changed): with samples shifted to |x| < 2^15 (a 16-bit ADC around its offset) the products
/// hold for at least 2^33 samples, longer than the `u32` count. Feed it through
/// [`Pivoted`](crate::Pivoted) with the ADC offset or the nominal as pivot to keep the
/// shifted values small.
///
/// Mean and covariance are derived on demand: `n sum x_i x_j - sum x_i sum x_j` is formed
/// exactly in `i128` (it cannot overflow: it is at most 2^95 in size), then rounded once to
/// `f64` and divided twice (three roundings: within 2 ulp of the exact covariance in `f64`); the
/// `f32` forms are that value rounded again.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ExactMoments<const N: usize, const L: usize> {
    count: u32,
    sum: [i64; N],
    prod: [i64; L],
}

/// `a b` exactly. Samples within the 16-bit range (`|a|, |b| <= 2^15`) multiply in `i32`,
/// where the product fits (at most 2^30): a core without a 32 x 32 -> 64 multiply (Cortex-M0)
/// then needs no call to its 64-bit multiply routine. Wider samples take the `i64` product.
#[inline(always)]
fn product(a: i32, b: i32) -> i64 {
    let small = |v: i32| v.unsigned_abs() <= 1 << 15;
    if small(a) && small(b) {
        i64::from(a * b)
    } else {
        wide_product(a, b)
    }
}

/// Out of line so that the compiler cannot compute it speculatively on the narrow path.
#[cold]
#[inline(never)]
fn wide_product(a: i32, b: i32) -> i64 {
    i64::from(a) * i64::from(b)
}

impl<const N: usize, const L: usize> Default for ExactMoments<N, L> {
    fn default() -> Self {
        Self::new()
    }
}

impl<const N: usize, const L: usize> ExactMoments<N, L> {
    /// An empty accumulator.
    pub const fn new() -> Self {
        let () = Shape::<N, L>::CHECK;
        ExactMoments {
            count: 0,
            sum: [0; N],
            prod: [0; L],
        }
    }

    /// Adds one sample; [`SampleError::Overflow`] (and nothing changed) if a sum would overflow.
    pub fn push(&mut self, x: [i32; N]) -> Result<(), SampleError> {
        let count = self.count.checked_add(1).ok_or(SampleError::Overflow)?;
        let mut sum = self.sum;
        for (s, &v) in sum.iter_mut().zip(x.iter()) {
            *s = s.checked_add(i64::from(v)).ok_or(SampleError::Overflow)?;
        }
        let mut prod = self.prod;
        for ((i, j), p) in pairs::<N>().zip(prod.iter_mut()) {
            *p = p
                .checked_add(product(x[i], x[j]))
                .ok_or(SampleError::Overflow)?;
        }
        *self = ExactMoments { count, sum, prod };
        Ok(())
    }

    /// Number of samples taken.
    pub fn count(&self) -> u32 {
        self.count
    }

    /// The exact sums `sum x_i`.
    pub fn sums(&self) -> &[i64; N] {
        &self.sum
    }

    /// The exact sums of products `sum x_i x_j`, packed upper triangle row by row.
    pub fn products(&self) -> &[i64; L] {
        &self.prod
    }

    /// Mean vector in `T`: the exact sum rounded to `f64`, divided by `n` (at most 1 ulp of
    /// `f64` from the exact quotient), then rounded to `T`.
    pub fn mean<T: Real>(&self) -> Result<[T; N], EstimateError> {
        Ok(self.mean_f64()?.map(T::from_f64))
    }

    fn mean_f64(&self) -> Result<[f64; N], EstimateError> {
        if self.count == 0 {
            return Err(EstimateError::TooFewSamples);
        }
        let n = f64::from(self.count);
        Ok(self.sum.map(|s| s as f64 / n))
    }

    /// The exact scaled co-moments `n sum x_i x_j - sum x_i sum x_j` (= n C_ij), packed.
    pub fn scaled_comoment(&self) -> [i128; L] {
        let n = i128::from(self.count);
        let mut out = [0i128; L];
        for ((i, j), (o, &p)) in pairs::<N>().zip(out.iter_mut().zip(self.prod.iter())) {
            let si = i128::from(self.sum[i]);
            let sj = i128::from(self.sum[j]);
            // |n p| <= 2^32 * 2^63 and |si sj| <= 2^126: both fit, and so does the difference.
            *o = n * i128::from(p) - si * sj;
        }
        out
    }

    fn covariance<T: Real>(&self, divisor: f64) -> Covariance<T, N> {
        let scaled = self.scaled_comoment();
        let n = f64::from(self.count);
        let mut tri = [T::ZERO; L];
        for (t, &s) in tri.iter_mut().zip(scaled.iter()) {
            *t = T::from_f64(s as f64 / n / divisor);
        }
        Covariance::from_matrix(unpack(&tri))
    }

    /// Sample covariance `C / (n - 1)` in `T`; needs two samples.
    pub fn sample_covariance<T: Real>(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.count < 2 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.covariance(f64::from(self.count - 1)))
    }

    /// Population covariance `C / n` in `T`; needs one sample.
    pub fn population_covariance<T: Real>(&self) -> Result<Covariance<T, N>, EstimateError> {
        if self.count < 1 {
            return Err(EstimateError::TooFewSamples);
        }
        Ok(self.covariance(f64::from(self.count)))
    }
}

impl<const N: usize, const L: usize> Merge for ExactMoments<N, L> {
    /// Exact: the sums add.
    fn merge(&mut self, other: &Self) -> Result<(), SampleError> {
        let count = self
            .count
            .checked_add(other.count)
            .ok_or(SampleError::Overflow)?;
        let mut sum = self.sum;
        for (s, &o) in sum.iter_mut().zip(other.sum.iter()) {
            *s = s.checked_add(o).ok_or(SampleError::Overflow)?;
        }
        let mut prod = self.prod;
        for (p, &o) in prod.iter_mut().zip(other.prod.iter()) {
            *p = p.checked_add(o).ok_or(SampleError::Overflow)?;
        }
        *self = ExactMoments { count, sum, prod };
        Ok(())
    }
}

impl<const N: usize, const L: usize> Accumulator<N> for ExactMoments<N, L> {
    type Value = i32;
    fn push(&mut self, x: [i32; N]) -> Result<(), SampleError> {
        ExactMoments::push(self, x)
    }
    fn count(&self) -> u32 {
        self.count
    }
    /// Exact: `sum (x_i + d_i) = S_i + n d_i`,
    /// `sum (x_i + d_i)(x_j + d_j) = P_ij + d_j S_i + d_i S_j + n d_i d_j`.
    fn recenter(&mut self, delta: [i32; N]) -> Result<(), SampleError> {
        let n = i128::from(self.count);
        let fit = |v: i128| i64::try_from(v).map_err(|_| SampleError::Overflow);
        let mut sum = self.sum;
        for (s, &d) in sum.iter_mut().zip(delta.iter()) {
            *s = fit(i128::from(*s) + n * i128::from(d))?;
        }
        let mut prod = self.prod;
        for ((i, j), p) in pairs::<N>().zip(prod.iter_mut()) {
            let (di, dj) = (i128::from(delta[i]), i128::from(delta[j]));
            let (si, sj) = (i128::from(self.sum[i]), i128::from(self.sum[j]));
            *p = fit(i128::from(*p) + dj * si + di * sj + n * di * dj)?;
        }
        self.sum = sum;
        self.prod = prod;
        Ok(())
    }
    fn mean_f64(&self) -> Result<[f64; N], EstimateError> {
        ExactMoments::mean_f64(self)
    }
}

#[cfg(test)]
mod tests {
    use crate::{ExactMoments2, Merge};

    #[test]
    fn sums_by_hand_and_overflow_is_refused() {
        let mut m = ExactMoments2::new();
        m.push([1, -2]).unwrap();
        m.push([3, 4]).unwrap();
        assert_eq!(m.sums(), &[4, 2]);
        assert_eq!(m.products(), &[10, 10, 20]);
        // n P - S S': [2*10-16, 2*10-8, 2*20-4] = [4, 12, 36]; sample cov = /(2*1).
        assert_eq!(m.scaled_comoment(), [4, 12, 36]);
        let c = m.sample_covariance::<f64>().unwrap();
        assert_eq!(c.matrix(), &[[2.0, 6.0], [6.0, 18.0]]);

        let mut big = ExactMoments2::new();
        big.push([i32::MAX, i32::MAX]).unwrap();
        big.push([i32::MAX, i32::MAX]).unwrap();
        let before = big;
        // Three squares of 2^31 exceed i64.
        assert!(big.push([i32::MAX, 0]).is_err());
        assert_eq!(big, before);
        let copy = big;
        assert!(big.merge(&copy).is_err());
        assert_eq!(big, before);
    }
}
