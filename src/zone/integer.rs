//! Integer forms of the zones, for integer samples (counts, ticks, micrometres).

use super::{CircleZone, EllipseZone, RectZone, Zone, ZoneError};
use crate::IntGate2;

/// An integer rectangle: `lo_i <= x_i <= hi_i` in `i64`, exact. From a float rectangle the
/// limits become `ceil(lo)` and `floor(hi)`, which selects exactly the same integers; an absent
/// limit becomes the `i32` range end.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IntRect {
    lo: [i64; 2],
    hi: [i64; 2],
}

impl IntRect {
    /// From a float rectangle in the same units.
    pub fn from_zone(z: &RectZone<f64>) -> Self {
        let clamp = |v: f64| v.clamp(f64::from(i32::MIN) - 1.0, f64::from(i32::MAX) + 1.0) as i64;
        let (lo, hi) = (z.lo(), z.hi());
        IntRect {
            lo: [clamp(libm::ceil(lo[0])), clamp(libm::ceil(lo[1]))],
            hi: [clamp(libm::floor(hi[0])), clamp(libm::floor(hi[1]))],
        }
    }

    /// Point test, integer compares only.
    #[inline]
    pub fn contains(&self, x: &[i32; 2]) -> bool {
        let (x0, x1) = (i64::from(x[0]), i64::from(x[1]));
        x0 >= self.lo[0] && x0 <= self.hi[0] && x1 >= self.lo[1] && x1 <= self.hi[1]
    }
}

/// An integer positional-tolerance circle: `4 ((x - cx)^2 + (y - cy)^2) <= D2` in `i64`, with
/// `D2 = floor(diameter^2)` computed exactly (so the test selects exactly the integer points
/// of the float circle). The centre must be an integer point.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IntCircle {
    centre: [i32; 2],
    d2: i64,
    /// `floor(D2 / 4)` capped at `u32::MAX`: `4 s <= D2` exactly when `s <= floor(D2 / 4)`.
    quarter: u32,
}

impl IntCircle {
    fn with_d2(centre: [i32; 2], d2: i64) -> Self {
        IntCircle {
            centre,
            d2,
            quarter: u32::try_from(d2 / 4).unwrap_or(u32::MAX),
        }
    }
}

impl IntCircle {
    /// From an integer centre and diameter; [`ZoneError::Degenerate`] for a zero diameter,
    /// [`ZoneError::NotIntegral`] for one of 2^31 or more.
    pub fn new(centre: [i32; 2], diameter: u32) -> Result<Self, ZoneError> {
        if diameter == 0 {
            return Err(ZoneError::Degenerate);
        }
        if diameter >= 1 << 31 {
            return Err(ZoneError::NotIntegral);
        }
        Ok(Self::with_d2(
            centre,
            i64::from(diameter) * i64::from(diameter),
        ))
    }

    /// From a float circle whose centre is an integer point and whose diameter is below 2^26
    /// (so that `floor(diameter^2)` is exact in `f64`); otherwise [`ZoneError::NotIntegral`].
    pub fn from_zone(z: &CircleZone<f64>) -> Result<Self, ZoneError> {
        let c = z.centre();
        let d = z.diameter();
        let ok = |v: f64| v == libm::round(v) && v.abs() <= f64::from(i32::MAX);
        if !(ok(c[0]) && ok(c[1]) && d < 67_108_864.0) {
            return Err(ZoneError::NotIntegral);
        }
        // floor of the exact square: d*d = p + e exactly (fma), so floor(d^2) is floor(p) - 1
        // when p is an integer and e < 0.
        let p = d * d;
        let e = libm::fma(d, d, -p);
        let fl = libm::floor(p);
        let d2 = if fl == p && e < 0.0 { fl - 1.0 } else { fl };
        Ok(Self::with_d2([c[0] as i32, c[1] as i32], d2 as i64))
    }

    /// Point test, integer multiply-adds only. Offsets within the 16-bit range are tested in
    /// 32-bit arithmetic (`dx^2 + dy^2 <= 2^31`, against `floor(D2 / 4)`); wider ones in
    /// `i64`. Both are exact.
    #[inline]
    pub fn contains(&self, x: &[i32; 2]) -> bool {
        let small = |v: i32, c: i32| match v.checked_sub(c) {
            Some(d) if d.unsigned_abs() <= 1 << 15 => Some(d.unsigned_abs()),
            _ => None,
        };
        match (small(x[0], self.centre[0]), small(x[1], self.centre[1])) {
            (Some(dx), Some(dy)) => dx * dx + dy * dy <= self.quarter,
            _ => self.contains_wide(x),
        }
    }

    /// The `i64` test. The diameter is below 2^31, so a point with `|dx|` or `|dy|` of 2^30 or
    /// more is outside; below that, `4 (dx^2 + dy^2) < 2^63`.
    #[inline(never)]
    fn contains_wide(&self, x: &[i32; 2]) -> bool {
        let dx = i64::from(x[0]) - i64::from(self.centre[0]);
        let dy = i64::from(x[1]) - i64::from(self.centre[1]);
        let reach = 1i64 << 30;
        if dx.abs() >= reach || dy.abs() >= reach {
            return false;
        }
        4 * (dx * dx + dy * dy) <= self.d2
    }
}

/// An integer ellipse test: the quadratic form of the ellipse with integer coefficients, as
/// the integer gate ([`IntGate2::from_form`]); its verdict equals the float test's except for
/// points within [`band`](IntGate2::band) of the boundary (about 1e-15 of it, in units of the
/// squared normalised radius).
pub type IntEllipse = IntGate2;

/// Any zone in integer form.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum IntZone {
    /// Exact rectangle.
    Rect(IntRect),
    /// Exact circle.
    Circle(IntCircle),
    /// Ellipse, exact outside a tiny band.
    Ellipse(IntEllipse),
}

impl IntZone {
    /// The integer form of a float zone in the same units. Errors: [`ZoneError::NotIntegral`]
    /// (circle centre not integral, or an ellipse beyond the integer range).
    pub fn from_zone(z: &Zone<f64>) -> Result<Self, ZoneError> {
        Ok(match z {
            Zone::Rect(r) => IntZone::Rect(IntRect::from_zone(r)),
            Zone::Circle(c) => IntZone::Circle(IntCircle::from_zone(c)?),
            Zone::Ellipse(e) => IntZone::Ellipse(ellipse_form(e)?),
        })
    }

    /// Point test in integers.
    #[inline]
    pub fn contains(&self, x: &[i32; 2]) -> bool {
        match self {
            IntZone::Rect(r) => r.contains(x),
            IntZone::Circle(c) => c.contains(x),
            IntZone::Ellipse(e) => e.passes(x),
        }
    }
}

/// `(x - c)' A (x - c) <= 1` with `A = R diag(1/a^2, 1/b^2) R'`; the bounding box half-widths
/// are `sqrt(A^-1_ii)`, `A^-1 = R diag(a^2, b^2) R'`.
fn ellipse_form(e: &EllipseZone<f64>) -> Result<IntEllipse, ZoneError> {
    let (c, s) = e.rotation();
    let [a, b] = e.axes();
    let (ia, ib) = (1.0 / (a * a), 1.0 / (b * b));
    let form = [
        [c * c * ia + s * s * ib, c * s * (ia - ib)],
        [c * s * (ia - ib), s * s * ia + c * c * ib],
    ];
    let spread = [c * c * a * a + s * s * b * b, s * s * a * a + c * c * b * b];
    let rcond = (b * b / (a * a)).min(a * a / (b * b));
    IntGate2::from_form(&e.centre(), &form, &spread, 1.0, rcond).map_err(|_| ZoneError::NotIntegral)
}
