//! Seeded randomness for tests: one seed per run, printed, settable from `COVGATE_SEED`.

use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};

/// The default seed; override with the environment variable `COVGATE_SEED` (decimal u64).
pub const DEFAULT_SEED: u64 = 0x00C0_7A7E_2026;

/// The seed in force for this run.
pub fn seed() -> u64 {
    std::env::var("COVGATE_SEED")
        .ok()
        .and_then(|s| s.trim().parse().ok())
        .unwrap_or(DEFAULT_SEED)
}

/// A deterministic proptest runner with `cases` cases, seeded from [`seed`] mixed with `name`
/// so that each property draws its own stream. Failure persistence is off (no files written).
pub fn runner(name: &str, cases: u32) -> TestRunner {
    let mut bytes = [0u8; 32];
    let mix = name.bytes().fold(seed() ^ 0x9E37_79B9_7F4A_7C15, |h, b| {
        (h ^ u64::from(b)).wrapping_mul(0x0100_0000_01B3)
    });
    for (k, chunk) in bytes.chunks_mut(8).enumerate() {
        let v = mix.wrapping_add((k as u64).wrapping_mul(0xD6E8_FEB8_6659_FD93));
        chunk.copy_from_slice(&v.to_le_bytes());
    }
    let config = Config {
        cases,
        failure_persistence: None,
        ..Config::default()
    };
    TestRunner::new_with_rng(config, TestRng::from_seed(RngAlgorithm::ChaCha, &bytes))
}

/// Runs a property and panics with the seed in the message when it fails.
#[track_caller]
pub fn check<S, F>(name: &str, cases: u32, strategy: S, test: F)
where
    S: proptest::strategy::Strategy,
    S::Value: std::fmt::Debug,
    F: Fn(S::Value) -> Result<(), proptest::test_runner::TestCaseError>,
{
    let mut r = runner(name, cases);
    if let Err(e) = r.run(&strategy, test) {
        panic!(
            "property `{name}` failed with COVGATE_SEED={} : {e}",
            seed()
        );
    }
}
