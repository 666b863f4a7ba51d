//! Small dense linear algebra on `[[T; N]; N]` arrays, N <= 6, written without indexing panics
//! in mind (every index runs over `0..N`).

use super::Real;

/// Determinant of a symmetric positive semi-definite matrix.
///
/// Method: LDL' factorisation without pivoting (Golub & Van Loan, Matrix Computations, 4th ed.,
/// section 4.1), determinant = product of the pivots `D_k`. Only the lower triangle is read.
/// For a positive definite input the relative error is a small multiple of `N * EPSILON` times
/// the condition number. A pivot that is zero or negative (a singular or, through rounding, a
/// barely indefinite input) makes the result exactly zero. NaN in gives NaN out.
pub fn det_symmetric_psd<T: Real, const N: usize>(a: &[[T; N]; N]) -> T {
    let mut l = [[T::ZERO; N]; N];
    let mut d = [T::ZERO; N];
    let mut det = T::ONE;
    for j in 0..N {
        let mut dj = a[j][j];
        for k in 0..j {
            dj -= l[j][k] * l[j][k] * d[k];
        }
        if dj.is_finite() && dj <= T::ZERO {
            return T::ZERO;
        }
        d[j] = dj;
        det *= dj;
        for i in (j + 1)..N {
            let mut s = a[i][j];
            for k in 0..j {
                s -= l[i][k] * l[j][k] * d[k];
            }
            l[i][j] = s / dj;
        }
    }
    det
}

#[cfg(test)]
mod tests {
    use super::det_symmetric_psd;

    #[test]
    fn determinant_of_known_matrices() {
        // 2x2: 4*3 - 1*1 = 11 (by hand).
        assert_eq!(det_symmetric_psd(&[[4.0, 1.0], [1.0, 3.0]]), 11.0);
        // Singular rank-1 matrix [1 2; 2 4].
        assert_eq!(det_symmetric_psd(&[[1.0f64, 2.0], [2.0, 4.0]]), 0.0);
        // Diagonal.
        assert_eq!(
            det_symmetric_psd(&[[2.0f32, 0.0, 0.0], [0.0, 3.0, 0.0], [0.0, 0.0, 0.5]]),
            3.0
        );
    }
}
