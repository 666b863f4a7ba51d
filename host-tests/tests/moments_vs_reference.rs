//! Every accumulator against the independent two-pass reference, plus the algebraic
//! properties: merge equals one pass, the pivot changes nothing but rounding, a rejected
//! sample changes nothing. Seeded (`COVGATE_SEED`), 256 cases per property.

// Matrix entries read best by their indices here.
#![allow(clippy::needless_range_loop)]

use covgate::{
    EwMoments2, ExactMoments2, ExactMoments3, Merge, Moments, Moments2, Pivoted, SampleError,
    WeightedMoments2,
};
use covgate_host::compare::Tol;
use covgate_host::reference;
use covgate_host::seeded::check;
use proptest::prelude::*;
use proptest::test_runner::TestCaseError;

const CASES: u32 = 256;
const EPS64: f64 = f64::EPSILON;
const EPS32: f64 = f32::EPSILON as f64;

/// A 2-D stream: common offsets, per-axis scale and a correlation, from uniform draws.
#[derive(Clone, Debug)]
struct Stream {
    offset: [f64; 2],
    scale: [f64; 2],
    xs: Vec<[f64; 2]>,
}

impl Stream {
    /// Offset size over spread: what a float accumulator without pivot must survive.
    fn kappa(&self) -> f64 {
        (self.offset[0].abs() / self.scale[0]).max(self.offset[1].abs() / self.scale[1])
    }
}

fn stream(max_len: usize) -> impl Strategy<Value = Stream> {
    let offset = prop_oneof![Just(0.0), -1e3..1e3f64, -1e6..1e6f64];
    let scale = (-3.0..3.0f64).prop_map(|e| 10f64.powf(e));
    (
        [offset.clone(), offset],
        [scale.clone(), scale],
        -0.95..0.95f64,
        prop::collection::vec((-1.0..1.0f64, -1.0..1.0f64), 2..max_len),
    )
        .prop_map(|(offset, scale, rho, uv)| {
            let c = (1.0 - rho * rho).sqrt();
            let xs = uv
                .into_iter()
                .map(|(u, v)| {
                    [
                        offset[0] + scale[0] * u,
                        offset[1] + scale[1] * (rho * u + c * v),
                    ]
                })
                .collect();
            Stream { offset, scale, xs }
        })
}

fn fail(msg: String) -> TestCaseError {
    TestCaseError::fail(msg)
}

/// Checks a mean and a sample covariance against the reference. `mean_tol` and `cov_tol` are
/// relative to the stream's scale (per axis) so one number serves every offset and spread; the
/// mean also gets `4 eps |mean|`, the rounding of the mean itself in `f64`.
fn check_against(
    s: &Stream,
    mean: [f64; 2],
    cov: [[f64; 2]; 2],
    mean_tol: f64,
    cov_tol: f64,
) -> Result<(), TestCaseError> {
    let r = reference::moments(&s.xs);
    check_summary(s, (mean, cov), (r.mean, r.sample_cov()), mean_tol, cov_tol)
}

/// As [`check_against`], against a given expected mean and covariance.
fn check_summary(
    s: &Stream,
    (mean, cov): ([f64; 2], [[f64; 2]; 2]),
    (want_mean, want_cov): ([f64; 2], [[f64; 2]; 2]),
    mean_tol: f64,
    cov_tol: f64,
) -> Result<(), TestCaseError> {
    for i in 0..2 {
        Tol::new(mean_tol * s.scale[i], 4.0 * EPS64)
            .check(&format!("mean[{i}]"), mean[i], want_mean[i])
            .map_err(fail)?;
        for j in 0..2 {
            Tol::abs(cov_tol * s.scale[i] * s.scale[j])
                .check(&format!("cov[{i}][{j}]"), cov[i][j], want_cov[i][j])
                .map_err(fail)?;
        }
    }
    Ok(())
}

/// The f32 accumulator behind a first-sample pivot against the reference (tolerance below).
fn check_f32_pivoted(s: &Stream, p: &Pivoted<Moments2<f32>, f64, 2>) -> Result<(), TestCaseError> {
    let sqn = (s.xs.len() as f64).sqrt();
    let cov = p
        .inner()
        .sample_covariance()
        .unwrap()
        .matrix()
        .map(|r| r.map(f64::from));
    let tol = 32.0 * EPS32 * 4.0;
    check_against(s, p.mean_f64().unwrap(), cov, tol, tol * sqn)
}

/// Tolerance table (each entry relative to the per-axis scale):
/// - f64 Welford, no pivot: the deviations carry the mean's rounding `eps |offset|`, so the
///   error grows with `kappa = |offset| / scale`: allow `64 eps (1 + kappa)` on the mean and
///   `64 eps (1 + kappa)` times `sqrt(n)` on the covariance.
/// - f64 Welford behind a first-sample pivot: the offsets are of order the scale, so the same
///   bound with `kappa` replaced by the spread of the data around the first sample (about 2).
/// - f32 behind a pivot: `128 eps32 sqrt(n)` on the covariance and `128 eps32` on the mean
///   (eps32 about 1.2e-7; the cast of each offset already rounds once). Seeds 1-4 and the
///   default pass with a quarter of it; at n = 300 it is 2.6e-4 relative, so an `n` for
///   `n - 1` divisor (0.3 %) would fail.
#[test]
fn f64_welford_matches_two_pass() {
    check("f64_welford", CASES, stream(300), |s| {
        let mut m = Moments2::<f64>::new();
        for x in &s.xs {
            m.push(*x).map_err(|e| fail(e.to_string()))?;
        }
        let k = 1.0 + s.kappa();
        let sqn = (s.xs.len() as f64).sqrt();
        check_against(
            &s,
            m.mean().unwrap(),
            *m.sample_covariance().unwrap().matrix(),
            64.0 * EPS64 * k,
            64.0 * EPS64 * k * sqn,
        )
    });
}

#[test]
fn pivoted_f64_and_f32_match_two_pass() {
    check("pivoted_float", CASES, stream(300), |s| {
        let mut m64 = Pivoted::<Moments2<f64>, f64, 2>::first_sample(Moments2::new());
        let mut m32 = Pivoted::<Moments2<f32>, f64, 2>::first_sample(Moments2::new());
        for x in &s.xs {
            m64.push(*x).map_err(|e| fail(e.to_string()))?;
            m32.push(*x).map_err(|e| fail(e.to_string()))?;
        }
        let sqn = (s.xs.len() as f64).sqrt();
        let c64 = *m64.inner().sample_covariance().unwrap().matrix();
        // The mean is pivot + offset mean: exact pivot, the rounding is in the offset part.
        check_against(
            &s,
            m64.mean_f64().unwrap(),
            c64,
            64.0 * EPS64 * 4.0,
            64.0 * EPS64 * 4.0 * sqn,
        )?;
        check_f32_pivoted(&s, &m32)
    });
}

#[test]
fn pivot_does_not_change_the_answer() {
    check("pivot_invariance", CASES, stream(300), |s| {
        let mut plain = Moments2::<f64>::new();
        let nominal = [s.offset[0].round(), s.offset[1].round()];
        let mut given = Pivoted::<Moments2<f64>, f64, 2>::with_pivot(Moments2::new(), nominal);
        for x in &s.xs {
            plain.push(*x).unwrap();
            given.push(*x).unwrap();
        }
        let k = 1.0 + s.kappa();
        let sqn = (s.xs.len() as f64).sqrt();
        let a = *plain.sample_covariance().unwrap().matrix();
        let b = *given.inner().sample_covariance().unwrap().matrix();
        let (pm, gm) = (plain.mean().unwrap(), given.mean_f64().unwrap());
        check_summary(
            &s,
            (pm, a),
            (gm, b),
            64.0 * EPS64 * k,
            128.0 * EPS64 * k * sqn,
        )?;
        Ok(())
    });
}

/// Integer streams: counts around an ADC offset, 2-D and 3-D.
fn counts(dim: usize) -> impl Strategy<Value = (i32, Vec<Vec<i32>>)> {
    (
        prop_oneof![Just(0i32), -2_000_000..2_000_000i32],
        prop::collection::vec(prop::collection::vec(-40_000..40_000i32, dim), 2..400),
    )
        .prop_map(|(off, rows)| {
            let rows = rows
                .into_iter()
                .map(|r| r.into_iter().map(|v| v + off).collect())
                .collect();
            (off, rows)
        })
}

#[test]
fn exact_integer_matches_two_pass() {
    check("exact_2d", CASES, counts(2), |(off, rows)| {
        let mut m = Pivoted::<ExactMoments2, i32, 2>::with_pivot(ExactMoments2::new(), [off; 2]);
        let mut raw = ExactMoments2::new();
        let xs: Vec<[f64; 2]> = rows.iter().map(|r| [r[0] as f64, r[1] as f64]).collect();
        for r in &rows {
            m.push([r[0], r[1]]).unwrap();
            raw.push([r[0], r[1]]).unwrap();
        }
        let r = reference::moments(&xs);
        let rc = r.sample_cov();
        let c = m.inner().sample_covariance::<f64>().unwrap();
        let craw = raw.sample_covariance::<f64>().unwrap();
        // Exact sums, one division: both within a few ulp of the (compensated) reference.
        let tol = Tol::new(1e-300, 8.0 * EPS64);
        for i in 0..2 {
            tol.check("mean", m.mean_f64().unwrap()[i], r.mean[i])
                .map_err(fail)?;
            for j in 0..2 {
                // Scale-relative floor for near-zero covariances (the reference's own error).
                let floor = Tol::new(4.0 * EPS64 * (rc[i][i] * rc[j][j]).sqrt(), 8.0 * EPS64);
                floor
                    .check("cov", c.matrix()[i][j], rc[i][j])
                    .map_err(fail)?;
                floor
                    .check("cov raw", craw.matrix()[i][j], rc[i][j])
                    .map_err(fail)?;
            }
        }
        // The pivot changes the integer sums, not the exact co-moments.
        prop_assert_eq!(m.inner().count(), raw.count());
        let (a, b) = (m.inner().scaled_comoment(), raw.scaled_comoment());
        prop_assert_eq!(a, b);
        Ok(())
    });
}

#[test]
fn exact_merge_is_exactly_one_pass() {
    check(
        "exact_merge_3d",
        CASES,
        (counts(3), any::<prop::sample::Index>()),
        |((off, rows), cut)| {
            let cut = cut.index(rows.len());
            let row = |r: &Vec<i32>| [r[0], r[1], r[2]];
            let mut whole = ExactMoments3::new();
            let mut a = ExactMoments3::new();
            let mut b = ExactMoments3::new();
            for (k, r) in rows.iter().enumerate() {
                whole.push(row(r)).unwrap();
                if k < cut {
                    a.push(row(r)).unwrap()
                } else {
                    b.push(row(r)).unwrap()
                }
            }
            a.merge(&b).unwrap();
            prop_assert_eq!(a, whole);
            // Different first-sample pivots on the two halves: re-centring is exact too.
            let mut pa = Pivoted::<ExactMoments3, i32, 3>::first_sample(ExactMoments3::new());
            let mut pb = Pivoted::<ExactMoments3, i32, 3>::first_sample(ExactMoments3::new());
            let mut pw = Pivoted::<ExactMoments3, i32, 3>::first_sample(ExactMoments3::new());
            for (k, r) in rows.iter().enumerate() {
                pw.push(row(r)).unwrap();
                if k < cut {
                    pa.push(row(r)).unwrap()
                } else {
                    pb.push(row(r)).unwrap()
                }
            }
            pa.merge(&pb).unwrap();
            prop_assert_eq!(pa.inner().scaled_comoment(), pw.inner().scaled_comoment());
            prop_assert_eq!(pa.mean_f64().unwrap(), pw.mean_f64().unwrap());
            let _ = off;
            Ok(())
        },
    );
}

#[test]
fn float_merge_equals_one_pass() {
    check(
        "float_merge",
        CASES,
        (stream(300), any::<prop::sample::Index>()),
        |(s, cut)| {
            let cut = cut.index(s.xs.len());
            type P = Pivoted<Moments2<f32>, f64, 2>;
            let (mut a, mut b, mut w) = (
                P::first_sample(Moments2::new()),
                P::first_sample(Moments2::new()),
                P::first_sample(Moments2::new()),
            );
            let (mut fa, mut fb, mut fw) = (
                Moments2::<f64>::new(),
                Moments2::<f64>::new(),
                Moments2::<f64>::new(),
            );
            for (k, x) in s.xs.iter().enumerate() {
                w.push(*x).unwrap();
                fw.push(*x).unwrap();
                if k < cut {
                    a.push(*x).unwrap();
                    fa.push(*x).unwrap();
                } else {
                    b.push(*x).unwrap();
                    fb.push(*x).unwrap();
                }
            }
            a.merge(&b).unwrap();
            fa.merge(&fb).unwrap();
            prop_assert_eq!(a.count(), w.count());
            let sqn = (s.xs.len() as f64).sqrt();
            let k = 1.0 + s.kappa();
            check_f32_pivoted(&s, &a)?;
            check_against(
                &s,
                fa.mean().unwrap(),
                *fa.sample_covariance().unwrap().matrix(),
                64.0 * EPS64 * k,
                64.0 * EPS64 * k * sqn,
            )
        },
    );
}

#[test]
fn weighted_matches_weighted_two_pass() {
    let weights = prop::collection::vec(0.01..10.0f64, 300);
    check("weighted", CASES, (stream(300), weights), |(s, ws)| {
        let ws = &ws[..s.xs.len()];
        let mut m = WeightedMoments2::<f64>::new();
        for (x, w) in s.xs.iter().zip(ws) {
            m.push(*x, *w).unwrap();
        }
        let r = reference::weighted(&s.xs, ws);
        let k = 1.0 + s.kappa();
        let sqn = (s.xs.len() as f64).sqrt();
        let pc = *m.population_covariance().unwrap().matrix();
        let want = (r.mean, r.population_cov());
        check_summary(
            &s,
            (m.mean().unwrap(), pc),
            want,
            64.0 * EPS64 * k,
            256.0 * EPS64 * k * sqn,
        )?;
        Tol::rel(1e-13)
            .check("weight", m.weight(), r.weight)
            .map_err(fail)
    });
}

#[test]
fn exponential_matches_direct_weights() {
    check(
        "exponential",
        CASES,
        (stream(200), 0.01..1.0f64),
        |(s, a)| {
            let mut m = EwMoments2::<f64>::new(a).unwrap();
            for x in &s.xs {
                m.push(*x).unwrap();
            }
            let (rm, rc) = reference::exponential(&s.xs, a);
            let k = 1.0 + s.kappa();
            let sqn = (s.xs.len() as f64).sqrt();
            let c = m.covariance().unwrap();
            let got = (m.mean().unwrap(), *c.matrix());
            check_summary(&s, got, (rm, rc), 64.0 * EPS64 * k, 256.0 * EPS64 * k * sqn)?;
            // Positive semi-definite by construction.
            let [[p, q], [_, r]] = *c.matrix();
            prop_assert!(p >= 0.0 && r >= 0.0 && p * r - q * q >= -1e-12 * p * r);
            Ok(())
        },
    );
}

#[test]
fn a_rejected_sample_changes_nothing() {
    let bad = prop_oneof![Just(f64::NAN), Just(f64::INFINITY), Just(f64::NEG_INFINITY)];
    check(
        "rejection",
        CASES,
        (
            stream(100),
            bad,
            any::<bool>(),
            any::<prop::sample::Index>(),
        ),
        |(s, bad, first, at)| {
            let at = at.index(s.xs.len());
            let mut m = Moments2::<f32>::new();
            let mut p = Pivoted::<Moments2<f32>, f64, 2>::first_sample(Moments2::new());
            let mut e = EwMoments2::<f64>::new(0.2).unwrap();
            let mut w = WeightedMoments2::<f64>::new();
            for (k, x) in s.xs.iter().enumerate() {
                if k == at {
                    let poisoned = if first { [bad, x[1]] } else { [x[0], bad] };
                    let (m0, p0, e0, w0) = (m, p, e, w);
                    prop_assert_eq!(
                        m.push(poisoned.map(|v| v as f32)),
                        Err(SampleError::NotFinite)
                    );
                    prop_assert_eq!(p.push(poisoned), Err(SampleError::NotFinite));
                    prop_assert_eq!(e.push(poisoned), Err(SampleError::NotFinite));
                    prop_assert_eq!(w.push(poisoned, 1.0), Err(SampleError::NotFinite));
                    prop_assert_eq!(w.push(*x, bad), Err(SampleError::BadWeight));
                    // Bit-for-bit: compare the debug form too, since NaN-free PartialEq is exact.
                    prop_assert_eq!(
                        format!("{m:?}{p:?}{e:?}{w:?}"),
                        format!("{m0:?}{p0:?}{e0:?}{w0:?}")
                    );
                }
                m.push(x.map(|v| v as f32)).unwrap();
                p.push(*x).unwrap();
                e.push(*x).unwrap();
                w.push(*x, 1.0).unwrap();
            }
            Ok(())
        },
    );
}

#[test]
fn dimension_six_matches_two_pass() {
    let rows = prop::collection::vec(prop::array::uniform6(-1.0..1.0f64), 7..200);
    check("six_d", CASES, rows, |xs| {
        // A correlated 6-D stream: x_i = z_i + 0.5 z_{i-1}, offset 1e3.
        let xs: Vec<[f64; 6]> = xs
            .iter()
            .map(|z| {
                core::array::from_fn(|i| 1e3 + z[i] + if i > 0 { 0.5 * z[i - 1] } else { 0.0 })
            })
            .collect();
        let mut m = Moments::<f64, 6, 21>::new();
        for x in &xs {
            m.push(*x).unwrap();
        }
        let r = reference::moments(&xs);
        let rc = r.sample_cov();
        let c = m.sample_covariance().unwrap();
        let tol = Tol::abs(64.0 * EPS64 * 1e3 * (xs.len() as f64).sqrt());
        for i in 0..6 {
            tol.check("mean", m.mean().unwrap()[i], r.mean[i])
                .map_err(fail)?;
            for j in 0..6 {
                tol.check("cov", c.matrix()[i][j], rc[i][j]).map_err(fail)?;
            }
        }
        Ok(())
    });
}
