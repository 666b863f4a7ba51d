//! Host side of covgate: an independent `f64` reference, one shared comparison helper, a
//! seeded property-test runner, and (later) the command-line tool.
//!
//! Nothing in [`reference`] calls the code it checks.

pub mod arl;
pub mod cli;
pub mod compare;
pub mod fixture;
pub mod flash;
pub mod reference;
pub mod seeded;
