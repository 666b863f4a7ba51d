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

/// A seeded generator for Monte Carlo tests: xoshiro256** (Blackman & Vigna 2018), state
/// filled by SplitMix64 from the seed. Fast, 2^256 - 1 period, passes BigCrush.
#[derive(Clone, Debug)]
pub struct Rng {
    s: [u64; 4],
    spare: Option<f64>,
}

impl Rng {
    /// A generator from [`seed`] mixed with `stream`, so each test draws its own sequence.
    pub fn new(stream: u64) -> Self {
        Self::from_seed(seed() ^ stream.wrapping_mul(0x9E37_79B9_7F4A_7C15))
    }

    /// A generator from an explicit seed.
    pub fn from_seed(seed: u64) -> Self {
        let mut x = seed;
        let mut next = || {
            x = x.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut z = x;
            z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            z ^ (z >> 31)
        };
        Rng {
            s: [next(), next(), next(), next()],
            spare: None,
        }
    }

    /// 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        let s = &mut self.s;
        let out = s[1].wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = s[1] << 17;
        s[2] ^= s[0];
        s[3] ^= s[1];
        s[1] ^= s[2];
        s[0] ^= s[3];
        s[2] ^= t;
        s[3] = s[3].rotate_left(45);
        out
    }

    /// Uniform on (0, 1): 53 random bits, never exactly 0 or 1.
    pub fn uniform(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }

    /// Standard normal, by Marsaglia's polar method (pairs, the second kept for the next call).
    pub fn normal(&mut self) -> f64 {
        if let Some(v) = self.spare.take() {
            return v;
        }
        loop {
            let u = 2.0 * self.uniform() - 1.0;
            let v = 2.0 * self.uniform() - 1.0;
            let s = u * u + v * v;
            if s > 0.0 && s < 1.0 {
                let f = (-2.0 * s.ln() / s).sqrt();
                self.spare = Some(v * f);
                return u * f;
            }
        }
    }

    /// A draw from N(mean, L L') given the lower Cholesky factor `L`.
    pub fn gaussian<const N: usize>(&mut self, mean: &[f64; N], l: &[[f64; N]; N]) -> [f64; N] {
        let z: [f64; N] = std::array::from_fn(|_| self.normal());
        std::array::from_fn(|i| mean[i] + (0..=i).map(|k| l[i][k] * z[k]).sum::<f64>())
    }
}
