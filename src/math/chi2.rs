//! The chi-square distribution with 1 to 6 degrees of freedom.

use super::root::solve_increasing;
use super::{LimitError, Real};

/// A chi-square distribution with `df` in 1..=6 degrees of freedom, validated once.
///
/// Upper tail in closed form (Abramowitz & Stegun 26.4.4 and 26.4.5):
/// even `df = 2k`: `Q(x) = e^{-x/2} sum_{r<k} (x/2)^r / r!`;
/// odd `df = 2k+1`: `Q(x) = erfc(sqrt(x/2)) + sqrt(2x/pi) e^{-x/2} sum_{r=1..k} x^{r-1} / (1 3 ... (2r-1))`.
/// Every term is positive, so `Q` keeps full relative accuracy far into the tail (a few ulp,
/// bounded by `libm`'s `exp` and `erfc`). The lower tail `P` comes from the series of the
/// regularized lower incomplete gamma function (A&S 6.5.29) where `x / 2 < df / 2 + 1`, and
/// from `1 - Q` (then at least about 0.5, so no cancellation) elsewhere.
///
/// Edge cases: `x <= 0` gives `Q = 1, P = 0`; `x = inf` gives `Q = 0, P = 1`; NaN gives NaN.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ChiSquare {
    df: u8,
}

impl ChiSquare {
    /// [`LimitError::BadDimension`] unless `1 <= df <= 6`.
    pub const fn new(df: u32) -> Result<Self, LimitError> {
        if df >= 1 && df <= 6 {
            Ok(ChiSquare { df: df as u8 })
        } else {
            Err(LimitError::BadDimension)
        }
    }

    /// Degrees of freedom.
    pub fn df(&self) -> u32 {
        u32::from(self.df)
    }

    fn half_df<T: Real>(&self) -> T {
        T::from_u32(self.df()) * T::from_f64(0.5)
    }

    /// Upper tail `Q(x) = P(X > x)`.
    pub fn upper<T: Real>(&self, x: T) -> T {
        if x.is_nan() {
            return x;
        }
        if x <= T::ZERO {
            return T::ONE;
        }
        if !x.is_finite() {
            return T::ZERO;
        }
        let half = T::from_f64(0.5);
        let e = (-(x * half)).exp();
        let df = self.df();
        if df.is_multiple_of(2) {
            let h = x * half;
            let (mut term, mut sum) = (T::ONE, T::ONE);
            for r in 1..df / 2 {
                term = term * h / T::from_u32(r);
                sum += term;
            }
            e * sum
        } else {
            let lead = (x * half).sqrt().erfc();
            let mut sum = T::ZERO;
            let mut term = T::ONE;
            for r in 1..=df / 2 {
                if r > 1 {
                    term = term * x / T::from_u32(2 * r - 1);
                }
                sum += term;
            }
            let c = T::from_f64(core::f64::consts::FRAC_2_PI.sqrt());
            lead + c * x.sqrt() * e * sum
        }
    }

    /// Lower tail `P(x) = P(X <= x)`.
    pub fn cdf<T: Real>(&self, x: T) -> T {
        if x.is_nan() {
            return x;
        }
        if x <= T::ZERO {
            return T::ZERO;
        }
        if !x.is_finite() {
            return T::ONE;
        }
        let a = self.half_df::<T>();
        let h = x * T::from_f64(0.5);
        if h < a + T::ONE {
            // A&S 6.5.29: P(a, h) = h^a e^-h / Gamma(a + 1) * sum h^n / ((a+1)...(a+n)).
            (a * h.ln() - h - (a + T::ONE).ln_gamma()).exp() * gamma_series(a, h)
        } else {
            T::ONE - self.upper(x)
        }
    }

    /// Density `x^{df/2-1} e^{-x/2} / (2^{df/2} Gamma(df/2))`: zero for `x < 0` and at
    /// infinity; at `x = 0` it is infinite for `df = 1`, `1/2` for `df = 2`, zero above.
    pub fn pdf<T: Real>(&self, x: T) -> T {
        if x.is_nan() {
            return x;
        }
        if x < T::ZERO || !x.is_finite() {
            return T::ZERO;
        }
        if x == T::ZERO {
            return match self.df {
                1 => T::from_f64(f64::INFINITY),
                2 => T::from_f64(0.5),
                _ => T::ZERO,
            };
        }
        let a = self.half_df::<T>();
        let ln2 = T::from_f64(core::f64::consts::LN_2);
        ((a - T::ONE) * x.ln() - x * T::from_f64(0.5) - a * ln2 - a.ln_gamma()).exp()
    }

    /// The point `x` with `Q(x) = alpha`: the control limit for a false-alarm rate `alpha`.
    ///
    /// `df = 2` in closed form, `-2 ln alpha`. Otherwise Newton's method on the logarithm of
    /// the smaller tail (`ln Q(x) = ln alpha` for `alpha <= 1/2`, `ln P(x) = ln(1 - alpha)`
    /// above), safeguarded by bisection (`solve_increasing` in `math::root`); relative error a few ulp of `T`
    /// (tested: 1e-12 in `f64`, 1e-5 in `f32`, against mpmath). [`LimitError::BadProbability`]
    /// unless `0 < alpha < 1`.
    pub fn quantile_upper<T: Real>(&self, alpha: T) -> Result<T, LimitError> {
        if !(alpha > T::ZERO && alpha < T::ONE) {
            return Err(LimitError::BadProbability);
        }
        let two = T::ONE + T::ONE;
        if self.df == 2 {
            return Ok(-two * alpha.ln());
        }
        let half = T::from_f64(0.5);
        if alpha <= half {
            // g(x) = ln alpha - ln Q(x): increasing; g / g' = (ln alpha - ln Q) Q / f.
            let target = alpha.ln();
            let start = -two * alpha.ln();
            solve_increasing(T::ZERO, T::from_f64(f64::INFINITY), start, |x| {
                let q = self.upper(x);
                let g = target - q.ln();
                (g, g * q / self.pdf(x))
            })
        } else {
            // g(x) = ln P(x) - ln(1 - alpha): increasing; g / g' = g P / f.
            let p = T::ONE - alpha;
            let target = p.ln();
            // Small-x start: P ~ (x/2)^a / Gamma(a + 1).
            let a = self.half_df::<T>();
            let start = two * ((target + (a + T::ONE).ln_gamma()) / a).exp();
            solve_increasing(T::ZERO, T::from_f64(f64::INFINITY), start, |x| {
                let c = self.cdf(x);
                let g = c.ln() - target;
                (g, g * c / self.pdf(x))
            })
        }
    }
}

/// `sum_{n >= 0} h^n / ((a + 1) ... (a + n))`, the series of the regularized lower incomplete
/// gamma function `P(a, h) = h^a e^-h / Gamma(a + 1) * series` (A&S 6.5.29). Converges
/// quickly for `h < a + 1`; summed until a term no longer changes the sum (at most 400).
pub(crate) fn gamma_series<T: Real>(a: T, h: T) -> T {
    let (mut term, mut sum) = (T::ONE, T::ONE);
    let mut n = T::ONE;
    for _ in 0..400 {
        term = term * h / (a + n);
        sum += term;
        if term <= sum * T::EPSILON {
            break;
        }
        n += T::ONE;
    }
    sum
}

#[cfg(test)]
mod tests {
    use super::ChiSquare;

    #[test]
    fn closed_forms_for_two_degrees() {
        // df = 2: Q(x) = exp(-x/2), quantile -2 ln alpha (exact forms, docs/REFERENCES.md).
        let c = ChiSquare::new(2).unwrap();
        assert!((c.upper(3.0f64) - (-1.5f64).exp()).abs() < 1e-16);
        assert_eq!(c.quantile_upper(0.05f64).unwrap(), -2.0 * 0.05f64.ln());
        assert!(ChiSquare::new(0).is_err() && ChiSquare::new(7).is_err());
        assert!(c.quantile_upper(0.0f64).is_err() && c.quantile_upper(1.0f32).is_err());
        assert!(c.quantile_upper(f64::NAN).is_err());
        assert_eq!(
            (c.upper(f64::NEG_INFINITY), c.cdf(f64::NEG_INFINITY)),
            (1.0, 0.0)
        );
        assert_eq!((c.upper(f64::INFINITY), c.cdf(f64::INFINITY)), (0.0, 1.0));
        assert_eq!(c.pdf(0.0f64), 0.5);
        let c3 = ChiSquare::new(3).unwrap();
        assert_eq!((c3.pdf(0.0f32), c3.pdf(f32::INFINITY)), (0.0, 0.0));
        assert!(c3.upper(f64::NAN).is_nan() && c3.cdf(f64::NAN).is_nan());
    }

    #[test]
    fn tails_add_to_one_and_quantile_inverts() {
        for df in 1..=6 {
            let c = ChiSquare::new(df).unwrap();
            for x in [0.01f64, 0.5, 1.0, 3.0, 8.0, 20.0] {
                let s = c.cdf(x) + c.upper(x);
                assert!((s - 1.0).abs() < 1e-15, "df {df} x {x}: {s}");
            }
            for alpha in [0.9999f64, 0.5, 0.1, 1e-3, 1e-9] {
                let q = c.quantile_upper(alpha).unwrap();
                let back = c.upper(q);
                assert!(
                    (back - alpha).abs() < 1e-13 * alpha,
                    "df {df} alpha {alpha}: {back}"
                );
            }
        }
    }
}
