//! The drift charts: limits and in-control ARL against published values, seeded Monte Carlo
//! run lengths of covgate's own charts, detection of a step shift, no alarm flood after a
//! single outlier, and the Phase I screen.
//!
//! `cargo test -p covgate-host --test watch_checks -- --nocapture` prints the ARL figures.

use covgate::math::ChiSquare;
use covgate::watch::{Subgroup, WatchConfig};
use covgate::{Chart, Reason, Verdict, Watch};
use covgate_host::arl::{self, dispersion_chart, mcusum_chart, mewma_chart, simulate};
use covgate_host::seeded::Rng;

/// Within `rel` of `want` (the shared tolerance helper).
fn within(got: f64, want: f64, rel: f64) -> bool {
    covgate_host::compare::Tol::rel(rel).accepts(got, want)
}

#[test]
fn mewma_limits_match_the_published_tables() {
    // Prabhu & Runger (1997), J. Quality Technology 29(1): p = 2, in-control ARL 200 (values
    // from memory in the project's references, confirmed here by the Markov chain):
    let table = [
        (0.05, 7.35),
        (0.1, 8.64),
        (0.2, 9.65),
        (0.3, 10.08),
        (0.4, 10.31),
        (0.5, 10.44),
        (0.6, 10.52),
        (0.8, 10.58),
    ];
    println!("\nMEWMA, p = 2, ARL0 200: lambda, published h, computed h, chain ARL at published h");
    for (lambda, h_pub) in table {
        let h = arl::limit_for(200.0, 1e-3, 20.0, 1e-7, |h| {
            arl::mewma_arl0(2, lambda, h, 300)
        })
        .unwrap();
        let at_pub = arl::mewma_arl0(2, lambda, h_pub, 300);
        println!("  {lambda:<5} {h_pub:<6} {h:.3}  {at_pub:.1}");
        // The issue asks for 3 %; the chain agrees to 0.1 % (two-decimal table), so hold 0.2 %
        // on h and 1 % on the ARL.
        assert!(within(h, h_pub, 0.002), "lambda {lambda}: h {h} vs {h_pub}");
        assert!(within(at_pub, 200.0, 0.01), "lambda {lambda}: ARL {at_pub}");
    }
    // Lowry, Woodall, Champ & Rigdon (1992), Technometrics 34(1): p = 2, lambda = 0.1,
    // h = 8.66 gives an in-control ARL of about 200 (from memory).
    let lowry = arl::mewma_arl0(2, 0.1, 8.66, 300);
    println!("  Lowry et al.: lambda 0.1, h 8.66 -> chain ARL {lowry:.1}");
    assert!(within(lowry, 200.0, 0.03));
}

#[test]
fn simulated_in_control_arl_of_each_chart() {
    let runs = 20_000;
    let mut rng = Rng::new(500);
    // MEWMA at the published h (asymptotic covariance, as the tables assume).
    let (m, se) = simulate::<2>(
        &mut rng,
        runs,
        20_000,
        [0.0; 2],
        mewma_chart(0.1, 8.64, false),
    );
    println!("\nin-control ARL (target 200), {runs} seeded runs each:");
    println!("  MEWMA lambda 0.1 h 8.64:        {m:.1} +- {se:.1}");
    assert!(within(m, 200.0, 0.03), "MEWMA {m}");
    // Crosier (1988), Technometrics 30(3): p = 2, k = 0.5, h = 5.5 gives ARL about 200
    // (from memory; confirmed here by simulation within 3 %).
    let (c, se) = simulate::<2>(&mut rng, runs, 20_000, [0.0; 2], mcusum_chart(0.5, 5.5));
    println!("  MCUSUM k 0.5 h 5.5:             {c:.1} +- {se:.1}");
    assert!(within(c, 200.0, 0.03), "MCUSUM {c}");
    // The dispersion check at the h the host tool gives (`covgate limits --chart dispersion`).
    let args = covgate_host::cli::limits::Args {
        chart: "dispersion".into(),
        dim: 2,
        alpha: None,
        baseline: None,
        lambda: Some(0.1),
        k: None,
        arl0: Some(200.0),
        seed: 20261201,
        runs: 2000,
    };
    let h = covgate_host::cli::limits::run(&args).unwrap()["h"]
        .as_f64()
        .unwrap();
    let (d, se) = simulate::<2>(&mut rng, runs, 20_000, [0.0; 2], dispersion_chart(0.1, h));
    println!("  dispersion lambda 0.1 h {h:.3}: {d:.1} +- {se:.1}");
    assert!(within(d, 200.0, 0.05), "dispersion {d}");
    // Hotelling T^2 for individuals with known parameters: ARL = 1 / alpha (geometric).
    let h2 = ChiSquare::new(2)
        .unwrap()
        .quantile_upper(1.0 / 200.0)
        .unwrap();
    let (t, se) = simulate::<2>(&mut rng, runs, 20_000, [0.0; 2], |w: Option<&[f64; 2]>| {
        w.is_some_and(|w| w[0] * w[0] + w[1] * w[1] > h2)
    });
    println!("  T^2 individuals h {h2:.3}:      {t:.1} +- {se:.1}");
    assert!(within(t, 200.0, 0.05), "T2 {t}");
    // Subgroups of 5 (known parameters): ARL 200 subgroups = 1000 samples at alpha 1/200.
    let mut g = Subgroup::<f64, 2>::new(5, h2).unwrap();
    let (s, se) = simulate::<2>(&mut rng, runs, 200_000, [0.0; 2], |w| match w {
        None => {
            g.reset();
            false
        }
        Some(w) => g.update(w).is_some_and(|(t2, _)| t2 > h2),
    });
    println!("  T^2 subgroups of 5:             {s:.1} +- {se:.1} samples (target 1000)");
    assert!(within(s, 1000.0, 0.05), "subgroup {s}");
}

/// Independent code for the shifted ARLs (not covgate's charts, only the shared run loop
/// `arl::simulate`): the MEWMA of Lowry et al. (1992) with the asymptotic covariance,
/// `T^2 = |z|^2 (2 - lambda) / lambda`, on whitened 2-D data.
fn reference_mewma(lambda: f64, h: f64) -> impl FnMut(Option<&[f64; 2]>) -> bool {
    let mut z = [0.0f64; 2];
    move |w| match w {
        None => {
            z = [0.0; 2];
            false
        }
        Some(w) => {
            z = [
                lambda * w[0] + (1.0 - lambda) * z[0],
                lambda * w[1] + (1.0 - lambda) * z[1],
            ];
            (z[0] * z[0] + z[1] * z[1]) * (2.0 - lambda) / lambda > h
        }
    }
}

/// Crosier's (1988) MCUSUM, written out: `C = |S + w|`, `S = 0` if `C <= k` else
/// `(S + w)(1 - k / C)`, statistic `|S|`.
fn reference_mcusum(k: f64, h: f64) -> impl FnMut(Option<&[f64; 2]>) -> bool {
    let mut s = [0.0f64; 2];
    move |w| match w {
        None => {
            s = [0.0; 2];
            false
        }
        Some(w) => {
            let v = [s[0] + w[0], s[1] + w[1]];
            let c = v[0].hypot(v[1]);
            s = if c <= k {
                [0.0; 2]
            } else {
                [v[0] * (1.0 - k / c), v[1] * (1.0 - k / c)]
            };
            s[0].hypot(s[1]) > h
        }
    }
}

#[test]
fn out_of_control_arl_after_a_shift_of_noncentrality_one() {
    let mut rng = Rng::new(501);
    let shift = [std::f64::consts::FRAC_1_SQRT_2; 2]; // |shift| = 1
    let runs = 20_000;
    let (m, m_se) = simulate::<2>(&mut rng, runs, 20_000, shift, mewma_chart(0.1, 8.64, false));
    let (c, c_se) = simulate::<2>(&mut rng, runs, 20_000, shift, mcusum_chart(0.5, 5.5));
    let h2 = ChiSquare::new(2)
        .unwrap()
        .quantile_upper(1.0 / 200.0)
        .unwrap();
    let (t, t_se) = simulate::<2>(&mut rng, runs, 20_000, shift, |w: Option<&[f64; 2]>| {
        w.is_some_and(|w| w[0] * w[0] + w[1] * w[1] > h2)
    });
    // T^2 for individuals: run lengths are geometric, ARL = 1 / P(noncentral chi-square with
    // 2 degrees of freedom and noncentrality 1 > h), exact.
    let t_exact = 1.0 / (1.0 - arl::ncx2_cdf(h2, 2, 1.0));
    // MEWMA and MCUSUM: independent code, 20x the runs (standard error about 0.2 %).
    let mut rng_ref = Rng::new(502);
    let (m_ref, m_ref_se) = simulate::<2>(
        &mut rng_ref,
        20 * runs,
        100_000,
        shift,
        reference_mewma(0.1, 8.64),
    );
    let (c_ref, c_ref_se) = simulate::<2>(
        &mut rng_ref,
        20 * runs,
        100_000,
        shift,
        reference_mcusum(0.5, 5.5),
    );
    println!(
        "\nARL after a mean shift of noncentrality 1 (p = 2, all charts at ARL0 200), {runs} runs:"
    );
    println!(
        "  MEWMA 0.1 / 8.64:  {m:.2} +- {m_se:.2}   independent code {m_ref:.2} +- {m_ref_se:.2}"
    );
    println!(
        "  MCUSUM 0.5 / 5.5:  {c:.2} +- {c_se:.2}   independent code {c_ref:.2} +- {c_ref_se:.2}"
    );
    println!("  T^2 individuals:   {t:.2} +- {t_se:.2}   exact {t_exact:.2}");
    // Each within 4 combined standard errors of its reference: at these run counts that is
    // 1.5 % for the MEWMA and MCUSUM and 2.8 % for T^2, the smallest error each check detects.
    for (name, got, se, want, want_se) in [
        ("MEWMA", m, m_se, m_ref, m_ref_se),
        ("MCUSUM", c, c_se, c_ref, c_ref_se),
        ("T^2", t, t_se, t_exact, 0.0),
    ] {
        let band = 4.0 * se.hypot(want_se);
        assert!(
            (got - want).abs() <= band,
            "{name}: {got} vs {want} +- {band}"
        );
        assert!(
            band <= 0.03 * want,
            "{name}: band {band} too wide to detect 3 %"
        );
    }
    // The drift charts must beat the individuals chart by far on a small sustained shift
    // (common practice: about 10 against about 40 samples).
    assert!(m < 0.5 * t && c < 0.5 * t, "{m} {c} {t}");
}

fn config() -> WatchConfig<f64, 2> {
    let mut c = WatchConfig::new(50, 0.0027);
    c.mewma = Some((0.1, 8.64, false));
    c.mcusum = Some((0.5, 5.5));
    c
}

const L: [[f64; 2]; 2] = [[2.0, 0.0], [0.9, 1.2]];
const MU: [f64; 2] = [100.0, -40.0];

#[test]
fn a_step_shift_is_detected() {
    // 500 replications: learn 50, run 60 in control, then the mean moves by 2 sd on axis 0.
    let mut rng = Rng::new(502);
    let (mut detected, mut delays, mut early, mut axis0) = (0u32, 0u64, 0u32, 0u32);
    let reps = 500;
    for _ in 0..reps {
        let mut w = Watch::<f64, 2, 64>::new(config()).unwrap();
        for _ in 0..50 {
            w.push(rng.gaussian(&MU, &L));
        }
        assert!(w.monitor().is_some());
        let mut t = 0;
        let mut hit = None;
        while t < 160 {
            t += 1;
            let mut x = rng.gaussian(&MU, &L);
            if t > 60 {
                x[0] += 2.0 * L[0][0];
            }
            if let Some(a) = w.push(x).alarm {
                if t <= 60 {
                    early += 1;
                    w.acknowledge();
                } else {
                    hit = Some((t - 60, a));
                    break;
                }
            }
        }
        if let Some((d, a)) = hit {
            detected += 1;
            delays += d as u64;
            axis0 += u32::from(a.main_axis() == 0);
        }
    }
    let mean_delay = delays as f64 / f64::from(detected);
    println!("\nstep of 2 sd on axis 0 after 60 samples: detected in {detected} of {reps} within 100 samples, mean delay {mean_delay:.1}, main axis 0 in {axis0}, false alarms before the step {early}");
    assert!(detected >= reps * 98 / 100);
    assert!(mean_delay < 15.0);
    // The shift estimate at the alarm is a few samples' worth of noisy evidence: it must point
    // at the shifted axis in most runs.
    assert!(axis0 >= detected * 8 / 10, "the alarm must point at axis 0");
}

#[test]
fn a_single_outlier_does_not_flood_alarms() {
    // Replications with one gross outlier at sample 30; every alarm is acknowledged at once.
    // Alarms in the 40 samples after the outlier's own must be no more frequent than in 40
    // in-control samples without any outlier (plus the binomial margin).
    let mut rng = Rng::new(503);
    let reps = 1000;
    let (mut after_outlier, mut baseline_rate, mut outlier_alarms) = (0u32, 0u32, 0u32);
    for rep in 0..2 * reps {
        let with_outlier = rep % 2 == 0;
        let mut w = Watch::<f64, 2, 64>::new(config()).unwrap();
        for _ in 0..50 {
            w.push(rng.gaussian(&MU, &L));
        }
        for t in 1..=70 {
            let mut x = rng.gaussian(&MU, &L);
            if with_outlier && t == 30 {
                x = [MU[0] + 30.0, MU[1] - 30.0];
            }
            let s = w.push(x);
            if let Some(_a) = s.alarm {
                w.acknowledge();
                if t == 30 && with_outlier {
                    outlier_alarms += 1;
                } else if t > 30 {
                    if with_outlier {
                        after_outlier += 1;
                    } else {
                        baseline_rate += 1;
                    }
                }
            } else if with_outlier && t == 30 {
                assert!(matches!(s.verdict, Verdict::NoGo(Reason::OutsideGate(_))));
            }
        }
    }
    println!("\nsingle outlier: alarmed on the outlier in {outlier_alarms} of {reps}; alarms in the next 40 samples: {after_outlier} (in-control runs: {baseline_rate})");
    let margin = 4.0 * f64::from(baseline_rate.max(10)).sqrt();
    assert!(
        f64::from(after_outlier) <= f64::from(baseline_rate) + margin,
        "flood: {after_outlier} vs {baseline_rate}"
    );
}

#[test]
fn the_phase_one_screen_drops_a_gross_baseline_outlier() {
    let mut rng = Rng::new(504);
    let mut w = Watch::<f64, 2, 64>::new(config()).unwrap();
    for k in 0..50 {
        let x = if k == 17 {
            [MU[0] + 25.0, MU[1] + 25.0]
        } else {
            rng.gaussian(&MU, &L)
        };
        w.push(x);
    }
    assert!(w.screened_out() >= 1);
    let m = w.monitor().unwrap();
    // Re-estimated without the outlier: the mean is close to MU (within 4 standard errors).
    let mean = m.gate().baseline().mean();
    assert!(
        (mean[0] - MU[0]).abs() < 4.0 * 2.0 / 49f64.sqrt(),
        "{mean:?}"
    );
    assert_eq!(m.alarm(), None);
    assert!(matches!(
        w.push([f64::NAN, 0.0]).verdict,
        Verdict::NoGo(Reason::InvalidSample(_))
    ));
    let _ = Chart::Gate;
}
