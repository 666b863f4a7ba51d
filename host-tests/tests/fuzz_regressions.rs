//! Inputs the fuzzers once found wrong (`host-tests/fuzz/regressions/<target>/`), replayed on
//! the stable toolchain with the same checks as the fuzz targets.

use covgate::{Monitor, ReportFrame2};

fn inputs(target: &str) -> Vec<Vec<u8>> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz")
        .join("regressions")
        .join(target);
    let Ok(entries) = std::fs::read_dir(&dir) else {
        return Vec::new();
    };
    entries
        .filter_map(|e| e.ok())
        .map(|e| std::fs::read(e.path()).unwrap())
        .collect()
}

#[test]
fn snapshot_regressions() {
    let cases = inputs("snapshot_decode");
    assert!(
        !cases.is_empty(),
        "the regression folder holds at least the first finding"
    );
    for data in cases {
        if let Ok(m) = Monitor::<f32, 2>::decode_snapshot(&data) {
            let mut out = [0u8; 256];
            let n = m.encode_snapshot(&mut out).unwrap();
            assert_eq!(&out[..n], &data[..], "decode/encode must round-trip");
        }
    }
}

#[test]
fn frame_regressions() {
    for data in inputs("frame_decode") {
        if let Ok(f) = ReportFrame2::decode(&data) {
            let mut out = [0u8; 64];
            let n = f.encode(&mut out).unwrap();
            assert_eq!(&out[..n], &data[..n]);
        }
    }
}
