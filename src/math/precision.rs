//! What differs between the single- and double-precision paths of the zone probabilities.

use super::fast32::{cos32, exp32, normal_tails32, sin32};
use super::gauss_legendre::{GL10, GL20};
use super::{bvn_upper_f32, bvn_upper_f64, norm_sf, Real};

/// The precision-specific parts of the quadratures: which bivariate normal method, how many
/// Gauss–Legendre points the one-dimensional zone integrals use, and the scalar kernels at the
/// nodes (`libm` in `f64`; the short-range kernels of `math::fast32` in `f32`). The choices
/// are tuned so that `f64` reaches 2e-14 absolute and `f32` 2e-6 absolute against mpmath over
/// the whole domain users reach (host tests `zones_sweep`, `zones_reference`).
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
    /// `true` when the bivariate orthants use the 5-point low-correlation rule, whose nodes
    /// depend on the correlation alone and are prepared once per zone.
    const LOW5: bool;
    /// `e^x` at a quadrature node.
    fn node_exp(x: Self) -> Self;
    /// `sin x` at a quadrature node, `|x| <= 1.6`.
    fn node_sin(x: Self) -> Self;
    /// `cos x` at a quadrature node, `|x| <= 1.6`.
    fn node_cos(x: Self) -> Self;
    /// The standard normal tails `(P(Z <= x), P(Z > x))`, the smaller one computed directly.
    fn normal_tails(x: Self) -> (Self, Self);
}

impl Precision for f64 {
    fn bvn_upper(h: f64, k: f64, r: f64) -> f64 {
        bvn_upper_f64(h, k, r)
    }
    const RULE: &'static [(f64, f64)] = &GL20;
    const PANELS: u32 = 4;
    const WINDOW: f64 = 9.5;
    const LOW5: bool = false;
    #[inline]
    fn node_exp(x: f64) -> f64 {
        libm::exp(x)
    }
    #[inline]
    fn node_sin(x: f64) -> f64 {
        libm::sin(x)
    }
    #[inline]
    fn node_cos(x: f64) -> f64 {
        libm::cos(x)
    }
    #[inline]
    fn normal_tails(x: f64) -> (f64, f64) {
        tails_from_smaller(x, norm_sf(x.abs()))
    }
}

impl Precision for f32 {
    fn bvn_upper(h: f32, k: f32, r: f32) -> f32 {
        bvn_upper_f32(h, k, r)
    }
    const RULE: &'static [(f64, f64)] = &GL10;
    const PANELS: u32 = 3;
    const WINDOW: f64 = 6.8;
    const LOW5: bool = true;
    #[inline]
    fn node_exp(x: f32) -> f32 {
        exp32(x)
    }
    #[inline]
    fn node_sin(x: f32) -> f32 {
        sin32(x)
    }
    #[inline]
    fn node_cos(x: f32) -> f32 {
        cos32(x)
    }
    #[inline]
    fn normal_tails(x: f32) -> (f32, f32) {
        normal_tails32(x)
    }
}

/// `(P(Z <= x), P(Z > x))` from the smaller tail `P(Z > |x|)`; NaN gives NaN.
#[inline]
pub(crate) fn tails_from_smaller<T: Real>(x: T, small: T) -> (T, T) {
    let large = T::ONE - small;
    if x < T::ZERO {
        (small, large)
    } else if x >= T::ZERO {
        (large, small)
    } else {
        (x, x)
    }
}
