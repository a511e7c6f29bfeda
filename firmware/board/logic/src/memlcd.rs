//! Framing for a 400×240 memory-in-pixel LCD (the Sharp LS027B7DH01 kind) on SPI.
//!
//! Such a panel keeps its picture in the pixels and takes whole lines: a write starts
//! with a mode byte, then for each line its address, its 400 pixel bits and 8 dummy bits,
//! and ends with 8 more dummy bits (16 after the last line), all while chip select is
//! **high**. The panel reads the mode byte and the address least significant bit first;
//! the board's SPI runs most significant bit first (the frame buffer's byte order, so the
//! pixel bytes go out unchanged), so this module sends those two bit-reversed. A pixel
//! bit of 1 is white on the panel, so ink ([`BinaryColor::On`]) goes out as 0.
//!
//! The liquid crystal must not see a DC field: the common electrode (VCOM) is inverted
//! about once a second, here by the VCOM bit of the mode byte (the panel's EXTMODE pin
//! tied low). Every command carries the current VCOM bit; [`MemoryLcd::toggle_vcom`] makes
//! the short "display" command the board sends on its 1 Hz tick.
//!
//! Only the lines the [`FrameBuffer`] reports as changed are sent. The figures in
//! [`timing`] are from memory of the panel's datasheet: check them against the datasheet
//! before building hardware.
//!
//! [`BinaryColor::On`]: embedded_graphics::pixelcolor::BinaryColor::On

use leeward_firmware::framebuffer::{FrameBuffer, HEIGHT, LINE_BYTES};

/// Mode bit M0 (as sent MSB-first): write lines.
const M0_WRITE: u8 = 0x80;
/// Mode bit M1 (as sent MSB-first): VCOM level.
const M1_VCOM: u8 = 0x40;
/// Mode bit M2 (as sent MSB-first): clear the whole panel to white.
const M2_CLEAR: u8 = 0x20;

/// Bytes of one line on the wire: address, pixels, 8 dummy bits.
pub const LINE_FRAME: usize = 1 + LINE_BYTES + 1;

/// Timing the board must keep (from memory of the LS027B7DH01 datasheet; check it).
pub mod timing {
    /// Highest SPI clock, Hz.
    pub const SPI_MAX_HZ: u32 = 2_000_000;
    /// Chip select high before the first clock edge, µs.
    pub const CS_SETUP_US: u32 = 3;
    /// Chip select held high after the last clock edge, µs.
    pub const CS_HOLD_US: u32 = 1;
    /// VCOM inversion period the board uses, ms (the panel wants roughly 0.5–30 Hz).
    pub const VCOM_PERIOD_MS: u32 = 1000;
}

/// The panel's protocol state: the current VCOM level.
#[derive(Debug, Clone, Default)]
pub struct MemoryLcd {
    vcom: bool,
}

impl MemoryLcd {
    /// VCOM low, as after power-on.
    pub const fn new() -> Self {
        MemoryLcd { vcom: false }
    }

    /// The current VCOM level.
    pub fn vcom(&self) -> bool {
        self.vcom
    }

    fn vcom_bit(&self) -> u8 {
        if self.vcom {
            M1_VCOM
        } else {
            0
        }
    }

    /// Invert VCOM and return the two-byte "display" command that tells the panel (one
    /// chip-select frame).
    pub fn toggle_vcom(&mut self) -> [u8; 2] {
        self.vcom = !self.vcom;
        [self.vcom_bit(), 0]
    }

    /// The two-byte command that clears the panel to white (one chip-select frame).
    pub fn clear_command(&self) -> [u8; 2] {
        [M2_CLEAR | self.vcom_bit(), 0]
    }

    /// The wire bytes of line `y` (0-based) holding `bits` (MSB leftmost, 1 = ink).
    pub fn line_frame(y: u8, bits: &[u8; LINE_BYTES]) -> [u8; LINE_FRAME] {
        let mut out = [0u8; LINE_FRAME];
        // The panel numbers its lines from 1 and reads the address LSB first.
        out[0] = y.wrapping_add(1).reverse_bits();
        for (o, b) in out[1..=LINE_BYTES].iter_mut().zip(bits) {
            *o = !b;
        }
        out
    }

    /// Send the changed lines of `fb` as one write command through `write` (called with
    /// the mode byte, each line's frame, and the final dummy byte, all within one
    /// chip-select frame that the caller opens before and closes after). Returns how many
    /// lines went out; with no changed line nothing is written. On an error the lines not
    /// yet sent stay changed in `fb`, and the caller should close the frame as usual.
    pub fn flush<E>(
        &mut self,
        fb: &mut FrameBuffer,
        mut write: impl FnMut(&[u8]) -> Result<(), E>,
    ) -> Result<usize, E> {
        if fb.dirty_count() == 0 {
            return Ok(0);
        }
        write(&[M0_WRITE | self.vcom_bit()])?;
        let n = fb.flush(|y, bits| write(&Self::line_frame(y, bits)))?;
        write(&[0])?;
        Ok(n)
    }
}

/// Bytes of a full-screen write, for sizing and timing estimates.
pub const FULL_FRAME_BYTES: usize = 1 + HEIGHT * LINE_FRAME + 1;

#[cfg(test)]
mod tests {
    extern crate std;
    use super::*;
    use embedded_graphics::pixelcolor::BinaryColor;
    use embedded_graphics::prelude::*;
    use embedded_graphics::primitives::{PrimitiveStyle, Rectangle};
    use std::vec::Vec;

    fn capture(lcd: &mut MemoryLcd, fb: &mut FrameBuffer) -> (usize, Vec<u8>) {
        let mut bytes = Vec::new();
        let n = lcd
            .flush(fb, |b| -> Result<(), ()> {
                bytes.extend_from_slice(b);
                Ok(())
            })
            .unwrap();
        (n, bytes)
    }

    #[test]
    fn first_flush_sends_every_line_then_nothing() {
        let mut lcd = MemoryLcd::new();
        let mut fb = FrameBuffer::new();
        let (n, bytes) = capture(&mut lcd, &mut fb);
        assert_eq!(n, HEIGHT);
        assert_eq!(bytes.len(), FULL_FRAME_BYTES);
        assert_eq!(bytes[0], 0x80, "write mode, VCOM low");
        // Line 1 and line 240, LSB first: 0b0000_0001 -> 0x80, 240 = 0b1111_0000 -> 0x0F.
        assert_eq!(bytes[1], 0x80);
        assert_eq!(bytes[1 + (HEIGHT - 1) * LINE_FRAME], 0x0F);
        // A blank buffer is all white on the wire; dummy bytes are zero.
        assert!(bytes[2..2 + LINE_BYTES].iter().all(|&b| b == 0xFF));
        assert_eq!(bytes[1 + LINE_FRAME - 1], 0);
        assert_eq!(bytes[bytes.len() - 2..], [0, 0]);
        let (n, bytes) = capture(&mut lcd, &mut fb);
        assert_eq!((n, bytes.len()), (0, 0));
    }

    #[test]
    fn only_changed_lines_go_out_with_ink_as_zero() {
        let mut lcd = MemoryLcd::new();
        let mut fb = FrameBuffer::new();
        fb.mark_clean();
        // Eight pixels of ink at the left of lines 10 and 11 (0-based).
        Rectangle::new(Point::new(0, 10), Size::new(8, 2))
            .into_styled(PrimitiveStyle::with_fill(BinaryColor::On))
            .draw(&mut fb)
            .unwrap();
        let _ = lcd.toggle_vcom();
        let (n, bytes) = capture(&mut lcd, &mut fb);
        assert_eq!(n, 2);
        assert_eq!(bytes.len(), 1 + 2 * LINE_FRAME + 1);
        assert_eq!(bytes[0], 0x80 | 0x40, "write mode, VCOM high");
        assert_eq!(bytes[1], 11u8.reverse_bits());
        assert_eq!(bytes[2], 0x00, "ink is 0 on the wire");
        assert_eq!(bytes[3], 0xFF);
        assert_eq!(bytes[1 + LINE_FRAME], 12u8.reverse_bits());
    }

    #[test]
    fn vcom_alternates_and_commands_carry_it() {
        let mut lcd = MemoryLcd::new();
        assert_eq!(lcd.clear_command(), [0x20, 0]);
        assert_eq!(lcd.toggle_vcom(), [0x40, 0]);
        assert_eq!(lcd.clear_command(), [0x60, 0]);
        assert_eq!(lcd.toggle_vcom(), [0x00, 0]);
        assert!(!lcd.vcom());
    }

    #[test]
    fn a_failed_write_keeps_lines_for_the_next_flush() {
        let mut lcd = MemoryLcd::new();
        let mut fb = FrameBuffer::new();
        let mut calls = 0;
        let r = lcd.flush(&mut fb, |_| {
            calls += 1;
            // Mode byte and five lines go out, then the bus fails.
            if calls > 6 {
                Err("bus")
            } else {
                Ok(())
            }
        });
        assert_eq!(r, Err("bus"));
        assert_eq!(fb.dirty_count(), HEIGHT - 5);
        let (n, _) = capture(&mut lcd, &mut fb);
        assert_eq!(n, HEIGHT - 5);
    }
}
