//! The firmware body shared by every board: on-target checks of the core, the drilling-cell
//! demo capture replayed through the device code, and instruction counts per operation.
//!
//! Output is plain lines on the semihosting console:
//! `check NAME ok|FAIL detail`, `replay-int ...`, `replay-f32 ...`, `count OP INSTRUCTIONS`,
//! and finally `done FAILURES`. The host test `firmware` parses them.

#![no_std]
#![forbid(unsafe_code)]

use core::fmt::Write;
use core::hint::black_box;

use covgate::math::bvn_upper_f32;
use covgate::{
    Baseline, CircleZone, Covariance, ExactMoments2, Gate, IntGate2, IntZone, Limit, Moments2,
    Pivoted, RectZone, Verdict, Watch, WatchConfig, Zone,
};

/// A free-running down-counter (SysTick's current value, 24 bits).
pub trait Ticks {
    /// The counter now.
    fn now(&mut self) -> u32;
    /// Runs a loop of known length: about `n` instructions.
    fn known_loop(&mut self, n: u32);
}

const CAPTURE: &str = include_str!("../../../fixtures/demo/drilling-cell.csv");

fn check<W: Write>(
    out: &mut W,
    fails: &mut u32,
    name: &str,
    ok: bool,
    detail: core::fmt::Arguments,
) {
    let _ = writeln!(
        out,
        "check {name} {} {detail}",
        if ok { "ok" } else { "FAIL" }
    );
    if !ok {
        *fails += 1;
    }
}

fn checks<W: Write>(out: &mut W) -> u32 {
    let mut fails = 0;
    // Moments: deviations (-1,-2), (1,2) around (2,4): sample covariance [2 4; 4 8].
    let mut m = Moments2::<f32>::new();
    let _ = m.push([1.0, 2.0]);
    let _ = m.push([3.0, 6.0]);
    let c = m
        .sample_covariance()
        .map(|c| *c.matrix())
        .unwrap_or([[0.0; 2]; 2]);
    check(
        out,
        &mut fails,
        "moments",
        c == [[2.0, 4.0], [4.0, 8.0]],
        format_args!("{c:?}"),
    );
    let mut e = ExactMoments2::new();
    let _ = e.push([1, -2]);
    let _ = e.push([3, 4]);
    check(
        out,
        &mut fails,
        "exact",
        e.scaled_comoment() == [4, 12, 36],
        format_args!("{:?}", e.scaled_comoment()),
    );
    // Gate: C = [4 2; 2 5], x - mean = (2, 1): d^2 = 1 (by hand).
    let base = Baseline::new(
        [1.0f32, 1.0],
        &Covariance::from_matrix([[4.0, 2.0], [2.0, 5.0]]),
    );
    let d2 = base
        .map(|b| b.mahalanobis2(&[3.0, 2.0]))
        .unwrap_or(f32::NAN);
    check(
        out,
        &mut fails,
        "gate",
        (d2 - 1.0).abs() < 1e-6,
        format_args!("d2 {d2}"),
    );
    // Sheppard (1899): P(X > 0, Y > 0) = 1/4 + asin(r) / (2 pi); r = 0.5 gives 1/3.
    let p = bvn_upper_f32(0.0, 0.0, 0.5);
    check(
        out,
        &mut fails,
        "sheppard",
        (p - 1.0 / 3.0).abs() < 2e-6,
        format_args!("{p}"),
    );
    // Rayleigh: unit circular normal, radius 2: outside = exp(-2).
    let cov = Covariance::from_matrix([[1.0f32, 0.0], [0.0, 1.0]]);
    let z = CircleZone::new([0.0f32, 0.0], 4.0).map(Zone::Circle);
    let y = z.ok().and_then(|z| z.probability(&[0.0, 0.0], &cov).ok());
    let out_p = y.map_or(f32::NAN, |y| y.outside);
    check(
        out,
        &mut fails,
        "rayleigh",
        (out_p - libm_exp(-2.0)).abs() < 2e-6,
        format_args!("{out_p}"),
    );
    // Watch: learn 10, then a far sample alarms (MEWMA) and latches.
    let mut cfg = WatchConfig::<f32, 2>::new(10, 0.0027);
    cfg.mewma = Some((0.2, 9.65, false));
    let mut ok = false;
    if let Ok(mut w) = Watch::<f32, 2, 16>::new(cfg) {
        for k in 0..10 {
            let t = k as f32;
            w.push([t * 0.7 % 1.3, (t * 1.1) % 0.9]);
        }
        let s = w.push([40.0, -40.0]);
        ok = s.alarm.is_some() && matches!(w.push([0.5, 0.5]).verdict, Verdict::NoGo(_));
    }
    check(out, &mut fails, "watch", ok, format_args!(""));
    fails
}

fn libm_exp(x: f32) -> f32 {
    // exp through the crate's own Real trait, so no extra dependency.
    <f32 as covgate::math::Real>::exp(x)
}

/// Parses the demo capture's x, y columns.
pub fn samples() -> impl Iterator<Item = [f32; 2]> {
    CAPTURE.lines().skip(1).filter_map(|l| {
        let mut f = l.split(',').skip(1);
        let x: f32 = f.next()?.parse().ok()?;
        let y: f32 = f.next()?.parse().ok()?;
        Some([x, y])
    })
}

/// The demo capture through the integer and the f32 paths, printed as `replay-...` lines (the
/// host test runs this same function on the host and compares).
pub fn replay<W: Write>(out: &mut W) {
    // Integer path: exact sums of the integer micrometres, pivot at the nominal (0, 0).
    let mut ex = Pivoted::with_pivot(ExactMoments2::new(), [0i32, 0]);
    for x in samples() {
        let _ = ex.push([x[0] as i32, x[1] as i32]);
    }
    let s = ex.inner().sums();
    let p = ex.inner().products();
    let _ = writeln!(
        out,
        "replay-int n {} sums {} {} products {} {} {}",
        ex.count(),
        s[0],
        s[1],
        p[0],
        p[1],
        p[2]
    );
    // f32 path: the drilling-cell demo settings (learn 100, circle 60, MEWMA 0.1 / 12.34,
    // every alarm acknowledged), one letter per sample.
    let mut cfg = WatchConfig::<f32, 2>::new(100, 0.0027);
    cfg.zone = CircleZone::new([0.0, 0.0], 60.0).ok().map(Zone::Circle);
    cfg.mewma = Some((0.1, 12.34, false));
    let _ = write!(out, "replay-f32 verdicts ");
    if let Ok(mut w) = Watch::<f32, 2, 128>::new(cfg) {
        for x in samples() {
            let st = w.push(x);
            let c = match (st.alarm.is_some(), st.verdict) {
                (true, _) => 'A',
                (_, Verdict::Go(_)) => 'G',
                (_, Verdict::NotReady) => 'L',
                (_, Verdict::NoGo(_)) => 'N',
            };
            let _ = out.write_char(c);
            if st.alarm.is_some() {
                w.acknowledge();
            }
        }
        let _ = writeln!(out);
        if let Some(m) = w.monitor() {
            let b = m.gate().baseline();
            let c = b.covariance();
            let mm = b.mean();
            let _ = writeln!(
                out,
                "replay-f32 mean {:08x} {:08x} cov {:08x} {:08x} {:08x}",
                mm[0].to_bits(),
                mm[1].to_bits(),
                c.matrix()[0][0].to_bits(),
                c.matrix()[0][1].to_bits(),
                c.matrix()[1][1].to_bits()
            );
        }
        // The f32 d^2 of every sample against the learned baseline, and a plain f32 Welford
        // summary of the whole capture: the host test compares both with an f64 reference.
        if let Some(m) = w.monitor() {
            let _ = write!(out, "replay-f32 d2");
            for x in samples() {
                let _ = write!(
                    out,
                    " {:08x}",
                    m.gate().baseline().mahalanobis2(&x).to_bits()
                );
            }
            let _ = writeln!(out);
            // The 95 % bound on the yield of the 60 um circle from the learned baseline, 64
            // draws, seed 1: the same bits on every core and on the host.
            let b = m.gate().baseline();
            let mut draws = [0.0f32; 64];
            let size = m.gate().baseline_size().unwrap_or(0);
            let bound = CircleZone::new([0.0, 0.0], 60.0)
                .map(Zone::Circle)
                .ok()
                .and_then(|z| {
                    z.yield_bound(
                        b.mean(),
                        &b.covariance(),
                        size,
                        0.95,
                        covgate::Uncertainty::MeanAndCovariance,
                        &mut covgate::math::Xoshiro128::new(1),
                        &mut draws,
                    )
                    .ok()
                });
            if let Some(y) = bound {
                let _ = writeln!(
                    out,
                    "replay-f32 bound m {size} inside {:08x} lower {:08x} outside-upper {:08x} ({} ppm at most)",
                    y.estimate.inside.to_bits(),
                    y.inside_lower.to_bits(),
                    y.outside_upper.to_bits(),
                    (y.outside_upper * 1e6) as u32
                );
            }
        }
    } else {
        let _ = writeln!(out, "none");
    }
    let mut all = Moments2::<f32>::new();
    for x in samples() {
        let _ = all.push(x);
    }
    if let (Ok(m), Ok(c)) = (all.mean(), all.sample_covariance()) {
        let c = c.matrix();
        let _ = writeln!(
            out,
            "replay-f32 summary n {} mean {:08x} {:08x} cov {:08x} {:08x} {:08x}",
            all.count(),
            m[0].to_bits(),
            m[1].to_bits(),
            c[0][0].to_bits(),
            c[0][1].to_bits(),
            c[1][1].to_bits()
        );
    }
}

/// The per-sample path of a node without FPU: exact-integer update, integer gate, integer
/// point in zone. Kept out of line so the host test can inspect its call graph in the M0
/// binary and refuse any soft-float or division routine reachable from it.
#[inline(never)]
pub fn integer_step(acc: &mut ExactMoments2, gate: &IntGate2, zone: &IntZone, x: [i32; 2]) -> bool {
    let taken = acc.push(x).is_ok();
    taken & gate.passes(&x) & zone.contains(&x)
}

/// The peer: the same 2-D update (Welford) and gate, written the straightforward way with
/// nalgebra's generic matrices (mean vector, covariance matrix, inverse at freeze time, the
/// quadratic form per sample). Measured beside covgate's own path.
pub mod peer {
    use nalgebra::{Matrix2, Vector2};

    /// Running count, mean and co-moment matrix.
    pub struct Update {
        n: f32,
        mean: Vector2<f32>,
        m2: Matrix2<f32>,
    }

    impl Default for Update {
        fn default() -> Self {
            Update {
                n: 0.0,
                mean: Vector2::zeros(),
                m2: Matrix2::zeros(),
            }
        }
    }

    impl Update {
        /// Welford's update.
        #[inline(never)]
        pub fn push(&mut self, x: [f32; 2]) {
            let x = Vector2::from(x);
            self.n += 1.0;
            let d = x - self.mean;
            self.mean += d / self.n;
            self.m2 += d * (x - self.mean).transpose();
        }

        /// Welford's update with the checks covgate makes: a non-finite sample or result is
        /// refused and nothing changes.
        #[inline(never)]
        pub fn push_checked(&mut self, x: [f32; 2]) -> bool {
            if !x.iter().all(|v| v.is_finite()) {
                return false;
            }
            let x = Vector2::from(x);
            let n = self.n + 1.0;
            let d = x - self.mean;
            let mean = self.mean + d / n;
            let m2 = self.m2 + d * (x - mean).transpose();
            if !(mean.iter().all(|v| v.is_finite()) && m2.iter().all(|v| v.is_finite())) {
                return false;
            }
            (self.n, self.mean, self.m2) = (n, mean, m2);
            true
        }
    }

    /// Mean and inverse covariance, and the limit.
    pub struct Gate {
        /// Mean.
        pub mean: Vector2<f32>,
        /// Inverse covariance.
        pub inv: Matrix2<f32>,
        /// Limit on d^2.
        pub limit: f32,
    }

    impl Gate {
        /// `(x - mean)' C^-1 (x - mean) <= limit`.
        #[inline(never)]
        pub fn passes(&self, x: [f32; 2]) -> bool {
            let d = Vector2::from(x) - self.mean;
            (d.transpose() * self.inv * d)[(0, 0)] <= self.limit
        }
    }
}

/// Ticks of `reps` calls of `f`, minus the same loop with nothing in it.
fn measure<C: Ticks>(clk: &mut C, reps: u32, mut f: impl FnMut(u32)) -> u32 {
    let t0 = clk.now();
    for i in 0..reps {
        f(black_box(i));
    }
    let t1 = clk.now();
    let t2 = clk.now();
    for i in 0..reps {
        black_box(i);
    }
    let t3 = clk.now();
    let busy = t0.wrapping_sub(t1) & 0x00FF_FFFF;
    let idle = t2.wrapping_sub(t3) & 0x00FF_FFFF;
    busy.saturating_sub(idle)
}

fn counts<W: Write, C: Ticks>(out: &mut W, clk: &mut C) {
    // Calibration: ticks of a loop of known instruction count.
    const CAL: u32 = 2_000_000;
    let t0 = clk.now();
    clk.known_loop(CAL);
    let t1 = clk.now();
    let cal_ticks = (t0.wrapping_sub(t1) & 0x00FF_FFFF).max(1);
    let per_call = |ticks: u32, reps: u32| -> u32 {
        ((u64::from(ticks) * u64::from(CAL)) / (u64::from(cal_ticks) * u64::from(reps))) as u32
    };
    let _ = writeln!(out, "calibration ticks {cal_ticks} for {CAL} instructions");
    let reps = 2000;
    let mut m = Moments2::<f32>::new();
    let t = measure(clk, reps, |i| {
        let _ = black_box(&mut m).push(black_box([i as f32 * 0.25, 1.0]));
    });
    let _ = writeln!(out, "count moments-f32-update {}", per_call(t, reps));
    // The worst single push: the one that fills the recent block (2^16 samples) and merges it
    // into a non-empty past (the second fold). Each call pushes into a copy of an accumulator
    // one sample short of that fold, so the count includes copying the 48-byte state.
    let mut full = Moments2::<f32>::new();
    for i in 0..131_071u32 {
        let _ = full.push([(i & 1023) as f32 * 0.25, 1.0]);
    }
    let t = measure(clk, reps, |i| {
        let mut c = black_box(full);
        let _ = c.push(black_box([i as f32 * 0.25, 1.0]));
        black_box(c);
    });
    let _ = writeln!(
        out,
        "count moments-f32-update-folding {}",
        per_call(t, reps)
    );
    let mut pu = peer::Update::default();
    let t = measure(clk, reps, |i| {
        black_box(&mut pu).push(black_box([i as f32 * 0.25, 1.0]));
    });
    let _ = writeln!(out, "count peer-nalgebra-update {}", per_call(t, reps));
    let mut pc = peer::Update::default();
    let t = measure(clk, reps, |i| {
        black_box(black_box(&mut pc).push_checked(black_box([i as f32 * 0.25, 1.0])));
    });
    let _ = writeln!(
        out,
        "count peer-nalgebra-update-checked {}",
        per_call(t, reps)
    );
    let pg = peer::Gate {
        mean: nalgebra::Vector2::new(1.0, 1.0),
        inv: nalgebra::Matrix2::new(4.0f32, 2.0, 2.0, 5.0)
            .try_inverse()
            .unwrap_or_else(nalgebra::Matrix2::identity),
        limit: 11.83,
    };
    let t = measure(clk, reps, |i| {
        black_box(black_box(&pg).passes(black_box([i as f32 * 0.001, 1.0])));
    });
    let _ = writeln!(out, "count peer-nalgebra-gate {}", per_call(t, reps));
    let mut ex = ExactMoments2::new();
    let t = measure(clk, reps, |i| {
        let _ = black_box(&mut ex).push(black_box([i as i32 & 255, 7]));
    });
    let _ = writeln!(out, "count moments-exact-update {}", per_call(t, reps));
    let base = Baseline::new(
        [1.0f32, 1.0],
        &Covariance::from_matrix([[4.0, 2.0], [2.0, 5.0]]),
    );
    if let Ok(b) = base {
        if let Ok(g) = Gate::new(b, Limit::ChiSquare { alpha: 0.0027 }) {
            let t = measure(clk, reps, |i| {
                black_box(black_box(&g).passes(&black_box([i as f32 * 0.001, 1.0])));
            });
            let _ = writeln!(out, "count gate-f32 {}", per_call(t, reps));
            let gi = Baseline::new(
                [100.0f64, 50.0],
                &Covariance::from_matrix([[40.0, 12.0], [12.0, 25.0]]),
            )
            .ok()
            .and_then(|b| Gate::new(b, Limit::ChiSquare { alpha: 0.0027 }).ok())
            .and_then(|g| IntGate2::from_gate(&g).ok());
            if let Some(ig) = gi {
                let t = measure(clk, reps, |i| {
                    black_box(black_box(&ig).passes(&black_box([100 + (i as i32 & 15), 50])));
                });
                let _ = writeln!(out, "count gate-int {}", per_call(t, reps));
                // The exact 64-bit test alone: what a sample within the filter's margins (or
                // a gate too wide for the filter) costs.
                let t = measure(clk, reps, |i| {
                    black_box(black_box(&ig).passes_exact(&black_box([100 + (i as i32 & 15), 50])));
                });
                let _ = writeln!(out, "count gate-int-exact {}", per_call(t, reps));
                let zone = CircleZone::new([100.0f64, 50.0], 60.0)
                    .ok()
                    .and_then(|c| IntZone::from_zone(&Zone::Circle(c)).ok());
                if let Some(z) = zone {
                    let mut acc = ExactMoments2::new();
                    let t = measure(clk, reps, |i| {
                        black_box(integer_step(
                            &mut acc,
                            &ig,
                            &z,
                            black_box([100 + (i as i32 & 15), 50]),
                        ));
                    });
                    let _ = writeln!(out, "count integer-step {}", per_call(t, reps));
                }
            }
        }
    }
    let circle = CircleZone::new([0.0, 0.0], 60.0).map(Zone::Circle);
    if let Some(z) = circle.ok().and_then(|c| IntZone::from_zone(&c).ok()) {
        let t = measure(clk, reps, |i| {
            black_box(black_box(&z).contains(&black_box([i as i32 & 31, 3])));
        });
        let _ = writeln!(out, "count zone-int-circle-contains {}", per_call(t, reps));
    }
    let cov = Covariance::from_matrix([[1.69f32, 0.676], [0.676, 0.64]]);
    let small = 50;
    if let Ok(r) = RectZone::new([-2.0f32, -1.5], [3.0, 2.0]) {
        let z = Zone::Rect(r);
        let t = measure(clk, small, |i| {
            black_box(
                black_box(&z)
                    .probability(&black_box([0.4 + i as f32 * 1e-4, -0.2]), &cov)
                    .ok(),
            );
        });
        let _ = writeln!(out, "count rect-probability-f32 {}", per_call(t, small));
        // The same rectangle at correlation 0.9, where the orthants take the 10-point
        // high-correlation expansion instead of the prepared 5-point rule.
        let high = Covariance::from_matrix([[1.69f32, 0.936], [0.936, 0.64]]);
        let t = measure(clk, small, |i| {
            black_box(
                black_box(&z)
                    .probability(&black_box([0.4 + i as f32 * 1e-4, -0.2]), &high)
                    .ok(),
            );
        });
        let _ = writeln!(
            out,
            "count rect-probability-f32-r0.9 {}",
            per_call(t, small)
        );
    }
    if let Ok(c) = CircleZone::new([0.0f32, 0.0], 3.2) {
        let z = Zone::Circle(c);
        let t = measure(clk, small, |i| {
            black_box(
                black_box(&z)
                    .probability(&black_box([0.4 + i as f32 * 1e-4, -0.2]), &cov)
                    .ok(),
            );
        });
        let _ = writeln!(out, "count circle-probability-f32 {}", per_call(t, small));
        // The 95 % yield bound from a baseline of 30, 100 draws (one circle probability each,
        // plus the draws and the sort): one call.
        let mut draws = [0.0f32; 100];
        let mut rng = covgate::math::Xoshiro128::new(1);
        let t = measure(clk, 1, |_| {
            black_box(
                black_box(&z)
                    .yield_bound(
                        &black_box([0.4, -0.2]),
                        &cov,
                        30,
                        0.95,
                        covgate::Uncertainty::MeanAndCovariance,
                        &mut rng,
                        &mut draws,
                    )
                    .ok(),
            );
        });
        let _ = writeln!(
            out,
            "count yield-bound-circle-f32-100-draws {}",
            per_call(t, 1)
        );
    }
    // N-D zones: the 3-D ball probability for a moderately anisotropic process (standard
    // deviations 1, 1.5, 2, correlated), 128 terms of room; point tests at N = 3 and 6.
    let cov3 = Covariance::from_matrix([[1.0f32, 0.3, 0.1], [0.3, 2.25, -0.4], [0.1, -0.4, 4.0]]);
    if let Ok(ball) = covgate::BallZone::new([0.0f32; 3], 9.0) {
        let mut scratch = [0.0f32; 256];
        let mut terms = 0;
        let t = measure(clk, small, |i| {
            let m = [i as f32 * 1e-3, 0.2, -0.1];
            if let Ok(e) = black_box(&ball).probability(&black_box(m), &cov3, &mut scratch) {
                terms = e.terms;
            }
        });
        let _ = writeln!(out, "count ball3-probability-f32 {}", per_call(t, small));
        let _ = writeln!(out, "ball3-probability-f32 terms {terms}");
        let t = measure(clk, reps, |i| {
            black_box(black_box(&ball).contains(&black_box([i as f32 * 1e-3, 0.2, -0.1])));
        });
        let _ = writeln!(out, "count ball3-contains-f32 {}", per_call(t, reps));
    }
    if let Ok(b) = covgate::BoxZone::new([-1.0f32, -2.0, f32::NEG_INFINITY], [1.0, 2.0, 0.5]) {
        let t = measure(clk, reps, |i| {
            black_box(black_box(&b).contains(&black_box([i as f32 * 1e-3, 0.2, -0.1])));
        });
        let _ = writeln!(out, "count box3-contains-f32 {}", per_call(t, reps));
        let t = measure(clk, small, |i| {
            let m = [i as f32 * 1e-3, 0.2, -0.1];
            black_box(black_box(&b).probability(&black_box(m), &cov3).ok());
        });
        let _ = writeln!(out, "count box3-probability-f32 {}", per_call(t, small));
    }
    let shape6: [f32; 21] = core::array::from_fn(|k| {
        if [0, 6, 11, 15, 18, 20].contains(&k) {
            4.0
        } else {
            0.25
        }
    });
    if let Ok(e) = covgate::EllipsoidZone::<f32, 6, 21>::new([0.0; 6], shape6) {
        let t = measure(clk, reps, |i| {
            black_box(black_box(&e).contains(&black_box([
                i as f32 * 1e-3,
                0.2,
                -0.1,
                0.3,
                0.0,
                1.0,
            ])));
        });
        let _ = writeln!(out, "count ellipsoid6-contains-f32 {}", per_call(t, reps));
    }
    if let Ok(b) = covgate::IntBall::new([100, -20, 7], 60) {
        let t = measure(clk, reps, |i| {
            black_box(black_box(&b).contains(&black_box([i as i32 & 31, -3, 9])));
        });
        let _ = writeln!(out, "count int-ball3-contains {}", per_call(t, reps));
    }
    let mut cfg = WatchConfig::<f32, 2>::new(10, 0.0027);
    cfg.zone = CircleZone::new([0.0, 0.0], 60.0).ok().map(Zone::Circle);
    cfg.mewma = Some((0.1, 1e30, false));
    cfg.mcusum = Some((0.5, 1e30));
    cfg.dispersion = Some((0.1, 1e30));
    if let Ok(mut w) = Watch::<f32, 2, 16>::new(cfg) {
        for k in 0..10 {
            let t = k as f32;
            w.push([(t * 0.7) % 1.3, (t * 1.1) % 0.9]);
        }
        let t = measure(clk, reps, |i| {
            black_box(black_box(&mut w).push(black_box([0.5 + (i & 7) as f32 * 0.01, 0.4])));
        });
        let _ = writeln!(out, "count monitor-step-f32 {}", per_call(t, reps));
    }
}

/// Everything, in order; returns the number of failed checks.
pub fn run<W: Write, C: Ticks>(out: &mut W, clk: &mut C, board: &str) -> u32 {
    let _ = writeln!(out, "covgate firmware on {board}");
    let fails = checks(out);
    replay(out);
    counts(out, clk);
    let _ = writeln!(out, "done {fails}");
    fails
}

/// Calls every public 2-D entry point once with inputs the optimiser cannot see through, for
/// the panic-freedom link check (`src/bin/nopanic.rs` of each board): if any panic path
/// survives in these functions, the board's `nopanic` binary fails to link.
pub fn exercise_everything(seed: u32) -> u32 {
    let s = black_box(seed) as f32 * 1e-3;
    let i = black_box(seed) as i32;
    let mut acc = 0u32;
    let mut m = Moments2::<f32>::new();
    let _ = m.push([s, -s]);
    let m2 = black_box(m);
    let _ = covgate::Merge::merge(&mut m, &m2);
    let cov = m.sample_covariance().ok();
    let _ = m.population_covariance();
    if let Some(c) = cov {
        let _ = black_box(c.correlation());
        let _ = black_box(c.ellipse());
        let _ = black_box(c.generalized_variance());
    }
    let mut e = ExactMoments2::new();
    let _ = e.push([i, -i]);
    let e2 = black_box(e);
    let _ = covgate::Merge::merge(&mut e, &e2);
    let _ = black_box(e.sample_covariance::<f32>());
    let mut p = Pivoted::with_pivot(ExactMoments2::new(), [i, 3]);
    let _ = p.push([i + 1, 2]);
    let _ = black_box(p.mean_f64());
    let mut ew = covgate::EwMoments2::<f32>::new(black_box(0.1)).ok();
    if let Some(ew) = &mut ew {
        let _ = ew.push([s, s]);
        let _ = black_box(ew.covariance());
    }
    let c = Covariance::from_matrix([[black_box(4.0f32), 1.0], [1.0, 3.0]]);
    if let Ok(b) = Baseline::with_resolution([s, 0.0], &c, [0.1, 0.1]) {
        if let Ok(g) = Gate::new(
            b,
            Limit::PhaseII {
                m: 30,
                alpha: black_box(0.01),
            },
        ) {
            acc += u32::from(g.passes(&[s, 1.0]));
            acc += u32::from(g.verdict(&[s, 1.0]).is_go());
        }
    }
    let c64 = Covariance::from_matrix([[black_box(40.0f64), 12.0], [12.0, 25.0]]);
    if let Some(ig) = Baseline::new([100.0f64, 50.0], &c64)
        .ok()
        .and_then(|b| Gate::new(b, Limit::ChiSquare { alpha: 0.0027 }).ok())
        .and_then(|g| IntGate2::from_gate(&g).ok())
    {
        acc += u32::from(ig.passes(&[i, 50]));
    }
    let zones = [
        RectZone::new([-s, f32::NEG_INFINITY], [3.0, 2.0])
            .map(Zone::Rect)
            .ok(),
        CircleZone::new([s, 0.0], 3.0).map(Zone::Circle).ok(),
        covgate::EllipseZone::new([s, 0.0], 3.0, 1.0, 0.5)
            .map(Zone::Ellipse)
            .ok(),
    ];
    for z in zones.iter().flatten() {
        acc += u32::from(z.contains(&[s, 0.5]));
        if let Ok(y) = z.probability(&[s, 0.1], &c) {
            acc += (y.capability().ppm > 1.0) as u32;
        }
        let _ = black_box(z.bounds(&[s, 0.1], &c));
        let mut draws = [0.0f32; 8];
        let mut rng = covgate::math::Xoshiro128::new(u64::from(seed));
        for u in [
            covgate::Uncertainty::MeanAndCovariance,
            covgate::Uncertainty::MeanOnly,
        ] {
            if let Ok(b) =
                z.yield_bound(&[s, 0.1], &c, black_box(20), 0.95, u, &mut rng, &mut draws)
            {
                acc += (b.inside_lower > 0.5) as u32;
            }
        }
    }
    if let Some(z) = CircleZone::new([0.0f64, 0.0], 60.0).ok().map(Zone::Circle) {
        if let Ok(iz) = IntZone::from_zone(&z) {
            acc += u32::from(iz.contains(&[i, 3]));
        }
    }
    let _ = black_box(covgate::coverage_radius(&c, black_box(0.5f32)));
    let mut cfg = WatchConfig::<f32, 2>::new(black_box(10), 0.0027);
    cfg.mewma = Some((0.1, 8.64, true));
    cfg.mcusum = Some((0.5, 5.5));
    cfg.dispersion = Some((0.1, 3.2));
    cfg.subgroup = Some((5, 0.01));
    cfg.gate_rule = Some((2, 3));
    if let Ok(mut w) = Watch::<f32, 2, 16>::new(cfg) {
        for k in 0..black_box(12) {
            let _ = w.push([s + k as f32, 0.5]);
        }
        w.acknowledge();
        if let Some(mon) = w.monitor() {
            let mut buf = [0u8; 128];
            if let Ok(n) = mon.encode_snapshot(&mut buf) {
                let back =
                    covgate::Monitor::<f32, 2>::decode_snapshot(black_box(&buf[..n.min(128)]));
                acc += u32::from(back.is_ok());
            }
        }
        w.relearn();
    }
    acc += exercise_nd::<3, 6>(s, i) + exercise_nd::<6, 21>(s, i);
    let f = covgate::ReportFrame2 {
        node: 1,
        seq: black_box(seed),
        alarm: None,
        moments: m,
        charts: [Some(s), None, None],
        go: 1,
        nogo: 0,
        alarms: 0,
    };
    let mut fb = [0u8; 64];
    if f.encode(&mut fb).is_ok() {
        acc += u32::from(covgate::ReportFrame2::decode(black_box(&fb)).is_ok());
    }
    acc
}

/// The N-D zones at one dimension: point tests in float and integers, ball and ellipsoid
/// probabilities with a small scratch buffer.
fn exercise_nd<const N: usize, const L: usize>(s: f32, i: i32) -> u32 {
    let mut acc = 0u32;
    let x: [f32; N] = core::array::from_fn(|k| s + k as f32 * 0.25);
    let xi: [i32; N] = core::array::from_fn(|k| i + k as i32);
    let mut c = [[0.0f32; N]; N];
    for (k, row) in c.iter_mut().enumerate() {
        if let Some(v) = row.get_mut(k) {
            *v = black_box(1.0) + k as f32 * 0.5;
        }
    }
    let cov = Covariance::from_matrix(c);
    let mut shape = [0.0f32; L];
    let mut idx = 0;
    for r in 0..N {
        for col in r..N {
            if let Some(v) = shape.get_mut(idx) {
                *v = if r == col { black_box(4.0) } else { 0.5 };
            }
            idx += 1;
        }
    }
    let mut scratch = [0.0f32; 64];
    if let Ok(b) = covgate::BoxZone::new([-s; N], [black_box(2.0); N]) {
        acc += u32::from(b.contains(&x));
        if let Ok(y) = b.probability(&x, &cov) {
            acc += (y.inside > 0.5) as u32;
        }
        if let Ok(y) = b.bounds(&x, &cov) {
            acc += (y.inside_lower > 0.5) as u32;
        }
    }
    if let Ok(b) = covgate::BallZone::new([s; N], black_box(3.0)) {
        acc += u32::from(b.contains(&x));
        if let Ok(e) = b.probability(&x, &cov, &mut scratch) {
            acc += (e.inside > 0.5) as u32;
        }
        if let Ok(e) = b.bounds(&x, &cov, &mut scratch) {
            acc += (e.inside_upper > 0.5) as u32;
        }
    }
    if let Ok(e) = covgate::EllipsoidZone::<f32, N, L>::new([s; N], shape) {
        acc += u32::from(e.contains(&x));
        if let Ok(p) = e.probability(&x, &cov, &mut scratch) {
            acc += (p.outside < 0.5) as u32;
        }
        if let Ok(p) = e.bounds(&x, &cov, &mut scratch) {
            acc += (p.outside_upper < 0.5) as u32;
        }
    }
    if let Ok(b) = covgate::IntBall::new([i; N], black_box(7)) {
        acc += u32::from(b.contains(&xi));
    }
    if let Ok(b) = covgate::BoxZone::new([-3.5f64; N], [black_box(4.0f64); N]) {
        acc += u32::from(covgate::IntBox::from_zone(&b).contains(&xi));
    }
    acc
}

/// What every emulated board's `main` does: SysTick on the core clock as the tick source,
/// the semihosting console as output, [`run`], and a semihosting exit with the result.
#[cfg(target_arch = "arm")]
pub mod board {
    use core::fmt::Write;

    use cortex_m::peripheral::syst::SystClkSource;
    use cortex_m::peripheral::SYST;
    use cortex_m_semihosting::{debug, hio};

    struct SysTick;

    impl super::Ticks for SysTick {
        fn now(&mut self) -> u32 {
            SYST::get_current()
        }
        fn known_loop(&mut self, n: u32) {
            // cortex-m's delay: a two-instruction loop run about n / 2 times.
            cortex_m::asm::delay(n);
        }
    }

    struct Console(Option<hio::HostStream>);

    impl Write for Console {
        fn write_str(&mut self, s: &str) -> core::fmt::Result {
            match &mut self.0 {
                Some(h) => h.write_str(s),
                None => Ok(()),
            }
        }
    }

    /// Runs the firmware body and exits QEMU with success when every check passed.
    pub fn run_board(name: &str) -> ! {
        if let Some(mut p) = cortex_m::Peripherals::take() {
            p.SYST.set_clock_source(SystClkSource::Core);
            p.SYST.set_reload(0x00FF_FFFF);
            p.SYST.clear_current();
            p.SYST.enable_counter();
        }
        let mut out = Console(hio::hstdout().ok());
        let fails = super::run(&mut out, &mut SysTick, name);
        debug::exit(if fails == 0 {
            debug::EXIT_SUCCESS
        } else {
            debug::EXIT_FAILURE
        });
        loop {
            cortex_m::asm::wfi();
        }
    }
}
