//! Power-safe baseline snapshots: a versioned, fixed-layout, little-endian byte image of an
//! armed `f32` monitor, with a CRC-32, and a two-slot flash store ([`SlotStore`]).
//!
//! What a snapshot keeps: the baseline (mean and the Cholesky factor of the covariance, so the
//! restored baseline is bit-for-bit the saved one), the gate's false-alarm rate and baseline size, every chart's settings, the
//! k-of-n rule, the zone, the samples counter and a latched alarm. What it does not keep: the
//! running chart statistics; a restored monitor restarts its charts as after an
//! acknowledgement, but a latched alarm stays latched across the power cycle (the logic defaults to no-go; not a rated safety function).
//!
//! # Layout, version 1
//!
//! All multi-byte values little-endian; `f32` as IEEE 754 binary32. `N` is the dimension,
//! `L = N (N + 1) / 2`.
//!
//! | offset | bytes | field |
//! |---|---|---|
//! | 0 | 4 | magic `"CVGS"` (0x43 0x56 0x47 0x53) |
//! | 4 | 1 | version = 1 |
//! | 5 | 1 | `N`, 1..=6 |
//! | 6 | 1 | flags: bit 0 alarm latched, 1 MEWMA on, 2 MEWMA exact covariance, 3 MCUSUM on, 4 dispersion on, 5 subgroup on, 6 gate rule on; bit 7 zero |
//! | 7 | 1 | alarm chart: 0 none, 1 gate, 2 MEWMA, 3 MCUSUM, 4 dispersion, 5 subgroup, 6 fault |
//! | 8 | 4 | baseline size `m` (u32) |
//! | 12 | 4 | samples since arming or acknowledgement (u32) |
//! | 16 | 4 | gate false-alarm rate `alpha` (f32) |
//! | 20 | 4N | mean |
//! | 20 + 4N | 4L | lower Cholesky factor `L` of the covariance (`C = L L'`), lower triangle column by column (`L11, L21, ..., LN1, L22, ...`) |
//! | a = 20 + 4N + 4L | 8 | MEWMA `lambda`, `h` |
//! | a + 8 | 8 | MCUSUM `k`, `h` |
//! | a + 16 | 8 | dispersion `lambda`, `h` |
//! | a + 24 | 4 | subgroup size (u8), rule `k` (u8), rule `n` (u8), zone kind (u8: 0 none, 1 rectangle, 2 circle, 3 ellipse) |
//! | a + 28 | 4 | subgroup limit |
//! | a + 32 | 24 | zone: rectangle `xlo, xhi, ylo, yhi, 0, 0`; circle `cx, cy, diameter, 0, 0, 0`; ellipse `cx, cy, a, b, cos, sin` of the rotation |
//! | a + 56 | 4 | alarm statistic |
//! | a + 60 | 4 | alarm sample (u32) |
//! | a + 64 | 4N | alarm shift |
//! | a + 64 + 4N | 4 | CRC-32/ISO-HDLC of every byte before |
//!
//! Fields of a chart that is off, and of an absent alarm or zone, are zero. Total length
//! `88 + 8 N + 4 L`: 116 bytes for `N = 2`, see [`snapshot_len`].
//!
//! Decoding checks, in order, the length, the magic, the version, the dimension, the CRC, and
//! then every value's range (finite, positive definite covariance, valid chart settings,
//! flags consistent with the fields) before it builds anything; each failure is a
//! [`SnapshotError`].

mod bytes;
mod store;

pub(crate) use bytes::{crc_ok, Reader, Writer};
pub use store::{SlotStore, StoreError};

use core::fmt;

use crate::gate::{Chart, Gate, Limit};
use crate::moments::{pairs, tri_len, Dim};
use crate::watch::{Alarm, Dispersion, KofN, Mcusum, Mewma, Monitor, Subgroup};
use crate::zone::{CircleZone, EllipseZone, RectZone, Zone};
use crate::Baseline;

/// The magic bytes that open a snapshot.
pub const MAGIC: [u8; 4] = *b"CVGS";
/// The layout version written by this crate.
pub const VERSION: u8 = 1;

/// Length in bytes of a snapshot of dimension `n`: `88 + 8 n + 4 n (n + 1) / 2`.
pub const fn snapshot_len(n: usize) -> usize {
    88 + 8 * n + 4 * tri_len(n)
}

/// Why a snapshot cannot be written or read.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SnapshotError {
    /// The output buffer is shorter than [`snapshot_len`].
    BufferTooSmall,
    /// The input is not exactly [`snapshot_len`] bytes long.
    Length,
    /// The input does not start with [`MAGIC`].
    BadMagic,
    /// A layout version this crate does not read.
    UnsupportedVersion,
    /// The snapshot is of another dimension than the monitor type asked for.
    DimensionMismatch,
    /// The CRC does not match: the bytes were damaged or half-written.
    BadChecksum,
    /// A field is out of range (not finite, not positive definite, inconsistent flags).
    BadValue,
}

impl fmt::Display for SnapshotError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            SnapshotError::BufferTooSmall => "buffer too small for the snapshot",
            SnapshotError::Length => "snapshot has the wrong length",
            SnapshotError::BadMagic => "not a snapshot (bad magic)",
            SnapshotError::UnsupportedVersion => "unsupported snapshot version",
            SnapshotError::DimensionMismatch => "snapshot dimension differs",
            SnapshotError::BadChecksum => "snapshot checksum mismatch",
            SnapshotError::BadValue => "snapshot field out of range",
        })
    }
}

impl core::error::Error for SnapshotError {}

impl<const N: usize> Monitor<f32, N> {
    /// Writes the snapshot into `out`; returns its length ([`snapshot_len`]`(N)`).
    pub fn encode_snapshot(&self, out: &mut [u8]) -> Result<usize, SnapshotError> {
        let () = Dim::<N>::CHECK;
        let len = snapshot_len(N);
        let buf = out.get_mut(..len).ok_or(SnapshotError::BufferTooSmall)?;
        let mut w = Writer::new(buf);
        let (alpha, m) = match self.gate.kind() {
            Limit::PhaseII { m, alpha } => (alpha, m),
            // Monitors are only built with the Phase II limit.
            _ => return Err(SnapshotError::BadValue),
        };
        let flag = |on: bool, bit: u8| if on { 1u8 << bit } else { 0 };
        let flags = flag(self.alarm.is_some(), 0)
            | flag(self.mewma.is_some(), 1)
            | flag(self.mewma.is_some_and(|c| c.is_exact()), 2)
            | flag(self.mcusum.is_some(), 3)
            | flag(self.dispersion.is_some(), 4)
            | flag(self.subgroup.is_some(), 5)
            | flag(self.rule.is_some(), 6);
        w.bytes(&MAGIC);
        w.u8(VERSION);
        w.u8(N as u8);
        w.u8(flags);
        w.u8(self.alarm.map_or(0, |a| a.chart.code()));
        w.u32(m);
        w.u32(self.samples);
        w.f32(alpha);
        let base = self.gate.baseline();
        for &v in base.mean() {
            w.f32(v);
        }
        let l = base.cholesky_factor();
        for (i, j) in pairs::<N>() {
            // (i, j) runs over the upper triangle; write the lower one, L[j][i].
            w.f32(l[j][i]);
        }
        let pair = |w: &mut Writer, a: f32, b: f32| {
            w.f32(a);
            w.f32(b);
        };
        let (l, h) = self.mewma.map_or((0.0, 0.0), |c| (c.lambda(), c.limit()));
        pair(&mut w, l, h);
        let (k, h) = self.mcusum.map_or((0.0, 0.0), |c| (c.k(), c.limit()));
        pair(&mut w, k, h);
        let (l, h) = self
            .dispersion
            .map_or((0.0, 0.0), |c| (c.lambda(), c.limit()));
        pair(&mut w, l, h);
        let (rk, rn) = self.rule.map_or((0, 0), |r| r.k_of_n());
        let (zone_kind, zp) = match self.zone {
            None => (0u8, [0.0f32; 6]),
            Some(Zone::Rect(r)) => (1, [r.lo()[0], r.hi()[0], r.lo()[1], r.hi()[1], 0.0, 0.0]),
            Some(Zone::Circle(c)) => (
                2,
                [c.centre()[0], c.centre()[1], c.diameter(), 0.0, 0.0, 0.0],
            ),
            Some(Zone::Ellipse(e)) => {
                let (cs, sn) = e.rotation();
                let [a, b] = e.axes();
                (3, [e.centre()[0], e.centre()[1], a, b, cs, sn])
            }
        };
        w.u8(self.subgroup.map_or(0, |s| s.size()));
        w.u8(rk);
        w.u8(rn);
        w.u8(zone_kind);
        w.f32(self.subgroup.map_or(0.0, |s| s.limit()));
        for v in zp {
            w.f32(v);
        }
        let (stat, sample, shift) = self
            .alarm
            .map_or((0.0, 0, [0.0; N]), |a| (a.statistic, a.sample, a.shift));
        w.f32(stat);
        w.u32(sample);
        for v in shift {
            w.f32(v);
        }
        w.crc();
        if w.ok && w.pos() == len {
            Ok(len)
        } else {
            Err(SnapshotError::BufferTooSmall)
        }
    }

    /// Rebuilds a monitor from a snapshot, after checking everything (module docs).
    pub fn decode_snapshot(bytes: &[u8]) -> Result<Self, SnapshotError> {
        let () = Dim::<N>::CHECK;
        let len = snapshot_len(N);
        if bytes.get(..4) != Some(&MAGIC[..]) {
            return Err(if bytes.len() < 4 {
                SnapshotError::Length
            } else {
                SnapshotError::BadMagic
            });
        }
        if bytes.get(4) != Some(&VERSION) {
            return Err(SnapshotError::UnsupportedVersion);
        }
        if bytes.get(5).map(|&n| n as usize) != Some(N) {
            return Err(SnapshotError::DimensionMismatch);
        }
        if bytes.len() != len {
            return Err(SnapshotError::Length);
        }
        if !crc_ok(bytes) {
            return Err(SnapshotError::BadChecksum);
        }
        decode_fields(bytes).ok_or(SnapshotError::BadValue)?
    }
}

/// `Some(Some(chart))` when on and valid, `Some(None)` when off, `None` when on but invalid.
fn opt<C>(on: bool, v: Option<C>) -> Option<Option<C>> {
    if on {
        v.map(Some)
    } else {
        Some(None)
    }
}

fn finite(v: f32) -> Option<f32> {
    v.is_finite().then_some(v)
}

/// The value checks and construction; `None` for a field past the end (cannot happen after
/// the length check), `Some(Err)` for a value out of range.
fn decode_fields<const N: usize>(bytes: &[u8]) -> Option<Result<Monitor<f32, N>, SnapshotError>> {
    let bad = Some(Err(SnapshotError::BadValue));
    let mut r = Reader::new(bytes);
    r.take::<6>()?;
    let flags = r.u8()?;
    let Some(alarm_chart) = Chart::from_code(r.u8()?) else {
        return bad;
    };
    let m = r.u32()?;
    let samples = r.u32()?;
    let alpha = r.f32()?;
    let mut mean = [0.0f32; N];
    for v in mean.iter_mut() {
        *v = finite(r.f32()?)?;
    }
    let mut factor = [[0.0f32; N]; N];
    for (i, j) in pairs::<N>() {
        factor[j][i] = finite(r.f32()?)?;
    }
    let (ml, mh) = (r.f32()?, r.f32()?);
    let (ck, ch) = (r.f32()?, r.f32()?);
    let (dl, dh) = (r.f32()?, r.f32()?);
    let (gsize, rk, rn, zone_kind) = (r.u8()?, r.u8()?, r.u8()?, r.u8()?);
    let glimit = r.f32()?;
    let mut zp = [0.0f32; 6];
    for v in zp.iter_mut() {
        *v = r.f32()?;
    }
    let stat = r.f32()?;
    let sample = r.u32()?;
    let mut shift = [0.0f32; N];
    for v in shift.iter_mut() {
        *v = r.f32()?;
    }
    let on = |bit: u8| flags & (1 << bit) != 0;
    if flags & 0x80 != 0 || on(0) != alarm_chart.is_some() || (!on(1) && on(2)) {
        return bad;
    }
    // Fields of what is off must be exactly zero (bit pattern 0, so also not -0.0): a
    // snapshot decodes only if it is what `encode_snapshot` writes.
    let zero = |v: &[f32]| v.iter().all(|x| x.to_bits() == 0);
    let zones_unused: &[f32] = match zone_kind {
        0 => &zp,
        1 => &zp[4..],
        2 => &zp[3..],
        _ => &[],
    };
    let clean = (on(1) || zero(&[ml, mh]))
        && (on(3) || zero(&[ck, ch]))
        && (on(4) || zero(&[dl, dh]))
        && (on(5) || (gsize == 0 && zero(&[glimit])))
        && (on(6) || (rk == 0 && rn == 0))
        && zero(zones_unused)
        && (on(0) || (sample == 0 && zero(&[stat]) && zero(&shift)));
    if !clean {
        return bad;
    }
    let Ok(baseline) = Baseline::from_factor(mean, factor) else {
        return bad;
    };
    let Ok(gate) = Gate::new(baseline, Limit::PhaseII { m, alpha }) else {
        return bad;
    };
    let mewma = opt(on(1), Mewma::new(ml, mh, on(2)))?;
    let mcusum = opt(on(3), Mcusum::new(ck, ch))?;
    let dispersion = opt(on(4), Dispersion::new(N as u32, dl, dh))?;
    let subgroup = opt(on(5), Subgroup::new(gsize, glimit))?;
    let rule = opt(on(6), KofN::new(rk, rn))?;
    let zone = match zone_kind {
        0 => None,
        _ if N != 2 => return bad,
        1 => Some(Zone::Rect(
            RectZone::new([zp[0], zp[2]], [zp[1], zp[3]]).ok()?,
        )),
        2 => Some(Zone::Circle(CircleZone::new([zp[0], zp[1]], zp[2]).ok()?)),
        3 => Some(Zone::Ellipse(
            EllipseZone::from_rotation([zp[0], zp[1]], zp[2], zp[3], zp[4], zp[5]).ok()?,
        )),
        _ => return bad,
    };
    let alarm = alarm_chart.map(|chart| Alarm {
        chart,
        statistic: stat,
        sample,
        shift,
    });
    Some(Ok(Monitor {
        gate,
        zone,
        mewma,
        mcusum,
        dispersion,
        subgroup,
        rule,
        alarm,
        samples,
    }))
}
