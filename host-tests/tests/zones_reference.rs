//! Tolerance zones: probabilities against a committed mpmath reference
//! (`fixtures/zones/`, `python3 fixtures/zones/generate.py`), published closed forms, a seeded
//! Monte Carlo cross-check, and the bounds and integer forms.
//!
//! `cargo test -p covgate-host --test zones_reference -- --nocapture` prints the worst errors.

use covgate::math::{bvn_upper_f32, bvn_upper_f64, norm_cdf, Precision};
use covgate::{
    coverage_radius, Baseline, CircleZone, Covariance, EllipseZone, IntCircle, IntZone, RectZone,
    Yield, Zone,
};
use covgate_host::compare::{assert_close, Tol};
use covgate_host::fixture;
use covgate_host::reference;
use covgate_host::seeded::{check, Rng};
use covgate_host::zone_cases::{self, Case};
use proptest::prelude::*;
use proptest::test_runner::TestCaseError;

#[test]
fn bivariate_normal_matches_mpmath() {
    let file = "zones/bvn.csv";
    let (mut w64, mut w32) = (0.0f64, 0.0f64);
    for row in fixture::rows(file) {
        let (h, k, r): (f64, f64, f64) = (row.get(file, 0), row.get(file, 1), row.get(file, 2));
        let want: f64 = row.get(file, 3);
        let got = bvn_upper_f64(h, k, r);
        let at = format!("{file}:{} h {h} k {k} r {r}", row.line);
        // f64: the issue asks 1e-13 absolute; Genz (2004) reports about 1e-15 and the points
        // just above |r| = 0.925 caught a wrong constant at 2e-13, so hold 1e-14.
        Tol::abs(1e-14).check(&at, got, want).unwrap();
        w64 = w64.max((got - want).abs());
        // f32: 2e-6 absolute; the f32 inputs are the rounded h, k, r, whose own effect on the
        // probability is below 1e-7 here (density times a relative rounding of 6e-8).
        let got32 = f64::from(bvn_upper_f32(h as f32, k as f32, r as f32));
        Tol::abs(2e-6)
            .check(&format!("{at} (f32)"), got32, want)
            .unwrap();
        w32 = w32.max((got32 - want).abs());
    }
    println!("\nbivariate normal orthant vs mpmath: worst abs error f64 {w64:.2e}, f32 {w32:.2e}");
}

fn cases() -> Vec<Case> {
    zone_cases::load("zones/zones.csv")
}

fn zone<T: Precision>(c: &Case) -> Zone<T> {
    c.zone()
}

fn normal<T: Precision>(c: &Case) -> ([T; 2], Covariance<T, 2>) {
    c.normal()
}

fn prob<T: Precision>(z: &Zone<T>, b: &Baseline<T, 2>) -> Yield<T> {
    z.probability(b.mean(), &b.covariance()).unwrap()
}

#[test]
fn zone_probabilities_match_mpmath() {
    let mut worst = std::collections::BTreeMap::<String, [f64; 5]>::new();
    for c in cases() {
        let at = format!("zones.csv:{} {}", c.line, c.kind);
        let (m64, c64) = normal::<f64>(&c);
        let y = zone::<f64>(&c).probability(&m64, &c64).unwrap();
        // f64, as `Zone::probability` documents: 2e-14 absolute on both; outside also 1e-10
        // relative wherever it is >= 1e-9.
        Tol::abs(2e-14)
            .check(&format!("{at} inside"), y.inside, c.inside)
            .unwrap();
        Tol::abs(2e-14)
            .check(&format!("{at} outside"), y.outside, c.outside)
            .unwrap();
        let rel = if c.outside >= 1e-9 {
            Tol::rel(1e-10)
                .check(&format!("{at} outside rel"), y.outside, c.outside)
                .unwrap();
            ((y.outside - c.outside) / c.outside).abs()
        } else {
            0.0
        };
        let (m32, c32) = normal::<f32>(&c);
        let y32 = zone::<f32>(&c).probability(&m32, &c32).unwrap();
        let (i32_, o32) = (f64::from(y32.inside), f64::from(y32.outside));
        // f32: 2e-6 absolute, as documented.
        Tol::abs(2e-6)
            .check(&format!("{at} inside f32"), i32_, c.inside)
            .unwrap();
        Tol::abs(2e-6)
            .check(&format!("{at} outside f32"), o32, c.outside)
            .unwrap();
        let w = worst.entry(c.kind.clone()).or_default();
        w[0] = w[0].max(
            (y.inside - c.inside)
                .abs()
                .max((y.outside - c.outside).abs()),
        );
        w[1] = w[1].max(rel);
        w[2] = w[2].max((i32_ - c.inside).abs().max((o32 - c.outside).abs()));
        if c.outside >= 1e-4 {
            // f32 outside fraction from 100 ppm up: 1e-5 relative.
            Tol::rel(1e-5)
                .check(&format!("{at} outside f32 rel"), o32, c.outside)
                .unwrap();
            w[4] = w[4].max(((o32 - c.outside) / c.outside).abs());
        }
        // The cheap bounds bracket the reference (slack: the f64 evaluation of the bounds).
        let b = zone::<f64>(&c).bounds(&m64, &c64).unwrap();
        let slack = 1e-14;
        assert!(
            b.inside_lower <= c.inside + slack && c.inside <= b.inside_upper + slack,
            "{at}: {b:?} vs {}",
            c.inside
        );
        assert!(
            b.outside_lower <= c.outside * (1.0 + 1e-12) + 1e-300
                && c.outside <= b.outside_upper * (1.0 + 1e-12),
            "{at}: {b:?} vs {}",
            c.outside
        );
        w[3] = w[3].max(if c.outside > 0.0 {
            b.outside_upper / c.outside
        } else {
            0.0
        });
    }
    println!("\nzones vs mpmath (worst): kind, f64 abs, f64 outside rel (>= 1e-9), f32 abs, f32 outside rel (>= 1e-4), outside upper bound / exact");
    for (k, w) in &worst {
        println!(
            "  {k:<8} {:.2e}  {:.2e}  {:.2e}  {:.2e}  {:.3e}",
            w[0], w[1], w[2], w[4], w[3]
        );
    }
}

fn unit_baseline(mean: [f64; 2], sx: f64, sy: f64, rho: f64) -> Baseline<f64, 2> {
    let cov = Covariance::from_matrix([[sx * sx, rho * sx * sy], [rho * sx * sy, sy * sy]]);
    Baseline::new(mean, &cov).unwrap()
}

#[test]
fn published_closed_forms() {
    let inf = f64::INFINITY;
    // Sheppard (1899): P(X < 0, Y < 0) = 1/4 + asin(rho) / (2 pi), exact.
    for rho in [-0.95, -0.3, 0.0, 0.6, 0.99] {
        let z = Zone::Rect(RectZone::new([-inf, -inf], [0.0, 0.0]).unwrap());
        let y = prob(&z, &unit_baseline([0.0, 0.0], 1.0, 2.0, rho));
        let want = 0.25 + f64::asin(rho) / std::f64::consts::TAU;
        assert_close(
            &format!("Sheppard rho {rho}"),
            y.inside,
            want,
            Tol::abs(1e-15),
        );
        assert_close("Sheppard outside", y.outside, 1.0 - want, Tol::abs(1e-15));
    }
    // Independent axes: the rectangle probability is the product of the two intervals (exact).
    let b = unit_baseline([0.3, -1.0], 2.0, 0.5, 0.0);
    let z = Zone::Rect(RectZone::new([-3.0, -2.0], [4.0, inf]).unwrap());
    let px = norm_cdf((4.0 - 0.3) / 2.0) - norm_cdf((-3.0 - 0.3) / 2.0);
    let py = 1.0 - norm_cdf((-2.0 + 1.0) / 0.5);
    assert_close("product", prob(&z, &b).inside, px * py, Tol::abs(1e-15));
    // Rayleigh: circular normal, P(r <= R) = 1 - exp(-R^2 / (2 sigma^2)) (exact).
    let s = 1.7;
    let b = unit_baseline([5.0, -2.0], s, s, 0.0);
    for radius in [0.5, 1.7, 4.0, 9.0] {
        let z = Zone::Circle(CircleZone::new([5.0, -2.0], 2.0 * radius).unwrap());
        let y = prob(&z, &b);
        let out = (-radius * radius / (2.0 * s * s)).exp();
        assert_close(
            &format!("Rayleigh R {radius}"),
            y.inside,
            1.0 - out,
            Tol::abs(1e-15),
        );
        assert_close("Rayleigh outside", y.outside, out, Tol::new(1e-300, 1e-12));
    }
    // CEP = sqrt(2 ln 2) sigma = 1.1774 sigma, R95 = sqrt(-2 ln 0.05) sigma = 2.4477 sigma
    // (docs/REFERENCES.md, Rayleigh distribution: exact forms, factors to 4 decimals).
    let cep = coverage_radius(&b.covariance(), 0.5).unwrap() / s;
    let r95 = coverage_radius(&b.covariance(), 0.95).unwrap() / s;
    assert_close("CEP factor", cep, 1.1774, Tol::abs(5e-5));
    assert_close("R95 factor", r95, 2.4477, Tol::abs(5e-5));
    // Elliptical: the coverage radius is found by root finding; the probability at it is the
    // coverage.
    let be = unit_baseline([0.0, 0.0], 3.0, 0.7, 0.4);
    for q in [0.5, 0.9, 0.99, 0.999999] {
        let r = coverage_radius(&be.covariance(), q).unwrap();
        let z = Zone::Circle(CircleZone::new(*be.mean(), 2.0 * r).unwrap());
        let y = prob(&z, &be);
        assert_close(
            &format!("coverage {q}"),
            y.outside,
            1.0 - q,
            Tol::new(1e-15, 1e-9),
        );
    }
}

#[test]
fn nrc_2drms_and_cep_approximation() {
    // National Research Council (1995), The Global Positioning System, Appendix D: the
    // fraction inside 2 DRMS = 2 sqrt(sx^2 + sy^2) lies between about 95.5 % and 98.2 %
    // depending on ellipticity (its ends: P(|Z| <= 2) = 95.45 % for a line, 1 - e^-4 = 98.17 %
    // for a circle); CEP is approximately 0.589 (sx + sy).
    let mut worst_cep: f64 = 0.0;
    for k in 0..=40 {
        let ratio = 0.02 + 0.98 * f64::from(k) / 40.0;
        let (sx, sy) = (1.0, ratio);
        let b = unit_baseline([0.0, 0.0], sx, sy, 0.0);
        let drms2 = 2.0 * (sx * sx + sy * sy).sqrt();
        let p = prob(
            &Zone::Circle(CircleZone::new([0.0, 0.0], 2.0 * drms2).unwrap()),
            &b,
        )
        .inside;
        assert!(
            (0.9544..=0.9817).contains(&p),
            "ratio {ratio}: 2DRMS fraction {p}"
        );
        if ratio >= 0.3 {
            let cep = coverage_radius(&b.covariance(), 0.5).unwrap();
            worst_cep = worst_cep.max((0.589 * (sx + sy) / cep - 1.0).abs());
        }
    }
    println!("\nCEP approximation 0.589 (sx + sy): worst relative error {worst_cep:.4} for sy/sx in [0.3, 1]");
    // From memory: the approximation is quoted as good to a few percent for sy/sx >= 0.3.
    assert!(worst_cep < 0.03, "{worst_cep}");
}

#[test]
fn positional_tolerance_examples() {
    // Common practice (ASME Y14.5, ISO 1101): a hole conforms when 2 sqrt(dx^2 + dy^2) <= the
    // positional tolerance diameter. Offsets in micrometres, tolerance diameter 100 um.
    let z = IntCircle::new([0, 0], 100).unwrap();
    assert!(z.contains(&[30, 40])); // 2 * 50 = 100: on the boundary, conforms
    assert!(!z.contains(&[30, 41]));
    assert!(z.contains(&[-50, 0]) && !z.contains(&[-51, 0]));
    let f = CircleZone::new([0.0f64, 0.0], 100.0).unwrap();
    assert!(f.contains(&[30.0, 40.0]) && !f.contains(&[30.0, 40.5]));
    // Same verdicts from the float zone's integer form, centre at a nominal of (1200, -350) um.
    let f = CircleZone::new([1200.0, -350.0], 100.0).unwrap();
    let i = IntZone::from_zone(&Zone::Circle(f)).unwrap();
    for x in -60..=60 {
        for y in -60..=60 {
            let p = [1200 + x, -350 + y];
            assert_eq!(
                i.contains(&p),
                f.contains(&[f64::from(p[0]), f64::from(p[1])])
            );
        }
    }
    assert!(IntZone::from_zone(&Zone::Circle(CircleZone::new([0.5, 0.0], 10.0).unwrap())).is_err());
}

#[test]
fn kernels_against_f64() {
    // The f32 quadrature kernels against f64 functions (the Rust standard library's exp, sin,
    // cos and the libm crate's erfc, all within an ulp or two of f64: exact for this purpose).
    // exp and sin in ulp of the f32 result, over the normal range of exp and [-1.6, 1.6];
    // cos in absolute units of f32 epsilon; the smaller normal tail relative to itself over
    // |x| <= 12, in units of the stated bound (1 + x^2 / 2) 2^-24.
    use covgate::math::fast32::{cos32, exp32, normal_tails32, sin32};
    let ulp = |got: f32, want: f64| {
        let w = want as f32;
        let step = f64::from(f32::from_bits(w.to_bits() + 1) - w);
        (f64::from(got) - want).abs() / step
    };
    let (mut e_exp, mut e_sin, mut e_cos, mut e_tail) = (0f64, 0f64, 0f64, 0f64);
    for i in 0..=200_000 {
        let x = -87.0 + 175.0 * f64::from(i) / 200_000.0;
        let x32 = x as f32;
        e_exp = e_exp.max(ulp(exp32(x32), f64::from(x32).exp()));
        let t = (-1.6 + 3.2 * f64::from(i) / 200_000.0) as f32;
        if t != 0.0 {
            e_sin = e_sin.max(ulp(sin32(t), f64::from(t).sin()));
        }
        // cos absolutely (it vanishes at the ends, where only its absolute error matters).
        e_cos =
            e_cos.max((f64::from(cos32(t)) - f64::from(t).cos()).abs() / f64::from(f32::EPSILON));
        let z = (-12.0 + 24.0 * f64::from(i) / 200_000.0) as f32;
        let small = libm::erfc(f64::from(z).abs() / std::f64::consts::SQRT_2) / 2.0;
        let (lo, hi) = normal_tails32(z);
        let got = if z < 0.0 { lo } else { hi };
        let rel = (f64::from(got) - small).abs() / small;
        e_tail = e_tail.max(rel / ((1.0 + f64::from(z * z) / 2.0) * f64::from(f32::EPSILON) / 2.0));
        assert_eq!(f64::from(lo + hi), 1.0, "tails at {z} add to one");
    }
    println!(
        "\nf32 kernels, worst error: exp {e_exp:.2} ulp, sin {e_sin:.2} ulp, cos {e_cos:.2} eps \
         (absolute), normal tail (|x| <= 12) {e_tail:.2} x (1 + x^2 / 2) 2^-24"
    );
    assert!(
        e_exp <= 2.0 && e_sin <= 3.0 && e_cos <= 2.0,
        "{e_exp} {e_sin} {e_cos}"
    );
    assert!(e_tail <= 8.0, "{e_tail}");
    let (lo, hi) = normal_tails32(f32::NEG_INFINITY);
    assert_eq!((lo, hi), (0.0, 1.0));
    assert_eq!(normal_tails32(f32::INFINITY), (1.0, 0.0));
    assert!(normal_tails32(f32::NAN).0.is_nan() && exp32(f32::NAN).is_nan());
    assert_eq!(exp32(-100.0), 0.0);
    assert_eq!(exp32(100.0), f32::INFINITY);
    assert_eq!(exp32(0.0), 1.0);
}

#[test]
fn huge_finite_limits_equal_infinite_ones() {
    // A rectangle limit far beyond the data (a sentinel such as -1e20) must give the same
    // probabilities as an absent (infinite) one, in both precisions.
    let check = |lo: [f64; 2], hi: [f64; 2]| {
        let open = |v: f64| {
            if v.abs() >= 1e19 {
                v.signum() * f64::INFINITY
            } else {
                v
            }
        };
        let mean = [0.2, -0.1];
        let cov = [[1.3, 0.4], [0.4, 0.9]];
        let y64 = |a: [f64; 2], b: [f64; 2]| {
            Zone::Rect(RectZone::new(a, b).unwrap())
                .probability(&mean, &Covariance::from_matrix(cov))
                .unwrap()
        };
        let y32 = |a: [f64; 2], b: [f64; 2]| {
            let f = |v: [f64; 2]| v.map(|x| x as f32);
            Zone::Rect(RectZone::new(f(a), f(b)).unwrap())
                .probability(
                    &f(mean),
                    &Covariance::from_matrix(cov.map(|r| r.map(|x| x as f32))),
                )
                .unwrap()
        };
        let (lo_o, hi_o) = (lo.map(open), hi.map(open));
        let (a, b) = (y64(lo, hi), y64(lo_o, hi_o));
        assert!((a.inside - b.inside).abs() < 1e-15 && (a.outside - b.outside).abs() < 1e-15);
        let (a, b) = (y32(lo, hi), y32(lo_o, hi_o));
        assert!(
            (a.inside - b.inside).abs() < 1e-6 && (a.outside - b.outside).abs() < 1e-6,
            "{lo:?} {hi:?}: {a:?} vs {b:?}"
        );
    };
    check([-1e20, -1.0], [1.0, 1.0]);
    check([-1.0, -3e19], [1.0, 1.0]);
    check([-1.0, -1.0], [1e20, 2.0]);
    check([-1e30, -1e30], [1e30, 0.5]);
}

#[test]
fn int_circle_exact_across_the_16_bit_switch() {
    // Offsets up to 2^15 are tested in 32 bits, wider ones in 64: both must equal the exact
    // test 4 (dx^2 + dy^2) <= D^2 (here in i128), around the boundary and around the switch.
    let centres = [[0, 0], [-7, 3], [i32::MAX - 40_000, i32::MIN + 40_000]];
    let diameters = [
        1u32,
        2,
        3,
        65_535,
        65_536,
        65_537,
        92_681,
        131_071,
        131_073,
        1 << 30,
    ];
    for c in centres {
        for d in diameters {
            let z = IntCircle::new(c, d).unwrap();
            let r = i64::from(d) / 2;
            let mut offsets: Vec<i64> = Vec::new();
            for base in [0, r, 1 << 15, 46_341] {
                for k in -3..=3 {
                    offsets.push(base + k);
                    offsets.push(-base + k);
                }
            }
            for &dx in &offsets {
                for &dy in &offsets {
                    let (x, y) = (i64::from(c[0]) + dx, i64::from(c[1]) + dy);
                    let (Ok(x), Ok(y)) = (i32::try_from(x), i32::try_from(y)) else {
                        continue;
                    };
                    let want =
                        4 * (i128::from(dx).pow(2) + i128::from(dy).pow(2)) <= i128::from(d).pow(2);
                    assert_eq!(
                        z.contains(&[x, y]),
                        want,
                        "centre {c:?} d {d} at ({dx}, {dy})"
                    );
                }
            }
        }
    }
}

#[test]
fn monte_carlo_cross_check() {
    // 10^6 seeded draws per zone; the computed probability must lie in the 99.9 % binomial
    // interval of the observed fraction.
    let b = unit_baseline([0.4, -0.2], 1.3, 0.8, 0.65);
    let l = reference::cholesky(b.covariance().matrix()).unwrap();
    let zones = [
        Zone::Rect(RectZone::new([-2.0, -1.5], [3.0, f64::INFINITY]).unwrap()),
        Zone::Circle(CircleZone::new([0.0, 0.0], 3.2).unwrap()),
        Zone::Ellipse(EllipseZone::new([0.3, 0.0], 2.5, 1.0, 0.6).unwrap()),
    ];
    let n = 1_000_000u32;
    let mut rng = Rng::new(77);
    for z in zones {
        let p = prob(&z, &b).inside;
        let hits = (0..n)
            .filter(|_| z.contains(&rng.gaussian(b.mean(), &l)))
            .count();
        let f = hits as f64 / f64::from(n);
        let hw = 3.29 * (p * (1.0 - p) / f64::from(n)).sqrt();
        println!("\nMonte Carlo {z:?}: computed {p:.5}, observed {f:.5} (+- {hw:.5})");
        assert!((f - p).abs() <= hw, "{f} vs {p}");
    }
}

fn random_case() -> impl Strategy<Value = (Baseline<f64, 2>, Zone<f64>)> {
    let base = (
        -2.0..2.0f64,
        -2.0..2.0f64,
        -1.0..1.0f64,
        -1.0..1.0f64,
        -0.98..0.98f64,
    )
        .prop_map(|(mx, my, ex, ey, rho)| {
            unit_baseline([mx, my], 10f64.powf(ex), 10f64.powf(ey), rho)
        });
    let zone = prop_oneof![
        (
            0.1..8.0f64,
            0.1..8.0f64,
            0.1..8.0f64,
            0.1..8.0f64,
            any::<bool>()
        )
            .prop_map(|(a, b, c, d, open)| {
                let top = if open { f64::INFINITY } else { d };
                Zone::Rect(RectZone::new([-a, -c], [b, top]).unwrap())
            }),
        (-1.0..1.0f64, -1.0..1.0f64, 0.2..20.0f64)
            .prop_map(|(x, y, d)| Zone::Circle(CircleZone::new([x, y], d).unwrap())),
        (
            -1.0..1.0f64,
            -1.0..1.0f64,
            0.2..10.0f64,
            0.2..10.0f64,
            -3.2..3.2f64
        )
            .prop_map(|(x, y, a, b, t)| Zone::Ellipse(EllipseZone::new([x, y], a, b, t).unwrap())),
    ];
    (base, zone)
}

#[test]
fn bounds_bracket_and_precisions_agree() {
    check("zone_bounds", 1024, random_case(), |(b, z)| {
        let y: Yield<f64> = prob(&z, &b);
        let bd = z.bounds(b.mean(), &b.covariance()).unwrap();
        let s = 1e-13;
        prop_assert!(
            bd.inside_lower <= y.inside + s && y.inside <= bd.inside_upper + s,
            "{bd:?} {y:?}"
        );
        prop_assert!(
            bd.outside_lower <= y.outside + s && y.outside <= bd.outside_upper + s,
            "{bd:?} {y:?}"
        );
        prop_assert!((y.inside + y.outside - 1.0).abs() < 1e-13, "{y:?}");
        // f32 against f64 on the same (rounded) parameters.
        let c = b.covariance();
        let c32 = Covariance::from_matrix(c.matrix().map(|r| r.map(|v| v as f32)));
        let m = b.mean();
        let m32 = [m[0] as f32, m[1] as f32];
        let z32: Zone<f32> = match z {
            Zone::Rect(r) => Zone::Rect(
                RectZone::new(r.lo().map(|v| v as f32), r.hi().map(|v| v as f32)).unwrap(),
            ),
            Zone::Circle(k) => Zone::Circle(
                CircleZone::new(k.centre().map(|v| v as f32), k.diameter() as f32).unwrap(),
            ),
            Zone::Ellipse(e) => {
                let (cs, sn) = e.rotation();
                let [a, bb] = e.axes();
                Zone::Ellipse(
                    EllipseZone::new(
                        e.centre().map(|v| v as f32),
                        a as f32,
                        bb as f32,
                        sn.atan2(cs) as f32,
                    )
                    .unwrap(),
                )
            }
        };
        let y32 = z32.probability(&m32, &c32).unwrap();
        // The f32 bounds bracket the f32 probability up to f32 rounding (a one-sided rectangle
        // can make a bound equal to the exact value, so allow 1e-6).
        let b32 = z32.bounds(&m32, &c32).unwrap();
        prop_assert!(
            b32.inside_lower <= y32.inside + 1e-6 && y32.inside <= b32.inside_upper + 1e-6,
            "{b32:?} {y32:?}"
        );
        // The documented 2e-6 for the method plus the effect of rounding the parameters to f32
        // (about 1e-6 at most for these shapes: density times a relative change of 6e-8 of
        // sizes up to 20 standard deviations).
        prop_assert!(
            (f64::from(y32.inside) - y.inside).abs() < 3e-6,
            "{y32:?} {y:?}"
        );
        Ok(())
    });
}

#[test]
fn integer_zones_match_the_float_test() {
    check(
        "int_zones",
        256,
        (random_case(), -5i32..5, -5i32..5),
        |((_, z), ox, oy)| {
            // Scale the zone to counts: 40 counts per unit, offset by a nominal.
            let nominal = [2000.0 + f64::from(ox), -700.0 + f64::from(oy)];
            let k = 40.0;
            let zc = match z {
                Zone::Rect(r) => {
                    let (lo, hi) = (r.lo(), r.hi());
                    Zone::Rect(
                        RectZone::new(
                            [nominal[0] + k * lo[0], nominal[1] + k * lo[1]],
                            [nominal[0] + k * hi[0], nominal[1] + k * hi[1]],
                        )
                        .unwrap(),
                    )
                }
                Zone::Circle(c) => {
                    Zone::Circle(CircleZone::new(nominal, k * c.diameter()).unwrap())
                }
                Zone::Ellipse(e) => {
                    let (cs, sn) = e.rotation();
                    let [a, b] = e.axes();
                    Zone::Ellipse(EllipseZone::new(nominal, k * a, k * b, sn.atan2(cs)).unwrap())
                }
            };
            let iz = IntZone::from_zone(&zc).map_err(|e| TestCaseError::fail(e.to_string()))?;
            for dx in (-420..=420).step_by(7) {
                for dy in (-420..=420).step_by(7) {
                    let p = [nominal[0] as i32 + dx, nominal[1] as i32 + dy];
                    let fp = [f64::from(p[0]), f64::from(p[1])];
                    let float = zc.contains(&fp);
                    if let (IntZone::Ellipse(g), Zone::Ellipse(e)) = (&iz, &zc) {
                        let [u, v] = e.to_unit(&fp);
                        if (u * u + v * v - 1.0).abs() <= g.band() {
                            continue;
                        }
                    }
                    prop_assert_eq!(iz.contains(&p), float, "{:?} at {:?}", zc, p);
                }
            }
            Ok(())
        },
    );
}
