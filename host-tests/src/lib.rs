//! Host side of covgate: an independent `f64` reference, one shared comparison helper, a
//! seeded property-test runner, run-length tools, the replay engine and figure, and the
//! `covgate` command-line tool.
//!
//! Nothing in [`reference`] calls the code it checks.

// `!(x <= limit)` is deliberate: it counts NaN as outside.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod arl;
pub mod cli;
pub mod compare;
pub mod demo;
pub mod figure;
pub mod fixture;
pub mod flash;
pub mod fleet_frames;
pub mod process;
pub mod quadrature;
pub mod reference;
pub mod replay;
pub mod seeded;
pub mod zone_cases;
