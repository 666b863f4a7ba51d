//! `covgate zone`: what-if yield of a tolerance zone for a given mean and covariance.

use covgate::math::{Precision, Xoshiro128};
use covgate::{
    BallZone, BoundError, BoxZone, CircleZone, Covariance, EllipseZone, EllipsoidZone, RectZone,
    Uncertainty, Zone, ZoneError,
};
use serde_json::json;

/// Arguments of `covgate zone`.
#[derive(clap::Args, Debug)]
#[command(group(clap::ArgGroup::new("shape").required(true).args(["rect", "circle", "ellipse", "box_zone", "ball", "ellipsoid"])))]
pub struct Args {
    /// Process mean: MX,MY (2-D) or M1,...,MN for the N-D zones (N = 1..6).
    #[arg(long, value_name = "MX,MY", allow_hyphen_values = true)]
    pub mean: String,
    /// Process covariance: SXX,SXY,SYY (2-D), or its upper triangle row by row,
    /// N (N + 1) / 2 values, for the N-D zones.
    #[arg(long, value_name = "SXX,SXY,SYY", allow_hyphen_values = true)]
    pub cov: String,
    /// Box in N dimensions: LO1,HI1,...,LON,HIN; -inf / inf mark an absent limit.
    #[arg(long = "box", value_name = "LO1,HI1,...", allow_hyphen_values = true)]
    pub box_zone: Option<String>,
    /// Ball in N dimensions (spherical positional tolerance): C1,...,CN,DIAMETER.
    #[arg(long, value_name = "C1,...,CN,DIAMETER", allow_hyphen_values = true)]
    pub ball: Option<String>,
    /// Ellipsoid (x - c)' Q^-1 (x - c) <= 1: C1,...,CN then Q's upper triangle row by row.
    #[arg(
        long,
        value_name = "C1,...,CN,Q11,Q12,...,QNN",
        allow_hyphen_values = true
    )]
    pub ellipsoid: Option<String>,
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

/// Terms of room for the ball and ellipsoid series on the host (two slots each).
const SERIES_TERMS: usize = 20_000;

/// An N-D zone (`--box`, `--ball`, `--ellipsoid`) at dimension `N`.
// The covariance's triangle fills the matrix by its indices.
#[allow(clippy::needless_range_loop)]
fn evaluate_nd<T: Precision, const N: usize, const L: usize>(
    a: &Args,
    mean: &[f64],
    cov: &[f64],
) -> Result<serde_json::Value, String> {
    let t = T::from_f64;
    let m: [T; N] = std::array::from_fn(|i| t(mean[i]));
    let mut c = [[T::ZERO; N]; N];
    let mut k = 0;
    for i in 0..N {
        for j in i..N {
            c[i][j] = t(cov[k]);
            c[j][i] = t(cov[k]);
            k += 1;
        }
    }
    let c = Covariance::from_matrix(c);
    let not_pd = || {
        "--cov: covariance is not positive definite (upper triangle row by row, N (N + 1) / 2 values)"
            .to_string()
    };
    let mut scratch = vec![T::ZERO; 2 * SERIES_TERMS];
    let (kind, inside, outside, error, method, bounds) = if let Some(r) = &a.box_zone {
        let v = numbers("box", r, 2 * N)?;
        let lo: [T; N] = std::array::from_fn(|i| t(v[2 * i]));
        let hi: [T; N] = std::array::from_fn(|i| t(v[2 * i + 1]));
        let z =
            BoxZone::new(lo, hi).map_err(|e| format!("--box: {e} (need LO < HI on every axis)"))?;
        let y = z.probability(&m, &c).map_err(|e| match e {
            ZoneError::Unsupported => {
                format!("--box: the probability of a {N}-D box is not available yet (N <= 3)")
            }
            _ => not_pd(),
        })?;
        let method = if N == 3 {
            "trivariate normal by Plackett's reduction to a 1-D integral (Gauss-Legendre); outside from the tails directly"
        } else {
            "normal tails (1-D) or bivariate normal orthants (2-D); outside from the tails directly"
        };
        let b = z.bounds(&m, &c).map_err(|_| not_pd())?;
        ("box", y.inside, y.outside, None, method, b)
    } else if let Some(r) = &a.ball {
        let v = numbers("ball", r, N + 1)?;
        finite("ball", &v)?;
        let z = BallZone::new(std::array::from_fn(|i| t(v[i])), t(v[N]))
            .map_err(|e| format!("--ball: {e} (need DIAMETER > 0)"))?;
        let e = z.probability(&m, &c, &mut scratch).map_err(|_| not_pd())?;
        let b = z.bounds(&m, &c, &mut scratch).map_err(|_| not_pd())?;
        ("ball", e.inside, e.outside, Some(e.error), SERIES_METHOD, b)
    } else if let Some(r) = &a.ellipsoid {
        let v = numbers("ellipsoid", r, N + L)?;
        finite("ellipsoid", &v)?;
        let q: [T; L] = std::array::from_fn(|i| t(v[N + i]));
        let z =
            EllipsoidZone::<T, N, L>::new(std::array::from_fn(|i| t(v[i])), q).map_err(|e| {
                format!("--ellipsoid: {e} (need Q positive definite, upper triangle row by row)")
            })?;
        let e = z.probability(&m, &c, &mut scratch).map_err(|_| not_pd())?;
        let b = z.bounds(&m, &c, &mut scratch).map_err(|_| not_pd())?;
        (
            "ellipsoid",
            e.inside,
            e.outside,
            Some(e.error),
            SERIES_METHOD,
            b,
        )
    } else {
        return Err("one of --box, --ball, --ellipsoid is required".into());
    };
    let y = covgate::Yield { inside, outside };
    let cap = y.capability();
    let index = cap.index.to_f64();
    Ok(json!({
        "zone": kind,
        "dim": N,
        "precision": a.precision,
        "inside": inside.to_f64(),
        "outside": outside.to_f64(),
        "ppm_outside": cap.ppm.to_f64(),
        "equivalent_index": if index.is_finite() { json!(index) } else { json!(index.to_string()) },
        "error_estimate": error.map(|e| e.to_f64()),
        "lower_bound": bounds.inside_lower.to_f64(),
        "upper_bound": bounds.inside_upper.to_f64(),
        "outside_lower_bound": bounds.outside_lower.to_f64(),
        "outside_upper_bound": bounds.outside_upper.to_f64(),
        "method": method,
        "bounds": if kind == "box" {
            "lower/upper bound the inside probability from the per-axis tails alone (Boole's inequality)"
        } else {
            "lower/upper bound the inside probability by the isotropic forms with the extreme eigenvalues"
        },
        "equivalent_index_definition": "Phi^-1(1 - outside) / 3",
    }))
}

/// Method line of the ball and ellipsoid probabilities.
const SERIES_METHOD: &str = "quadratic form in normal variables as Ruben's (1962) series of chi-square distributions, all terms positive; outside from the upper tails; error_estimate bounds what the cut series leaves open";

/// `--box`, `--ball` or `--ellipsoid`: the dimension comes from `--mean`.
fn run_nd(a: &Args) -> Result<serde_json::Value, String> {
    let n = a.mean.split(',').count();
    if !(1..=6).contains(&n) {
        return Err(format!("--mean: N-D zones take 1 to 6 values, got {n}"));
    }
    let mean = numbers("mean", &a.mean, n)?;
    finite("mean", &mean)?;
    let cov = numbers("cov", &a.cov, n * (n + 1) / 2)?;
    finite("cov", &cov)?;
    if a.baseline_size.is_some() {
        return Err(
            "--baseline-size: confidence bounds for N-D zones are not available yet".into(),
        );
    }
    macro_rules! at {
        ($n:literal, $l:literal) => {
            match a.precision.as_str() {
                "f64" => evaluate_nd::<f64, $n, $l>(a, &mean, &cov),
                "f32" => evaluate_nd::<f32, $n, $l>(a, &mean, &cov),
                other => Err(format!("--precision: {other:?} is not f32 or f64")),
            }
        };
    }
    match n {
        1 => at!(1, 1),
        2 => at!(2, 3),
        3 => at!(3, 6),
        4 => at!(4, 10),
        5 => at!(5, 15),
        _ => at!(6, 21),
    }
}

/// Computes the zone probability; `Err` carries the one-line message.
pub fn run(a: &Args) -> Result<serde_json::Value, String> {
    if a.box_zone.is_some() || a.ball.is_some() || a.ellipsoid.is_some() {
        return run_nd(a);
    }
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
