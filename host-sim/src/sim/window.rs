//! `leeward sim`: the screen in a desktop window (only with the `window` feature).
//!
//! embedded-graphics-simulator draws the device: its display takes the firmware's
//! drawing and turns it into an RGB picture at the chosen zoom, in a theme that looks like
//! a reflective LCD. The window itself and its keys come from the `sdl2` crate that the
//! simulator is built on: the simulator's own window closes on Escape, and the keypad
//! needs Escape for BACK.

use super::keys::LEGEND;
use super::store::STORAGE_NOTE;
use super::Device;
use crate::CliError;
use embedded_graphics::mono_font::{ascii::FONT_6X10, MonoTextStyle};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::{PrimitiveStyle, Rectangle};
use embedded_graphics::text::{Baseline, Text};
use embedded_graphics_simulator::{
    BinaryColorTheme, OutputSettings, OutputSettingsBuilder, SimulatorDisplay,
};
use leeward_firmware::framebuffer::{HEIGHT, WIDTH};
use leeward_firmware::Key;
use sdl2::event::Event;
use sdl2::keyboard::Keycode;
use sdl2::pixels::PixelFormatEnum;

/// Width of the key legend beside the screen, device pixels.
const LEGEND_W: u32 = 100;
/// Largest zoom (a 400×240 screen at 8 is 3200 pixels wide already).
pub const MAX_ZOOM: u32 = 8;

/// The device key for a laptop key (see the legend).
fn key_for(code: Keycode) -> Option<Key> {
    use Keycode as K;
    let digit = |d: u8| Some(Key::Digit(d));
    match code {
        K::Num0 | K::Kp0 => digit(0),
        K::Num1 | K::Kp1 => digit(1),
        K::Num2 | K::Kp2 => digit(2),
        K::Num3 | K::Kp3 => digit(3),
        K::Num4 | K::Kp4 => digit(4),
        K::Num5 | K::Kp5 => digit(5),
        K::Num6 | K::Kp6 => digit(6),
        K::Num7 | K::Kp7 => digit(7),
        K::Num8 | K::Kp8 => digit(8),
        K::Num9 | K::Kp9 => digit(9),
        K::Period | K::KpPeriod => Some(Key::Dot),
        K::Minus | K::KpMinus => Some(Key::Sign),
        K::Backspace | K::Delete => Some(Key::Delete),
        K::Up => Some(Key::Up),
        K::Down => Some(Key::Down),
        K::Left => Some(Key::Left),
        K::Right => Some(Key::Right),
        K::Return | K::KpEnter => Some(Key::Ok),
        K::Escape => Some(Key::Back),
        K::Tab | K::M => Some(Key::Menu),
        _ => None,
    }
}

/// The screen and the legend beside it, in device pixels.
fn compose(device: &Device) -> SimulatorDisplay<BinaryColor> {
    let mut d = SimulatorDisplay::new(Size::new(WIDTH as u32 + LEGEND_W, HEIGHT as u32));
    // Drawing into the simulator's display cannot fail.
    let _ = device.app_render(&mut d);
    let _ = Rectangle::new(Point::new(WIDTH as i32, 0), Size::new(1, HEIGHT as u32))
        .into_styled(PrimitiveStyle::with_fill(BinaryColor::On))
        .draw(&mut d);
    let style = MonoTextStyle::new(&FONT_6X10, BinaryColor::On);
    let x = WIDTH as i32 + 6;
    let _ = Text::with_baseline("keyboard", Point::new(x, 6), style, Baseline::Top).draw(&mut d);
    for (i, (k, what)) in LEGEND.iter().enumerate() {
        let y = 28 + 16 * i as i32;
        let _ = Text::with_baseline(k, Point::new(x, y), style, Baseline::Top).draw(&mut d);
        let _ = Text::with_baseline(what, Point::new(x + 44, y), style, Baseline::Top).draw(&mut d);
    }
    d
}

fn settings(zoom: u32) -> OutputSettings {
    OutputSettingsBuilder::new()
        .scale(zoom)
        .theme(BinaryColorTheme::LcdWhite)
        // The theme would add a gap between pixels; the zoom is to be exact.
        .pixel_spacing(0)
        .build()
}

/// Open the window and run until it is closed (or Q is pressed).
pub fn run(zoom: u32, flash: &std::path::Path) -> Result<String, CliError> {
    if !(1..=MAX_ZOOM).contains(&zoom) {
        return Err(CliError::input(format!(
            "--zoom {zoom}: the zoom is a whole number from 1 to {MAX_ZOOM}"
        )));
    }
    let fail = |e: String| CliError::input(format!("sim: cannot open the window: {e}"));
    let sdl = sdl2::init().map_err(fail)?;
    let video = sdl.video().map_err(fail)?;
    let output = settings(zoom);
    let mut device = Device::power_on(flash)?;
    let first = compose(&device).to_rgb_output_image(&output);
    let (w, h) = {
        let b = first.as_image_buffer();
        (b.width(), b.height())
    };
    let window = video
        .window("leeward: device simulator", w, h)
        .position_centered()
        .build()
        .map_err(|e| fail(e.to_string()))?;
    let mut canvas = window
        .into_canvas()
        .build()
        .map_err(|e| fail(e.to_string()))?;
    let creator = canvas.texture_creator();
    let mut texture = creator
        .create_texture_streaming(PixelFormatEnum::RGB24, w, h)
        .map_err(|e| fail(e.to_string()))?;
    let mut events = sdl.event_pump().map_err(fail)?;
    let mut dirty = true;
    loop {
        if dirty {
            let img = compose(&device).to_rgb_output_image(&output);
            let buf = img.as_image_buffer();
            texture
                .update(None, buf.as_raw(), w as usize * 3)
                .map_err(|e| fail(e.to_string()))?;
            canvas.copy(&texture, None, None).map_err(fail)?;
            canvas.present();
            dirty = false;
        }
        // Wait for input rather than spin; a timeout keeps the window responsive.
        if let Some(ev) = events.wait_event_timeout(250) {
            match ev {
                Event::Quit { .. }
                | Event::KeyDown {
                    keycode: Some(Keycode::Q),
                    ..
                } => break,
                Event::KeyDown {
                    keycode: Some(code),
                    ..
                } => {
                    if let Some(k) = key_for(code) {
                        dirty |= device.press(k);
                    }
                }
                Event::Window { .. } => dirty = true,
                _ => {}
            }
        }
    }
    Ok(format!("{STORAGE_NOTE}\n"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_device_key_has_a_laptop_key() {
        let codes = [
            Keycode::Num0,
            Keycode::Num1,
            Keycode::Num2,
            Keycode::Num3,
            Keycode::Num4,
            Keycode::Num5,
            Keycode::Num6,
            Keycode::Num7,
            Keycode::Num8,
            Keycode::Num9,
            Keycode::Period,
            Keycode::Minus,
            Keycode::Backspace,
            Keycode::Up,
            Keycode::Down,
            Keycode::Left,
            Keycode::Right,
            Keycode::Return,
            Keycode::Escape,
            Keycode::Tab,
        ];
        let mapped: Vec<Key> = codes.iter().filter_map(|&c| key_for(c)).collect();
        for k in &Key::ALL[..20] {
            assert!(mapped.contains(k), "{k:?} has no laptop key");
        }
        assert_eq!(key_for(Keycode::M), Some(Key::Menu));
        assert_eq!(key_for(Keycode::Q), None, "Q quits, it is not a device key");
    }
}
