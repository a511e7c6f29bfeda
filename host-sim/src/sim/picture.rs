//! The screen as a PNG picture: 400×240, one bit per pixel, ink black on white, so a
//! screenshot is the device's pixels and nothing else (a few kilobytes each).

use leeward_firmware::framebuffer::{FrameBuffer, HEIGHT, LINE_BYTES, WIDTH};
use std::io::Write;

/// The screen's pixels as PNG bytes.
pub fn png_bytes(fb: &FrameBuffer) -> Result<Vec<u8>, png::EncodingError> {
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, WIDTH as u32, HEIGHT as u32);
        enc.set_color(png::ColorType::Grayscale);
        enc.set_depth(png::BitDepth::One);
        let mut w = enc.write_header()?;
        // The frame buffer packs a line MSB-leftmost with 1 = ink; a one-bit grey PNG
        // packs it the same way with 1 = white, so each byte is inverted.
        let mut data = Vec::with_capacity(LINE_BYTES * HEIGHT);
        for y in 0..HEIGHT {
            if let Some(line) = fb.line(y) {
                data.extend(line.iter().map(|b| !b));
            }
        }
        w.write_image_data(&data)?;
        w.finish()?;
    }
    Ok(out)
}

/// Write the screen to `path` as PNG.
pub fn save_png(fb: &FrameBuffer, path: &std::path::Path) -> std::io::Result<()> {
    let bytes = png_bytes(fb).map_err(std::io::Error::other)?;
    let mut f = std::fs::File::create(path)?;
    f.write_all(&bytes)?;
    f.sync_all()
}
