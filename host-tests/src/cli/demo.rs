//! `covgate demo`: the bundled scenarios end to end.

use std::path::PathBuf;

use clap::Parser;
use serde_json::json;

use crate::demo;

/// Arguments of `covgate demo`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Folder for the outputs (one subfolder per scenario).
    #[arg(long, value_name = "DIR", default_value = "covgate-demo")]
    pub out: PathBuf,
}

#[derive(Parser)]
struct ReplayOnly {
    #[command(flatten)]
    args: super::replay::Args,
}

/// Writes each scenario's capture and replays it; returns a summary of all.
pub fn run(a: &Args) -> Result<serde_json::Value, String> {
    let mut results = Vec::new();
    for s in demo::all() {
        let dir = a.out.join(s.name);
        std::fs::create_dir_all(&dir).map_err(|e| format!("{}: {e}", dir.display()))?;
        let capture = dir.join("capture.csv");
        std::fs::write(&capture, &s.csv).map_err(|e| format!("{}: {e}", capture.display()))?;
        let mut argv = vec![
            "replay".to_string(),
            capture.display().to_string(),
            "--out".into(),
            dir.display().to_string(),
        ];
        argv.extend(s.flags.iter().map(|f| f.to_string()));
        let parsed =
            ReplayOnly::try_parse_from(&argv).map_err(|e| super::first_line(&e.to_string()))?;
        let summary = super::replay::run(&parsed.args)?;
        eprintln!("{}: {}", s.name, s.story);
        results.push(json!({ "scenario": s.name, "folder": dir.display().to_string(), "story": s.story, "summary": summary }));
    }
    Ok(json!({ "out": a.out.display().to_string(), "scenarios": results }))
}
