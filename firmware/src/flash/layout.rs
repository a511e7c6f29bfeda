//! The board's flash layout: where the store's two areas sit in the STM32F411CE's
//! internal flash, their erase sizes and the write word. Defined once here so that the
//! board (`leeward-board-logic::flash`, which adds the chip's sector map and checks
//! these against it and against `memory.x`) and the simulator's flash image
//! (host-sim's `flash_file`) cannot drift apart: a simulated device holds exactly what
//! the board holds.
//!
//! Offsets are from the start of the flash (0x0800_0000 on the chip). Sectors (RM0383,
//! "Embedded Flash memory"): 0–3 of 16 KiB, 4 of 64 KiB, 5–7 of 128 KiB. The map
//! (settings and datasets) takes sectors 1–3, the results log sector 7; the vector
//! table and the program use the rest (docs/board.md, "Flash storage").

use core::ops::Range;

const K: u32 = 1024;

/// Bytes of the internal flash.
pub const FLASH_BYTES: u32 = 512 * K;
/// Write word, bytes (the board's driver programs four bytes per word; the store needs
/// at least [`super::MIN_WRITE_SIZE`]).
pub const WRITE_SIZE: usize = 4;
/// Erase size of the map area (the chip's 16 KiB sectors).
pub const MAP_ERASE: usize = 16 * 1024;
/// Erase size of the log area (a 128 KiB sector).
pub const LOG_ERASE: usize = 128 * 1024;
/// The map area: sectors 1–3, three pages of [`MAP_ERASE`].
pub const MAP_AREA: Range<u32> = 16 * K..64 * K;
/// The log area: sector 7, one page of [`LOG_ERASE`].
pub const LOG_AREA: Range<u32> = 384 * K..512 * K;

// Each area is whole pages of its own erase size, holds what sequential-storage needs
// (the map two pages at least, the log one), and the two stay apart inside the flash.
const _: () = {
    assert!(WRITE_SIZE >= super::MIN_WRITE_SIZE);
    assert!((MAP_AREA.start as usize).is_multiple_of(MAP_ERASE));
    assert!((MAP_AREA.end as usize).is_multiple_of(MAP_ERASE));
    assert!((LOG_AREA.start as usize).is_multiple_of(LOG_ERASE));
    assert!((LOG_AREA.end as usize).is_multiple_of(LOG_ERASE));
    assert!((MAP_AREA.end - MAP_AREA.start) as usize / MAP_ERASE >= 2);
    assert!((LOG_AREA.end - LOG_AREA.start) as usize / LOG_ERASE >= 1);
    assert!(MAP_AREA.end <= LOG_AREA.start && LOG_AREA.end <= FLASH_BYTES);
};
