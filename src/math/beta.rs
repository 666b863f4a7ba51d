//! The beta and F distributions, for the exact small-baseline control limits.

use super::root::solve_increasing;
use super::{LimitError, Real};

/// `ln B(a, b) = ln Gamma(a) + ln Gamma(b) - ln Gamma(a + b)` (`libm::lgamma`).
fn ln_beta<T: Real>(a: T, b: T) -> T {
    a.ln_gamma() + b.ln_gamma() - (a + b).ln_gamma()
}

/// The continued fraction of `I_x(a, b)` (DLMF 8.17.22), by the modified Lentz method
/// (Thompson & Barnett 1986). Converges fast for `x < (a + 1) / (a + b + 2)`, the only place it
/// is called: about `sqrt(max(a, b))` terms. It stops after 2000 terms, enough for shapes up
/// to about 10^6 (the limits test goes to m = 500).
fn continued_fraction<T: Real>(a: T, b: T, x: T) -> T {
    let one = T::ONE;
    let tiny = T::from_f64(1e-30);
    let guard = |v: T| if v.abs() < tiny { tiny } else { v };
    let (qab, qap, qam) = (a + b, a + one, a - one);
    let mut c = one;
    let mut d = one / guard(one - qab * x / qap);
    let mut h = d;
    let mut m = one;
    for _ in 0..2000 {
        let m2 = m + m;
        let aa = m * (b - m) * x / ((qam + m2) * (a + m2));
        d = one / guard(one + aa * d);
        c = guard(one + aa / c);
        h *= d * c;
        let aa = -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2));
        d = one / guard(one + aa * d);
        c = guard(one + aa / c);
        let del = d * c;
        h *= del;
        if (del - one).abs() <= T::EPSILON {
            break;
        }
        m += one;
    }
    h
}

/// A beta distribution `Beta(a, b)`, `a, b > 0`, validated once.
///
/// The regularized incomplete beta function `I_x(a, b)` is evaluated by the continued fraction
/// DLMF 8.17.22 (modified Lentz), on `x` directly when `x < (a + 1) / (a + b + 2)` and through
/// `I_x(a, b) = 1 - I_{1-x}(b, a)` otherwise; the tail that is computed directly is always the
/// smaller one, so both tails keep their relative accuracy. Error: about `1e-13` relative in
/// `f64` for `a, b < 1000`, dominated by `ln B(a, b)` from `lgamma`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Beta<T> {
    a: T,
    b: T,
}

impl<T: Real> Beta<T> {
    /// [`LimitError::BadParameter`] unless both shapes are positive and finite.
    pub fn new(a: T, b: T) -> Result<Self, LimitError> {
        let ok = |v: T| v.is_finite() && v > T::ZERO;
        if ok(a) && ok(b) {
            Ok(Beta { a, b })
        } else {
            Err(LimitError::BadParameter)
        }
    }

    /// `(P(X <= x), P(X > x))`, each computed directly where it is the smaller one. `x <= 0`
    /// gives `(0, 1)`, `x >= 1` gives `(1, 0)`, NaN gives NaN in both.
    pub fn tails(&self, x: T) -> (T, T) {
        let (a, b) = (self.a, self.b);
        if x.is_nan() {
            return (x, x);
        }
        if x <= T::ZERO {
            return (T::ZERO, T::ONE);
        }
        if x >= T::ONE {
            return (T::ONE, T::ZERO);
        }
        let y = T::ONE - x;
        let ln_front = a * x.ln() + b * (-x).ln_1p() - ln_beta(a, b);
        let two = T::ONE + T::ONE;
        if x < (a + T::ONE) / (a + b + two) {
            let lower = ln_front.exp() * continued_fraction(a, b, x) / a;
            (lower, T::ONE - lower)
        } else {
            let upper = ln_front.exp() * continued_fraction(b, a, y) / b;
            (T::ONE - upper, upper)
        }
    }

    /// Density `x^{a-1} (1-x)^{b-1} / B(a, b)` on (0, 1), zero outside.
    pub fn pdf(&self, x: T) -> T {
        if !(x > T::ZERO && x < T::ONE) {
            return T::ZERO;
        }
        let (a, b) = (self.a, self.b);
        ((a - T::ONE) * x.ln() + (b - T::ONE) * (-x).ln_1p() - ln_beta(a, b)).exp()
    }

    /// `(x, 1 - x)` with `P(X > x) = alpha`, both parts accurate: the iteration runs on
    /// whichever of `x` and `1 - x` lies on the side of the smaller tail, by Newton's method on
    /// the logarithm of that tail with bisection safeguard. [`LimitError::BadProbability`]
    /// unless `0 < alpha < 1`.
    pub fn quantile_upper(&self, alpha: T) -> Result<(T, T), LimitError> {
        if !(alpha > T::ZERO && alpha < T::ONE) {
            return Err(LimitError::BadProbability);
        }
        let half = T::from_f64(0.5);
        let one = T::ONE;
        let mean = self.a / (self.a + self.b);
        if alpha <= half {
            // Solve in y = 1 - x on the upper side: P(X > 1 - y) = P(Y < y), Y ~ Beta(b, a),
            // increasing in y; g(y) = ln P(Y < y) - ln alpha.
            let mirror = Beta {
                a: self.b,
                b: self.a,
            };
            let target = alpha.ln();
            let y = solve_increasing(T::ZERO, one, (one - mean) * half, |y| {
                let lower = mirror.tails(y).0;
                let g = lower.ln() - target;
                (g, g * lower / mirror.pdf(y))
            })?;
            Ok((one - y, y))
        } else {
            // P(X <= x) = 1 - alpha, the smaller tail: g(x) = ln P(X <= x) - ln(1 - alpha).
            let target = (one - alpha).ln();
            let x = solve_increasing(T::ZERO, one, mean * half, |x| {
                let lower = self.tails(x).0;
                let g = lower.ln() - target;
                (g, g * lower / self.pdf(x))
            })?;
            Ok((x, one - x))
        }
    }
}

/// The F distribution with `d1` and `d2` degrees of freedom, through its beta form:
/// `X = d1 F / (d1 F + d2) ~ Beta(d1 / 2, d2 / 2)` (A&S 26.6.2).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FDist<T> {
    d1: T,
    d2: T,
    beta: Beta<T>,
}

impl<T: Real> FDist<T> {
    /// [`LimitError::BadParameter`] unless both degrees of freedom are positive and finite.
    pub fn new(d1: T, d2: T) -> Result<Self, LimitError> {
        let half = T::from_f64(0.5);
        Ok(FDist {
            d1,
            d2,
            beta: Beta::new(d1 * half, d2 * half)?,
        })
    }

    /// Upper tail `P(F > f)`; `f <= 0` gives 1.
    pub fn upper(&self, f: T) -> T {
        if f.is_nan() {
            return f;
        }
        if f <= T::ZERO {
            return T::ONE;
        }
        if !f.is_finite() {
            return T::ZERO;
        }
        // x = d1 f / (d1 f + d2) and 1 - x = d2 / (d1 f + d2), both without cancellation.
        let den = self.d1 * f + self.d2;
        let (x, y) = (self.d1 * f / den, self.d2 / den);
        if x <= T::from_f64(0.5) {
            self.beta.tails(x).1
        } else {
            Beta {
                a: self.beta.b,
                b: self.beta.a,
            }
            .tails(y)
            .0
        }
    }

    /// The point `f` with `P(F > f) = alpha`: `f = d2 x / (d1 (1 - x))` from the beta quantile.
    pub fn quantile_upper(&self, alpha: T) -> Result<T, LimitError> {
        let (x, y) = self.beta.quantile_upper(alpha)?;
        Ok(self.d2 * x / (self.d1 * y))
    }
}

/// Phase II upper control limit of Hotelling's T^2 for one new individual observation, with
/// mean and covariance estimated from a baseline of `m` individual observations in `p`
/// dimensions (NIST/SEMATECH e-Handbook 6.5.4.3):
/// `UCL = p (m + 1)(m - 1) / (m^2 - m p) * F(1 - alpha; p, m - p)`.
///
/// Errors: [`LimitError::BadDimension`] (p outside 1..=6), [`LimitError::BaselineTooSmall`]
/// (m <= p), [`LimitError::BadProbability`]. Cost: one F quantile, a few hundred `T`
/// operations times the iteration count; meant for the host or for freeze time on a device.
pub fn phase2_limit<T: Real>(p: u32, m: u32, alpha: T) -> Result<T, LimitError> {
    subgroup_limit(p, m, 1, alpha)
}

/// Phase II limit of `T^2 = n (xbar - mean)' S^-1 (xbar - mean)` for the mean `xbar` of a
/// subgroup of `n` new observations, with mean and covariance `S` estimated from `m`
/// individual observations: `UCL = p (m + n)(m - 1) / (m (m - p)) * F(1 - alpha; p, m - p)`.
///
/// Derivation (standard Hotelling argument): `xbar - mean` has covariance `(1/n + 1/m) Sigma`
/// and is independent of `S`, so `(nm / (n + m)) (xbar - mean)' S^-1 (xbar - mean)` is
/// `p (m - 1) / (m - p) F(p, m - p)`. With `n = 1` this is [`phase2_limit`] (NIST 6.5.4.3).
/// Errors as [`phase2_limit`]; `n = 0` is [`LimitError::BadParameter`].
pub fn subgroup_limit<T: Real>(p: u32, m: u32, n: u32, alpha: T) -> Result<T, LimitError> {
    if !(1..=6).contains(&p) {
        return Err(LimitError::BadDimension);
    }
    if m <= p {
        return Err(LimitError::BaselineTooSmall);
    }
    if n == 0 {
        return Err(LimitError::BadParameter);
    }
    let (pt, mt, nt) = (T::from_u32(p), T::from_u32(m), T::from_u32(n));
    let f = FDist::new(pt, mt - pt)?.quantile_upper(alpha)?;
    Ok(pt * (mt + nt) * (mt - T::ONE) / (mt * (mt - pt)) * f)
}

/// The matching tail probability of a Phase II T^2 value `t2`: `P(F(p, m - p) > t2 / c)` with
/// `c = p (m + 1)(m - 1) / (m^2 - m p)`. Same errors as [`phase2_limit`].
pub fn phase2_tail<T: Real>(p: u32, m: u32, t2: T) -> Result<T, LimitError> {
    if !(1..=6).contains(&p) {
        return Err(LimitError::BadDimension);
    }
    if m <= p {
        return Err(LimitError::BaselineTooSmall);
    }
    let (pt, mt) = (T::from_u32(p), T::from_u32(m));
    let c = pt * (mt + T::ONE) * (mt - T::ONE) / (mt * (mt - pt));
    Ok(FDist::new(pt, mt - pt)?.upper(t2 / c))
}

/// Phase I upper control limit for screening the `m` individual observations of a baseline
/// against their own mean and covariance (Tracy, Young & Mason 1992, J. Quality Technology
/// 24(2)): `UCL = (m - 1)^2 / m * Beta(1 - alpha; p / 2, (m - p - 1) / 2)`. The formula is
/// quoted from memory in the project's references; the host Monte Carlo test
/// `small_baseline_needs_the_exact_limits` confirms that it holds its false-alarm rate.
///
/// Errors: [`LimitError::BadDimension`], [`LimitError::BaselineTooSmall`] (m <= p + 1),
/// [`LimitError::BadProbability`]. Same cost note as [`phase2_limit`].
pub fn phase1_limit<T: Real>(p: u32, m: u32, alpha: T) -> Result<T, LimitError> {
    if !(1..=6).contains(&p) {
        return Err(LimitError::BadDimension);
    }
    if m <= p + 1 {
        return Err(LimitError::BaselineTooSmall);
    }
    let (pt, mt) = (T::from_u32(p), T::from_u32(m));
    let half = T::from_f64(0.5);
    let (x, _) = Beta::new(pt * half, (mt - pt - T::ONE) * half)?.quantile_upper(alpha)?;
    Ok((mt - T::ONE) * (mt - T::ONE) / mt * x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn beta_one_one_is_uniform() {
        let b = Beta::new(1.0f64, 1.0).unwrap();
        let (lo, hi) = b.tails(0.3);
        assert!((lo - 0.3).abs() < 1e-15 && (hi - 0.7).abs() < 1e-15);
        let (x, y) = b.quantile_upper(0.25).unwrap();
        assert!((x - 0.75).abs() < 1e-15 && (y - 0.25).abs() < 1e-15);
        assert!(Beta::new(0.0f64, 1.0).is_err());
    }

    #[test]
    fn f_with_two_and_two_degrees() {
        // F(2, 2): P(F > f) = 1 / (1 + f) (by hand from the beta form with a = b = 1).
        let f = FDist::new(2.0f64, 2.0).unwrap();
        assert!((f.upper(3.0) - 0.25).abs() < 1e-15);
        assert!((f.quantile_upper(0.2).unwrap() - 4.0).abs() < 1e-12);
    }

    #[test]
    fn limit_domain_errors() {
        assert_eq!(
            phase2_limit(2, 2, 0.01f64),
            Err(LimitError::BaselineTooSmall)
        );
        assert_eq!(
            phase1_limit(2, 3, 0.01f64),
            Err(LimitError::BaselineTooSmall)
        );
        assert_eq!(phase2_limit(7, 30, 0.01f64), Err(LimitError::BadDimension));
        assert_eq!(phase2_limit(2, 30, 1.5f64), Err(LimitError::BadProbability));
        // The Phase II limit tends to the chi-square one as m grows (common practice).
        // (m = 10^6: the F(2, m - 2) quantile exceeds the chi-square one by about 2e-4.)
        let big = phase2_limit(2, 1_000_000, 0.01f64).unwrap();
        assert!((big - (-2.0 * 0.01f64.ln())).abs() < 1e-4, "{big}");
        let t = phase2_tail(2, 20, phase2_limit(2, 20, 0.01f64).unwrap()).unwrap();
        assert!((t - 0.01).abs() < 1e-13, "{t}");
    }
}
