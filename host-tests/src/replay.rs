//! Replaying a capture through the device's own code path (`f32` `Watch`), and what came out.

use covgate::math::Precision;
use covgate::{CircleZone, EllipseZone, Reason, RectZone, Verdict, Watch, WatchConfig, Zone};

/// Largest baseline the replay can learn (the watch's buffer).
pub const MAX_LEARN: usize = 512;

/// A drift chart and its settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum ChartSpec {
    /// MEWMA with smoothing `lambda` and limit `h`.
    Mewma { lambda: f64, h: f64 },
    /// Crosier MCUSUM with reference `k` and limit `h`.
    Mcusum { k: f64, h: f64 },
}

/// A tolerance zone as given on the command line.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum ZoneSpec {
    /// `XLO, XHI, YLO, YHI` (infinite for absent).
    Rect([f64; 4]),
    /// `CX, CY, DIAMETER`.
    Circle([f64; 3]),
    /// `CX, CY, A, B, ANGLE_DEG`.
    Ellipse([f64; 5]),
}

impl ZoneSpec {
    /// The zone in `T`, or a one-line message.
    pub fn build<T: Precision>(&self) -> Result<Zone<T>, String> {
        let t = T::from_f64;
        match *self {
            ZoneSpec::Rect(v) => RectZone::new([t(v[0]), t(v[2])], [t(v[1]), t(v[3])])
                .map(Zone::Rect)
                .map_err(|e| format!("--rect: {e} (need XLO < XHI and YLO < YHI)")),
            ZoneSpec::Circle(v) => CircleZone::new([t(v[0]), t(v[1])], t(v[2]))
                .map(Zone::Circle)
                .map_err(|e| format!("--circle: {e} (need DIAMETER > 0)")),
            ZoneSpec::Ellipse(v) => {
                EllipseZone::new([t(v[0]), t(v[1])], t(v[2]), t(v[3]), t(v[4].to_radians()))
                    .map(Zone::Ellipse)
                    .map_err(|e| format!("--ellipse: {e} (need A > 0 and B > 0)"))
            }
        }
    }
}

/// Replay settings.
#[derive(Clone, Debug)]
pub struct Settings {
    /// Baseline size.
    pub learn: u32,
    /// Gate false-alarm rate.
    pub alpha: f64,
    /// Tolerance zone (2-D only).
    pub zone: Option<ZoneSpec>,
    /// Drift chart.
    pub chart: Option<ChartSpec>,
    /// Acknowledge every alarm at once (to see every alarm, not only the first).
    pub acknowledge: bool,
    /// Confidence level of the yield bounds (with a zone).
    pub confidence: f64,
}

/// Draws behind the replay's yield bounds.
pub const BOUND_DRAWS: u32 = 4000;
/// Seed of those draws (fixed: the same capture gives the same summary).
pub const BOUND_SEED: u64 = 1;

/// Confidence bounds on the predicted yield from the learned baseline.
#[derive(Clone, Copy, Debug)]
pub struct BoundSummary {
    /// Samples the baseline was estimated from (those kept by the Phase I screen).
    pub size: u32,
    /// Lower bound on the in-zone probability.
    pub inside_lower: f64,
    /// Upper bound on the nonconforming fraction, ppm.
    pub ppm_outside_upper: f64,
}

/// One sample's outcome.
#[derive(Clone, Debug, PartialEq)]
pub struct Row {
    /// Verdict: `go`, `no-go` or `learning`.
    pub verdict: &'static str,
    /// Why no-go (`outside-gate`, `outside-zone`, `alarm:<chart>`, `invalid`), or empty.
    pub reason: String,
    /// Mahalanobis distance squared (after learning).
    pub d2: Option<f64>,
    /// The chart statistic after this sample.
    pub statistic: Option<f64>,
    /// This sample raised an alarm.
    pub alarm: bool,
}

/// Everything the replay found.
#[derive(Clone, Debug)]
pub struct Outcome {
    /// Dimension.
    pub dim: usize,
    /// Per-sample rows.
    pub rows: Vec<Row>,
    /// Baseline mean.
    pub mean: Vec<f64>,
    /// Baseline covariance.
    pub cov: Vec<Vec<f64>>,
    /// The gate's limit on `d^2` (Phase II for the baseline size actually kept).
    pub gate_limit: f64,
    /// Baseline samples the Phase I screen flagged.
    pub screened_out: u32,
    /// Samples after learning.
    pub monitored: usize,
    /// Predicted in-zone probability and nonconforming ppm (2-D with a zone).
    pub inside_predicted: Option<f64>,
    /// Predicted nonconforming ppm.
    pub ppm_outside_predicted: Option<f64>,
    /// Monitored samples outside the zone (direct count).
    pub out_of_zone: Option<usize>,
    /// Monitored samples outside the gate (direct count of `d^2 > limit`).
    pub out_of_family: usize,
    /// Index of the first alarm.
    pub first_alarm: Option<usize>,
    /// Chart limit.
    pub chart_limit: Option<f64>,
    /// Confidence bounds on the predicted yield (with a zone, 2-D).
    pub bound: Option<BoundSummary>,
    /// Lower Cholesky factor (for gate ellipses).
    pub factor: Vec<Vec<f64>>,
}

/// Runs the samples through `Watch<f32, N, MAX_LEARN>`, exactly as a device with an FPU does.
pub fn run<const N: usize>(samples: &[[f32; N]], s: &Settings) -> Result<Outcome, String> {
    run_with_progress(samples, s, |_| {})
}

/// As [`run`], calling `progress(k)` after sample `k`.
pub fn run_with_progress<const N: usize>(
    samples: &[[f32; N]],
    s: &Settings,
    mut progress: impl FnMut(usize),
) -> Result<Outcome, String> {
    if s.learn as usize > MAX_LEARN {
        return Err(format!("--learn {} exceeds {MAX_LEARN}", s.learn));
    }
    if s.zone.is_some() && N != 2 {
        return Err(format!("a tolerance zone needs exactly 2 columns, not {N}"));
    }
    let mut cfg = WatchConfig::<f32, N>::new(s.learn, s.alpha as f32);
    cfg.zone = match &s.zone {
        Some(z) => Some(z.build::<f32>()?),
        None => None,
    };
    match s.chart {
        Some(ChartSpec::Mewma { lambda, h }) => cfg.mewma = Some((lambda as f32, h as f32, false)),
        Some(ChartSpec::Mcusum { k, h }) => cfg.mcusum = Some((k as f32, h as f32)),
        None => {}
    }
    let mut w = Watch::<f32, N, MAX_LEARN>::new(cfg).map_err(|e| format!("settings: {e}"))?;
    let mut rows = Vec::with_capacity(samples.len());
    let mut first_alarm = None;
    let mut learned_at = None;
    for (k, x) in samples.iter().enumerate() {
        let step = w.push(*x);
        progress(k);
        if learned_at.is_none() && w.monitor().is_some() {
            // The sample that armed the watch was still a learning sample.
            learned_at = Some(k + 1);
        }
        let stat = w.monitor().and_then(|m| {
            let st = m.chart_statistics();
            st[0].or(st[1]).map(f64::from)
        });
        let (verdict, reason, d2) = match step.verdict {
            Verdict::Go(d) => ("go", String::new(), Some(f64::from(d.d2))),
            Verdict::NotReady => ("learning", String::new(), None),
            Verdict::NoGo(r) => {
                let (why, d2) = match r {
                    Reason::OutsideGate(d) => ("outside-gate".to_string(), Some(f64::from(d.d2))),
                    Reason::OutsideZone(d) => ("outside-zone".to_string(), Some(f64::from(d.d2))),
                    Reason::Alarm(c) => (format!("alarm:{c:?}").to_lowercase(), None),
                    Reason::InvalidSample(e) => (format!("invalid: {e}"), None),
                };
                ("no-go", why, d2)
            }
        };
        let d2 = d2.or_else(|| {
            w.monitor()
                .map(|m| f64::from(m.gate().baseline().mahalanobis2(x)))
        });
        if step.alarm.is_some() && first_alarm.is_none() {
            first_alarm = Some(k);
        }
        rows.push(Row {
            verdict,
            reason,
            d2: if verdict == "learning" { None } else { d2 },
            statistic: stat,
            alarm: step.alarm.is_some(),
        });
        if step.alarm.is_some() && s.acknowledge {
            w.acknowledge();
        }
    }
    let m = w.monitor().ok_or_else(|| match w.last_error() {
        Some(e) => format!("the baseline did not arm: {e}"),
        None => format!(
            "only {} samples: fewer than --learn {}",
            samples.len(),
            s.learn
        ),
    })?;
    let b = m.gate().baseline();
    let cov = b.covariance();
    let mean: Vec<f64> = b.mean().iter().map(|&v| f64::from(v)).collect();
    let covv: Vec<Vec<f64>> = cov
        .matrix()
        .iter()
        .map(|r| r.iter().map(|&v| f64::from(v)).collect())
        .collect();
    let factor: Vec<Vec<f64>> = b
        .cholesky_factor()
        .iter()
        .map(|r| r.iter().map(|&v| f64::from(v)).collect())
        .collect();
    let monitored = samples
        .get(learned_at.unwrap_or(samples.len())..)
        .unwrap_or(&[]);
    let limit = m.gate().limit();
    let out_of_family = monitored
        .iter()
        .filter(|x| !(b.mahalanobis2(x) <= limit))
        .count();
    let (mut inside_predicted, mut ppm, mut out_of_zone, mut bound) = (None, None, None, None);
    if let (Some(z), true) = (&s.zone, N == 2) {
        let z64 = z.build::<f64>()?;
        let m2 = [mean[0], mean[1]];
        let c2 =
            covgate::Covariance::from_matrix([[covv[0][0], covv[0][1]], [covv[1][0], covv[1][1]]]);
        let y = z64.probability(&m2, &c2).map_err(|e| e.to_string())?;
        inside_predicted = Some(y.inside);
        ppm = Some(y.capability().ppm);
        let size = m.gate().baseline_size().unwrap_or(s.learn);
        let mut draws = vec![0.0f64; BOUND_DRAWS as usize];
        bound = z64
            .yield_bound(
                &m2,
                &c2,
                size,
                s.confidence,
                covgate::Uncertainty::MeanAndCovariance,
                &mut covgate::math::Xoshiro128::new(BOUND_SEED),
                &mut draws,
            )
            .ok()
            .map(|b| BoundSummary {
                size,
                inside_lower: b.inside_lower,
                ppm_outside_upper: b.outside_upper * 1e6,
            });
        let z32 = z.build::<f32>()?;
        out_of_zone = Some(
            monitored
                .iter()
                .filter(|x| {
                    let p: &[f32; 2] = x[..].try_into().expect("N is 2 here");
                    !z32.contains(p)
                })
                .count(),
        );
    }
    let chart_limit = s.chart.map(|c| match c {
        ChartSpec::Mewma { h, .. } | ChartSpec::Mcusum { h, .. } => h,
    });
    Ok(Outcome {
        dim: N,
        rows,
        mean,
        cov: covv,
        gate_limit: f64::from(limit),
        screened_out: w.screened_out(),
        monitored: monitored.len(),
        inside_predicted,
        ppm_outside_predicted: ppm,
        out_of_zone,
        out_of_family,
        first_alarm,
        chart_limit,
        bound,
        factor,
    })
}
