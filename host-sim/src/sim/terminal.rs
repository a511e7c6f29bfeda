//! `leeward sim --terminal`: the screen in Unicode block characters, for a remote shell.
//!
//! Half blocks give each character cell one pixel column and two pixel rows: the whole
//! 400×240 screen, pixel for pixel, in 400 columns by 120 lines. Quadrant blocks give a
//! cell 2×2 pixels: 200 columns by 120 lines, still every pixel. By default the terminal's
//! width picks one (a small font helps either way). Ink is
//! drawn as the block, so a dark-on-light terminal looks like the device.

use super::keys::LEGEND;
use super::store::STORAGE_NOTE;
use super::Device;
use leeward_firmware::framebuffer::{FrameBuffer, HEIGHT, WIDTH};
use leeward_firmware::Key;
use std::io::{Read, Write};

/// How many pixels a character cell holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Blocks {
    /// Half blocks when the terminal is 400 columns wide, else quadrants.
    Auto,
    /// One column, two rows per cell (▀ ▄ █).
    Half,
    /// Two columns, two rows per cell (▘ ▝ ▖ ▗ and their unions).
    Quad,
}

impl Blocks {
    /// Columns the screen takes.
    pub fn columns(self) -> usize {
        match self {
            Blocks::Quad => WIDTH / 2,
            Blocks::Auto | Blocks::Half => WIDTH,
        }
    }

    /// The cells to use in a terminal `cols` wide: `Auto` becomes half blocks or
    /// quadrants; `None` when the screen cannot fit.
    pub fn fit(self, cols: usize) -> Option<Blocks> {
        let b = match self {
            Blocks::Auto if cols >= WIDTH => Blocks::Half,
            Blocks::Auto => Blocks::Quad,
            b => b,
        };
        (cols >= b.columns()).then_some(b)
    }
}

/// Quadrant characters indexed by bits: 1 top-left, 2 top-right, 4 bottom-left,
/// 8 bottom-right (Unicode block elements U+2580 to U+259F).
const QUADS: [char; 16] = [
    ' ', '▘', '▝', '▀', '▖', '▌', '▞', '▛', '▗', '▚', '▐', '▜', '▄', '▙', '▟', '█',
];

fn ink(fb: &FrameBuffer, x: usize, y: usize) -> bool {
    fb.pixel(x, y).is_some_and(|c| c.is_on())
}

/// The screen as lines of block characters (no colours, no cursor moves).
pub fn render(fb: &FrameBuffer, blocks: Blocks) -> Vec<String> {
    let (cw, ch) = match blocks {
        Blocks::Auto | Blocks::Half => (1, 2),
        Blocks::Quad => (2, 2),
    };
    (0..HEIGHT / ch)
        .map(|row| {
            (0..WIDTH / cw)
                .map(|col| {
                    let (x, y) = (col * cw, row * ch);
                    let mut bits = 0;
                    if ink(fb, x, y) {
                        bits |= 1;
                    }
                    if ink(fb, x + cw - 1, y) {
                        bits |= 2;
                    }
                    if ink(fb, x, y + 1) {
                        bits |= 4;
                    }
                    if ink(fb, x + cw - 1, y + 1) {
                        bits |= 8;
                    }
                    QUADS[bits]
                })
                .collect()
        })
        .collect()
}

/// What the terminal sent, as far as the simulator cares.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Input {
    /// A device key.
    Key(Key),
    /// Leave the simulator.
    Quit,
}

/// Read the inputs in `bytes` (one read from a raw-mode terminal). A lone ESC is BACK;
/// ESC [ A to D are the arrows; other escape sequences are dropped.
pub fn decode(bytes: &[u8]) -> Vec<Input> {
    let mut out = Vec::new();
    let mut i = 0;
    while i < bytes.len() {
        let b = bytes[i];
        i += 1;
        let key = match b {
            0x1b => {
                if bytes.get(i) == Some(&b'[') || bytes.get(i) == Some(&b'O') {
                    // CSI or SS3: parameters, then a final byte 0x40 to 0x7e.
                    let mut j = i + 1;
                    while j < bytes.len() && !(0x40..=0x7e).contains(&bytes[j]) {
                        j += 1;
                    }
                    let fin = bytes.get(j).copied();
                    i = j + 1;
                    match fin {
                        Some(b'A') => Some(Input::Key(Key::Up)),
                        Some(b'B') => Some(Input::Key(Key::Down)),
                        Some(b'C') => Some(Input::Key(Key::Right)),
                        Some(b'D') => Some(Input::Key(Key::Left)),
                        _ => None,
                    }
                } else {
                    Some(Input::Key(Key::Back))
                }
            }
            b'0'..=b'9' => Some(Input::Key(Key::Digit(b - b'0'))),
            b'.' => Some(Input::Key(Key::Dot)),
            b'-' => Some(Input::Key(Key::Sign)),
            0x7f | 0x08 => Some(Input::Key(Key::Delete)),
            b'\r' | b'\n' => Some(Input::Key(Key::Ok)),
            b'\t' | b'm' | b'M' => Some(Input::Key(Key::Menu)),
            b'q' | b'Q' | 0x03 | 0x04 => Some(Input::Quit),
            _ => None,
        };
        out.extend(key);
    }
    out
}

/// Puts the terminal in raw mode with `stty` (no extra crate) and back on drop.
struct RawMode {
    saved: String,
}

fn stty(args: &[&str]) -> std::io::Result<std::process::Output> {
    std::process::Command::new("stty")
        .args(args)
        .stdin(std::process::Stdio::inherit())
        .output()
}

impl RawMode {
    fn enter() -> Result<Self, String> {
        let saved = stty(&["-g"]).map_err(|e| format!("cannot run stty: {e}"))?;
        if !saved.status.success() {
            return Err("standard input is not a terminal".into());
        }
        let saved = String::from_utf8_lossy(&saved.stdout).trim().to_string();
        // Reads return after a tenth of a second, so a lone ESC is told from an arrow.
        let ok = stty(&[
            "-icanon", "-echo", "-isig", "-ixon", "min", "0", "time", "1",
        ])
        .map(|o| o.status.success())
        .unwrap_or(false);
        if !ok {
            return Err("stty could not put the terminal in raw mode".into());
        }
        Ok(RawMode { saved })
    }
}

impl Drop for RawMode {
    fn drop(&mut self) {
        let _ = stty(&[self.saved.as_str()]);
    }
}

fn draw(out: &mut impl Write, device: &Device, blocks: Blocks) -> std::io::Result<()> {
    let mut s = String::from("\x1b[H");
    for line in render(&device.frame(), blocks) {
        s.push_str(&line);
        s.push_str("\x1b[K\r\n");
    }
    let legend: Vec<String> = LEGEND.iter().map(|(k, d)| format!("{k} {d}")).collect();
    s.push_str(&legend.join("  ·  "));
    s.push_str("\x1b[K\r\n\x1b[J");
    out.write_all(s.as_bytes())?;
    out.flush()
}

/// The terminal's size as `stty size` reports it: lines, columns.
fn size() -> Option<(usize, usize)> {
    let o = stty(&["size"]).ok()?;
    let s = String::from_utf8_lossy(&o.stdout);
    let mut it = s.split_whitespace().map(|n| n.parse().ok());
    Some((it.next()??, it.next()??))
}

/// Run the simulator in this terminal until Q (or Ctrl-C).
pub fn run(blocks: Blocks, flash: &std::path::Path) -> Result<String, crate::CliError> {
    let fail = |m: String| crate::CliError::input(format!("sim --terminal: {m}"));
    let (lines, cols) = size().ok_or_else(|| fail("standard input is not a terminal".into()))?;
    let blocks = blocks.fit(cols).ok_or_else(|| {
        fail(format!(
            "the terminal is {cols} columns wide; the screen needs {} (--blocks quad) or {} \
             (--blocks half): widen the window or use a smaller font",
            WIDTH / 2,
            WIDTH
        ))
    })?;
    if lines < HEIGHT / 2 + 1 {
        eprintln!(
            "leeward: the terminal has {lines} lines; the screen and legend need {} \
             (a smaller font helps)",
            HEIGHT / 2 + 1
        );
    }
    let raw = RawMode::enter().map_err(fail)?;
    let mut device = Device::power_on(flash)?;
    let mut out = std::io::stdout().lock();
    let mut stdin = std::io::stdin().lock();
    // Clear, hide the cursor.
    let io = |e: std::io::Error| crate::CliError::input(format!("sim --terminal: {e}"));
    out.write_all(b"\x1b[2J\x1b[?25l").map_err(io)?;
    draw(&mut out, &device, blocks).map_err(io)?;
    let mut buf = [0u8; 64];
    'run: loop {
        let n = stdin.read(&mut buf).map_err(io)?;
        let mut changed = false;
        for input in decode(&buf[..n]) {
            match input {
                Input::Quit => break 'run,
                Input::Key(k) => changed |= device.press(k),
            }
        }
        if changed {
            draw(&mut out, &device, blocks).map_err(io)?;
        }
    }
    out.write_all(b"\x1b[?25h\r\n").map_err(io)?;
    drop(raw);
    Ok(format!("{STORAGE_NOTE}\n"))
}

#[cfg(test)]
mod tests {
    use super::*;
    use embedded_graphics::pixelcolor::BinaryColor;
    use embedded_graphics::prelude::*;

    fn with(pixels: &[(i32, i32)]) -> FrameBuffer {
        let mut fb = FrameBuffer::new();
        fb.draw_iter(
            pixels
                .iter()
                .map(|&(x, y)| Pixel(Point::new(x, y), BinaryColor::On)),
        )
        .unwrap();
        fb
    }

    #[test]
    fn half_blocks_cover_the_screen_pixel_for_pixel() {
        let blank = render(&FrameBuffer::new(), Blocks::Half);
        assert_eq!(blank.len(), HEIGHT / 2);
        assert!(blank.iter().all(|l| l.chars().count() == WIDTH));
        assert!(blank.iter().all(|l| l.chars().all(|c| c == ' ')));
        // Top pixel, bottom pixel, both; at the far corner too.
        let fb = with(&[(0, 0), (1, 1), (2, 0), (2, 1), (399, 239)]);
        let l = render(&fb, Blocks::Half);
        assert!(l[0].starts_with("▀▄█ "), "{:?}", &l[0][..12]);
        assert!(l[119].ends_with(" ▄"));
    }

    #[test]
    fn quadrants_keep_every_pixel() {
        let fb = with(&[(0, 0), (3, 0), (4, 1), (7, 1), (8, 0), (9, 1)]);
        let l = render(&fb, Blocks::Quad);
        assert_eq!(l.len(), HEIGHT / 2);
        assert_eq!(l[0].chars().count(), WIDTH / 2);
        // Cells: TL, TR, BL, BR, TL+BR, blank.
        assert!(l[0].starts_with("▘▝▖▗▚ "), "{:?}", &l[0][..24]);
        // Every pixel of a filled screen is ink.
        let mut full = FrameBuffer::new();
        full.clear(BinaryColor::On).unwrap();
        assert!(render(&full, Blocks::Quad)
            .iter()
            .all(|l| l.chars().all(|c| c == '█')));
    }

    #[test]
    fn the_cells_fit_the_terminal() {
        assert_eq!(Blocks::Auto.fit(400), Some(Blocks::Half));
        assert_eq!(Blocks::Auto.fit(399), Some(Blocks::Quad));
        assert_eq!(Blocks::Auto.fit(199), None);
        assert_eq!(Blocks::Half.fit(300), None);
        assert_eq!(Blocks::Quad.fit(200), Some(Blocks::Quad));
    }

    #[test]
    fn terminal_bytes_become_keys() {
        use Input::Key as K;
        assert_eq!(
            decode(b"4.5-\x7f\r\t"),
            [
                K(Key::Digit(4)),
                K(Key::Dot),
                K(Key::Digit(5)),
                K(Key::Sign),
                K(Key::Delete),
                K(Key::Ok),
                K(Key::Menu)
            ]
        );
        assert_eq!(
            decode(b"\x1b[A\x1b[B\x1b[C\x1bOD\x1b"),
            [
                K(Key::Up),
                K(Key::Down),
                K(Key::Right),
                K(Key::Left),
                K(Key::Back)
            ]
        );
        // Other sequences (F5, a mouse report) are dropped whole; q quits.
        assert_eq!(decode(b"\x1b[15~x q"), [Input::Quit]);
        assert_eq!(decode(b"m"), [K(Key::Menu)]);
    }
}
