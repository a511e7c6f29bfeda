//! The internal flash as two NOR flashes for the store: [`Sectors<16 KiB>`] on the map's
//! sectors 1–3 and [`Sectors<128 KiB>`] on the log's sector 7 (the layout and every range
//! check are in `leeward_board_logic::flash`, tested on the host).
//!
//! Both share the one flash controller through a `RefCell`: the store calls one of them
//! at a time, from the main loop only. Writes go through stm32f4xx-hal's `UnlockedFlash`
//! (byte programming, x8 parallelism: valid at any supply voltage); the driver presents
//! 4-byte words, as sequential-storage needs. The controller's sticky error flags are
//! cleared before each call so that one failure does not fail every later call, and the
//! data cache is reset after an erase (RM0383: cached data of an erased sector would
//! otherwise be read back).

use core::cell::RefCell;

use embedded_storage::nor_flash::{ErrorType, MultiwriteNorFlash, NorFlash, ReadNorFlash};
use stm32f4xx_hal::flash::FlashExt;
use stm32f4xx_hal::pac::FLASH;

use leeward_board_logic::flash::{FlashFault, Window, WORD};

/// FLASH_SR's error and end-of-operation flags (RM0383: EOP, OPERR, WRPERR, PGAERR,
/// PGPERR, PGSERR, RDERR), cleared by writing ones.
const SR_FLAGS: u32 = 0x1F3;

/// Sectors of `ERASE` bytes of the internal flash, limited to one window. Offsets are
/// from the start of the flash, so both areas share one address space.
pub struct Sectors<const ERASE: usize> {
    flash: &'static RefCell<FLASH>,
    window: Window,
}

impl<const ERASE: usize> Sectors<ERASE> {
    /// A driver for `window` (which must be made of sectors of `ERASE` bytes).
    pub fn new(flash: &'static RefCell<FLASH>, window: Window) -> Self {
        Sectors { flash, window }
    }

    fn with<R>(
        &self,
        f: impl FnOnce(&mut FLASH) -> Result<R, FlashFault>,
    ) -> Result<R, FlashFault> {
        let mut flash = self.flash.try_borrow_mut().map_err(|_| FlashFault::Busy)?;
        // SAFETY: writing ones to FLASH_SR clears its flags and has no other effect; the
        // flash is ours for this call (the RefCell borrow).
        flash.sr().write(|w| unsafe { w.bits(SR_FLAGS) });
        f(&mut flash)
    }
}

impl<const ERASE: usize> ErrorType for Sectors<ERASE> {
    type Error = FlashFault;
}

impl<const ERASE: usize> ReadNorFlash for Sectors<ERASE> {
    const READ_SIZE: usize = 1;

    fn read(&mut self, offset: u32, bytes: &mut [u8]) -> Result<(), FlashFault> {
        self.window.check_read(offset, bytes.len())?;
        let flash = self.flash.try_borrow().map_err(|_| FlashFault::Busy)?;
        let start = offset as usize;
        let src = FlashExt::read(&*flash)
            .get(start..start + bytes.len())
            .ok_or(FlashFault::OutOfBounds)?;
        bytes.copy_from_slice(src);
        Ok(())
    }

    fn capacity(&self) -> usize {
        // The address space up to the window's end (the store checks its area fits).
        self.window.area().end as usize
    }
}

impl<const ERASE: usize> NorFlash for Sectors<ERASE> {
    const WRITE_SIZE: usize = WORD;
    const ERASE_SIZE: usize = ERASE;

    fn erase(&mut self, from: u32, to: u32) -> Result<(), FlashFault> {
        let sectors = self.window.sectors(from, to)?;
        self.with(|flash| {
            {
                let mut u = flash.unlocked();
                for s in sectors {
                    u.erase(s.number).map_err(|_| FlashFault::Controller)?;
                }
            }
            // Flush the data cache (it must be off while reset).
            flash.acr().modify(|_, w| w.dcen().clear_bit());
            flash.acr().modify(|_, w| w.dcrst().set_bit());
            flash.acr().modify(|_, w| w.dcrst().clear_bit());
            flash.acr().modify(|_, w| w.dcen().set_bit());
            Ok(())
        })
    }

    fn write(&mut self, offset: u32, bytes: &[u8]) -> Result<(), FlashFault> {
        self.window.check_write(offset, bytes.len())?;
        self.with(|flash| {
            flash
                .unlocked()
                .program(offset as usize, bytes.iter())
                .map_err(|_| FlashFault::Controller)
        })
    }
}

// The STM32F4's flash has no ECC: a programmed word may be programmed again, clearing
// more bits (the HAL marks its own driver the same way); the log's pop relies on it.
impl<const ERASE: usize> MultiwriteNorFlash for Sectors<ERASE> {}
