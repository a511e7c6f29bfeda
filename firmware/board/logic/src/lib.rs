//! # leeward-board-logic
//!
//! The parts of the board binary that need no hardware, kept apart so that they build and
//! test on the host (`cargo test -p leeward-board-logic --target <host triple>` inside
//! `firmware/board/`): the board crate only wires them to pins and the SPI peripheral.
//!
//! | module | what it holds |
//! |---|---|
//! | [`flash`] | the internal flash: sector map, the layout of program, map and log, the checks before each flash call |
//! | [`keypad`] | the 4×5 key matrix: key map, debouncer, press events as [`leeward_firmware::Key`] |
//! | [`memlcd`] | framing for a 400×240 memory-in-pixel display: changed lines only, VCOM |
//! | [`pump`] | the data link's bytes between a non-blocking serial port and the link server |
//! | [`recovery`] | the power-on notice when the flash store found trouble, and the user's answer |
#![no_std]
#![forbid(unsafe_code)]
#![warn(missing_docs)]
#![cfg_attr(
    not(test),
    deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)
)]

pub mod flash;
pub mod keypad;
pub mod memlcd;
pub mod pump;
pub mod recovery;
