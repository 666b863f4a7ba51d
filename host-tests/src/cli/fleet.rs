//! `covgate fleet`: decode report frames from files, merge per node and across the fleet.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use covgate::report::frame_len;
use covgate::ReportFrame2;
use serde_json::json;

/// Arguments of `covgate fleet`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Files of raw frames (one or more 64-byte frames each), or folders of such files.
    #[arg(required = true, value_name = "DIR_OR_FILES")]
    pub paths: Vec<PathBuf>,
}

/// Files named on the command line, folders expanded to their files (sorted by name).
fn files(paths: &[PathBuf]) -> Result<Vec<PathBuf>, String> {
    let mut out = Vec::new();
    for p in paths {
        if p.is_dir() {
            let mut v: Vec<PathBuf> = std::fs::read_dir(p)
                .map_err(|e| format!("{}: {e}", p.display()))?
                .filter_map(|e| e.ok().map(|e| e.path()))
                .filter(|p| p.is_file())
                .collect();
            v.sort();
            out.extend(v);
        } else if p.is_file() {
            out.push(p.clone());
        } else {
            return Err(format!("{}: no such file or folder", p.display()));
        }
    }
    Ok(out)
}

/// A good frame and its byte offset.
pub type Found = (usize, ReportFrame2);
/// A damaged stretch: byte offset, length, the first error seen in it.
pub type Damage = (usize, usize, String);

/// Frames found in one file, and the damaged stretches.
pub fn scan(bytes: &[u8]) -> (Vec<Found>, Vec<Damage>) {
    let len = frame_len(2);
    let (mut good, mut bad) = (Vec::new(), Vec::new());
    let mut at = 0;
    let mut bad_start: Option<(usize, String)> = None;
    while at < bytes.len() {
        match ReportFrame2::decode(&bytes[at..]) {
            Ok(f) => {
                if let Some((s, e)) = bad_start.take() {
                    bad.push((s, at - s, e));
                }
                good.push((at, f));
                at += len;
            }
            Err(e) => {
                if bad_start.is_none() {
                    bad_start = Some((at, e.to_string()));
                }
                // Resynchronise byte by byte: frames may have been lost or cut anywhere.
                at += 1;
            }
        }
    }
    if let Some((s, e)) = bad_start {
        bad.push((s, bytes.len() - s, e));
    }
    (good, bad)
}

fn summary(f: &ReportFrame2) -> serde_json::Value {
    let m = &f.moments;
    let cov = m.sample_covariance().map(|c| *c.matrix()).ok();
    json!({
        "count": m.count(),
        "mean": m.mean().ok(),
        "cov": cov,
        "go": f.go,
        "nogo": f.nogo,
        "alarms": f.alarms,
    })
}

/// Decodes, reports damage on stderr (file and byte offset), merges, returns the JSON.
pub fn run(a: &Args) -> Result<serde_json::Value, String> {
    let mut per_node: BTreeMap<u16, Vec<ReportFrame2>> = BTreeMap::new();
    let (mut frames, mut damaged) = (0usize, 0usize);
    for path in files(&a.paths)? {
        let bytes = std::fs::read(&path).map_err(|e| format!("{}: {e}", path.display()))?;
        let (good, bad) = scan(&bytes);
        for (offset, n, e) in bad {
            eprintln!("{}: byte {offset}: {e}; skipped {n} bytes", display(&path));
            damaged += 1;
        }
        for (_, f) in good {
            frames += 1;
            per_node.entry(f.node).or_default().push(f);
        }
    }
    let mut nodes = Vec::new();
    let mut fleet: Option<ReportFrame2> = None;
    let mut in_alarm = 0;
    for (node, mut list) in per_node {
        list.sort_by_key(|f| f.seq);
        list.dedup_by_key(|f| f.seq);
        let latest_alarm = list.last().and_then(|f| f.alarm);
        let mut acc = list[0];
        for f in &list[1..] {
            acc.merge(f).map_err(|e| format!("node {node}: {e}"))?;
        }
        in_alarm += usize::from(latest_alarm.is_some());
        let mut s = summary(&acc);
        s["node"] = json!(node);
        s["frames"] = json!(list.len());
        s["alarm"] = json!(latest_alarm.map(|c| format!("{c:?}")));
        nodes.push(s);
        match &mut fleet {
            None => fleet = Some(acc),
            Some(f) => f.merge(&acc).map_err(|e| format!("fleet: {e}"))?,
        }
    }
    let mut overall = fleet.as_ref().map(summary).unwrap_or(json!(null));
    if let Some(o) = overall.as_object_mut() {
        o.insert("nodes_in_alarm".into(), json!(in_alarm));
    }
    Ok(json!({
        "frames": frames,
        "damaged_stretches": damaged,
        "nodes": nodes,
        "fleet": overall,
        "method": "frames merged per node (duplicates by sequence number dropped) with the pairwise moment formula, then across nodes",
    }))
}

fn display(p: &Path) -> String {
    p.display().to_string()
}
