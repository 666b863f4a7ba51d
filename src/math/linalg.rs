//! Small dense linear algebra on `[[T; N]; N]` arrays, N <= 6, written without indexing panics
//! in mind (every index runs over `0..N`).

use super::Real;

/// `a c - b^2` (the determinant of `[a b; b c]`) to a few units in the last place even when the
/// two products nearly cancel (a strongly correlated pair of axes).
///
/// Method: each product is split exactly into a rounded value and its rounding error by
/// Veltkamp's splitting and Dekker's product (Dekker 1971, Numerische Mathematik 18: 224-242),
/// no fused multiply-add needed; the difference of the rounded products is exact when they
/// nearly cancel (Sterbenz), and the errors are added back. Where a split would overflow
/// (entries beyond about 1e34 in `f32`, 1e300 in `f64`) the plain `a c - b b` is returned. NaN
/// in gives NaN out.
pub fn det2<T: Real>(a: T, b: T, c: T) -> T {
    let (p, ep) = two_product(a, c);
    let (q, eq) = two_product(b, b);
    let plain = p - q;
    let r = plain + (ep - eq);
    if r.is_finite() {
        r
    } else {
        plain
    }
}

/// `(x y, error)` with `x y = product + error` exactly (Dekker 1971), error NaN on overflow.
fn two_product<T: Real>(x: T, y: T) -> (T, T) {
    // 2^ceil(p / 2) + 1 for a p-bit significand: 4097 for f32, 2^27 + 1 for f64.
    let split = if T::EPSILON.to_f64() > 1e-10 {
        T::from_f64(4097.0)
    } else {
        T::from_f64(134_217_729.0)
    };
    let halves = |v: T| {
        let c = split * v;
        let hi = c - (c - v);
        (hi, v - hi)
    };
    let p = x * y;
    let (xh, xl) = halves(x);
    let (yh, yl) = halves(y);
    let e = ((xh * yh - p) + xh * yl + xl * yh) + xl * yl;
    (p, e)
}

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

/// `y = L^-1 v` by forward substitution, for a lower-triangular `L` given with the reciprocals
/// of its diagonal (as [`cholesky`] returns them): no division. NaN in gives NaN out.
#[inline(always)]
pub(crate) fn forward_sub<T: Real, const N: usize>(
    l: &[[T; N]; N],
    inv_diag: &[T; N],
    v: &[T; N],
) -> [T; N] {
    let mut y = [T::ZERO; N];
    for i in 0..N {
        let mut s = v[i];
        for k in 0..i {
            s -= l[i][k] * y[k];
        }
        y[i] = s * inv_diag[i];
    }
    y
}

/// Eigenvalues (ascending) and unit eigenvectors of a symmetric matrix: `a = V diag(l) V'`,
/// with eigenvector `k` in column `k` of `V` (`v[i][k]`).
///
/// Method: the cyclic Jacobi method as in [`symmetric_eigenvalues`], accumulating the
/// rotations (Golub & Van Loan, 4th ed., algorithm 8.5.3). The eigenvectors are orthonormal to
/// about `N EPSILON`. NaN input gives NaN throughout.
pub fn symmetric_eigen<T: Real, const N: usize>(a: &[[T; N]; N]) -> ([T; N], [[T; N]; N]) {
    let nan = T::from_f64(f64::NAN);
    if a.iter().flatten().any(|v| v.is_nan()) {
        return ([nan; N], [[nan; N]; N]);
    }
    let mut m = *a;
    let mut v = [[T::ZERO; N]; N];
    for i in 0..N {
        v[i][i] = T::ONE;
    }
    jacobi_sweeps(&mut m, Some(&mut v));
    let mut order = [0usize; N];
    for (i, o) in order.iter_mut().enumerate() {
        *o = i;
    }
    // Insertion sort of the indices by eigenvalue: N <= 6.
    for i in 1..N {
        let mut j = i;
        while j > 0 && m[order[j - 1]][order[j - 1]] > m[order[j]][order[j]] {
            order.swap(j - 1, j);
            j -= 1;
        }
    }
    let mut values = [T::ZERO; N];
    let mut vectors = [[T::ZERO; N]; N];
    for (k, &o) in order.iter().enumerate() {
        values[k] = m[o][o];
        for i in 0..N {
            vectors[i][k] = v[i][o];
        }
    }
    (values, vectors)
}

/// Cyclic Jacobi sweeps on `m` until every off-diagonal entry is below `EPSILON` times the
/// diagonal scale (at most 30 sweeps), applying each rotation to the columns of `v` too.
fn jacobi_sweeps<T: Real, const N: usize>(m: &mut [[T; N]; N], mut v: Option<&mut [[T; N]; N]>) {
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
                if let Some(v) = v.as_deref_mut() {
                    for k in 0..N {
                        let (vkp, vkq) = (v[k][p], v[k][q]);
                        v[k][p] = c * vkp - s * vkq;
                        v[k][q] = s * vkp + c * vkq;
                    }
                }
            }
        }
    }
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
    jacobi_sweeps(&mut m, None);
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
    use super::{cholesky, det2, det_symmetric_psd, symmetric_eigen, symmetric_eigenvalues};

    #[test]
    fn eigenvectors_rebuild_the_matrix() {
        let a = [
            [4.0, 1.0, -2.0, 0.5],
            [1.0, 3.0, 0.25, 0.0],
            [-2.0, 0.25, 5.0, 1.5],
            [0.5, 0.0, 1.5, 2.0],
        ];
        let (l, v) = symmetric_eigen(&a);
        assert_eq!(l, symmetric_eigenvalues(&a));
        for i in 0..4 {
            for j in 0..4 {
                let rebuilt: f64 = (0..4).map(|k| v[i][k] * l[k] * v[j][k]).sum();
                assert!((rebuilt - a[i][j]).abs() < 1e-14, "{i} {j}");
                let dot: f64 = (0..4).map(|k| v[k][i] * v[k][j]).sum();
                let want = if i == j { 1.0 } else { 0.0 };
                assert!((dot - want).abs() < 1e-14, "orthonormal {i} {j}");
            }
        }
    }

    #[test]
    fn det2_survives_cancellation() {
        // Correlation 1 - 2^-20 between unit axes: det = 1 - (1 - 2^-20)^2 = 2^-19 - 2^-40,
        // exact in f64 (by hand); the plain f32 formula loses most digits of it.
        let b = 1.0f32 - (2.0f32).powi(-20);
        let want = 2f64.powi(-19) - 2f64.powi(-40);
        let got = f64::from(det2(1.0f32, b, 1.0));
        assert!(
            (got - want).abs() <= want * 2.0 * f64::from(f32::EPSILON),
            "{got} {want}"
        );
        let bd = 1.0 - 2f64.powi(-40);
        let want = 2f64.powi(-39) - 2f64.powi(-80);
        assert!((det2(1.0f64, bd, 1.0) - want).abs() <= want * 4.0 * f64::EPSILON);
        assert!(det2(f64::NAN, 1.0, 1.0).is_nan());
    }

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
