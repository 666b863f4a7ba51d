#![doc = include_str!("../README.md")]
#![cfg_attr(not(any(test, feature = "std")), no_std)]
#![forbid(unsafe_code)]
#![deny(missing_docs)]
// Small dense matrices read best with their indices (all loops run over 0..N).
#![allow(clippy::needless_range_loop)]
// `!(x > 0)` is deliberate throughout: it is true for NaN, which must be refused too.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod gate;
mod gaussian;
pub mod math;
pub mod moments;
pub mod report;
pub mod signal;
pub mod snapshot;
pub mod watch;
pub mod zone;

pub use gate::{Chart, Distance, Gate, IntGate, IntGate2, Learner, Limit, Reason, Verdict};
pub use gaussian::{Baseline, FreezeError};
pub use math::CHI2_LIMITS;
pub use moments::{
    tri_len, Accumulator, BadFactor, Covariance, Ellipse, EstimateError, EwMoments, EwMoments2,
    EwMoments3, ExactMoments, ExactMoments1, ExactMoments2, ExactMoments3, ExactMoments4,
    ExactMoments5, ExactMoments6, Merge, Moments, Moments1, Moments2, Moments3, Moments4, Moments5,
    Moments6, Pivoted, SampleError, Source, WeightedMoments, WeightedMoments2,
};
pub use report::{ReportFrame, ReportFrame2};
pub use snapshot::{SlotStore, SnapshotError};
pub use watch::{Alarm, Monitor, Screening, Step, Watch, WatchConfig, WatchError};
pub use zone::{
    coverage_radius, BallZone, BoundError, Bounds, BoxZone, Capability, CircleZone, EllipseZone,
    EllipsoidZone, Estimate, IntBall, IntBox, IntCircle, IntEllipse, IntRect, IntZone, RectZone,
    Uncertainty, Yield, YieldBound, Zone, ZoneError,
};

// The state budgets promised in the docs, checked at build time on every target.
const _: () = assert!(core::mem::size_of::<Moments2<f32>>() <= 48);
const _: () = assert!(core::mem::size_of::<ExactMoments2>() <= 48);
