//! `covgate limits`: which limit a given gate or chart setting means.

use covgate::math::{phase1_limit, phase2_limit, ChiSquare, LimitError};
use serde_json::json;

use crate::arl;
use crate::seeded::Rng;

/// Arguments of `covgate limits`.
#[derive(clap::Args, Debug, Default)]
pub struct Args {
    /// Which limit: the Mahalanobis gate / Hotelling T^2 (t2), or a drift chart.
    #[arg(long, value_name = "t2|mewma|mcusum|dispersion", default_value = "t2")]
    pub chart: String,
    /// Dimension of the measurement (1 to 6).
    #[arg(long = "dim", value_name = "P")]
    pub dim: u32,
    /// False-alarm rate per sample, strictly between 0 and 1 (t2).
    #[arg(long = "alpha", value_name = "A", allow_negative_numbers = true)]
    pub alpha: Option<f64>,
    /// Number of individual observations behind an estimated baseline: adds the exact Phase I
    /// and Phase II limits (t2).
    #[arg(long = "baseline", value_name = "M")]
    pub baseline: Option<u32>,
    /// Smoothing constant in (0, 1] (mewma, dispersion).
    #[arg(long, value_name = "L", allow_negative_numbers = true)]
    pub lambda: Option<f64>,
    /// Reference value k >= 0 (mcusum).
    #[arg(long, value_name = "K", allow_negative_numbers = true)]
    pub k: Option<f64>,
    /// Target in-control average run length, at least 2 (mewma, mcusum, dispersion).
    #[arg(long, value_name = "A", allow_negative_numbers = true)]
    pub arl0: Option<f64>,
    /// Simulation seed (mcusum, dispersion).
    #[arg(long, default_value_t = 20261201)]
    pub seed: u64,
    /// Simulated runs for the final ARL estimate (mcusum, dispersion).
    #[arg(long, default_value_t = 20000)]
    pub runs: u32,
}

fn explain(e: LimitError, a: &Args) -> String {
    match e {
        LimitError::BadDimension => format!("--dim {} is outside 1..6", a.dim),
        LimitError::BadProbability => format!(
            "--alpha {} must lie strictly between 0 and 1",
            a.alpha.unwrap_or(f64::NAN)
        ),
        LimitError::BaselineTooSmall => format!(
            "--baseline {} is too small for --dim {}: Phase I needs M > P + 1",
            a.baseline.unwrap_or(0),
            a.dim
        ),
        other => other.to_string(),
    }
}

fn need(v: Option<f64>, name: &str, chart: &str) -> Result<f64, String> {
    v.ok_or_else(|| format!("--chart {chart} needs --{name}"))
}

/// Computes the limits; `Err` carries the one-line message.
pub fn run(a: &Args) -> Result<serde_json::Value, String> {
    ChiSquare::new(a.dim).map_err(|e| explain(e, a))?;
    match a.chart.as_str() {
        "t2" => t2(a),
        "mewma" | "mcusum" | "dispersion" => chart(a),
        other => Err(format!(
            "--chart {other:?} is not t2, mewma, mcusum or dispersion"
        )),
    }
}

fn t2(a: &Args) -> Result<serde_json::Value, String> {
    let alpha = need(a.alpha, "alpha", "t2")?;
    let chi2: f64 = ChiSquare::new(a.dim)
        .map_err(|e| explain(e, a))?
        .quantile_upper(alpha)
        .map_err(|e| explain(e, a))?;
    let mut out = json!({
        "chart": "t2",
        "dim": a.dim,
        "alpha": alpha,
        "coverage": 1.0 - alpha,
        "chi2": chi2,
        "method": "chi2: quantile of chi-square with dim degrees of freedom (closed-form tail, safeguarded Newton)",
    });
    if let Some(m) = a.baseline {
        let p1: f64 = phase1_limit(a.dim, m, alpha).map_err(|e| explain(e, a))?;
        let p2: f64 = phase2_limit(a.dim, m, alpha).map_err(|e| explain(e, a))?;
        out["baseline"] = json!(m);
        out["phase1"] = json!(p1);
        out["phase2"] = json!(p2);
        out["method"] = json!(
            "chi2: chi-square quantile; phase1: (m-1)^2/m * Beta(1-alpha; p/2, (m-p-1)/2) \
             (Tracy, Young & Mason 1992); phase2: p(m+1)(m-1)/(m^2-mp) * F(1-alpha; p, m-p) \
             (NIST/SEMATECH e-Handbook 6.5.4.3)"
        );
    }
    Ok(out)
}

/// Markov-chain states for the MEWMA (the ARL moves by under 0.1 % from 200 to 400 states).
const STATES: usize = 300;
/// Runs per evaluation while searching for h by simulation (common random numbers).
const SEARCH_RUNS: u32 = 10000;

fn chart(a: &Args) -> Result<serde_json::Value, String> {
    let name = a.chart.as_str();
    let target = need(a.arl0, "arl0", name)?;
    if !(2.0..=1e5).contains(&target) {
        return Err(format!("--arl0 {target} must lie between 2 and 100000"));
    }
    let p = a.dim;
    match name {
        "mewma" => {
            let lambda = need(a.lambda, "lambda", name)?;
            if !(lambda > 0.0 && lambda <= 1.0) {
                return Err(format!("--lambda {lambda} must lie in (0, 1]"));
            }
            let h = arl::limit_for(target, 1e-3, 20.0, 1e-7, |h| {
                arl::mewma_arl0(p, lambda, h, STATES)
            })?;
            Ok(json!({
                "chart": "mewma", "dim": p, "lambda": lambda, "arl0_target": target,
                "h": h, "arl0": arl::mewma_arl0(p, lambda, h, STATES),
                "method": format!("Markov chain on |Z|^2 (Runger & Prabhu 1996), {STATES} states, asymptotic covariance lambda/(2-lambda); h by bisection"),
            }))
        }
        "mcusum" | "dispersion" => {
            let (param, pname) = if name == "mcusum" {
                (need(a.k, "k", name)?, "k")
            } else {
                (need(a.lambda, "lambda", name)?, "lambda")
            };
            let bad = if name == "mcusum" {
                !(0.0..10.0).contains(&param)
            } else {
                !(param > 0.0 && param <= 1.0)
            };
            if bad {
                return Err(format!("--{pname} {param} is out of range"));
            }
            if a.runs < 100 {
                return Err(format!("--runs {} must be at least 100", a.runs));
            }
            let cap = (target * 50.0) as u32;
            let sim = |h: f64, runs: u32, seed: u64| -> (f64, f64) {
                let mut rng = Rng::from_seed(seed);
                match (name, p) {
                    ("mcusum", _) => dispatch_mcusum(p, &mut rng, runs, cap, param, h),
                    _ => dispatch_dispersion(p, &mut rng, runs, cap, param, h),
                }
            };
            let floor = if name == "mcusum" {
                0.01
            } else {
                f64::from(p) * 1.0001
            };
            let h = arl::limit_for(target, floor, floor + 10.0, 1e-4, |h| {
                sim(h, SEARCH_RUNS, a.seed).0
            })?;
            let (arl0, se) = sim(h, a.runs, a.seed ^ 0x5EED);
            let mut out = json!({
                "chart": name, "dim": p, "arl0_target": target, "h": h,
                "arl0": arl0, "arl0_se": se, "runs": a.runs, "seed": a.seed,
                "method": format!("seeded simulation of covgate's own chart: h by bisection on {SEARCH_RUNS} runs with common random numbers (seed {}), then arl0 from {} independent runs (seed {} xor 0x5EED), capped at {cap} samples", a.seed, a.runs, a.seed),
            });
            out[pname] = json!(param);
            Ok(out)
        }
        _ => unreachable!("checked by run"),
    }
}

fn dispatch_mcusum(p: u32, rng: &mut Rng, runs: u32, cap: u32, k: f64, h: f64) -> (f64, f64) {
    // `run` checked p in 1..=6, so the fallback is never taken.
    by_dim!(p, D => arl::simulate::<D>(rng, runs, cap, [0.0; D], arl::mcusum_chart::<D>(k, h)), _ => (f64::NAN, f64::NAN))
}

fn dispatch_dispersion(
    p: u32,
    rng: &mut Rng,
    runs: u32,
    cap: u32,
    lambda: f64,
    h: f64,
) -> (f64, f64) {
    by_dim!(p, D => arl::simulate::<D>(rng, runs, cap, [0.0; D], arl::dispersion_chart::<D>(lambda, h)), _ => (f64::NAN, f64::NAN))
}
