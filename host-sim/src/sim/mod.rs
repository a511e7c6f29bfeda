//! The device on a laptop: the firmware's own state machine with a simulated store, fed
//! keys from a script ([`script`], `leeward shots`), a desktop window (`leeward sim`, with
//! the `window` feature) or a terminal (`leeward sim --terminal`).
//!
//! Every front end goes through [`Device`], so they all behave as the board's main loop
//! does: a key goes to [`App::handle`], the storage effect it returns is carried out with
//! [`App::apply`], and the screen is drawn into the 400×240 frame buffer.

pub mod keys;
pub mod picture;
pub mod script;
pub mod shots;
pub mod store;
pub mod terminal;
#[cfg(feature = "window")]
pub mod window;

use leeward_firmware::framebuffer::FrameBuffer;
use leeward_firmware::{App, Effect, Key};
use store::SimStorage;

/// The simulated device: the app and the store it keeps its datasets in.
pub struct Device {
    app: App,
    storage: SimStorage,
}

impl Device {
    /// Power on with the store on the flash image `flash` ([`store::open`]): on a blank
    /// store the firmware puts in the demo station set and the settings, as on a new
    /// device.
    pub fn power_on(flash: &std::path::Path) -> Result<Self, crate::CliError> {
        let mut storage = store::open(flash)?;
        let app = App::power_on(&mut storage);
        Ok(Device { app, storage })
    }

    /// Press one key as the board's loop does: handle it, then carry out the storage
    /// effect. True when the screen changed.
    pub fn press(&mut self, key: Key) -> bool {
        let effect = self.app.handle(key);
        // A failed settings write is the flash file failing: the file layer has said why
        // on stderr, and the device goes on as the board does (it logs a warning).
        let _ = self.app.apply(effect, &mut self.storage);
        effect != Effect::Nothing
    }

    /// The screen as the display would show it now.
    pub fn frame(&self) -> FrameBuffer {
        let mut fb = FrameBuffer::new();
        // Drawing into the frame buffer cannot fail (its error type is `Infallible`).
        let _ = self.app.render(&mut fb);
        fb
    }

    /// Draw the screen on any one-bit target (the window's display).
    #[cfg(feature = "window")]
    pub fn app_render<D>(&self, d: &mut D) -> Result<(), D::Error>
    where
        D: embedded_graphics::draw_target::DrawTarget<
            Color = embedded_graphics::pixelcolor::BinaryColor,
        >,
    {
        self.app.render(d)
    }
}
