//! Subtracting a pivot before the arithmetic, so that large offsets keep their precision.

use super::{Accumulator, EstimateError, Merge, SampleError};

/// A sample scalar type `Self` that can be shifted by a pivot into the accumulator's type `V`.
///
/// The subtraction happens in the wider of the two types, and only then is the (small)
/// difference cast: `10000000.2_f64 - 10000000.1_f64` is about `0.1`, representable in `f32`
/// to 7 digits, while `10000000.2_f32` itself is not even distinct from `10000000.0`.
pub trait Source<V>: Copy {
    /// `self - pivot`, as `V`. [`SampleError::NotFinite`] for a NaN or infinite input,
    /// [`SampleError::Overflow`] if the difference does not fit in `V`.
    fn offset(self, pivot: Self) -> Result<V, SampleError>;
    /// `self` widened to `f64` (exact for every implementing type).
    fn to_f64(self) -> f64;
}

fn float_offset(x: f64, pivot: f64) -> Result<f64, SampleError> {
    if !(x.is_finite() && pivot.is_finite()) {
        return Err(SampleError::NotFinite);
    }
    let d = x - pivot;
    if d.is_finite() {
        Ok(d)
    } else {
        Err(SampleError::Overflow)
    }
}

impl Source<f64> for f64 {
    fn offset(self, pivot: Self) -> Result<f64, SampleError> {
        float_offset(self, pivot)
    }
    fn to_f64(self) -> f64 {
        self
    }
}

impl Source<f32> for f64 {
    fn offset(self, pivot: Self) -> Result<f32, SampleError> {
        let d = float_offset(self, pivot)? as f32;
        if d.is_finite() {
            Ok(d)
        } else {
            Err(SampleError::Overflow)
        }
    }
    fn to_f64(self) -> f64 {
        self
    }
}

impl Source<f32> for f32 {
    fn offset(self, pivot: Self) -> Result<f32, SampleError> {
        // Exact in f64, then one rounding to f32.
        <f64 as Source<f32>>::offset(f64::from(self), f64::from(pivot))
    }
    fn to_f64(self) -> f64 {
        f64::from(self)
    }
}

impl Source<i32> for i32 {
    fn offset(self, pivot: Self) -> Result<i32, SampleError> {
        i32::try_from(i64::from(self) - i64::from(pivot)).map_err(|_| SampleError::Overflow)
    }
    fn to_f64(self) -> f64 {
        f64::from(self)
    }
}

impl Source<f32> for i32 {
    /// Exact: a difference of 2^24 or more in size, which `f32` would round, is
    /// [`SampleError::Overflow`].
    fn offset(self, pivot: Self) -> Result<f32, SampleError> {
        let d = i64::from(self) - i64::from(pivot);
        if d.abs() < (1 << 24) {
            Ok(d as f32)
        } else {
            Err(SampleError::Overflow)
        }
    }
    fn to_f64(self) -> f64 {
        f64::from(self)
    }
}

impl Source<f64> for i32 {
    fn offset(self, pivot: Self) -> Result<f64, SampleError> {
        Ok((i64::from(self) - i64::from(pivot)) as f64)
    }
    fn to_f64(self) -> f64 {
        f64::from(self)
    }
}

/// An accumulator fed through a pivot: each sample `x` (of source type `S`) is pushed as
/// `x - pivot`, computed in `S` before the cast to the accumulator's type.
///
/// The pivot is a nominal or an ADC offset given by the caller ([`with_pivot`](Self::with_pivot)),
/// or the first sample ([`first_sample`](Self::first_sample)). The covariance does not depend
/// on it; the mean is `pivot + mean of the offsets`, reported in `f64` by
/// [`mean_f64`](Self::mean_f64). Size: the accumulator plus `N` values of `S` plus a tag.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Pivoted<A, S, const N: usize> {
    pivot: Option<[S; N]>,
    inner: A,
}

impl<A, S, const N: usize> Pivoted<A, S, N>
where
    A: Accumulator<N>,
    S: Source<A::Value>,
{
    /// Wraps `inner` (normally empty) with a fixed pivot: a nominal or an ADC offset. The
    /// samples already in `inner`, if any, are taken to be relative to `pivot`.
    pub fn with_pivot(inner: A, pivot: [S; N]) -> Self {
        Pivoted {
            pivot: Some(pivot),
            inner,
        }
    }

    /// Wraps `inner`; the first sample pushed becomes the pivot. An `inner` that already holds
    /// samples has them taken as unshifted (pivot zero), so nothing it holds is lost.
    pub fn first_sample(inner: A) -> Self
    where
        S: Default,
    {
        let pivot = (inner.count() > 0).then(|| [S::default(); N]);
        Pivoted { pivot, inner }
    }

    /// Subtracts the pivot and pushes. Errors as [`Source::offset`] and the accumulator's
    /// `push`; nothing changes on error (not even the pivot of a first-sample wrapper).
    pub fn push(&mut self, x: [S; N]) -> Result<(), SampleError> {
        let pivot = self.pivot.unwrap_or(x);
        let mut inner = self.inner;
        inner.push(offsets(&x, &pivot)?)?;
        self.inner = inner;
        self.pivot = Some(pivot);
        Ok(())
    }

    /// The pivot, once known.
    pub fn pivot(&self) -> Option<[S; N]> {
        self.pivot
    }

    /// The wrapped accumulator, whose mean is relative to the pivot and whose covariance is the
    /// covariance of the samples.
    pub fn inner(&self) -> &A {
        &self.inner
    }

    /// Number of samples taken.
    pub fn count(&self) -> u32 {
        self.inner.count()
    }

    /// Mean of the samples in their own units: `pivot + mean offset`, in `f64`.
    pub fn mean_f64(&self) -> Result<[f64; N], EstimateError> {
        let offset = self.inner.mean_f64()?;
        let pivot = self.pivot.ok_or(EstimateError::TooFewSamples)?;
        let mut out = offset;
        for (o, p) in out.iter_mut().zip(pivot.iter()) {
            *o += p.to_f64();
        }
        Ok(out)
    }
}

/// `x - pivot` coordinate by coordinate, each through [`Source::offset`].
fn offsets<V: Copy + Default, S: Source<V>, const N: usize>(
    x: &[S; N],
    pivot: &[S; N],
) -> Result<[V; N], SampleError> {
    let mut out = [V::default(); N];
    for (o, (&v, &p)) in out.iter_mut().zip(x.iter().zip(pivot.iter())) {
        *o = v.offset(p)?;
    }
    Ok(out)
}

impl<A, S, const N: usize> Merge for Pivoted<A, S, N>
where
    A: Accumulator<N> + Merge,
    S: Source<A::Value>,
{
    /// Merges two pivoted accumulators; when the pivots differ, `other` is first re-expressed
    /// relative to this pivot (exactly for integer accumulators, with one rounding of the pivot
    /// difference for float ones).
    fn merge(&mut self, other: &Self) -> Result<(), SampleError> {
        let Some(theirs) = other.pivot else {
            return Ok(());
        };
        let Some(ours) = self.pivot else {
            *self = *other;
            return Ok(());
        };
        let mut moved = other.inner;
        moved.recenter(offsets(&theirs, &ours)?)?;
        let mut inner = self.inner;
        inner.merge(&moved)?;
        self.inner = inner;
        Ok(())
    }
}
