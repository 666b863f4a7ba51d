//! `covgate fleet` as a user runs it: frames in files, damage reported with file and byte
//! offset and skipped, summaries merged per node and across the fleet.

use std::process::Command;

#[test]
fn fleet_merges_good_frames_and_reports_bad_ones() {
    let dir = std::env::temp_dir().join(format!("covgate-fleet-{}", std::process::id()));
    // The frames the README's fleet example uses (example `fleet_frames`).
    let all = covgate_host::fleet_frames::write(&dir).unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_covgate"))
        .arg("fleet")
        .arg(&dir)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let stderr = String::from_utf8(out.stderr).unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // What README.md shows for this folder.
    assert_eq!(v["frames"], 11);
    assert_eq!(v["damaged_stretches"], 2);
    assert_eq!(v["nodes"][0]["node"], 1);
    assert_eq!(v["nodes"][0]["count"], 100);
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
    // A missing path: one line, exit 2.
    let out = Command::new(env!("CARGO_BIN_EXE_covgate"))
        .args(["fleet", "/nonexistent/frames.bin"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(String::from_utf8(out.stderr).unwrap().lines().count(), 1);
}
