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

/// Cholesky factor `C = L L'` of a symmetric positive definite matrix (lower triangle read),
/// with the reciprocals of the diagonal of `L` alongside, so that whitening needs no division.
///
/// Method: the Cholesky–Banachiewicz order (Golub & Van Loan, 4th ed., algorithm 4.2.1).
/// `None` when a pivot is not positive and finite (the matrix is not positive definite to
/// working precision, or holds NaN).
pub fn cholesky<T: Real, const N: usize>(a: &[[T; N]; N]) -> Option<([[T; N]; N], [T; N])> {
    let mut l = [[T::ZERO; N]; N];
    let mut inv = [T::ZERO; N];
    for i in 0..N {
        for j in 0..=i {
            let mut s = a[i][j];
            for k in 0..j {
                s -= l[i][k] * l[j][k];
            }
            if i == j {
                if !(s > T::ZERO && s.is_finite()) {
                    return None;
                }
                let d = s.sqrt();
                l[i][i] = d;
                inv[i] = T::ONE / d;
            } else {
                l[i][j] = s * inv[j];
            }
        }
    }
    Some((l, inv))
}

/// Eigenvalues of a symmetric matrix, in ascending order.
///
/// Method: the cyclic Jacobi method (Golub & Van Loan, 4th ed., section 8.5.3; rotation angle
/// as in Rutishauser 1966), sweeping until every off-diagonal entry is below `EPSILON` times
/// the diagonal scale, at most 30 sweeps (N <= 6 needs under 10). Absolute error about
/// `N EPSILON max|lambda|`. NaN input gives NaN eigenvalues.
pub fn symmetric_eigenvalues<T: Real, const N: usize>(a: &[[T; N]; N]) -> [T; N] {
    if a.iter().flatten().any(|v| v.is_nan()) {
        return [T::from_f64(f64::NAN); N];
    }
    let mut m = *a;
    let half = T::from_f64(0.5);
    for _ in 0..30 {
        let mut off = T::ZERO;
        let mut scale = T::ZERO;
        for i in 0..N {
            scale = scale.max(m[i][i].abs());
            for j in (i + 1)..N {
                off = off.max(m[i][j].abs());
            }
        }
        if !(off > T::EPSILON * scale) {
            break;
        }
        for p in 0..N {
            for q in (p + 1)..N {
                let apq = m[p][q];
                if apq == T::ZERO {
                    continue;
                }
                // tan of the rotation angle, the smaller root of t^2 + 2 theta t - 1 = 0.
                let theta = (m[q][q] - m[p][p]) * half / apq;
                let sign = if theta >= T::ZERO { T::ONE } else { -T::ONE };
                let t = sign / (theta.abs() + (theta * theta + T::ONE).sqrt());
                let c = T::ONE / (t * t + T::ONE).sqrt();
                let s = t * c;
                for k in 0..N {
                    let (mkp, mkq) = (m[k][p], m[k][q]);
                    m[k][p] = c * mkp - s * mkq;
                    m[k][q] = s * mkp + c * mkq;
                }
                for k in 0..N {
                    let (mpk, mqk) = (m[p][k], m[q][k]);
                    m[p][k] = c * mpk - s * mqk;
                    m[q][k] = s * mpk + c * mqk;
                }
            }
        }
    }
    let mut ev = [T::ZERO; N];
    for i in 0..N {
        ev[i] = m[i][i];
    }
    // Insertion sort: N <= 6.
    for i in 1..N {
        let mut j = i;
        while j > 0 && ev[j - 1] > ev[j] {
            ev.swap(j - 1, j);
            j -= 1;
        }
    }
    ev
}

#[cfg(test)]
mod tests {
    use super::{cholesky, det_symmetric_psd, symmetric_eigenvalues};

    #[test]
    fn cholesky_and_eigenvalues_by_hand() {
        // [4 2; 2 5] = L L' with L = [2 0; 1 2].
        let (l, inv) = cholesky(&[[4.0f64, 2.0], [2.0, 5.0]]).unwrap();
        assert_eq!(l, [[2.0, 0.0], [1.0, 2.0]]);
        assert_eq!(inv, [0.5, 0.5]);
        assert!(cholesky(&[[1.0f64, 2.0], [2.0, 4.0]]).is_none());
        assert!(cholesky(&[[f64::NAN, 0.0], [0.0, 1.0]]).is_none());
        // [2 1 0; 1 2 1; 0 1 2]: eigenvalues 2 - sqrt 2, 2, 2 + sqrt 2.
        let ev = symmetric_eigenvalues(&[[2.0f64, 1.0, 0.0], [1.0, 2.0, 1.0], [0.0, 1.0, 2.0]]);
        let want = [2.0 - 2f64.sqrt(), 2.0, 2.0 + 2f64.sqrt()];
        for k in 0..3 {
            assert!((ev[k] - want[k]).abs() < 1e-14, "{ev:?}");
        }
    }

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
