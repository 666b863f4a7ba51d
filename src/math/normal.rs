//! The standard normal distribution.

use super::{ChiSquare, LimitError, Real};

/// `1 / sqrt(2)`.
const FRAC_1_SQRT_2: f64 = core::f64::consts::FRAC_1_SQRT_2;

/// Standard normal CDF `Phi(x) = erfc(-x / sqrt 2) / 2` (A&S 7.1.22 relation; `libm::erfc`,
/// a few ulp). Computed from `erfc`, so the lower tail keeps its relative accuracy far out
/// (`Phi(-30)` is about 5e-198, not 0). `Phi(-inf) = 0`, `Phi(inf) = 1`, NaN gives NaN.
#[inline]
pub fn norm_cdf<T: Real>(x: T) -> T {
    (-x * T::from_f64(FRAC_1_SQRT_2)).erfc() * T::from_f64(0.5)
}

/// Standard normal upper tail `1 - Phi(x) = Phi(-x)`, computed directly.
#[inline]
pub fn norm_sf<T: Real>(x: T) -> T {
    norm_cdf(-x)
}

/// Standard normal density `exp(-x^2 / 2) / sqrt(2 pi)`.
#[inline]
pub fn norm_pdf<T: Real>(x: T) -> T {
    let c = T::from_f64(0.398_942_280_401_432_7); // 1 / sqrt(2 pi)
    c * (-(x * x) * T::from_f64(0.5)).exp()
}

/// The `z` with `P(Z > z) = alpha` (upper quantile), for `0 < alpha < 1`.
///
/// Method: `z^2` is the chi-square quantile with one degree of freedom at `2 alpha` (for
/// `alpha <= 1/2`; the sign follows the tail), so the safeguarded Newton iteration of
/// [`ChiSquare::quantile_upper`] gives `z` to a few ulp without a separate rational
/// approximation. [`LimitError::BadProbability`] outside (0, 1).
pub fn norm_quantile_upper<T: Real>(alpha: T) -> Result<T, LimitError> {
    if !(alpha > T::ZERO && alpha < T::ONE) {
        return Err(LimitError::BadProbability);
    }
    let half = T::from_f64(0.5);
    let chi1 = ChiSquare::new(1)?;
    if alpha == half {
        Ok(T::ZERO)
    } else if alpha < half {
        Ok(chi1.quantile_upper(alpha + alpha)?.sqrt())
    } else {
        let beta = T::ONE - alpha;
        Ok(-chi1.quantile_upper(beta + beta)?.sqrt())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn known_values() {
        // z with Phi(z) = 0.975: 1.959963984540054 (common practice; mpmath 1.3.0 at 30 digits
        // gives 1.95996398454005423552 for the decimal 0.975).
        assert_eq!(norm_cdf(0.0f64), 0.5);
        assert!((norm_cdf(1.959963984540054f64) - 0.975).abs() < 1e-15);
        assert!(norm_cdf(-30.0f64) > 0.0);
        assert!((norm_quantile_upper(0.025f64).unwrap() - 1.959963984540054).abs() < 1e-14);
        assert!((norm_quantile_upper(0.975f64).unwrap() + 1.959963984540054).abs() < 1e-13);
        assert_eq!(norm_quantile_upper(0.5f64).unwrap(), 0.0);
        assert!(norm_quantile_upper(0.0f32).is_err());
    }
}
