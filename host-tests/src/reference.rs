//! Independent `f64` reference for the moments: two passes with compensated sums.
//!
//! Different algorithms from the library on purpose: the library updates in one pass
//! (Welford, West, Finch); this module first sums for the mean, then sums the products of
//! deviations, each sum with Neumaier's compensation (Neumaier 1974, "Rundungsfehleranalyse
//! einiger Verfahren zur Summation endlicher Summen", ZAMM 54), so its own error is a few ulp
//! of the result rather than growing with the count.

/// Neumaier's compensated sum of a sequence.
pub fn sum(xs: impl IntoIterator<Item = f64>) -> f64 {
    let (mut s, mut c) = (0.0f64, 0.0f64);
    for x in xs {
        let t = s + x;
        if s.abs() >= x.abs() {
            c += (s - t) + x;
        } else {
            c += (x - t) + s;
        }
        s = t;
    }
    s + c
}

/// Mean and covariance from a reference computation.
#[derive(Clone, Debug)]
pub struct Summary<const N: usize> {
    /// Total weight (the count for unweighted data).
    pub weight: f64,
    /// Mean vector.
    pub mean: [f64; N],
    /// Co-moment matrix `sum w (x - mean)(x - mean)'`.
    pub comoment: [[f64; N]; N],
}

impl<const N: usize> Summary<N> {
    /// `C / (W - 1)`.
    pub fn sample_cov(&self) -> [[f64; N]; N] {
        self.comoment.map(|r| r.map(|v| v / (self.weight - 1.0)))
    }
    /// `C / W`.
    pub fn population_cov(&self) -> [[f64; N]; N] {
        self.comoment.map(|r| r.map(|v| v / self.weight))
    }
}

/// Two-pass weighted moments: mean `sum w x / sum w`, then `sum w (x - mean)(x - mean)'`.
pub fn weighted<const N: usize>(xs: &[[f64; N]], ws: &[f64]) -> Summary<N> {
    assert_eq!(xs.len(), ws.len());
    let weight = sum(ws.iter().copied());
    let mut mean = [0.0; N];
    for (i, m) in mean.iter_mut().enumerate() {
        *m = sum(xs.iter().zip(ws).map(|(x, w)| w * x[i])) / weight;
    }
    // Second pass; a correction term for the residual mean error (Chan, Golub & LeVeque 1983,
    // "corrected two-pass") is added to the co-moment.
    let mut resid = [0.0; N];
    for (i, r) in resid.iter_mut().enumerate() {
        *r = sum(xs.iter().zip(ws).map(|(x, w)| w * (x[i] - mean[i])));
    }
    let mut comoment = [[0.0; N]; N];
    for i in 0..N {
        for j in 0..N {
            let s = sum(xs
                .iter()
                .zip(ws)
                .map(|(x, w)| w * (x[i] - mean[i]) * (x[j] - mean[j])));
            comoment[i][j] = s - resid[i] * resid[j] / weight;
        }
    }
    Summary {
        weight,
        mean,
        comoment,
    }
}

/// Two-pass unweighted moments.
pub fn moments<const N: usize>(xs: &[[f64; N]]) -> Summary<N> {
    weighted(xs, &vec![1.0; xs.len()])
}

/// Exponentially weighted mean and covariance evaluated directly from its weights: with a
/// first-sample start, sample `k` of `n` (1-based) has weight `(1 - a)^(n - 1)` for `k = 1`
/// and `a (1 - a)^(n - k)` otherwise (they sum to 1); the covariance is
/// `sum w_k (x_k - mean)(x_k - mean)'`. No recursion.
pub fn exponential<const N: usize>(xs: &[[f64; N]], a: f64) -> ([f64; N], [[f64; N]; N]) {
    let n = xs.len();
    let ws: Vec<f64> = (1..=n)
        .map(|k| {
            let age = (n - k) as i32;
            if k == 1 {
                (1.0 - a).powi(age)
            } else {
                a * (1.0 - a).powi(age)
            }
        })
        .collect();
    let s = weighted(xs, &ws);
    // Weights sum to 1, so the co-moment is already the weighted covariance.
    (s.mean, s.population_cov())
}

/// Lower Cholesky factor by the column-oriented (Cholesky–Crout) order, written apart from
/// the library's row-oriented one so that Monte Carlo draws do not share its code. `None` if a
/// pivot is not positive.
pub fn cholesky<const N: usize>(c: &[[f64; N]; N]) -> Option<[[f64; N]; N]> {
    let mut l = [[0.0; N]; N];
    for j in 0..N {
        let d = c[j][j] - (0..j).map(|k| l[j][k] * l[j][k]).sum::<f64>();
        if d <= 0.0 {
            return None;
        }
        l[j][j] = d.sqrt();
        for i in (j + 1)..N {
            l[i][j] = (c[i][j] - (0..j).map(|k| l[i][k] * l[j][k]).sum::<f64>()) / l[j][j];
        }
    }
    Some(l)
}

/// Mahalanobis distance squared by solving `C y = x - mean` with Gaussian elimination and
/// partial pivoting (not the library's Cholesky whitening), then `d^2 = (x - mean)' y`.
/// `None` if a pivot vanishes.
pub fn mahalanobis2<const N: usize>(
    mean: &[f64; N],
    cov: &[[f64; N]; N],
    x: &[f64; N],
) -> Option<f64> {
    let d: Vec<f64> = (0..N).map(|i| x[i] - mean[i]).collect();
    let mut a: Vec<Vec<f64>> = (0..N)
        .map(|i| {
            let mut row = cov[i].to_vec();
            row.push(d[i]);
            row
        })
        .collect();
    for col in 0..N {
        let piv = (col..N).max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))?;
        if a[piv][col] == 0.0 {
            return None;
        }
        a.swap(col, piv);
        let pivot_row = a[col].clone();
        for row in a.iter_mut().skip(col + 1) {
            let f = row[col] / pivot_row[col];
            for (v, p) in row.iter_mut().zip(&pivot_row).skip(col) {
                *v -= f * p;
            }
        }
    }
    let mut y = vec![0.0; N];
    for i in (0..N).rev() {
        let s: f64 = ((i + 1)..N).map(|j| a[i][j] * y[j]).sum();
        y[i] = (a[i][N] - s) / a[i][i];
    }
    Some(d.iter().zip(&y).map(|(p, q)| p * q).sum())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn compensated_sum_keeps_small_terms() {
        // 1 + 1e-16 * 10 - 1 loses everything in plain f64.
        let xs = std::iter::once(1.0)
            .chain(std::iter::repeat_n(1e-16, 10))
            .chain(std::iter::once(-1.0));
        assert!((sum(xs) - 1e-15).abs() < 1e-30);
    }

    #[test]
    fn two_pass_by_hand() {
        let s = moments(&[[1.0, 2.0], [3.0, 6.0]]);
        assert_eq!(s.mean, [2.0, 4.0]);
        assert_eq!(s.sample_cov(), [[2.0, 4.0], [4.0, 8.0]]);
    }
}
