//! The handheld's serial port (USB CDC serial), raw 8-bit, for the link.

use crate::link_client::Port;
use crate::CliError;
use std::path::Path;

/// Line speed asked of the port. USB CDC serial ignores it; a UART bridge needs it.
pub const BAUD: u32 = 115_200;

/// Open `dev` as a raw serial port with the link's reply timeout.
pub fn open(dev: &Path) -> Result<Box<dyn Port>, CliError> {
    let name = dev.to_string_lossy();
    let port = serialport::new(name.as_ref(), BAUD)
        .timeout(crate::link_client::REPLY_TIMEOUT)
        .open()
        .map_err(|e| CliError::input(format!("no device at {}: {e}", dev.display())))?;
    Ok(Box::new(port))
}
