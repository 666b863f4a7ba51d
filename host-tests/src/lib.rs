//! Host side of covgate.
