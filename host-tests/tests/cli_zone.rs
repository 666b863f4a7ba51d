//! The `covgate zone` command as a user runs it.

fn run(args: &[&str]) -> (i32, String, String) {
    covgate_host::process::run(env!("CARGO_BIN_EXE_covgate"), args)
}

fn json(args: &[&str]) -> serde_json::Value {
    let (code, stdout, stderr) = run(args);
    assert_eq!(code, 0, "{args:?}: {stderr}");
    serde_json::from_str(stdout.trim()).unwrap()
}

#[test]
fn zone_prints_yield_ppm_and_bounds() {
    // Rayleigh (exact): circular normal sigma 1 centred on the circle, radius 2:
    // outside = exp(-2).
    let v = json(&[
        "zone", "--mean", "0,0", "--cov", "1,0,1", "--circle", "0,0,4",
    ]);
    let out = (-2.0f64).exp();
    assert!((v["outside"].as_f64().unwrap() - out).abs() < 1e-14);
    assert!((v["inside"].as_f64().unwrap() - (1.0 - out)).abs() < 1e-14);
    assert!((v["ppm_outside"].as_f64().unwrap() - out * 1e6).abs() < 1e-7);
    let (lo, hi) = (
        v["lower_bound"].as_f64().unwrap(),
        v["upper_bound"].as_f64().unwrap(),
    );
    assert!(lo <= 1.0 - out && 1.0 - out <= hi);
    // A one-sided rectangle, independent axes: product of normal intervals. Upper limit in y
    // absent: P(X < 3) * P(-3 < Y) = Phi(3)^2; Phi(3) = 0.998650101968370 (common practice,
    // 15 digits).
    let v = json(&[
        "zone",
        "--mean",
        "0,0",
        "--cov",
        "1,0,1",
        "--rect",
        "-inf,3,-3,inf",
    ]);
    let p = 0.998_650_101_968_370_f64;
    assert!((v["inside"].as_f64().unwrap() - p * p).abs() < 1e-14);
    let v32 = json(&[
        "zone",
        "--mean",
        "0,0",
        "--cov",
        "1,0,1",
        "--rect",
        "-inf,3,-3,inf",
        "--precision",
        "f32",
    ]);
    assert!((v32["inside"].as_f64().unwrap() - p * p).abs() < 2e-6);
    assert_eq!(v32["precision"], "f32");
    // Ellipse equal to the circle above.
    let v = json(&[
        "zone",
        "--mean",
        "0,0",
        "--cov",
        "1,0,1",
        "--ellipse",
        "0,0,2,2,30",
    ]);
    assert!((v["outside"].as_f64().unwrap() - out).abs() < 1e-14);
}

#[test]
fn zone_confidence_bounds_from_a_baseline_size() {
    let base = [
        "zone",
        "--mean",
        "4,-3",
        "--cov",
        "64,19.2,36",
        "--circle",
        "0,0,60",
    ];
    let with = |extra: &[&str]| {
        let mut a = base.to_vec();
        a.extend_from_slice(extra);
        json(&a)
    };
    let plain = json(&base);
    assert!(
        plain.get("inside_lower").is_none(),
        "no bound without --baseline-size"
    );
    let v = with(&[
        "--baseline-size",
        "30",
        "--confidence",
        "0.95",
        "--draws",
        "2000",
    ]);
    let (inside, lower) = (
        v["inside"].as_f64().unwrap(),
        v["inside_lower"].as_f64().unwrap(),
    );
    let (ppm, upper) = (
        v["ppm_outside"].as_f64().unwrap(),
        v["ppm_outside_upper"].as_f64().unwrap(),
    );
    assert!(lower < inside && upper > ppm, "{v}");
    assert!(((1.0 - lower) * 1e6 - upper).abs() < 1e-6 * upper);
    // Same seed, same answer; more samples, a tighter bound; a higher level, a lower bound.
    assert_eq!(
        v,
        with(&[
            "--baseline-size",
            "30",
            "--confidence",
            "0.95",
            "--draws",
            "2000"
        ])
    );
    let big = with(&["--baseline-size", "300", "--draws", "2000"]);
    assert!(big["inside_lower"].as_f64().unwrap() > lower);
    let strict = with(&[
        "--baseline-size",
        "30",
        "--confidence",
        "0.99",
        "--draws",
        "2000",
    ]);
    assert!(strict["inside_lower"].as_f64().unwrap() < lower);
    let known = with(&[
        "--baseline-size",
        "30",
        "--known-covariance",
        "--draws",
        "2000",
    ]);
    assert!(known["inside_lower"].as_f64().unwrap() > lower);
    assert_eq!(known["covariance"], "known");
}

#[test]
fn zone_errors_are_one_line_exit_two() {
    for args in [
        &[
            "zone", "--mean", "0,0", "--cov", "1,2,1", "--circle", "0,0,1",
        ][..],
        &[
            "zone", "--mean", "0,0", "--cov", "1,0,1", "--rect", "1,0,0,1",
        ],
        &[
            "zone", "--mean", "0,x", "--cov", "1,0,1", "--circle", "0,0,1",
        ],
        &[
            "zone", "--mean", "0,0,0", "--cov", "1,0,1", "--circle", "0,0,1",
        ],
        &["zone", "--mean", "0,0", "--cov", "1,0,1"],
        &[
            "zone", "--mean", "0,0", "--cov", "1,0,1", "--circle", "0,0,-1",
        ],
        &[
            "zone", "--mean", "0,0", "--cov", "1,0,1", "--circle", "0,0,inf",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--ellipse",
            "0,0,1,0,10",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--precision",
            "f16",
        ],
        &[
            "zone", "--mean", "nan,0", "--cov", "1,0,1", "--circle", "0,0,1",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--baseline-size",
            "2",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--baseline-size",
            "20",
            "--confidence",
            "1",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--baseline-size",
            "20",
            "--confidence",
            "-0.5",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--confidence",
            "0.9",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--baseline-size",
            "20",
            "--draws",
            "0",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--baseline-size",
            "20",
            "--draws",
            "4000000000",
        ],
        &[
            "zone", "--mean", "0,0", "--cov", "1,0,1", "--circle", "0,0,1", "--draws", "100",
        ],
        &[
            "zone",
            "--mean",
            "0,0",
            "--cov",
            "1,0,1",
            "--circle",
            "0,0,1",
            "--known-covariance",
        ],
    ] {
        let (code, stdout, stderr) = run(args);
        assert_eq!(code, 2, "{args:?}: {stderr}");
        assert!(stdout.is_empty());
        assert_eq!(stderr.trim_end().lines().count(), 1, "{args:?}: {stderr:?}");
    }
}

#[test]
fn zone_in_n_dimensions() {
    // Isotropic 3-D process centred in a ball of radius 2 sd: chi-square with 3 degrees of
    // freedom at 4, P = 0.7385358700508894 (scipy.stats.chi2.cdf(4, 3), confirmed by the
    // closed form erf(sqrt 2) - sqrt(8 / pi) e^-2 at 1e-16).
    let exact = libm::erf(2f64.sqrt()) - (8.0 / std::f64::consts::PI).sqrt() * (-2.0f64).exp();
    let v = json(&[
        "zone",
        "--mean",
        "1,2,3",
        "--cov",
        "1,0,0,1,0,1",
        "--ball",
        "1,2,3,4",
    ]);
    assert_eq!(
        (v["zone"].as_str(), v["dim"].as_u64()),
        (Some("ball"), Some(3))
    );
    assert!((v["inside"].as_f64().unwrap() - exact).abs() < 1e-14, "{v}");
    assert!((v["outside"].as_f64().unwrap() - (1.0 - exact)).abs() < 1e-14);
    assert!(v["error_estimate"].as_f64().unwrap() < 1e-12);
    // Isotropic: the brackets close on the value.
    let (lo, hi) = (
        v["lower_bound"].as_f64().unwrap(),
        v["upper_bound"].as_f64().unwrap(),
    );
    assert!(
        lo <= exact + 1e-14 && exact <= hi + 1e-14 && hi - lo < 1e-12,
        "{v}"
    );
    // The same ball as an ellipsoid Q = 4 I.
    let e = json(&[
        "zone",
        "--mean",
        "1,2,3",
        "--cov",
        "1,0,0,1,0,1",
        "--ellipsoid",
        "1,2,3,4,0,0,4,0,4",
    ]);
    assert!((e["inside"].as_f64().unwrap() - exact).abs() < 1e-14, "{e}");
    // Independent axes, a 3-D box: the product of normal intervals.
    let box3 = [
        "zone",
        "--mean",
        "0,0,0",
        "--cov",
        "1,0,0,4,0,9",
        "--box",
        "-1,1,-inf,2,-3,inf",
    ];
    let b = json(&box3);
    let phi = |x: f64| 0.5 * libm::erfc(-x / 2f64.sqrt());
    let want = (phi(1.0) - phi(-1.0)) * phi(1.0) * (1.0 - phi(-1.0));
    assert!((b["inside"].as_f64().unwrap() - want).abs() < 1e-14, "{b}");
    assert!(b["error_estimate"].is_null());
    let (lo, hi) = (
        b["lower_bound"].as_f64().unwrap(),
        b["upper_bound"].as_f64().unwrap(),
    );
    assert!(lo <= want && want <= hi, "{b}");
    // f32 follows f64.
    let b32 = json(&[&box3[..], &["--precision", "f32"]].concat());
    assert!((b32["inside"].as_f64().unwrap() - want).abs() < 2e-6);
    // Bad input: one line on stderr, exit 2, nothing on stdout.
    for line in [
        "zone --mean 0,0,0 --cov 1,0,0,1,0 --ball 0,0,0,1",
        "zone --mean 0,0,0 --cov 1,2,0,1,0,1 --ball 0,0,0,1",
        "zone --mean 0,0,0 --cov 1,0,0,1,0,1 --ball 0,0,1",
        "zone --mean 0,0,0,0 --cov 1,0,0,0,1,0,0,1,0,1 --box 0,1,0,1,0,1,0,1",
        "zone --mean 0,0,0,0,0,0,0 --cov 1 --ball 0,1",
        "zone --mean 0,0,0 --cov 1,0,0,1,0,1 --ellipsoid 0,0,0,1,2,0,1,0,1",
        "zone --mean 0,0,0 --cov 1,0,0,1,0,1 --ball 0,0,0,1 --baseline-size 30",
    ] {
        let args: Vec<&str> = line.split_whitespace().collect();
        let (code, stdout, stderr) = run(&args);
        assert_eq!(code, 2, "{args:?}");
        assert!(
            stdout.is_empty() && stderr.lines().count() == 1,
            "{args:?}: {stderr}"
        );
    }
}
