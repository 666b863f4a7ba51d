//! Box probabilities in three dimensions (Plackett's reduction), against:
//! - `fixtures/zones/box3.csv`: 160 boxes under one-factor correlations (r_ij = l_i l_j), where
//!   the probability is a one-dimensional integral that mpmath evaluates to 30 digits
//!   (generator `fixtures/zones/box3.py`; one-sided limits, offsets, outside down to 1e-7);
//! - Sheppard's orthant formula, `P(X <= 0) = 1/8 + (asin r01 + asin r02 + asin r12) / (4 pi)`
//!   (exact; Johnson & Kotz, Continuous Multivariate Distributions, ch. 35), for general
//!   correlations;
//! - independent axes: products of normal probabilities;
//! - in 2-D, the rectangle, to the bit.
//!
//! `cargo test -p covgate-host --test zones_box3 -- --nocapture` prints the worst errors.

use covgate::{BoxZone, Covariance, RectZone, Zone, ZoneError};
use covgate_host::seeded::Rng;

fn parse(v: &str) -> f64 {
    match v {
        "inf" => f64::INFINITY,
        "-inf" => f64::NEG_INFINITY,
        _ => v.parse().unwrap(),
    }
}

fn corr(r01: f64, r02: f64, r12: f64) -> Covariance<f64, 3> {
    Covariance::from_matrix([[1.0, r01, r02], [r01, 1.0, r12], [r02, r12, 1.0]])
}

#[test]
fn one_factor_boxes_match_mpmath() {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../fixtures/zones/box3.csv"),
    )
    .unwrap();
    let (mut worst_in, mut worst_out, mut worst_rel) = (0.0f64, 0.0f64, 0.0f64);
    let (mut worst32, mut n) = (0.0f64, 0);
    for line in text.lines().skip(1) {
        let v: Vec<f64> = line.split(',').map(parse).collect();
        let (l, lim, inside, outside) = (&v[0..3], &v[3..9], v[9], v[10]);
        let cov = corr(l[0] * l[1], l[0] * l[2], l[1] * l[2]);
        let lo = [lim[0], lim[2], lim[4]];
        let hi = [lim[1], lim[3], lim[5]];
        let y = BoxZone::new(lo, hi)
            .unwrap()
            .probability(&[0.0; 3], &cov)
            .unwrap();
        // The cheap brackets hold the reference.
        let bb = BoxZone::new(lo, hi)
            .unwrap()
            .bounds(&[0.0; 3], &cov)
            .unwrap();
        assert!(
            bb.inside_lower <= inside + 1e-15 && inside <= bb.inside_upper + 1e-15,
            "{bb:?}"
        );
        assert!(bb.outside_lower <= outside + 1e-15 && outside <= bb.outside_upper + 1e-15);
        worst_in = worst_in.max((y.inside - inside).abs());
        worst_out = worst_out.max((y.outside - outside).abs());
        if outside > 1e-9 {
            worst_rel = worst_rel.max((y.outside - outside).abs() / outside);
        }
        let c32 = Covariance::from_matrix(cov.matrix().map(|r| r.map(|x| x as f32)));
        let y32 = BoxZone::new(lo.map(|x| x as f32), hi.map(|x| x as f32))
            .unwrap()
            .probability(&[0.0f32; 3], &c32)
            .unwrap();
        worst32 = worst32.max((f64::from(y32.inside) - y.inside).abs());
        worst32 = worst32.max((f64::from(y32.outside) - y.outside).abs());
        n += 1;
    }
    println!(
        "3-D boxes vs mpmath ({n} one-factor cases): f64 inside {worst_in:.2e}, outside {worst_out:.2e}, outside rel {worst_rel:.2e}; f32 vs f64 {worst32:.2e}"
    );
    assert_eq!(n, 160);
    assert!(
        worst_in <= 1e-13 && worst_out <= 1e-13,
        "{worst_in} {worst_out}"
    );
    assert!(worst_rel <= 1e-9, "{worst_rel}");
    assert!(worst32 <= 2e-6, "{worst32}");
}

#[test]
fn orthants_match_sheppard_for_general_correlations() {
    // Exact: 1/8 + (asin r01 + asin r02 + asin r12) / (4 pi) (Sheppard's formula).
    let mut rng = Rng::new(1501);
    let (mut worst, mut worst32) = (0.0f64, 0.0f64);
    let mut cases = 0;
    while cases < 300 {
        let r = [0; 3].map(|_| rng.uniform() * 1.98 - 0.99);
        let cov = corr(r[0], r[1], r[2]);
        let Ok(zone) = BoxZone::new([f64::NEG_INFINITY; 3], [0.0; 3]) else {
            unreachable!()
        };
        let Ok(y) = zone.probability(&[0.0; 3], &cov) else {
            continue; // not positive definite: draw again
        };
        let exact =
            0.125 + (r[0].asin() + r[1].asin() + r[2].asin()) / (4.0 * std::f64::consts::PI);
        worst = worst
            .max((y.inside - exact).abs())
            .max((y.outside - (1.0 - exact)).abs());
        // f32, on the correlations rounded to f32 (which moves the result by about 1e-8).
        let c32 = Covariance::from_matrix(cov.matrix().map(|row| row.map(|v| v as f32)));
        if let Ok(y32) = BoxZone::new([f32::NEG_INFINITY; 3], [0.0f32; 3])
            .unwrap()
            .probability(&[0.0f32; 3], &c32)
        {
            worst32 = worst32
                .max((f64::from(y32.inside) - exact).abs())
                .max((f64::from(y32.outside) - (1.0 - exact)).abs());
        }
        cases += 1;
    }
    println!("3-D orthants vs Sheppard (300 correlation matrices, |r| <= 0.99): worst {worst:.2e} (f64), {worst32:.2e} (f32)");
    assert!(worst <= 1e-13, "{worst}");
    assert!(worst32 <= 2e-6, "{worst32}");
}

#[test]
fn independent_axes_are_products_and_2d_is_the_rectangle() {
    let mut rng = Rng::new(1502);
    for _ in 0..200 {
        let lo = [0; 3].map(|_| rng.normal() * 2.0 - 1.0);
        let hi = lo.map(|v| v + 0.1 + 3.0 * rng.uniform());
        let sd = [0; 3].map(|_| 0.5 + rng.uniform());
        let mean = [0; 3].map(|_| rng.normal());
        let cov = Covariance::from_matrix([
            [sd[0] * sd[0], 0.0, 0.0],
            [0.0, sd[1] * sd[1], 0.0],
            [0.0, 0.0, sd[2] * sd[2]],
        ]);
        let y = BoxZone::new(lo, hi)
            .unwrap()
            .probability(&mean, &cov)
            .unwrap();
        let p: f64 = (0..3)
            .map(|i| {
                covgate::math::norm_cdf((hi[i] - mean[i]) / sd[i])
                    - covgate::math::norm_cdf((lo[i] - mean[i]) / sd[i])
            })
            .product();
        assert!((y.inside - p).abs() <= 1e-14, "{} vs {p}", y.inside);
        assert!((y.outside - (1.0 - p)).abs() <= 1e-14);
        // 2-D: the rectangle's own numbers, bit for bit.
        let c2 = Covariance::from_matrix([
            [sd[0] * sd[0], 0.3 * sd[0] * sd[1]],
            [0.3 * sd[0] * sd[1], sd[1] * sd[1]],
        ]);
        let b2 = BoxZone::new([lo[0], lo[1]], [hi[0], hi[1]]).unwrap();
        let r2 = Zone::Rect(RectZone::new([lo[0], lo[1]], [hi[0], hi[1]]).unwrap());
        assert_eq!(
            b2.probability(&[mean[0], mean[1]], &c2).unwrap(),
            r2.probability(&[mean[0], mean[1]], &c2).unwrap()
        );
    }
    let four = BoxZone::new([0.0; 4], [1.0; 4]).unwrap();
    let c4 = Covariance::from_matrix([
        [1.0, 0.0, 0.0, 0.0],
        [0.0, 1.0, 0.0, 0.0],
        [0.0, 0.0, 1.0, 0.0],
        [0.0, 0.0, 0.0, 1.0],
    ]);
    assert_eq!(
        four.probability(&[0.0; 4], &c4),
        Err(ZoneError::Unsupported)
    );
    let bad = corr(0.9, 0.9, -0.9);
    assert_eq!(
        BoxZone::new([0.0; 3], [1.0; 3])
            .unwrap()
            .probability(&[0.0; 3], &bad),
        Err(ZoneError::BadDistribution)
    );
}
