//! In-zone probabilities and their cheap bounds.

use super::{Bounds, CircleZone, EllipseZone, RectZone, Yield, ZoneError};
use crate::math::root::solve_bracketed;
use crate::math::{det2, norm_cdf, norm_sf, Orthant, Precision, Real};
use crate::Covariance;

/// `P(lo < Z < hi)` for a standard normal, from whichever tails keep it accurate, together
/// with the two outer tails `P(Z <= lo)` and `P(Z >= hi)`.
#[inline]
fn interval<T: Precision>(lo: T, hi: T) -> (T, T, T) {
    let (below, over_lo) = T::normal_tails(lo);
    let (under_hi, above) = T::normal_tails(hi);
    let inside = if lo > T::ZERO {
        (over_lo - above).max(T::ZERO)
    } else if hi < T::ZERO {
        (under_hi - below).max(T::ZERO)
    } else {
        (T::ONE - below - above).max(T::ZERO)
    };
    (inside, below, above)
}

fn clamp01<T: Real>(p: T) -> T {
    p.max(T::ZERO).min(T::ONE)
}

/// Rectangle: standardise the limits and combine orthant probabilities
/// `U(h, k) = P(X > h, Y > k)`: inside `= U(a1,a2) - U(b1,a2) - U(a1,b2) + U(b1,b2)`; outside
/// directly as `P(X < a1) + P(X > b1) + P(a1 <= X <= b1, Y < a2) + P(a1 <= X <= b1, Y > b2)`.
pub(super) fn rect<T: Precision>(z: &RectZone<T>, mu: &[T; 2], c: &Covariance<T, 2>) -> Yield<T> {
    let m = c.matrix();
    let s = [m[0][0].sqrt(), m[1][1].sqrt()];
    let r = (m[0][1] / (s[0] * s[1])).max(-T::ONE).min(T::ONE);
    let (lo, hi) = (z.lo(), z.hi());
    let a = [(lo[0] - mu[0]) / s[0], (lo[1] - mu[1]) / s[1]];
    let bb = [(hi[0] - mu[0]) / s[0], (hi[1] - mu[1]) / s[1]];
    // Margin tails (P(Z <= .), P(Z > .)) at the four limits, shared by the six orthants.
    let (ta, tb) = (
        [T::normal_tails(a[0]), T::normal_tails(a[1])],
        [T::normal_tails(bb[0]), T::normal_tails(bb[1])],
    );
    let o = Orthant::new(r);
    let u_a1b2 = o.upper(a[0], bb[1], ta[0].1, tb[1].1);
    let u_b1b2 = o.upper(bb[0], bb[1], tb[0].1, tb[1].1);
    let inside =
        o.upper(a[0], a[1], ta[0].1, ta[1].1) - o.upper(bb[0], a[1], tb[0].1, ta[1].1) - u_a1b2
            + u_b1b2;
    let below = (o.upper(-bb[0], -a[1], tb[0].0, ta[1].0)
        - o.upper(-a[0], -a[1], ta[0].0, ta[1].0))
    .max(T::ZERO);
    let above = (u_a1b2 - u_b1b2).max(T::ZERO);
    let outside = ta[0].0 + tb[0].1 + below + above;
    Yield {
        inside: clamp01(inside),
        outside: clamp01(outside),
    }
}

/// A normal distribution in the principal frame of its covariance, relative to a disk centre:
/// mean and standard deviation along the major and the minor axis.
#[derive(Clone, Copy, Debug)]
struct Frame<T> {
    m_major: T,
    m_minor: T,
    s_major: T,
    s_minor: T,
}

fn frame<T: Real>(cov: &Covariance<T, 2>, d: [T; 2]) -> Frame<T> {
    frame_with(cov.ellipse(), d)
}

fn frame_with<T: Real>(e: crate::Ellipse<T>, d: [T; 2]) -> Frame<T> {
    let (sn, cs) = (e.angle.sin(), e.angle.cos());
    Frame {
        m_major: cs * d[0] + sn * d[1],
        m_minor: -sn * d[0] + cs * d[1],
        s_major: e.major,
        s_minor: e.minor,
    }
}

/// `P(|U| <= r)` and `P(|U| > r)` for `U` normal in frame `f`.
///
/// Method: the outer integral runs over the minor (narrow) axis `u` and the inner probability
/// over the major axis is a difference of normal CDFs over `|w| <= v = sqrt(r^2 - u^2)`. Only
/// the window `mean +- WINDOW sd` of the outer axis is integrated (widened to the disk's edge
/// when it ends within a quarter panel of it), split into `PANELS` panels of equal width in `u`, so
/// each covers the same number of standard deviations of the outer normal however large the
/// disk; each panel takes one Gauss–Legendre rule (`Precision`). Inner panels are integrated
/// in `z = (u - mean) / sd` directly, so the density is evaluated at exact offsets from the
/// mean; a panel that reaches the edge `u = +-r` is integrated in the angle `s` from that edge
/// (`u = +-r cos s`, which removes the square root's infinite slope), with the offset from the
/// mean written as `(r -+ mean) - 2 r sin^2(s / 2)`, again without cancellation. (Panels of
/// equal angle over the whole window could not follow a normal whose angular width shrinks like
/// `sd / r`: a centred disk of radius 6.8 sd lost 1.4e-5 in `f32` that way; and positions
/// `r sin t` rounded relative to `r` moved the density's argument by `eps r / sd`.) The
/// outside fraction is the sum of the outer tails beyond the disk and the integral of the inner
/// tails, never `1 - inside`.
fn disk<T: Precision>(f: &Frame<T>, r: T) -> Yield<T> {
    let (mo, so, mi, si) = (f.m_minor, f.s_minor, f.m_major, f.s_major);
    let outer_tails = T::normal_tails((-r - mo) / so).0 + T::normal_tails((r - mo) / so).1;
    let w = T::from_f64(T::WINDOW) * so;
    let panels = T::from_u32(T::PANELS);
    let (mut lo, mut hi) = (mo - w, mo + w);
    // A window ending within a quarter panel of an edge is widened to it: the square root's
    // infinite slope just beyond a panel's end would spoil its rule, while a quarter panel
    // more of far tail costs nothing.
    let snap = (hi - lo) / panels * T::from_f64(0.25);
    let left_edge = lo <= snap - r;
    let right_edge = hi >= r - snap;
    if left_edge {
        lo = -r;
    }
    if right_edge {
        hi = r;
    }
    if !(lo < hi) {
        return Yield {
            inside: T::ZERO,
            outside: clamp01(outer_tails),
        };
    }
    let width = (hi - lo) / panels;
    let half = T::from_f64(0.5);
    let two_r = r + r;
    // Distances from the mean to the two edges, each rounded once.
    let (to_right, to_left) = (r - mo, r + mo);
    let (mut acc_in, mut acc_out) = (T::ZERO, T::ZERO);
    for p in 0..T::PANELS {
        // Panel [ua, ub] as offsets from the mean.
        let da = lo - mo + width * T::from_u32(p);
        let db = if p + 1 == T::PANELS {
            hi - mo
        } else {
            da + width
        };
        let edge = if p + 1 == T::PANELS && right_edge {
            Some((to_right, T::ONE, to_right - da))
        } else if p == 0 && left_edge {
            Some((to_left, -T::ONE, to_left + db))
        } else {
            None
        };
        let (mid, hw) = ((da + db) * half, (db - da) * half);
        let (scale, (pin, pout)) = match edge {
            // u = side (r cos s), s over [0, 2 s_half]; du = v ds; the offset from the mean is
            // side (gap - 2 r sin^2(s / 2)), gap the distance from the mean to that edge.
            Some((gap, side, depth)) => {
                let s_half = ((depth / two_r).max(T::ZERO).min(T::ONE)).sqrt().asin();
                let node = |x: T| {
                    let sh = s_half * (T::ONE + x) * half;
                    let h = T::node_sin(sh);
                    let v = r * T::node_sin(sh + sh);
                    (v, side * (gap - two_r * h * h) / so, v / so)
                };
                (s_half, panel_sums(node, mi, si))
            }
            // z = offset / sd directly; du = sd dz; v = sqrt((r - u)(r + u)) from the two
            // edge distances.
            None => {
                let node = |x: T| {
                    let d = mid + hw * x;
                    let v = ((to_right - d) * (to_left + d)).max(T::ZERO).sqrt();
                    (v, d / so, T::ONE)
                };
                (hw / so, panel_sums(node, mi, si))
            }
        };
        acc_in += pin * scale;
        acc_out += pout * scale;
    }
    Yield {
        inside: clamp01(acc_in),
        outside: clamp01(outer_tails + acc_out),
    }
}

/// One panel's Gauss–Legendre sums of the inside and the outside integrand. `node` maps a
/// rule node `x` in [-1, 1] to the half-chord `v`, the standardized offset `z` of the outer
/// variable and the Jacobian factor; the inner probability over `|w| <= v` of the major-axis
/// normal (mean `mi`, sd `si`) and its two tails are weighted by the standard density at `z`.
/// Generic over `node`, so each panel kind compiles to its own loop.
#[inline(always)]
fn panel_sums<T: Precision>(node: impl Fn(T) -> (T, T, T), mi: T, si: T) -> (T, T) {
    let half = T::from_f64(0.5);
    // 1 / sqrt(2 pi): the standard normal density's constant.
    let c = T::from_f64(0.398_942_280_401_432_7);
    let (mut pin, mut pout) = (T::ZERO, T::ZERO);
    for &(x, wt) in T::RULE.iter() {
        for sign in [-T::ONE, T::ONE] {
            let (v, z, jac) = node(sign * T::from_f64(x));
            let dens = c * T::node_exp(-(z * z) * half);
            let (inside, below, above) = interval((-v - mi) / si, (v - mi) / si);
            let k = T::from_f64(wt) * jac * dens;
            pin += k * inside;
            pout += k * (below + above);
        }
    }
    (pin, pout)
}

pub(super) fn circle<T: Precision>(
    z: &CircleZone<T>,
    mu: &[T; 2],
    c: &Covariance<T, 2>,
) -> Yield<T> {
    disk(&circle_frame(z, mu, c), z.diameter() * T::from_f64(0.5))
}

fn circle_frame<T: Real>(z: &CircleZone<T>, mu: &[T; 2], c: &Covariance<T, 2>) -> Frame<T> {
    let centre = z.centre();
    frame(c, [mu[0] - centre[0], mu[1] - centre[1]])
}

/// The ellipse zone mapped onto the unit disk: `W = diag(1/a, 1/b) R(-angle)` sends the zone to
/// `|v| <= 1`, the mean to `W (mean - centre)` and the covariance to `W C W'`.
fn ellipse_frame<T: Real>(z: &EllipseZone<T>, mu: &[T; 2], c: &Covariance<T, 2>) -> Frame<T> {
    let (cs, sn) = z.rotation();
    let [a, bb] = z.axes();
    let m = *c.matrix();
    let r1 = [cs, sn];
    let r2 = [-sn, cs];
    let q = |p: [T; 2], q: [T; 2]| {
        p[0] * (m[0][0] * q[0] + m[0][1] * q[1]) + p[1] * (m[1][0] * q[0] + m[1][1] * q[1])
    };
    let cov = Covariance::from_matrix([
        [q(r1, r1) / (a * a), q(r1, r2) / (a * bb)],
        [q(r1, r2) / (a * bb), q(r2, r2) / (bb * bb)],
    ]);
    // det(W C W') = det(C) / (a b)^2: taken from the original entries, since the rotated ones
    // have lost the small eigenvalue of a nearly singular C to rounding.
    let ab = a * bb;
    let det = det2(m[0][0], m[0][1], m[1][1]) / ab / ab;
    frame_with(cov.ellipse_with_det(det), z.to_unit(mu))
}

pub(super) fn ellipse<T: Precision>(
    z: &EllipseZone<T>,
    mu: &[T; 2],
    c: &Covariance<T, 2>,
) -> Yield<T> {
    disk(&ellipse_frame(z, mu, c), T::ONE)
}

fn from_outside<T: Real>(outside_lower: T, outside_upper: T) -> Bounds<T> {
    let (ol, ou) = (clamp01(outside_lower), clamp01(outside_upper));
    Bounds {
        inside_lower: T::ONE - ou,
        inside_upper: T::ONE - ol,
        outside_lower: ol,
        outside_upper: ou,
    }
}

/// `exp(-d^2 / 2)`: the chi-square (2 degrees of freedom) probability outside the Mahalanobis
/// ellipse of radius `d` around the mean; 1 when `d <= 0` (mean on or outside the boundary).
fn outside_ellipse<T: Real>(d: T) -> T {
    if d > T::ZERO {
        (-(d * d) * T::from_f64(0.5)).exp()
    } else {
        T::ONE
    }
}

/// Rectangle bounds from the standardised distances `d` of the mean to each limit (a limit
/// is a half-plane whose violation probability is `Phi(-d)`): outside is at least the larger
/// per-axis violation and at most the Bonferroni sum of all four, or the mass outside the
/// largest Mahalanobis ellipse around the mean that fits inside (`exp(-d_min^2 / 2)`).
pub(super) fn rect_bounds<T: Real>(
    z: &RectZone<T>,
    mu: &[T; 2],
    c: &Covariance<T, 2>,
) -> Bounds<T> {
    let m = *c.matrix();
    let s = [m[0][0].sqrt(), m[1][1].sqrt()];
    let (lo, hi) = (z.lo(), z.hi());
    let mut axis = [T::ZERO; 2];
    let mut dmin = T::from_f64(f64::INFINITY);
    for i in 0..2 {
        let dl = (mu[i] - lo[i]) / s[i];
        let dh = (hi[i] - mu[i]) / s[i];
        axis[i] = norm_sf(dl) + norm_sf(dh);
        dmin = dmin.min(dl).min(dh);
    }
    let sum = axis[0] + axis[1];
    from_outside(axis[0].max(axis[1]), sum.min(outside_ellipse(dmin)))
}

/// Disk bounds in the principal frame: outside is at least the mass outside the best of three
/// slabs that contain the disk (across each principal axis and across the direction of the
/// mean), and at most the mass outside the largest inscribed Mahalanobis ellipse around the
/// mean, or the Bonferroni sum over the four sides of the inscribed square.
fn disk_bounds<T: Real>(f: &Frame<T>, r: T) -> Bounds<T> {
    let m = [f.m_major, f.m_minor];
    let s = [f.s_major, f.s_minor];
    let slab = |mean: T, sd: T| norm_cdf((-r - mean) / sd) + norm_sf((r - mean) / sd);
    let mut lower = slab(m[0], s[0]).max(slab(m[1], s[1]));
    let dist = m[0].hypot(m[1]);
    if dist > T::ZERO {
        let (e0, e1) = (m[0] / dist, m[1] / dist);
        let sd = (e0 * e0 * s[0] * s[0] + e1 * e1 * s[1] * s[1]).sqrt();
        lower = lower.max(slab(dist, sd));
    }
    let ellipse = outside_ellipse((r - dist) / s[0]);
    let h = r * T::from_f64(core::f64::consts::FRAC_1_SQRT_2);
    let square = slab_h(m[0], s[0], h) + slab_h(m[1], s[1], h);
    from_outside(lower, ellipse.min(square))
}

/// Mass outside the slab `|x| <= h` of a normal with the given mean and sd.
fn slab_h<T: Real>(mean: T, sd: T, h: T) -> T {
    norm_cdf((-h - mean) / sd) + norm_sf((h - mean) / sd)
}

pub(super) fn circle_bounds<T: Real>(
    z: &CircleZone<T>,
    mu: &[T; 2],
    c: &Covariance<T, 2>,
) -> Bounds<T> {
    disk_bounds(&circle_frame(z, mu, c), z.diameter() * T::from_f64(0.5))
}

pub(super) fn ellipse_bounds<T: Real>(
    z: &EllipseZone<T>,
    mu: &[T; 2],
    c: &Covariance<T, 2>,
) -> Bounds<T> {
    disk_bounds(&ellipse_frame(z, mu, c), T::ONE)
}

/// Radius of the circle centred on the baseline mean that holds the fraction `coverage` of the
/// distribution: CEP for 0.5, R95 for 0.95, any coverage in (0, 1).
///
/// Method: the answer lies between the Rayleigh radii of the minor and of the major standard
/// deviation, `s sqrt(-2 ln(1 - coverage))`; the Illinois method
/// (`solve_bracketed` in `math::root`) solves `ln P(outside) = ln(1 - coverage)` on that bracket with the
/// disk probability above. Circular covariance: the Rayleigh radius itself (exact).
/// [`ZoneError::BadCoverage`] outside (0, 1); [`ZoneError::BadDistribution`] for a covariance
/// that is not positive definite.
pub fn coverage_radius<T: Precision>(cov: &Covariance<T, 2>, coverage: T) -> Result<T, ZoneError> {
    if !(coverage > T::ZERO && coverage < T::ONE) {
        return Err(ZoneError::BadCoverage);
    }
    super::check_distribution(&[T::ZERO; 2], cov)?;
    let f = frame(cov, [T::ZERO; 2]);
    let target = (T::ONE - coverage).ln();
    let k = (-(target + target)).sqrt();
    let (lo, hi) = (f.s_minor * k, f.s_major * k);
    if !(hi > lo * (T::ONE + T::EPSILON * T::from_f64(16.0))) {
        return Ok(hi);
    }
    solve_bracketed(lo, hi, |r| target - disk(&f, r).outside.ln())
        .map_err(|_| ZoneError::BadCoverage)
}
