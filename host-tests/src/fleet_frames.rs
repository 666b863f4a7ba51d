//! A small invented fleet of report frames for the `fleet` command: three tilt nodes, four
//! frames of 25 samples each, one frame with a flipped bit (node 2, byte 64) and ten bytes of
//! trailing garbage after node 3's frames (byte 256). Used by the example `fleet_frames` (which
//! the README's fleet command reads) and by the test `cli_fleet`.

use std::path::Path;

use covgate::{Moments2, ReportFrame2};

use crate::seeded::Rng;

fn frame(node: u16, seq: u32, xs: &[[f32; 2]]) -> [u8; 64] {
    let mut m = Moments2::<f32>::new();
    for x in xs {
        // In range by construction (normal draws): a refusal cannot happen.
        let _ = m.push(*x);
    }
    let f = ReportFrame2 {
        node,
        seq,
        alarm: None,
        moments: m,
        charts: [None; 3],
        go: xs.len() as u32,
        nogo: 0,
        alarms: 0,
    };
    let mut b = [0u8; 64];
    // A 64-byte buffer always fits a 2-D frame.
    let _ = f.encode(&mut b);
    b
}

/// Writes `node1.bin`, `node2.bin`, `node3.bin` into `dir` (created if missing) and returns
/// an `f64` summary of every sample in the undamaged frames (what the merge should give).
pub fn write(dir: &Path) -> std::io::Result<Moments2<f64>> {
    std::fs::create_dir_all(dir)?;
    let mut rng = Rng::from_seed(99);
    let mut all = Moments2::<f64>::new();
    for node in 1..=3u16 {
        let mut bytes = Vec::new();
        for seq in 0..4u32 {
            let xs: Vec<[f32; 2]> = (0..25)
                .map(|_| [rng.normal() as f32 + f32::from(node), rng.normal() as f32])
                .collect();
            let mut f = frame(node, seq, &xs);
            if node == 2 && seq == 1 {
                // A damaged frame: one flipped bit; its samples are lost.
                f[20] ^= 0x10;
            } else {
                for x in &xs {
                    let _ = all.push([f64::from(x[0]), f64::from(x[1])]);
                }
            }
            bytes.extend_from_slice(&f);
        }
        if node == 3 {
            bytes.extend_from_slice(&[0xAB; 10]); // trailing garbage
        }
        std::fs::write(dir.join(format!("node{node}.bin")), &bytes)?;
    }
    Ok(all)
}
