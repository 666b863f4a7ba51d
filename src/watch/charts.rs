//! Drift charts on whitened samples `w = L^-1 (x - mean)` (independent, unit variance while
//! the process is in control). Each chart is a few values of state and one update.

use crate::math::Real;

/// Multivariate EWMA (Lowry, Woodall, Champ & Rigdon 1992): `Z_i = lambda w_i + (1 - lambda)
/// Z_{i-1}`, `Z_0 = 0`, statistic `T^2_i = Z_i' Sigma_Z^-1 Z_i`. In whitened coordinates
/// `Sigma_Z = c_i I` with the exact time-varying `c_i = lambda (1 - (1 - lambda)^{2i}) /
/// (2 - lambda)` (NIST/SEMATECH e-Handbook 6.3.4.3, Multivariate EWMA Charts) or its asymptote
/// `lambda / (2 - lambda)`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Mewma<T, const N: usize> {
    z: [T; N],
    lambda: T,
    limit: T,
    /// `(1 - lambda)^{2i}` for the exact covariance; zero for the asymptotic one.
    decay: T,
    exact: bool,
}

impl<T: Real, const N: usize> Mewma<T, N> {
    /// A chart with smoothing `lambda` in (0, 1] and limit `h > 0`; `exact` selects the exact
    /// time-varying covariance (more sensitive at start-up), else the asymptotic one (the form
    /// the published ARL tables use). `None` for parameters out of range.
    pub fn new(lambda: T, limit: T, exact: bool) -> Option<Self> {
        let ok = lambda > T::ZERO && lambda <= T::ONE && limit > T::ZERO && limit.is_finite();
        ok.then_some(Mewma {
            z: [T::ZERO; N],
            lambda,
            limit,
            decay: if exact { T::ONE } else { T::ZERO },
            exact,
        })
    }

    /// Restarts the chart (after an alarm).
    pub fn reset(&mut self) {
        self.z = [T::ZERO; N];
        self.decay = if self.exact { T::ONE } else { T::ZERO };
    }

    /// Takes one whitened sample; returns the statistic.
    #[inline]
    pub fn update(&mut self, w: &[T; N]) -> T {
        let keep = T::ONE - self.lambda;
        let mut s = T::ZERO;
        for i in 0..N {
            self.z[i] = self.lambda * w[i] + keep * self.z[i];
            s += self.z[i] * self.z[i];
        }
        self.decay *= keep * keep;
        let two = T::ONE + T::ONE;
        let c = self.lambda * (T::ONE - self.decay) / (two - self.lambda);
        s / c
    }

    /// The limit `h`.
    pub fn limit(&self) -> T {
        self.limit
    }

    /// The smoothing constant.
    pub fn lambda(&self) -> T {
        self.lambda
    }

    /// Whether the exact time-varying covariance is used.
    pub fn is_exact(&self) -> bool {
        self.exact
    }

    /// The current statistic `T^2` (zero before the first sample).
    pub fn statistic(&self) -> T {
        let two = T::ONE + T::ONE;
        let c = self.lambda * (T::ONE - self.decay) / (two - self.lambda);
        let s = self.z.iter().fold(T::ZERO, |a, &v| a + v * v);
        if c > T::ZERO {
            s / c
        } else {
            T::ZERO
        }
    }

    /// The smoothed vector `Z` (whitened units).
    pub fn vector(&self) -> &[T; N] {
        &self.z
    }

    pub(crate) fn is_sane(&self) -> bool {
        self.z.iter().all(|v| v.is_finite()) && self.decay >= T::ZERO && self.decay <= T::ONE
    }
}

/// Crosier's (1988) multivariate CUSUM: with `v = S_{i-1} + w_i` and `C = |v|` (the Mahalanobis
/// length, since `w` is whitened), `S_i = 0` if `C <= k`, else `S_i = v (1 - k / C)`;
/// statistic `Y_i = |S_i|`, alarm above `h`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Mcusum<T, const N: usize> {
    s: [T; N],
    k: T,
    limit: T,
}

impl<T: Real, const N: usize> Mcusum<T, N> {
    /// Reference value `k >= 0`, limit `h > 0`; `None` otherwise.
    pub fn new(k: T, limit: T) -> Option<Self> {
        let ok = k >= T::ZERO && k.is_finite() && limit > T::ZERO && limit.is_finite();
        ok.then_some(Mcusum {
            s: [T::ZERO; N],
            k,
            limit,
        })
    }

    /// Restarts the chart.
    pub fn reset(&mut self) {
        self.s = [T::ZERO; N];
    }

    /// Takes one whitened sample; returns `Y`.
    #[inline]
    pub fn update(&mut self, w: &[T; N]) -> T {
        let mut c2 = T::ZERO;
        for i in 0..N {
            self.s[i] += w[i];
            c2 += self.s[i] * self.s[i];
        }
        let c = c2.sqrt();
        if c <= self.k {
            self.s = [T::ZERO; N];
            return T::ZERO;
        }
        let shrink = T::ONE - self.k / c;
        for v in self.s.iter_mut() {
            *v *= shrink;
        }
        c - self.k
    }

    /// The limit `h`.
    pub fn limit(&self) -> T {
        self.limit
    }

    /// The reference value `k`.
    pub fn k(&self) -> T {
        self.k
    }

    /// The current statistic `Y = |S|`.
    pub fn statistic(&self) -> T {
        self.s.iter().fold(T::ZERO, |a, &v| a + v * v).sqrt()
    }

    /// The cumulative vector `S` (whitened units).
    pub fn vector(&self) -> &[T; N] {
        &self.s
    }

    pub(crate) fn is_sane(&self) -> bool {
        self.s.iter().all(|v| v.is_finite())
    }

    #[cfg(test)]
    pub(crate) fn corrupt_for_test(&mut self) {
        self.s = [T::from_f64(f64::NAN); N];
    }
}

/// A dispersion check: an EWMA of `d^2`, `E_i = lambda d^2_i + (1 - lambda) E_{i-1}`,
/// `E_0 = p`. While in control `d^2` is about chi-square with `p` degrees of freedom (mean
/// `p`, variance `2p`), so `E` hovers near `p`; a larger covariance in any direction lifts it.
///
/// Why this one: it reuses the `d^2` the gate already computed (one multiply-add and one
/// value of state), needs no subgroups, and reacts to growth of the spread in any direction,
/// which is what drives nonconforming parts. It does not see a covariance that only rotates
/// or shrinks (the shrinking side is harmless for conformance). The limit `h` is set for an
/// in-control ARL (the host tool computes it; [`Dispersion::limit_for`] gives the usual
/// `p + L sqrt(2 p lambda / (2 - lambda))` starting point).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Dispersion<T> {
    e: T,
    centre: T,
    lambda: T,
    limit: T,
}

impl<T: Real> Dispersion<T> {
    /// `lambda` in (0, 1], limit above the in-control mean `p`; `None` otherwise.
    pub fn new(p: u32, lambda: T, limit: T) -> Option<Self> {
        let centre = T::from_u32(p);
        let ok = lambda > T::ZERO && lambda <= T::ONE && limit > centre && limit.is_finite();
        ok.then_some(Dispersion {
            e: centre,
            centre,
            lambda,
            limit,
        })
    }

    /// `p + width sqrt(2 p lambda / (2 - lambda))`: the asymptotic mean plus `width` standard
    /// deviations of the EWMA of a chi-square with `p` degrees of freedom.
    pub fn limit_for(p: u32, lambda: T, width: T) -> T {
        let pt = T::from_u32(p);
        let two = T::ONE + T::ONE;
        pt + width * (two * pt * lambda / (two - lambda)).sqrt()
    }

    /// The smoothing constant.
    pub fn lambda(&self) -> T {
        self.lambda
    }

    /// The current value `E`.
    pub fn statistic(&self) -> T {
        self.e
    }

    /// Restarts at the in-control mean.
    pub fn reset(&mut self) {
        self.e = self.centre;
    }

    /// Takes one `d^2`; returns `E`.
    #[inline]
    pub fn update(&mut self, d2: T) -> T {
        self.e = self.lambda * d2 + (T::ONE - self.lambda) * self.e;
        self.e
    }

    /// The limit.
    pub fn limit(&self) -> T {
        self.limit
    }

    pub(crate) fn is_sane(&self) -> bool {
        self.e.is_finite() && self.e >= T::ZERO
    }
}

/// Hotelling's T^2 for subgroup means: collects `n` whitened samples, then
/// `T^2 = n |mean of w|^2 = |sum w|^2 / n`, against the subgroup limit
/// ([`subgroup_limit`](crate::math::subgroup_limit)).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Subgroup<T, const N: usize> {
    sum: [T; N],
    taken: u8,
    size: u8,
    limit: T,
}

impl<T: Real, const N: usize> Subgroup<T, N> {
    /// Subgroups of `size` 2..=255 samples, limit `h > 0`; `None` otherwise.
    pub fn new(size: u8, limit: T) -> Option<Self> {
        let ok = size >= 2 && limit > T::ZERO && limit.is_finite();
        ok.then_some(Subgroup {
            sum: [T::ZERO; N],
            taken: 0,
            size,
            limit,
        })
    }

    /// Drops the subgroup in progress.
    pub fn reset(&mut self) {
        self.sum = [T::ZERO; N];
        self.taken = 0;
    }

    /// Takes one whitened sample; `Some((T^2, subgroup mean))` when a subgroup completes.
    #[inline]
    pub fn update(&mut self, w: &[T; N]) -> Option<(T, [T; N])> {
        for (s, &v) in self.sum.iter_mut().zip(w.iter()) {
            *s += v;
        }
        self.taken = self.taken.saturating_add(1);
        if self.taken < self.size {
            return None;
        }
        let n = T::from_u32(u32::from(self.size));
        let t2 = self.sum.iter().fold(T::ZERO, |a, &v| a + v * v) / n;
        let mean = self.sum.map(|v| v / n);
        self.reset();
        Some((t2, mean))
    }

    /// The limit.
    pub fn limit(&self) -> T {
        self.limit
    }

    /// The subgroup size.
    pub fn size(&self) -> u8 {
        self.size
    }

    pub(crate) fn is_sane(&self) -> bool {
        self.sum.iter().all(|v| v.is_finite()) && self.taken < self.size
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn charts_by_hand() {
        // MEWMA, lambda 0.5, asymptotic: Z = 0.5 w; T^2 = |Z|^2 / (0.5 / 1.5) = 3 |Z|^2.
        let mut m = Mewma::<f64, 2>::new(0.5, 10.0, false).unwrap();
        assert!((m.update(&[2.0, 0.0]) - 3.0).abs() < 1e-15);
        // Exact at i = 1: c_1 = 0.5 (1 - 0.25) / 1.5 = 0.25, so T^2 = |Z|^2 / 0.25 = |w|^2.
        let mut m = Mewma::<f64, 2>::new(0.5, 10.0, true).unwrap();
        assert!((m.update(&[2.0, 0.0]) - 4.0).abs() < 1e-15);
        // MCUSUM, k = 0.5: first w = (3, 4): C = 5, S = (3, 4)(0.9), Y = 4.5.
        let mut c = Mcusum::<f64, 2>::new(0.5, 5.0).unwrap();
        assert!((c.update(&[3.0, 4.0]) - 4.5).abs() < 1e-15);
        assert_eq!(c.update(&[-2.7, -3.6]), 0.0); // back to the origin
        let mut d = Dispersion::<f64>::new(2, 0.1, 3.0).unwrap();
        assert!((d.update(12.0) - 3.0).abs() < 1e-15);
        let mut g = Subgroup::<f64, 2>::new(2, 10.0).unwrap();
        assert_eq!(g.update(&[1.0, 1.0]), None);
        assert_eq!(g.update(&[1.0, 1.0]), Some((4.0, [1.0, 1.0])));
        assert!(Mewma::<f32, 2>::new(0.0, 1.0, true).is_none());
        assert!(Dispersion::<f32>::new(2, 0.1, 1.5).is_none());
    }
}
