//! A bracket drilling cell with two spindles. Each spindle's probe reports the offset of the
//! drilled hole from true position, in micrometres (dx, dy). Each station keeps its own running
//! moments; at the end of the shift the summaries are merged into one for the cell.
//!
//! The data is invented for the demo (a seeded generator below), not a real capture.
//!
//!     cargo run -p covgate-host --example drilling_cell

use covgate::{
    Baseline, CircleZone, ExactMoments2, Gate, IntGate2, IntZone, Learner, Limit, Merge, Moments2,
    Pivoted, Verdict, Zone,
};

/// xorshift64* and Box-Muller: a seeded, dependency-free normal generator for the demo.
struct Demo(u64);

impl Demo {
    fn uniform(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        ((self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    fn normal(&mut self) -> f64 {
        let (u, v) = (self.uniform(), self.uniform());
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos()
    }
}

/// One spindle: a mean offset (um), spreads (um) and a correlation between dx and dy.
fn spindle(rng: &mut Demo, n: usize, mean: [f64; 2], sd: [f64; 2], rho: f64) -> Vec<[i32; 2]> {
    (0..n)
        .map(|_| {
            let (z1, z2) = (rng.normal(), rng.normal());
            let dx = mean[0] + sd[0] * z1;
            let dy = mean[1] + sd[1] * (rho * z1 + (1.0 - rho * rho).sqrt() * z2);
            [dx.round() as i32, dy.round() as i32]
        })
        .collect()
}

fn report(name: &str, m: &Pivoted<ExactMoments2, i32, 2>) {
    let mean = m.mean_f64().expect("samples were taken");
    let cov = m
        .inner()
        .sample_covariance::<f64>()
        .expect("two or more samples");
    let sd = cov.std_devs();
    let r = cov.correlation().map(|r| r[0][1]).unwrap_or(f64::NAN);
    let e = cov.ellipse();
    println!(
        "{name:<10} n={:>4}  mean=({:>6.1}, {:>6.1}) um  sd=({:>5.1}, {:>5.1}) um  r={:>5.2}  \
         1-sigma ellipse {:.1} x {:.1} um at {:>5.1} deg",
        m.count(),
        mean[0],
        mean[1],
        sd[0],
        sd[1],
        r,
        e.major,
        e.minor,
        e.angle.to_degrees()
    );
}

fn main() {
    let mut rng = Demo(0x5EED_0B4A_C4E7);
    // Spindle A drifts a little in +x; spindle B is tighter but its dx and dy are coupled.
    let a = spindle(&mut rng, 400, [12.0, -3.0], [9.0, 7.0], 0.2);
    let b = spindle(&mut rng, 250, [-4.0, 5.0], [6.0, 6.0], 0.7);

    // Each station: exact integer sums of micrometres around the nominal (0, 0): 64 bytes.
    let nominal = [0, 0];
    let mut station_a = Pivoted::with_pivot(ExactMoments2::new(), nominal);
    let mut station_b = Pivoted::with_pivot(ExactMoments2::new(), nominal);
    // A float Welford accumulator on spindle A, for comparison: 48 bytes in f32.
    let mut float_a = Moments2::<f32>::new();
    for x in &a {
        station_a
            .push(*x)
            .expect("integer micrometres never overflow here");
        float_a.push([x[0] as f32, x[1] as f32]).expect("finite");
    }
    for x in &b {
        station_b
            .push(*x)
            .expect("integer micrometres never overflow here");
    }

    println!("bracket drilling cell: hole offset from true position, two spindles (demo data)\n");
    report("spindle A", &station_a);
    report("spindle B", &station_b);

    let mut cell = station_a;
    cell.merge(&station_b)
        .expect("merging two small summaries cannot overflow");
    report("cell", &cell);

    // A rejected reading leaves the summary exactly as it was.
    let before = float_a;
    let refused = float_a.push([f32::NAN, 1.0]);
    println!(
        "\na probe reading of NaN is refused ({}), summary unchanged: {}",
        refused.unwrap_err(),
        before == float_a
    );
    let fa = float_a.sample_covariance().expect("two or more samples");
    let ea = station_a
        .inner()
        .sample_covariance::<f64>()
        .expect("two or more samples");
    println!(
        "spindle A variance of dx, f32 Welford vs exact integer: {:.4} vs {:.4} um^2",
        fa.matrix()[0][0],
        ea.matrix()[0][0]
    );

    // Gate new holes on spindle A: learn from its first 30 parts, then judge each new one
    // against the exact Phase II limit for a baseline of 30 (false-alarm rate 0.27 %).
    println!("\nspindle A gate: learn 30 parts, then judge new holes (Phase II, alpha 0.0027)");
    let mut learner = Learner::<f32, 2, 3>::new(30, 0.0027, [1.0, 1.0]).expect("valid setting");
    for x in &a[..30] {
        let v = learner.push([x[0] as f32, x[1] as f32]);
        assert_eq!(v, Verdict::NotReady);
    }
    let gate = *learner.gate().expect("30 distinct parts freeze");
    let chi2 = covgate::CHI2_LIMITS
        .lookup_f32(2, 0.0027)
        .expect("in the const table");
    println!(
        "limit d^2 <= {:.2} (the chi-square limit, {chi2:.2}, ignores that 30 parts only \
         estimate the process)",
        gate.limit()
    );
    let new_holes = [
        [10.0f32, -4.0],
        [25.0, 3.0],
        [14.0, -14.0],
        [40.0, 18.0],
        [-9.0, 10.0],
    ];
    for x in new_holes {
        let verdict = match learner.push(x) {
            Verdict::Go(d) => format!(
                "go     d^2 = {:6.2}  tail p = {:.4}",
                d.d2,
                d.tail.unwrap_or(f32::NAN)
            ),
            Verdict::NoGo(covgate::Reason::OutsideGate(d)) => {
                format!(
                    "NO-GO  d^2 = {:6.2}  tail p = {:.2e}",
                    d.d2,
                    d.tail.unwrap_or(f32::NAN)
                )
            }
            other => format!("{other:?}"),
        };
        println!("  hole at ({:>5.1}, {:>5.1}) um: {verdict}", x[0], x[1]);
    }

    // The same gate in integers only, for a core without FPU: built once from an f64 gate.
    let base = Baseline::new(
        station_a.mean_f64().expect("samples"),
        &station_a
            .inner()
            .sample_covariance::<f64>()
            .expect("two or more"),
    )
    .expect("spread in both axes");
    let g64 = Gate::new(
        base,
        Limit::PhaseII {
            m: station_a.count(),
            alpha: 0.0027,
        },
    )
    .expect("valid");
    let int_gate = IntGate2::from_gate(&g64).expect("micrometre range fits");
    let agree = new_holes
        .iter()
        .filter(|x| {
            g64.passes(&[f64::from(x[0]), f64::from(x[1])])
                == int_gate.passes(&[x[0] as i32, x[1] as i32])
        })
        .count();
    println!(
        "integer-only gate from all 400 parts of spindle A: same verdict as its f64 gate on {agree} of {} new holes (band {:.1e} in d^2)",
        new_holes.len(),
        int_gate.band()
    );

    // Expected yield against the positional tolerance: diameter 50 um at true position.
    println!("\npositional tolerance, diameter 50 um at true position:");
    let zone = Zone::Circle(CircleZone::new([0.0, 0.0], 50.0).expect("positive diameter"));
    let int_zone = IntZone::from_zone(&zone).expect("integer centre");
    for (name, station, parts) in [("spindle A", &station_a, &a), ("spindle B", &station_b, &b)] {
        let mean = station.mean_f64().expect("samples");
        let cov = station
            .inner()
            .sample_covariance::<f64>()
            .expect("two or more");
        let y = zone.probability(&mean, &cov).expect("positive definite");
        let cap = y.capability();
        let bad = parts.iter().filter(|x| !int_zone.contains(x)).count();
        println!(
            "  {name}: predicted {:.0} ppm nonconforming (equivalent index {:.2}); {bad} of {} demo parts outside",
            cap.ppm,
            cap.index,
            parts.len()
        );
    }
}
