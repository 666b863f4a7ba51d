//! Bytes of state of every accumulator, measured with `size_of` on the host (x86_64). The
//! 2-D budgets (48 bytes for the f32 accumulator with its recent block, 48 for the exact
//! integer one) are also
//! checked at build time on every target in `src/lib.rs`.
//!
//! `cargo test -p covgate-host --test footprint -- --nocapture` prints the table.

use core::mem::size_of;
use covgate::*;

#[test]
fn state_sizes() {
    let mut rows: Vec<(&str, usize)> = vec![
        ("Moments2<f32>", size_of::<Moments2<f32>>()),
        ("Moments2<f64>", size_of::<Moments2<f64>>()),
        ("Moments3<f32>", size_of::<Moments3<f32>>()),
        ("Moments6<f32>", size_of::<Moments6<f32>>()),
        ("Moments6<f64>", size_of::<Moments6<f64>>()),
        ("WeightedMoments2<f32>", size_of::<WeightedMoments2<f32>>()),
        ("WeightedMoments2<f64>", size_of::<WeightedMoments2<f64>>()),
        ("ExactMoments2", size_of::<ExactMoments2>()),
        ("ExactMoments3", size_of::<ExactMoments3>()),
        ("ExactMoments6", size_of::<ExactMoments6>()),
        ("EwMoments2<f32>", size_of::<EwMoments2<f32>>()),
        ("EwMoments2<f64>", size_of::<EwMoments2<f64>>()),
        (
            "Pivoted<Moments2<f32>, f64>",
            size_of::<Pivoted<Moments2<f32>, f64, 2>>(),
        ),
        (
            "Pivoted<Moments2<f32>, i32>",
            size_of::<Pivoted<Moments2<f32>, i32, 2>>(),
        ),
        (
            "Pivoted<ExactMoments2, i32>",
            size_of::<Pivoted<ExactMoments2, i32, 2>>(),
        ),
    ];
    let watch_rows: Vec<(&str, usize)> = vec![
        ("Gate<f32, 2>", size_of::<Gate<f32, 2>>()),
        ("Baseline<f32, 2>", size_of::<Baseline<f32, 2>>()),
        ("IntGate2", size_of::<IntGate2>()),
        ("Zone<f32>", size_of::<Zone<f32>>()),
        ("BoxZone<f32, 3>", size_of::<covgate::BoxZone<f32, 3>>()),
        ("BallZone<f32, 3>", size_of::<covgate::BallZone<f32, 3>>()),
        (
            "EllipsoidZone<f32, 3, 6>",
            size_of::<covgate::EllipsoidZone<f32, 3, 6>>(),
        ),
        (
            "EllipsoidZone<f32, 6, 21>",
            size_of::<covgate::EllipsoidZone<f32, 6, 21>>(),
        ),
        ("IntBox<3>", size_of::<covgate::IntBox<3>>()),
        ("IntBall<3>", size_of::<covgate::IntBall<3>>()),
        (
            "Monitor<f32, 2> (gate, zone, all charts)",
            size_of::<Monitor<f32, 2>>(),
        ),
        ("Monitor<f64, 2>", size_of::<Monitor<f64, 2>>()),
        ("Monitor<f32, 6>", size_of::<Monitor<f32, 6>>()),
        (
            "Watch<f32, 2, 32> (with a 32-sample buffer)",
            size_of::<Watch<f32, 2, 32>>(),
        ),
    ];
    rows.extend(watch_rows);
    println!("\nstate bytes (size_of, host)");
    for (name, bytes) in &rows {
        println!("{name:<44} {bytes:>4}");
    }
    assert!(size_of::<Moments2<f32>>() <= 48);
    assert!(size_of::<ExactMoments2>() <= 48);
    assert!(size_of::<Monitor<f32, 2>>() <= 200);
    // The N-D formulas stated in the moments module docs.
    for (n, l, f32_bytes, exact_bytes) in [
        (
            3usize,
            6usize,
            size_of::<Moments3<f32>>(),
            size_of::<ExactMoments3>(),
        ),
        (
            6,
            21,
            size_of::<Moments6<f32>>(),
            size_of::<ExactMoments6>(),
        ),
    ] {
        assert_eq!(f32_bytes, 8 + 8 * n + 8 * l, "Moments{n}<f32>");
        assert_eq!(exact_bytes, 8 + 8 * n + 8 * l, "ExactMoments{n}");
    }
}
