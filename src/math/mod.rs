//! Pure scalar and small-matrix functions shared by every other module.
//!
//! Nothing here holds state. Each function names its method and origin in its docs.

mod beta;
mod bvn;
mod chi2;
mod chi2_table;
mod error;
pub mod fast32;
pub mod gauss_legendre;
mod linalg;
mod normal;
mod precision;
mod real;
mod rng;
pub(crate) mod root;

pub use beta::{phase1_limit, phase2_limit, phase2_tail, subgroup_limit, Beta, FDist};
pub(crate) use bvn::Orthant;
pub use bvn::{bvn_upper_f32, bvn_upper_f64};
pub(crate) use chi2::gamma_series;
pub use chi2::ChiSquare;
pub use chi2_table::{Chi2Table, CHI2_LIMITS};
pub use error::LimitError;
pub(crate) use linalg::forward_sub;
pub use linalg::{cholesky, det2, det_symmetric_psd, symmetric_eigen, symmetric_eigenvalues};
pub use normal::{norm_cdf, norm_pdf, norm_quantile_upper, norm_sf};
pub use precision::Precision;
pub use real::Real;
pub use rng::Xoshiro128;
