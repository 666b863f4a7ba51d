//! A node that runs for days: 2^26 samples (7.8 days at 100 Hz) through `Moments2<f32>`, read
//! at 2^22, 2^24, 2^25 and 2^26 samples against an `f64` pass over the same values.
//!
//! What it must show (the `Moments` docs): the f32 mean and covariance stay right past 2^24
//! samples, where a single running f32 co-moment stops growing. Claims checked, with margin:
//! every covariance entry within 5e-5 of the f64 one, relative to the larger variance, and
//! the mean within 2e-6 standard deviations (measured: about 1e-5 and 3e-7). The same stream through a single running f32
//! co-moment (the update this accumulator used before it kept a recent block) is printed
//! beside it, and asserted to be off by more than 10 % at 2^26: that is the error this test is
//! there to catch, so the test shows it can see it.
//!
//! Run with `cargo test -p covgate-host --test long_runs -- --nocapture` for the table.

use covgate::Moments2;
use covgate_host::seeded::{seed, Rng};

/// The update of one running co-moment with the count turned into f32, as before.
struct SingleRun {
    n: u32,
    mean: [f32; 2],
    c: [f32; 3],
}

impl SingleRun {
    fn push(&mut self, x: [f32; 2]) {
        let w_old = self.n as f32;
        let total = w_old + 1.0;
        let d = [x[0] - self.mean[0], x[1] - self.mean[1]];
        let r = [d[0] / total, d[1] / total];
        self.mean = [self.mean[0] + r[0], self.mean[1] + r[1]];
        self.c[0] += w_old * d[0] * r[0];
        self.c[1] += w_old * d[0] * r[1];
        self.c[2] += w_old * d[1] * r[1];
        self.n += 1;
    }
}

/// Worst covariance error relative to the larger variance, and worst mean error in standard
/// deviations, of an f32 summary against the f64 one.
fn errors(mean: [f32; 2], cov: [f32; 3], n: u32, reference: &Moments2<f64>) -> (f64, f64) {
    let rc = reference.sample_covariance().unwrap();
    let rm = reference.mean().unwrap();
    let r = rc.matrix();
    let scale = r[0][0].max(r[1][1]);
    let per = [r[0][0], r[0][1], r[1][1]];
    let cov_err = (0..3)
        .map(|k| (f64::from(cov[k]) / f64::from(n - 1) - per[k]).abs() / scale)
        .fold(0.0, f64::max);
    let mean_err = (0..2)
        .map(|i| (f64::from(mean[i]) - rm[i]).abs() / r[i][i].sqrt())
        .fold(0.0, f64::max);
    (cov_err, mean_err)
}

#[test]
fn f32_moments_hold_past_2_pow_24_samples() {
    let mut rng = Rng::new(seed() ^ 0x1046_2026);
    let mut m = Moments2::<f32>::new();
    let mut reference = Moments2::<f64>::new();
    let mut single = SingleRun {
        n: 0,
        mean: [0.0; 2],
        c: [0.0; 3],
    };
    // A pivot-centred process (offset half a standard deviation), correlated 0.6.
    let checkpoints = [1u32 << 22, 1 << 24, 1 << 25, 1 << 26];
    let mut next = 0;
    println!("samples     f32 cov err  f32 mean err  single-run cov err");
    let mut last_single = 0.0;
    for k in 1..=*checkpoints.last().unwrap() {
        let (z1, z2) = (rng.normal(), rng.normal());
        let x = [(0.5 + z1) as f32, (-0.3 + 0.6 * z1 + 0.8 * z2) as f32];
        m.push(x).unwrap();
        reference.push(x.map(f64::from)).unwrap();
        single.push(x);
        if k == checkpoints[next] {
            let mean = m.mean().unwrap();
            let c = m.comoment().unwrap();
            let (cov_err, mean_err) = errors(mean, c, k, &reference);
            let (single_err, _) = errors(single.mean, single.c, k, &reference);
            println!(
                "2^{:<8} {cov_err:>12.2e} {mean_err:>13.2e} {single_err:>19.2e}",
                k.ilog2()
            );
            assert!(
                cov_err <= 5e-5,
                "covariance off by {cov_err:e} at {k} samples"
            );
            assert!(
                mean_err <= 2e-6,
                "mean off by {mean_err:e} sd at {k} samples"
            );
            last_single = single_err;
            next += 1;
        }
    }
    assert!(
        last_single > 0.1,
        "the single running co-moment should be visibly wrong at 2^26 ({last_single:e}): \
         otherwise this test could not see the error it guards against"
    );
}
