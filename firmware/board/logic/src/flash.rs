//! The STM32F411CE's internal flash as the store sees it: the sector map, the board's
//! layout (where the program, the map and the log go) and the checks every flash call
//! passes before it reaches the hardware.
//!
//! Sectors (RM0383, "Embedded Flash memory", table of the main memory organisation):
//! 0–3 of 16 KiB, 4 of 64 KiB, 5–7 of 128 KiB, from 0x0800_0000. Offsets here are from
//! that base.
//!
//! The layout (docs/board.md, "Flash storage"): the vector table in sector 0, the program
//! from sector 4 (`_stext` in memory.x) up to the end of sector 6, the map (settings and
//! datasets) in sectors 1–3 and the results log in sector 7. sequential-storage wants
//! pages of one size within an area, so each area has its own erase size: 16 KiB for the
//! map, 128 KiB for the log. The areas, their erase sizes and the write word are
//! `leeward_firmware::flash::layout` (re-exported here), shared with the simulator's
//! flash image; this module adds the sector map and checks the two agree.

use core::ops::Range;

use embedded_storage::nor_flash::{NorFlashError, NorFlashErrorKind};

pub use leeward_firmware::flash::layout::{FLASH_BYTES, LOG_AREA, LOG_ERASE, MAP_AREA, MAP_ERASE};
/// Where the flash is mapped.
pub const BASE: u32 = 0x0800_0000;
/// Write word the driver presents, bytes (programmed as four byte writes: the x8
/// parallelism works at any supply voltage; sequential-storage needs at least 4).
pub const WORD: usize = leeward_firmware::flash::layout::WRITE_SIZE;

/// One flash sector.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Sector {
    /// Sector number (FLASH_CR.SNB).
    pub number: u8,
    /// Offset from [`BASE`].
    pub offset: u32,
    /// Bytes.
    pub size: u32,
}

const K: u32 = 1024;

/// The eight sectors of the STM32F411CE (RM0383).
pub const SECTORS: [Sector; 8] = [
    Sector {
        number: 0,
        offset: 0,
        size: 16 * K,
    },
    Sector {
        number: 1,
        offset: 16 * K,
        size: 16 * K,
    },
    Sector {
        number: 2,
        offset: 32 * K,
        size: 16 * K,
    },
    Sector {
        number: 3,
        offset: 48 * K,
        size: 16 * K,
    },
    Sector {
        number: 4,
        offset: 64 * K,
        size: 64 * K,
    },
    Sector {
        number: 5,
        offset: 128 * K,
        size: 128 * K,
    },
    Sector {
        number: 6,
        offset: 256 * K,
        size: 128 * K,
    },
    Sector {
        number: 7,
        offset: 384 * K,
        size: 128 * K,
    },
];

/// Where the program's code starts (`_stext` in memory.x): sector 4.
pub const PROGRAM_START: u32 = 64 * K;
/// Where the program must end (the end of memory.x's FLASH): the start of sector 7.
pub const PROGRAM_END: u32 = 384 * K;
/// The vector table's room at the start of sector 0.
pub const VECTORS_END: u32 = 16 * K;

// The areas keep apart from the vector table and the program, and hold what
// sequential-storage needs (the map two pages at least, the log one): checked when the
// crate builds.
const _: () = {
    assert!(VECTORS_END <= MAP_AREA.start);
    assert!(MAP_AREA.end <= PROGRAM_START);
    assert!(PROGRAM_END <= LOG_AREA.start);
    assert!((MAP_AREA.end - MAP_AREA.start) as usize / MAP_ERASE >= 2);
    assert!((LOG_AREA.end - LOG_AREA.start) as usize / LOG_ERASE >= 1);
};

/// The sector holding `offset`.
pub fn sector_at(offset: u32) -> Option<Sector> {
    SECTORS
        .iter()
        .copied()
        .find(|s| offset >= s.offset && offset - s.offset < s.size)
}

/// Why a flash call was refused or failed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FlashFault {
    /// Offset or length not a multiple of the word (writes) or of the sector (erases).
    NotAligned,
    /// Outside the area this driver may touch.
    OutOfBounds,
    /// The flash controller reported an error (programming sequence, parallelism,
    /// alignment, write protection or operation error: see RM0383 FLASH_SR).
    Controller,
    /// The flash was in use by the other area's driver (never happens in one thread).
    Busy,
}

impl NorFlashError for FlashFault {
    fn kind(&self) -> NorFlashErrorKind {
        match self {
            FlashFault::NotAligned => NorFlashErrorKind::NotAligned,
            FlashFault::OutOfBounds => NorFlashErrorKind::OutOfBounds,
            FlashFault::Controller | FlashFault::Busy => NorFlashErrorKind::Other,
        }
    }
}

/// The part of the flash one driver may touch: whole sectors of one size.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Window {
    area: Range<u32>,
}

impl Window {
    /// A window on `area`, which must start and end on sector boundaries and hold only
    /// sectors of `erase` bytes; `None` otherwise.
    pub fn new(area: Range<u32>, erase: usize) -> Option<Window> {
        if area.start >= area.end || area.end > FLASH_BYTES {
            return None;
        }
        let mut at = area.start;
        while at < area.end {
            let s = sector_at(at)?;
            if s.offset != at || s.size as usize != erase {
                return None;
            }
            at += s.size;
        }
        (at == area.end).then_some(Window { area })
    }

    /// The area.
    pub fn area(&self) -> Range<u32> {
        self.area.clone()
    }

    /// A read of `len` bytes at `offset`: inside the area.
    pub fn check_read(&self, offset: u32, len: usize) -> Result<(), FlashFault> {
        let end = offset as u64 + len as u64;
        if offset < self.area.start || end > self.area.end as u64 {
            return Err(FlashFault::OutOfBounds);
        }
        Ok(())
    }

    /// A write of `len` bytes at `offset`: inside the area, whole words.
    pub fn check_write(&self, offset: u32, len: usize) -> Result<(), FlashFault> {
        if offset as usize % WORD != 0 || len % WORD != 0 {
            return Err(FlashFault::NotAligned);
        }
        self.check_read(offset, len)
    }

    /// The sectors an erase of `from..to` clears: whole sectors inside the area.
    pub fn sectors(&self, from: u32, to: u32) -> Result<impl Iterator<Item = Sector>, FlashFault> {
        if to < from {
            return Err(FlashFault::OutOfBounds);
        }
        self.check_read(from, (to - from) as usize)?;
        let on_boundary =
            |x: u32| x == self.area.end || sector_at(x).is_some_and(|s| s.offset == x);
        if !on_boundary(from) || !on_boundary(to) {
            return Err(FlashFault::NotAligned);
        }
        Ok(SECTORS
            .into_iter()
            .filter(move |s| s.offset >= from && s.offset < to))
    }
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::*;
    use std::string::String;
    use std::vec::Vec;

    #[test]
    fn sectors_tile_the_flash() {
        // RM0383: 4 x 16 KiB, 64 KiB, 3 x 128 KiB = 512 KiB, numbered 0-7 in order.
        let mut at = 0;
        for (i, s) in SECTORS.iter().enumerate() {
            assert_eq!((s.number as usize, s.offset), (i, at));
            at += s.size;
        }
        assert_eq!(at, FLASH_BYTES);
        assert_eq!(sector_at(0x3FFF).map(|s| s.number), Some(0));
        assert_eq!(sector_at(0x4000).map(|s| s.number), Some(1));
        assert_eq!(sector_at(0x1_0000).map(|s| s.number), Some(4));
        assert_eq!(sector_at(0x7_FFFF).map(|s| s.number), Some(7));
        assert_eq!(sector_at(FLASH_BYTES), None);
    }

    #[test]
    fn the_layout_keeps_program_map_and_log_apart() {
        let map = Window::new(MAP_AREA, MAP_ERASE).expect("map is sectors 1-3");
        let log = Window::new(LOG_AREA, LOG_ERASE).expect("log is sector 7");
        assert_eq!(map.area(), 0x4000..0x1_0000);
        assert_eq!(log.area(), 0x6_0000..0x8_0000);
    }

    #[test]
    fn memory_x_agrees_with_the_layout() {
        // The linker script is the other half of the layout: the program starts at
        // sector 4 and FLASH ends where the log begins, so no image can reach it.
        let mx = include_str!("../../memory.x");
        let flat: String = mx.split_whitespace().collect();
        assert!(flat.contains("FLASH:ORIGIN=0x08000000,LENGTH=384K"), "{mx}");
        assert!(flat.contains("_stext=ORIGIN(FLASH)+0x10000;"), "{mx}");
        assert_eq!(PROGRAM_END, 384 * 1024);
        assert_eq!(PROGRAM_START, 0x1_0000);
    }

    #[test]
    fn windows_must_be_whole_sectors_of_one_size() {
        assert!(
            Window::new(0x4000..0x2_0000, MAP_ERASE).is_none(),
            "takes in sector 4"
        );
        assert!(
            Window::new(0x4000..0x6000, MAP_ERASE).is_none(),
            "half a sector"
        );
        assert!(
            Window::new(0x6_0000..0x8_0000, MAP_ERASE).is_none(),
            "wrong size"
        );
        assert!(
            Window::new(0x6_0000..0x8_0001, LOG_ERASE).is_none(),
            "past the end"
        );
        assert!(Window::new(0x4000..0x4000, MAP_ERASE).is_none(), "empty");
        assert!(
            Window::new(0x2_0000..0x6_0000, LOG_ERASE).is_some(),
            "sectors 5-6"
        );
    }

    #[test]
    fn calls_outside_the_window_or_off_words_are_refused() {
        let map = Window::new(MAP_AREA, MAP_ERASE).unwrap();
        assert_eq!(map.check_write(0x4000, 8), Ok(()));
        assert_eq!(map.check_write(0xFFFC, 4), Ok(()));
        assert_eq!(map.check_write(0x4002, 4), Err(FlashFault::NotAligned));
        assert_eq!(map.check_write(0x4000, 6), Err(FlashFault::NotAligned));
        assert_eq!(map.check_write(0x3FFC, 4), Err(FlashFault::OutOfBounds));
        assert_eq!(map.check_write(0xFFFC, 8), Err(FlashFault::OutOfBounds));
        assert_eq!(map.check_read(0x1_0000, 1), Err(FlashFault::OutOfBounds));
        assert_eq!(map.check_read(u32::MAX, 8), Err(FlashFault::OutOfBounds));
        assert_eq!(map.check_read(0x8000, 3), Ok(()));
    }

    #[test]
    fn erases_clear_whole_sectors_inside_the_window_only() {
        let map = Window::new(MAP_AREA, MAP_ERASE).unwrap();
        let n: Vec<u8> = map
            .sectors(0x8000, 0x1_0000)
            .unwrap()
            .map(|s| s.number)
            .collect();
        assert_eq!(n, [2, 3]);
        let n: Vec<u8> = map
            .sectors(0x4000, 0x8000)
            .unwrap()
            .map(|s| s.number)
            .collect();
        assert_eq!(n, [1]);
        assert_eq!(map.sectors(0x4000, 0x4000).unwrap().count(), 0);
        assert!(matches!(
            map.sectors(0x0, 0x4000),
            Err(FlashFault::OutOfBounds)
        ));
        assert!(matches!(
            map.sectors(0x4000, 0x1_4000),
            Err(FlashFault::OutOfBounds)
        ));
        assert!(matches!(
            map.sectors(0x4000, 0x5000),
            Err(FlashFault::NotAligned)
        ));
        assert!(matches!(
            map.sectors(0x8000, 0x4000),
            Err(FlashFault::OutOfBounds)
        ));
        let log = Window::new(LOG_AREA, LOG_ERASE).unwrap();
        let n: Vec<u8> = log
            .sectors(0x6_0000, 0x8_0000)
            .unwrap()
            .map(|s| s.number)
            .collect();
        assert_eq!(n, [7]);
    }
}
