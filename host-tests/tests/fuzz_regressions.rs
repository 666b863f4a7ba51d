//! Inputs the fuzzers once found wrong (`host-tests/fuzz/regressions/<target>/`), replayed on
//! the stable toolchain with the same checks as the fuzz targets.

use covgate::Monitor;

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
        // Each stored finding was a non-canonical snapshot that used to decode: now refused.
        assert_eq!(
            Monitor::<f32, 2>::decode_snapshot(&data).err(),
            Some(covgate::SnapshotError::BadValue)
        );
    }
}
