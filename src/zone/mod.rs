//! Tolerance zones: is this part inside, and what fraction of parts will be?
//!
//! Three shapes, each with an exact point test in float and for integer samples in integers,
//! and the probability that a sample from a [`Baseline`](crate::Baseline)'s normal distribution lands inside
//! and outside (computed separately, so the outside fraction keeps its relative accuracy down
//! to parts per billion):
//!
//! | zone | conforms when | probability by |
//! |---|---|---|
//! | [`RectZone`] | `lo_i <= x_i <= hi_i`, either limit may be absent (one-sided) | bivariate normal orthants (Genz 2004 in `f64`, Drezner & Wesolowsky 1990 in `f32`) |
//! | [`CircleZone`] | `2 sqrt(dx^2 + dy^2) <= diameter` (positional tolerance, ASME Y14.5 / ISO 1101, common practice) | rotation to the principal axes, one-dimensional Gauss–Legendre |
//! | [`EllipseZone`] | `(u / a)^2 + (v / b)^2 <= 1` in the ellipse's own axes | mapped onto the unit circle, then as the circle |
//!
//! [`Bounds`] bracket the probabilities without quadrature (half-plane probabilities, a
//! Bonferroni sum, the chi-square coverage of the largest inscribed Mahalanobis ellipse), for
//! per-sample use on small cores. [`coverage_radius`] gives the radius of the circle centred on
//! the mean that holds a given fraction (CEP for 0.5).
//!
//! A limit value lying exactly on the boundary conforms (common practice: a dimension at its
//! limit is in tolerance).
//!
//! In N dimensions (`N = 1..=6`): [`BoxZone`], [`BallZone`] and [`EllipsoidZone`], with the
//! ball and ellipsoid probabilities returned as an [`Estimate`] with an error bound, and the
//! box probability for `N <= 3` as a [`Yield`].

mod box3;
mod confidence;
mod integer;
mod nd;
mod probability;

pub use confidence::{BoundError, Uncertainty, YieldBound};
pub use integer::{IntCircle, IntEllipse, IntRect, IntZone};
pub use nd::{BallZone, BoxZone, EllipsoidZone, Estimate, IntBall, IntBox};
pub use probability::coverage_radius;

use core::fmt;

use crate::math::{norm_quantile_upper, Precision, Real};
use crate::Covariance;

/// Why a zone cannot be built or used.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum ZoneError {
    /// A limit, centre, size or angle is NaN (or a size infinite).
    NotFinite,
    /// The zone is empty or degenerate: a lower limit not below its upper limit, a diameter or
    /// semi-axis that is not positive.
    Degenerate,
    /// The zone cannot be represented exactly in the integer form (a centre that is not an
    /// integer, limits outside `i32`).
    NotIntegral,
    /// The requested coverage is not strictly between 0 and 1.
    BadCoverage,
    /// The distribution's mean is not finite, or its covariance is not positive definite.
    BadDistribution,
    /// The caller's scratch buffer is too short for one term of a series (needs 2 slots).
    NoScratch,
    /// Not available for this dimension yet (box probabilities above 3 dimensions).
    Unsupported,
}

impl fmt::Display for ZoneError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            ZoneError::NotFinite => "zone parameter is not a number",
            ZoneError::Degenerate => "zone is empty or degenerate",
            ZoneError::NotIntegral => "zone does not fit the integer form exactly",
            ZoneError::BadCoverage => "coverage must lie strictly between 0 and 1",
            ZoneError::BadDistribution => "mean not finite or covariance not positive definite",
            ZoneError::NoScratch => "scratch buffer too short",
            ZoneError::Unsupported => "not available for this dimension yet",
        })
    }
}

impl core::error::Error for ZoneError {}

/// An axis-aligned rectangle; an absent limit is `-inf` (lower) or `+inf` (upper).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RectZone<T> {
    lo: [T; 2],
    hi: [T; 2],
}

impl<T: Real> RectZone<T> {
    /// `lo[i] <= x[i] <= hi[i]`. Use `-inf` / `+inf` for an absent limit. Errors:
    /// [`ZoneError::NotFinite`] for NaN, [`ZoneError::Degenerate`] unless `lo[i] < hi[i]`, or
    /// a lower limit of `+inf` / an upper of `-inf`.
    pub fn new(lo: [T; 2], hi: [T; 2]) -> Result<Self, ZoneError> {
        for i in 0..2 {
            if lo[i].is_nan() || hi[i].is_nan() {
                return Err(ZoneError::NotFinite);
            }
            let inf = T::from_f64(f64::INFINITY);
            if !(lo[i] < hi[i]) || lo[i] == inf || hi[i] == -inf {
                return Err(ZoneError::Degenerate);
            }
        }
        Ok(RectZone { lo, hi })
    }

    /// Lower limits (`-inf` where absent).
    pub fn lo(&self) -> [T; 2] {
        self.lo
    }

    /// Upper limits (`+inf` where absent).
    pub fn hi(&self) -> [T; 2] {
        self.hi
    }

    /// Point test; NaN is outside.
    #[inline]
    pub fn contains(&self, x: &[T; 2]) -> bool {
        x[0] >= self.lo[0] && x[0] <= self.hi[0] && x[1] >= self.lo[1] && x[1] <= self.hi[1]
    }
}

/// A circle of the given diameter around a centre: the positional tolerance zone.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CircleZone<T> {
    centre: [T; 2],
    diameter: T,
}

impl<T: Real> CircleZone<T> {
    /// Errors: [`ZoneError::NotFinite`], [`ZoneError::Degenerate`] for a diameter not above 0.
    pub fn new(centre: [T; 2], diameter: T) -> Result<Self, ZoneError> {
        if !(centre.iter().all(|v| v.is_finite()) && diameter.is_finite()) {
            return Err(ZoneError::NotFinite);
        }
        if !(diameter > T::ZERO) {
            return Err(ZoneError::Degenerate);
        }
        Ok(CircleZone { centre, diameter })
    }

    /// The centre (true position).
    pub fn centre(&self) -> [T; 2] {
        self.centre
    }

    /// The tolerance diameter.
    pub fn diameter(&self) -> T {
        self.diameter
    }

    /// Positional tolerance test: `4 (dx^2 + dy^2) <= diameter^2`, no square root. NaN is
    /// outside.
    #[inline]
    pub fn contains(&self, x: &[T; 2]) -> bool {
        let dx = x[0] - self.centre[0];
        let dy = x[1] - self.centre[1];
        let four = T::from_f64(4.0);
        four * (dx * dx + dy * dy) <= self.diameter * self.diameter
    }
}

/// An ellipse: centre, semi-axes `a` (along the rotated first axis) and `b`, rotation angle
/// (radians, counter-clockwise from the first coordinate axis).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct EllipseZone<T> {
    centre: [T; 2],
    axes: [T; 2],
    cos: T,
    sin: T,
}

impl<T: Real> EllipseZone<T> {
    /// Errors: [`ZoneError::NotFinite`], [`ZoneError::Degenerate`] for a semi-axis not above 0.
    pub fn new(centre: [T; 2], a: T, b: T, angle: T) -> Result<Self, ZoneError> {
        let all = [centre[0], centre[1], a, b, angle];
        if !all.iter().all(|v| v.is_finite()) {
            return Err(ZoneError::NotFinite);
        }
        if !(a > T::ZERO && b > T::ZERO) {
            return Err(ZoneError::Degenerate);
        }
        Ok(EllipseZone {
            centre,
            axes: [a, b],
            cos: angle.cos(),
            sin: angle.sin(),
        })
    }

    /// As [`new`](Self::new), with the rotation given as its cosine and sine (a decoded
    /// snapshot); [`ZoneError::Degenerate`] unless `cos^2 + sin^2` is 1 within 1e-5.
    pub fn from_rotation(centre: [T; 2], a: T, b: T, cos: T, sin: T) -> Result<Self, ZoneError> {
        let z = Self::new(centre, a, b, T::ZERO)?;
        if !(cos.is_finite() && sin.is_finite()) {
            return Err(ZoneError::NotFinite);
        }
        if !((cos * cos + sin * sin - T::ONE).abs() <= T::from_f64(1e-5)) {
            return Err(ZoneError::Degenerate);
        }
        Ok(EllipseZone { cos, sin, ..z })
    }

    /// The centre.
    pub fn centre(&self) -> [T; 2] {
        self.centre
    }

    /// The semi-axes `[a, b]`.
    pub fn axes(&self) -> [T; 2] {
        self.axes
    }

    /// `(cos, sin)` of the rotation angle.
    pub fn rotation(&self) -> (T, T) {
        (self.cos, self.sin)
    }

    /// Coordinates scaled onto the unit disk: `W (x - centre)` with
    /// `W = diag(1/a, 1/b) R(-angle)`.
    #[inline]
    pub fn to_unit(&self, x: &[T; 2]) -> [T; 2] {
        let dx = x[0] - self.centre[0];
        let dy = x[1] - self.centre[1];
        [
            (self.cos * dx + self.sin * dy) / self.axes[0],
            (-self.sin * dx + self.cos * dy) / self.axes[1],
        ]
    }

    /// Point test; NaN is outside.
    #[inline]
    pub fn contains(&self, x: &[T; 2]) -> bool {
        let [u, v] = self.to_unit(x);
        u * u + v * v <= T::ONE
    }
}

/// Checks a normal distribution for the probability functions: finite mean, positive
/// variances, `|rho| < 1` (positive definite).
pub(crate) fn check_distribution<T: Real>(
    mean: &[T; 2],
    cov: &Covariance<T, 2>,
) -> Result<(), ZoneError> {
    let [[a, b], [_, c]] = *cov.matrix();
    let finite = mean.iter().chain([a, b, c].iter()).all(|v| v.is_finite());
    if finite && a > T::ZERO && c > T::ZERO && a * c - b * b > T::ZERO {
        Ok(())
    } else {
        Err(ZoneError::BadDistribution)
    }
}

/// Any of the three zones.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Zone<T> {
    /// Rectangle with optional one-sided limits.
    Rect(RectZone<T>),
    /// Positional-tolerance circle.
    Circle(CircleZone<T>),
    /// Rotated ellipse.
    Ellipse(EllipseZone<T>),
}

/// Probability of landing inside and outside a zone, each computed directly.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Yield<T> {
    /// Expected yield: probability of conforming.
    pub inside: T,
    /// Nonconforming fraction (not `1 - inside`: computed from the tails themselves).
    pub outside: T,
}

/// Cheap brackets of [`Yield`], without quadrature.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Bounds<T> {
    /// Lower bound of the inside probability.
    pub inside_lower: T,
    /// Upper bound of the inside probability.
    pub inside_upper: T,
    /// Lower bound of the outside probability.
    pub outside_lower: T,
    /// Upper bound of the outside probability.
    pub outside_upper: T,
}

/// Capability figures derived from a yield.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Capability<T> {
    /// Nonconforming parts per million: `outside * 10^6`.
    pub ppm: T,
    /// Equivalent capability index `z / 3`, where `z` is the standard normal deviate whose
    /// upper tail equals the nonconforming fraction (`z = Phi^-1(1 - outside)`). It is the Cpk
    /// a one-dimensional process centred in a one-sided tolerance would need for the same
    /// nonconforming fraction (common practice); 1.0 is 1350 ppm, 1.33 about 32 ppm,
    /// 1.67 about 0.29 ppm. `+inf` for an outside fraction of 0, `-inf` for 1.
    pub index: T,
}

impl<T: Real> Yield<T> {
    /// Nonconforming ppm and the equivalent index (definition at [`Capability::index`]).
    pub fn capability(&self) -> Capability<T> {
        let inf = T::from_f64(f64::INFINITY);
        let index = match norm_quantile_upper(self.outside) {
            Ok(z) => z / T::from_f64(3.0),
            Err(_) if self.outside <= T::ZERO => inf,
            Err(_) if self.outside >= T::ONE => -inf,
            Err(_) => T::from_f64(f64::NAN),
        };
        Capability {
            ppm: self.outside * T::from_f64(1e6),
            index,
        }
    }
}

impl<T: Precision> Zone<T> {
    /// Point test.
    #[inline]
    pub fn contains(&self, x: &[T; 2]) -> bool {
        match self {
            Zone::Rect(z) => z.contains(x),
            Zone::Circle(z) => z.contains(x),
            Zone::Ellipse(z) => z.contains(x),
        }
    }

    /// Probability that a sample from the normal distribution `N(mean, cov)` lands inside /
    /// outside (for a [`Baseline`](crate::Baseline) `b`: `probability(b.mean(),
    /// &b.covariance())`). Accuracy, held over the whole swept domain (host tests
    /// `zones_sweep` and `zones_reference` against mpmath: standard deviations in ratios up to
    /// 1e4, correlations to +-0.995, mean offsets to 10 sd, zone sizes 0.01 to 12 sd):
    /// `f64` 2e-14 absolute on inside and outside, the outside fraction (computed from the
    /// tails, never as `1 - inside`) 1e-10 relative down to 1e-9; `f32` 2e-6 absolute and the
    /// outside fraction 1e-5 relative from 1e-4 up (absolute only for ellipse zones whose axes
    /// differ more than 1000x). `inside + outside` is 1 within the same absolute bounds.
    /// [`ZoneError::BadDistribution`] unless the covariance is positive definite.
    pub fn probability(
        &self,
        mean: &[T; 2],
        cov: &Covariance<T, 2>,
    ) -> Result<Yield<T>, ZoneError> {
        check_distribution(mean, cov)?;
        Ok(match self {
            Zone::Rect(z) => probability::rect(z, mean, cov),
            Zone::Circle(z) => probability::circle(z, mean, cov),
            Zone::Ellipse(z) => probability::ellipse(z, mean, cov),
        })
    }

    /// Cheap bounds of [`probability`](Self::probability): a handful of `erfc` and `exp`, no
    /// quadrature. Always bracket the exact value (tested).
    pub fn bounds(&self, mean: &[T; 2], cov: &Covariance<T, 2>) -> Result<Bounds<T>, ZoneError> {
        check_distribution(mean, cov)?;
        Ok(match self {
            Zone::Rect(z) => probability::rect_bounds(z, mean, cov),
            Zone::Circle(z) => probability::circle_bounds(z, mean, cov),
            Zone::Ellipse(z) => probability::ellipse_bounds(z, mean, cov),
        })
    }
}
