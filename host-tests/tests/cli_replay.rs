//! `covgate replay` and `covgate demo` end to end: known answers, every error path, valid
//! figure files, and the committed demo captures equal to their generator.

use std::path::{Path, PathBuf};

use covgate_host::seeded::Rng;

fn covgate(args: &[&str]) -> (i32, String, String) {
    covgate_host::process::run(env!("CARGO_BIN_EXE_covgate"), args)
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("covgate-replay-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// In control for `n0` samples, then the mean moves by `shift` (in sd) on x; x sd 2, y sd 1.
fn capture(dir: &Path, n0: usize, n: usize, shift: f64) -> PathBuf {
    let mut rng = Rng::from_seed(4242);
    let mut s = String::from("t,x,y,note\n");
    for k in 0..n {
        let step = if k >= n0 { shift * 2.0 } else { 0.0 };
        s += &format!(
            "{k},{:.4},{:.4},n{k}\n",
            10.0 + 2.0 * rng.normal() + step,
            -5.0 + rng.normal()
        );
    }
    let p = dir.join("capture.csv");
    std::fs::write(&p, s).unwrap();
    p
}

fn summary(dir: &Path) -> serde_json::Value {
    serde_json::from_str(&std::fs::read_to_string(dir.join("summary.json")).unwrap()).unwrap()
}

#[test]
fn a_step_shift_is_alarmed_and_counts_match_a_direct_count() {
    let d = scratch("step");
    let cap = capture(&d, 150, 260, 1.5);
    let out = d.join("out");
    let (code, _, err) = covgate(&[
        "replay",
        cap.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--learn",
        "100",
        "--circle",
        "10,-5,12",
        "--chart",
        "mewma:0.2:14.0",
    ]);
    assert_eq!(code, 0, "{err}");
    let s = summary(&out);
    // MEWMA lambda 0.2: after a 1.5 sd step its out-of-control ARL is a few samples (common
    // practice; our own watch_checks measure 10 samples at noncentrality 1); allow 40.
    let first = s["first_alarm"].as_u64().expect("an alarm") as usize;
    assert!((150..190).contains(&first), "first alarm at {first}");
    // out_of_zone equals a direct count over the monitored samples of the CSV.
    let text = std::fs::read_to_string(&cap).unwrap();
    let direct = text
        .lines()
        .skip(1 + 100)
        .filter(|l| {
            let f: Vec<f64> = l
                .split(',')
                .skip(1)
                .take(2)
                .map(|v| v.parse().unwrap())
                .collect();
            let (dx, dy) = ((f[0] as f32) - 10.0, (f[1] as f32) + 5.0);
            4.0 * (dx * dx + dy * dy) > 144.0
        })
        .count();
    assert_eq!(s["out_of_zone"].as_u64().unwrap() as usize, direct);
    assert_eq!(s["samples"], 260);
    assert!(s["inside_predicted"].as_f64().unwrap() > 0.0);
    // The 95 % confidence bounds from the 100-sample baseline bracket the point estimate.
    let (inside, lower) = (
        s["inside_predicted"].as_f64().unwrap(),
        s["inside_lower"].as_f64().unwrap(),
    );
    assert!(lower < inside, "{lower} vs {inside}");
    assert!(
        s["ppm_outside_upper"].as_f64().unwrap() > s["ppm_outside_predicted"].as_f64().unwrap()
    );
    assert_eq!(s["bound"]["confidence"], 0.95);
    assert_eq!(
        s["bound"]["baseline_size"].as_u64().unwrap(),
        100 - s["baseline"]["screened_out"].as_u64().unwrap()
    );
    // verdicts.csv: one row per sample plus the header, the note column carried through.
    let v = std::fs::read_to_string(out.join("verdicts.csv")).unwrap();
    assert_eq!(v.lines().count(), 261);
    assert!(
        v.lines().next().unwrap().ends_with("x,y,t,note"),
        "{}",
        v.lines().next().unwrap()
    );
    assert!(v.lines().nth(1).unwrap().contains(",learning,"));
    // The figures are a real SVG and a real PNG of the stated size.
    let svg = std::fs::read_to_string(out.join("figure.svg")).unwrap();
    assert!(svg.starts_with("<svg") && svg.trim_end().ends_with("</svg>"));
    let png = std::fs::File::open(out.join("figure.png")).unwrap();
    let info = png::Decoder::new(png).read_info().unwrap();
    assert_eq!((info.info().width, info.info().height), (900, 920));
    std::fs::remove_dir_all(&d).unwrap();
}

#[test]
fn errors_name_file_line_and_column_and_write_nothing() {
    let d = scratch("errors");
    let cap = d.join("bad.csv");
    std::fs::write(&cap, "t,x,y\n0,1.0,2.0\n1,1.5,oops\n2,1.0,2.0\n").unwrap();
    let out = d.join("out");
    let (code, stdout, err) = covgate(&[
        "replay",
        cap.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(code, 2);
    assert!(stdout.is_empty());
    assert!(
        err.contains("bad.csv:3:3:") && err.contains("oops"),
        "{err}"
    );
    assert_eq!(err.lines().count(), 1);
    assert!(!out.join("summary.json").exists() && !out.join("verdicts.csv").exists());
    // A missing column names the ones that exist.
    let (code, _, err) = covgate(&[
        "replay",
        cap.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--columns",
        "x,z",
    ]);
    assert_eq!(code, 2);
    assert!(
        err.contains("no column \"z\"") && err.contains("\"t\", \"x\", \"y\""),
        "{err}"
    );
    // A short row.
    std::fs::write(&cap, "t,x,y\n0,1.0,2.0\n1,1.5\n").unwrap();
    let (code, _, err) = covgate(&[
        "replay",
        cap.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(code, 2);
    assert!(err.contains("bad.csv:3:"), "{err}");
    // Other bad input: each one line, exit 2, nothing written.
    let good = capture(&d, 1000, 80, 0.0);
    for args in [
        vec!["--learn", "200"], // more than the capture holds
        vec!["--alpha", "1.5"],
        vec!["--confidence", "1"],
        vec!["--confidence", "-0.1"],
        vec!["--circle", "0,0,-1"],
        vec!["--chart", "ewma:0.1"],
        vec!["--chart", "mewma:x"],
        vec!["--circle", "0,0,1", "--rect", "0,1,0,1"],
        vec!["--columns", "x,y,t,x,y,t,x"],
        vec!["--config", "/nonexistent/cfg.toml"],
    ] {
        let mut a = vec![
            "replay",
            good.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ];
        a.extend(args.iter());
        let (code, _, err) = covgate(&a);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "{args:?}: {err}");
        assert!(!out.join("summary.json").exists(), "{args:?} wrote output");
    }
    std::fs::remove_dir_all(&d).unwrap();
}

#[test]
fn settings_come_from_toml_and_flags_win() {
    let d = scratch("toml");
    let cap = capture(&d, 1000, 120, 0.0);
    let out = d.join("out");
    let cfg = d.join("cfg.toml");
    std::fs::write(
        &cfg,
        format!(
            "out = {:?}\nlearn = 40\nalpha = 0.01\ncircle = \"10,-5,30\"\n",
            out.display().to_string()
        ),
    )
    .unwrap();
    let (code, _, err) = covgate(&[
        "replay",
        cap.to_str().unwrap(),
        "--config",
        cfg.to_str().unwrap(),
        "--learn",
        "60",
    ]);
    assert_eq!(code, 0, "{err}");
    let s = summary(&out);
    assert_eq!(s["baseline"]["size"], 60, "the flag wins");
    assert_eq!(s["gate"]["alpha"], 0.01, "the file gives alpha");
    assert!(s["out_of_zone"].is_u64(), "the file gives the zone");
    std::fs::write(&cfg, "learnn = 40\n").unwrap();
    let (code, _, err) = covgate(&[
        "replay",
        cap.to_str().unwrap(),
        "--config",
        cfg.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(code, 2);
    assert!(
        err.contains("cfg.toml:1:") && err.contains("learnn"),
        "{err}"
    );
    std::fs::remove_dir_all(&d).unwrap();
}

#[test]
fn the_demo_runs_end_to_end_and_its_captures_are_committed() {
    for s in covgate_host::demo::all() {
        let p = Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("../fixtures/demo")
            .join(format!("{}.csv", s.name));
        let committed = std::fs::read_to_string(&p).unwrap();
        assert_eq!(
            committed,
            s.csv,
            "{} differs from its generator: cargo run -p covgate-host --example demo_captures",
            p.display()
        );
    }
    let d = scratch("demo");
    let (code, stdout, err) = covgate(&["demo", "--out", d.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&stdout).unwrap();
    for s in v["scenarios"].as_array().unwrap() {
        let name = s["scenario"].as_str().unwrap();
        for f in [
            "capture.csv",
            "verdicts.csv",
            "summary.json",
            "figure.svg",
            "figure.png",
        ] {
            assert!(d.join(name).join(f).exists(), "{name}/{f}");
        }
        let sum = &s["summary"];
        println!("\ndemo {name}: {} samples, first alarm {}, alarms {}, out of family {}, out of zone {}, predicted ppm outside {}",
            sum["samples"], sum["first_alarm"], sum["alarms"], sum["out_of_family"], sum["out_of_zone"], sum["ppm_outside_predicted"]);
        // What README.md says of each demo, sample by sample (indices count from 0): the
        // alarms before the drift starts (false alarms), the first alarm after it, and the
        // tolerance and gate counts the text quotes.
        let verdicts = std::fs::read_to_string(d.join(name).join("verdicts.csv")).unwrap();
        let mut lines = verdicts.lines();
        let header: Vec<&str> = lines.next().unwrap().split(',').collect();
        let (ci, ca) = (
            header.iter().position(|&h| h == "index").unwrap(),
            header.iter().position(|&h| h == "alarm").unwrap(),
        );
        let alarms: Vec<u64> = lines
            .filter_map(|l| {
                let f: Vec<&str> = l.split(',').collect();
                (f[ca] != "0" && !f[ca].is_empty()).then(|| f[ci].parse().unwrap())
            })
            .collect();
        assert_eq!(alarms.len() as u64, sum["alarms"].as_u64().unwrap());
        let (onset, before, first_after) = match name {
            "drilling-cell" => (249, vec![234u64], 299u64),
            "footbridge-tilt" => (299, vec![169u64], 358u64),
            other => panic!("unknown demo {other}"),
        };
        let false_alarms: Vec<u64> = alarms.iter().copied().filter(|&i| i < onset).collect();
        assert_eq!(false_alarms, before, "{name}: alarms before the drift");
        assert_eq!(
            alarms.iter().copied().find(|&i| i >= onset),
            Some(first_after),
            "{name}: first alarm after the drift starts"
        );
        let monitored = sum["monitored"].as_u64().unwrap();
        let out_of_family = sum["out_of_family"].as_u64().unwrap();
        if name == "drilling-cell" {
            assert_eq!((sum["out_of_zone"].as_u64(), monitored), (Some(2), 300));
            let ppm = sum["ppm_outside_predicted"].as_f64().unwrap();
            let upper = sum["ppm_outside_upper"].as_f64().unwrap();
            assert_eq!((ppm.round(), upper.round()), (28.0, 243.0));
        } else {
            // "most single readings stay inside the gate"
            assert!(
                2 * out_of_family < monitored,
                "{out_of_family} of {monitored}"
            );
        }
    }
    std::fs::remove_dir_all(&d).unwrap();
}
