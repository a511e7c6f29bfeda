//! Shared by the screen tests: a whole-screen target that counts pixels drawn off the
//! display, an inspector that keeps every piece of text with its box, and helpers that
//! read figures back off a screen.
#![allow(dead_code)]

use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;
use leeward_firmware::framebuffer::FrameBuffer;
use leeward_firmware::ui::Inspect;
use leeward_firmware::{App, Key};

/// A 400×240 target that keeps the pixels (in a frame buffer) and counts every pixel
/// drawn outside the display instead of silently dropping it.
pub struct CheckTarget {
    pub fb: FrameBuffer,
    pub outside: usize,
}

impl CheckTarget {
    pub fn new() -> Self {
        CheckTarget {
            fb: FrameBuffer::new(),
            outside: 0,
        }
    }
}

impl OriginDimensions for CheckTarget {
    fn size(&self) -> Size {
        Size::new(400, 240)
    }
}

impl DrawTarget for CheckTarget {
    type Color = BinaryColor;
    type Error = core::convert::Infallible;
    fn draw_iter<I>(&mut self, pixels: I) -> Result<(), Self::Error>
    where
        I: IntoIterator<Item = Pixel<BinaryColor>>,
    {
        for px in pixels {
            if px.0.x < 0 || px.0.y < 0 || px.0.x >= 400 || px.0.y >= 240 {
                self.outside += 1;
            } else {
                self.fb.draw_iter([px])?;
            }
        }
        Ok(())
    }

    fn fill_solid(&mut self, area: &Rectangle, color: BinaryColor) -> Result<(), Self::Error> {
        let on = area.intersection(&self.bounding_box());
        self.outside +=
            (area.size.width * area.size.height - on.size.width * on.size.height) as usize;
        self.fb.fill_solid(&on, color)
    }
}

/// One piece of text as drawn.
#[derive(Debug, Clone)]
pub struct Drawn {
    pub area: Rectangle,
    pub text: String,
    pub fits: bool,
}

/// Keeps everything the painter reports.
#[derive(Default)]
pub struct Capture(pub Vec<Drawn>);

impl Inspect for Capture {
    fn text(&mut self, area: Rectangle, text: &str, fits: bool) {
        self.0.push(Drawn {
            area,
            text: text.to_string(),
            fits,
        });
    }
}

/// A rendered screen: its pixels, its texts, and what went wrong drawing it.
pub struct Shot {
    pub target: CheckTarget,
    pub texts: Vec<Drawn>,
}

impl Shot {
    pub fn of(app: &App) -> Shot {
        let mut target = CheckTarget::new();
        let mut cap = Capture::default();
        app.render_with(&mut target, &mut cap).unwrap();
        Shot {
            target,
            texts: cap.0,
        }
    }

    /// Panics naming every problem: pixels off the display, text past its box, text whose
    /// box is itself off the display.
    pub fn assert_clean(&self, what: &str) {
        assert_eq!(
            self.target.outside, 0,
            "{what}: pixels drawn outside 400×240"
        );
        let screen = Rectangle::new(Point::zero(), Size::new(400, 240));
        for d in &self.texts {
            assert!(
                d.fits,
                "{what}: text {:?} runs past its box {:?}",
                d.text, d.area
            );
            if !d.text.is_empty() {
                let br = d.area.bottom_right().unwrap();
                assert!(
                    screen.contains(d.area.top_left) && screen.contains(br),
                    "{what}: text {:?} has a box {:?} off the screen",
                    d.text,
                    d.area
                );
            }
        }
    }

    /// Every text on the screen, one per line, for failure messages.
    pub fn dump(&self) -> String {
        self.texts
            .iter()
            .map(|d| d.text.as_str())
            .collect::<Vec<_>>()
            .join(" | ")
    }

    pub fn has(&self, s: &str) -> bool {
        self.texts.iter().any(|d| d.text.contains(s))
    }

    /// The text drawn to the right of `label`, on the same line.
    pub fn value_of(&self, label: &str) -> String {
        let l = self
            .texts
            .iter()
            .find(|d| d.text == label)
            .unwrap_or_else(|| panic!("no label {label:?} on screen: {}", self.dump()));
        self.texts
            .iter()
            .filter(|d| {
                d.area.top_left.y == l.area.top_left.y && d.area.top_left.x > l.area.top_left.x
            })
            .min_by_key(|d| d.area.top_left.x)
            .map(|d| d.text.clone())
            .unwrap_or_else(|| panic!("nothing right of {label:?}: {}", self.dump()))
    }

    /// The text drawn in the big font (the primary figure): the one whose box is 40+ px high.
    pub fn figure(&self) -> String {
        self.texts
            .iter()
            .find(|d| d.area.size.height >= 40)
            .map(|d| d.text.clone())
            .unwrap_or_else(|| panic!("no primary figure: {}", self.dump()))
    }

    /// Write the screen as a PBM picture (for looking at, not for comparing).
    pub fn save_pbm(&self, path: &std::path::Path) {
        let mut out = b"P4\n400 240\n".to_vec();
        for y in 0..240 {
            out.extend_from_slice(self.target.fb.line(y).unwrap());
        }
        std::fs::write(path, out).unwrap();
    }
}

/// The first number written in `s`, as text ("1.040e-4 /s" → "1.040e-4";
/// "-2.279 e-5/s" → "-2.279": a unit after a space is not an exponent).
pub fn token(s: &str) -> String {
    let start = s
        .find(|c: char| c.is_ascii_digit() || c == '-' || c == '+')
        .unwrap_or_else(|| panic!("no number in {s:?}"));
    let mut t = String::new();
    for c in s[start..].chars() {
        // A sign only first or right after the exponent mark; the mark only after a digit.
        let sign_ok = t.is_empty() || t.ends_with('e');
        let e_ok = t.ends_with(|d: char| d.is_ascii_digit());
        if c.is_ascii_digit()
            || c == '.'
            || (c == 'e' && e_ok)
            || ((c == '-' || c == '+') && sign_ok)
        {
            t.push(c);
        } else {
            break;
        }
    }
    t.trim_end_matches(['e', '-', '+', '.']).to_string()
}

/// The first number in `s`.
pub fn number(s: &str) -> f64 {
    let t = token(s);
    t.parse()
        .unwrap_or_else(|_| panic!("not a number: {t:?} in {s:?}"))
}

/// The first number in `shown` equals `truth` to within half a unit of its last decimal.
pub fn agrees(shown: &str, truth: f64) -> bool {
    let t = token(shown);
    let v = number(shown);
    let (mant, exp) = match t.split_once('e') {
        Some((m, e)) => (m.to_string(), e.parse::<i32>().unwrap_or(0)),
        None => (t.clone(), 0),
    };
    let decimals = mant.split('.').nth(1).map_or(0, str::len);
    let half = 0.5 * 10f64.powi(exp - decimals as i32) * 1.0001;
    (v - truth).abs() <= half
}

/// Press keys in order.
pub fn press(app: &mut App, keys: &[Key]) {
    for &k in keys {
        app.handle(k);
    }
}

/// Press keys, carrying out each effect against the store as the board's loop does.
pub fn press_stored<S>(app: &mut App, st: &mut S, keys: &[Key])
where
    S: leeward_firmware::storage::Storage,
    S::Error: core::fmt::Debug,
{
    for &k in keys {
        let e = app.handle(k);
        app.apply(e, st).unwrap();
    }
}

/// Type a number on the keypad (digits, '.', '-' as Sign).
pub fn typing(s: &str) -> Vec<Key> {
    s.chars()
        .map(|c| match c {
            '0'..='9' => Key::Digit(c as u8 - b'0'),
            '.' => Key::Dot,
            '-' => Key::Sign,
            _ => panic!("cannot type {c:?}"),
        })
        .collect()
}
