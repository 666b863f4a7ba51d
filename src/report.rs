//! Report frames: a node's state over a lossy link in a few dozen bytes, mergeable at the
//! gateway.
//!
//! # Layout, version 1
//!
//! Little-endian; `f32` as IEEE 754 binary32; `N` the dimension, `L = N (N + 1) / 2`.
//!
//! | offset | bytes | field |
//! |---|---|---|
//! | 0 | 1 | version = 1 |
//! | 1 | 1 | `N`, 1..=6 |
//! | 2 | 2 | node id (u16) |
//! | 4 | 4 | sequence number (u32) |
//! | 8 | 1 | alarm chart: 0 none, 1 gate, 2 MEWMA, 3 MCUSUM, 4 dispersion, 5 subgroup, 6 fault |
//! | 9 | 1 | flags: bit 0 MEWMA statistic present, bit 1 MCUSUM, bit 2 dispersion; bits 3-7 zero |
//! | 10 | 2 | zero |
//! | 12 | 4 | sample count `n` of the moment summary (u32) |
//! | 16 | 4N | mean |
//! | 16 + 4N | 4L | co-moment `sum (x - mean)(x - mean)'`, upper triangle row by row |
//! | b = 16 + 4N + 4L | 12 | MEWMA `T^2`, MCUSUM `Y`, dispersion `E` (zero where absent) |
//! | b + 12 | 12 | go count, no-go count, alarms raised (u32 each) |
//! | b + 24 | 4 | CRC-32/ISO-HDLC of every byte before |
//!
//! Length `44 + 4 N + 4 L`: 64 bytes for `N = 2` ([`frame_len`]). The moment summary is a
//! [`Moments`] accumulator, so frames from many nodes merge into the summary of all their
//! samples (pairwise formula); encoding writes into a caller's buffer, no allocation.

use core::fmt;

use crate::gate::Chart;
use crate::moments::{tri_len, Merge, Moments, Shape};
use crate::snapshot::{crc_ok, Reader, Writer};

/// The layout version written by this crate.
pub const FRAME_VERSION: u8 = 1;

/// Length in bytes of a frame of dimension `n`: `44 + 4 n + 4 n (n + 1) / 2`.
pub const fn frame_len(n: usize) -> usize {
    44 + 4 * n + 4 * tri_len(n)
}

/// Why a frame cannot be written or read.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum FrameError {
    /// The output buffer is shorter than [`frame_len`].
    BufferTooSmall,
    /// The input is shorter than [`frame_len`] (trailing bytes are the next frame's).
    Length,
    /// A layout version this crate does not read.
    UnsupportedVersion,
    /// A frame of another dimension.
    DimensionMismatch,
    /// The CRC does not match.
    BadChecksum,
    /// A field out of range.
    BadValue,
}

impl fmt::Display for FrameError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            FrameError::BufferTooSmall => "buffer too small for the frame",
            FrameError::Length => "frame truncated",
            FrameError::UnsupportedVersion => "unsupported frame version",
            FrameError::DimensionMismatch => "frame dimension differs",
            FrameError::BadChecksum => "frame checksum mismatch",
            FrameError::BadValue => "frame field out of range",
        })
    }
}

impl core::error::Error for FrameError {}

/// What a node reports.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ReportFrame<const N: usize, const L: usize> {
    /// Node id.
    pub node: u16,
    /// Sequence number (for loss and duplicate detection).
    pub seq: u32,
    /// The latched alarm's chart, if any.
    pub alarm: Option<Chart>,
    /// Moment summary of the samples this frame covers.
    pub moments: Moments<f32, N, L>,
    /// MEWMA, MCUSUM and dispersion statistics (`None` for a chart that is off).
    pub charts: [Option<f32>; 3],
    /// Go verdicts counted.
    pub go: u32,
    /// No-go verdicts counted.
    pub nogo: u32,
    /// Alarms raised.
    pub alarms: u32,
}

/// The 2-D frame (64 bytes).
pub type ReportFrame2 = ReportFrame<2, 3>;

impl<const N: usize, const L: usize> ReportFrame<N, L> {
    /// Writes the frame; returns its length ([`frame_len`]`(N)`).
    pub fn encode(&self, out: &mut [u8]) -> Result<usize, FrameError> {
        let () = Shape::<N, L>::CHECK;
        let len = frame_len(N);
        let buf = out.get_mut(..len).ok_or(FrameError::BufferTooSmall)?;
        let mut w = Writer::new(buf);
        w.u8(FRAME_VERSION);
        w.u8(N as u8);
        w.u16(self.node);
        w.u32(self.seq);
        w.u8(self.alarm.map_or(0, Chart::code));
        let flags =
            self.charts
                .iter()
                .enumerate()
                .fold(0u8, |f, (k, c)| if c.is_some() { f | (1 << k) } else { f });
        w.u8(flags);
        w.u16(0);
        w.u32(self.moments.count());
        let mean = self.moments.mean().unwrap_or([0.0; N]);
        for v in mean {
            w.f32(v);
        }
        for v in self.moments.comoment().unwrap_or([0.0; L]) {
            w.f32(v);
        }
        for c in self.charts {
            w.f32(c.unwrap_or(0.0));
        }
        w.u32(self.go);
        w.u32(self.nogo);
        w.u32(self.alarms);
        w.crc();
        if w.ok && w.pos() == len {
            Ok(len)
        } else {
            Err(FrameError::BufferTooSmall)
        }
    }

    /// Reads one frame from the start of `bytes` (which may hold more frames after it).
    pub fn decode(bytes: &[u8]) -> Result<Self, FrameError> {
        let () = Shape::<N, L>::CHECK;
        let len = frame_len(N);
        let b = bytes.get(..len).ok_or(FrameError::Length)?;
        if b.first() != Some(&FRAME_VERSION) {
            return Err(FrameError::UnsupportedVersion);
        }
        if b.get(1).map(|&n| n as usize) != Some(N) {
            return Err(FrameError::DimensionMismatch);
        }
        if !crc_ok(b) {
            return Err(FrameError::BadChecksum);
        }
        Self::fields(b).ok_or(FrameError::BadValue)
    }

    fn fields(b: &[u8]) -> Option<Self> {
        let mut r = Reader::new(b);
        r.take::<2>()?;
        let node = r.u16()?;
        let seq = r.u32()?;
        let alarm = Chart::from_code(r.u8()?)?;
        let flags = r.u8()?;
        if flags & !0b111 != 0 || r.u16()? != 0 {
            return None;
        }
        let count = r.u32()?;
        let mut mean = [0.0f32; N];
        for v in mean.iter_mut() {
            *v = r.f32()?;
        }
        let mut comoment = [0.0f32; L];
        for v in comoment.iter_mut() {
            *v = r.f32()?;
        }
        // An empty summary is written as exact zeros (bit pattern 0, not -0.0).
        if count == 0 && !mean.iter().chain(comoment.iter()).all(|v| v.to_bits() == 0) {
            return None;
        }
        let moments = Moments::from_parts(count, mean, comoment).ok()?;
        let mut charts = [None; 3];
        for (k, c) in charts.iter_mut().enumerate() {
            let v = r.f32()?;
            let on = flags & (1 << k) != 0;
            if on {
                *c = Some(v.is_finite().then_some(v)?);
            } else if v.to_bits() != 0 {
                return None;
            }
        }
        Some(ReportFrame {
            node,
            seq,
            alarm,
            moments,
            charts,
            go: r.u32()?,
            nogo: r.u32()?,
            alarms: r.u32()?,
        })
    }

    /// Folds another node's (or period's) frame into this one: the moment summaries merge
    /// exactly as if one accumulator had taken all samples; counts add; the chart statistics
    /// and alarm keep the larger / any. The node id and sequence of `self` are kept.
    pub fn merge(&mut self, other: &Self) -> Result<(), crate::SampleError> {
        let mut m = self.moments;
        m.merge(&other.moments)?;
        self.moments = m;
        self.go = self.go.saturating_add(other.go);
        self.nogo = self.nogo.saturating_add(other.nogo);
        self.alarms = self.alarms.saturating_add(other.alarms);
        for (a, b) in self.charts.iter_mut().zip(other.charts.iter()) {
            *a = match (*a, *b) {
                (Some(x), Some(y)) => Some(x.max(y)),
                (x, None) => x,
                (None, y) => y,
            };
        }
        if self.alarm.is_none() {
            self.alarm = other.alarm;
        }
        Ok(())
    }
}
