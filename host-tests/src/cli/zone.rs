//! `covgate zone`: what-if yield of a tolerance zone for a given mean and covariance.

use covgate::math::Precision;
use covgate::{CircleZone, Covariance, EllipseZone, RectZone, Zone};
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
    let cap = y.capability();
    let f = |v: T| v.to_f64();
    let index = f(cap.index);
    Ok(json!({
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
    }))
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
