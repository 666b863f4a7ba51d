//! Running moments: count, mean vector and co-moment matrix of a stream of N-D samples.
//!
//! | type | sample | state for N = 2 | use |
//! |---|---|---|---|
//! | [`Moments`] | `[f32; N]` or `[f64; N]` | 48 bytes (f32), 88 (f64) | float Welford update in blocks of 2^16 samples, one pass, mergeable, right to the end of its `u32` count |
//! | [`WeightedMoments`] | float plus a weight | 24 (f32), 48 (f64) | West's weighted update (frequency weights) |
//! | [`ExactMoments`] | `[i32; N]` | 48 bytes | ADC counts, encoder ticks, micrometres: exact integer sums until a detected overflow |
//! | [`EwMoments`] | float | 28 (f32), 56 (f64) | exponentially weighted, forgets old samples |
//! | [`Pivoted`] | the accumulator's or a wider type | the accumulator + the pivot | subtracts a pivot (first sample, nominal, ADC offset) before the cast |
//!
//! Cost of the N-D forms, in bytes, with `L = N (N + 1) / 2` upper-triangle entries:
//! `Moments<f32>` is `8 + 8 N + 8 L` (N = 6: 224), `Moments<f64>` is `8 + 16 N + 16 L` (N = 6: 440),
//! `ExactMoments` is `8 + 8 N + 8 L` (N = 6: 224), `EwMoments<f32>` is `8 + 4 N + 4 L`.
//! `footprint` in the host tests prints the measured `size_of` of each.
//!
//! Every update validates first and commits last: a rejected sample (NaN, infinity, overflow,
//! a bad weight) returns a [`SampleError`] and leaves the accumulator bit-for-bit unchanged.
//!
//! The co-moment matrix is `C = sum_k (x_k - mean)(x_k - mean)'`; the sample covariance is
//! `C / (n - 1)`, the population covariance `C / n`. Derived quantities live in
//! [`Covariance`] and [`Ellipse`].

mod error;
mod ew;
mod exact;
mod pivot;
mod summary;
mod welford;

pub use error::{BadFactor, EstimateError, SampleError};
pub use ew::EwMoments;
pub use exact::ExactMoments;
pub use pivot::{Pivoted, Source};
pub use summary::{Covariance, Ellipse};
pub use welford::{Moments, WeightedMoments};

/// Number of upper-triangle entries of an N x N symmetric matrix: `N (N + 1) / 2`.
pub const fn tri_len(n: usize) -> usize {
    n * (n + 1) / 2
}

/// Compile-time check of the two const parameters every accumulator carries.
pub(crate) struct Shape<const N: usize, const L: usize>;

impl<const N: usize, const L: usize> Shape<N, L> {
    /// Evaluated at compile time when an accumulator is created: a wrong `L` or an `N`
    /// outside 1..=6 is a build error, never a run-time one.
    pub(crate) const CHECK: () = assert!(
        N >= 1 && N <= 6 && L == tri_len(N),
        "dimension must be 1..=6 and L must equal N (N + 1) / 2"
    );
}

/// Compile-time check of the dimension of a type without a packed triangle.
pub(crate) struct Dim<const N: usize>;

impl<const N: usize> Dim<N> {
    /// A dimension outside 1..=6 is a build error.
    pub(crate) const CHECK: () = assert!(N >= 1 && N <= 6, "dimension must be 1..=6");
}

/// The (i, j) pairs of the upper triangle, row by row, in storage order.
pub(crate) fn pairs<const N: usize>() -> impl Iterator<Item = (usize, usize)> {
    (0..N).flat_map(|i| (i..N).map(move |j| (i, j)))
}

/// Expands a packed upper triangle into the full symmetric matrix.
pub(crate) fn unpack<T: Copy + Default, const N: usize, const L: usize>(
    tri: &[T; L],
) -> [[T; N]; N] {
    let mut m = [[T::default(); N]; N];
    for ((i, j), &v) in pairs::<N>().zip(tri.iter()) {
        if let Some(row) = m.get_mut(i) {
            if let Some(c) = row.get_mut(j) {
                *c = v;
            }
        }
        if let Some(row) = m.get_mut(j) {
            if let Some(c) = row.get_mut(i) {
                *c = v;
            }
        }
    }
    m
}

/// What every accumulator offers to [`Pivoted`]: push a sample already shifted by the pivot,
/// and move its origin when two accumulators with different pivots are merged.
pub trait Accumulator<const N: usize>: Copy {
    /// The scalar type of one pushed coordinate.
    type Value: Copy + Default;
    /// Adds one sample; on error the accumulator is unchanged.
    fn push(&mut self, x: [Self::Value; N]) -> Result<(), SampleError>;
    /// Number of samples taken.
    fn count(&self) -> u32;
    /// Re-expresses everything taken so far as if each sample had been `x + delta`.
    /// On error the accumulator is unchanged.
    fn recenter(&mut self, delta: [Self::Value; N]) -> Result<(), SampleError>;
    /// Mean of the samples as pushed (relative to the pivot), widened to `f64`.
    fn mean_f64(&self) -> Result<[f64; N], EstimateError>;
}

/// Accumulators whose summaries combine into the summary of all samples together.
pub trait Merge: Sized {
    /// Folds `other` into `self`, as if its samples had been pushed here. On error `self` is
    /// unchanged.
    fn merge(&mut self, other: &Self) -> Result<(), SampleError>;
}

macro_rules! aliases {
    ($( $(#[$doc:meta])* $name:ident = $ty:ident < $($pre:ident,)? $n:literal, $l:literal > ;)*) => {
        $( $(#[$doc])* pub type $name $(<$pre>)? = $ty<$($pre,)? $n, $l>; )*
    };
}

aliases! {
    /// 1-D float Welford accumulator.
    Moments1 = Moments<T, 1, 1>;
    /// 2-D float Welford accumulator (48 bytes in `f32`).
    Moments2 = Moments<T, 2, 3>;
    /// 3-D float Welford accumulator.
    Moments3 = Moments<T, 3, 6>;
    /// 4-D float Welford accumulator.
    Moments4 = Moments<T, 4, 10>;
    /// 5-D float Welford accumulator.
    Moments5 = Moments<T, 5, 15>;
    /// 6-D float Welford accumulator.
    Moments6 = Moments<T, 6, 21>;
    /// 2-D weighted accumulator.
    WeightedMoments2 = WeightedMoments<T, 2, 3>;
    /// 1-D exact integer accumulator.
    ExactMoments1 = ExactMoments<1, 1>;
    /// 2-D exact integer accumulator (48 bytes).
    ExactMoments2 = ExactMoments<2, 3>;
    /// 3-D exact integer accumulator.
    ExactMoments3 = ExactMoments<3, 6>;
    /// 4-D exact integer accumulator.
    ExactMoments4 = ExactMoments<4, 10>;
    /// 5-D exact integer accumulator.
    ExactMoments5 = ExactMoments<5, 15>;
    /// 6-D exact integer accumulator.
    ExactMoments6 = ExactMoments<6, 21>;
    /// 2-D exponentially weighted accumulator.
    EwMoments2 = EwMoments<T, 2, 3>;
    /// 3-D exponentially weighted accumulator.
    EwMoments3 = EwMoments<T, 3, 6>;
}
