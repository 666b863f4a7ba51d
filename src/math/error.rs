//! The error of the distribution and limit functions.

use core::fmt;

/// Why a distribution or a control limit cannot be evaluated.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum LimitError {
    /// The dimension (degrees of freedom) is outside 1..=6.
    BadDimension,
    /// A probability is not strictly between 0 and 1 (or is NaN).
    BadProbability,
    /// The baseline has too few observations for its dimension (Phase II needs m > p,
    /// Phase I needs m > p + 1).
    BaselineTooSmall,
    /// A shape parameter is not a positive finite number.
    BadParameter,
    /// The root finder did not converge (not observed in the tested domain; reported rather
    /// than returning a wrong limit).
    NoConvergence,
}

impl fmt::Display for LimitError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            LimitError::BadDimension => "dimension must be 1 to 6",
            LimitError::BadProbability => "probability must lie strictly between 0 and 1",
            LimitError::BaselineTooSmall => "baseline too small for this dimension",
            LimitError::BadParameter => "shape parameter must be positive and finite",
            LimitError::NoConvergence => "root finder did not converge",
        })
    }
}

impl core::error::Error for LimitError {}
