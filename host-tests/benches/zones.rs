//! Host benchmarks of the zone probabilities, each against a straightforward peer measured in
//! the same run: a 2-D tensor-product Gauss–Legendre quadrature of the density over the zone,
//! with its order raised until it matches covgate's value (checked against mpmath by the
//! tests) to 1e-12. Prints criterion's timings, then the ratios.
//!
//!     cargo bench -p covgate-host --bench zones

use std::hint::black_box;
use std::time::Instant;

use covgate::{CircleZone, Covariance, EllipseZone, RectZone, Zone};
use covgate_host::quadrature::rule as gl;
use criterion::Criterion;

struct Normal {
    mean: [f64; 2],
    inv: [[f64; 2]; 2],
    norm: f64,
}

impl Normal {
    fn new(mean: [f64; 2], c: [[f64; 2]; 2]) -> Self {
        let det = c[0][0] * c[1][1] - c[0][1] * c[1][0];
        Normal {
            mean,
            inv: [
                [c[1][1] / det, -c[0][1] / det],
                [-c[1][0] / det, c[0][0] / det],
            ],
            norm: 1.0 / (std::f64::consts::TAU * det.sqrt()),
        }
    }
    fn pdf(&self, x: f64, y: f64) -> f64 {
        let (dx, dy) = (x - self.mean[0], y - self.mean[1]);
        let q = dx * (self.inv[0][0] * dx + self.inv[0][1] * dy)
            + dy * (self.inv[1][0] * dx + self.inv[1][1] * dy);
        self.norm * (-0.5 * q).exp()
    }
}

/// Tensor-product rule over a box.
fn peer_rect(n: &Normal, rule: &[(f64, f64)], lo: [f64; 2], hi: [f64; 2]) -> f64 {
    let (cx, hx) = ((lo[0] + hi[0]) / 2.0, (hi[0] - lo[0]) / 2.0);
    let (cy, hy) = ((lo[1] + hi[1]) / 2.0, (hi[1] - lo[1]) / 2.0);
    let mut s = 0.0;
    for &(u, wu) in rule {
        for &(v, wv) in rule {
            s += wu * wv * n.pdf(cx + hx * u, cy + hy * v);
        }
    }
    s * hx * hy
}

/// Tensor-product rule in polar coordinates around the disk centre.
fn peer_disk(n: &Normal, rule: &[(f64, f64)], centre: [f64; 2], r: f64) -> f64 {
    let mut s = 0.0;
    for &(u, wu) in rule {
        let rho = r * (u + 1.0) / 2.0;
        for &(v, wv) in rule {
            let t = std::f64::consts::PI * (v + 1.0);
            s += wu * wv * rho * n.pdf(centre[0] + rho * t.cos(), centre[1] + rho * t.sin());
        }
    }
    s * (r / 2.0) * std::f64::consts::PI
}

/// The peer for any zone: the ellipse is mapped onto the unit disk (`x = c + R diag(a, b) v`),
/// with the density of `v`, inside the timed call as covgate does.
fn peer(z: &Zone<f64>, rule: &[(f64, f64)], mean: [f64; 2], c: [[f64; 2]; 2]) -> f64 {
    match z {
        Zone::Rect(r) => peer_rect(&Normal::new(mean, c), rule, r.lo(), r.hi()),
        Zone::Circle(ci) => peer_disk(
            &Normal::new(mean, c),
            rule,
            ci.centre(),
            ci.diameter() / 2.0,
        ),
        Zone::Ellipse(e) => {
            let (cs, sn) = e.rotation();
            let [a, b] = e.axes();
            let m = [[cs * a, -sn * b], [sn * a, cs * b]];
            let d = [mean[0] - e.centre()[0], mean[1] - e.centre()[1]];
            let det = m[0][0] * m[1][1] - m[0][1] * m[1][0];
            let mi = [
                [m[1][1] / det, -m[0][1] / det],
                [-m[1][0] / det, m[0][0] / det],
            ];
            let mv = [
                mi[0][0] * d[0] + mi[0][1] * d[1],
                mi[1][0] * d[0] + mi[1][1] * d[1],
            ];
            let cv = |i: usize, j: usize| {
                (0..2)
                    .map(|p| (0..2).map(|q| mi[i][p] * c[p][q] * mi[j][q]).sum::<f64>())
                    .sum::<f64>()
            };
            let nv = Normal::new(mv, [[cv(0, 0), cv(0, 1)], [cv(1, 0), cv(1, 1)]]);
            peer_disk(&nv, rule, [0.0, 0.0], 1.0)
        }
    }
}

fn time(f: &mut dyn FnMut() -> f64) -> f64 {
    let mut iters = 1u64;
    loop {
        let t0 = Instant::now();
        for _ in 0..iters {
            black_box(f());
        }
        let dt = t0.elapsed().as_secs_f64();
        if dt > 0.3 {
            return dt / iters as f64;
        }
        iters *= 2;
    }
}

fn main() {
    let mean = [0.4, -0.2];
    let c = [[1.69, 0.676], [0.676, 0.64]];
    let cov = Covariance::from_matrix(c);
    let cov32 = Covariance::from_matrix(c.map(|r| r.map(|v| v as f32)));
    let mean32 = mean.map(|v| v as f32);
    let rect = RectZone::new([-2.0, -1.5], [3.0, 2.0]).unwrap();
    let circle = CircleZone::new([0.0, 0.0], 3.2).unwrap();
    let ellipse = EllipseZone::new([0.3, 0.0], 2.5, 1.0, 0.6).unwrap();
    let zones = [
        Zone::Rect(rect),
        Zone::Circle(circle),
        Zone::Ellipse(ellipse),
    ];
    let zones32 = [
        Zone::Rect(RectZone::new([-2.0f32, -1.5], [3.0, 2.0]).unwrap()),
        Zone::Circle(CircleZone::new([0.0f32, 0.0], 3.2).unwrap()),
        Zone::Ellipse(EllipseZone::new([0.3f32, 0.0], 2.5, 1.0, 0.6).unwrap()),
    ];
    let names = ["rect", "circle", "ellipse"];

    // Peers, each tuned to 1e-12 of covgate's value.
    let mut tuned = Vec::new();
    for (k, z) in zones.iter().enumerate() {
        let want = z.probability(&mean, &cov).unwrap().inside;
        let order = [8usize, 12, 16, 24, 32, 48, 64, 96, 128, 192, 256]
            .into_iter()
            .find(|&n| (peer(z, &gl(n), mean, c) - want).abs() <= 1e-12)
            .expect("a tensor rule up to 256 points per axis reaches 1e-12");
        tuned.push((k, order, gl(order)));
    }

    let mut crit = Criterion::default()
        .configure_from_args()
        .warm_up_time(std::time::Duration::from_millis(300))
        .measurement_time(std::time::Duration::from_secs(1));
    for (k, z) in zones.iter().enumerate() {
        crit.bench_function(&format!("{} f64", names[k]), |b| {
            b.iter(|| {
                black_box(z)
                    .probability(black_box(&mean), &cov)
                    .unwrap()
                    .inside
            })
        });
        let z32 = zones32[k];
        crit.bench_function(&format!("{} f32", names[k]), |b| {
            b.iter(|| {
                black_box(z32)
                    .probability(black_box(&mean32), &cov32)
                    .unwrap()
                    .inside
            })
        });
    }
    crit.final_summary();

    println!("\nratio to a tensor-product Gauss-Legendre peer tuned to 1e-12 (same run, f64):");
    for (k, order, rule) in &tuned {
        let z = zones[*k];
        let ours = time(&mut || z.probability(black_box(&mean), &cov).unwrap().inside);
        let peer = time(&mut || peer(&z, rule, black_box(mean), c));
        println!(
            "  {:<8} covgate {:>9.0} ns   peer ({order}x{order} points) {:>10.0} ns   peer / covgate = {:.1}",
            names[*k],
            ours * 1e9,
            peer * 1e9,
            peer / ours
        );
    }
}
