//! The scalar trait that lets one implementation serve `f32` and `f64`.
//!
//! Every method maps to `core` arithmetic or to the `libm` function of the same name (the
//! musl-derived implementations, correctly rounded or within 1 ulp for `sqrt`, `atan2`,
//! `hypot`). NaN and infinity propagate exactly as in `libm`.

use core::fmt::{Debug, Display};
use core::ops::{Add, AddAssign, Div, DivAssign, Mul, MulAssign, Neg, Sub, SubAssign};

/// A floating-point scalar: `f32` (single precision, the hot path on an FPU core) or `f64`
/// (freeze and report time, host reference).
pub trait Real:
    Copy
    + Debug
    + Display
    + Default
    + PartialEq
    + PartialOrd
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
    + AddAssign
    + SubAssign
    + MulAssign
    + DivAssign
    + 'static
{
    /// Additive identity.
    const ZERO: Self;
    /// Multiplicative identity.
    const ONE: Self;
    /// Machine epsilon (distance from 1 to the next larger value).
    const EPSILON: Self;
    /// `true` when this target does arithmetic of this type in hardware (`false` for both
    /// types on an Arm core without FPU, and for `f64` on an Arm core with a single-precision
    /// FPU). Hot paths pick between float and bit-level tests with it.
    const NATIVE: bool;
    /// One more than the largest binary exponent of a finite value (128 for `f32`, 1024 for
    /// `f64`): every finite value is below `2^MAX_EXP`.
    const MAX_EXP: i32;

    /// Nearest value of this type to `x` (round to nearest even; `f64` is the identity).
    fn from_f64(x: f64) -> Self;
    /// Exact widening to `f64`.
    fn to_f64(self) -> f64;
    /// Nearest value of this type to the count `n` (exact up to 2^24 for `f32`, always for `f64`).
    fn from_u32(n: u32) -> Self;
    /// `true` unless NaN or infinite.
    fn is_finite(self) -> bool;
    /// `true` for NaN.
    fn is_nan(self) -> bool;
    /// `true` when `|self| < 2^k` (false for NaN and infinities), for `0 < k <= MAX_EXP`. A
    /// test of the exponent bits: as cheap without an FPU as with one.
    fn below_pow2(self, k: i32) -> bool;
    /// Absolute value.
    fn abs(self) -> Self;
    /// Square root (`libm`); NaN for negative input.
    fn sqrt(self) -> Self;
    /// Four-quadrant arctangent of `self / x` (`libm::atan2`), in (-pi, pi].
    fn atan2(self, x: Self) -> Self;
    /// `sqrt(self^2 + y^2)` without undue overflow (`libm::hypot`).
    fn hypot(self, y: Self) -> Self;
    /// Larger of two values; a NaN operand gives the other (IEEE 754 maxNum).
    fn max(self, other: Self) -> Self;
    /// Smaller of two values; a NaN operand gives the other (IEEE 754 minNum).
    fn min(self, other: Self) -> Self;
    /// `e^self` (`libm::exp`).
    fn exp(self) -> Self;
    /// Natural logarithm (`libm::log`); NaN below zero, -inf at zero.
    fn ln(self) -> Self;
    /// `ln(1 + self)`, accurate near zero (`libm::log1p`).
    fn ln_1p(self) -> Self;
    /// Complementary error function (`libm::erfc`), accurate in the far tail.
    fn erfc(self) -> Self;
    /// `ln |Gamma(self)|` (`libm::lgamma`).
    fn ln_gamma(self) -> Self;
    /// Largest integer not above `self` (`libm::floor`).
    fn floor(self) -> Self;
    /// Sine (`libm::sin`).
    fn sin(self) -> Self;
    /// Cosine (`libm::cos`).
    fn cos(self) -> Self;
    /// Arcsine (`libm::asin`), NaN outside [-1, 1].
    fn asin(self) -> Self;
}

macro_rules! impl_real {
    ($t:ty, $bits:ty, $native:expr, $sqrt:path, $atan2:path, $hypot:path, $fmax:path, $fmin:path, $fabs:path,
     $exp:path, $ln:path, $ln1p:path, $erfc:path, $lgamma:path, $floor:path,
     $sin:path, $cos:path, $asin:path) => {
        impl Real for $t {
            const ZERO: Self = 0.0;
            const ONE: Self = 1.0;
            const EPSILON: Self = <$t>::EPSILON;
            const NATIVE: bool = $native;
            const MAX_EXP: i32 = <$t>::MAX_EXP;

            #[inline]
            fn from_f64(x: f64) -> Self {
                x as $t
            }
            #[inline]
            fn to_f64(self) -> f64 {
                self as f64
            }
            #[inline]
            fn from_u32(n: u32) -> Self {
                n as $t
            }
            #[inline]
            fn is_finite(self) -> bool {
                <$t>::is_finite(self)
            }
            #[inline]
            fn is_nan(self) -> bool {
                <$t>::is_nan(self)
            }
            #[inline]
            fn below_pow2(self, k: i32) -> bool {
                // Sign bit cleared, the bits of a non-negative float order like the values,
                // with infinity and NaN above every finite value; 2^k has the biased exponent
                // MAX_EXP - 1 + k and a zero fraction.
                let magnitude = self.to_bits() << 1 >> 1;
                let biased = (<$t>::MAX_EXP - 1 + k) as u32;
                let fraction_bits = <$t>::MANTISSA_DIGITS - 1;
                magnitude < <$bits>::from(biased) << fraction_bits
            }
            #[inline]
            fn abs(self) -> Self {
                $fabs(self)
            }
            #[inline]
            fn sqrt(self) -> Self {
                $sqrt(self)
            }
            #[inline]
            fn atan2(self, x: Self) -> Self {
                $atan2(self, x)
            }
            #[inline]
            fn hypot(self, y: Self) -> Self {
                $hypot(self, y)
            }
            #[inline]
            fn max(self, other: Self) -> Self {
                $fmax(self, other)
            }
            #[inline]
            fn min(self, other: Self) -> Self {
                $fmin(self, other)
            }
            #[inline]
            fn exp(self) -> Self {
                $exp(self)
            }
            #[inline]
            fn ln(self) -> Self {
                $ln(self)
            }
            #[inline]
            fn ln_1p(self) -> Self {
                $ln1p(self)
            }
            #[inline]
            fn erfc(self) -> Self {
                $erfc(self)
            }
            #[inline]
            fn ln_gamma(self) -> Self {
                $lgamma(self)
            }
            #[inline]
            fn floor(self) -> Self {
                $floor(self)
            }
            #[inline]
            fn sin(self) -> Self {
                $sin(self)
            }
            #[inline]
            fn cos(self) -> Self {
                $cos(self)
            }
            #[inline]
            fn asin(self) -> Self {
                $asin(self)
            }
        }
    };
}

impl_real!(
    f32,
    u32,
    !cfg!(all(target_arch = "arm", not(target_abi = "eabihf"))),
    libm::sqrtf,
    libm::atan2f,
    libm::hypotf,
    libm::fmaxf,
    libm::fminf,
    libm::fabsf,
    libm::expf,
    libm::logf,
    libm::log1pf,
    libm::erfcf,
    libm::lgammaf,
    libm::floorf,
    libm::sinf,
    libm::cosf,
    libm::asinf
);
impl_real!(
    f64,
    u64,
    !cfg!(target_arch = "arm"),
    libm::sqrt,
    libm::atan2,
    libm::hypot,
    libm::fmax,
    libm::fmin,
    libm::fabs,
    libm::exp,
    libm::log,
    libm::log1p,
    libm::erfc,
    libm::lgamma,
    libm::floor,
    libm::sin,
    libm::cos,
    libm::asin
);

#[cfg(test)]
mod tests {
    use super::Real;

    #[test]
    fn conversions_round_trip() {
        assert_eq!(<f32 as Real>::from_f64(0.5).to_f64(), 0.5);
        assert_eq!(<f64 as Real>::from_u32(u32::MAX), 4294967295.0);
        assert!(!<f32 as Real>::is_finite(f32::NAN));
        assert_eq!(Real::max(f64::NAN, 1.0), 1.0);
    }
}
