//! A 400×240 one-bit frame buffer that remembers which display lines changed.
//!
//! Memory-in-pixel displays take whole lines over SPI; sending only the lines that changed
//! since the last flush saves time and power. The buffer keeps the CRC-32 of each line as
//! the display was last sent it, so a line counts as changed only if its pixels' CRC
//! differs: the app may clear and redraw the whole screen on every key press and the
//! driver still sends only what differs.
//!
//! The CRCs take 960 bytes where a copy of the screen took 12 000 (a sixth of the RAM
//! budget). The price: a line whose new pixels have the same CRC as the old would not be
//! sent. CRC-32 (ISO-HDLC) tells apart any two 400-bit lines that differ in at most 5
//! pixels, or within one run of 32 (its Hamming distance is 6 at this length; Koopman
//! 2002, from memory, and the unit test below checks every change of one or two pixels);
//! a larger change goes unseen with odds of about one in 4 × 10⁹, and then only until
//! that line next changes or [`FrameBuffer::invalidate`] is called.
//!
//! `BinaryColor::On` is ink (a dark pixel), `Off` is the background; the driver decides the
//! polarity on the wire.

use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;

/// Display width, pixels.
pub const WIDTH: usize = 400;
/// Display height, pixels (lines).
pub const HEIGHT: usize = 240;
/// Bytes in one line (one bit per pixel, most significant bit leftmost).
pub const LINE_BYTES: usize = WIDTH / 8;
const DIRTY_WORDS: usize = HEIGHT.div_ceil(32);

/// The frame buffer: 12 000 bytes of pixels, the CRC of each line the display holds, and
/// two flags per line.
pub struct FrameBuffer {
    bits: [[u8; LINE_BYTES]; HEIGHT],
    /// CRC-32 of each line as the display was last sent it.
    sent: [u32; HEIGHT],
    /// Lines written since the last flush (only they can differ from `sent`).
    touched: [u32; DIRTY_WORDS],
    /// Lines whose contents on the display are known (sent since power-on or the last
    /// invalidate); the others are sent whatever they hold. Kept as "known" rather than
    /// "stale" so that a new buffer is all zero bytes: a `static` of it then takes no
    /// flash for its initial value and needs no copy on the stack to be made.
    known: [u32; DIRTY_WORDS],
}

impl Default for FrameBuffer {
    fn default() -> Self {
        Self::new()
    }
}

impl FrameBuffer {
    /// A blank buffer with every line marked dirty, so the first flush sends the whole
    /// screen (the display's contents at power-on are unknown).
    pub const fn new() -> Self {
        FrameBuffer {
            bits: [[0; LINE_BYTES]; HEIGHT],
            sent: [0; HEIGHT],
            touched: [0; DIRTY_WORDS],
            known: [0; DIRTY_WORDS],
        }
    }

    /// A flag for every line that exists (and none past the bottom).
    const fn every_line() -> [u32; DIRTY_WORDS] {
        let mut words = [u32::MAX; DIRTY_WORDS];
        let spare = DIRTY_WORDS * 32 - HEIGHT;
        words[DIRTY_WORDS - 1] = u32::MAX >> spare;
        words
    }

    fn flag(words: &[u32; DIRTY_WORDS], y: usize) -> bool {
        words[y / 32] & (1 << (y % 32)) != 0
    }

    fn crc(line: &[u8; LINE_BYTES]) -> u32 {
        crate::link::frame::CRC.checksum(line)
    }

    /// Mark every line to be sent at the next flush, whatever it holds (after the display
    /// lost its contents, or now and then to repair a change the CRC could not see).
    pub fn invalidate(&mut self) {
        self.known = [0; DIRTY_WORDS];
    }

    /// The pixel at (x, y); `None` outside the display.
    pub fn pixel(&self, x: usize, y: usize) -> Option<BinaryColor> {
        if x >= WIDTH || y >= HEIGHT {
            return None;
        }
        let on = self.bits[y][x / 8] & (0x80 >> (x % 8)) != 0;
        Some(BinaryColor::from(on))
    }

    /// The packed bits of line `y` (MSB leftmost); `None` past the bottom.
    pub fn line(&self, y: usize) -> Option<&[u8; LINE_BYTES]> {
        self.bits.get(y)
    }

    /// Whether line `y` differs from what the display was last sent.
    pub fn is_dirty(&self, y: usize) -> bool {
        y < HEIGHT
            && (!Self::flag(&self.known, y)
                || (Self::flag(&self.touched, y) && Self::crc(&self.bits[y]) != self.sent[y]))
    }

    /// How many lines differ from what the display was last sent.
    pub fn dirty_count(&self) -> usize {
        (0..HEIGHT).filter(|&y| self.is_dirty(y)).count()
    }

    /// Hand every changed line, top to bottom, to `send` (line number and its bits), then
    /// mark all lines clean. Stops at the first error and keeps the unsent lines dirty.
    pub fn flush<E>(
        &mut self,
        mut send: impl FnMut(u8, &[u8; LINE_BYTES]) -> Result<(), E>,
    ) -> Result<usize, E> {
        let mut sent = 0;
        for y in 0..HEIGHT {
            let stale = !Self::flag(&self.known, y);
            if !stale && !Self::flag(&self.touched, y) {
                continue;
            }
            let crc = Self::crc(&self.bits[y]);
            if stale || crc != self.sent[y] {
                // HEIGHT ≤ 255, so the line number fits a byte (the display's address).
                send(y as u8, &self.bits[y])?;
                self.sent[y] = crc;
                self.known[y / 32] |= 1 << (y % 32);
                sent += 1;
            }
            self.touched[y / 32] &= !(1 << (y % 32));
        }
        Ok(sent)
    }

    /// Take the buffer as what the display shows, without sending (after a full-screen
    /// refresh elsewhere).
    pub fn mark_clean(&mut self) {
        for (sent, line) in self.sent.iter_mut().zip(self.bits.iter()) {
            *sent = Self::crc(line);
        }
        self.touched = [0; DIRTY_WORDS];
        self.known = Self::every_line();
    }

    fn set(&mut self, x: usize, y: usize, on: bool) {
        let mask = 0x80u8 >> (x % 8);
        let byte = &mut self.bits[y][x / 8];
        let new = if on { *byte | mask } else { *byte & !mask };
        if new != *byte {
            *byte = new;
            self.touched[y / 32] |= 1 << (y % 32);
        }
    }
}

impl OriginDimensions for FrameBuffer {
    fn size(&self) -> Size {
        Size::new(WIDTH as u32, HEIGHT as u32)
    }
}

impl DrawTarget for FrameBuffer {
    type Color = BinaryColor;
    type Error = core::convert::Infallible;

    fn draw_iter<I>(&mut self, pixels: I) -> Result<(), Self::Error>
    where
        I: IntoIterator<Item = Pixel<Self::Color>>,
    {
        for Pixel(p, c) in pixels {
            // Pixels off the display are dropped, as embedded-graphics expects of a target.
            if let (Ok(x), Ok(y)) = (usize::try_from(p.x), usize::try_from(p.y)) {
                if x < WIDTH && y < HEIGHT {
                    self.set(x, y, c.is_on());
                }
            }
        }
        Ok(())
    }

    fn fill_solid(&mut self, area: &Rectangle, color: Self::Color) -> Result<(), Self::Error> {
        // Whole bytes at a time: clearing the screen is the app's first step on every key.
        let a = area.intersection(&self.bounding_box());
        let Some(br) = a.bottom_right() else {
            return Ok(());
        };
        let (x0, x1) = (a.top_left.x as usize, br.x as usize);
        let on = color.is_on();
        if x0 == 0 && x1 == WIDTH - 1 {
            // Whole lines (the clear before every redraw): compare and fill by line.
            let fill = if on { 0xFF } else { 0x00 };
            for y in a.top_left.y as usize..=br.y as usize {
                let line = &mut self.bits[y];
                if line.iter().any(|&b| b != fill) {
                    *line = [fill; LINE_BYTES];
                    self.touched[y / 32] |= 1 << (y % 32);
                }
            }
            return Ok(());
        }
        for y in a.top_left.y as usize..=br.y as usize {
            let mut changed = false;
            for bx in x0 / 8..=x1 / 8 {
                let lo = if bx == x0 / 8 { x0 % 8 } else { 0 };
                let hi = if bx == x1 / 8 { x1 % 8 } else { 7 };
                // Bits lo..=hi of the byte, MSB = leftmost pixel.
                let mask = (0xFFu8 >> lo) & (0xFFu8 << (7 - hi));
                let byte = &mut self.bits[y][bx];
                let new = if on { *byte | mask } else { *byte & !mask };
                changed |= new != *byte;
                *byte = new;
            }
            if changed {
                self.touched[y / 32] |= 1 << (y % 32);
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use embedded_graphics::primitives::PrimitiveStyle;

    #[test]
    fn starts_all_dirty_and_flush_cleans() {
        let mut fb = FrameBuffer::new();
        assert_eq!(fb.dirty_count(), HEIGHT);
        let mut lines = 0;
        let n = fb
            .flush(|_, _| -> Result<(), ()> {
                lines += 1;
                Ok(())
            })
            .unwrap();
        assert_eq!((n, lines), (HEIGHT, HEIGHT));
        assert_eq!(fb.dirty_count(), 0);
    }

    #[test]
    fn only_changed_lines_are_dirty() {
        let mut fb = FrameBuffer::new();
        fb.mark_clean();
        Rectangle::new(Point::new(10, 100), Size::new(50, 3))
            .into_styled(PrimitiveStyle::with_fill(BinaryColor::On))
            .draw(&mut fb)
            .unwrap();
        assert_eq!(fb.dirty_count(), 3);
        assert!(fb.is_dirty(100) && fb.is_dirty(102) && !fb.is_dirty(103));
        assert_eq!(fb.pixel(10, 100), Some(BinaryColor::On));
        assert_eq!(fb.pixel(60, 100), Some(BinaryColor::Off));
        fb.mark_clean();
        // Drawing the same pixels again changes nothing.
        Rectangle::new(Point::new(10, 100), Size::new(50, 3))
            .into_styled(PrimitiveStyle::with_fill(BinaryColor::On))
            .draw(&mut fb)
            .unwrap();
        assert_eq!(fb.dirty_count(), 0);
        // Erasing and redrawing the same thing leaves the line as the display has it.
        let r = Rectangle::new(Point::new(10, 100), Size::new(50, 3));
        fb.fill_solid(&r, BinaryColor::Off).unwrap();
        assert_eq!(fb.dirty_count(), 3);
        fb.fill_solid(&r, BinaryColor::On).unwrap();
        assert_eq!(fb.dirty_count(), 0);
    }

    #[test]
    fn off_screen_pixels_are_dropped() {
        let mut fb = FrameBuffer::new();
        fb.mark_clean();
        fb.draw_iter([
            Pixel(Point::new(-1, 5), BinaryColor::On),
            Pixel(Point::new(400, 5), BinaryColor::On),
            Pixel(Point::new(5, 240), BinaryColor::On),
            Pixel(Point::new(399, 239), BinaryColor::On),
        ])
        .unwrap();
        assert_eq!(fb.dirty_count(), 1);
        assert_eq!(fb.line(239).unwrap()[LINE_BYTES - 1], 0x01);
        assert_eq!(fb.pixel(400, 0), None);
    }

    #[test]
    fn fast_fill_matches_pixel_by_pixel() {
        // Odd edges inside bytes, a rectangle hanging off the screen, whole lines (the
        // line-at-a-time path), on a patterned screen so that both colours change bits.
        let pattern = |fb: &mut FrameBuffer| {
            let pts = (0..240).flat_map(|y| (0..400).map(move |x| Point::new(x, y)));
            fb.draw_iter(
                pts.filter(|p| (p.x + 2 * p.y) % 3 == 0)
                    .map(|p| Pixel(p, BinaryColor::On)),
            )
            .unwrap();
            fb.mark_clean();
        };
        for color in [BinaryColor::On, BinaryColor::Off] {
            for (x, y, w, h) in [
                (3, 7, 13, 4),
                (0, 0, 400, 1),
                (-5, 3, 420, 6),
                (0, 0, 400, 240),
                (390, 230, 30, 30),
                (9, 9, 1, 1),
            ] {
                let r = Rectangle::new(Point::new(x, y), Size::new(w, h));
                let mut fast = FrameBuffer::new();
                pattern(&mut fast);
                fast.fill_solid(&r, color).unwrap();
                let mut slow = FrameBuffer::new();
                pattern(&mut slow);
                slow.draw_iter(r.points().map(|p| Pixel(p, color))).unwrap();
                assert!(fast.bits == slow.bits, "{r:?} {color:?}");
                assert_eq!(fast.touched, slow.touched, "{r:?} {color:?}");
                assert_eq!(fast.dirty_count(), slow.dirty_count(), "{r:?} {color:?}");
            }
        }
    }

    #[test]
    fn every_change_of_one_or_two_pixels_in_a_line_is_seen() {
        // The CRC stands in for a copy of the line: it must see at least these changes
        // (CRC-32's Hamming distance at 400 bits guarantees up to five).
        let mut line = [0u8; LINE_BYTES];
        for (i, b) in line.iter_mut().enumerate() {
            *b = (i as u8).wrapping_mul(37) ^ 0x5A;
        }
        let base = FrameBuffer::crc(&line);
        let flip = |l: &mut [u8; LINE_BYTES], x: usize| l[x / 8] ^= 0x80 >> (x % 8);
        for a in 0..WIDTH {
            let mut one = line;
            flip(&mut one, a);
            assert_ne!(FrameBuffer::crc(&one), base, "pixel {a}");
            for b in a + 1..WIDTH {
                let mut two = one;
                flip(&mut two, b);
                assert_ne!(FrameBuffer::crc(&two), base, "pixels {a} and {b}");
            }
        }
    }

    #[test]
    fn invalidate_sends_everything_once() {
        let mut fb = FrameBuffer::new();
        fb.mark_clean();
        assert_eq!(fb.dirty_count(), 0);
        fb.invalidate();
        assert_eq!(fb.dirty_count(), HEIGHT);
        assert_eq!(fb.flush(|_, _| -> Result<(), ()> { Ok(()) }), Ok(HEIGHT));
        assert_eq!(fb.dirty_count(), 0);
    }

    #[test]
    fn a_failed_flush_keeps_unsent_lines() {
        let mut fb = FrameBuffer::new();
        let r = fb.flush(|y, _| if y < 10 { Ok(()) } else { Err(y) });
        assert_eq!(r, Err(10));
        assert_eq!(fb.dirty_count(), HEIGHT - 10);
    }
}
