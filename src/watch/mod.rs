//! The drift watch: learn a baseline, arm, judge every sample, raise and latch alarms.
//!
//! ```text
//! Learning --(m samples, Phase I screen, freeze)--> Armed --(a chart or rule fires)--> Alarm
//!     ^                                               ^                                  |
//!     +------------------- relearn() ----------------+------- acknowledge() -------------+
//! ```
//!
//! [`Watch`] holds the whole machine, including the learning buffer of `M` samples.
//! [`Monitor`] is the armed part alone (gate, zone, charts, alarm latch): its size is what a
//! node keeps while it runs (2-D `f32`, every chart on: see the `footprint` host test).
//!
//! Defaults to no-go (not a rated safety function): every verdict is no-go while learning, on a
//! refused sample, while an alarm is latched, and when the monitor finds its own state
//! inconsistent ([`Chart::Fault`]).

mod charts;
mod rule;

pub use charts::{Dispersion, Mcusum, Mewma, Subgroup};
pub use rule::KofN;

use core::fmt;

use crate::gate::{Chart, Distance, Gate, Limit, Reason, Verdict};
use crate::gaussian::FreezeError;
use crate::math::{phase1_limit, subgroup_limit, LimitError, Precision, Real};
use crate::zone::Zone;
use crate::{Baseline, Covariance, SampleError};

/// Why a watch cannot be configured or armed.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum WatchError {
    /// A limit could not be computed (dimension, probability, baseline size).
    Limit(LimitError),
    /// The baseline could not be frozen (degenerate or ill-conditioned spread).
    Freeze(FreezeError),
    /// A chart parameter is out of range, the baseline size exceeds the buffer, or a zone
    /// was given for a dimension other than 2.
    Config,
    /// Too few samples survived the Phase I screen to arm.
    TooFewSamples,
}

impl fmt::Display for WatchError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            WatchError::Limit(e) => write!(f, "limit: {e}"),
            WatchError::Freeze(e) => write!(f, "baseline: {e}"),
            WatchError::Config => f.write_str("chart parameter or buffer size out of range"),
            WatchError::TooFewSamples => f.write_str("too few samples left after screening"),
        }
    }
}

impl core::error::Error for WatchError {}

impl From<LimitError> for WatchError {
    fn from(e: LimitError) -> Self {
        WatchError::Limit(e)
    }
}

impl From<FreezeError> for WatchError {
    fn from(e: FreezeError) -> Self {
        WatchError::Freeze(e)
    }
}

/// What to do with baseline samples the Phase I screen flags.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Screening {
    /// Keep them (the screen only counts them).
    Keep,
    /// Drop them once and re-estimate from the rest.
    Drop,
}

/// Settings of a watch. Charts are off unless set.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct WatchConfig<T, const N: usize> {
    /// Baseline size `m` (at most the buffer size `M`).
    pub baseline: u32,
    /// Per-sample false-alarm rate of the gate (exact Phase II limit for `m`).
    pub alpha: T,
    /// False-alarm rate of the Phase I screen of the baseline's own samples.
    pub screen_alpha: T,
    /// What to do with what the screen flags.
    pub screening: Screening,
    /// Reading resolution per axis (`q^2 / 12` added to each variance; zeros for none).
    pub resolution: [T; N],
    /// Tolerance zone (2-D only).
    pub zone: Option<Zone<T>>,
    /// MEWMA `(lambda, h, exact covariance)`.
    pub mewma: Option<(T, T, bool)>,
    /// Crosier MCUSUM `(k, h)`.
    pub mcusum: Option<(T, T)>,
    /// Dispersion check `(lambda, h)`.
    pub dispersion: Option<(T, T)>,
    /// Subgroup T^2 `(size, alpha)`; the limit is computed at arming.
    pub subgroup: Option<(u8, T)>,
    /// Raise a process alarm when `k` of the last `n` samples fall outside the gate.
    pub gate_rule: Option<(u8, u8)>,
}

impl<T: Real, const N: usize> WatchConfig<T, N> {
    /// Baseline of `m` samples, gate at `alpha`, Phase I screen at `alpha` dropping what it
    /// flags, no resolution floor, no zone, no charts.
    pub fn new(m: u32, alpha: T) -> Self {
        WatchConfig {
            baseline: m,
            alpha,
            screen_alpha: alpha,
            screening: Screening::Drop,
            resolution: [T::ZERO; N],
            zone: None,
            mewma: None,
            mcusum: None,
            dispersion: None,
            subgroup: None,
            gate_rule: None,
        }
    }
}

/// A process alarm: which check fired, its statistic and limit, when, and the estimated shift
/// per axis in standard deviations of that axis, so an engineer knows where to look.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Alarm<T, const N: usize> {
    /// The check that fired.
    pub chart: Chart,
    /// Its statistic at the alarm.
    pub statistic: T,
    /// Samples judged since arming (or the last acknowledgement), this one included.
    pub sample: u32,
    /// The chart's own shift estimate in data axes, each divided by that axis's standard
    /// deviation: the MEWMA vector, the CUSUM direction, the subgroup mean, or the sample's
    /// deviation for the gate and dispersion checks.
    pub shift: [T; N],
}

impl<T: Real, const N: usize> Alarm<T, N> {
    /// The axis that contributes most (largest `|shift|`).
    pub fn main_axis(&self) -> usize {
        let mut best = 0;
        for i in 1..N {
            if self.shift[i].abs() > self.shift[best].abs() {
                best = i;
            }
        }
        best
    }
}

/// The result of one sample: the verdict for the part, and an alarm if this sample raised one.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Step<T, const N: usize> {
    /// Go, no-go with reason, or not ready.
    pub verdict: Verdict<T>,
    /// Newly raised alarm (latched; later samples answer `NoGo(Alarm(..))` until acknowledged).
    pub alarm: Option<Alarm<T, N>>,
}

/// The armed monitor: gate, optional zone, charts and the alarm latch, in fixed size.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Monitor<T, const N: usize> {
    pub(crate) gate: Gate<T, N>,
    pub(crate) zone: Option<Zone<T>>,
    pub(crate) mewma: Option<Mewma<T, N>>,
    pub(crate) mcusum: Option<Mcusum<T, N>>,
    pub(crate) dispersion: Option<Dispersion<T>>,
    pub(crate) subgroup: Option<Subgroup<T, N>>,
    pub(crate) rule: Option<KofN>,
    pub(crate) alarm: Option<Alarm<T, N>>,
    pub(crate) samples: u32,
}

impl<T: Precision, const N: usize> Monitor<T, N> {
    /// Arms a monitor on a frozen baseline of `m` observations. Errors:
    /// [`WatchError::Config`] for chart parameters out of range or a zone with `N != 2`,
    /// [`WatchError::Limit`] for the gate or subgroup limits.
    pub fn new(
        baseline: Baseline<T, N>,
        m: u32,
        cfg: &WatchConfig<T, N>,
    ) -> Result<Self, WatchError> {
        let p = N as u32;
        if cfg.zone.is_some() && N != 2 {
            return Err(WatchError::Config);
        }
        let gate = Gate::new(
            baseline,
            Limit::PhaseII {
                m,
                alpha: cfg.alpha,
            },
        )?;
        let mewma = match cfg.mewma {
            Some((l, h, exact)) => Some(Mewma::new(l, h, exact).ok_or(WatchError::Config)?),
            None => None,
        };
        let mcusum = match cfg.mcusum {
            Some((k, h)) => Some(Mcusum::new(k, h).ok_or(WatchError::Config)?),
            None => None,
        };
        let dispersion = match cfg.dispersion {
            Some((l, h)) => Some(Dispersion::new(p, l, h).ok_or(WatchError::Config)?),
            None => None,
        };
        let subgroup = match cfg.subgroup {
            Some((n, a)) => {
                let h = subgroup_limit(p, m, u32::from(n), a)?;
                Some(Subgroup::new(n, h).ok_or(WatchError::Config)?)
            }
            None => None,
        };
        let rule = match cfg.gate_rule {
            Some((k, n)) => Some(KofN::new(k, n).ok_or(WatchError::Config)?),
            None => None,
        };
        Ok(Monitor {
            gate,
            zone: cfg.zone,
            mewma,
            mcusum,
            dispersion,
            subgroup,
            rule,
            alarm: None,
            samples: 0,
        })
    }

    /// Samples judged since arming or the last acknowledgement.
    pub fn samples(&self) -> u32 {
        self.samples
    }

    /// The tolerance zone, if any.
    pub fn zone(&self) -> Option<&Zone<T>> {
        self.zone.as_ref()
    }

    /// The gate (baseline and limit).
    pub fn gate(&self) -> &Gate<T, N> {
        &self.gate
    }

    /// The current statistics of the MEWMA, the MCUSUM and the dispersion check (`None` for a
    /// chart that is off).
    pub fn chart_statistics(&self) -> [Option<T>; 3] {
        [
            self.mewma.as_ref().map(|c| c.statistic()),
            self.mcusum.as_ref().map(|c| c.statistic()),
            self.dispersion.as_ref().map(|c| c.statistic()),
        ]
    }

    /// The latched alarm, if any.
    pub fn alarm(&self) -> Option<&Alarm<T, N>> {
        self.alarm.as_ref()
    }

    /// Clears the alarm and restarts every chart (a chart kept running would signal again at
    /// once on the same evidence).
    pub fn acknowledge(&mut self) {
        self.alarm = None;
        self.samples = 0;
        self.restart_charts();
    }

    fn restart_charts(&mut self) {
        if let Some(c) = &mut self.mewma {
            c.reset();
        }
        if let Some(c) = &mut self.mcusum {
            c.reset();
        }
        if let Some(c) = &mut self.dispersion {
            c.reset();
        }
        if let Some(c) = &mut self.subgroup {
            c.reset();
        }
        if let Some(r) = &mut self.rule {
            r.reset();
        }
    }

    /// The consistency check behind the no-go default: every chart's state finite and in range.
    pub fn is_sane(&self) -> bool {
        self.mewma.as_ref().is_none_or(|c| c.is_sane())
            && self.mcusum.as_ref().is_none_or(|c| c.is_sane())
            && self.dispersion.as_ref().is_none_or(|c| c.is_sane())
            && self.subgroup.as_ref().is_none_or(|c| c.is_sane())
    }

    /// Per-axis shift in standard deviations from a whitened vector scaled by `scale`.
    fn shift(&self, v: &[T; N], scale: T) -> [T; N] {
        let data = self.gate.baseline().unwhiten(v);
        let sd = self.gate.baseline().std_devs();
        let mut out = [T::ZERO; N];
        for i in 0..N {
            out[i] = data[i] * scale / sd[i];
        }
        out
    }

    /// Judges one sample. A refused sample changes nothing.
    pub fn step(&mut self, x: &[T; N]) -> Step<T, N> {
        if !x.iter().all(|v| v.is_finite()) {
            return Step {
                verdict: Verdict::NoGo(Reason::InvalidSample(SampleError::NotFinite)),
                alarm: None,
            };
        }
        let w = self.gate.baseline().whiten(x);
        let d2 = w.iter().fold(T::ZERO, |s, &v| s + v * v);
        if !d2.is_finite() {
            return Step {
                verdict: Verdict::NoGo(Reason::InvalidSample(SampleError::Overflow)),
                alarm: None,
            };
        }
        if let Some(a) = &self.alarm {
            return Step {
                verdict: Verdict::NoGo(Reason::Alarm(a.chart)),
                alarm: None,
            };
        }
        self.samples = self.samples.saturating_add(1);
        let outside_gate = !(d2 <= self.gate.limit());
        let raised = self.update_charts(&w, d2, outside_gate);
        let dist = Distance { d2, tail: None };
        let raised = if self.is_sane() {
            raised
        } else {
            Some(Alarm {
                chart: Chart::Fault,
                statistic: T::from_f64(f64::NAN),
                sample: self.samples,
                shift: [T::ZERO; N],
            })
        };
        if let Some(a) = raised {
            self.alarm = Some(a);
            return Step {
                verdict: Verdict::NoGo(Reason::Alarm(a.chart)),
                alarm: Some(a),
            };
        }
        let verdict = if outside_gate {
            Verdict::NoGo(Reason::OutsideGate(dist))
        } else if !self.in_zone(x) {
            Verdict::NoGo(Reason::OutsideZone(dist))
        } else {
            Verdict::Go(dist)
        };
        Step {
            verdict,
            alarm: None,
        }
    }

    fn in_zone(&self, x: &[T; N]) -> bool {
        match (&self.zone, <&[T; 2]>::try_from(&x[..])) {
            (Some(z), Ok(x2)) => z.contains(x2),
            (Some(_), Err(_)) => false,
            (None, _) => true,
        }
    }

    /// Updates every chart; the first that fires (in the order gate rule, MEWMA, MCUSUM,
    /// dispersion, subgroup) gives the alarm. All charts take the sample either way.
    fn update_charts(&mut self, w: &[T; N], d2: T, outside: bool) -> Option<Alarm<T, N>> {
        // (chart, statistic, shift estimate in whitened units)
        let mut fired: Option<(Chart, T, [T; N])> = None;
        let mut first = |c: Chart, stat: T, v: [T; N]| {
            if fired.is_none() {
                fired = Some((c, stat, v));
            }
        };
        if let Some(r) = &mut self.rule {
            if r.push(outside) {
                first(Chart::Gate, d2, *w);
            }
        }
        if let Some(c) = &mut self.mewma {
            let t2 = c.update(w);
            if t2 > c.limit() {
                // Z is the smoothed mean shift itself.
                first(Chart::Mewma, t2, *c.vector());
            }
        }
        if let Some(c) = &mut self.mcusum {
            let y = c.update(w);
            if y > c.limit() {
                // S points along the shift; report its direction (unit length).
                let v = *c.vector();
                let len = v.iter().fold(T::ZERO, |s, &x| s + x * x).sqrt();
                first(Chart::Mcusum, y, v.map(|x| x / len));
            }
        }
        if let Some(c) = &mut self.dispersion {
            let e = c.update(d2);
            if e > c.limit() {
                first(Chart::Dispersion, e, *w);
            }
        }
        if let Some(c) = &mut self.subgroup {
            if let Some((t2, mean)) = c.update(w) {
                if t2 > c.limit() {
                    first(Chart::Subgroup, t2, mean);
                }
            }
        }
        let (chart, statistic, v) = fired?;
        Some(Alarm {
            chart,
            statistic,
            sample: self.samples,
            shift: self.shift(&v, T::ONE),
        })
    }
}

/// The whole learn -> armed -> alarm machine, with a buffer for `M` baseline samples.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Watch<T, const N: usize, const M: usize> {
    cfg: WatchConfig<T, N>,
    buf: [[T; N]; M],
    len: usize,
    monitor: Option<Monitor<T, N>>,
    last_error: Option<WatchError>,
    screened_out: u32,
}

impl<T: Precision, const N: usize, const M: usize> Watch<T, N, M> {
    /// A watch that learns `cfg.baseline` samples. Checks now what can be checked before any
    /// sample: the buffer size, the Phase I and Phase II limits for `m`, the chart parameters.
    pub fn new(cfg: WatchConfig<T, N>) -> Result<Self, WatchError> {
        let m = cfg.baseline;
        if m as usize > M || (cfg.zone.is_some() && N != 2) {
            return Err(WatchError::Config);
        }
        let p = N as u32;
        phase1_limit(p, m, cfg.screen_alpha)?;
        // A trial arming on a unit baseline validates every chart parameter and limit.
        let unit = Baseline::new([T::ZERO; N], &Covariance::from_matrix(identity()))?;
        Monitor::new(unit, m, &cfg)?;
        Ok(Watch {
            cfg,
            buf: [[T::ZERO; N]; M],
            len: 0,
            monitor: None,
            last_error: None,
            screened_out: 0,
        })
    }

    /// The armed monitor, if armed.
    pub fn monitor(&self) -> Option<&Monitor<T, N>> {
        self.monitor.as_ref()
    }

    /// Why the last attempt to arm failed (the watch then started learning afresh).
    pub fn last_error(&self) -> Option<WatchError> {
        self.last_error
    }

    /// Baseline samples the Phase I screen flagged at the last arming.
    pub fn screened_out(&self) -> u32 {
        self.screened_out
    }

    /// Samples collected towards the baseline.
    pub fn learned(&self) -> usize {
        self.len
    }

    /// Acknowledges a latched alarm (no effect while learning).
    pub fn acknowledge(&mut self) {
        if let Some(m) = &mut self.monitor {
            m.acknowledge();
        }
    }

    /// Forgets the baseline and learns again.
    pub fn relearn(&mut self) {
        self.monitor = None;
        self.len = 0;
    }

    /// Judges one sample (collecting it while learning).
    pub fn push(&mut self, x: [T; N]) -> Step<T, N> {
        if let Some(m) = &mut self.monitor {
            return m.step(&x);
        }
        let not_ready = Step {
            verdict: Verdict::NotReady,
            alarm: None,
        };
        if !x.iter().all(|v| v.is_finite()) {
            return Step {
                verdict: Verdict::NoGo(Reason::InvalidSample(SampleError::NotFinite)),
                alarm: None,
            };
        }
        if let Some(slot) = self.buf.get_mut(self.len) {
            *slot = x;
            self.len += 1;
        }
        if self.len >= self.cfg.baseline as usize {
            match self.arm() {
                Ok(m) => {
                    self.monitor = Some(m);
                    self.last_error = None;
                }
                Err(e) => self.last_error = Some(e),
            }
            self.len = 0;
        }
        not_ready
    }

    /// Phase I: estimate, screen each baseline sample against the Phase I limit, drop what it
    /// flags once (if so configured), re-estimate, freeze, arm.
    fn arm(&mut self) -> Result<Monitor<T, N>, WatchError> {
        let samples = self.buf.get(..self.len).ok_or(WatchError::Config)?;
        let p = N as u32;
        let mut keep = [true; M];
        let (mean, cov) = estimate(samples, &keep).ok_or(WatchError::TooFewSamples)?;
        let base = Baseline::with_resolution(mean, &cov, self.cfg.resolution)?;
        let ucl1 = phase1_limit(p, self.len as u32, self.cfg.screen_alpha)?;
        let mut flagged = 0u32;
        for (k, x) in keep.iter_mut().zip(samples.iter()) {
            if !(base.mahalanobis2(x) <= ucl1) {
                flagged += 1;
                if self.cfg.screening == Screening::Drop {
                    *k = false;
                }
            }
        }
        self.screened_out = flagged;
        let kept = self.len as u32
            - if self.cfg.screening == Screening::Drop {
                flagged
            } else {
                0
            };
        if kept <= p + 1 {
            return Err(WatchError::TooFewSamples);
        }
        let (mean, cov) = estimate(samples, &keep).ok_or(WatchError::TooFewSamples)?;
        let base = Baseline::with_resolution(mean, &cov, self.cfg.resolution)?;
        Monitor::new(base, kept, &self.cfg)
    }
}

fn identity<T: Real, const N: usize>() -> [[T; N]; N] {
    let mut m = [[T::ZERO; N]; N];
    for i in 0..N {
        m[i][i] = T::ONE;
    }
    m
}

/// Two-pass mean and sample covariance of the kept samples, relative to the first kept one
/// (a pivot, for precision). `None` for fewer than two.
fn estimate<T: Real, const N: usize>(
    xs: &[[T; N]],
    keep: &[bool],
) -> Option<([T; N], Covariance<T, N>)> {
    let mut kept = xs
        .iter()
        .zip(keep.iter())
        .filter(|(_, &k)| k)
        .map(|(x, _)| x);
    let pivot = *kept.clone().next()?;
    let n = kept.clone().count();
    if n < 2 {
        return None;
    }
    let nt = T::from_u32(n as u32);
    let mut mean = [T::ZERO; N];
    for x in kept.clone() {
        for i in 0..N {
            mean[i] += x[i] - pivot[i];
        }
    }
    for m in mean.iter_mut() {
        *m /= nt;
    }
    let mut c = [[T::ZERO; N]; N];
    for x in kept.by_ref() {
        let mut d = [T::ZERO; N];
        for i in 0..N {
            d[i] = x[i] - pivot[i] - mean[i];
        }
        for i in 0..N {
            for j in 0..N {
                c[i][j] += d[i] * d[j];
            }
        }
    }
    let den = nt - T::ONE;
    for row in c.iter_mut() {
        for v in row.iter_mut() {
            *v /= den;
        }
    }
    for i in 0..N {
        mean[i] += pivot[i];
    }
    Some((mean, Covariance::from_matrix(c)))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cfg() -> WatchConfig<f64, 2> {
        let mut c = WatchConfig::new(10, 0.0027);
        c.mewma = Some((0.2, 9.65, false));
        c.mcusum = Some((0.5, 5.5));
        c
    }

    fn baseline_samples() -> [[f64; 2]; 10] {
        let mut out = [[0.0; 2]; 10];
        for (k, o) in out.iter_mut().enumerate() {
            let t = k as f64;
            *o = [(t * 1.7).sin(), (t * 2.3).cos() + 0.3 * (t * 1.7).sin()];
        }
        out
    }

    #[test]
    fn learns_arms_alarms_acknowledges_relearns() {
        let mut w = Watch::<f64, 2, 16>::new(cfg()).unwrap();
        // A refused sample while learning does not count.
        assert!(matches!(
            w.push([f64::NAN, 0.0]).verdict,
            Verdict::NoGo(Reason::InvalidSample(_))
        ));
        for x in baseline_samples() {
            assert_eq!(w.push(x).verdict, Verdict::NotReady);
        }
        assert!(w.monitor().is_some(), "{:?}", w.last_error());
        assert!(w.push([0.1, 0.2]).verdict.is_go());
        // A refused sample while armed changes nothing.
        let before = *w.monitor().unwrap();
        assert!(matches!(
            w.push([0.0, f64::INFINITY]).verdict,
            Verdict::NoGo(Reason::InvalidSample(_))
        ));
        assert_eq!(*w.monitor().unwrap(), before);
        // A far sample: outside the gate, and the MEWMA (first in line after the rule) fires.
        let s = w.push([40.0, 40.0]);
        let a = s.alarm.expect("an alarm");
        assert_eq!(s.verdict, Verdict::NoGo(Reason::Alarm(a.chart)));
        assert!(w.push([0.1, 0.2]).verdict == Verdict::NoGo(Reason::Alarm(a.chart)));
        w.acknowledge();
        assert!(w.push([0.1, 0.2]).verdict.is_go());
        w.relearn();
        assert_eq!(w.push([0.1, 0.2]).verdict, Verdict::NotReady);
    }

    #[test]
    fn two_of_three_gate_exceedances_raise_a_gate_alarm() {
        let mut c = WatchConfig::new(10, 0.0027);
        c.gate_rule = Some((2, 3));
        let mut w = Watch::<f64, 2, 16>::new(c).unwrap();
        for x in baseline_samples() {
            w.push(x);
        }
        let far = [6.0, -6.0];
        assert!(matches!(
            w.push(far).verdict,
            Verdict::NoGo(Reason::OutsideGate(_))
        ));
        assert!(w.push([0.1, 0.2]).alarm.is_none());
        let b = *w.monitor().unwrap().gate().baseline();
        let s = w.push(far);
        let a = s.alarm.unwrap();
        assert_eq!(a.chart, Chart::Gate);
        // The gate alarm's shift is the sample's own deviation in standard deviations.
        for i in 0..2 {
            let want = (far[i] - b.mean()[i]) / b.std_devs()[i];
            assert!((a.shift[i] - want).abs() < 1e-12, "{:?} vs {want}", a.shift);
        }
    }

    #[test]
    fn a_corrupt_chart_state_fails_safe() {
        let mut w = Watch::<f64, 2, 16>::new(cfg()).unwrap();
        for x in baseline_samples() {
            w.push(x);
        }
        let m = w.monitor.as_mut().unwrap();
        if let Some(c) = &mut m.mcusum {
            c.corrupt_for_test();
        }
        let s = w.push([0.1, 0.2]);
        assert_eq!(s.verdict, Verdict::NoGo(Reason::Alarm(Chart::Fault)));
    }

    #[test]
    fn refuses_to_arm_on_a_stuck_reading() {
        let mut w = Watch::<f32, 2, 16>::new(WatchConfig::new(8, 0.01)).unwrap();
        for _ in 0..8 {
            w.push([2.0, 3.0]);
        }
        assert!(w.monitor().is_none());
        assert_eq!(
            w.last_error(),
            Some(WatchError::Freeze(FreezeError::Degenerate))
        );
        let mut c = WatchConfig::new(8, 0.01);
        c.resolution = [0.1, 0.1];
        let mut w = Watch::<f32, 2, 16>::new(c).unwrap();
        for _ in 0..8 {
            w.push([2.0, 3.0]);
        }
        assert!(w.monitor().is_some());
        assert!(
            Watch::<f32, 2, 4>::new(WatchConfig::new(8, 0.01)).is_err(),
            "buffer too small"
        );
    }
}
