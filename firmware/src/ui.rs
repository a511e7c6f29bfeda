//! Drawing: the screen's layout, the fonts, and the [`Painter`] every screen draws through.
//!
//! The layout is ours: a dark title band at the top, eight body lines of a 10×20 font, a
//! thin rule and a line of key hints at the bottom. Primary figures use the same font
//! drawn at twice the size (20×40 cells), so they read at arm's length.
//!
//! Every piece of text is drawn into a box. The painter measures it first; text that does
//! not fit is clipped to its box on the screen and reported to an [`Inspect`]or, which is
//! how the tests find a label running past its box without looking at pixels.

use crate::text::{chars, wrap};
#[cfg(test)]
use embedded_graphics::mono_font::{iso_8859_1, MonoFont};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::{Circle, Line as Segment, PrimitiveStyle, Rectangle};

/// Screen width, pixels.
pub const SCREEN_W: u32 = 400;
/// Screen height, pixels.
pub const SCREEN_H: u32 = 240;
/// Left and right margin of the body, pixels.
pub const MARGIN: i32 = 8;
/// Height of the title band, pixels.
pub const TITLE_H: u32 = 26;
/// Top of the first body line, pixels.
pub const BODY_TOP: i32 = 32;
/// Pitch of body lines, pixels.
pub const LINE_H: i32 = 23;
/// Body lines on a screen.
pub const BODY_LINES: usize = 8;
/// Top of the key-hint line, pixels.
pub const FOOTER_TOP: i32 = 223;

/// Ink and background.
pub const INK: BinaryColor = BinaryColor::On;
/// Background.
pub const PAPER: BinaryColor = BinaryColor::Off;

/// The three text sizes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Font {
    /// 8×13: key hints only.
    Small,
    /// 10×20: body text.
    Body,
    /// 10×20 at twice the size: primary figures.
    Big,
}

/// Index of `c` in the glyph images of embedded-graphics' ISO 8859-1 fonts, as that
/// crate's own mapping gives it (its two ranges, U+0020–U+007F and U+00A0–U+00FF, and '?'
/// for any other character), but by arithmetic: the crate's mapping walks its characters
/// one by one, which cost the M4F thousands of instructions per character drawn
/// (docs/performance.md). A unit test checks the two agree on every character.
fn latin1_index(c: char) -> usize {
    match c as u32 {
        u @ 0x20..=0x7F => (u - 0x20) as usize,
        u @ 0xA0..=0xFF => (u - 0xA0) as usize + 96,
        _ => '?' as usize - ' ' as usize,
    }
}

/// Draw glyph `index` of `font` with its cell's top left at `at`: its ink only, pixel by
/// pixel at scale 1, in runs of whole blocks at the big figures' scale.
fn draw_glyph<D: DrawTarget<Color = BinaryColor>>(
    d: &mut D,
    font: Font,
    index: usize,
    at: Point,
    color: BinaryColor,
) -> Result<(), D::Error> {
    let rows: &[u16] = &match font {
        Font::Small => {
            let mut r = [0u16; 20];
            if let Some(g) = crate::glyphs::SMALL.get(index) {
                for (o, &m) in r.iter_mut().zip(g.iter()) {
                    *o = u16::from(m);
                }
            }
            r
        }
        Font::Body | Font::Big => crate::glyphs::BODY.get(index).copied().unwrap_or([0; 20]),
    };
    let k = font.scale() as i32;
    if k == 1 {
        let pixels = rows.iter().enumerate().flat_map(|(y, &mask)| {
            let mut m = mask;
            core::iter::from_fn(move || {
                (m != 0).then(|| {
                    let x = m.trailing_zeros() as i32;
                    m &= m - 1;
                    Pixel(at + Point::new(x, y as i32), color)
                })
            })
        });
        return d.draw_iter(pixels);
    }
    for (y, &mask) in rows.iter().enumerate() {
        let mut m = mask;
        while m != 0 {
            // One run of ink: from the lowest set bit up to the next clear one.
            let x0 = m.trailing_zeros();
            let len = (!(m >> x0)).trailing_zeros();
            m &= !(((1u32 << len) - 1) << x0) as u16;
            let block = Rectangle::new(
                at + Point::new(x0 as i32 * k, y as i32 * k),
                Size::new(len * k as u32, k as u32),
            );
            d.fill_solid(&block, color)?;
        }
    }
    Ok(())
}

impl Font {
    /// The embedded-graphics font its glyph table was made from: the reference the
    /// tests draw with (the device draws from the tables only).
    #[cfg(test)]
    fn mono(self) -> &'static MonoFont<'static> {
        match self {
            Font::Small => &iso_8859_1::FONT_8X13,
            Font::Body | Font::Big => &iso_8859_1::FONT_10X20,
        }
    }
    /// Width (spacing included) and height of a glyph cell at scale 1, pixels: those of
    /// the font its table holds (a unit test checks them against embedded-graphics').
    const fn cell(self) -> (u32, u32) {
        match self {
            Font::Small => (8, 13),
            Font::Body | Font::Big => (10, 20),
        }
    }
    fn scale(self) -> u32 {
        match self {
            Font::Big => 2,
            _ => 1,
        }
    }
    /// Width of one character cell, pixels.
    pub fn cell_w(self) -> u32 {
        self.cell().0 * self.scale()
    }
    /// Height of one character cell, pixels.
    pub fn cell_h(self) -> u32 {
        self.cell().1 * self.scale()
    }
    /// Size of `s` set in this font, pixels.
    pub fn measure(self, s: &str) -> Size {
        let n = chars(s) as u32;
        Size::new(n * self.cell_w(), self.cell_h())
    }
}

/// Horizontal placement of text in its box.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// From the left edge.
    Left,
    /// Against the right edge.
    Right,
    /// Centred.
    Center,
}

/// Sees every piece of text as it is drawn; the device uses `()`, which sees nothing.
pub trait Inspect {
    /// `text` was drawn in `area`; `fits` is false when it ran past the box (and was cut).
    fn text(&mut self, area: Rectangle, text: &str, fits: bool) {
        let _ = (area, text, fits);
    }
}

impl Inspect for () {}

/// The one way screens draw: a target plus an inspector.
pub struct Painter<'a, D, I> {
    d: &'a mut D,
    inspect: &'a mut I,
}

/// A box of one body line: line `row` (0 = first) from x to x + width.
pub fn row_box(row: usize, x: i32, width: u32) -> Rectangle {
    Rectangle::new(
        Point::new(x, BODY_TOP + row as i32 * LINE_H),
        Size::new(width, LINE_H as u32),
    )
}

/// Width of the body between the margins, pixels.
pub const BODY_W: u32 = SCREEN_W - 2 * MARGIN as u32;

impl<'a, D, I> Painter<'a, D, I>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    /// A painter over `d`, reporting to `inspect`.
    pub fn new(d: &'a mut D, inspect: &'a mut I) -> Self {
        Painter { d, inspect }
    }

    /// Clear the whole screen.
    pub fn clear(&mut self) -> Result<(), D::Error> {
        self.fill(
            Rectangle::new(Point::zero(), Size::new(SCREEN_W, SCREEN_H)),
            PAPER,
        )
    }

    /// Fill a rectangle.
    pub fn fill(&mut self, r: Rectangle, c: BinaryColor) -> Result<(), D::Error> {
        r.into_styled(PrimitiveStyle::with_fill(c)).draw(self.d)
    }

    /// Outline a rectangle with a stroke of `width` pixels drawn inside it.
    pub fn frame(&mut self, r: Rectangle, width: u32) -> Result<(), D::Error> {
        let style = embedded_graphics::primitives::PrimitiveStyleBuilder::new()
            .stroke_color(INK)
            .stroke_width(width)
            .stroke_alignment(embedded_graphics::primitives::StrokeAlignment::Inside)
            .build();
        r.into_styled(style).draw(self.d)
    }

    /// A straight line.
    pub fn line(&mut self, a: Point, b: Point, width: u32) -> Result<(), D::Error> {
        Segment::new(a, b)
            .into_styled(PrimitiveStyle::with_stroke(INK, width))
            .draw(self.d)
    }

    /// A straight line, with nothing drawn outside `area` (plots draw through this).
    pub fn line_in(
        &mut self,
        area: Rectangle,
        a: Point,
        b: Point,
        width: u32,
    ) -> Result<(), D::Error> {
        let mut clipped = self.d.clipped(&area);
        Segment::new(a, b)
            .into_styled(PrimitiveStyle::with_stroke(INK, width))
            .draw(&mut clipped)
    }

    /// A circle of `diameter` pixels about `centre`, filled or outlined (2 px).
    pub fn circle(&mut self, centre: Point, diameter: u32, filled: bool) -> Result<(), D::Error> {
        let style = if filled {
            PrimitiveStyle::with_fill(INK)
        } else {
            PrimitiveStyle::with_stroke(INK, 2)
        };
        Circle::with_center(centre, diameter)
            .into_styled(style)
            .draw(self.d)
    }

    /// Draw `s` in `area`, vertically centred; dark on light, or light on dark when
    /// `inverted` (the caller fills the box first). Text that does not fit is cut at the
    /// box and reported to the inspector.
    pub fn text(
        &mut self,
        area: Rectangle,
        s: &str,
        font: Font,
        align: Align,
        inverted: bool,
    ) -> Result<(), D::Error> {
        let size = font.measure(s);
        let fits = size.width <= area.size.width && size.height <= area.size.height;
        self.inspect.text(area, s, fits);
        let dx = match align {
            Align::Left => 0,
            Align::Right => area.size.width as i32 - size.width as i32,
            Align::Center => (area.size.width as i32 - size.width as i32) / 2,
        }
        .max(0);
        let dy = ((area.size.height as i32 - size.height as i32) / 2).max(0);
        let at = area.top_left + Point::new(dx, dy);
        // Only the glyphs' ink is drawn: the box under the text is already the
        // background (the screen is cleared before each render, an inverted box filled
        // by the caller). The glyphs come from row tables of the same fonts
        // (`crate::glyphs`): embedded-graphics' own text drawing visits every pixel of a
        // character's cell through its image iterators, several times the cost on the
        // M4F (docs/performance.md). A unit test checks the two draw the same pixels.
        let fg = if inverted { PAPER } else { INK };
        let mut clipped = self.d.clipped(&area);
        let step = font.cell_w() as i32;
        let right = area.top_left.x + area.size.width as i32;
        let mut x = at.x;
        for c in s.chars() {
            if x >= right {
                break;
            }
            draw_glyph(&mut clipped, font, latin1_index(c), Point::new(x, at.y), fg)?;
            x += step;
        }
        Ok(())
    }

    /// Word-wrap `s` into `rows` body-font lines starting at body line `first`, across
    /// the box `x..x+width`. Returns the lines used; text left over is reported as not
    /// fitting.
    pub fn paragraph(
        &mut self,
        s: &str,
        first: usize,
        rows: usize,
        x: i32,
        width: u32,
    ) -> Result<usize, D::Error> {
        let per_line = (width / Font::Body.cell_w()) as usize;
        let lines = wrap(s, per_line);
        for (i, l) in lines.iter().enumerate() {
            let area = row_box(first + i, x, width);
            if i >= rows {
                // Past the space given: report, draw nothing.
                self.inspect.text(area, l, false);
                continue;
            }
            self.text(area, l, Font::Body, Align::Left, false)?;
        }
        Ok(lines.len().min(rows))
    }

    /// The title band with `title` and, at its right end, a short `tag` (page count…).
    pub fn title(&mut self, title: &str, tag: &str) -> Result<(), D::Error> {
        let band = Rectangle::new(Point::zero(), Size::new(SCREEN_W, TITLE_H));
        self.fill(band, INK)?;
        let tag_w = Font::Body.measure(tag).width;
        let title_box = Rectangle::new(
            Point::new(MARGIN, 3),
            Size::new(BODY_W - tag_w - if tag.is_empty() { 0 } else { 10 }, 20),
        );
        self.text(title_box, title, Font::Body, Align::Left, true)?;
        if !tag.is_empty() {
            let tag_box = Rectangle::new(
                Point::new(SCREEN_W as i32 - MARGIN - tag_w as i32, 3),
                Size::new(tag_w, 20),
            );
            self.text(tag_box, tag, Font::Body, Align::Right, true)?;
        }
        Ok(())
    }

    /// The rule and the key hints at the bottom.
    pub fn footer(&mut self, hints: &str) -> Result<(), D::Error> {
        self.fill(
            Rectangle::new(Point::new(0, FOOTER_TOP - 4), Size::new(SCREEN_W, 2)),
            INK,
        )?;
        let area = Rectangle::new(Point::new(MARGIN, FOOTER_TOP), Size::new(BODY_W, 15));
        self.text(area, hints, Font::Small, Align::Left, false)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use embedded_graphics::mock_display::MockDisplay;

    /// embedded-graphics' text drawing at k×k: how the big figures were drawn before the
    /// glyph tables, kept as the reference the tables are checked against.
    struct Scaled<'a, D> {
        d: &'a mut D,
        origin: Point,
        k: i32,
    }

    impl<D: DrawTarget<Color = BinaryColor>> OriginDimensions for Scaled<'_, D> {
        fn size(&self) -> Size {
            self.d.bounding_box().size
        }
    }

    impl<D: DrawTarget<Color = BinaryColor>> DrawTarget for Scaled<'_, D> {
        type Color = BinaryColor;
        type Error = D::Error;

        fn draw_iter<It>(&mut self, pixels: It) -> Result<(), Self::Error>
        where
            It: IntoIterator<Item = Pixel<Self::Color>>,
        {
            for Pixel(p, c) in pixels {
                let q = self.origin + (p - self.origin) * self.k;
                let block = Rectangle::new(q, Size::new(self.k as u32, self.k as u32));
                self.d.fill_solid(&block, c)?;
            }
            Ok(())
        }
    }

    #[test]
    fn glyph_tables_draw_what_embedded_graphics_draws() {
        use crate::framebuffer::FrameBuffer;
        use embedded_graphics::mono_font::MonoTextStyleBuilder;
        use embedded_graphics::text::{Baseline, Text};
        // The reference: embedded-graphics' own text, clipped to the box, at the scale.
        fn reference(fb: &mut FrameBuffer, area: Rectangle, s: &str, font: Font, inverted: bool) {
            let size = font.measure(s);
            let dy = ((area.size.height as i32 - size.height as i32) / 2).max(0);
            let at = area.top_left + Point::new(0, dy);
            let fg = if inverted { PAPER } else { INK };
            let style = MonoTextStyleBuilder::new()
                .font(font.mono())
                .text_color(fg)
                .build();
            let mut clipped = fb.clipped(&area);
            if font.scale() == 1 {
                Text::with_baseline(s, at, style, Baseline::Top)
                    .draw(&mut clipped)
                    .unwrap();
            } else {
                let mut big = Scaled {
                    d: &mut clipped,
                    origin: at,
                    k: font.scale() as i32,
                };
                Text::with_baseline(s, at, style, Baseline::Top)
                    .draw(&mut big)
                    .unwrap();
            }
        }
        let mut all = heapless::String::<800>::new();
        for i in 0..crate::glyphs::GLYPHS {
            let u = if i < 96 { 0x20 + i } else { 0xA0 + i - 96 };
            let _ = all.push(char::from_u32(u as u32).unwrap());
        }
        let chunks: heapless::Vec<&str, 64> = all
            .char_indices()
            .step_by(12)
            .map(|(i, _)| {
                let end = all[i..]
                    .char_indices()
                    .nth(12)
                    .map_or(all.len(), |(j, _)| i + j);
                &all[i..end]
            })
            .collect();
        let extra = [
            "ζ_g ± σ 1.5e-5 /s",
            "Tessel Col 1850 m",
            "-140.54°",
            "",
            "€ and ✓",
        ];
        for font in [Font::Small, Font::Body, Font::Big] {
            for s in chunks.iter().copied().chain(extra) {
                for (area, inverted) in [
                    (Rectangle::new(Point::new(3, 5), Size::new(396, 44)), false),
                    (Rectangle::new(Point::new(17, 100), Size::new(61, 9)), true),
                    (
                        Rectangle::new(Point::new(-6, 200), Size::new(150, 60)),
                        false,
                    ),
                ] {
                    let mut want = FrameBuffer::new();
                    let mut got = FrameBuffer::new();
                    if inverted {
                        for fb in [&mut want, &mut got] {
                            fb.fill_solid(&area, INK).unwrap();
                        }
                    }
                    reference(&mut want, area, s, font, inverted);
                    let mut no = ();
                    Painter::new(&mut got, &mut no)
                        .text(area, s, font, Align::Left, inverted)
                        .unwrap();
                    for y in 0..crate::framebuffer::HEIGHT {
                        assert_eq!(want.line(y), got.line(y), "{font:?} {s:?} line {y}");
                    }
                }
            }
        }
    }

    struct Log(heapless::Vec<bool, 16>);
    impl Inspect for Log {
        fn text(&mut self, _: Rectangle, _: &str, fits: bool) {
            let _ = self.0.push(fits);
        }
    }

    #[test]
    fn text_that_fits_is_drawn_and_reported_as_fitting() {
        let mut d: MockDisplay<BinaryColor> = MockDisplay::new();
        let mut log = Log(heapless::Vec::new());
        let mut p = Painter::new(&mut d, &mut log);
        let area = Rectangle::new(Point::new(0, 0), Size::new(60, 20));
        p.text(area, "12.5", Font::Body, Align::Left, false)
            .unwrap();
        assert_eq!(log.0.as_slice(), [true]);
        // Something was inked inside the box, nothing outside it.
        let inked = d.affected_area();
        assert!(inked.size.width > 0 && area.contains(inked.bottom_right().unwrap()));
    }

    #[test]
    fn text_past_its_box_is_cut_and_reported() {
        let mut d: MockDisplay<BinaryColor> = MockDisplay::new();
        let mut log = Log(heapless::Vec::new());
        let mut p = Painter::new(&mut d, &mut log);
        let area = Rectangle::new(Point::new(2, 2), Size::new(30, 20));
        p.text(area, "123456", Font::Body, Align::Left, false)
            .unwrap();
        assert_eq!(log.0.as_slice(), [false]);
        let inked = d.affected_area();
        assert!(area.contains(inked.top_left) && area.contains(inked.bottom_right().unwrap()));
    }

    #[test]
    fn the_cells_are_the_fonts_own() {
        for f in [Font::Small, Font::Body, Font::Big] {
            let m = f.mono();
            let w = m.character_size.width + m.character_spacing;
            assert_eq!(f.cell(), (w, m.character_size.height), "{f:?}");
        }
    }

    #[test]
    fn the_fast_glyph_index_is_the_fonts_own() {
        use embedded_graphics::mono_font::mapping::{GlyphMapping, ISO_8859_1};
        for u in 0..0x3000u32 {
            if let Some(c) = char::from_u32(u) {
                assert_eq!(latin1_index(c), ISO_8859_1.index(c), "U+{u:04X}");
            }
        }
        for c in ['\u{1F600}', '\u{FFFD}', char::MAX] {
            assert_eq!(latin1_index(c), ISO_8859_1.index(c));
        }
    }

    #[test]
    fn big_figures_are_twice_the_body_font() {
        assert_eq!(Font::Big.measure("1.5"), Size::new(60, 40));
        let mut d: MockDisplay<BinaryColor> = MockDisplay::new();
        let mut no = ();
        let mut p = Painter::new(&mut d, &mut no);
        let area = Rectangle::new(Point::new(0, 0), Size::new(64, 40));
        p.text(area, "8", Font::Big, Align::Left, false).unwrap();
        let inked = d.affected_area();
        // Only the glyph's ink is drawn, inside its 20×40 cell, and in 2×2 blocks: the
        // body font's "8" (8×13 of ink in its 10×20 cell, as the font draws it) doubled.
        assert_eq!(inked.size, Size::new(16, 26));
        assert!(Rectangle::new(Point::zero(), Size::new(20, 40)).contains(inked.top_left));
        // Every 2×2 block is of one colour.
        for y in (0..40).step_by(2) {
            for x in (0..20).step_by(2) {
                let c = d.get_pixel(Point::new(x, y));
                assert_eq!(c, d.get_pixel(Point::new(x + 1, y + 1)));
                assert_eq!(c, d.get_pixel(Point::new(x + 1, y)));
            }
        }
    }

    #[test]
    fn paragraph_reports_lines_past_its_rows() {
        let mut d = crate::framebuffer::FrameBuffer::new();
        let mut log = Log(heapless::Vec::new());
        let mut p = Painter::new(&mut d, &mut log);
        let used = p
            .paragraph("one two three four five six", 0, 2, MARGIN, 100)
            .unwrap();
        assert_eq!(used, 2);
        assert!(log.0.iter().take(2).all(|&f| f));
        assert!(log.0.iter().skip(2).any(|&f| !f));
    }
}
