//! The integer-only gate: integer multiply-adds and one compare per sample.

use crate::gaussian::FreezeError;
use crate::moments::{pairs, Shape};

use super::Gate;

/// A Mahalanobis gate for integer samples (ADC counts, encoder ticks, micrometres) whose
/// per-sample test uses only integer multiply-adds and one compare: no float, no division.
///
/// Built once from an `f64` [`Gate`] whose baseline is in the same integer units. With the
/// integer pivot `p = round(mean)`, `f = mean - p` and `u = x - p`, the gate's test
/// `(u - f)' P (u - f) <= h` (`P` the inverse covariance) is rewritten as
/// `u' P u - 2 (P f)' u <= h - f' P f`, multiplied by `K = 2^k` and rounded:
/// `sum a_ij u_i u_j + sum d_i u_i <= t` in `i64`. Before the quadratic form, each `|u_i|` is
/// compared with the reach `U_i = ceil(sqrt(h C_ii) + 1/2) + 1`: beyond it the sample lies
/// outside the gate's bounding box and is refused without further arithmetic. `K` is the
/// largest power of two that keeps every partial sum below 2^62 for samples within reach, so
/// no product can overflow.
///
/// Agreement with the `f64` gate: the verdicts are identical for every sample whose exact
/// `d^2` differs from the limit by more than [`band`](Self::band) =
/// `(E + 1) / K + 8 N EPSILON h / rcond`, where `E = (sum_{i<=j} U_i U_j + sum U_i) / 2` bounds
/// the rounding of the coefficients, `1` the rounding of `t`, and the last term the `f64`
/// gate's own error. For a 12-bit ADC baseline the band is about 2e-14 of the limit (the host
/// test `int_gate_agreement_on_a_dense_grid` prints it).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IntGate<const N: usize, const L: usize> {
    pivot: [i32; N],
    reach: [i64; N],
    quad: [i64; L],
    lin: [i64; N],
    threshold: i64,
    band: f64,
    coarse: Coarse<N, L>,
}

/// The same quadratic form with coefficients scaled to fit `i32` arithmetic, used as a filter
/// in front of the exact `i64` test: a core without a 64-bit multiply (Cortex-M0) decides
/// almost every sample with a few 32-bit multiplies. The filter answers only when its value
/// `c` is so far from the limit that the exact test must agree (`c <= inside` passes,
/// `c > outside` fails); in between, and for samples beyond `reach`, the exact test decides.
/// So the verdict is always the exact test's; only the cost changes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
struct Coarse<const N: usize, const L: usize> {
    reach: [u32; N],
    quad: [i32; L],
    lin: [i32; N],
    inside: i32,
    outside: i32,
}

impl<const N: usize, const L: usize> Coarse<N, L> {
    /// A filter that never answers (every sample goes to the exact test): zero coefficients
    /// and margins no value can pass, and a reach no offset exceeds.
    const OFF: Self = Coarse {
        reach: [u32::MAX; N],
        quad: [0; L],
        lin: [0; N],
        inside: i32::MIN,
        outside: i32::MAX,
    };

    /// Scale `K` = the largest power of two with `K size + err <= 2^30`, so every partial sum
    /// of the rounded form stays below 2^30 for samples within reach. With `Q` the exact form
    /// and `E = err`, `|c - K Q| <= E`, and the exact test's own rounding is below `E + 1` at
    /// its (larger) scale; hence `c <= K rest - 2E - 1` implies a pass and `c > K rest + 2E`
    /// a failure.
    fn new(
        reach: &[f64; N],
        quad: &[f64; L],
        lin: &[f64; N],
        rest: f64,
        size: f64,
        err: f64,
    ) -> Self {
        const ROOM: f64 = 1_073_741_824.0; // 2^30
        let fits = reach.iter().all(|&u| u * u <= ROOM) && 4.0 * err + 4.0 < ROOM;
        if !(fits && size > 0.0 && size.is_finite()) {
            return Self::OFF;
        }
        let mut k = libm::floor(libm::log2((ROOM - err) / size)) as i32;
        while libm::scalbn(size, k) + err > ROOM {
            k -= 1;
        }
        let scale = libm::scalbn(1.0, k);
        let round = |v: f64| libm::round(v * scale) as i32;
        let mut out = Self::OFF;
        for (o, &u) in out.reach.iter_mut().zip(reach.iter()) {
            *o = u as u32;
        }
        for (o, &v) in out.quad.iter_mut().zip(quad.iter()) {
            *o = round(v);
        }
        for (o, &v) in out.lin.iter_mut().zip(lin.iter()) {
            *o = round(v);
        }
        let centre = rest * scale;
        out.inside = (libm::floor(centre - 2.0 * err - 1.0) - 1.0) as i32;
        out.outside = (libm::ceil(centre + 2.0 * err) + 1.0) as i32;
        out
    }

    /// `Some(verdict)` when the filter is sure, `None` when the exact test must decide. The
    /// reach is the exact test's own, so a sample beyond it is refused here as there.
    #[inline(always)]
    fn decide(&self, x: &[i32; N], pivot: &[i32; N]) -> Option<bool> {
        let mut u = [0i32; N];
        for i in 0..N {
            // Beyond the reach (or beyond i32, far beyond it) the exact test refuses too.
            match x[i].checked_sub(pivot[i]) {
                Some(d) if d.unsigned_abs() <= self.reach[i] => u[i] = d,
                _ => return Some(false),
            }
        }
        // Within reach every product and partial sum is below 2^30 in size (see `new`).
        let mut c = 0i32;
        for ((i, j), &a) in pairs::<N>().zip(self.quad.iter()) {
            c = c.wrapping_add(a.wrapping_mul(u[i].wrapping_mul(u[j])));
        }
        for (&d, &ui) in self.lin.iter().zip(u.iter()) {
            c = c.wrapping_add(d.wrapping_mul(ui));
        }
        if c <= self.inside {
            Some(true)
        } else if c > self.outside {
            Some(false)
        } else {
            None
        }
    }
}

/// The 2-D integer gate.
pub type IntGate2 = IntGate<2, 3>;

/// 2^62 as f64: the ceiling for every partial sum of the integer quadratic form.
const CEILING: f64 = 4_611_686_018_427_387_904.0;

fn round_to_i64(v: f64) -> Result<i64, FreezeError> {
    let r = libm::round(v);
    if r.is_finite() && r.abs() < CEILING {
        Ok(r as i64)
    } else {
        Err(FreezeError::OutOfRange)
    }
}

impl<const N: usize, const L: usize> IntGate<N, L> {
    /// Derives the integer coefficients from an `f64` gate in integer sample units.
    /// [`FreezeError::OutOfRange`] if the mean does not fit `i32` or the gate is so wide
    /// (reach above about 2^29 counts) that no scale keeps the form within `i64`.
    pub fn from_gate(gate: &Gate<f64, N>) -> Result<Self, FreezeError> {
        let base = gate.baseline();
        let cov = base.covariance();
        let mut spread = [0.0; N];
        for (i, s) in spread.iter_mut().enumerate() {
            *s = cov.matrix()[i][i];
        }
        Self::from_form(
            base.mean(),
            &base.precision(),
            &spread,
            gate.limit(),
            base.reciprocal_condition(),
        )
    }

    /// The integer test of a general ellipsoid `(x - centre)' P (x - centre) <= h`, given its
    /// matrix `P`, the diagonal of `P^-1` (`spread`: the squared half-widths of the ellipsoid's
    /// bounding box are `h spread_i`), and the reciprocal condition of `P`, which enters the
    /// band. [`from_gate`](Self::from_gate) calls it with the inverse covariance; a tolerance
    /// ellipse calls it with its own shape matrix and `h = 1`.
    pub fn from_form(
        centre: &[f64; N],
        prec: &[[f64; N]; N],
        spread: &[f64; N],
        h: f64,
        rcond: f64,
    ) -> Result<Self, FreezeError> {
        let () = Shape::<N, L>::CHECK;
        let finite = centre
            .iter()
            .chain(prec.iter().flatten())
            .chain(spread.iter());
        if !(finite.clone().all(|v| v.is_finite()) && h.is_finite() && h > 0.0 && rcond > 0.0) {
            return Err(FreezeError::NotFinite);
        }
        let mean = *centre;
        let mut pivot = [0i32; N];
        let mut f = [0.0f64; N];
        for i in 0..N {
            let r = libm::round(mean[i]);
            if !(r.abs() <= f64::from(i32::MAX)) {
                return Err(FreezeError::OutOfRange);
            }
            pivot[i] = r as i32;
            f[i] = mean[i] - r;
        }
        let mut reach = [0i64; N];
        let mut reach_f = [0.0f64; N];
        for i in 0..N {
            let r = libm::ceil(libm::sqrt(h * spread[i]) + 0.5) + 1.0;
            if !(r < 536_870_912.0) {
                return Err(FreezeError::OutOfRange);
            }
            reach[i] = r as i64;
            reach_f[i] = r;
        }
        // Coefficients before scaling: P' (off-diagonal doubled), c = -2 P f, r = h - f'Pf.
        let mut quad_f = [0.0f64; L];
        let mut err = 0.0f64;
        let mut size = 0.0f64;
        for ((i, j), q) in pairs::<N>().zip(quad_f.iter_mut()) {
            *q = if i == j { prec[i][i] } else { 2.0 * prec[i][j] };
            size += q.abs() * reach_f[i] * reach_f[j];
            err += reach_f[i] * reach_f[j];
        }
        let mut lin_f = [0.0f64; N];
        let mut fpf = 0.0;
        for i in 0..N {
            let mut g = 0.0;
            for j in 0..N {
                g += prec[i][j] * f[j];
            }
            fpf += f[i] * g;
            lin_f[i] = -2.0 * g;
            size += lin_f[i].abs() * reach_f[i];
            err += reach_f[i];
        }
        let rest = h - fpf;
        size += rest.abs() + 1.0;
        err *= 0.5;
        // Largest K = 2^k with K * size + err below 2^61 (a factor 2 of margin under 2^62).
        let room = CEILING * 0.5 - err;
        if !(room > 0.0 && size > 0.0 && size.is_finite()) {
            return Err(FreezeError::OutOfRange);
        }
        let mut k = libm::floor(libm::log2(room / size)) as i32;
        while k > -1075 && libm::scalbn(size, k) > room {
            k -= 1;
        }
        if k < 0 {
            return Err(FreezeError::OutOfRange);
        }
        let scale = libm::scalbn(1.0, k);
        let mut quad = [0i64; L];
        for (q, &v) in quad.iter_mut().zip(quad_f.iter()) {
            *q = round_to_i64(v * scale)?;
        }
        let mut lin = [0i64; N];
        for (l, &v) in lin.iter_mut().zip(lin_f.iter()) {
            *l = round_to_i64(v * scale)?;
        }
        let threshold = round_to_i64(libm::floor(rest * scale))?;
        let band = (err + 1.0) / scale + 8.0 * N as f64 * f64::EPSILON * h / rcond;
        let coarse = Coarse::new(&reach_f, &quad_f, &lin_f, rest, size, err);
        Ok(IntGate {
            pivot,
            reach,
            quad,
            lin,
            threshold,
            band,
            coarse,
        })
    }

    /// The per-sample test: `true` when the sample is inside the gate. Integer operations only:
    /// a 32-bit filter decides every sample not within a narrow band of the limit, the exact
    /// 64-bit form the rest (the verdict is the exact form's either way).
    #[inline]
    pub fn passes(&self, x: &[i32; N]) -> bool {
        match self.coarse.decide(x, &self.pivot) {
            Some(v) => v,
            None => self.passes_exact(x),
        }
    }

    /// The exact `i64` test alone (what [`passes`](Self::passes) falls back to).
    #[inline(never)]
    pub fn passes_exact(&self, x: &[i32; N]) -> bool {
        let mut u = [0i64; N];
        for i in 0..N {
            let d = i64::from(x[i]) - i64::from(self.pivot[i]);
            if d.abs() > self.reach[i] {
                return false;
            }
            u[i] = d;
        }
        // Every partial sum is below 2^62 in size by construction (see the type docs), so the
        // wrapping operations never wrap; they only keep overflow checks out of the hot path.
        let mut s = 0i64;
        for ((i, j), &a) in pairs::<N>().zip(self.quad.iter()) {
            s = s.wrapping_add(a.wrapping_mul(u[i].wrapping_mul(u[j])));
        }
        for (&d, &ui) in self.lin.iter().zip(u.iter()) {
            s = s.wrapping_add(d.wrapping_mul(ui));
        }
        s <= self.threshold
    }

    /// Half-width of the band around the limit (in units of `d^2`) outside which this gate's
    /// verdict equals the `f64` gate's.
    pub fn band(&self) -> f64 {
        self.band
    }

    /// The integer pivot (the baseline mean, rounded).
    pub fn pivot(&self) -> &[i32; N] {
        &self.pivot
    }
}

#[cfg(test)]
mod tests {
    use super::IntGate2;
    use crate::{Baseline, Covariance, Gate, Limit};

    #[test]
    fn the_filter_decides_almost_every_sample_of_a_typical_baseline() {
        // A 12-bit ADC node around mid-scale: the 32-bit filter must answer for nearly all
        // points of a grid covering the gate, and agree with the exact test where it does.
        let b = Baseline::new(
            [2048.3f64, 1987.6],
            &Covariance::from_matrix([[140.0, -61.0], [-61.0, 95.0]]),
        )
        .unwrap();
        let g = IntGate2::from_gate(&Gate::new(b, Limit::ChiSquare { alpha: 0.0027 }).unwrap())
            .unwrap();
        let (mut decided, mut total) = (0u32, 0u32);
        for x in 1990..2110 {
            for y in 1930..2050 {
                let p = [x, y];
                total += 1;
                if let Some(v) = g.coarse.decide(&p, &g.pivot) {
                    decided += 1;
                    assert_eq!(v, g.passes_exact(&p), "{p:?}");
                }
            }
        }
        assert!(decided * 1000 >= total * 998, "{decided} of {total}");
    }
}
