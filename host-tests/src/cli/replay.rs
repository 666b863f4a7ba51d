//! `covgate replay`: a recorded capture through the device's code, to a folder of results.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use serde::Deserialize;
use serde_json::json;

use crate::figure::{self, Figure};
use crate::replay::{self, ChartSpec, Outcome, Settings, ZoneSpec};

/// Arguments of `covgate replay`.
#[derive(clap::Args, Debug, Default, Clone)]
pub struct Args {
    /// The capture: CSV with a header row.
    #[arg(value_name = "CAPTURE.csv")]
    pub capture: PathBuf,
    /// Folder for verdicts.csv, summary.json, figure.svg and figure.png (created if needed).
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Measurement columns, comma separated (default x,y; 1 to 6 names).
    #[arg(long, value_name = "X,Y")]
    pub columns: Option<String>,
    /// Baseline size M (default 50).
    #[arg(long, value_name = "M")]
    pub learn: Option<u32>,
    /// Gate false-alarm rate (default 0.0027).
    #[arg(long, value_name = "A")]
    pub alpha: Option<f64>,
    /// Rectangle zone XLO,XHI,YLO,YHI (-inf / inf for an absent limit).
    #[arg(long, value_name = "XLO,XHI,YLO,YHI", allow_hyphen_values = true)]
    pub rect: Option<String>,
    /// Positional-tolerance circle CX,CY,DIAMETER.
    #[arg(long, value_name = "CX,CY,DIAMETER", allow_hyphen_values = true)]
    pub circle: Option<String>,
    /// Ellipse zone CX,CY,A,B,ANGLE_DEG.
    #[arg(long, value_name = "CX,CY,A,B,ANGLE_DEG", allow_hyphen_values = true)]
    pub ellipse: Option<String>,
    /// Drift chart: mewma:LAMBDA[:H] or mcusum:K[:H]; without H, H gives an in-control ARL
    /// of 370 samples.
    #[arg(long, value_name = "mewma:LAMBDA | mcusum:K")]
    pub chart: Option<String>,
    /// Acknowledge every alarm at once, to see every alarm (the device latches the first).
    #[arg(long)]
    pub acknowledge: bool,
    /// Confidence level of the yield bounds in summary.json (`inside_lower`,
    /// `ppm_outside_upper`, with a zone); default 0.95.
    #[arg(long, value_name = "C", allow_hyphen_values = true)]
    pub confidence: Option<f64>,
    /// Settings from a TOML file (keys as the long flags); flags given here win.
    #[arg(long, value_name = "FILE.toml")]
    pub config: Option<PathBuf>,
}

#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct FileConfig {
    out: Option<PathBuf>,
    columns: Option<String>,
    learn: Option<u32>,
    alpha: Option<f64>,
    rect: Option<String>,
    circle: Option<String>,
    ellipse: Option<String>,
    chart: Option<String>,
    acknowledge: Option<bool>,
    confidence: Option<f64>,
}

/// The capture's measurement columns and the columns carried through.
pub struct Capture {
    /// Header names.
    pub header: Vec<String>,
    /// Indices of the measurement columns.
    pub picked: Vec<usize>,
    /// Measurement values per row.
    pub values: Vec<Vec<f64>>,
    /// All raw fields per row (for carrying through).
    pub raw: Vec<Vec<String>>,
}

/// Reads a capture; errors name file, line and column.
pub fn read_capture(path: &Path, columns: &[String]) -> Result<Capture, String> {
    let name = path.display().to_string();
    let mut rdr = csv::ReaderBuilder::new()
        .has_headers(true)
        .trim(csv::Trim::All)
        .from_path(path)
        .map_err(|e| format!("{name}: {e}"))?;
    let header: Vec<String> = rdr
        .headers()
        .map_err(|e| format!("{name}:1: {e}"))?
        .iter()
        .map(str::to_string)
        .collect();
    let mut picked = Vec::new();
    for c in columns {
        match header.iter().position(|h| h == c) {
            Some(i) => picked.push(i),
            None => {
                return Err(format!(
                    "{name}: no column {c:?}; the columns are {}",
                    header
                        .iter()
                        .map(|h| format!("{h:?}"))
                        .collect::<Vec<_>>()
                        .join(", ")
                ))
            }
        }
    }
    let (mut values, mut raw) = (Vec::new(), Vec::new());
    for rec in rdr.records() {
        let rec = rec.map_err(|e| match e.position() {
            Some(p) => format!("{name}:{}: {}", p.line(), csv_reason(&e)),
            None => format!("{name}: {e}"),
        })?;
        let line = rec.position().map_or(0, |p| p.line());
        let mut row = Vec::with_capacity(picked.len());
        for &i in &picked {
            let field = rec.get(i).unwrap_or("");
            let v: f64 = field.parse().map_err(|_| {
                format!(
                    "{name}:{line}:{}: {:?} in column {:?} is not a number",
                    i + 1,
                    field,
                    header[i]
                )
            })?;
            // Finite in f64 is not enough: the device computes in f32.
            if !(v as f32).is_finite() {
                return Err(format!(
                    "{name}:{line}:{}: {:?} in column {:?} is not finite",
                    i + 1,
                    field,
                    header[i]
                ));
            }
            row.push(v);
        }
        values.push(row);
        raw.push(rec.iter().map(str::to_string).collect());
    }
    Ok(Capture {
        header,
        picked,
        values,
        raw,
    })
}

fn csv_reason(e: &csv::Error) -> String {
    match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => {
            format!("{len} fields where the header has {expected_len}")
        }
        _ => e.to_string(),
    }
}

fn zone_of(
    rect: &Option<String>,
    circle: &Option<String>,
    ellipse: &Option<String>,
) -> Result<Option<ZoneSpec>, String> {
    use super::zone::numbers;
    let given = [rect.is_some(), circle.is_some(), ellipse.is_some()]
        .iter()
        .filter(|b| **b)
        .count();
    if given > 1 {
        return Err("give at most one of --rect, --circle, --ellipse".into());
    }
    let fixed =
        |v: Vec<f64>| -> [f64; 5] { std::array::from_fn(|i| v.get(i).copied().unwrap_or(0.0)) };
    Ok(if let Some(r) = rect {
        let v = numbers("rect", r, 4)?;
        Some(ZoneSpec::Rect([v[0], v[1], v[2], v[3]]))
    } else if let Some(c) = circle {
        let v = numbers("circle", c, 3)?;
        Some(ZoneSpec::Circle([v[0], v[1], v[2]]))
    } else if let Some(e) = ellipse {
        Some(ZoneSpec::Ellipse(fixed(numbers("ellipse", e, 5)?)))
    } else {
        None
    })
}

fn chart_of(spec: &str, dim: usize) -> Result<ChartSpec, String> {
    let parts: Vec<&str> = spec.split(':').collect();
    let num = |k: usize| -> Result<Option<f64>, String> {
        match parts.get(k) {
            None => Ok(None),
            Some(s) => s
                .parse()
                .map(Some)
                .map_err(|_| format!("--chart {spec}: {s:?} is not a number")),
        }
    };
    let p = num(1)?
        .ok_or_else(|| format!("--chart {spec}: expected mewma:LAMBDA[:H] or mcusum:K[:H]"))?;
    let h = num(2)?;
    if parts.len() > 3 {
        return Err(format!("--chart {spec}: too many parts"));
    }
    let mut a = super::limits::Args {
        chart: parts[0].to_string(),
        dim: dim as u32,
        arl0: Some(370.0),
        seed: 20261201,
        runs: 4000,
        ..Default::default()
    };
    match parts[0] {
        "mewma" => {
            let h = match h {
                Some(h) => h,
                None => {
                    a.lambda = Some(p);
                    super::limits::run(&a)?["h"].as_f64().unwrap_or(f64::NAN)
                }
            };
            Ok(ChartSpec::Mewma { lambda: p, h })
        }
        "mcusum" => {
            let h = match h {
                Some(h) => h,
                None => {
                    a.k = Some(p);
                    super::limits::run(&a)?["h"].as_f64().unwrap_or(f64::NAN)
                }
            };
            Ok(ChartSpec::Mcusum { k: p, h })
        }
        other => Err(format!("--chart {other:?}: expected mewma or mcusum")),
    }
}

/// Resolved settings: file config under flags.
pub struct Resolved {
    /// Output folder.
    pub out: PathBuf,
    /// Column names.
    pub columns: Vec<String>,
    /// Engine settings (chart resolved later, it needs the dimension).
    pub settings: Settings,
    chart: Option<String>,
}

/// Merges the TOML file (if any) under the flags.
pub fn resolve(a: &Args) -> Result<Resolved, String> {
    let file = match &a.config {
        Some(p) => {
            let text = std::fs::read_to_string(p).map_err(|e| format!("{}: {e}", p.display()))?;
            toml::from_str::<FileConfig>(&text).map_err(|e| {
                let start = e.span().map_or(0, |s| s.start).min(text.len());
                let line = text[..start].matches('\n').count() + 1;
                format!("{}:{line}: {}", p.display(), super::first_line(e.message()))
            })?
        }
        None => FileConfig::default(),
    };
    let out = a.out.clone().or(file.out).ok_or("--out DIR is required")?;
    let columns: Vec<String> = a
        .columns
        .clone()
        .or(file.columns)
        .unwrap_or_else(|| "x,y".into())
        .split(',')
        .map(|s| s.trim().to_string())
        .collect();
    let learn = a.learn.or(file.learn).unwrap_or(50);
    let alpha = a.alpha.or(file.alpha).unwrap_or(0.0027);
    if !(alpha > 0.0 && alpha < 1.0) {
        return Err(format!("--alpha {alpha} must lie strictly between 0 and 1"));
    }
    let confidence = a.confidence.or(file.confidence).unwrap_or(0.95);
    if !(confidence > 0.0 && confidence < 1.0) {
        return Err(format!(
            "--confidence {confidence} must lie strictly between 0 and 1"
        ));
    }
    let flag_zone = a.rect.is_some() || a.circle.is_some() || a.ellipse.is_some();
    let zone = if flag_zone {
        zone_of(&a.rect, &a.circle, &a.ellipse)?
    } else {
        zone_of(&file.rect, &file.circle, &file.ellipse)?
    };
    Ok(Resolved {
        out,
        columns,
        settings: Settings {
            learn,
            alpha,
            zone,
            chart: None,
            acknowledge: a.acknowledge || file.acknowledge.unwrap_or(false),
            confidence,
        },
        chart: a.chart.clone().or(file.chart),
    })
}

/// Runs the replay and writes the folder; returns the summary.
pub fn run(a: &Args) -> Result<serde_json::Value, String> {
    let mut r = resolve(a)?;
    let cap = read_capture(&a.capture, &r.columns)?;
    let dim = r.columns.len();
    if let Some(c) = &r.chart {
        r.settings.chart = Some(chart_of(c, dim)?);
    }
    let bar = indicatif::ProgressBar::new(cap.values.len() as u64);
    if !std::io::stderr().is_terminal() {
        bar.set_draw_target(indicatif::ProgressDrawTarget::hidden());
    }
    let outcome = by_dim!(dim, D => {
        let samples: Vec<[f32; D]> = cap
            .values
            .iter()
            .map(|v| std::array::from_fn(|i| v[i] as f32))
            .collect();
        replay::run_with_progress::<D>(&samples, &r.settings, |_| bar.inc(1))
    }, n => Err(format!("--columns: {n} columns; 1 to 6 are supported")))?;
    bar.finish_and_clear();
    let summary = summary_json(&a.capture, &r, &outcome);
    write_folder(&r.out, &cap, &outcome, &r, &summary)?;
    Ok(summary)
}

fn summary_json(capture: &Path, r: &Resolved, o: &Outcome) -> serde_json::Value {
    json!({
        "capture": capture.display().to_string(),
        "columns": r.columns,
        "samples": o.rows.len(),
        "monitored": o.monitored,
        "baseline": {
            "size": r.settings.learn,
            "screened_out": o.screened_out,
            "mean": o.mean,
            "cov": o.cov,
        },
        "gate": { "alpha": r.settings.alpha, "limit_d2": o.gate_limit },
        "chart": r.settings.chart.map(|c| match c {
            ChartSpec::Mewma { lambda, h } => json!({"kind": "mewma", "lambda": lambda, "h": h}),
            ChartSpec::Mcusum { k, h } => json!({"kind": "mcusum", "k": k, "h": h}),
        }),
        "inside_predicted": o.inside_predicted,
        "ppm_outside_predicted": o.ppm_outside_predicted,
        "inside_lower": o.bound.map(|b| b.inside_lower),
        "ppm_outside_upper": o.bound.map(|b| b.ppm_outside_upper),
        "bound": o.bound.map(|b| json!({
            "confidence": r.settings.confidence,
            "baseline_size": b.size,
            "draws": crate::replay::BOUND_DRAWS,
            "seed": crate::replay::BOUND_SEED,
            "method": super::zone::BOUND_METHOD,
        })),
        "out_of_zone": o.out_of_zone,
        "out_of_family": o.out_of_family,
        "alarms": o.rows.iter().filter(|r| r.alarm).count(),
        "first_alarm": o.first_alarm,
    })
}

/// Writes every file under a temporary name first, then renames them all: an error leaves
/// nothing half-written.
fn write_folder(
    dir: &Path,
    cap: &Capture,
    o: &Outcome,
    r: &Resolved,
    summary: &serde_json::Value,
) -> Result<(), String> {
    std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    let tmp = dir.join(format!(".covgate-partial-{}", std::process::id()));
    std::fs::create_dir_all(&tmp).map_err(|e| format!("{}: {e}", tmp.display()))?;
    let result = (|| -> Result<(), String> {
        let mut w = csv::Writer::from_path(tmp.join("verdicts.csv")).map_err(|e| e.to_string())?;
        let carried: Vec<usize> = (0..cap.header.len())
            .filter(|i| !cap.picked.contains(i))
            .collect();
        let mut head = vec![
            "index",
            "verdict",
            "reason",
            "d2",
            "chart_statistic",
            "alarm",
        ]
        .into_iter()
        .map(String::from)
        .collect::<Vec<_>>();
        head.extend(
            cap.picked
                .iter()
                .chain(&carried)
                .map(|&i| cap.header[i].clone()),
        );
        w.write_record(&head).map_err(|e| e.to_string())?;
        let num = |v: Option<f64>| v.map_or(String::new(), |x| format!("{x}"));
        for (k, (row, raw)) in o.rows.iter().zip(&cap.raw).enumerate() {
            let mut rec = vec![
                k.to_string(),
                row.verdict.to_string(),
                row.reason.clone(),
                num(row.d2),
                num(row.statistic),
                u8::from(row.alarm).to_string(),
            ];
            rec.extend(
                cap.picked
                    .iter()
                    .chain(&carried)
                    .map(|&i| raw.get(i).cloned().unwrap_or_default()),
            );
            w.write_record(&rec).map_err(|e| e.to_string())?;
        }
        w.flush().map_err(|e| e.to_string())?;
        let text = serde_json::to_string_pretty(summary).map_err(|e| e.to_string())?;
        std::fs::write(tmp.join("summary.json"), text + "\n").map_err(|e| e.to_string())?;
        let points: Vec<[f64; 2]> = cap
            .values
            .iter()
            .map(|v| [v[0], v.get(1).copied().unwrap_or(0.0)])
            .collect();
        let names = [
            r.columns[0].as_str(),
            r.columns.get(1).map_or("", String::as_str),
        ];
        let title = format!("replay of {}", cap_name(&summary["capture"]));
        figure::write(
            &tmp,
            &Figure {
                points: &points,
                outcome: o,
                zone: r.settings.zone,
                names,
                title: &title,
            },
        )?;
        for f in ["verdicts.csv", "summary.json", "figure.svg", "figure.png"] {
            std::fs::rename(tmp.join(f), dir.join(f))
                .map_err(|e| format!("{}: {e}", dir.join(f).display()))?;
        }
        Ok(())
    })();
    let _ = std::fs::remove_dir_all(&tmp);
    result
}

/// `folder/file` of the capture path, for the figure title.
fn cap_name(v: &serde_json::Value) -> String {
    let p = Path::new(v.as_str().unwrap_or(""));
    let file = p
        .file_name()
        .map(|f| f.to_string_lossy().into_owned())
        .unwrap_or_default();
    match p.parent().and_then(|d| d.file_name()) {
        Some(d) => format!("{}/{file}", d.to_string_lossy()),
        None => file,
    }
}
