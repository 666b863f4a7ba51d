//! Units never change verdicts: the baseline judges conditioning on the correlation matrix, so
//! axes in very different units (micrometres beside millimetres, a position beside a
//! temperature) freeze in `f32` as in `f64`, and rescaling one axis by 10^3 or 10^-3 leaves
//! every `d^2`, verdict and rectangle / axis-aligned ellipse yield the same to rounding.
//!
//! Margins: `d^2` relative `64 N eps / rcond` with `rcond` the correlation matrix's reciprocal
//! condition (the `Baseline` docs: `N eps / rcond`); a verdict may differ only within that
//! band of the limit; yields within the documented absolute accuracy (2e-14 f64, 2e-6 f32).

use covgate::math::Precision;
use covgate::{Baseline, Covariance, EllipseZone, Gate, Limit, RectZone, Zone};
use covgate_host::seeded::Rng;

fn scaled<T: Precision>(k: f64, sd: [f64; 2], rho: f64) -> (Baseline<T, 2>, [f64; 2]) {
    let s = [sd[0], sd[1] * k];
    let c = [
        [s[0] * s[0], rho * s[0] * s[1]],
        [rho * s[0] * s[1], s[1] * s[1]],
    ];
    let mean = [0.25 * s[0], -0.5 * s[1]];
    let b = Baseline::new(
        mean.map(T::from_f64),
        &Covariance::from_matrix(c.map(|r| r.map(T::from_f64))),
    )
    .expect("axes in different units freeze");
    (b, s)
}

fn check<T: Precision>(eps: f64, yield_tol: f64) {
    let mut rng = Rng::new(0x0417);
    let (sd, rho) = ([2e-3, 1.0], 0.6);
    let (b1, s1) = scaled::<T>(1.0, sd, rho);
    let g1 = Gate::new(
        b1,
        Limit::ChiSquare {
            alpha: T::from_f64(0.01),
        },
    )
    .unwrap();
    let band = 64.0 * 2.0 * eps / b1.correlation_condition().to_f64();
    let zone = |s: [f64; 2]| {
        Zone::Rect(
            RectZone::new(
                [T::from_f64(-2.0 * s[0]), T::from_f64(-3.0 * s[1])],
                [T::from_f64(2.5 * s[0]), T::from_f64(1.5 * s[1])],
            )
            .unwrap(),
        )
    };
    let ell = |s: [f64; 2]| {
        Zone::Ellipse(
            EllipseZone::new(
                [T::ZERO; 2],
                T::from_f64(3.0 * s[0]),
                T::from_f64(2.0 * s[1]),
                T::ZERO,
            )
            .unwrap(),
        )
    };
    let y1 = [zone(s1), ell(s1)].map(|z| z.probability(b1.mean(), &b1.covariance()).unwrap());
    for k in [1e3, 1e-3, 1e6] {
        let (bk, sk) = scaled::<T>(k, sd, rho);
        let gk = Gate::new(
            bk,
            Limit::ChiSquare {
                alpha: T::from_f64(0.01),
            },
        )
        .unwrap();
        for _ in 0..2000 {
            let u = [3.0 * rng.normal(), 3.0 * rng.normal()];
            let x1 = [T::from_f64(u[0] * s1[0]), T::from_f64(u[1] * s1[1])];
            let xk = [T::from_f64(u[0] * sk[0]), T::from_f64(u[1] * sk[1])];
            let (d1, dk) = (b1.mahalanobis2(&x1).to_f64(), bk.mahalanobis2(&xk).to_f64());
            assert!(
                (d1 - dk).abs() <= band * d1.max(1.0),
                "k {k}: d2 {d1} vs {dk} (band {band:e})"
            );
            let limit = g1.limit().to_f64();
            if (d1 - limit).abs() > band * limit {
                assert_eq!(g1.passes(&x1), gk.passes(&xk), "k {k} at {u:?}");
            }
        }
        let yk = [zone(sk), ell(sk)].map(|z| z.probability(bk.mean(), &bk.covariance()).unwrap());
        for (a, b) in y1.iter().zip(yk.iter()) {
            assert!(
                (a.inside.to_f64() - b.inside.to_f64()).abs() <= yield_tol
                    && (a.outside.to_f64() - b.outside.to_f64()).abs() <= yield_tol,
                "k {k}: {a:?} vs {b:?}"
            );
        }
    }
}

#[test]
fn rescaling_an_axis_changes_nothing_f64() {
    check::<f64>(f64::EPSILON, 2e-14);
}

#[test]
fn rescaling_an_axis_changes_nothing_f32() {
    check::<f32>(f64::from(f32::EPSILON), 2e-6);
}

#[test]
fn uncorrelated_axes_in_any_units_freeze_in_f32() {
    // Spreads 1e-4 and 1e4 (ratio 1e8): refused before the conditioning was judged on the
    // correlation matrix (smallest / largest eigenvalue 1e-16 < sqrt(eps)).
    let c = Covariance::from_matrix([[1e-8f32, 0.0], [0.0, 1e8]]);
    let b = Baseline::new([0.0f32; 2], &c).unwrap();
    assert_eq!(b.correlation_condition(), 1.0);
    assert!((b.mahalanobis2(&[1e-4, 1e4]) - 2.0).abs() < 1e-6);
}
