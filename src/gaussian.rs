//! A frozen baseline: the mean vector and covariance matrix of the process, with the whitening
//! the per-sample path needs precomputed.

use core::fmt;

use crate::math::{cholesky, symmetric_eigenvalues, Real};
use crate::{Covariance, EstimateError};

/// Why a mean and covariance cannot be frozen into a baseline.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum FreezeError {
    /// Not enough samples behind the estimate.
    TooFewSamples,
    /// The mean, the covariance or a resolution is NaN or infinite (or a resolution negative).
    NotFinite,
    /// The covariance is not positive definite (singular: some direction has no spread).
    Degenerate,
    /// The covariance is positive definite but its axes are so strongly correlated that it is
    /// too ill-conditioned to gate on in this precision: smallest over largest eigenvalue of
    /// the correlation matrix below `sqrt(EPSILON)`. Judged on the correlation matrix, so the
    /// units of each axis never matter (micrometres beside millimetres, a position beside a
    /// temperature).
    IllConditioned,
    /// A quantity needed by the integer gate does not fit its integer type.
    OutOfRange,
}

impl fmt::Display for FreezeError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            FreezeError::TooFewSamples => "too few samples for a baseline",
            FreezeError::NotFinite => "mean, covariance or resolution is not finite",
            FreezeError::Degenerate => "covariance is singular (not positive definite)",
            FreezeError::IllConditioned => "covariance is too ill-conditioned to gate on",
            FreezeError::OutOfRange => "baseline does not fit the integer gate's range",
        })
    }
}

impl core::error::Error for FreezeError {}

impl From<EstimateError> for FreezeError {
    fn from(e: EstimateError) -> Self {
        match e {
            EstimateError::TooFewSamples => FreezeError::TooFewSamples,
            EstimateError::Degenerate => FreezeError::Degenerate,
            EstimateError::OutOfRange => FreezeError::NotFinite,
        }
    }
}

/// Mean vector and covariance of a process, frozen, with its Cholesky factor `C = L L'` and
/// the reciprocals of `L`'s diagonal precomputed.
///
/// The Mahalanobis distance squared `d^2 = (x - mean)' C^-1 (x - mean)` is evaluated as
/// `|z|^2` with `z` from forward substitution `L z = x - mean` (whitening): `N (N + 1) / 2`
/// multiply-adds and `N` multiplications, no division; for 2-D that is 5 multiplications.
/// Relative error of `d^2`: about `N EPSILON / rcond`, where `rcond` (the smallest over the
/// largest eigenvalue of the correlation matrix, checked at freeze to be at least
/// `sqrt(EPSILON)`) bounds the amplification. Cholesky factorization and forward substitution
/// are equivariant under a scaling of each axis (van der Sluis 1969: the error depends on the
/// scaled, not the raw, condition number), so rescaling an axis, changing its unit, leaves
/// `d^2` the same to rounding.
///
/// Size: `N + N^2 + N` values of `T` (2-D `f32`: 32 bytes).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Baseline<T, const N: usize> {
    mean: [T; N],
    chol: [[T; N]; N],
    inv_diag: [T; N],
}

impl<T: Real, const N: usize> Baseline<T, N> {
    /// Freezes a mean and a covariance. Errors: [`FreezeError::NotFinite`],
    /// [`FreezeError::Degenerate`] (not positive definite), [`FreezeError::IllConditioned`].
    pub fn new(mean: [T; N], cov: &Covariance<T, N>) -> Result<Self, FreezeError> {
        Self::freeze(mean, *cov.matrix())
    }

    /// As [`new`](Self::new), after adding the quantization variance `q_i^2 / 12` of a reading
    /// with resolution `q_i` to each variance (common practice: a uniform rounding error of
    /// width `q` has variance `q^2 / 12`, independent of the process). Every variance is then at
    /// least `q_i^2 / 12` and, with all `q_i > 0`, the matrix is positive definite: a baseline
    /// whose readings never changed freezes, however much wider its other axes are (the
    /// conditioning is judged on the correlation matrix). A negative or non-finite `q_i` is
    /// [`FreezeError::NotFinite`]; `q_i = 0` adds nothing on that axis.
    pub fn with_resolution(
        mean: [T; N],
        cov: &Covariance<T, N>,
        resolution: [T; N],
    ) -> Result<Self, FreezeError> {
        let twelfth = T::ONE / T::from_u32(12);
        let mut m = *cov.matrix();
        for (i, (row, &q)) in m.iter_mut().zip(resolution.iter()).enumerate() {
            if !(q.is_finite() && q >= T::ZERO) {
                return Err(FreezeError::NotFinite);
            }
            if let Some(v) = row.get_mut(i) {
                *v += q * q * twelfth;
            }
        }
        Self::freeze(mean, m)
    }

    fn freeze(mean: [T; N], cov: [[T; N]; N]) -> Result<Self, FreezeError> {
        let () = crate::moments::Dim::<N>::CHECK;
        let finite = mean
            .iter()
            .chain(cov.iter().flatten())
            .all(|v| v.is_finite());
        if !finite {
            return Err(FreezeError::NotFinite);
        }
        check_conditioning(&cov)?;
        let (chol, inv_diag) = cholesky(&cov).ok_or(FreezeError::Degenerate)?;
        Ok(Baseline {
            mean,
            chol,
            inv_diag,
        })
    }

    /// Rebuilds a baseline from its mean and lower Cholesky factor (a decoded snapshot):
    /// the upper triangle of `l` must be zero and its diagonal positive; then the same checks
    /// as [`new`](Self::new). The result equals the baseline the factor came from, bit for bit.
    pub fn from_factor(mean: [T; N], l: [[T; N]; N]) -> Result<Self, FreezeError> {
        let () = crate::moments::Dim::<N>::CHECK;
        let finite = mean.iter().chain(l.iter().flatten()).all(|v| v.is_finite());
        if !finite {
            return Err(FreezeError::NotFinite);
        }
        let mut inv_diag = [T::ZERO; N];
        for i in 0..N {
            for j in (i + 1)..N {
                if l[i][j] != T::ZERO {
                    return Err(FreezeError::Degenerate);
                }
            }
            if !(l[i][i] > T::ZERO) {
                return Err(FreezeError::Degenerate);
            }
            inv_diag[i] = T::ONE / l[i][i];
        }
        let b = Baseline {
            mean,
            chol: l,
            inv_diag,
        };
        check_conditioning(b.covariance().matrix())?;
        Ok(b)
    }

    /// The mean vector.
    pub fn mean(&self) -> &[T; N] {
        &self.mean
    }

    /// The lower Cholesky factor `L` of the covariance.
    pub fn cholesky_factor(&self) -> &[[T; N]; N] {
        &self.chol
    }

    /// The covariance, rebuilt as `L L'` (equal to the frozen one up to rounding).
    pub fn covariance(&self) -> Covariance<T, N> {
        let l = &self.chol;
        let mut c = [[T::ZERO; N]; N];
        for i in 0..N {
            for j in 0..N {
                let mut s = T::ZERO;
                for k in 0..N {
                    s += l[i][k] * l[j][k];
                }
                c[i][j] = s;
            }
        }
        Covariance::from_matrix(c)
    }

    /// The precision matrix `C^-1 = L^-T L^-1`, through the triangular inverse `M = L^-1`
    /// (forward substitution, Golub & Van Loan 3.1). Meant for freeze time.
    pub fn precision(&self) -> [[T; N]; N] {
        let (l, inv) = (&self.chol, &self.inv_diag);
        let mut m = [[T::ZERO; N]; N];
        for j in 0..N {
            m[j][j] = inv[j];
            for i in (j + 1)..N {
                let mut s = T::ZERO;
                for k in j..i {
                    s += l[i][k] * m[k][j];
                }
                m[i][j] = -s * inv[i];
            }
        }
        let mut p = [[T::ZERO; N]; N];
        for i in 0..N {
            for j in 0..N {
                let mut s = T::ZERO;
                for k in 0..N {
                    s += m[k][i] * m[k][j];
                }
                p[i][j] = s;
            }
        }
        p
    }

    /// Whitened coordinates `z = L^-1 (x - mean)`: independent, unit variance under the
    /// baseline. NaN in gives NaN out.
    #[inline]
    pub fn whiten(&self, x: &[T; N]) -> [T; N] {
        let d: [T; N] = core::array::from_fn(|i| x[i] - self.mean[i]);
        crate::math::forward_sub(&self.chol, &self.inv_diag, &d)
    }

    /// `L v`: a whitened (or chart) vector back in data units, relative to the mean.
    #[inline]
    pub fn unwhiten(&self, v: &[T; N]) -> [T; N] {
        let mut out = [T::ZERO; N];
        for i in 0..N {
            let mut s = T::ZERO;
            for k in 0..=i {
                s += self.chol[i][k] * v[k];
            }
            out[i] = s;
        }
        out
    }

    /// Standard deviation of each axis, `sqrt(C_ii)` (the row norms of `L`).
    pub fn std_devs(&self) -> [T; N] {
        let mut out = [T::ZERO; N];
        for i in 0..N {
            let mut s = T::ZERO;
            for k in 0..=i {
                s += self.chol[i][k] * self.chol[i][k];
            }
            out[i] = s.sqrt();
        }
        out
    }

    /// Mahalanobis distance squared of `x` from the baseline. NaN in gives NaN out.
    #[inline]
    pub fn mahalanobis2(&self, x: &[T; N]) -> T {
        self.whiten(x).iter().fold(T::ZERO, |s, &v| s + v * v)
    }

    /// Smallest over largest eigenvalue of the covariance (1 for a circular one). Depends on
    /// the units of the axes; the integer gate's band uses it.
    pub fn reciprocal_condition(&self) -> T {
        let ev = symmetric_eigenvalues(self.covariance().matrix());
        ev[0] / ev[N - 1]
    }

    /// Smallest over largest eigenvalue of the correlation matrix: 1 for uncorrelated axes
    /// whatever their units, near 0 for nearly collinear ones. Freezing refuses a value below
    /// `sqrt(EPSILON)`; the relative error of `d^2` is about `N EPSILON` over this value.
    pub fn correlation_condition(&self) -> T {
        correlation_eigenvalues(self.covariance().matrix()).map_or(T::ZERO, |ev| ev[0] / ev[N - 1])
    }
}

/// Eigenvalues (ascending) of the correlation matrix ([`Covariance::correlation`]); `None`
/// when a variance is not positive.
fn correlation_eigenvalues<T: Real, const N: usize>(cov: &[[T; N]; N]) -> Option<[T; N]> {
    let r = Covariance::from_matrix(*cov).correlation().ok()?;
    Some(symmetric_eigenvalues(&r))
}

/// Refuses a covariance that is not positive definite ([`FreezeError::Degenerate`]) or whose
/// correlation matrix has a reciprocal condition below `sqrt(EPSILON)`
/// ([`FreezeError::IllConditioned`]). Scale-free: the units of the axes never matter.
fn check_conditioning<T: Real, const N: usize>(cov: &[[T; N]; N]) -> Result<(), FreezeError> {
    let ev = correlation_eigenvalues(cov).ok_or(FreezeError::Degenerate)?;
    let (lo, hi) = (ev[0], ev[N - 1]);
    if !(lo > T::ZERO) {
        return Err(FreezeError::Degenerate);
    }
    if lo < hi * T::EPSILON.sqrt() {
        return Err(FreezeError::IllConditioned);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn distance_by_hand_and_degenerate_input() {
        // C = [4 2; 2 5], x - mean = (2, 1): C^-1 = [5 -2; -2 4] / 16,
        // d^2 = (5*4 - 2*2*2*1 + 4*1) / 16 = 16 / 16 = 1.
        let c = Covariance::from_matrix([[4.0f64, 2.0], [2.0, 5.0]]);
        let b = Baseline::new([1.0, 1.0], &c).unwrap();
        assert!((b.mahalanobis2(&[3.0, 2.0]) - 1.0).abs() < 1e-15);
        assert!(b.mahalanobis2(&[f64::NAN, 2.0]).is_nan());
        let flat = Covariance::from_matrix([[1.0f64, 1.0], [1.0, 1.0]]);
        assert_eq!(Baseline::new([0.0; 2], &flat), Err(FreezeError::Degenerate));
        let zero = Covariance::from_matrix([[0.0f32; 2]; 2]);
        assert_eq!(Baseline::new([0.0; 2], &zero), Err(FreezeError::Degenerate));
        // A resolution floor regularizes a reading that never changed (q = 1: var 1/12).
        let b = Baseline::with_resolution([5.0f32, 5.0], &zero, [1.0, 1.0]).unwrap();
        assert!((b.mahalanobis2(&[6.0, 5.0]) - 12.0).abs() < 1e-5);
        // Uncorrelated axes in very different units freeze in either precision.
        let thin = Covariance::from_matrix([[1.0f32, 0.0], [0.0, 1e-10]]);
        assert!(Baseline::new([0.0; 2], &thin).is_ok());
        assert!(Baseline::new(
            [0.0f64; 2],
            &Covariance::from_matrix([[1e12, 0.0], [0.0, 1e-12]])
        )
        .is_ok());
        // Nearly collinear axes are refused, whatever the units: correlation 1 - 1e-5 gives a
        // correlation-matrix condition of about 5e-6, below sqrt(eps_f32) = 3.5e-4.
        let r = 1.0f32 - 1e-5;
        let s = [1e-3f32, 1e3];
        let collinear = Covariance::from_matrix([
            [s[0] * s[0], r * s[0] * s[1]],
            [r * s[0] * s[1], s[1] * s[1]],
        ]);
        assert_eq!(
            Baseline::new([0.0; 2], &collinear),
            Err(FreezeError::IllConditioned)
        );
    }
}
