//! The gate against the independent reference and against the in-control false-alarm rate.
//! Seeded (`COVGATE_SEED`); the Monte Carlo parts run at release speed (test profile).
//!
//! `cargo test -p covgate-host --test gate_checks -- --nocapture` prints the measured rates
//! and the integer gate's band.

use covgate::math::{phase1_limit, phase2_limit, ChiSquare};
use covgate::{
    Baseline, Covariance, FreezeError, Gate, IntGate, IntGate2, Limit, Moments2, Verdict,
};
use covgate_host::compare::Tol;
use covgate_host::reference;
use covgate_host::seeded::{check, Rng};
use proptest::prelude::*;
use proptest::test_runner::TestCaseError;

/// A random covariance `S D S'` with rotation angle, per-axis sd and condition bounded so the
/// freeze accepts it in f32 (rcond >= 1e-3).
fn cov2() -> impl Strategy<Value = [[f64; 2]; 2]> {
    (0.0..std::f64::consts::PI, -2.0..4.0f64, 0.0..3.0f64).prop_map(|(t, e, c)| {
        let (l1, l2) = (10f64.powf(e), 10f64.powf(e - c));
        let (s, co) = t.sin_cos();
        [
            [co * co * l1 + s * s * l2, co * s * (l1 - l2)],
            [co * s * (l1 - l2), s * s * l1 + co * co * l2],
        ]
    })
}

#[test]
fn mahalanobis_matches_the_reference() {
    let point = (-5.0..5.0f64, -5.0..5.0f64);
    check(
        "mahalanobis",
        512,
        (cov2(), point, -1e4..1e4f64),
        |(c, (u, v), off)| {
            let mean = [off, -0.5 * off];
            let b64 = Baseline::new(mean, &Covariance::from_matrix(c)).unwrap();
            let sd = [c[0][0].sqrt(), c[1][1].sqrt()];
            let x = [mean[0] + u * sd[0], mean[1] + v * sd[1]];
            let want = reference::mahalanobis2(&mean, &c, &x).unwrap();
            let rcond = b64.correlation_condition();
            // f64: relative error about N eps / rcond (Baseline docs); 64 N eps / rcond allowed.
            let tol64 = Tol::new(1e-300, 128.0 * f64::EPSILON / rcond);
            tol64
                .check("d2 f64", b64.mahalanobis2(&x), want)
                .map_err(TestCaseError::fail)?;
            // f32: same bound in f32 eps, on inputs taken relative to the mean (a pivot), since
            // the offset itself may not be representable; plus the rounding of the inputs.
            let c32 = c.map(|r| r.map(|v| v as f32));
            let b32 = Baseline::new([0.0f32; 2], &Covariance::from_matrix(c32)).unwrap();
            let x32 = [(x[0] - mean[0]) as f32, (x[1] - mean[1]) as f32];
            let tol32 = Tol::new(1e-6, 256.0 * f64::from(f32::EPSILON) / rcond);
            tol32
                .check("d2 f32", f64::from(b32.mahalanobis2(&x32)), want)
                .map_err(TestCaseError::fail)
        },
    );
}

#[test]
fn six_dimensional_distance_matches_the_reference() {
    // C = A A' + I/2 from a random 6x6 A: positive definite, moderately conditioned.
    let a = prop::array::uniform6(prop::array::uniform6(-1.0..1.0f64));
    let x = prop::array::uniform6(-3.0..3.0f64);
    check("mahalanobis_6d", 256, (a, x), |(a, x)| {
        let mut c = [[0.0; 6]; 6];
        for i in 0..6 {
            for j in 0..6 {
                c[i][j] = (0..6).map(|k| a[i][k] * a[j][k]).sum::<f64>();
            }
            c[i][i] += 0.5;
        }
        let mean = [1.0, -2.0, 3.0, 0.5, 0.0, 10.0];
        let b = Baseline::new(mean, &Covariance::from_matrix(c)).unwrap();
        let want = reference::mahalanobis2(&mean, &c, &x).unwrap();
        let tol = Tol::new(
            1e-300,
            64.0 * 6.0 * f64::EPSILON / b.correlation_condition(),
        );
        tol.check("d2 6-D", b.mahalanobis2(&x), want)
            .map_err(TestCaseError::fail)
    });
}

#[test]
fn degenerate_covariances_give_an_error_never_a_nan_verdict() {
    let v = (-10.0..10.0f64, -10.0..10.0f64);
    check("degenerate", 512, (v, 0usize..4), |((a, b), kind)| {
        let c = match kind {
            0 => [[a * a, a * b], [a * b, b * b]], // rank one
            1 => [[0.0, 0.0], [0.0, 0.0]],
            2 => [[a * a + 1.0, f64::NAN], [f64::NAN, 1.0]],
            _ => [[1.0, 1.0 + 1e-3], [1.0 + 1e-3, 1.0]], // indefinite
        };
        let r = Baseline::new([0.0, 0.0], &Covariance::from_matrix(c));
        prop_assert!(
            matches!(
                r,
                Err(FreezeError::Degenerate | FreezeError::NotFinite | FreezeError::IllConditioned)
            ),
            "{c:?} gave {r:?}"
        );
        let c32 = c.map(|r| r.map(|v| v as f32));
        prop_assert!(Baseline::new([0.0f32; 2], &Covariance::from_matrix(c32)).is_err());
        Ok(())
    });
    // Nearly singular but valid: the verdict is finite.
    let c: [[f64; 2]; 2] = [[1.0, 0.999], [0.999, 1.0]];
    let g = Gate::new(
        Baseline::new([0.0, 0.0], &Covariance::from_matrix(c)).unwrap(),
        Limit::ChiSquare { alpha: 0.01 },
    )
    .unwrap();
    match g.verdict(&[1.0, -1.0]) {
        Verdict::NoGo(covgate::Reason::OutsideGate(d)) => {
            assert!(d.d2.is_finite() && d.tail.unwrap() >= 0.0)
        }
        other => panic!("expected an outside verdict, got {other:?}"),
    }
}

fn int_and_float(mean: [f64; 2], c: [[f64; 2]; 2], alpha: f64) -> (Gate<f64, 2>, IntGate2) {
    let b = Baseline::new(mean, &Covariance::from_matrix(c)).unwrap();
    let g = Gate::new(b, Limit::ChiSquare { alpha }).unwrap();
    let ig = IntGate::from_gate(&g).unwrap();
    (g, ig)
}

#[test]
fn int_gate_agreement_on_a_dense_grid() {
    // A 12-bit ADC tilt node (invented demo numbers): counts around mid-scale, correlated axes.
    let mean = [2048.3, 1987.6];
    let c = [[140.0, -61.0], [-61.0, 95.0]];
    let (g, ig) = int_and_float(mean, c, 0.0027);
    let h = g.limit();
    let (mut total, mut inside, mut in_band, mut disagree_in_band) = (0u64, 0u64, 0u64, 0u64);
    for x in 1900..2200 {
        for y in 1850..2130 {
            let d2 = g.baseline().mahalanobis2(&[f64::from(x), f64::from(y)]);
            let fv = d2 <= h;
            let iv = ig.passes(&[x, y]);
            assert_eq!(iv, ig.passes_exact(&[x, y]), "filter at ({x}, {y})");
            total += 1;
            inside += u64::from(fv);
            if (d2 - h).abs() <= ig.band() {
                in_band += 1;
                disagree_in_band += u64::from(fv != iv);
            } else {
                assert_eq!(fv, iv, "({x}, {y}): d2 {d2} limit {h} band {}", ig.band());
            }
        }
    }
    println!(
        "\nint gate, 12-bit grid: {total} points, {inside} inside, band {:.2e} (= {:.2e} of the \
         limit), {in_band} points in the band, {disagree_in_band} of them disagree",
        ig.band(),
        ig.band() / h
    );
    assert!(
        inside > 1000 && inside < total,
        "the grid must straddle the gate"
    );
    assert!(ig.band() / h < 1e-12);
}

#[test]
fn int_gate_agreement_on_random_baselines() {
    let point = (0.0..std::f64::consts::TAU, 0.5..1.5f64);
    check(
        "int_gate_random",
        512,
        (cov2(), -1e6..1e6f64, prop::collection::vec(point, 64)),
        |(c, off, pts)| {
            let c = c.map(|r| r.map(|v| v * 100.0));
            let mean = [off, 0.37 * off + 3.3];
            let (g, ig) = int_and_float(mean, c, 0.01);
            let h = g.limit();
            let b = reference::cholesky(&c).unwrap();
            for (t, r) in pts {
                // Points around the gate boundary, r = 1 on it, rounded to integers.
                let z = [r * h.sqrt() * t.cos(), r * h.sqrt() * t.sin()];
                let x = [
                    (mean[0] + b[0][0] * z[0]).round(),
                    (mean[1] + b[1][0] * z[0] + b[1][1] * z[1]).round(),
                ];
                let xi = [x[0] as i32, x[1] as i32];
                let d2 = reference::mahalanobis2(&mean, &c, &x).unwrap();
                if (d2 - h).abs() > ig.band() {
                    prop_assert_eq!(d2 <= h, ig.passes(&xi), "x {:?} d2 {} h {}", x, d2, h);
                }
            }
            Ok(())
        },
    );
}

#[test]
fn int_gate_filter_never_overrides_the_exact_test() {
    // Spreads from a fraction of a count to 10^7 counts (where the 32-bit filter switches
    // off), points on and around the boundary and anywhere in a wide box.
    let point = (0.0..std::f64::consts::TAU, 0.0..3.0f64, 0.97..1.03f64);
    check(
        "int_gate_filter",
        512,
        (
            cov2(),
            -3.0..10.0f64,
            -1e8..1e8f64,
            prop::collection::vec(point, 96),
        ),
        |(c, scale, off, pts)| {
            let c = c.map(|r| r.map(|v| v * 10f64.powf(scale)));
            let mean = [off, -0.61 * off + 17.2];
            let (g, ig) = int_and_float(mean, c, 0.0027);
            let b = reference::cholesky(&c).unwrap();
            let h = g.limit().sqrt();
            for (t, wide, near) in pts {
                for r in [wide, near] {
                    let z = [r * h * t.cos(), r * h * t.sin()];
                    let x = [
                        (mean[0] + b[0][0] * z[0]).round() as i32,
                        (mean[1] + b[1][0] * z[0] + b[1][1] * z[1]).round() as i32,
                    ];
                    prop_assert_eq!(ig.passes(&x), ig.passes_exact(&x), "x {:?}", x);
                }
            }
            Ok(())
        },
    );
}

/// 99.9 % two-sided binomial interval half-width for rate `p` over `n` trials (normal
/// approximation, z = 3.29; common practice for n p >> 10).
fn half_width(p: f64, n: f64) -> f64 {
    3.29 * (p * (1.0 - p) / n).sqrt()
}

#[test]
fn known_baseline_holds_its_false_alarm_rate() {
    let n = 1_000_000u32;
    let alpha = 0.01;
    for dim in [2usize, 3] {
        let mut rng = Rng::new(dim as u64);
        let out = if dim == 2 {
            let c = [[2.0, 0.6], [0.6, 1.0]];
            let (g, _) = int_and_float([5.0, -3.0], c, alpha);
            // Draws through the reference's own factor, not the gate's.
            let l = reference::cholesky(&c).unwrap();
            (0..n)
                .filter(|_| !g.passes(&rng.gaussian(&[5.0, -3.0], &l)))
                .count()
        } else {
            let c = [[1.0, 0.3, 0.1], [0.3, 2.0, -0.4], [0.1, -0.4, 0.5]];
            let b = Baseline::new([0.0; 3], &Covariance::from_matrix(c)).unwrap();
            let g = Gate::new(b, Limit::ChiSquare { alpha }).unwrap();
            let l = reference::cholesky(&c).unwrap();
            (0..n)
                .filter(|_| !g.passes(&rng.gaussian(&[0.0; 3], &l)))
                .count()
        };
        let rate = out as f64 / f64::from(n);
        let hw = half_width(alpha, f64::from(n));
        println!("\nknown {dim}-D baseline, alpha {alpha}: {out} of {n} gated out, rate {rate:.5} (99.9 % interval {:.5}..{:.5})", alpha - hw, alpha + hw);
        assert!(
            (rate - alpha).abs() <= hw,
            "rate {rate} outside {alpha} +- {hw}"
        );
    }
}

#[test]
fn small_baseline_needs_the_exact_limits() {
    // Many baselines of m = 20 in 2-D; each judges 5 new samples (Phase II) and screens its
    // own 20 (Phase I). Rates are averaged over baselines and their standard error is taken
    // across baselines, since samples judged against one baseline are not independent.
    let (m, p, alpha) = (20u32, 2u32, 0.01f64);
    let baselines = 100_000;
    let new_per = 5;
    let chi2: f64 = ChiSquare::new(p).unwrap().quantile_upper(alpha).unwrap();
    let ucl2: f64 = phase2_limit(p, m, alpha).unwrap();
    let ucl1: f64 = phase1_limit(p, m, alpha).unwrap();
    let l = [[1.5, 0.0], [0.8, 0.6]];
    let mu = [10.0, 20.0];
    let mut rng = Rng::new(20);
    let mut rates = [Vec::new(), Vec::new(), Vec::new()]; // phase2, chi2 on new, phase1 own
    let mut own = [[0.0; 2]; 20];
    for _ in 0..baselines {
        let mut acc = Moments2::<f64>::new();
        for o in own.iter_mut() {
            *o = rng.gaussian(&mu, &l);
            acc.push(*o).unwrap();
        }
        let b = Baseline::new(acc.mean().unwrap(), &acc.sample_covariance().unwrap()).unwrap();
        let (mut o2, mut oc) = (0, 0);
        for _ in 0..new_per {
            let d2 = b.mahalanobis2(&rng.gaussian(&mu, &l));
            o2 += u32::from(d2 > ucl2);
            oc += u32::from(d2 > chi2);
        }
        let o1 = own.iter().filter(|x| b.mahalanobis2(x) > ucl1).count();
        rates[0].push(f64::from(o2) / new_per as f64);
        rates[1].push(f64::from(oc) / new_per as f64);
        rates[2].push(o1 as f64 / f64::from(m));
    }
    let stats = |v: &Vec<f64>| {
        let n = v.len() as f64;
        let mean = v.iter().sum::<f64>() / n;
        let var = v.iter().map(|r| (r - mean) * (r - mean)).sum::<f64>() / (n - 1.0);
        (mean, (var / n).sqrt())
    };
    let (r2, se2) = stats(&rates[0]);
    let (rc, sec) = stats(&rates[1]);
    let (r1, se1) = stats(&rates[2]);
    println!("\nm = {m}, p = {p}, alpha = {alpha}, {baselines} baselines:");
    println!("  Phase II limit {ucl2:.3}: new-sample alarm rate {r2:.5} (se {se2:.5})");
    println!("  chi-square limit {chi2:.3}: new-sample alarm rate {rc:.5} (se {sec:.5})");
    println!("  Phase I limit {ucl1:.3}: own-sample alarm rate {r1:.5} (se {se1:.5})");
    // 99.9 % (3.29 se) around the nominal rate for the exact limits ...
    assert!((r2 - alpha).abs() <= 3.29 * se2, "Phase II rate {r2}");
    assert!((r1 - alpha).abs() <= 3.29 * se1, "Phase I rate {r1}");
    // ... and the chi-square limit visibly fails: more than twice the nominal rate here.
    assert!(
        rc > 2.0 * alpha && rc - alpha > 10.0 * sec,
        "chi-square rate {rc}"
    );
}

#[test]
fn f32_gate_agrees_with_f64_gate_away_from_the_limit() {
    check(
        "f32_vs_f64_gate",
        256,
        (
            cov2(),
            prop::collection::vec((-4.0..4.0f64, -4.0..4.0f64), 64),
        ),
        |(c, pts)| {
            let g64 = Gate::new(
                Baseline::new([0.0; 2], &Covariance::from_matrix(c)).unwrap(),
                Limit::ChiSquare { alpha: 0.01 },
            )
            .unwrap();
            let c32 = c.map(|r| r.map(|v| v as f32));
            let g32 = Gate::new(
                Baseline::new([0.0f32; 2], &Covariance::from_matrix(c32)).unwrap(),
                Limit::ChiSquare { alpha: 0.01f32 },
            )
            .unwrap();
            let rcond = g64.baseline().correlation_condition();
            let sd = [c[0][0].sqrt(), c[1][1].sqrt()];
            for (u, v) in pts {
                let x = [u * sd[0], v * sd[1]];
                let d2 = g64.baseline().mahalanobis2(&x);
                // The f32 d^2 error bound (256 eps32 / rcond relative, see above) plus the f32
                // limit's own rounding.
                let band = (256.0 * f64::from(f32::EPSILON) / rcond) * g64.limit().max(d2)
                    + 1e-5 * g64.limit();
                if (d2 - g64.limit()).abs() > band {
                    prop_assert_eq!(g64.passes(&x), g32.passes(&[x[0] as f32, x[1] as f32]));
                }
            }
            Ok(())
        },
    );
}
