//! `covgate fleet` as a user runs it: frames in files, damage reported with file and byte
//! offset and skipped, summaries merged per node and across the fleet.

use std::process::Command;

use covgate::{Moments2, ReportFrame2};
use covgate_host::seeded::Rng;

fn frame(node: u16, seq: u32, xs: &[[f32; 2]]) -> [u8; 64] {
    let mut m = Moments2::<f32>::new();
    for x in xs {
        m.push(*x).unwrap();
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
    f.encode(&mut b).unwrap();
    b
}

#[test]
fn fleet_merges_good_frames_and_reports_bad_ones() {
    let dir = std::env::temp_dir().join(format!("covgate-fleet-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let mut rng = Rng::from_seed(99);
    let mut all = Moments2::<f64>::new();
    let mut files = Vec::new();
    for node in 1..=3u16 {
        let mut bytes = Vec::new();
        for seq in 0..4u32 {
            let xs: Vec<[f32; 2]> = (0..25)
                .map(|_| [rng.normal() as f32 + f32::from(node), rng.normal() as f32])
                .collect();
            let f = frame(node, seq, &xs);
            if node == 2 && seq == 1 {
                // A damaged frame: one flipped bit; its samples are lost.
                let mut g = f;
                g[20] ^= 0x10;
                bytes.extend_from_slice(&g);
                continue;
            }
            for x in &xs {
                all.push([f64::from(x[0]), f64::from(x[1])]).unwrap();
            }
            bytes.extend_from_slice(&f);
        }
        if node == 3 {
            bytes.extend_from_slice(&[0xAB; 10]); // trailing garbage
        }
        let p = dir.join(format!("node{node}.bin"));
        std::fs::write(&p, &bytes).unwrap();
        files.push(p);
    }
    let out = Command::new(env!("CARGO_BIN_EXE_covgate"))
        .arg("fleet")
        .arg(&dir)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let stderr = String::from_utf8(out.stderr).unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["frames"], 11);
    assert_eq!(v["nodes"].as_array().unwrap().len(), 3);
    assert_eq!(v["fleet"]["count"], 275);
    let mean = &v["fleet"]["mean"];
    let want = all.mean().unwrap();
    for i in 0..2 {
        assert!(
            (mean[i].as_f64().unwrap() - want[i]).abs() < 1e-5,
            "{mean} vs {want:?}"
        );
    }
    let cov = all.sample_covariance().unwrap();
    let got = v["fleet"]["cov"][0][0].as_f64().unwrap();
    assert!((got - cov.matrix()[0][0]).abs() < 1e-4 * cov.matrix()[0][0]);
    // Damage reported with the file and the byte offset of the damaged frame (64 = frame 1).
    assert!(
        stderr.contains("node2.bin: byte 64: frame checksum mismatch"),
        "{stderr}"
    );
    assert!(stderr.contains("node3.bin: byte 256:"), "{stderr}");
    assert_eq!(stderr.lines().count(), 2, "{stderr}");
    std::fs::remove_dir_all(&dir).unwrap();
    let _ = files;
    // A missing path: one line, exit 2.
    let out = Command::new(env!("CARGO_BIN_EXE_covgate"))
        .args(["fleet", "/nonexistent/frames.bin"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(String::from_utf8(out.stderr).unwrap().lines().count(), 1);
}
