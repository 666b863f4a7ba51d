//! The one comparison helper every test uses: absolute and relative tolerance, NaN aware.

/// A two-sided tolerance: `|a - e| <= abs + rel * |e|`.
#[derive(Clone, Copy, Debug)]
pub struct Tol {
    /// Absolute part.
    pub abs: f64,
    /// Relative part (times the size of the expected value).
    pub rel: f64,
}

impl Tol {
    /// Relative tolerance only.
    pub const fn rel(rel: f64) -> Self {
        Tol { abs: 0.0, rel }
    }
    /// Absolute tolerance only.
    pub const fn abs(abs: f64) -> Self {
        Tol { abs, rel: 0.0 }
    }
    /// Both parts.
    pub const fn new(abs: f64, rel: f64) -> Self {
        Tol { abs, rel }
    }

    /// `true` when `actual` is within tolerance of `expected`. Two NaNs agree; a NaN against a
    /// number does not; two infinities of the same sign agree.
    pub fn accepts(&self, actual: f64, expected: f64) -> bool {
        if actual.is_nan() || expected.is_nan() {
            return actual.is_nan() && expected.is_nan();
        }
        if actual == expected {
            return true;
        }
        (actual - expected).abs() <= self.abs + self.rel * expected.abs()
    }

    /// `Ok` or a message naming the quantity, both values and the tolerance.
    pub fn check(&self, what: &str, actual: f64, expected: f64) -> Result<(), String> {
        if self.accepts(actual, expected) {
            Ok(())
        } else {
            Err(format!(
                "{what}: got {actual:e}, expected {expected:e} (diff {:e}, tol abs {:e} rel {:e})",
                actual - expected,
                self.abs,
                self.rel
            ))
        }
    }

    /// Element-wise [`check`](Self::check) of two slices of equal length.
    pub fn check_all(&self, what: &str, actual: &[f64], expected: &[f64]) -> Result<(), String> {
        if actual.len() != expected.len() {
            return Err(format!(
                "{what}: length {} vs {}",
                actual.len(),
                expected.len()
            ));
        }
        for (k, (a, e)) in actual.iter().zip(expected).enumerate() {
            self.check(&format!("{what}[{k}]"), *a, *e)?;
        }
        Ok(())
    }
}

/// Panics with the message of [`Tol::check`] when it fails.
#[track_caller]
pub fn assert_close(what: &str, actual: f64, expected: f64, tol: Tol) {
    if let Err(msg) = tol.check(what, actual, expected) {
        panic!("{msg}");
    }
}

/// Correct digits: `-log10(|computed - certified| / |certified|)`, capped at 16 when equal
/// (the usual LRE of the NIST StRD reports).
pub fn lre(computed: f64, certified: f64) -> f64 {
    if computed == certified {
        return 16.0;
    }
    if !computed.is_finite() {
        return 0.0;
    }
    let rel = (computed - certified).abs() / certified.abs();
    let digits = -rel.log10();
    if digits > 0.0 {
        digits.min(16.0)
    } else {
        0.0
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tolerance_rules() {
        assert!(Tol::rel(1e-3).accepts(1.0005, 1.0));
        assert!(!Tol::rel(1e-4).accepts(1.0005, 1.0));
        assert!(Tol::abs(0.1).accepts(0.05, 0.0));
        assert!(Tol::abs(1.0).accepts(f64::NAN, f64::NAN));
        assert!(!Tol::abs(1.0).accepts(f64::NAN, 0.0));
        assert!(!Tol::abs(1.0).accepts(0.0, f64::NAN));
        assert!(Tol::abs(0.0).accepts(f64::INFINITY, f64::INFINITY));
        assert!(!Tol::abs(1e300).accepts(f64::INFINITY, 1.0));
        assert_eq!(lre(1.0, 1.0), 16.0);
        assert!((lre(1.001, 1.0) - 3.0).abs() < 1e-9);
    }
}
