//! A simulated NOR flash for the snapshot store tests: erase sets a sector to 0xFF, a write
//! can only clear bits (AND), and a power cut can be scheduled after any number of word
//! writes or erases; after it every operation fails and the contents stay as they were.

use embedded_storage::nor_flash::{
    ErrorType, NorFlash, NorFlashError, NorFlashErrorKind, ReadNorFlash,
};

/// Word and sector sizes of the simulated part.
pub const WORD: usize = 4;
/// Sector (erase) size.
pub const SECTOR: usize = 256;

/// Errors of the simulated flash.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SimError {
    /// Power was cut: the operation did not happen.
    PowerCut,
    /// Misaligned or out of bounds.
    Bounds,
}

impl NorFlashError for SimError {
    fn kind(&self) -> NorFlashErrorKind {
        match self {
            SimError::PowerCut => NorFlashErrorKind::Other,
            SimError::Bounds => NorFlashErrorKind::OutOfBounds,
        }
    }
}

/// The flash: its bytes and the number of operations left before the power cut.
#[derive(Clone, Debug)]
pub struct SimFlash {
    /// Contents.
    pub mem: Vec<u8>,
    /// Word writes and sector erases allowed before the cut (`None`: never cut).
    pub budget: Option<u64>,
    /// Operations performed.
    pub ops: u64,
}

impl SimFlash {
    /// `sectors` erased sectors.
    pub fn new(sectors: usize) -> Self {
        SimFlash {
            mem: vec![0xFF; sectors * SECTOR],
            budget: None,
            ops: 0,
        }
    }

    fn spend(&mut self) -> Result<(), SimError> {
        if let Some(b) = self.budget {
            if self.ops >= b {
                return Err(SimError::PowerCut);
            }
        }
        self.ops += 1;
        Ok(())
    }
}

impl ErrorType for SimFlash {
    type Error = SimError;
}

impl ReadNorFlash for SimFlash {
    const READ_SIZE: usize = 1;
    fn read(&mut self, offset: u32, bytes: &mut [u8]) -> Result<(), SimError> {
        let o = offset as usize;
        let src = self.mem.get(o..o + bytes.len()).ok_or(SimError::Bounds)?;
        bytes.copy_from_slice(src);
        Ok(())
    }
    fn capacity(&self) -> usize {
        self.mem.len()
    }
}

impl NorFlash for SimFlash {
    const WRITE_SIZE: usize = WORD;
    const ERASE_SIZE: usize = SECTOR;
    fn erase(&mut self, from: u32, to: u32) -> Result<(), SimError> {
        let (f, t) = (from as usize, to as usize);
        if !f.is_multiple_of(SECTOR) || !t.is_multiple_of(SECTOR) || t > self.mem.len() || f > t {
            return Err(SimError::Bounds);
        }
        for s in (f..t).step_by(SECTOR) {
            self.spend()?;
            self.mem[s..s + SECTOR].fill(0xFF);
        }
        Ok(())
    }
    fn write(&mut self, offset: u32, bytes: &[u8]) -> Result<(), SimError> {
        let o = offset as usize;
        if !o.is_multiple_of(WORD)
            || !bytes.len().is_multiple_of(WORD)
            || o + bytes.len() > self.mem.len()
        {
            return Err(SimError::Bounds);
        }
        for (k, w) in bytes.chunks(WORD).enumerate() {
            self.spend()?;
            for (d, s) in self.mem[o + k * WORD..o + (k + 1) * WORD].iter_mut().zip(w) {
                *d &= *s;
            }
        }
        Ok(())
    }
}
