//! A NOR flash in RAM that keeps the embedded-storage contract strictly and can lose
//! power in the middle of any write or erase: the flash behind the reliability tests, the
//! fuzz target and the simulator's flash image.
//!
//! What NOR flash does, and so what this model does (common practice for NOR parts; the
//! embedded-storage `NorFlash` documentation states the alignment rules):
//! - erase sets every bit of a page to 1; a write can only clear bits (1 → 0), so a write
//!   over written data yields the AND of old and new;
//! - offsets and lengths are multiples of `WORD` for writes and `PAGE` for erases, and
//!   out-of-range or misaligned calls are errors;
//! - a power cut during a write leaves the bytes before the cut written, the word being
//!   programmed torn (each bit that was to be cleared may or may not be), and the rest
//!   untouched; during an erase, the bytes before the cut erased, one word of random bits
//!   and the rest untouched;
//! - optionally the torn bits stay weak: each read returns them at random.
//!
//! After a cut every call fails until [`SimFlash::power_on`]: the store must then be
//! rebuilt from these bytes alone, as after a real reboot.

use embedded_storage::nor_flash::{
    ErrorType, MultiwriteNorFlash, NorFlash, NorFlashError, NorFlashErrorKind, ReadNorFlash,
};

/// Most weak bytes remembered (later torn bytes are left stable).
pub const MAX_WEAK: usize = 32;

/// What went wrong in a flash call.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SimError {
    /// Offset or length not a multiple of the word or page size.
    NotAligned,
    /// Outside the flash.
    OutOfBounds,
    /// The power was cut (during this call or before it).
    PowerCut,
}

impl NorFlashError for SimError {
    fn kind(&self) -> NorFlashErrorKind {
        match self {
            SimError::NotAligned => NorFlashErrorKind::NotAligned,
            SimError::OutOfBounds => NorFlashErrorKind::OutOfBounds,
            SimError::PowerCut => NorFlashErrorKind::Other,
        }
    }
}

impl core::fmt::Display for SimError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match self {
            SimError::NotAligned => write!(f, "flash call not aligned"),
            SimError::OutOfBounds => write!(f, "flash call out of range"),
            SimError::PowerCut => write!(f, "power cut"),
        }
    }
}

/// When the power goes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Cut {
    /// Index of the write or erase call during which it goes (0 = the next one).
    pub op: u32,
    /// Byte of that call's range at which it goes (clamped to the range).
    pub byte: u32,
}

/// A NOR flash of `bytes.len()` bytes with write words of `WORD` bytes and erase pages
/// of `PAGE` bytes.
#[derive(Debug, Clone)]
pub struct SimFlash<B, const WORD: usize, const PAGE: usize> {
    bytes: B,
    cut: Option<Cut>,
    ops: u32,
    off: bool,
    weak_bits: bool,
    weak: heapless::Vec<(u32, u8), MAX_WEAK>,
    rng: u64,
    violations: u32,
    rewrites: u32,
    erases: u32,
}

impl<B: AsRef<[u8]> + AsMut<[u8]>, const WORD: usize, const PAGE: usize> SimFlash<B, WORD, PAGE> {
    /// A flash holding `bytes` (all 0xFF for an erased part); `seed` drives the torn bits.
    pub fn new(bytes: B, seed: u64) -> Self {
        SimFlash {
            bytes,
            cut: None,
            ops: 0,
            off: false,
            weak_bits: false,
            weak: heapless::Vec::new(),
            rng: seed ^ 0x9E37_79B9_7F4A_7C15,
            violations: 0,
            rewrites: 0,
            erases: 0,
        }
    }
    /// Cut the power at `cut`, counted from now.
    pub fn set_cut(&mut self, cut: Option<Cut>) {
        self.cut = cut;
        self.ops = 0;
    }
    /// Whether torn bits stay weak (read at random) after a cut.
    pub fn set_weak_bits(&mut self, on: bool) {
        self.weak_bits = on;
    }
    /// Write and erase calls since the last [`Self::set_cut`] or power-on.
    pub fn ops(&self) -> u32 {
        self.ops
    }
    /// Whether the power was cut.
    pub fn is_off(&self) -> bool {
        self.off
    }
    /// Power back on: calls work again on the bytes as they were left; no cut pending.
    pub fn power_on(&mut self) {
        self.off = false;
        self.cut = None;
        self.ops = 0;
    }
    /// Calls that broke the contract (misaligned or out of range): always 0 for a
    /// correct user of the flash.
    pub fn violations(&self) -> u32 {
        self.violations
    }
    /// Erase calls completed since this flash was made.
    pub fn erases(&self) -> u32 {
        self.erases
    }
    /// Writes over bytes not erased (allowed on NOR flash that is multi-write, such as
    /// the STM32F4's, where they AND into the old bits).
    pub fn rewrites(&self) -> u32 {
        self.rewrites
    }
    /// The stored bytes.
    pub fn bytes(&self) -> &[u8] {
        self.bytes.as_ref()
    }
    /// The stored bytes, to damage them on purpose.
    pub fn bytes_mut(&mut self) -> &mut [u8] {
        self.bytes.as_mut()
    }
    /// The backing store.
    pub fn into_inner(self) -> B {
        self.bytes
    }

    fn next_random(&mut self) -> u64 {
        // splitmix64 (Steele, Lea and Flood 2014): small and good enough for test faults.
        self.rng = self.rng.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.rng;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Start a write or erase call: the byte at which the power goes, if during it.
    fn begin(&mut self, len: usize) -> Result<Option<usize>, SimError> {
        if self.off {
            return Err(SimError::PowerCut);
        }
        let op = self.ops;
        self.ops = self.ops.saturating_add(1);
        Ok(match self.cut {
            Some(c) if c.op == op => Some((c.byte as usize).min(len.saturating_sub(1))),
            _ => None,
        })
    }

    fn check(&mut self, offset: u32, len: usize, align: usize) -> Result<usize, SimError> {
        let start = offset as usize;
        if !start.is_multiple_of(align) || !len.is_multiple_of(align) {
            self.violations += 1;
            return Err(SimError::NotAligned);
        }
        if start
            .checked_add(len)
            .is_none_or(|e| e > self.bytes.as_ref().len())
        {
            self.violations += 1;
            return Err(SimError::OutOfBounds);
        }
        Ok(start)
    }

    fn remember_weak(&mut self, at: usize, mask: u8) {
        if self.weak_bits && mask != 0 {
            if let Some(w) = self.weak.iter_mut().find(|w| w.0 as usize == at) {
                w.1 |= mask;
            } else {
                let _ = self.weak.push((at as u32, mask));
            }
        }
    }

    fn forget_weak(&mut self, range: core::ops::Range<usize>) {
        self.weak.retain(|w| !range.contains(&(w.0 as usize)));
    }
}

impl<B, const WORD: usize, const PAGE: usize> ErrorType for SimFlash<B, WORD, PAGE> {
    type Error = SimError;
}

impl<B: AsRef<[u8]> + AsMut<[u8]>, const WORD: usize, const PAGE: usize> ReadNorFlash
    for SimFlash<B, WORD, PAGE>
{
    const READ_SIZE: usize = 1;

    fn read(&mut self, offset: u32, out: &mut [u8]) -> Result<(), SimError> {
        if self.off {
            return Err(SimError::PowerCut);
        }
        let start = self.check(offset, out.len(), 1)?;
        out.copy_from_slice(&self.bytes.as_ref()[start..start + out.len()]);
        for i in 0..self.weak.len() {
            let (at, mask) = self.weak[i];
            if let Some(o) = (at as usize)
                .checked_sub(start)
                .and_then(|k| out.get_mut(k))
            {
                let r = (self.next_random() & 0xFF) as u8;
                *o = (*o & !mask) | (r & mask);
            }
        }
        Ok(())
    }

    fn capacity(&self) -> usize {
        self.bytes.as_ref().len()
    }
}

impl<B: AsRef<[u8]> + AsMut<[u8]>, const WORD: usize, const PAGE: usize> NorFlash
    for SimFlash<B, WORD, PAGE>
{
    const WRITE_SIZE: usize = WORD;
    const ERASE_SIZE: usize = PAGE;

    fn erase(&mut self, from: u32, to: u32) -> Result<(), SimError> {
        if to < from {
            self.violations += 1;
            return Err(SimError::OutOfBounds);
        }
        let len = (to - from) as usize;
        let start = self.check(from, len, PAGE)?;
        let cut = self.begin(len)?;
        let done = cut.unwrap_or(len);
        self.bytes.as_mut()[start..start + done].fill(0xFF);
        self.forget_weak(start..start + done);
        if let Some(at) = cut {
            // The word being erased is left with random bits set, the rest as it was.
            let end = (start + at + WORD).min(start + len);
            for i in start + at..end {
                let r = (self.next_random() & 0xFF) as u8;
                let old = self.bytes.as_ref()[i];
                self.bytes.as_mut()[i] = old | r;
                self.remember_weak(i, !old & r);
            }
            self.off = true;
            return Err(SimError::PowerCut);
        }
        self.erases += 1;
        Ok(())
    }

    fn write(&mut self, offset: u32, data: &[u8]) -> Result<(), SimError> {
        let start = self.check(offset, data.len(), WORD)?;
        let cut = self.begin(data.len())?;
        let done = cut.unwrap_or(data.len());
        let mut rewrite = false;
        for (i, &d) in data.iter().enumerate().take(done) {
            let old = self.bytes.as_ref()[start + i];
            rewrite |= old != 0xFF;
            self.bytes.as_mut()[start + i] = old & d;
        }
        if rewrite {
            self.rewrites += 1;
        }
        if let Some(at) = cut {
            // The rest of the word being programmed is torn: each bit that was to be
            // cleared may or may not be.
            let word_end = ((at / WORD) + 1) * WORD;
            for (i, &d) in data
                .iter()
                .enumerate()
                .take(word_end.min(data.len()))
                .skip(at)
            {
                let old = self.bytes.as_ref()[start + i];
                let clearing = old & !d;
                let r = (self.next_random() & 0xFF) as u8;
                self.bytes.as_mut()[start + i] = old & !(clearing & r);
                self.remember_weak(start + i, clearing);
            }
            self.off = true;
            return Err(SimError::PowerCut);
        }
        Ok(())
    }
}

// NOR flash may be written again where bits only go from 1 to 0 (sequential-storage marks
// items erased that way); the model checks that rule on every write.
impl<B: AsRef<[u8]> + AsMut<[u8]>, const WORD: usize, const PAGE: usize> MultiwriteNorFlash
    for SimFlash<B, WORD, PAGE>
{
}
