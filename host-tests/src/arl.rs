//! Average run lengths of the drift charts, on the host: a Markov chain for the MEWMA, seeded
//! simulation (with its standard error) for the MCUSUM and the dispersion check, and the
//! search for the limit `h` that gives a target in-control ARL.

use covgate::math::ChiSquare;
use covgate::watch::{Dispersion, Mcusum, Mewma};

use crate::seeded::Rng;

/// Noncentral chi-square CDF `P(X <= x)` with `p` degrees of freedom (1..=6) and
/// noncentrality `delta`, as the Poisson mixture `sum_j Pois(j; delta / 2) P(p/2 + j, x/2)`
/// (Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions 2, eq. 29.2). The
/// regularized gamma terms follow from covgate's chi-square CDF for `j = 0` by the recurrence
/// `P(a + 1, y) = P(a, y) - y^a e^-y / Gamma(a + 1)`. Absolute error about 1e-14.
pub fn ncx2_cdf(x: f64, p: u32, delta: f64) -> f64 {
    if x <= 0.0 {
        return 0.0;
    }
    let y = x / 2.0;
    let a0 = f64::from(p) / 2.0;
    let mut pg = ChiSquare::new(p).expect("p in 1..=6").cdf(x);
    // t_j = y^(a0 + j) e^-y / Gamma(a0 + j + 1)
    let mut t = (a0 * y.ln() - y - libm::lgamma(a0 + 1.0)).exp();
    let lam = delta / 2.0;
    let mut w = (-lam).exp();
    let mut sum = w * pg;
    let mut wsum = w;
    for j in 0..100_000u32 {
        pg = (pg - t).max(0.0);
        t *= y / (a0 + f64::from(j) + 1.0);
        w *= lam / f64::from(j + 1);
        sum += w * pg;
        wsum += w;
        if j as f64 > lam && (w < 1e-17 * wsum || pg < 1e-300) {
            break;
        }
    }
    sum.clamp(0.0, 1.0)
}

/// In-control ARL of the MEWMA with the asymptotic covariance, by the Markov chain of
/// Runger & Prabhu (1996), Journal of the American Statistical Association 91(436): with
/// whitened data the chart depends only on `u = |Z|^2 / lambda^2`, which moves from `u` to a
/// noncentral chi-square with `p` degrees of freedom and noncentrality `(1 - lambda)^2 u`; the
/// in-control region
/// `T^2 <= h` is `u <= h / (lambda (2 - lambda))`, cut into `states` equal cells represented
/// by their midpoints. `ARL = ((I - Q)^-1 1)` from the cell holding `u = 0`.
pub fn mewma_arl0(p: u32, lambda: f64, h: f64, states: usize) -> f64 {
    let upper = h / (lambda * (2.0 - lambda));
    let width = upper / states as f64;
    let mut a = vec![vec![0.0f64; states]; states];
    for (i, row) in a.iter_mut().enumerate() {
        let u = if i == 0 {
            0.0
        } else {
            (i as f64 + 0.5) * width
        };
        let delta = (1.0 - lambda) * (1.0 - lambda) * u;
        let mut prev = 0.0;
        for (j, cell) in row.iter_mut().enumerate() {
            let next = ncx2_cdf((j as f64 + 1.0) * width, p, delta);
            *cell = -(next - prev);
            prev = next;
        }
    }
    for (i, row) in a.iter_mut().enumerate() {
        row[i] += 1.0;
    }
    solve(a, vec![1.0; states])[0]
}

/// Gaussian elimination with partial pivoting (dense, host only).
fn solve(mut a: Vec<Vec<f64>>, mut b: Vec<f64>) -> Vec<f64> {
    let n = b.len();
    for c in 0..n {
        let piv = (c..n)
            .max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))
            .expect("non-empty");
        a.swap(c, piv);
        b.swap(c, piv);
        let pr = a[c].clone();
        let pb = b[c];
        for r in (c + 1)..n {
            let f = a[r][c] / pr[c];
            if f != 0.0 {
                for k in c..n {
                    a[r][k] -= f * pr[k];
                }
                b[r] -= f * pb;
            }
        }
    }
    let mut x = vec![0.0; n];
    for i in (0..n).rev() {
        let s: f64 = ((i + 1)..n).map(|k| a[i][k] * x[k]).sum();
        x[i] = (b[i] - s) / a[i][i];
    }
    x
}

/// The `h` giving in-control ARL `target` for a function `arl(h)` increasing in `h`, with
/// `lo` the smallest valid limit: bracket by doubling `hi` (at most 40 times), then bisection
/// to a relative width of `tol`. `Err` when the target lies below `arl(lo)` or beyond reach.
pub fn limit_for(
    target: f64,
    lo: f64,
    mut hi: f64,
    tol: f64,
    arl: impl Fn(f64) -> f64,
) -> Result<f64, String> {
    let at_lo = arl(lo);
    if at_lo > target {
        return Err(format!(
            "target ARL {target} is below {at_lo:.3}, the ARL at the smallest valid limit {lo}"
        ));
    }
    let mut lo = lo;
    let mut doublings = 0;
    while arl(hi) < target {
        lo = hi;
        hi *= 2.0;
        doublings += 1;
        if doublings > 40 {
            return Err(format!("target ARL {target} is out of reach"));
        }
    }
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if arl(mid) < target {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo <= tol * hi {
            break;
        }
    }
    Ok(0.5 * (lo + hi))
}

/// Simulated run lengths: mean and its standard error over `runs` runs, each capped at
/// `cap` samples (a capped run counts as `cap`, which biases the mean down; use a cap far
/// above the ARL). Samples are standard normal in `p` dimensions (whitened data) plus
/// `shift` (noncentrality `|shift|`).
pub fn simulate<const N: usize>(
    rng: &mut Rng,
    runs: u32,
    cap: u32,
    shift: [f64; N],
    mut chart: impl FnMut(Option<&[f64; N]>) -> bool,
) -> (f64, f64) {
    let (mut s, mut s2) = (0.0f64, 0.0f64);
    for _ in 0..runs {
        chart(None);
        let mut t = cap;
        for i in 1..=cap {
            let w: [f64; N] = std::array::from_fn(|k| rng.normal() + shift[k]);
            if chart(Some(&w)) {
                t = i;
                break;
            }
        }
        let t = f64::from(t);
        s += t;
        s2 += t * t;
    }
    let n = f64::from(runs);
    let mean = s / n;
    let var = (s2 / n - mean * mean) * n / (n - 1.0);
    (mean, (var / n).sqrt())
}

/// A chart as a closure for [`simulate`]: `None` resets, `Some(w)` updates and says alarm.
pub fn mewma_chart<const N: usize>(
    lambda: f64,
    h: f64,
    exact: bool,
) -> impl FnMut(Option<&[f64; N]>) -> bool {
    let mut c = Mewma::<f64, N>::new(lambda, h, exact).expect("valid MEWMA");
    move |w| match w {
        None => {
            c.reset();
            false
        }
        Some(w) => c.update(w) > h,
    }
}

/// Crosier's MCUSUM as a closure for [`simulate`].
pub fn mcusum_chart<const N: usize>(k: f64, h: f64) -> impl FnMut(Option<&[f64; N]>) -> bool {
    let mut c = Mcusum::<f64, N>::new(k, h).expect("valid MCUSUM");
    move |w| match w {
        None => {
            c.reset();
            false
        }
        Some(w) => c.update(w) > h,
    }
}

/// The dispersion EWMA of `d^2 = |w|^2` as a closure for [`simulate`].
pub fn dispersion_chart<const N: usize>(
    lambda: f64,
    h: f64,
) -> impl FnMut(Option<&[f64; N]>) -> bool {
    let mut c = Dispersion::<f64>::new(N as u32, lambda, h).expect("valid dispersion check");
    move |w| match w {
        None => {
            c.reset();
            false
        }
        Some(w) => c.update(w.iter().map(|v| v * v).sum()) > h,
    }
}

#[cfg(test)]
mod tests {
    use super::ncx2_cdf;

    #[test]
    fn noncentral_chi_square_against_scipy() {
        // scipy.stats.ncx2.cdf, scipy 1.17.1.
        for (x, p, d, want) in [
            (3.0, 2, 1.5, 0.551314141393785),
            (10.0, 2, 8.0, 0.5649279841494148),
            (0.5, 3, 0.2, 0.07410530837685374),
            (25.0, 6, 30.0, 0.16909564969611648),
            (1e-3, 2, 50.0, 6.985712066083557e-15),
        ] {
            let got = ncx2_cdf(x, p, d);
            assert!(
                (got - want).abs() < 1e-13 + 1e-9 * want,
                "{x} {p} {d}: {got} vs {want}"
            );
        }
    }
}
