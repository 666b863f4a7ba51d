//! `covgate limits`: which limit a given gate setting means.

use covgate::math::{phase1_limit, phase2_limit, ChiSquare, LimitError};
use serde_json::json;

/// Arguments of `covgate limits`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Dimension of the measurement (1 to 6).
    #[arg(long = "dim", value_name = "P")]
    pub dim: u32,
    /// False-alarm rate per sample, strictly between 0 and 1.
    #[arg(long = "alpha", value_name = "A", allow_negative_numbers = true)]
    pub alpha: f64,
    /// Number of individual observations behind an estimated baseline: adds the exact Phase I
    /// and Phase II limits.
    #[arg(long = "baseline", value_name = "M")]
    pub baseline: Option<u32>,
}

fn explain(e: LimitError, a: &Args) -> String {
    match e {
        LimitError::BadDimension => format!("--dim {} is outside 1..6", a.dim),
        LimitError::BadProbability => {
            format!("--alpha {} must lie strictly between 0 and 1", a.alpha)
        }
        LimitError::BaselineTooSmall => format!(
            "--baseline {} is too small for --dim {}: Phase I needs M > P + 1",
            a.baseline.unwrap_or(0),
            a.dim
        ),
        other => other.to_string(),
    }
}

/// Computes the limits; `Err` carries the one-line message.
pub fn run(a: &Args) -> Result<serde_json::Value, String> {
    let chi = ChiSquare::new(a.dim).map_err(|e| explain(e, a))?;
    let chi2: f64 = chi.quantile_upper(a.alpha).map_err(|e| explain(e, a))?;
    let mut out = json!({
        "dim": a.dim,
        "alpha": a.alpha,
        "coverage": 1.0 - a.alpha,
        "chi2": chi2,
        "method": "chi2: quantile of chi-square with dim degrees of freedom (closed-form tail, safeguarded Newton)",
    });
    if let Some(m) = a.baseline {
        let p1: f64 = phase1_limit(a.dim, m, a.alpha).map_err(|e| explain(e, a))?;
        let p2: f64 = phase2_limit(a.dim, m, a.alpha).map_err(|e| explain(e, a))?;
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
