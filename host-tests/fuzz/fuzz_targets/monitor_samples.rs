//! A watch fed arbitrary f32 samples (NaN, infinities, huge values included): never panics;
//! a refused sample changes nothing; an armed monitor is either consistent or has latched
//! its fault alarm.
#![no_main]

use covgate::{Chart, Reason, Verdict, Watch, WatchConfig};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut cfg = WatchConfig::<f32, 2>::new(8, 0.01);
    cfg.mewma = Some((0.2, 9.65, true));
    cfg.mcusum = Some((0.5, 5.5));
    cfg.dispersion = Some((0.1, 3.2));
    cfg.gate_rule = Some((2, 3));
    cfg.resolution = [0.01, 0.01];
    let mut w = Watch::<f32, 2, 8>::new(cfg).expect("valid config");
    for chunk in data.chunks_exact(9) {
        let x = [
            f32::from_le_bytes([chunk[0], chunk[1], chunk[2], chunk[3]]),
            f32::from_le_bytes([chunk[4], chunk[5], chunk[6], chunk[7]]),
        ];
        match chunk[8] % 16 {
            0 => w.acknowledge(),
            1 => w.relearn(),
            _ => {}
        }
        let snap = |w: &Watch<f32, 2, 8>| {
            let mut b = [0u8; 128];
            w.monitor().map(|m| (m.encode_snapshot(&mut b).ok(), b))
        };
        let before = snap(&w);
        let s = w.push(x);
        if let Verdict::NoGo(Reason::InvalidSample(_)) = s.verdict {
            if before.is_some() {
                assert_eq!(before, snap(&w), "a refused sample changed the monitor");
            }
        }
        if let Some(m) = w.monitor() {
            assert!(m.is_sane() || m.alarm().map(|a| a.chart) == Some(Chart::Fault));
        }
    }
});
