//! What differs between the single- and double-precision paths of the zone probabilities.

use super::gauss_legendre::{GL10, GL20};
use super::{bvn_upper_f32, bvn_upper_f64, Real};

/// The precision-specific parts of the quadratures: which bivariate normal method, and how
/// many Gauss–Legendre points the one-dimensional zone integrals use. The choices are tuned
/// so that `f64` reaches 1e-13 absolute and `f32` 2e-6 absolute against mpmath (host tests).
pub trait Precision: Real {
    /// `P(X > h, Y > k)` for a standard bivariate normal with correlation `r`:
    /// [`bvn_upper_f64`] (Genz 2004) or [`bvn_upper_f32`] (Drezner & Wesolowsky 1990).
    fn bvn_upper(h: Self, k: Self, r: Self) -> Self;
    /// Gauss–Legendre rule (positive half) for one panel of a zone integral.
    const RULE: &'static [(f64, f64)];
    /// Number of equal panels the integration window is split into.
    const PANELS: u32;
    /// Half-width of the integration window in standard deviations of the outer variable:
    /// the density beyond it is below 1e-18 (`f64`) or 1e-10 (`f32`) of its peak.
    const WINDOW: f64;
}

impl Precision for f64 {
    fn bvn_upper(h: f64, k: f64, r: f64) -> f64 {
        bvn_upper_f64(h, k, r)
    }
    const RULE: &'static [(f64, f64)] = &GL20;
    const PANELS: u32 = 4;
    const WINDOW: f64 = 9.5;
}

impl Precision for f32 {
    fn bvn_upper(h: f32, k: f32, r: f32) -> f32 {
        bvn_upper_f32(h, k, r)
    }
    const RULE: &'static [(f64, f64)] = &GL10;
    const PANELS: u32 = 3;
    const WINDOW: f64 = 6.8;
}
