//! The errors of the moments module, one per kind of operation.

use core::fmt;

/// Why a sample (or a merge, or a re-centring) was refused. The accumulator is unchanged.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SampleError {
    /// A coordinate was NaN or infinite.
    NotFinite,
    /// A count, an integer sum or a float result would leave its representable range.
    Overflow,
    /// A weight was zero, negative, NaN or infinite.
    BadWeight,
}

/// Why a mean, covariance or derived figure cannot be given.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum EstimateError {
    /// Not enough samples: a mean needs one, a sample covariance two.
    TooFewSamples,
    /// A variance is zero (or not positive), so a ratio such as a correlation is undefined.
    Degenerate,
    /// A figure of the summary would leave the float range. The float accumulators refuse
    /// the samples, merges and shifts that would lead here, so it is not reached through them.
    OutOfRange,
}

/// The forgetting factor of an exponentially weighted accumulator was outside (0, 1].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BadFactor;

impl fmt::Display for SampleError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            SampleError::NotFinite => "sample coordinate is NaN or infinite",
            SampleError::Overflow => "accumulator would overflow",
            SampleError::BadWeight => "weight is not a positive finite number",
        })
    }
}

impl fmt::Display for EstimateError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            EstimateError::TooFewSamples => "too few samples",
            EstimateError::Degenerate => "a variance is zero",
            EstimateError::OutOfRange => "a figure would leave the float range",
        })
    }
}

impl fmt::Display for BadFactor {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str("forgetting factor must lie in (0, 1]")
    }
}

impl core::error::Error for SampleError {}
impl core::error::Error for EstimateError {}
impl core::error::Error for BadFactor {}
