//! Writes the fuzzing seed corpus (one valid input per target) into `host-tests/fuzz/seeds/`.
//!
//!     cargo run -p covgate-host --example fuzz_seeds

use covgate::{Baseline, Covariance, Moments2, Monitor, ReportFrame2, WatchConfig};

fn main() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz")
        .join("seeds");
    let cov = Covariance::from_matrix([[4.0f32, 1.0], [1.0, 2.0]]);
    let b = Baseline::new([10.0, -3.0], &cov).expect("positive definite");
    let mut c = WatchConfig::new(30, 0.0027f32);
    c.mewma = Some((0.1, 8.64, false));
    c.mcusum = Some((0.5, 5.5));
    let m = Monitor::new(b, 30, &c).expect("valid");
    let mut buf = [0u8; 128];
    let n = m.encode_snapshot(&mut buf).expect("fits");
    std::fs::write(dir.join("snapshot_decode").join("valid"), &buf[..n]).expect("write");
    let mut mo = Moments2::<f32>::new();
    for x in [[1.0, 2.0], [2.0, 1.5], [0.5, 3.0]] {
        mo.push(x).expect("finite");
    }
    let f = ReportFrame2 {
        node: 7,
        seq: 1,
        alarm: None,
        moments: mo,
        charts: [Some(1.0), None, None],
        go: 3,
        nogo: 0,
        alarms: 0,
    };
    let mut fb = [0u8; 64];
    let k = f.encode(&mut fb).expect("fits");
    std::fs::write(dir.join("frame_decode").join("valid"), &fb[..k]).expect("write");
    let mut s = Vec::new();
    for t in 0..40u8 {
        let x = [f32::from(t % 7), f32::from(t % 5) * 0.5];
        s.extend_from_slice(&x[0].to_le_bytes());
        s.extend_from_slice(&x[1].to_le_bytes());
        s.push(t);
    }
    std::fs::write(dir.join("monitor_samples").join("ramp"), &s).expect("write");
    println!("seeds written to {}", dir.display());
}
