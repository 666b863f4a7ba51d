//! Little-endian cursor writing and reading over byte slices, without panics, and the CRC.

use crc::{Crc, CRC_32_ISO_HDLC};

/// CRC-32/ISO-HDLC (the zlib / Ethernet CRC-32: polynomial 0x04C11DB7 reflected, initial and
/// final XOR 0xFFFFFFFF), from the `crc` crate.
pub(crate) const CRC32: Crc<u32> = Crc::<u32>::new(&CRC_32_ISO_HDLC);

/// Writes values in order; `ok` turns false (and stays false) if the buffer is too short.
pub(crate) struct Writer<'a> {
    buf: &'a mut [u8],
    pos: usize,
    pub(crate) ok: bool,
}

impl<'a> Writer<'a> {
    pub(crate) fn new(buf: &'a mut [u8]) -> Self {
        Writer {
            buf,
            pos: 0,
            ok: true,
        }
    }

    pub(crate) fn bytes(&mut self, b: &[u8]) {
        match self.buf.get_mut(self.pos..self.pos + b.len()) {
            Some(dst) => {
                dst.copy_from_slice(b);
                self.pos += b.len();
            }
            None => self.ok = false,
        }
    }

    pub(crate) fn u8(&mut self, v: u8) {
        self.bytes(&[v]);
    }

    pub(crate) fn u16(&mut self, v: u16) {
        self.bytes(&v.to_le_bytes());
    }

    pub(crate) fn u32(&mut self, v: u32) {
        self.bytes(&v.to_le_bytes());
    }

    pub(crate) fn f32(&mut self, v: f32) {
        self.bytes(&v.to_le_bytes());
    }

    pub(crate) fn pos(&self) -> usize {
        self.pos
    }

    /// Appends the CRC of everything written so far.
    pub(crate) fn crc(&mut self) {
        let c = self
            .buf
            .get(..self.pos)
            .map(|b| CRC32.checksum(b))
            .unwrap_or(0);
        self.u32(c);
    }
}

/// Reads values in order; returns `None` past the end.
pub(crate) struct Reader<'a> {
    buf: &'a [u8],
    pos: usize,
}

impl<'a> Reader<'a> {
    pub(crate) fn new(buf: &'a [u8]) -> Self {
        Reader { buf, pos: 0 }
    }

    pub(crate) fn take<const K: usize>(&mut self) -> Option<[u8; K]> {
        let s = self.buf.get(self.pos..self.pos + K)?;
        let mut out = [0u8; K];
        out.copy_from_slice(s);
        self.pos += K;
        Some(out)
    }

    pub(crate) fn u8(&mut self) -> Option<u8> {
        self.take::<1>().map(|b| b[0])
    }

    pub(crate) fn u16(&mut self) -> Option<u16> {
        self.take::<2>().map(u16::from_le_bytes)
    }

    pub(crate) fn u32(&mut self) -> Option<u32> {
        self.take::<4>().map(u32::from_le_bytes)
    }

    pub(crate) fn f32(&mut self) -> Option<f32> {
        self.take::<4>().map(f32::from_le_bytes)
    }
}

/// `true` when the last four bytes of `b` are the CRC of the bytes before them.
pub(crate) fn crc_ok(b: &[u8]) -> bool {
    let Some(split) = b.len().checked_sub(4) else {
        return false;
    };
    let (body, tail) = b.split_at(split);
    let mut t = [0u8; 4];
    t.copy_from_slice(tail);
    CRC32.checksum(body) == u32::from_le_bytes(t)
}
