//! Confidence bounds on the in-zone probability (generalized pivotal quantities): coverage by
//! simulation, the known-covariance limit against the textbook interval for a normal mean,
//! convergence to the point estimate, typed errors. Seeded; runs at release speed.
//!
//! `cargo test -p covgate-host --test yield_bounds -- --nocapture` prints the coverages.

use covgate::math::{norm_cdf, norm_quantile_upper, Xoshiro128};
use covgate::{
    BoundError, CircleZone, Covariance, EllipseZone, RectZone, Uncertainty, Zone, ZoneError,
};
use covgate_host::reference;
use covgate_host::seeded::Rng;

/// The known process of the coverage study (invented: a drilled hole's offset in um).
const MEAN: [f64; 2] = [4.0, -3.0];
const COV: [[f64; 2]; 2] = [[64.0, 19.2], [19.2, 36.0]];

fn zones() -> [(&'static str, Zone<f64>); 6] {
    let inf = f64::INFINITY;
    [
        (
            "rect",
            Zone::Rect(RectZone::new([-20.0, -22.0], [30.0, 18.0]).unwrap()),
        ),
        (
            "circle",
            Zone::Circle(CircleZone::new([0.0, 0.0], 60.0).unwrap()),
        ),
        (
            "ellipse",
            Zone::Ellipse(EllipseZone::new([2.0, -2.0], 30.0, 20.0, 0.4).unwrap()),
        ),
        (
            "one-side",
            Zone::Rect(RectZone::new([-inf, -inf], [20.0, inf]).unwrap()),
        ),
        // A one-sided limit on the second axis: reaches the second row of the pivot's factor.
        (
            "one-y",
            Zone::Rect(RectZone::new([-inf, -inf], [inf, 9.0]).unwrap()),
        ),
        // A large closed zone whose edge passes 2 sd from the mean (diameter 1000 um, centre
        // 484 um off in +x): near the process its edge is almost straight, so it should cover
        // like a one-sided limit, through the circle's own quadrature. (A 128 um circle with
        // the same near edge covered 0.961 at m = 200: its curving edge adds a second, lateral
        // exit that the bound treats conservatively.)
        (
            "circle-edge",
            Zone::Circle(CircleZone::new([488.0, -3.0], 1000.0).unwrap()),
        ),
    ]
}

/// `m` samples of the known process: mean and sample covariance (two-pass reference).
fn baseline(rng: &mut Rng, m: usize) -> ([f64; 2], [[f64; 2]; 2]) {
    let l = reference::cholesky(&COV).unwrap();
    let xs: Vec<[f64; 2]> = (0..m)
        .map(|_| {
            let (a, b) = (rng.normal(), rng.normal());
            [MEAN[0] + l[0][0] * a, MEAN[1] + l[1][0] * a + l[1][1] * b]
        })
        .collect();
    let s = reference::moments(&xs);
    (s.mean, s.sample_cov())
}

#[test]
fn coverage_by_simulation() {
    // 4000 baselines per case, 1000 draws per bound, confidence 0.95: the share of baselines
    // whose bound lies below the true in-zone probability, against the 99.9 % binomial
    // interval around 0.95 (+- 0.0113 for 4000 trials; z = 3.29, common practice). Detectable
    // error: a true coverage of 0.93 falls below the interval's lower end (0.9387) with
    // probability 0.998 (its own standard error is 0.004).
    const BASELINES: usize = 4000;
    const DRAWS: usize = 1000;
    let conf = 0.95;
    let cases: Vec<(usize, usize)> = [20usize, 50, 200]
        .iter()
        .flat_map(|&m| (0..6).map(move |z| (m, z)))
        .collect();
    let results: Vec<(usize, &str, f64, f64, f64)> = std::thread::scope(|s| {
        let handles: Vec<_> = cases
            .chunks(cases.len().div_ceil(2))
            .map(|chunk| {
                s.spawn(move || {
                    chunk
                        .iter()
                        .map(|&(m, zi)| {
                            let (name, zone) = zones()[zi];
                            let truth = zone
                                .probability(&MEAN, &Covariance::from_matrix(COV))
                                .unwrap()
                                .inside;
                            let mut rng = Rng::new(9000 + (m * 10 + zi) as u64);
                            let mut draws = vec![0.0f64; DRAWS];
                            let mut gen = Xoshiro128::new((m * 10 + zi) as u64);
                            let (mut covered, mut gap) = (0usize, 0.0);
                            for _ in 0..BASELINES {
                                let (xbar, s) = baseline(&mut rng, m);
                                let b = zone
                                    .yield_bound(
                                        &xbar,
                                        &Covariance::from_matrix(s),
                                        m as u32,
                                        conf,
                                        Uncertainty::MeanAndCovariance,
                                        &mut gen,
                                        &mut draws,
                                    )
                                    .unwrap();
                                covered += usize::from(b.inside_lower <= truth);
                                gap += b.estimate.inside - b.inside_lower;
                            }
                            (
                                m,
                                name,
                                truth,
                                covered as f64 / BASELINES as f64,
                                gap / BASELINES as f64,
                            )
                        })
                        .collect::<Vec<_>>()
                })
            })
            .collect();
        handles
            .into_iter()
            .flat_map(|h| h.join().unwrap())
            .collect()
    });
    println!("\nyield lower bound at confidence 0.95 (GPQ, {DRAWS} draws), {BASELINES} baselines per case:");
    println!("  m    zone        true inside  coverage  mean (estimate - bound)");
    let half = 3.29 * (conf * (1.0 - conf) / BASELINES as f64).sqrt();
    for (m, name, truth, cov, gap) in &results {
        println!("  {m:<4} {name:<11} {truth:.6}     {cov:.4}    {gap:.5}");
    }
    // Never below the nominal level beyond Monte Carlo error. At this process (mean about
    // 0.6 sd from the centres of the closed zones) the bound is conservative for the closed
    // zones (coverage 0.97-0.999: while the mean's uncertainty exceeds its offset, a drawn
    // mean mostly lowers the yield); for one-sided limits it is within Monte Carlo error of
    // nominal from m = 50, slightly above it in fact (the bivariate pivot's marginal has
    // m - 2 degrees of freedom where the exact one-sided interval has m - 1, an excess that
    // shrinks like 1 / m). The closed zone with one near edge behaves like a one-sided limit
    // and is held to the same two-sided interval, so over-coverage is caught where the method
    // should not have any.
    for (m, name, _, cov, _) in &results {
        assert!(
            *cov >= conf - half,
            "m {m} {name}: coverage {cov} below {conf} - {half:.3}"
        );
        if (name.starts_with("one") || *name == "circle-edge") && *m >= 50 {
            assert!(
                (cov - conf).abs() <= half,
                "m {m} {name}: coverage {cov} outside {conf} +- {half:.3}"
            );
        }
    }
}

#[test]
fn known_covariance_is_the_textbook_interval_for_the_mean() {
    // Zone x <= U (one-sided rectangle): inside = Phi((U - mu) / sigma), decreasing in mu, so
    // the lower bound is Phi((U - xbar - z_C sigma / sqrt m) / sigma) with the textbook upper
    // confidence limit for a normal mean with known sigma (common practice).
    let inf = f64::INFINITY;
    let zone = Zone::Rect(RectZone::new([-inf, -inf], [20.0, inf]).unwrap());
    let (xbar, sigma, m, conf) = ([3.0, -1.0], 8.0f64, 25u32, 0.95);
    let z = norm_quantile_upper(1.0 - conf).unwrap();
    let want = norm_cdf((20.0 - xbar[0] - z * sigma / f64::from(m).sqrt()) / sigma);
    let mut draws = vec![0.0f64; 20_000];
    let b = zone
        .yield_bound(
            &xbar,
            &Covariance::from_matrix(COV),
            m,
            conf,
            Uncertainty::MeanOnly,
            &mut Xoshiro128::new(7),
            &mut draws,
        )
        .unwrap();
    // Standard error of the sample quantile of z: sqrt(C (1 - C) / K) / phi(z_C), carried to
    // the inside probability through its slope; allow 4 of them.
    let phi = |t: f64| (-0.5 * t * t).exp() / (2.0 * std::f64::consts::PI).sqrt();
    let se_z = (conf * (1.0 - conf) / draws.len() as f64).sqrt() / phi(z);
    let t = (20.0 - xbar[0] - z * sigma / f64::from(m).sqrt()) / sigma;
    let tol = 4.0 * se_z * phi(t) / f64::from(m).sqrt();
    println!(
        "\nknown covariance: GPQ bound {:.6}, textbook {want:.6} (tolerance {tol:.1e})",
        b.inside_lower
    );
    assert!(
        (b.inside_lower - want).abs() <= tol,
        "{} vs {want}",
        b.inside_lower
    );
}

#[test]
fn the_bound_approaches_the_estimate_as_the_baseline_grows() {
    let (name, zone) = zones()[1];
    let c = Covariance::from_matrix(COV);
    let mut draws = vec![0.0f64; 4000];
    let mut gaps = Vec::new();
    for m in [20u32, 200, 2000, 20_000] {
        let b = zone
            .yield_bound(
                &MEAN,
                &c,
                m,
                0.95,
                Uncertainty::MeanAndCovariance,
                &mut Xoshiro128::new(3),
                &mut draws,
            )
            .unwrap();
        let gap = b.estimate.inside - b.inside_lower;
        println!(
            "{name}, m {m}: estimate {:.6}, bound {:.6}, gap {gap:.2e}",
            b.estimate.inside, b.inside_lower
        );
        gaps.push(gap);
    }
    // The gap shrinks like 1 / sqrt(m): a factor of about sqrt(10) per step.
    for w in gaps.windows(2) {
        assert!(w[1] < w[0] / 2.0 && w[1] > 0.0, "{gaps:?}");
    }
    assert!(gaps[3] < gaps[0] / 20.0, "{gaps:?}");
}

#[test]
fn bad_input_is_a_typed_error() {
    let (_, zone) = zones()[0];
    let c = Covariance::from_matrix(COV);
    let mut d = [0.0f64; 8];
    let mut g = Xoshiro128::new(1);
    let mut bound = |m: u32, conf: f64, d: &mut [f64]| {
        zone.yield_bound(
            &MEAN,
            &c,
            m,
            conf,
            Uncertainty::MeanAndCovariance,
            &mut g,
            d,
        )
    };
    assert_eq!(bound(2, 0.95, &mut d), Err(BoundError::TooFewSamples));
    for conf in [0.0, 1.0, -0.5, f64::NAN] {
        assert_eq!(bound(30, conf, &mut d), Err(BoundError::BadConfidence));
    }
    assert_eq!(bound(30, 0.95, &mut []), Err(BoundError::NoDraws));
    let bad = Covariance::from_matrix([[1.0, 2.0], [2.0, 1.0]]);
    assert_eq!(
        zone.yield_bound(&MEAN, &bad, 30, 0.95, Uncertainty::MeanOnly, &mut g, &mut d),
        Err(BoundError::Zone(ZoneError::BadDistribution))
    );
}

#[test]
fn seeded_and_single_precision_agree() {
    // The same seed gives the same bound; the f32 path (what a device runs) lands within the
    // Monte Carlo spread of the f64 one.
    let (_, zone) = zones()[2];
    let z32 = Zone::Ellipse(EllipseZone::new([2.0f32, -2.0], 30.0, 20.0, 0.4).unwrap());
    let c = Covariance::from_matrix(COV);
    let c32 = Covariance::from_matrix(COV.map(|r| r.map(|v| v as f32)));
    let run64 = |seed| {
        let mut d = vec![0.0f64; 2000];
        zone.yield_bound(
            &MEAN,
            &c,
            30,
            0.95,
            Uncertainty::MeanAndCovariance,
            &mut Xoshiro128::new(seed),
            &mut d,
        )
        .unwrap()
    };
    assert_eq!(run64(5), run64(5));
    let mut d = vec![0.0f32; 2000];
    let b32 = z32
        .yield_bound(
            &MEAN.map(|v| v as f32),
            &c32,
            30,
            0.95,
            Uncertainty::MeanAndCovariance,
            &mut Xoshiro128::new(5),
            &mut d,
        )
        .unwrap();
    let b64 = run64(5);
    let gap = b64.estimate.inside - b64.inside_lower;
    let diff = (f64::from(b32.inside_lower) - b64.inside_lower).abs();
    println!(
        "\nf32 bound {:.6}, f64 bound {:.6}, gap {gap:.2e}",
        b32.inside_lower, b64.inside_lower
    );
    assert!(diff < 0.25 * gap, "{diff} vs gap {gap}");
}
