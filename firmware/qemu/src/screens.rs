//! The device firmware on the target: full-screen renders and key-press redraws of
//! leeward-firmware's `App` into its `FrameBuffer`, as the board's main loop does them.

use core::hint::black_box;

use cortex_m_semihosting::hprintln;
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::{DrawTarget, OriginDimensions, Pixel, Size};

use leeward_firmware::app::Screen;
use leeward_firmware::framebuffer::FrameBuffer;
use leeward_firmware::storage::MemStorage;
use leeward_firmware::{App, Key};

use crate::calc::CALC_BUDGET;
use crate::meter::measure;
use crate::report::Report;

/// A full render's budget: 3 million instructions (issue 7).
pub const RENDER_BUDGET: u64 = 3_000_000;
/// A key press and its redraw: 1 million instructions (issue 7).
pub const KEY_BUDGET: u64 = 1_000_000;

fn render(r: &mut Report, app: &App, fb: &mut FrameBuffer, name: &'static str) {
    let (m, res) = measure(|| app.render(black_box(&mut *fb)));
    r.count(name, &m, RENDER_BUDGET);
    r.check(
        name,
        res.is_ok(),
        format_args!("{} lines changed", fb.dirty_count()),
    );
    fb.mark_clean();
}

/// One key press and the redraw the board makes for it (`handle`, `apply`, `render`).
fn key(
    r: &mut Report,
    app: &mut App,
    st: &mut MemStorage,
    fb: &mut FrameBuffer,
    k: Key,
    name: &'static str,
    budget: u64,
) {
    let (m, res) = measure(|| {
        let e = app.handle(black_box(k));
        let stored = app.apply(e, st).is_ok();
        (app.render(&mut *fb).is_ok(), stored)
    });
    r.count(name, &m, budget);
    r.check(
        name,
        res == (true, true),
        format_args!("{} lines changed", fb.dirty_count()),
    );
    fb.mark_clean();
}

/// Key presses without measuring (to reach a screen).
fn press(app: &mut App, st: &mut MemStorage, keys: &[Key]) {
    for &k in keys {
        let e = app.handle(k);
        let _ = app.apply(e, st);
    }
}

/// A display that only counts pixels: rendering into it costs what embedded-graphics and
/// the firmware spend making the pixels, without the frame buffer's stores.
struct Sink(u32);

impl OriginDimensions for Sink {
    fn size(&self) -> Size {
        Size::new(400, 240)
    }
}

impl DrawTarget for Sink {
    type Color = BinaryColor;
    type Error = core::convert::Infallible;
    fn draw_iter<I: IntoIterator<Item = Pixel<BinaryColor>>>(
        &mut self,
        pixels: I,
    ) -> Result<(), Self::Error> {
        for p in pixels {
            black_box(p);
            self.0 += 1;
        }
        Ok(())
    }
}

/// Parts of a render: the clear alone, and the drawing without the frame buffer.
fn render_parts(app: &App, fb: &mut FrameBuffer) {
    let (m, _) = measure(|| fb.clear(BinaryColor::Off));
    hprintln!(
        "part {:>9} {:>6} {}",
        m.instructions,
        m.stack_bytes,
        "frame buffer clear (fill_solid)"
    );
    let mut sink = Sink(0);
    let (m, _) = measure(|| app.render(&mut sink));
    hprintln!(
        "part {:>9} {:>6} home menu drawn into a pixel-counting sink ({} pixels drawn one by one)",
        m.instructions,
        m.stack_bytes,
        sink.0
    );
}

pub fn run(r: &mut Report) {
    let mut storage = MemStorage::new();
    // Held in statics as on the board (firmware/board/src/main.rs), not on the stack.
    let Some(app) = cortex_m::singleton!(: App = App::power_on(&mut storage)) else {
        r.check("firmware", false, format_args!("app made twice"));
        return;
    };
    let Some(fb) = cortex_m::singleton!(: FrameBuffer = FrameBuffer::new()) else {
        r.check("firmware", false, format_args!("frame buffer made twice"));
        return;
    };
    render(r, app, fb, "full render: home menu");
    render_parts(app, fb);
    fb.mark_clean();
    key(
        r,
        app,
        &mut storage,
        fb,
        Key::Down,
        "key press + redraw: Down on the home menu",
        KEY_BUDGET,
    );
    // Site: back to the first row, open the form (demo latitude), compute.
    press(app, &mut storage, &[Key::Up, Key::Ok, Key::Down, Key::Ok]);
    r.check(
        "firmware: Site result",
        app.screen() == Screen::SiteResult && app.site_result().is_some(),
        format_args!("screen {:?}", app.screen()),
    );
    render(r, app, fb, "full render: Site result");
    // Sounding: from home, the fourth row; opening it summarises the demo ascent (the
    // ~23 KB Profile and ~12 KB Summary on the stack).
    press(
        app,
        &mut storage,
        &[Key::Menu, Key::Down, Key::Down, Key::Down],
    );
    key(
        r,
        app,
        &mut storage,
        fb,
        Key::Ok,
        "open the Sounding task (summary + redraw)",
        CALC_BUDGET,
    );
    r.check(
        "firmware: Sounding opens",
        app.screen() == Screen::SoundingResult(0) && app.sounding().is_some(),
        format_args!("screen {:?}", app.screen()),
    );
    render(r, app, fb, "full render: Sounding column page");
    key(
        r,
        app,
        &mut storage,
        fb,
        Key::Down,
        "key press + redraw: next Sounding page",
        KEY_BUDGET,
    );
    // A digit typed into the Site form's latitude.
    press(
        app,
        &mut storage,
        &[Key::Menu, Key::Up, Key::Up, Key::Up, Key::Ok],
    );
    r.check(
        "firmware: Site form",
        app.screen() == Screen::SiteForm,
        format_args!("screen {:?}", app.screen()),
    );
    key(
        r,
        app,
        &mut storage,
        fb,
        Key::Digit(4),
        "key press + redraw: a digit in the Site form",
        KEY_BUDGET,
    );
}
