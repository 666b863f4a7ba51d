//! Chi-square, Phase I and Phase II limits against published values and a committed mpmath
//! reference (`fixtures/limits/`, regenerate with `python3 fixtures/limits/generate.py`).
//!
//! `cargo test -p covgate-host --test limits_reference -- --nocapture` prints the worst errors.

use covgate::math::{phase1_limit, phase2_limit, ChiSquare, Real};
use covgate::CHI2_LIMITS;
use covgate_host::compare::{assert_close, Tol};
use covgate_host::fixture;

fn rel_err(got: f64, want: f64) -> f64 {
    if got == want {
        0.0
    } else {
        ((got - want) / want).abs()
    }
}

#[test]
fn nist_chi_square_upper_critical_values() {
    // NIST/SEMATECH e-Handbook 1.3.6.7.4, upper critical values of the chi-square
    // distribution, 3 decimals: (df, upper-tail 0.05, upper-tail 0.01).
    let table = [
        (2, 5.991, 9.210),
        (3, 7.815, 11.345),
        (4, 9.488, 13.277),
        (5, 11.070, 15.086),
        (6, 12.592, 16.812),
    ];
    for (df, q05, q01) in table {
        let c = ChiSquare::new(df).unwrap();
        for (alpha, want) in [(0.05, q05), (0.01, q01)] {
            let got: f64 = c.quantile_upper(alpha).unwrap();
            assert_close(&format!("df {df} alpha {alpha}"), got, want, Tol::abs(5e-4));
            let got32: f32 = c.quantile_upper(alpha as f32).unwrap();
            assert_close("f32", f64::from(got32), want, Tol::abs(5e-4));
        }
    }
}

#[test]
fn chi_square_matches_mpmath() {
    let file = "limits/chi2.csv";
    let (mut worst64, mut worst32) = ([0.0f64; 3], [0.0f64; 3]);
    for row in fixture::rows(file) {
        let kind: String = row.get(file, 0);
        let df: u32 = row.get(file, 1);
        let arg: f64 = row.get(file, 2);
        let want: f64 = row.get(file, 3);
        let c = ChiSquare::new(df).unwrap();
        let (k, got64, got32) = match kind.as_str() {
            "quantile_upper" => (
                0,
                c.quantile_upper(arg).unwrap(),
                f64::from(c.quantile_upper(arg as f32).unwrap()),
            ),
            "upper" => (1, c.upper(arg), f64::from(c.upper(arg as f32))),
            "cdf" => (2, c.cdf(arg), f64::from(c.cdf(arg as f32))),
            other => panic!("{file}:{}: unknown kind {other}", row.line),
        };
        let at = format!("{file}:{} {kind} df {df} at {arg}", row.line);
        // f64: 1e-12 relative (the target; the method is good to a few ulp).
        Tol::rel(1e-12).check(&at, got64, want).unwrap();
        worst64[k] = worst64[k].max(rel_err(got64, want));
        // f32: 1e-5 relative wherever the value is a normal f32. The argument is rounded to
        // f32 before the f32 function sees it, so the propagated input rounding
        // (relative rounding times |d ln value / d ln arg|) is allowed on top.
        if want.abs() > 1e-30 {
            let input_rounding = (f64::from(arg as f32) - arg).abs() / arg;
            let propagated = input_rounding * sensitivity(&kind, df, arg, want);
            Tol::rel(1e-5 + propagated)
                .check(&format!("{at} (f32)"), got32, want)
                .unwrap();
            worst32[k] = worst32[k].max(rel_err(got32, want) - propagated);
        }
    }
    println!(
        "\nchi-square vs mpmath, worst relative error (f32: beyond the propagated rounding of"
    );
    println!("the argument to f32, which for alpha = 0.9999 alone moves 1 - alpha by 3e-4)");
    for (k, name) in ["quantile_upper", "upper tail", "cdf"].iter().enumerate() {
        println!("{name:<15} f64 {:.2e}   f32 {:.2e}", worst64[k], worst32[k]);
    }
}

/// |d ln(value) / d ln(arg)|: how much a relative change of the argument moves the value.
fn sensitivity(kind: &str, df: u32, arg: f64, value: f64) -> f64 {
    let c = ChiSquare::new(df).unwrap();
    match kind {
        // q(alpha): d ln q / d ln alpha = -alpha / (q f(q)).
        "quantile_upper" => (arg / (value * c.pdf(value))).abs(),
        // Q(x) and P(x): x f(x) / value.
        _ => (arg * c.pdf(arg) / value).abs(),
    }
}

#[test]
fn phase_limits_match_mpmath() {
    let file = "limits/phase.csv";
    let (mut worst1, mut worst2, mut worst32) = (0.0f64, 0.0f64, 0.0f64);
    for row in fixture::rows(file) {
        let kind: String = row.get(file, 0);
        let p: u32 = row.get(file, 1);
        let m: u32 = row.get(file, 2);
        let alpha: f64 = row.get(file, 3);
        let want: f64 = row.get(file, 4);
        let (got, got32) = match kind.as_str() {
            "phase1" => (
                phase1_limit(p, m, alpha).unwrap(),
                phase1_limit(p, m, alpha as f32).unwrap(),
            ),
            "phase2" => (
                phase2_limit(p, m, alpha).unwrap(),
                phase2_limit(p, m, alpha as f32).unwrap(),
            ),
            other => panic!("{file}:{}: unknown kind {other}", row.line),
        };
        let at = format!("{file}:{} {kind} p {p} m {m} alpha {alpha}", row.line);
        // f64: 1e-11 relative. The incomplete beta's prefactor exp(a ln x + b ln(1-x) - ln B)
        // carries the absolute error of lgamma (about eps * |ln Gamma(a + b)|, 1e-13 at
        // m = 500) into a relative error; 1e-11 leaves a margin of 100.
        Tol::rel(1e-11).check(&at, got, want).unwrap();
        // f32: the same computation in single precision; 1e-3 relative (a limit to 3 digits
        // is what a chart needs; the f32 path is for freeze time on an FPU core).
        Tol::rel(1e-3)
            .check(&format!("{at} (f32)"), f64::from(got32), want)
            .unwrap();
        let e = rel_err(got, want);
        if kind == "phase1" {
            worst1 = worst1.max(e);
        } else {
            worst2 = worst2.max(e);
        }
        worst32 = worst32.max(rel_err(f64::from(got32), want));
    }
    println!("\nPhase limits vs mpmath, worst relative error");
    println!("phase1 f64 {worst1:.2e}   phase2 f64 {worst2:.2e}   both f32 {worst32:.2e}");
}

#[test]
fn nist_phase2_formula_by_hand() {
    // NIST/SEMATECH e-Handbook 6.5.4.3.4: UCL = p (m+1)(m-1) / (m^2 - m p) F(1-alpha; p, m-p).
    // With p = 2 the F(2, d) quantile has the closed form d (alpha^(-2/d) - 1) / 2 (from the
    // beta form with a = 1: P(X > x) = (1 - x)^(d/2)), so the formula is checked without
    // any incomplete-beta code.
    for m in [5u32, 10, 20, 50, 200] {
        for alpha in [0.05f64, 0.01, 0.0027] {
            let d = f64::from(m - 2);
            let f = d * (alpha.powf(-2.0 / d) - 1.0) / 2.0;
            let mf = f64::from(m);
            let want = 2.0 * (mf + 1.0) * (mf - 1.0) / (mf * mf - 2.0 * mf) * f;
            let got = phase2_limit(2, m, alpha).unwrap();
            assert_close(&format!("m {m} alpha {alpha}"), got, want, Tol::rel(1e-13));
        }
    }
}

#[test]
fn const_table_is_the_rounded_f64_function() {
    for (d, row) in CHI2_LIMITS.f64.iter().enumerate() {
        let c = ChiSquare::new(d as u32 + 1).unwrap();
        for (k, &alpha) in CHI2_LIMITS.alpha.iter().enumerate() {
            let exact: f64 = c.quantile_upper(alpha).unwrap();
            assert_eq!(row[k], exact, "f64 table df {} alpha {alpha}", d + 1);
            assert_eq!(
                CHI2_LIMITS.f32[d][k],
                <f32 as Real>::from_f64(exact),
                "f32 table df {} alpha {alpha}",
                d + 1
            );
        }
    }
    assert_eq!(CHI2_LIMITS.coverage(2), Some(0.99));
    assert_eq!(
        CHI2_LIMITS.lookup_f32(2, 0.0027),
        Some(CHI2_LIMITS.f32[1][3])
    );
    assert_eq!(CHI2_LIMITS.lookup_f32(7, 0.01), None);
}
