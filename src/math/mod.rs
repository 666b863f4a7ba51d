//! Pure scalar and small-matrix functions shared by every other module.
//!
//! Nothing here holds state. Each function names its method and origin in its docs.

mod linalg;
mod real;

pub use linalg::det_symmetric_psd;
pub use real::Real;
