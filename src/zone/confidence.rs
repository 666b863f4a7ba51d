//! How sure is a predicted yield? Confidence bounds on the in-zone probability when the mean
//! and the covariance were estimated from a baseline of `m` samples.
//!
//! Method: generalized pivotal quantities (Weerahandi 1993, JASA 88; for the multivariate
//! normal as in Krishnamoorthy & Mathew 2009, "Statistical Tolerance Regions", Wiley, ch. 9).
//! With the baseline's mean `xbar`, sample covariance `S` (divisor `m - 1`) and `A = (m - 1) S
//! = L L'`, one draw is
//!
//! - `W = B B'`, a Wishart(m - 1, I) matrix by Bartlett's decomposition (`B` lower triangular,
//!   `B_11^2 ~ chi2(m - 1)`, `B_22^2 ~ chi2(m - 2)`, `B_21 ~ N(0, 1)`);
//! - the covariance `R_S = L W^-1 L' = C C'` with `C = L B^-T`;
//! - the mean `R_m = xbar - C z / sqrt(m)`, `z ~ N(0, I)`;
//! - the zone probability under `N(R_m, R_S)`.
//!
//! The upper `confidence` quantile of the outside probability over the draws is the upper
//! bound on the nonconforming fraction; one minus it is the lower bound on the yield. With the
//! covariance known (`Uncertainty::MeanOnly`) `R_S = S` and only the mean is drawn; for a zone
//! whose probability is monotone in the mean (a one-sided limit) that is the textbook
//! confidence limit for a normal mean carried through the zone probability.
//!
//! Assumptions: the baseline samples are independent draws from one bivariate normal process
//! and the new parts come from the same process. The GPQ bound is approximate: its coverage is
//! measured by simulation in the host tests (conservative for a process well inside a closed
//! zone; for one-sided limits slightly above nominal, since the bivariate pivot's marginal has
//! `m - 2` degrees of freedom where the exact one-sided interval has `m - 1`), not guaranteed,
//! and it inherits the Monte Carlo error of a finite number of draws. A baseline trimmed by a
//! Phase I screen has a slightly small covariance, which makes the bound slightly optimistic.

use core::fmt;

use super::{Yield, Zone, ZoneError};
use crate::math::{cholesky, Precision, Xoshiro128};
use crate::Covariance;

/// What was estimated from the baseline.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Uncertainty {
    /// Mean and covariance both estimated from the `m` samples (the usual case).
    MeanAndCovariance,
    /// The covariance is known (a long history, a gauge study); only the mean was estimated.
    MeanOnly,
}

/// Why a bound cannot be computed.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum BoundError {
    /// The baseline has no more samples than dimensions (`m <= 2`; `m = 0` with a known
    /// covariance).
    TooFewSamples,
    /// The confidence level is not strictly between 0 and 1.
    BadConfidence,
    /// The buffer for the draws is empty.
    NoDraws,
    /// The mean or covariance cannot be used (not finite, not positive definite).
    Zone(ZoneError),
}

impl fmt::Display for BoundError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            BoundError::TooFewSamples => {
                f.write_str("baseline size must exceed the dimension (m > 2)")
            }
            BoundError::BadConfidence => {
                f.write_str("confidence must lie strictly between 0 and 1")
            }
            BoundError::NoDraws => f.write_str("no room for draws (empty buffer)"),
            BoundError::Zone(e) => e.fmt(f),
        }
    }
}

impl core::error::Error for BoundError {}

/// A predicted yield with its confidence bounds.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct YieldBound<T> {
    /// The point estimate: the zone probability under the estimated mean and covariance.
    pub estimate: Yield<T>,
    /// With the stated confidence, at least this fraction of parts is inside the zone.
    pub inside_lower: T,
    /// With the stated confidence, at most this fraction of parts is outside (times 1e6: ppm).
    pub outside_upper: T,
}

impl<T: Precision> Zone<T> {
    /// Lower confidence bound on the in-zone probability (and upper bound on the outside
    /// fraction) for a baseline of `size` samples with mean `mean` and sample covariance
    /// `cov`, at level `confidence`, from as many draws as `draws` holds (its contents are
    /// overwritten; the draws come from `rng`, so a fixed seed gives a fixed answer). See the
    /// module docs for the method and its assumptions. Cost: one zone probability per draw.
    ///
    /// Errors: [`BoundError::TooFewSamples`] for `size <= 2` (`size == 0` with a known
    /// covariance), [`BoundError::BadConfidence`]
    /// outside (0, 1), [`BoundError::NoDraws`] for an empty buffer, [`BoundError::Zone`] for a
    /// mean or covariance the zone probability refuses.
    #[allow(clippy::too_many_arguments)]
    pub fn yield_bound(
        &self,
        mean: &[T; 2],
        cov: &Covariance<T, 2>,
        size: u32,
        confidence: T,
        uncertainty: Uncertainty,
        rng: &mut Xoshiro128,
        draws: &mut [T],
    ) -> Result<YieldBound<T>, BoundError> {
        let needed = match uncertainty {
            Uncertainty::MeanAndCovariance => 3,
            Uncertainty::MeanOnly => 1,
        };
        if size < needed {
            return Err(BoundError::TooFewSamples);
        }
        if !(confidence > T::ZERO && confidence < T::ONE) {
            return Err(BoundError::BadConfidence);
        }
        if draws.is_empty() {
            return Err(BoundError::NoDraws);
        }
        let estimate = self.probability(mean, cov).map_err(BoundError::Zone)?;
        let (l, _) = cholesky(cov.matrix()).ok_or(BoundError::Zone(ZoneError::BadDistribution))?;
        for slot in draws.iter_mut() {
            let (mu, sigma) = pivot_draw(mean, &l, size, uncertainty, rng);
            // A draw the zone refuses (a numerically singular covariance) counts as all
            // outside: it can only make the bound more cautious.
            *slot = self
                .probability(&mu, &Covariance::from_matrix(sigma))
                .map_or(T::ONE, |y| y.outside);
        }
        heap_sort(draws);
        // The rank in f64, less a few ulp of T, so that a level such as 0.6 rounded up in f32
        // does not move the rank by one.
        let k = confidence.to_f64() * draws.len() as f64 * (1.0 - 4.0 * T::EPSILON.to_f64());
        let index = (libm::ceil(k) as usize).saturating_sub(1);
        let outside_upper = draws
            .get(index.min(draws.len() - 1))
            .copied()
            .unwrap_or(T::ONE);
        Ok(YieldBound {
            estimate,
            inside_lower: T::ONE - outside_upper,
            outside_upper,
        })
    }
}

/// One draw of the pivotal quantities `(R_m, R_S)` for a baseline of `size` samples with mean
/// `mean` and sample-covariance Cholesky factor `l` (see the module docs).
fn pivot_draw<T: Precision>(
    mean: &[T; 2],
    l: &[[T; 2]; 2],
    size: u32,
    uncertainty: Uncertainty,
    rng: &mut Xoshiro128,
) -> ([T; 2], [[T; 2]; 2]) {
    let m = T::from_u32(size);
    // C = L_A B^-T with L_A = sqrt(m - 1) L; for a known covariance C = L.
    let c = match uncertainty {
        Uncertainty::MeanOnly => *l,
        Uncertainty::MeanAndCovariance => {
            let b11 = rng.chi_square::<T>(size - 1).sqrt();
            let b22 = rng.chi_square::<T>(size - 2).sqrt();
            let (b21, _) = rng.normal_pair::<T>();
            // B^-T = [[1/b11, -b21/(b11 b22)], [0, 1/b22]].
            let (p, q, r) = (T::ONE / b11, -b21 / (b11 * b22), T::ONE / b22);
            let s = (m - T::ONE).sqrt();
            [
                [s * l[0][0] * p, s * l[0][0] * q],
                [s * l[1][0] * p, s * (l[1][0] * q + l[1][1] * r)],
            ]
        }
    };
    let (z0, z1) = rng.normal_pair::<T>();
    let root_m = m.sqrt();
    let mu = [
        mean[0] - (c[0][0] * z0 + c[0][1] * z1) / root_m,
        mean[1] - (c[1][0] * z0 + c[1][1] * z1) / root_m,
    ];
    let s00 = c[0][0] * c[0][0] + c[0][1] * c[0][1];
    let s01 = c[0][0] * c[1][0] + c[0][1] * c[1][1];
    let s11 = c[1][0] * c[1][0] + c[1][1] * c[1][1];
    (mu, [[s00, s01], [s01, s11]])
}

/// Ascending heap sort in place, without any indexing that could panic (values are finite:
/// probabilities).
fn heap_sort<T: PartialOrd + Copy>(v: &mut [T]) {
    let n = v.len();
    for start in (0..n / 2).rev() {
        sift_down(v, start, n);
    }
    for end in (1..n).rev() {
        swap(v, 0, end);
        sift_down(v, 0, end);
    }
}

fn sift_down<T: PartialOrd + Copy>(v: &mut [T], mut root: usize, end: usize) {
    loop {
        let left = 2 * root + 1;
        if left >= end {
            return;
        }
        let right = left + 1;
        let bigger = match (v.get(left), v.get(right)) {
            (Some(a), Some(b)) if right < end && a < b => right,
            _ => left,
        };
        match (v.get(root), v.get(bigger)) {
            (Some(r), Some(c)) if r < c => {
                swap(v, root, bigger);
                root = bigger;
            }
            _ => return,
        }
    }
}

fn swap<T: Copy>(v: &mut [T], i: usize, j: usize) {
    if let (Some(&a), Some(&b)) = (v.get(i), v.get(j)) {
        if let Some(x) = v.get_mut(i) {
            *x = b;
        }
        if let Some(x) = v.get_mut(j) {
            *x = a;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::{heap_sort, pivot_draw, Uncertainty};
    use crate::math::{cholesky, Xoshiro128};

    #[test]
    fn pivot_draws_have_the_inverse_wishart_moments() {
        // For A = (m - 1) S, R_S = L_A W^-1 L_A' with W ~ Wishart(m - 1, I) has mean
        // A / (m - 4) (inverse Wishart, p = 2), and A_11 / (R_S)_11 ~ chi2(m - 2) with mean
        // m - 2 (textbook inverse-Wishart facts; common practice); R_m has mean xbar.
        // 200 000 draws: the means to about 1 %.
        let (m, n) = (12u32, 200_000);
        let s = [[4.0f64, 1.2], [1.2, 2.0]];
        let xbar = [1.0, -2.0];
        let (l, _) = cholesky(&s).unwrap();
        let mut rng = Xoshiro128::new(11);
        let (mut sum, mut ratio, mut mu) = ([[0.0; 2]; 2], 0.0, [0.0; 2]);
        for _ in 0..n {
            let (d, r) = pivot_draw(&xbar, &l, m, Uncertainty::MeanAndCovariance, &mut rng);
            for i in 0..2 {
                mu[i] += d[i];
                for j in 0..2 {
                    sum[i][j] += r[i][j];
                }
            }
            ratio += f64::from(m - 1) * s[0][0] / r[0][0];
        }
        let k = f64::from(n);
        let scale = f64::from(m - 1) / f64::from(m - 4);
        for i in 0..2 {
            for j in 0..2 {
                let want = s[i][j] * scale;
                let got = sum[i][j] / k;
                let tol = 0.01 * (s[i][i] * s[j][j]).sqrt() * scale;
                assert!((got - want).abs() < tol, "{i}{j}: {got} vs {want}");
            }
            assert!((mu[i] / k - xbar[i]).abs() < 0.01, "mean {i}");
        }
        let got = ratio / k;
        assert!((got - f64::from(m - 2)).abs() < 0.05, "{got}");
    }

    #[test]
    fn heap_sort_sorts() {
        let mut v = [5.0f32, -1.0, 3.5, 3.5, 0.0, 9.0, -7.25, 2.0];
        heap_sort(&mut v);
        assert_eq!(v, [-7.25, -1.0, 0.0, 2.0, 3.5, 3.5, 5.0, 9.0]);
        let mut e: [f64; 0] = [];
        heap_sort(&mut e);
        let mut one = [1.0f64];
        heap_sort(&mut one);
        assert_eq!(one, [1.0]);
    }
}
