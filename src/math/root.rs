//! A safeguarded Newton iteration for monotone tail equations, shared by every quantile.

use super::{LimitError, Real};

/// Solves `g(x) = 0` on `(lo, hi)` (`hi` may be infinite) for a `g` that is increasing in `x`,
/// given `step(x) = (g(x), g(x) / g'(x))`.
///
/// Method: Newton's iteration kept inside a bracket that shrinks on every evaluation; a step
/// that would leave the bracket is replaced by bisection (geometric when `lo > 0`, doubling
/// while `hi` is infinite), so convergence is guaranteed for a continuous monotone `g` and
/// quadratic near the root. Stops when a step is below `4 EPSILON |x|`; at most 200
/// evaluations, else [`LimitError::NoConvergence`].
pub(crate) fn solve_increasing<T: Real>(
    mut lo: T,
    mut hi: T,
    start: T,
    step: impl Fn(T) -> (T, T),
) -> Result<T, LimitError> {
    let two = T::ONE + T::ONE;
    let tol = T::EPSILON * two * two;
    let mut x = start;
    for _ in 0..200 {
        let (g, newton) = step(x);
        if !g.is_finite() {
            // Outside the representable part of the tail: pull towards the bracket middle.
            if g > T::ZERO {
                hi = x;
            } else {
                lo = x;
            }
            x = bisect(lo, hi, two);
            continue;
        }
        if g == T::ZERO {
            return Ok(x);
        }
        if g > T::ZERO {
            hi = hi.min(x);
        } else {
            lo = lo.max(x);
        }
        let next = x - newton;
        let inside = next.is_finite() && next > lo && next < hi;
        let next = if inside { next } else { bisect(lo, hi, two) };
        if (next - x).abs() <= tol * x.abs() {
            return Ok(next);
        }
        if !(hi - lo > tol * hi.abs()) && hi.is_finite() {
            return Ok(next);
        }
        x = next;
    }
    Err(LimitError::NoConvergence)
}

fn bisect<T: Real>(lo: T, hi: T, two: T) -> T {
    if !hi.is_finite() {
        if lo > T::ZERO {
            lo * two
        } else {
            T::ONE
        }
    } else if lo > T::ZERO && hi > T::ZERO && hi > lo * (two * two) {
        (lo * hi).sqrt()
    } else {
        (lo + hi) / two
    }
}

/// Root of a continuous `f` on `[lo, hi]` where `f(lo)` and `f(hi)` differ in sign, by the
/// Illinois variant of regula falsi (Dowell & Jarratt 1971): superlinear, never leaves the
/// bracket. Stops when the bracket is below `4 EPSILON` of its size or after 200 steps
/// ([`LimitError::NoConvergence`]); [`LimitError::BadParameter`] if the signs do not differ.
pub fn solve_bracketed<T: Real>(mut lo: T, mut hi: T, f: impl Fn(T) -> T) -> Result<T, LimitError> {
    let two = T::ONE + T::ONE;
    let (mut flo, mut fhi) = (f(lo), f(hi));
    if flo == T::ZERO {
        return Ok(lo);
    }
    if fhi == T::ZERO {
        return Ok(hi);
    }
    if (flo < T::ZERO) == (fhi < T::ZERO) || flo.is_nan() || fhi.is_nan() {
        return Err(LimitError::BadParameter);
    }
    let mut side = 0i8;
    for _ in 0..200 {
        let x = (lo * fhi - hi * flo) / (fhi - flo);
        let x = if x > lo && x < hi { x } else { (lo + hi) / two };
        let fx = f(x);
        if fx == T::ZERO || (hi - lo).abs() <= T::EPSILON * two * two * hi.abs().max(lo.abs()) {
            return Ok(x);
        }
        if (fx < T::ZERO) == (flo < T::ZERO) {
            lo = x;
            flo = fx;
            if side == -1 {
                fhi /= two;
            }
            side = -1;
        } else {
            hi = x;
            fhi = fx;
            if side == 1 {
                flo /= two;
            }
            side = 1;
        }
    }
    Err(LimitError::NoConvergence)
}
