//! Gauss–Legendre nodes and weights of any order, for the generator of the core's committed
//! rules (`examples/gauss_legendre.rs`) and the quadrature peer of the zone benchmarks.
//!
//! Method: Newton's iteration on the Legendre polynomial P_n (three-term recurrence) from the
//! starting guess cos(pi (i - 1/4) / (n + 1/2)), weights 2 / ((1 - x^2) P_n'(x)^2)
//! (Abramowitz & Stegun 25.4.29), converged to the last bit of f64.

/// `(P_n(x), P_n'(x))`.
pub fn legendre(n: usize, x: f64) -> (f64, f64) {
    let (mut p0, mut p1) = (1.0, x);
    for k in 2..=n {
        let k = k as f64;
        let p2 = ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k;
        p0 = p1;
        p1 = p2;
    }
    // P_n'(x) = n (x P_n - P_{n-1}) / (x^2 - 1)
    let d = n as f64 * (x * p1 - p0) / (x * x - 1.0);
    (p1, d)
}

/// The `i`-th node (1-based, in decreasing order from near +1) of the `n`-point rule and its
/// weight.
pub fn node(n: usize, i: usize) -> (f64, f64) {
    let mut x = (std::f64::consts::PI * (i as f64 - 0.25) / (n as f64 + 0.5)).cos();
    for _ in 0..100 {
        let (p, d) = legendre(n, x);
        let dx = p / d;
        x -= dx;
        if dx.abs() < 1e-17 {
            break;
        }
    }
    let (_, d) = legendre(n, x);
    (x, 2.0 / ((1.0 - x * x) * d * d))
}

/// The whole `n`-point rule on [-1, 1].
pub fn rule(n: usize) -> Vec<(f64, f64)> {
    (1..=n).map(|i| node(n, i)).collect()
}
