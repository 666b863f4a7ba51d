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
