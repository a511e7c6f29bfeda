//! The device firmware on the target: full-screen renders and key-press redraws of
//! leeward-firmware's `App` into its `FrameBuffer`, as the board's main loop does them.

use core::hint::black_box;

use cortex_m_semihosting::hprintln;
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::{DrawTarget, OriginDimensions, Pixel, Size};

use leeward_firmware::app::Screen;
use leeward_firmware::flash::{sim::SimFlash, FlashStore};
use leeward_firmware::framebuffer::FrameBuffer;
use leeward_firmware::records::Record;
use leeward_firmware::sounding::demo_view;
use leeward_firmware::storage::{DataKind, MemStorage, Storage};
use leeward_firmware::{App, Effect, Key};

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
    // Something must be drawn: a blank screen fails.
    let on = pixels_on(fb);
    r.check(
        name,
        res.is_ok() && on > 0,
        format_args!("{} pixels on, {} lines changed", on, fb.dirty_count()),
    );
    fb.mark_clean();
}

/// Pixels set in the frame.
fn pixels_on(fb: &FrameBuffer) -> u32 {
    let mut n = 0;
    for y in 0..leeward_firmware::framebuffer::HEIGHT {
        if let Some(line) = fb.line(y) {
            n += line.iter().map(|b| b.count_ones()).sum::<u32>();
        }
    }
    n
}

/// One key press and what the board does for it (firmware/board/src/main.rs): `handle`,
/// `apply`, and a render when the effect asks for one. The key must change the screen.
fn key<S: Storage>(
    r: &mut Report,
    app: &mut App,
    st: &mut S,
    fb: &mut FrameBuffer,
    k: Key,
    name: &'static str,
    budget: u64,
) {
    let (m, (effect, stored, drawn)) = measure(|| {
        let e = app.handle(black_box(k));
        let stored = app.apply(e, st).is_ok();
        let drawn = e == Effect::Nothing || app.render(&mut *fb).is_ok();
        (e, stored, drawn)
    });
    r.count(name, &m, budget);
    let changed = fb.dirty_count();
    r.check(
        name,
        effect != Effect::Nothing && stored && drawn && changed > 0,
        format_args!("{:?}, {} lines changed", effect, changed),
    );
    fb.mark_clean();
}

/// Key presses without measuring (to reach a screen), each redrawn as the board does, so
/// the frame holds the screen shown before the next measured key.
fn press<S: Storage>(app: &mut App, st: &mut S, fb: &mut FrameBuffer, keys: &[Key]) {
    for &k in keys {
        let e = app.handle(k);
        let _ = app.apply(e, st);
        if e != Effect::Nothing {
            let _ = app.render(&mut *fb);
        }
    }
    fb.mark_clean();
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
    // Put the home menu back in the frame (render_parts cleared it), as the board has it.
    let _ = app.render(fb);
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
    press(
        app,
        &mut storage,
        fb,
        &[Key::Up, Key::Ok, Key::Down, Key::Ok],
    );
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
        fb,
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
        Key::Right,
        "key press + redraw: next Sounding page",
        KEY_BUDGET,
    );
    // A digit typed at the end of the Site form's latitude (UP to the field, OK starts the edit), with
    // the frame as the board has it before the key.
    press(
        app,
        &mut storage,
        fb,
        &[
            Key::Menu,
            Key::Up,
            Key::Up,
            Key::Up,
            Key::Ok,
            Key::Up,
            Key::Ok,
        ],
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
    stored_sounding(r, fb);
}

/// Bytes of the emulated flash for the stored-sounding step: a map of three 16 KiB pages
/// (the board's map sectors) and a log of one.
const FLASH_BYTES: usize = 4 * PAGE;
const PAGE: usize = 16 * 1024;

/// Data > Use on a stored sounding, as on the board: the sounding read from a flash store
/// (emulated in RAM, the board's page size and word) through the Sounding task's window,
/// summarised, and its first page drawn.
fn stored_sounding(r: &mut Report, fb: &mut FrameBuffer) {
    let name = "data use: a stored sounding (read + summary + redraw)";
    let (Some(bytes), Some(profile), Some(record)) = (
        cortex_m::singleton!(: [u8; FLASH_BYTES] = [0xFF; FLASH_BYTES]),
        cortex_m::singleton!(: leeward_core::sounding::Profile =
            leeward_core::sounding::Profile::new(Default::default())),
        cortex_m::singleton!(: [u8; 16 * 1024] = [0; 16 * 1024]),
    ) else {
        r.check(name, false, format_args!("buffers made twice"));
        return;
    };
    let flash: SimFlash<&'static mut [u8], 4, PAGE> = SimFlash::new(&mut bytes[..], 1);
    let page = PAGE as u32;
    let Ok(mut st) = FlashStore::open(flash, 0..3 * page, 3 * page..4 * page) else {
        r.check(name, false, format_args!("flash store refused its areas"));
        return;
    };
    // The demo ascent, stored as a pushed sounding is.
    let stored = leeward_core::demo::sounding_into(profile)
        .ok()
        .and_then(|_| profile.encode(record).ok())
        .map(|n| st.put(DataKind::Sounding, "TESSEL", &record[..n]));
    if !matches!(stored, Some(Ok(()))) {
        r.check(
            name,
            false,
            format_args!("could not store the sounding: {:?}", stored),
        );
        return;
    }
    let Some(app) = cortex_m::singleton!(: App = App::power_on(&mut st)) else {
        r.check(name, false, format_args!("app made twice"));
        return;
    };
    let _ = app.render(&mut *fb);
    fb.mark_clean();
    // Home → Data (up three rows) → the first dataset → its menu → Use (the fourth row).
    press(
        app,
        &mut st,
        fb,
        &[
            Key::Up,
            Key::Up,
            Key::Up,
            Key::Ok,
            Key::Ok,
            Key::Down,
            Key::Down,
            Key::Down,
        ],
    );
    key(r, app, &mut st, fb, Key::Ok, name, CALC_BUDGET);
    let same = match (app.sounding(), demo_view()) {
        (Some(v), Ok(d)) => *v == d,
        _ => false,
    };
    r.check(
        "firmware: the stored sounding's summary is the demo's",
        app.screen() == Screen::SoundingResult(0)
            && app.sounding_source().map(|n| n.as_str()) == Some("TESSEL")
            && same,
        format_args!("screen {:?}", app.screen()),
    );
    // The Ridge crossing's Compute (both f32 tracks and the first result page): counted
    // as a part, with no budget (its flat-ground track runs far: docs/performance.md),
    // but its stack is among the deepest the device has, so it is measured too.
    press(
        app,
        &mut st,
        fb,
        &[Key::Menu, Key::Digit(5), Key::Ok, Key::Up],
    );
    let (m, _) = measure(|| {
        let e = app.handle(black_box(Key::Ok));
        let _ = app.apply(e, &mut st);
        app.render(&mut *fb)
    });
    let name = "key press + redraw: Compute in the Ridge crossing form";
    r.stack(name, &m);
    hprintln!("part {:>9} {:>6} {}", m.instructions, m.stack_bytes, name);
    r.check(
        name,
        app.screen() == Screen::CrossingResult(0) && app.crossing_result().is_some(),
        format_args!("screen {:?}", app.screen()),
    );
}
