//! `covgate zone`: what-if yield of a tolerance zone for a given mean and covariance.

use covgate::math::{Precision, Xoshiro128};
use covgate::{BoundError, CircleZone, Covariance, EllipseZone, RectZone, Uncertainty, Zone};
use serde_json::json;

/// Arguments of `covgate zone`.
#[derive(clap::Args, Debug)]
#[command(group(clap::ArgGroup::new("shape").required(true).args(["rect", "circle", "ellipse"])))]
pub struct Args {
    /// Process mean: MX,MY.
    #[arg(long, value_name = "MX,MY", allow_hyphen_values = true)]
    pub mean: String,
    /// Process covariance: SXX,SXY,SYY.
    #[arg(long, value_name = "SXX,SXY,SYY", allow_hyphen_values = true)]
    pub cov: String,
    /// Rectangle XLO,XHI,YLO,YHI; -inf / inf mark an absent limit.
    #[arg(long, value_name = "XLO,XHI,YLO,YHI", allow_hyphen_values = true)]
    pub rect: Option<String>,
    /// Positional-tolerance circle CX,CY,DIAMETER.
    #[arg(long, value_name = "CX,CY,DIAMETER", allow_hyphen_values = true)]
    pub circle: Option<String>,
    /// Ellipse CX,CY,A,B,ANGLE_DEG (semi-axes, rotation in degrees).
    #[arg(long, value_name = "CX,CY,A,B,ANGLE_DEG", allow_hyphen_values = true)]
    pub ellipse: Option<String>,
    /// Arithmetic of the computation: f64 (default) or f32 (what a device with an FPU runs).
    #[arg(long, value_name = "f32|f64", default_value = "f64")]
    pub precision: String,
    /// Number of samples the mean and covariance were estimated from: adds the confidence
    /// bounds `inside_lower` and `ppm_outside_upper`.
    #[arg(long, value_name = "M")]
    pub baseline_size: Option<u32>,
    /// Confidence level of the bounds, strictly between 0 and 1 (default 0.95; needs
    /// --baseline-size).
    #[arg(long, value_name = "C", allow_hyphen_values = true)]
    pub confidence: Option<f64>,
    /// Number of draws for the bounds.
    #[arg(long, value_name = "K", default_value_t = DEFAULT_DRAWS)]
    pub draws: u32,
    /// Seed of the draws (the same seed gives the same bounds).
    #[arg(long, value_name = "S", default_value_t = 1)]
    pub seed: u64,
    /// The covariance is known (not estimated): only the mean's uncertainty enters the bounds.
    #[arg(long)]
    pub known_covariance: bool,
}

/// Draws behind the bounds unless `--draws` says otherwise.
pub const DEFAULT_DRAWS: u32 = 4000;
/// At most this many draws (a buffer of 80 MB in f64).
pub const MAX_DRAWS: u32 = 10_000_000;

/// Method line of the confidence bounds, shared with `covgate replay`.
pub const BOUND_METHOD: &str = "generalized pivotal quantities: covariance from its Wishart pivot (Bartlett draws), mean given it, zone probability per draw, quantile over the draws; assumes independent normal baseline samples";

/// The bounds for a baseline of `m` samples, as JSON fields; `Err` names the option at fault.
#[allow(clippy::too_many_arguments)]
pub fn bound_fields<T: Precision>(
    zone: &Zone<T>,
    mean: &[T; 2],
    cov: &Covariance<T, 2>,
    m: u32,
    confidence: f64,
    draws: u32,
    seed: u64,
    uncertainty: Uncertainty,
) -> Result<serde_json::Value, String> {
    if draws == 0 || draws > MAX_DRAWS {
        return Err(format!("--draws: need 1 to {MAX_DRAWS} draws, got {draws}"));
    }
    let mut buf = vec![T::ZERO; draws as usize];
    let b = zone
        .yield_bound(
            mean,
            cov,
            m,
            T::from_f64(confidence),
            uncertainty,
            &mut Xoshiro128::new(seed),
            &mut buf,
        )
        .map_err(|e| match e {
            BoundError::TooFewSamples => format!("--baseline-size: {e}"),
            BoundError::BadConfidence => format!("--confidence: {e}"),
            _ => e.to_string(),
        })?;
    Ok(json!({
        "inside_lower": b.inside_lower.to_f64(),
        "ppm_outside_upper": b.outside_upper.to_f64() * 1e6,
        "confidence": confidence,
        "baseline_size": m,
        "draws": draws,
        "seed": seed,
        "covariance": match uncertainty {
            Uncertainty::MeanOnly => "known",
            Uncertainty::MeanAndCovariance => "estimated",
        },
        "bound_method": BOUND_METHOD,
    }))
}

/// Parses `n` comma-separated numbers (`inf`, `-inf` allowed) for option `name`.
pub fn numbers(name: &str, text: &str, n: usize) -> Result<Vec<f64>, String> {
    let parts: Vec<&str> = text.split(',').map(str::trim).collect();
    if parts.len() != n {
        return Err(format!(
            "--{name}: expected {n} comma-separated numbers, got {} in {text:?}",
            parts.len()
        ));
    }
    parts
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let v: f64 = p
                .parse()
                .map_err(|_| format!("--{name}: item {} ({p:?}) is not a number", k + 1))?;
            if v.is_nan() {
                return Err(format!("--{name}: item {} is NaN", k + 1));
            }
            Ok(v)
        })
        .collect()
}

fn finite(name: &str, v: &[f64]) -> Result<(), String> {
    match v.iter().position(|x| !x.is_finite()) {
        Some(k) => Err(format!("--{name}: item {} must be finite", k + 1)),
        None => Ok(()),
    }
}

fn evaluate<T: Precision>(
    a: &Args,
    mean: &[f64],
    cov: &[f64],
) -> Result<serde_json::Value, String> {
    let t = T::from_f64;
    let m = [t(mean[0]), t(mean[1])];
    let c = Covariance::from_matrix([[t(cov[0]), t(cov[1])], [t(cov[1]), t(cov[2])]]);
    let (zone, kind): (Zone<T>, &str) = if let Some(r) = &a.rect {
        let v = numbers("rect", r, 4)?;
        let z = RectZone::new([t(v[0]), t(v[2])], [t(v[1]), t(v[3])])
            .map_err(|e| format!("--rect: {e} (need XLO < XHI and YLO < YHI)"))?;
        (Zone::Rect(z), "rect")
    } else if let Some(r) = &a.circle {
        let v = numbers("circle", r, 3)?;
        finite("circle", &v)?;
        let z = CircleZone::new([t(v[0]), t(v[1])], t(v[2]))
            .map_err(|e| format!("--circle: {e} (need DIAMETER > 0)"))?;
        (Zone::Circle(z), "circle")
    } else if let Some(r) = &a.ellipse {
        let v = numbers("ellipse", r, 5)?;
        finite("ellipse", &v)?;
        let z = EllipseZone::new([t(v[0]), t(v[1])], t(v[2]), t(v[3]), t(v[4].to_radians()))
            .map_err(|e| format!("--ellipse: {e} (need A > 0 and B > 0)"))?;
        (Zone::Ellipse(z), "ellipse")
    } else {
        return Err("one of --rect, --circle, --ellipse is required".into());
    };
    let y = zone.probability(&m, &c).map_err(|_| {
        "--cov: covariance is not positive definite (need SXX > 0, SYY > 0, SXY^2 < SXX SYY)"
            .to_string()
    })?;
    let b = zone.bounds(&m, &c).map_err(|e| e.to_string())?;
    if a.baseline_size.is_none() {
        let stray = [
            (a.confidence.is_some(), "--confidence"),
            (a.draws != DEFAULT_DRAWS, "--draws"),
            (a.seed != 1, "--seed"),
            (a.known_covariance, "--known-covariance"),
        ];
        if let Some((_, name)) = stray.iter().find(|(given, _)| *given) {
            return Err(format!("{name}: needs --baseline-size"));
        }
    }
    let uncertainty = if a.known_covariance {
        Uncertainty::MeanOnly
    } else {
        Uncertainty::MeanAndCovariance
    };
    let bound = match a.baseline_size {
        Some(size) => Some(bound_fields(
            &zone,
            &m,
            &c,
            size,
            a.confidence.unwrap_or(0.95),
            a.draws,
            a.seed,
            uncertainty,
        )?),
        None => None,
    };
    let cap = y.capability();
    let f = |v: T| v.to_f64();
    let index = f(cap.index);
    let mut out = json!({
        "zone": kind,
        "precision": a.precision,
        "inside": f(y.inside),
        "outside": f(y.outside),
        "ppm_outside": f(cap.ppm),
        "equivalent_index": if index.is_finite() { json!(index) } else { json!(index.to_string()) },
        "lower_bound": f(b.inside_lower),
        "upper_bound": f(b.inside_upper),
        "outside_lower_bound": f(b.outside_lower),
        "outside_upper_bound": f(b.outside_upper),
        "method": match kind {
            "rect" => "bivariate normal orthants (Genz 2004 in f64, Drezner-Wesolowsky 1990 in f32); outside from the tails directly",
            _ => "principal axes, 1-D Gauss-Legendre over the minor axis with u = R sin t; outside from the tails directly",
        },
        "bounds": "lower/upper bound the inside probability without quadrature: half-planes, Bonferroni, inscribed Mahalanobis ellipse",
        "equivalent_index_definition": "Phi^-1(1 - outside) / 3",
    });
    if let (Some(serde_json::Value::Object(extra)), Some(obj)) = (bound, out.as_object_mut()) {
        obj.extend(extra);
    }
    Ok(out)
}

/// Computes the zone probability; `Err` carries the one-line message.
pub fn run(a: &Args) -> Result<serde_json::Value, String> {
    let mean = numbers("mean", &a.mean, 2)?;
    finite("mean", &mean)?;
    let cov = numbers("cov", &a.cov, 3)?;
    finite("cov", &cov)?;
    match a.precision.as_str() {
        "f64" => evaluate::<f64>(a, &mean, &cov),
        "f32" => evaluate::<f32>(a, &mean, &cov),
        other => Err(format!("--precision: {other:?} is not f32 or f64")),
    }
}
