//! What a covariance matrix tells: variances, correlation, generalized variance, and for 2-D
//! the 1-sigma ellipse.

use super::EstimateError;
use crate::math::{det_symmetric_psd, Real};

/// A symmetric covariance matrix, as derived from an accumulator.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Covariance<T, const N: usize> {
    m: [[T; N]; N],
}

impl<T: Real, const N: usize> Covariance<T, N> {
    /// Wraps a matrix the caller vouches is symmetric positive semi-definite (every
    /// accumulator in this crate produces one, up to rounding).
    pub fn from_matrix(m: [[T; N]; N]) -> Self {
        let () = super::Dim::<N>::CHECK;
        Covariance { m }
    }

    /// The full matrix.
    pub fn matrix(&self) -> &[[T; N]; N] {
        &self.m
    }

    /// The diagonal: one variance per axis.
    pub fn variances(&self) -> [T; N] {
        let mut v = [T::ZERO; N];
        for (i, out) in v.iter_mut().enumerate() {
            if let Some(x) = self.m.get(i).and_then(|row| row.get(i)) {
                *out = *x;
            }
        }
        v
    }

    /// Standard deviation per axis, `sqrt` of [`variances`](Self::variances).
    pub fn std_devs(&self) -> [T; N] {
        self.variances().map(T::sqrt)
    }

    /// Correlation matrix `r_ij = c_ij / sqrt(c_ii c_jj)`; [`EstimateError::Degenerate`] if a
    /// variance is not positive. Entries are clamped into [-1, 1] against rounding.
    pub fn correlation(&self) -> Result<[[T; N]; N], EstimateError> {
        let sd = self.std_devs();
        if !sd.iter().all(|s| *s > T::ZERO && s.is_finite()) {
            return Err(EstimateError::Degenerate);
        }
        let mut r = self.m;
        for (row, si) in r.iter_mut().zip(sd.iter()) {
            for (v, sj) in row.iter_mut().zip(sd.iter()) {
                *v = (*v / (*si * *sj)).max(-T::ONE).min(T::ONE);
            }
        }
        Ok(r)
    }

    /// Generalized variance `det(C)` (Wilks), the squared volume scale of the dispersion.
    /// Method and error: [`det_symmetric_psd`]; exactly zero for a singular matrix.
    pub fn generalized_variance(&self) -> T {
        det_symmetric_psd(&self.m)
    }
}

impl<T: Real> Covariance<T, 2> {
    /// Principal axes of the 2-D covariance, in closed form.
    ///
    /// For `C = [a b; b c]`: `lambda = (a + c) / 2 +- hypot((a - c) / 2, b)`, the smaller one
    /// taken as `det / lambda_max` to avoid cancellation, with `det` from [`det2`](crate::math::det2)
    /// (accurate even for strongly correlated axes); angle of the major axis
    /// `atan2(2 b, a - c) / 2` (the standard eigen-decomposition of a symmetric 2x2 matrix).
    /// A circular or all-zero covariance gives angle 0.
    pub fn ellipse(&self) -> Ellipse<T> {
        let [[a, b], [_, c]] = self.m;
        self.ellipse_with_det(crate::math::det2(a, b, c))
    }

    /// As [`ellipse`](Self::ellipse), with the determinant supplied by a caller that knows it
    /// more accurately than the entries do (a transformed matrix whose determinant follows
    /// from the original's).
    pub(crate) fn ellipse_with_det(&self, det: T) -> Ellipse<T> {
        let [[a, b], [_, c]] = self.m;
        let half = T::from_f64(0.5);
        let mid = (a + c) * half;
        let rad = ((a - c) * half).hypot(b);
        let big = mid + rad;
        let det = det.max(T::ZERO);
        let small = if big > T::ZERO {
            (det / big).min(big)
        } else {
            T::ZERO
        };
        Ellipse {
            major: big.max(T::ZERO).sqrt(),
            minor: small.sqrt(),
            angle: (b + b).atan2(a - c) * half,
        }
    }
}

/// The 1-sigma ellipse of a 2-D covariance: semi-axes (standard deviations along the
/// principal axes) and the angle of the major axis from the first axis, in radians, in
/// (-pi/2, pi/2]. Scale both semi-axes by `sqrt(chi-square quantile)` for a coverage ellipse.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Ellipse<T> {
    /// Standard deviation along the major axis.
    pub major: T,
    /// Standard deviation along the minor axis.
    pub minor: T,
    /// Angle of the major axis, radians, counter-clockwise from the first axis.
    pub angle: T,
}

#[cfg(test)]
mod tests {
    use super::Covariance;

    #[test]
    fn ellipse_of_known_matrices() {
        // [2 1; 1 2]: eigenvalues 3 and 1, major axis at 45 degrees (by hand).
        let e = Covariance::from_matrix([[2.0f64, 1.0], [1.0, 2.0]]).ellipse();
        assert!((e.major - 3f64.sqrt()).abs() < 1e-15);
        assert!((e.minor - 1.0).abs() < 1e-15);
        assert!((e.angle - core::f64::consts::FRAC_PI_4).abs() < 1e-15);
        // Axis-aligned, second axis larger: angle pi/2.
        let e = Covariance::from_matrix([[1.0f32, 0.0], [0.0, 4.0]]).ellipse();
        assert_eq!((e.major, e.minor), (2.0, 1.0));
        assert!((e.angle - core::f32::consts::FRAC_PI_2).abs() < 1e-6);
    }

    #[test]
    fn correlation_needs_positive_variances() {
        let c = Covariance::from_matrix([[4.0f64, 3.0], [3.0, 9.0]]);
        assert_eq!(c.correlation().unwrap()[0][1], 0.5);
        assert_eq!(c.generalized_variance(), 27.0);
        let flat = Covariance::from_matrix([[0.0f64, 0.0], [0.0, 1.0]]);
        assert!(flat.correlation().is_err());
    }
}
