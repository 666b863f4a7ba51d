//! Snapshots, the two-slot store and report frames: round trips, exhaustive single- and
//! two-bit error detection, random bytes, power cuts at every operation, and fleet merging.
//!
//! `cargo test -p covgate-host --test snapshot_frames -- --nocapture` prints the counts.

use covgate::report::frame_len;
use covgate::snapshot::snapshot_len;
use covgate::{Baseline, Chart, Covariance};
use covgate::{
    CircleZone, EllipseZone, Moments2, Monitor, RectZone, ReportFrame2, SlotStore, SnapshotError,
    WatchConfig, Zone,
};
use covgate_host::flash::{SimFlash, SECTOR};
use covgate_host::seeded::{check, Rng};
use proptest::prelude::*;

fn monitor(seed: u64, zone_kind: u8) -> Monitor<f32, 2> {
    let mut rng = Rng::from_seed(seed);
    let s = [
        0.5 + rng.uniform() as f32 * 3.0,
        0.5 + rng.uniform() as f32 * 2.0,
    ];
    let r = (rng.uniform() as f32 - 0.5) * 1.6;
    let cov = Covariance::from_matrix([
        [s[0] * s[0], r * s[0] * s[1]],
        [r * s[0] * s[1], s[1] * s[1]],
    ]);
    let mean = [rng.normal() as f32 * 100.0, rng.normal() as f32 * 10.0];
    let b = Baseline::new(mean, &cov).unwrap();
    let mut c = WatchConfig::new(20 + (seed % 200) as u32, 0.0027f32);
    c.mewma = Some((0.1, 8.64, seed.is_multiple_of(2)));
    c.mcusum = Some((0.5, 5.5));
    c.dispersion = Some((0.1, 3.2));
    c.subgroup = Some((5, 0.01));
    c.gate_rule = Some((2, 3));
    c.zone = match zone_kind % 4 {
        0 => None,
        1 => Some(Zone::Rect(
            RectZone::new([-5.0, f32::NEG_INFINITY], [5.0, 3.0]).unwrap(),
        )),
        2 => Some(Zone::Circle(CircleZone::new([1.0, 2.0], 7.5).unwrap())),
        _ => Some(Zone::Ellipse(
            EllipseZone::new([1.0, 2.0], 7.5, 3.0, 0.7).unwrap(),
        )),
    };
    Monitor::new(b, c.baseline, &c).unwrap()
}

fn latched(mut m: Monitor<f32, 2>) -> Monitor<f32, 2> {
    let far = [m.gate().baseline().mean()[0] + 1000.0, 0.0];
    let s = m.step(&far);
    assert!(s.alarm.is_some());
    m
}

#[test]
fn snapshot_round_trips_bit_for_bit() {
    assert_eq!(snapshot_len(2), 116);
    check(
        "snapshot_round_trip",
        256,
        (any::<u64>(), 0u8..4, any::<bool>()),
        |(seed, zone, alarm)| {
            let mut m = monitor(seed, zone);
            if alarm {
                m = latched(m);
            }
            let mut buf = [0u8; 256];
            let n = m.encode_snapshot(&mut buf).unwrap();
            prop_assert_eq!(n, 116);
            let back = Monitor::<f32, 2>::decode_snapshot(&buf[..n]).unwrap();
            let mut again = [0u8; 256];
            back.encode_snapshot(&mut again).unwrap();
            prop_assert_eq!(&buf[..n], &again[..n]);
            prop_assert_eq!(back.gate(), m.gate());
            prop_assert_eq!(back.zone(), m.zone());
            prop_assert_eq!(back.alarm(), m.alarm());
            prop_assert_eq!(back.samples(), m.samples());
            Ok(())
        },
    );
}

/// Every single-bit and every two-bit error in `bytes` is refused by `decode`.
fn exhaustive_bit_errors(bytes: &[u8], decode: impl Fn(&[u8]) -> bool) -> (u64, u64) {
    let bits = bytes.len() * 8;
    let mut b = bytes.to_vec();
    let (mut single, mut double) = (0u64, 0u64);
    for i in 0..bits {
        b[i / 8] ^= 1 << (i % 8);
        assert!(!decode(&b), "single bit {i} not detected");
        single += 1;
        for j in (i + 1)..bits {
            b[j / 8] ^= 1 << (j % 8);
            assert!(!decode(&b), "bits {i} and {j} not detected");
            double += 1;
            b[j / 8] ^= 1 << (j % 8);
        }
        b[i / 8] ^= 1 << (i % 8);
    }
    (single, double)
}

#[test]
fn every_one_and_two_bit_error_is_detected() {
    let m = latched(monitor(7, 3));
    let mut buf = [0u8; 256];
    let n = m.encode_snapshot(&mut buf).unwrap();
    let (s1, s2) =
        exhaustive_bit_errors(&buf[..n], |b| Monitor::<f32, 2>::decode_snapshot(b).is_ok());
    let f = frame(3, 11);
    let mut fb = [0u8; 64];
    let k = f.encode(&mut fb).unwrap();
    assert_eq!(k, frame_len(2));
    assert!(k <= 64);
    let (f1, f2) = exhaustive_bit_errors(&fb[..k], |b| ReportFrame2::decode(b).is_ok());
    println!("\nbit errors detected: snapshot ({n} bytes) {s1} single + {s2} double; frame ({k} bytes) {f1} single + {f2} double");
}

#[test]
fn random_bytes_never_panic_and_are_refused_cleanly() {
    check(
        "random_bytes",
        2048,
        prop::collection::vec(any::<u8>(), 0..200),
        |b| {
            let r = Monitor::<f32, 2>::decode_snapshot(&b);
            prop_assert!(r.is_err() || b.len() == 116);
            let _ = ReportFrame2::decode(&b);
            let _ = Monitor::<f32, 3>::decode_snapshot(&b);
            Ok(())
        },
    );
    // Valid CRC but nonsense values: refused as BadValue, not built.
    let m = monitor(3, 0);
    let mut buf = [0u8; 116];
    m.encode_snapshot(&mut buf).unwrap();
    buf[16..20].copy_from_slice(&2.0f32.to_le_bytes()); // alpha = 2
    let crc = crc32(&buf[..112]);
    buf[112..].copy_from_slice(&crc.to_le_bytes());
    assert_eq!(
        Monitor::<f32, 2>::decode_snapshot(&buf),
        Err(SnapshotError::BadValue)
    );
    assert_eq!(
        Monitor::<f32, 2>::decode_snapshot(&buf[..100]),
        Err(SnapshotError::Length)
    );
    assert_eq!(
        Monitor::<f32, 3>::decode_snapshot(&buf),
        Err(SnapshotError::DimensionMismatch)
    );
}

/// CRC-32/ISO-HDLC, bitwise, written here from its definition (polynomial 0xEDB88320
/// reflected, init and final xor 0xFFFFFFFF; check value of "123456789" is 0xCBF43926,
/// common practice) so the test does not lean on the library's table.
fn crc32(b: &[u8]) -> u32 {
    let mut c = 0xFFFF_FFFFu32;
    for &x in b {
        c ^= u32::from(x);
        for _ in 0..8 {
            c = if c & 1 != 0 {
                (c >> 1) ^ 0xEDB8_8320
            } else {
                c >> 1
            };
        }
    }
    !c
}

#[test]
fn crc_check_value() {
    assert_eq!(crc32(b"123456789"), 0xCBF4_3926);
}

fn store() -> SlotStore<SimFlash> {
    SlotStore::new(SimFlash::new(4), 0, 2 * SECTOR as u32).unwrap()
}

fn payload(m: &Monitor<f32, 2>) -> Vec<u8> {
    let mut b = [0u8; 116];
    let n = m.encode_snapshot(&mut b).unwrap();
    b[..n].to_vec()
}

#[test]
fn a_power_cut_at_any_operation_keeps_the_old_or_the_new_snapshot() {
    let old = payload(&monitor(1, 2));
    let new = payload(&latched(monitor(2, 3)));
    let mut cuts = 0u64;
    // Generations: the old record may sit in either slot, so run three generations deep.
    for generation in 0..3 {
        let mut s = store();
        for g in 0..=generation {
            s.save(if g % 2 == 0 { &old } else { &new }).unwrap();
        }
        let before = {
            let mut out = [0u8; 256];
            let (_, n) = s.load(&mut out).unwrap().unwrap();
            out[..n].to_vec()
        };
        let next = if before == old {
            new.clone()
        } else {
            old.clone()
        };
        let base = s.release();
        // How many operations a full save takes.
        let mut probe = SlotStore::new(base.clone(), 0, 2 * SECTOR as u32).unwrap();
        let start = base.ops;
        probe.save(&next).unwrap();
        let total = probe.release().ops - start;
        for k in 0..=total {
            let mut f = base.clone();
            f.budget = Some(f.ops + k);
            let mut s = SlotStore::new(f, 0, 2 * SECTOR as u32).unwrap();
            let r = s.save(&next);
            assert_eq!(r.is_ok(), k == total, "cut after {k} of {total}");
            // Reboot: power back, recover.
            let mut f = s.release();
            f.budget = None;
            let mut s = SlotStore::new(f, 0, 2 * SECTOR as u32).unwrap();
            let mut out = [0u8; 256];
            let (_, n) = s.load(&mut out).unwrap().expect("never nothing");
            let got = &out[..n];
            assert!(
                got == before.as_slice() || got == next.as_slice(),
                "garbage after a cut at {k}"
            );
            if k == total {
                assert_eq!(got, next.as_slice());
            }
            Monitor::<f32, 2>::decode_snapshot(got).expect("a recovered record decodes");
            cuts += 1;
        }
    }
    println!(
        "\npower cuts simulated: {cuts} (every word write and erase of a save, three generations)"
    );
    assert!(cuts > 100);
}

#[test]
fn the_store_handles_wrapping_sequence_numbers_and_empty_flash() {
    let mut s = store();
    let mut out = [0u8; 256];
    assert_eq!(s.load(&mut out).unwrap(), None);
    let p = payload(&monitor(5, 1));
    for _ in 0..5 {
        s.save(&p).unwrap();
    }
    let (seq, _) = s.load(&mut out).unwrap().unwrap();
    assert_eq!(seq, 5);
    assert!(
        SlotStore::new(SimFlash::new(4), 3, 512).is_err(),
        "misaligned base"
    );
    assert!(
        SlotStore::new(SimFlash::new(2), 0, 512).is_err(),
        "too small"
    );
}

fn frame(node: u16, seed: u64) -> ReportFrame2 {
    let mut rng = Rng::from_seed(seed);
    let mut m = Moments2::<f32>::new();
    for _ in 0..(10 + seed % 50) {
        m.push([rng.normal() as f32 + node as f32, rng.normal() as f32 * 2.0])
            .unwrap();
    }
    ReportFrame2 {
        node,
        seq: seed as u32,
        alarm: if seed.is_multiple_of(3) {
            Some(Chart::Mewma)
        } else {
            None
        },
        moments: m,
        charts: [Some(1.5), None, Some(2.25)],
        go: 40,
        nogo: 2,
        alarms: (seed % 3) as u32,
    }
}

#[test]
fn frames_round_trip_and_merge_in_any_grouping() {
    check(
        "frame_round_trip",
        256,
        (any::<u16>(), 0u64..10_000),
        |(node, seed)| {
            let f = frame(node, seed);
            let mut b = [0u8; 64];
            let n = f.encode(&mut b).unwrap();
            prop_assert_eq!(n, 64);
            prop_assert_eq!(ReportFrame2::decode(&b[..n]).unwrap(), f);
            Ok(())
        },
    );
    // Associative and commutative up to rounding: any order and grouping of 12 frames.
    let frames: Vec<ReportFrame2> = (0..12).map(|k| frame(k % 4, 100 + u64::from(k))).collect();
    let fold = |order: &[usize]| {
        let mut acc = frames[order[0]];
        for &k in &order[1..] {
            acc.merge(&frames[k]).unwrap();
        }
        acc
    };
    let reference = fold(&(0..12).collect::<Vec<_>>());
    let orders = (
        Just((0..12).collect::<Vec<usize>>()).prop_shuffle(),
        1usize..12,
    );
    check("frame_merge_order", 256, orders, |(order, split)| {
        // Two groups folded separately, then merged.
        let mut a = fold(&order[..split]);
        let b = fold(&order[split..]);
        a.merge(&b).unwrap();
        prop_assert_eq!(a.moments.count(), reference.moments.count());
        prop_assert_eq!(a.go, reference.go);
        let (ma, mr) = (a.moments.mean().unwrap(), reference.moments.mean().unwrap());
        for i in 0..2 {
            prop_assert!((ma[i] - mr[i]).abs() <= 1e-5 * (1.0 + mr[i].abs()));
        }
        for (x, y) in a
            .moments
            .comoment()
            .unwrap()
            .iter()
            .zip(reference.moments.comoment().unwrap().iter())
        {
            prop_assert!((x - y).abs() <= 1e-4 * (1.0 + y.abs()), "{x} vs {y}");
        }
        Ok(())
    });
}
