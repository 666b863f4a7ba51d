//! A two-axis tilt node on a footbridge pier: it learns its baseline from the first 60
//! readings (micro-radians), then watches for drift with the MEWMA, Crosier's CUSUM and the
//! dispersion check. After reading 300 the pier starts to lean slowly along its second axis.
//!
//! The data is invented for the demo (a seeded generator below), not a real capture.
//!
//! This is structural monitoring: a drift alarm does not replace structural inspection or an
//! engineer's assessment of the structure, and it is not a public warning system (README.md,
//! Safety).
//!
//!     cargo run -p covgate-host --example footbridge_tilt

use covgate::{Verdict, Watch, WatchConfig};
use covgate_host::seeded::Rng;

fn main() {
    let mut cfg = WatchConfig::<f32, 2>::new(60, 0.001);
    // Three charts run side by side, so each gets an in-control ARL of 1000 readings (together
    // about one false alarm per 350 readings). Limits from the host tool:
    //   covgate limits --chart mewma --dim 2 --lambda 0.1 --arl0 1000       -> h 12.34
    //   covgate limits --chart mcusum --dim 2 --k 0.5 --arl0 1000           -> h 7.36
    //   covgate limits --chart dispersion --dim 2 --lambda 0.1 --arl0 1000  -> h 3.63
    cfg.mewma = Some((0.1, 12.34, false));
    cfg.mcusum = Some((0.5, 7.36));
    cfg.dispersion = Some((0.1, 3.63));
    cfg.resolution = [0.5, 0.5]; // the inclinometer reads in steps of 0.5 urad
    let mut watch = Watch::<f32, 2, 64>::new(cfg).expect("valid settings");

    let mut rng = Rng::from_seed(0xB41D_6E00);
    let (mut gos, mut nogos, mut waiting) = (0u32, 0u32, 0u32);
    for t in 1..=600u32 {
        // Pier tilt: temperature-coupled axes, 4 and 2.5 urad noise, around (120, -35) urad.
        let (z1, z2) = (rng.normal(), rng.normal());
        let lean = if t > 300 {
            0.02 * (t - 300) as f64
        } else {
            0.0
        };
        let x = [
            120.0 + 4.0 * z1,
            -35.0 + 2.5 * (0.5 * z1 + 0.866 * z2) + lean,
        ];
        let reading = [
            (x[0] * 2.0).round() as f32 / 2.0,
            (x[1] * 2.0).round() as f32 / 2.0,
        ];
        let step = watch.push(reading);
        match step.verdict {
            Verdict::Go(_) => gos += 1,
            Verdict::NotReady => waiting += 1,
            Verdict::NoGo(_) => nogos += 1,
        }
        if let Some(a) = step.alarm {
            println!(
                "reading {t}: {:?} alarm, statistic {:.2}; shift estimate (sd per axis) [{:+.2}, {:+.2}], look at axis {}",
                a.chart, a.statistic, a.shift[0], a.shift[1], a.main_axis()
            );
            if t <= 300 {
                println!("  (before the lean began: a false alarm, acknowledged)");
                watch.acknowledge();
            } else {
                println!(
                    "  the lean began at reading 301 ({:.1} urad so far): detected after {} readings; \
                     the alarm stays latched until acknowledged",
                    0.02 * f64::from(t - 300),
                    t - 300
                );
            }
        }
    }
    let m = watch.monitor().expect("armed after 60 readings");
    println!(
        "\n{waiting} readings learning, {gos} go, {nogos} no-go; baseline mean ({:.1}, {:.1}) urad, gate d^2 <= {:.2}",
        m.gate().baseline().mean()[0],
        m.gate().baseline().mean()[1],
        m.gate().limit()
    );
}
