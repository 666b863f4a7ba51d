//! Box probabilities in one to three dimensions: the normal tails in 1-D, the rectangle in
//! 2-D, and in 3-D the trivariate normal by Plackett's (1954) reduction to a one-dimensional
//! integral of bivariate densities (the route of Genz 2004, Statistics and Computing 14).

use super::{BoxZone, RectZone, Yield, ZoneError};
use crate::math::{Precision, Real};
use crate::Covariance;

/// `P(Z <= x)` for a standard normal.
fn phi<T: Precision>(x: T) -> T {
    T::normal_tails(x).0
}

/// `P(X <= h, Y <= k)` for a standard bivariate normal with correlation `r`.
fn phi2<T: Precision>(h: T, k: T, r: T) -> T {
    let inf = T::from_f64(f64::INFINITY);
    if h == -inf || k == -inf {
        return T::ZERO;
    }
    if h == inf {
        return phi(k);
    }
    if k == inf {
        return phi(h);
    }
    T::bvn_upper(-h, -k, r)
}

/// Standard bivariate normal density at `(x, y)` with correlation `a`.
fn density2<T: Real>(x: T, y: T, a: T) -> T {
    let one_a2 = T::ONE - a * a;
    let q = (x * x - T::from_f64(2.0) * a * x * y + y * y) / (T::from_f64(2.0) * one_a2);
    (-q).exp() / (T::from_f64(core::f64::consts::TAU) * one_a2.sqrt())
}

/// `P(X0 <= b0, X1 <= b1, X2 <= b2)` for a standard trivariate normal with correlations
/// `r = [r01, r02, r12]` (a positive-definite matrix); limits may be infinite.
///
/// Method: along the path that scales `r01` and `r02` by `t` from 0 to 1, Plackett's
/// identity `dF/dr_ij = phi2(b_i, b_j; r_ij) P(X_k <= b_k | X_i = b_i, X_j = b_j)` gives
/// `F = Phi(b0) Phi2(b1, b2; r12) + int_0^1 [r01 phi2(b0, b1; t r01) Phi(u2(t))
/// + r02 phi2(b0, b2; t r02) Phi(u1(t))] dt`, with `u` the standardized conditional limits.
/// Every matrix on the path is positive definite (a convex combination of two that are), so
/// the integrand is smooth; it steepens towards `t = 1` when the matrix is nearly singular,
/// which panels halving towards 1 follow. Gauss-Legendre on each panel (`T::RULE`).
pub(crate) fn tvn_lower<T: Precision>(b: [T; 3], r: [T; 3]) -> T {
    let inf = T::from_f64(f64::INFINITY);
    if b.iter().any(|&v| v == -inf) {
        return T::ZERO;
    }
    let [b0, b1, b2] = b;
    let [r01, r02, r12] = r;
    match (b0 == inf, b1 == inf, b2 == inf) {
        (true, _, _) => return phi2(b1, b2, r12),
        (_, true, _) => return phi2(b0, b2, r02),
        (_, _, true) => return phi2(b0, b1, r01),
        _ => {}
    }
    let base = phi(b0) * phi2(b1, b2, r12);
    if r01 == T::ZERO && r02 == T::ZERO {
        return base;
    }
    let two = T::from_f64(2.0);
    let integrand = |t: T| -> T {
        let (a01, a02) = (t * r01, t * r02);
        let d = T::ONE - a01 * a01 - a02 * a02 - r12 * r12 + two * a01 * a02 * r12;
        let d = d.max(T::from_f64(f64::MIN_POSITIVE));
        let mut f = T::ZERO;
        if r01 != T::ZERO {
            let s = T::ONE - a01 * a01;
            let u2 = (s * b2 - (a02 - a01 * r12) * b0 - (r12 - a01 * a02) * b1) / (s * d).sqrt();
            f += r01 * density2(b0, b1, a01) * phi(u2);
        }
        if r02 != T::ZERO {
            let s = T::ONE - a02 * a02;
            let u1 = (s * b1 - (a01 - a02 * r12) * b0 - (r12 - a01 * a02) * b2) / (s * d).sqrt();
            f += r02 * density2(b0, b2, a02) * phi(u1);
        }
        f
    };
    // Panels [0, 1/2], [1/2, 3/4], ..., the last one reaching 1.
    let panels: u32 = if T::EPSILON < T::from_f64(1e-10) {
        12
    } else {
        4
    };
    let half = T::from_f64(0.5);
    let mut sum = T::ZERO;
    let (mut lo, mut width) = (T::ZERO, half);
    for p in 0..panels {
        let hi = if p + 1 == panels { T::ONE } else { lo + width };
        let (c, h) = ((lo + hi) * half, (hi - lo) * half);
        let mut s = T::ZERO;
        for &(x, w) in T::RULE {
            let (x, w) = (T::from_f64(x), T::from_f64(w));
            s += w * (integrand(c - h * x) + integrand(c + h * x));
        }
        sum += h * s;
        lo = hi;
        width *= half;
    }
    base + sum
}

impl<T: Precision, const N: usize> BoxZone<T, N> {
    /// Probability that a sample from `N(mean, cov)` lands inside and outside the box, for
    /// `N <= 3` (the outside fraction from the tails: the mass beyond the first axis's limits,
    /// plus that inside them but beyond the second's, plus that inside both but beyond the
    /// third's). In 2-D it is [`Zone::probability`](super::Zone::probability) of the
    /// rectangle, to the bit. Errors: [`ZoneError::BadDistribution`] unless the covariance is
    /// positive definite; [`ZoneError::Unsupported`] for `N > 3` (not yet).
    pub fn probability(
        &self,
        mean: &[T; N],
        cov: &Covariance<T, N>,
    ) -> Result<Yield<T>, ZoneError> {
        super::nd::factor(mean, cov)?;
        let m = cov.matrix();
        let (zlo, zhi) = (self.lo(), self.hi());
        let get = |a: &[T; N], i: usize| a.get(i).copied().unwrap_or(T::ZERO);
        let var = |i: usize| {
            m.get(i)
                .and_then(|row| row.get(i))
                .copied()
                .unwrap_or(T::ONE)
        };
        let cv = |i: usize, j: usize| {
            m.get(i)
                .and_then(|row| row.get(j))
                .copied()
                .unwrap_or(T::ZERO)
        };
        match N {
            1 => {
                let s = var(0).sqrt();
                let a = (get(&zlo, 0) - get(mean, 0)) / s;
                let b = (get(&zhi, 0) - get(mean, 0)) / s;
                let (ta, tb) = (T::normal_tails(a), T::normal_tails(b));
                // Inside from whichever side keeps it a difference of tails of one sign.
                let inside = if a > T::ZERO {
                    ta.1 - tb.1
                } else {
                    tb.0 - ta.0
                };
                Ok(Yield {
                    inside: inside.max(T::ZERO).min(T::ONE),
                    outside: (ta.0 + tb.1).min(T::ONE),
                })
            }
            2 => {
                let z = RectZone::new([get(&zlo, 0), get(&zlo, 1)], [get(&zhi, 0), get(&zhi, 1)])?;
                let c2 = Covariance::from_matrix([[var(0), cv(0, 1)], [cv(1, 0), var(1)]]);
                Ok(super::probability::rect(
                    &z,
                    &[get(mean, 0), get(mean, 1)],
                    &c2,
                ))
            }
            3 => {
                let s = [var(0).sqrt(), var(1).sqrt(), var(2).sqrt()];
                let r = [
                    cv(0, 1) / (s[0] * s[1]),
                    cv(0, 2) / (s[0] * s[2]),
                    cv(1, 2) / (s[1] * s[2]),
                ];
                let lo: [T; 3] = core::array::from_fn(|i| {
                    (get(&zlo, i) - get(mean, i)) / s.get(i).copied().unwrap_or(T::ONE)
                });
                let hi: [T; 3] = core::array::from_fn(|i| {
                    (get(&zhi, i) - get(mean, i)) / s.get(i).copied().unwrap_or(T::ONE)
                });
                Ok(box3(lo, hi, r))
            }
            _ => Err(ZoneError::Unsupported),
        }
    }
}

/// Inside and outside of the standardized box `[lo, hi]` for correlations `[r01, r02, r12]`.
fn box3<T: Precision>(lo: [T; 3], hi: [T; 3], r: [T; 3]) -> Yield<T> {
    let f = |b0: T, b1: T, b2: T| tvn_lower([b0, b1, b2], r);
    // Inside: the eight corners with alternating signs.
    let mut inside = T::ZERO;
    for corner in 0..8u32 {
        let pick = |i: usize, arr_lo: &[T; 3], arr_hi: &[T; 3]| {
            if corner & (1 << i) != 0 {
                arr_lo[i]
            } else {
                arr_hi[i]
            }
        };
        let v = f(pick(0, &lo, &hi), pick(1, &lo, &hi), pick(2, &lo, &hi));
        if corner.count_ones() % 2 == 0 {
            inside += v;
        } else {
            inside -= v;
        }
    }
    // Outside, from the tails in three disjoint parts.
    let (t0l, t0h) = (T::normal_tails(lo[0]).0, T::normal_tails(hi[0]).1);
    // X0 in, X1 below: Phi2(hi0, lo1) - Phi2(lo0, lo1); X0 in, X1 above: by symmetry, with
    // X1 negated (its correlation with X0 flips).
    let below1 = (phi2(hi[0], lo[1], r[0]) - phi2(lo[0], lo[1], r[0])).max(T::ZERO);
    let above1 = (phi2(hi[0], -hi[1], -r[0]) - phi2(lo[0], -hi[1], -r[0])).max(T::ZERO);
    // X0 and X1 in, X2 below / above: four corners of the (X0, X1) rectangle each.
    let slab = |b2: T, rr: [T; 3]| -> T {
        let g = |b0: T, b1: T| tvn_lower([b0, b1, b2], rr);
        g(hi[0], hi[1]) - g(lo[0], hi[1]) - g(hi[0], lo[1]) + g(lo[0], lo[1])
    };
    let below2 = slab(lo[2], r).max(T::ZERO);
    let above2 = slab(-hi[2], [r[0], -r[1], -r[2]]).max(T::ZERO);
    Yield {
        inside: inside.max(T::ZERO).min(T::ONE),
        outside: (t0l + t0h + below1 + above1 + below2 + above2).min(T::ONE),
    }
}
