//! Zones in N dimensions (`N = 1..=6`): boxes, balls and ellipsoids, with exact point tests,
//! and the probability of a ball or an ellipsoid under a normal distribution with an error
//! bound returned beside it.
//!
//! | zone | conforms when |
//! |---|---|
//! | [`BoxZone`] | `lo_i <= x_i <= hi_i` on every axis, either limit may be absent (one-sided) |
//! | [`BallZone`] | `2 |x - c| <= diameter` (spherical positional tolerance, common practice) |
//! | [`EllipsoidZone`] | `(x - c)' Q^-1 (x - c) <= 1` for a positive-definite shape matrix `Q` |
//!
//! A value exactly on the boundary conforms; NaN never does.

use super::{Bounds, ZoneError};
use crate::math::{
    cholesky, forward_sub, gamma_series, norm_cdf, norm_sf, symmetric_eigen, ChiSquare, Real,
};
use crate::moments::{pairs, unpack, Shape};
use crate::Covariance;

/// An axis-aligned box in `N` dimensions; an absent limit is `-inf` (lower) or `+inf` (upper).
/// In 2-D it is the [`RectZone`](super::RectZone).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BoxZone<T, const N: usize> {
    lo: [T; N],
    hi: [T; N],
}

impl<T: Real, const N: usize> BoxZone<T, N> {
    /// Errors: [`ZoneError::NotFinite`] for a NaN limit, [`ZoneError::Degenerate`] when some
    /// `lo_i` is not below `hi_i` (or the box is empty: a lower limit of `+inf`, an upper of
    /// `-inf`).
    pub fn new(lo: [T; N], hi: [T; N]) -> Result<Self, ZoneError> {
        if lo.iter().chain(hi.iter()).any(|v| v.is_nan()) {
            return Err(ZoneError::NotFinite);
        }
        let inf = T::from_f64(f64::INFINITY);
        let ok = lo
            .iter()
            .zip(hi.iter())
            .all(|(&l, &h)| l < h && l < inf && h > -inf);
        if !ok || N == 0 {
            return Err(ZoneError::Degenerate);
        }
        Ok(BoxZone { lo, hi })
    }

    /// Lower limits (`-inf` where absent).
    pub fn lo(&self) -> [T; N] {
        self.lo
    }

    /// Upper limits (`+inf` where absent).
    pub fn hi(&self) -> [T; N] {
        self.hi
    }

    /// Point test; NaN is outside.
    #[inline]
    pub fn contains(&self, x: &[T; N]) -> bool {
        (0..N).all(|i| x[i] >= self.lo[i] && x[i] <= self.hi[i])
    }

    /// Brackets of the box probability from the per-axis normal tails alone, any `N`: the
    /// outside is at least the largest axis's and at most their sum (Boole's inequality); the
    /// inside is at most the smallest axis's and at least one minus that sum. No quadrature.
    /// [`ZoneError::BadDistribution`] unless `mean` is finite and every variance positive.
    pub fn bounds(&self, mean: &[T; N], cov: &Covariance<T, N>) -> Result<Bounds<T>, ZoneError> {
        let m = cov.matrix();
        let (mut out_max, mut out_sum, mut in_min) = (T::ZERO, T::ZERO, T::ONE);
        for i in 0..N {
            let v = m[i][i];
            if !(mean[i].is_finite() && v > T::ZERO && v.is_finite()) {
                return Err(ZoneError::BadDistribution);
            }
            let s = v.sqrt();
            let (a, b) = ((self.lo[i] - mean[i]) / s, (self.hi[i] - mean[i]) / s);
            let (below, above) = (norm_cdf(a), norm_sf(b));
            let inside = if a > T::ZERO {
                norm_sf(a) - above
            } else {
                norm_cdf(b) - below
            };
            let out = below + above;
            out_max = out_max.max(out);
            out_sum += out;
            in_min = in_min.min(inside.max(T::ZERO));
        }
        let clamp = |v: T| v.max(T::ZERO).min(T::ONE);
        Ok(Bounds {
            inside_lower: clamp(T::ONE - out_sum),
            inside_upper: clamp(in_min),
            outside_lower: clamp(out_max),
            outside_upper: clamp(out_sum),
        })
    }
}

/// A ball of the given diameter around a centre: the spherical positional tolerance zone. In
/// 2-D it is the [`CircleZone`](super::CircleZone).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BallZone<T, const N: usize> {
    centre: [T; N],
    diameter: T,
}

impl<T: Real, const N: usize> BallZone<T, N> {
    /// Errors: [`ZoneError::NotFinite`], [`ZoneError::Degenerate`] for a diameter not above 0.
    pub fn new(centre: [T; N], diameter: T) -> Result<Self, ZoneError> {
        if !(centre.iter().all(|v| v.is_finite()) && diameter.is_finite()) {
            return Err(ZoneError::NotFinite);
        }
        if !(diameter > T::ZERO) || N == 0 {
            return Err(ZoneError::Degenerate);
        }
        Ok(BallZone { centre, diameter })
    }

    /// The centre (true position).
    pub fn centre(&self) -> [T; N] {
        self.centre
    }

    /// The tolerance diameter.
    pub fn diameter(&self) -> T {
        self.diameter
    }

    /// `4 |x - c|^2 <= diameter^2`, no square root (the 2-D form is the circle's, to the bit).
    /// NaN is outside.
    #[inline]
    pub fn contains(&self, x: &[T; N]) -> bool {
        let mut s = T::ZERO;
        for i in 0..N {
            let d = x[i] - self.centre[i];
            s += d * d;
        }
        T::from_f64(4.0) * s <= self.diameter * self.diameter
    }

    /// The probability that a sample from `N(mean, cov)` lands inside and outside, with an
    /// error bound; see [`EllipsoidZone::probability`] (a ball of radius `r` is the ellipsoid
    /// `Q = r^2 I`).
    pub fn probability(
        &self,
        mean: &[T; N],
        cov: &Covariance<T, N>,
        scratch: &mut [T],
    ) -> Result<Estimate<T>, ZoneError> {
        let (m, n) = self.form(mean, cov)?;
        quadratic_form(&m, &n, scratch)
    }

    /// Brackets of [`probability`](Self::probability) from the form's extreme eigenvalues:
    /// `lambda_min |v + b|^2 <= form <= lambda_max |v + b|^2`, so the inside lies between the
    /// noncentral chi-square probabilities of the two isotropic forms (each a short series
    /// with Poisson weights). No bound is lost to rounding: each side is widened by its own
    /// error. Errors as for [`probability`](Self::probability).
    pub fn bounds(
        &self,
        mean: &[T; N],
        cov: &Covariance<T, N>,
        scratch: &mut [T],
    ) -> Result<Bounds<T>, ZoneError> {
        let (m, n) = self.form(mean, cov)?;
        isotropic_bounds(&m, &n, scratch)
    }

    /// `M = L / r`, `n = (mean - c) / r` for `cov = L L'` and radius `r`.
    #[allow(clippy::type_complexity)]
    fn form(
        &self,
        mean: &[T; N],
        cov: &Covariance<T, N>,
    ) -> Result<([[T; N]; N], [T; N]), ZoneError> {
        let (l, _) = factor(mean, cov)?;
        let r = self.diameter * T::from_f64(0.5);
        let mut m = [[T::ZERO; N]; N];
        let mut n = [T::ZERO; N];
        for i in 0..N {
            for j in 0..=i {
                m[i][j] = l[i][j] / r;
            }
            n[i] = (mean[i] - self.centre[i]) / r;
        }
        Ok((m, n))
    }
}

/// An ellipsoid `(x - c)' Q^-1 (x - c) <= 1` with a positive-definite shape matrix `Q`, given
/// by its upper triangle row by row (`L = N (N + 1) / 2` values). A ball of radius `r` is
/// `Q = r^2 I`; the semi-axes are the square roots of `Q`'s eigenvalues.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct EllipsoidZone<T, const N: usize, const L: usize> {
    centre: [T; N],
    shape: [T; L],
    /// Cholesky factor of `Q` (lower) and the reciprocals of its diagonal.
    factor: [[T; N]; N],
    inv_diag: [T; N],
}

impl<T: Real, const N: usize, const L: usize> EllipsoidZone<T, N, L> {
    /// Errors: [`ZoneError::NotFinite`] for a non-finite value, [`ZoneError::Degenerate`]
    /// unless `Q` is positive definite (to working precision).
    pub fn new(centre: [T; N], shape: [T; L]) -> Result<Self, ZoneError> {
        let () = Shape::<N, L>::CHECK;
        if !centre.iter().chain(shape.iter()).all(|v| v.is_finite()) {
            return Err(ZoneError::NotFinite);
        }
        let q: [[T; N]; N] = unpack(&shape);
        let (factor, inv_diag) = cholesky(&q).ok_or(ZoneError::Degenerate)?;
        Ok(EllipsoidZone {
            centre,
            shape,
            factor,
            inv_diag,
        })
    }

    /// The centre.
    pub fn centre(&self) -> [T; N] {
        self.centre
    }

    /// The shape matrix `Q`, upper triangle row by row.
    pub fn shape(&self) -> [T; L] {
        self.shape
    }

    /// `y = F^-1 (x - c)` for the Cholesky factor `F` of `Q`: the ellipsoid is `|y| <= 1`.
    fn unit_coords(&self, x: &[T; N]) -> [T; N] {
        let d: [T; N] = core::array::from_fn(|i| x[i] - self.centre[i]);
        forward_sub(&self.factor, &self.inv_diag, &d)
    }

    /// `(x - c)' Q^-1 (x - c) <= 1`, by forward substitution (no inverse). NaN is outside.
    #[inline]
    pub fn contains(&self, x: &[T; N]) -> bool {
        let y = self.unit_coords(x);
        y.iter().fold(T::ZERO, |s, &v| s + v * v) <= T::ONE
    }

    /// The probability that a sample from `N(mean, cov)` lands inside and outside.
    ///
    /// Method: with `cov = L L'`, the zone's test statistic `(x - c)' Q^-1 (x - c)` is the
    /// quadratic form `sum_j lambda_j (w_j + b_j)^2` in independent standard normals, with
    /// `lambda_j` the eigenvalues of `F^-1 L (F^-1 L)'` and `b_j` the offset in their
    /// eigenvectors (Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions 2,
    /// ch. 29). Its distribution is Ruben's (1962) series of chi-square distributions,
    /// `P(form <= 1) = sum_k a_k P(chi^2_{N+2k} <= 1 / beta)` with `beta` the smallest
    /// eigenvalue, where every `a_k >= 0` and `sum a_k = 1`. Inside and outside are both sums
    /// of positive terms (the outside from the chi-square upper tails, never `1 - inside`),
    /// so each keeps its relative accuracy in the tail.
    ///
    /// The series is cut when its remaining weight `1 - sum a_k` is below a few `EPSILON`, or
    /// when `scratch` is full: two slots per term (the coefficients are kept for a second
    /// pass). The weight left out lies on terms whose chi-square upper tails are at least the
    /// last one's, which splits it into a part certainly outside (added to `outside`) and a
    /// part that may fall either way: both probabilities are reported at the middle of that
    /// part, and [`Estimate::error`] is half of it plus a rounding allowance, so that
    /// `|true - reported| <= error` for each. Terms needed grow with the
    /// spread of the eigenvalues and with the offset: a sphere centred on an isotropic process
    /// needs one; eigenvalues 10x apart about 300 for `f64` precision; 100x apart about 3000.
    ///
    /// Errors: [`ZoneError::BadDistribution`] unless `mean` is finite and `cov` positive
    /// definite; [`ZoneError::NoScratch`] for a `scratch` shorter than 2.
    pub fn probability(
        &self,
        mean: &[T; N],
        cov: &Covariance<T, N>,
        scratch: &mut [T],
    ) -> Result<Estimate<T>, ZoneError> {
        let (m, n) = self.form(mean, cov)?;
        quadratic_form(&m, &n, scratch)
    }

    /// Brackets of [`probability`](Self::probability), as [`BallZone::bounds`].
    pub fn bounds(
        &self,
        mean: &[T; N],
        cov: &Covariance<T, N>,
        scratch: &mut [T],
    ) -> Result<Bounds<T>, ZoneError> {
        let (m, n) = self.form(mean, cov)?;
        isotropic_bounds(&m, &n, scratch)
    }

    /// `M = F^-1 L` (lower triangular), `n = F^-1 (mean - c)`.
    #[allow(clippy::type_complexity)]
    fn form(
        &self,
        mean: &[T; N],
        cov: &Covariance<T, N>,
    ) -> Result<([[T; N]; N], [T; N]), ZoneError> {
        let (l, _) = factor(mean, cov)?;
        // Column by column: M's column j is F^-1 times L's (zero above the diagonal, so the
        // substitution leaves it zero there).
        let mut m = [[T::ZERO; N]; N];
        for j in 0..N {
            let col = forward_sub(
                &self.factor,
                &self.inv_diag,
                &core::array::from_fn(|i| l[i][j]),
            );
            for i in 0..N {
                m[i][j] = col[i];
            }
        }
        Ok((m, self.unit_coords(mean)))
    }
}

/// Probabilities inside and outside a zone with a bound on what the method left out.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Estimate<T> {
    /// Probability of conforming; the true value is within `error`.
    pub inside: T,
    /// Nonconforming fraction, from the tails (not `1 - inside`); the true value is within
    /// `error`.
    pub outside: T,
    /// Bound on `|true - reported|` for both: half the weight the series did not reach that
    /// may fall either way, plus rounding.
    pub error: T,
    /// Terms of the series used.
    pub terms: u32,
}

/// Cholesky factor of a valid distribution's covariance.
pub(super) fn factor<T: Real, const N: usize>(
    mean: &[T; N],
    cov: &Covariance<T, N>,
) -> Result<([[T; N]; N], [T; N]), ZoneError> {
    if !mean.iter().all(|v| v.is_finite()) {
        return Err(ZoneError::BadDistribution);
    }
    cholesky(cov.matrix()).ok_or(ZoneError::BadDistribution)
}

/// Bounds of `P(|M w + n|^2 <= 1)` from the isotropic forms with the extreme eigenvalues.
fn isotropic_bounds<T: Real, const N: usize>(
    m: &[[T; N]; N],
    n: &[T; N],
    scratch: &mut [T],
) -> Result<Bounds<T>, ZoneError> {
    let (lambda, delta) = decompose(m, n)?;
    let (lo, hi) = (
        lambda.first().copied().unwrap_or(T::ONE),
        lambda.last().copied().unwrap_or(T::ONE),
    );
    // The larger eigenvalue makes the form larger: less inside.
    let wide = series(&[hi; N], &delta, scratch)?;
    let narrow = series(&[lo; N], &delta, scratch)?;
    let clamp = |v: T| v.max(T::ZERO).min(T::ONE);
    Ok(Bounds {
        inside_lower: clamp(wide.inside - wide.error),
        inside_upper: clamp(narrow.inside + narrow.error),
        outside_lower: clamp(narrow.outside - narrow.error),
        outside_upper: clamp(wide.outside + wide.error),
    })
}

/// `P(|M w + n|^2 <= 1)` and `P(> 1)` for `w ~ N(0, I)` and lower-triangular `M`, by Ruben's
/// series (see [`EllipsoidZone::probability`]).
fn quadratic_form<T: Real, const N: usize>(
    m: &[[T; N]; N],
    n: &[T; N],
    scratch: &mut [T],
) -> Result<Estimate<T>, ZoneError> {
    let (lambda, delta) = decompose(m, n)?;
    series(&lambda, &delta, scratch)
}

/// The form `|M w + n|^2` as `sum lambda_j (v_j + b_j)^2` with independent standard normal
/// `v`: the eigenvalues `lambda` of `B = M M'` (ascending) and `delta_j = b_j^2`, where
/// `B = U diag(lambda) U'`, `M w ~ U diag(sqrt(lambda)) v` and `b_j = (U'n)_j / sqrt(lambda_j)`.
fn decompose<T: Real, const N: usize>(
    m: &[[T; N]; N],
    n: &[T; N],
) -> Result<([T; N], [T; N]), ZoneError> {
    let mut b = [[T::ZERO; N]; N];
    for (i, j) in pairs::<N>() {
        let mut s = T::ZERO;
        for k in 0..=i.min(j) {
            s += m[i][k] * m[j][k];
        }
        b[i][j] = s;
        b[j][i] = s;
    }
    let (lambda, u) = symmetric_eigen(&b);
    let positive = lambda.first().is_some_and(|&l| l > T::ZERO);
    if !(positive && lambda.iter().all(|l| l.is_finite())) {
        return Err(ZoneError::BadDistribution);
    }
    let mut delta = [T::ZERO; N];
    for j in 0..N {
        let mut p = T::ZERO;
        for i in 0..N {
            p += u[i][j] * n[i];
        }
        delta[j] = p * p / lambda[j];
    }
    Ok((lambda, delta))
}

/// `P(sum lambda_j (v_j + b_j)^2 <= 1)` and `> 1` by Ruben's series, `lambda` ascending and
/// positive, `delta_j = b_j^2`.
fn series<T: Real, const N: usize>(
    lambda: &[T; N],
    delta: &[T; N],
    scratch: &mut [T],
) -> Result<Estimate<T>, ZoneError> {
    let beta = lambda.first().copied().unwrap_or(T::ONE);
    let half = T::from_f64(0.5);
    // gamma_j = 1 - beta / lambda_j in [0, 1); the series starts at
    // ln a_0 = -sum delta_j / 2 + sum ln(beta / lambda_j) / 2.
    let mut gamma = [T::ZERO; N];
    let mut ln_a0 = T::ZERO;
    for j in 0..N {
        let ratio = beta / lambda[j];
        gamma[j] = (T::ONE - ratio).max(T::ZERO);
        ln_a0 += half * (ratio.ln() - delta[j]);
    }
    // First pass: a~_k = a_k / (a_0 e^shift) by a~_k = (1/k) sum_{m=1..k} g_m a~_{k-m} with
    // g_m = sum_j (gamma_j^m + m delta_j (1 - gamma_j) gamma_j^(m-1)) / 2 >= 0 (Ruben 1962;
    // the recursion is that of the series' generating function, all terms positive). The
    // front half of `scratch` holds g, the back half a~.
    // Every access below goes through `get`, so no index can panic (checked by the boards'
    // panic-freedom link); `gs` and `coef` have `cap` slots each.
    let cap = scratch.len() / 2;
    let (gs, coef) = scratch
        .split_at_mut_checked(cap)
        .ok_or(ZoneError::NoScratch)?;
    let coef = coef.get_mut(..cap).ok_or(ZoneError::NoScratch)?;
    let c0 = coef.first_mut().ok_or(ZoneError::NoScratch)?;
    *c0 = T::ONE;
    let big = T::from_f64(1.152_921_504_606_847e18); // 2^60
    let ln_big = T::from_f64(60.0 * core::f64::consts::LN_2);
    let tol = T::EPSILON * T::from_f64(2.0);
    let mut power = [T::ONE; N]; // gamma_j^(m-1)
    let mut shift = T::ZERO;
    let mut scale = ln_a0.exp();
    let mut sum = T::ONE;
    let mut terms = 1usize;
    // Stop when the weight left is within the rounding of the sum itself.
    while terms < cap && !(T::ONE - scale * sum <= tol * T::from_u32(terms as u32 + 2)) {
        let k = terms;
        let mut gk = T::ZERO;
        for j in 0..N {
            gk += power[j] * (gamma[j] + T::from_u32(k as u32) * delta[j] * (T::ONE - gamma[j]));
            power[j] *= gamma[j];
        }
        if let Some(g) = gs.get_mut(k) {
            *g = gk * half;
        }
        // sum_{m=1..k} g_m a~_{k-m}: g_1.. forward against a~_{k-1}.. backward.
        let (g_run, a_run) = (gs.get(1..=k).unwrap_or(&[]), coef.get(..k).unwrap_or(&[]));
        let s = g_run
            .iter()
            .zip(a_run.iter().rev())
            .fold(T::ZERO, |acc, (&g, &a)| acc + g * a);
        let a = s / T::from_u32(k as u32);
        if let Some(c) = coef.get_mut(k) {
            *c = a;
        }
        sum += a;
        terms += 1;
        if a > big {
            for v in coef.iter_mut().take(terms) {
                *v /= big;
            }
            sum /= big;
            shift += ln_big;
            scale = (ln_a0 + shift).exp();
        }
        if !sum.is_finite() {
            return Err(ZoneError::BadDistribution);
        }
    }
    let remaining = (T::ONE - scale * sum).max(T::ZERO);
    // Second pass: chi-square tails with N + 2k degrees of freedom at y = 1 / beta, h = y / 2.
    // Upper tails upward, Q_{k+1} = Q_k + t_k with t_k = e^-h h^a / Gamma(a + 1), a = N/2 + k
    // (sums of positive terms). Lower tails: P_k = 1 - Q_k while Q_k <= 1/2, then
    // P_{k+1} = P_k - t_k (its absolute error stays that of P at the crossing); when already
    // P_0 < 1/2 (a zone small beside the process), downward from the top term instead, where
    // every step adds.
    let y = T::ONE / beta;
    let h = y * half;
    let ln_h = h.ln();
    let a0 = T::from_u32(N as u32) * half;
    let chi = ChiSquare::new(N as u32).map_err(|_| ZoneError::BadDistribution)?;
    let ln_term = |a: T| a * ln_h - h - (a + T::ONE).ln_gamma();
    let mut ln_t = ln_term(a0);
    let mut t = ln_t.exp();
    // `ln_t` is current while `logs` holds: below `tiny` the terms step in logarithms, so that
    // an underflowed start still reaches the later, larger terms; on leaving, the term is
    // taken afresh from its closed form.
    let (tiny, mut logs) = (T::from_f64(1e-30), true);
    let mut q = chi.upper(y);
    let upward = q <= half;
    let mut p = T::ONE - q;
    let (mut outside, mut inside_up) = (T::ZERO, T::ZERO);
    for (k, &c) in coef.iter().enumerate().take(terms) {
        outside += c * q;
        inside_up += c * p;
        if k + 1 < terms {
            q += t;
            p = if q <= half {
                T::ONE - q
            } else {
                (p - t).max(T::ZERO)
            };
            let a_next = a0 + T::from_u32(k as u32 + 1);
            let next = t * h / a_next;
            if next > tiny && !logs {
                t = next;
            } else {
                if !logs {
                    ln_t = t.ln();
                    logs = true;
                }
                ln_t += ln_h - a_next.ln();
                if ln_t > T::from_f64(-69.0) {
                    // Back above 1e-30: from the closed form, not the accumulated sum.
                    ln_t = ln_term(a_next);
                    logs = false;
                }
                t = ln_t.exp();
            }
        }
    }
    // The weight the cut left out sits on terms k >= K, whose upper tails are at least Q_K:
    // at least `remaining * Q_K` of it is outside, at most `remaining * (1 - Q_K)` inside.
    let q_top = q;
    let inside = if upward {
        inside_up
    } else {
        // P(a, h) at the top: A&S 6.5.29, e^-h h^a / Gamma(a + 1) sum h^n / ((a+1)...(a+n)),
        // which converges quickly here (h is below the top's a).
        let a_top = a0 + T::from_u32(terms as u32 - 1);
        let series = gamma_series(a_top, h);
        // r_k = P_k / t_k downward (r_k = 1 + r_{k+1} h / (a_k + 1), every step adds, kept in
        // the front half of `scratch`), then P_k = r_k t_k with t_k upward from t_0: each P_k
        // carries the relative error of k products, not that of the top term's logarithm.
        let mut r = series;
        for (k, g) in gs.iter_mut().enumerate().take(terms).rev() {
            if k + 1 < terms {
                let a = a0 + T::from_u32(k as u32);
                r = T::ONE + r * h / (a + T::ONE);
            }
            *g = r;
        }
        let mut t = ln_term(a0).exp();
        let mut inside = T::ZERO;
        for (k, (&c, &r)) in coef.iter().zip(gs.iter()).enumerate().take(terms) {
            inside += c * r * t;
            t = t * h / (a0 + T::from_u32(k as u32) + T::ONE);
        }
        inside
    };
    // Reported at the middle of what the cut leaves open, with half its width (plus the
    // rounding of sums of `terms` positive terms) as the error.
    let open = remaining * (T::ONE - q_top).max(T::ZERO) * half;
    let rounding = T::EPSILON * T::from_u32(terms as u32 + 16);
    Ok(Estimate {
        inside: (inside * scale + open).min(T::ONE),
        outside: (outside * scale + remaining * q_top + open).min(T::ONE),
        error: open + rounding,
        terms: terms as u32,
    })
}

/// An integer box for integer samples: `lo_i <= x_i <= hi_i` in `i64`, exact. From a float
/// box the limits become `ceil(lo)` and `floor(hi)`, which selects exactly the same integers;
/// an absent limit becomes the `i32` range end.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IntBox<const N: usize> {
    lo: [i64; N],
    hi: [i64; N],
}

impl<const N: usize> IntBox<N> {
    /// From a float box in the same units.
    pub fn from_zone(z: &BoxZone<f64, N>) -> Self {
        let clamp = |v: f64| v.clamp(f64::from(i32::MIN) - 1.0, f64::from(i32::MAX) + 1.0) as i64;
        IntBox {
            lo: z.lo.map(|v| clamp(libm::ceil(v))),
            hi: z.hi.map(|v| clamp(libm::floor(v))),
        }
    }

    /// Point test, integer compares only.
    #[inline]
    pub fn contains(&self, x: &[i32; N]) -> bool {
        (0..N).all(|i| {
            let v = i64::from(x[i]);
            v >= self.lo[i] && v <= self.hi[i]
        })
    }
}

/// An integer ball for integer samples: `4 |x - c|^2 <= D2` with `D2 = floor(diameter^2)`
/// exact, so the test selects exactly the integer points of the float ball. The centre must be
/// an integer point.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IntBall<const N: usize> {
    centre: [i32; N],
    /// `floor(D2 / 4)`: for an integer `s`, `4 s <= D2` exactly when `s <= floor(D2 / 4)`.
    quarter: i64,
}

impl<const N: usize> IntBall<N> {
    /// From an integer centre and diameter; [`ZoneError::Degenerate`] for a zero diameter,
    /// [`ZoneError::NotIntegral`] for one of 2^31 or more.
    pub fn new(centre: [i32; N], diameter: u32) -> Result<Self, ZoneError> {
        if diameter == 0 {
            return Err(ZoneError::Degenerate);
        }
        if diameter >= 1 << 31 {
            return Err(ZoneError::NotIntegral);
        }
        let d2 = i64::from(diameter) * i64::from(diameter);
        Ok(IntBall {
            centre,
            quarter: d2 / 4,
        })
    }

    /// From a float ball whose centre is an integer point and whose diameter is below 2^26
    /// (so that `floor(diameter^2)` is exact in `f64`); otherwise [`ZoneError::NotIntegral`].
    pub fn from_zone(z: &BallZone<f64, N>) -> Result<Self, ZoneError> {
        let ok = |v: f64| v == libm::round(v) && v.abs() <= f64::from(i32::MAX);
        let d = z.diameter;
        if !(z.centre.iter().all(|&v| ok(v)) && d < 67_108_864.0) {
            return Err(ZoneError::NotIntegral);
        }
        // floor of the exact square: d*d = p + e exactly (fma), so floor(d^2) is floor(p) - 1
        // when p is an integer and e < 0.
        let p = d * d;
        let e = libm::fma(d, d, -p);
        let fl = libm::floor(p);
        let d2 = if fl == p && e < 0.0 { fl - 1.0 } else { fl } as i64;
        Ok(IntBall {
            centre: z.centre.map(|v| v as i32),
            quarter: d2 / 4,
        })
    }

    /// Point test in `i64`, exact. The diameter is below 2^31, so an offset of 2^30 or more
    /// on any axis is outside; below that, `N <= 6` squares sum to less than 2^63.
    #[inline]
    pub fn contains(&self, x: &[i32; N]) -> bool {
        let reach = 1i64 << 30;
        let mut s = 0i64;
        for i in 0..N {
            let d = i64::from(x[i]) - i64::from(self.centre[i]);
            if d.abs() >= reach {
                return false;
            }
            s += d * d;
        }
        s <= self.quarter
    }
}
