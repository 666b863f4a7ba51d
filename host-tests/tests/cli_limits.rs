//! The `covgate limits` command as a user runs it: JSON on stdout, one-line errors, exit 2.

fn run(args: &[&str]) -> (i32, String, String) {
    covgate_host::process::run(env!("CARGO_BIN_EXE_covgate"), args)
}

#[test]
fn limits_prints_the_chi_square_and_phase_limits() {
    let (code, stdout, stderr) = run(&[
        "limits",
        "--dim",
        "2",
        "--alpha",
        "0.01",
        "--baseline",
        "20",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let v: serde_json::Value = serde_json::from_str(stdout.trim()).unwrap();
    assert_eq!(v["dim"], 2);
    assert_eq!(v["alpha"], 0.01);
    // df = 2 exact form: -2 ln(alpha) (docs/REFERENCES.md, exact).
    let chi2 = v["chi2"].as_f64().unwrap();
    assert!((chi2 - (-2.0 * 0.01f64.ln())).abs() < 1e-12);
    // Values from fixtures/limits/phase.csv (mpmath, 50 digits): p 2, m 20, alpha 0.01.
    assert!((v["phase2"].as_f64().unwrap() - 13.328_605_717_141_172).abs() < 1e-10);
    assert!((v["phase1"].as_f64().unwrap() - 7.550_150_150_479_28).abs() < 1e-10);
    let (code, stdout, _) = run(&["limits", "--dim", "4", "--alpha", "0.05"]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(stdout.trim()).unwrap();
    // NIST/SEMATECH e-Handbook 1.3.6.7.4: df 4, upper 0.05: 9.488.
    assert!((v["chi2"].as_f64().unwrap() - 9.488).abs() < 5e-4);
    assert!(v.get("phase1").is_none());
}

#[test]
fn chart_limits_for_a_target_arl() {
    // Prabhu & Runger (1997), from memory, confirmed by watch_checks: p = 2, lambda = 0.1,
    // ARL0 200 -> h = 8.64.
    let (code, stdout, stderr) = run(&[
        "limits", "--chart", "mewma", "--dim", "2", "--lambda", "0.1", "--arl0", "200",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let v: serde_json::Value = serde_json::from_str(stdout.trim()).unwrap();
    assert!((v["h"].as_f64().unwrap() / 8.64 - 1.0).abs() < 0.03);
    assert!((v["arl0"].as_f64().unwrap() / 200.0 - 1.0).abs() < 0.001);
    assert!(v["method"].as_str().unwrap().contains("Markov chain"));
    // Crosier (1988), from memory, confirmed by watch_checks: p = 2, k = 0.5 -> h = 5.5.
    let (code, stdout, stderr) = run(&[
        "limits", "--chart", "mcusum", "--dim", "2", "--k", "0.5", "--arl0", "200", "--runs",
        "4000",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let v: serde_json::Value = serde_json::from_str(stdout.trim()).unwrap();
    assert!((v["h"].as_f64().unwrap() / 5.5 - 1.0).abs() < 0.03, "{v}");
    let se = v["arl0_se"].as_f64().unwrap();
    assert!(
        (v["arl0"].as_f64().unwrap() - 200.0).abs() < 4.0 * se + 4.0,
        "{v}"
    );
    assert!(v["method"].as_str().unwrap().contains("simulation"));
}

#[test]
fn bad_arguments_give_one_line_and_exit_two() {
    for args in [
        &["limits", "--dim", "7", "--alpha", "0.01"][..],
        &["limits", "--dim", "0", "--alpha", "0.01"],
        &["limits", "--dim", "2", "--alpha", "1"],
        &["limits", "--dim", "2", "--alpha", "0"],
        &["limits", "--dim", "2", "--alpha", "-0.5"],
        &["limits", "--dim", "2", "--alpha", "nan"],
        &["limits", "--dim", "3", "--alpha", "0.01", "--baseline", "4"],
        &["limits", "--dim", "two", "--alpha", "0.01"],
        &["limits", "--alpha", "0.01"],
        &["limits", "--dim", "2", "--alpha", "0.01", "--bogus"],
        &["limits", "--dim", "2"],
        &["limits", "--chart", "mewma", "--dim", "2", "--arl0", "200"],
        &[
            "limits", "--chart", "mewma", "--dim", "2", "--lambda", "1.5", "--arl0", "200",
        ],
        &[
            "limits", "--chart", "mcusum", "--dim", "2", "--k", "0.5", "--arl0", "1",
        ],
        &["limits", "--chart", "ewma3", "--dim", "2", "--arl0", "200"],
        &[
            "limits",
            "--chart",
            "dispersion",
            "--dim",
            "2",
            "--lambda",
            "1",
            "--arl0",
            "2",
            "--runs",
            "200",
        ],
    ] {
        let (code, stdout, stderr) = run(args);
        assert_eq!(code, 2, "{args:?}: {stderr}");
        assert!(stdout.is_empty(), "{args:?}: {stdout}");
        assert_eq!(stderr.trim_end().lines().count(), 1, "{args:?}: {stderr:?}");
        assert!(stderr.starts_with("covgate: "), "{args:?}: {stderr:?}");
    }
}
