//! Two flash slots and a sequence number: writing a new record never destroys the last good
//! one.

use embedded_storage::nor_flash::NorFlash;

use super::bytes::{crc_ok, Reader, Writer};

/// Largest record (header, payload and CRC) the store writes, in bytes.
pub const MAX_RECORD: usize = 256;
/// Bytes of a record around its payload: sequence (4), length (2), reserved (2), CRC (4).
const OVERHEAD: usize = 12;

/// Why the store cannot save or load.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum StoreError<E> {
    /// The flash driver failed (the previous good record is still in the other slot).
    Flash(E),
    /// The slots do not fit the flash, are not erase-aligned, or are smaller than a record.
    Layout,
    /// The payload does not fit a record (at most `MAX_RECORD` (256) - 12 bytes) or the caller's
    /// buffer.
    TooLarge,
}

/// A record store over two erase-aligned slots of a NOR flash.
///
/// Record in a slot: sequence number (u32 LE), payload length (u16 LE), two zero bytes, the
/// payload, then the CRC-32 of all of that; padded with 0xFF to the write granularity.
/// [`save`](Self::save) erases and writes the slot that does *not* hold the newest valid
/// record, payload first and the CRC last, so an interruption anywhere leaves either the new
/// record complete or the old one untouched. [`load`](Self::load) takes the valid record with
/// the newer sequence number (serial-number arithmetic, so the wrap at 2^32 is handled).
pub struct SlotStore<F> {
    flash: F,
    base: u32,
    slot: u32,
}

impl<F: NorFlash> SlotStore<F> {
    /// Slots `[base, base + slot)` and `[base + slot, base + 2 slot)`; `base` and `slot`
    /// multiples of the erase size, `slot` at least one padded record. Else
    /// [`StoreError::Layout`].
    pub fn new(flash: F, base: u32, slot: u32) -> Result<Self, StoreError<F::Error>> {
        let erase = F::ERASE_SIZE as u32;
        let end = base.checked_add(slot.checked_mul(2).ok_or(StoreError::Layout)?);
        let fits = end.is_some_and(|e| e as usize <= flash.capacity());
        let aligned = erase > 0 && base.is_multiple_of(erase) && slot.is_multiple_of(erase);
        if !(fits && aligned && slot as usize >= padded(MAX_RECORD, F::WRITE_SIZE)) {
            return Err(StoreError::Layout);
        }
        Ok(SlotStore { flash, base, slot })
    }

    /// Gives the flash back.
    pub fn release(self) -> F {
        self.flash
    }

    fn read_slot(
        &mut self,
        k: u32,
        buf: &mut [u8; MAX_RECORD],
    ) -> Result<Option<(u32, usize)>, StoreError<F::Error>> {
        self.flash
            .read(self.base + k * self.slot, buf)
            .map_err(StoreError::Flash)?;
        let mut r = Reader::new(buf);
        let (Some(seq), Some(len)) = (r.u32(), r.u16()) else {
            return Ok(None);
        };
        let len = usize::from(len);
        let total = len + OVERHEAD;
        match buf.get(..total) {
            Some(rec) if total <= MAX_RECORD && crc_ok(rec) => Ok(Some((seq, len))),
            _ => Ok(None),
        }
    }

    /// Both slots; a slot that cannot be read counts as holding no record, so one damaged
    /// slot never hides the other (on parts with error-correcting flash a torn write can make
    /// a slot unreadable). Only when both reads fail is that an error.
    #[allow(clippy::type_complexity)]
    fn read_both(
        &mut self,
        a: &mut [u8; MAX_RECORD],
        b: &mut [u8; MAX_RECORD],
    ) -> Result<(Option<(u32, usize)>, Option<(u32, usize)>), StoreError<F::Error>> {
        match (self.read_slot(0, a), self.read_slot(1, b)) {
            (Err(e), Err(_)) => Err(e),
            (ra, rb) => Ok((ra.ok().flatten(), rb.ok().flatten())),
        }
    }

    /// The newest valid record: copies its payload into `out` and returns `(sequence,
    /// length)`, or `None` when neither slot holds a valid record.
    pub fn load(&mut self, out: &mut [u8]) -> Result<Option<(u32, usize)>, StoreError<F::Error>> {
        let mut a = [0u8; MAX_RECORD];
        let mut b = [0u8; MAX_RECORD];
        let (ra, rb) = self.read_both(&mut a, &mut b)?;
        let (buf, seq, len) = match (ra, rb) {
            (None, None) => return Ok(None),
            (Some((s, l)), None) => (&a, s, l),
            (None, Some((s, l))) => (&b, s, l),
            (Some((sa, la)), Some((sb, lb))) => {
                if newer(sb, sa) {
                    (&b, sb, lb)
                } else {
                    (&a, sa, la)
                }
            }
        };
        let payload = buf.get(8..8 + len).ok_or(StoreError::TooLarge)?;
        let dst = out.get_mut(..len).ok_or(StoreError::TooLarge)?;
        dst.copy_from_slice(payload);
        Ok(Some((seq, len)))
    }

    /// Saves `payload` as the next record; returns its sequence number.
    pub fn save(&mut self, payload: &[u8]) -> Result<u32, StoreError<F::Error>> {
        let total = payload.len() + OVERHEAD;
        if total > MAX_RECORD {
            return Err(StoreError::TooLarge);
        }
        let mut a = [0u8; MAX_RECORD];
        let mut b = [0u8; MAX_RECORD];
        let (ra, rb) = self.read_both(&mut a, &mut b)?;
        let (target, seq) = match (ra, rb) {
            (None, None) => (0, 1),
            (Some((s, _)), None) => (1, s.wrapping_add(1)),
            (None, Some((s, _))) => (0, s.wrapping_add(1)),
            (Some((sa, _)), Some((sb, _))) => {
                if newer(sb, sa) {
                    (0, sb.wrapping_add(1))
                } else {
                    (1, sa.wrapping_add(1))
                }
            }
        };
        let mut rec = [0xFFu8; MAX_RECORD];
        let mut w = Writer::new(&mut rec);
        w.u32(seq);
        w.u16(payload.len() as u16);
        w.u16(0);
        w.bytes(payload);
        w.crc();
        if !w.ok {
            return Err(StoreError::TooLarge);
        }
        let at = self.base + target * self.slot;
        self.flash
            .erase(at, at + self.slot)
            .map_err(StoreError::Flash)?;
        let n = padded(total, F::WRITE_SIZE);
        let data = rec.get(..n).ok_or(StoreError::TooLarge)?;
        self.flash.write(at, data).map_err(StoreError::Flash)?;
        Ok(seq)
    }
}

impl<E: core::fmt::Debug> core::fmt::Display for StoreError<E> {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match self {
            StoreError::Flash(e) => write!(f, "flash: {e:?}"),
            StoreError::Layout => f.write_str("slots do not fit or are not erase-aligned"),
            StoreError::TooLarge => f.write_str("record too large"),
        }
    }
}

impl<E: core::fmt::Debug> core::error::Error for StoreError<E> {}

/// `a` is newer than `b` in serial-number arithmetic (RFC 1982 style, 32 bits).
fn newer(a: u32, b: u32) -> bool {
    a != b && a.wrapping_sub(b) < 0x8000_0000
}

fn padded(n: usize, w: usize) -> usize {
    if w == 0 {
        n
    } else {
        n.div_ceil(w) * w
    }
}
