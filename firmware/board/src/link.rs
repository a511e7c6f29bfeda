//! The data link's serial port: USB CDC-ACM on the OTG FS peripheral (PA11 D−, PA12 D+),
//! feeding `leeward_firmware::link::LinkServer` through the byte pump of
//! `leeward_board_logic::pump`, as host-sim's `leeward device` feeds it from a socket.
//!
//! All of it runs in the main loop: the OTG_FS interrupt only masks itself and sets a
//! flag (the OTG core keeps its interrupt raised until the driver has serviced it), and
//! [`UsbLink::service`] polls the USB stack, moves bytes and unmasks the interrupt. Each
//! call feeds the server a bounded number of bytes, so the keypad is scanned in between;
//! a request that writes the flash (a put, a delete) holds the loop for as long as the
//! flash takes.

use core::sync::atomic::{AtomicBool, Ordering};

use stm32f4xx_hal::otg_fs::UsbBusType;
use stm32f4xx_hal::pac::{Interrupt, NVIC};
use usb_device::device::{UsbDevice, UsbDeviceState};
use usbd_serial::SerialPort;

use leeward_board_logic::pump::Pump;
use leeward_firmware::link::LinkServer;
use leeward_firmware::storage::Storage;

/// Set by the OTG_FS interrupt: the USB stack wants a poll.
pub static USB_EVENT: AtomicBool = AtomicBool::new(false);

/// Bytes fed to the link server per main-loop pass (then the keypad gets its turn).
const BYTES_PER_PASS: usize = 256;

/// The USB serial port and the link session on it.
pub struct UsbLink {
    pub dev: UsbDevice<'static, UsbBusType>,
    pub serial: SerialPort<'static, UsbBusType>,
    pub server: LinkServer<'static>,
    pub pump: Pump,
    /// The host had the port open (DTR) at the last poll.
    open: bool,
    /// Bytes may be waiting that no interrupt will announce: come back without sleeping.
    more: bool,
}

impl UsbLink {
    /// The link on a built USB device and serial class, with `server`.
    pub fn new(
        dev: UsbDevice<'static, UsbBusType>,
        serial: SerialPort<'static, UsbBusType>,
        server: LinkServer<'static>,
    ) -> Self {
        UsbLink {
            dev,
            serial,
            server,
            pump: Pump::new(),
            open: false,
            more: false,
        }
    }

    /// Whether the loop should come back before the next interrupt.
    pub fn wants_more(&self) -> bool {
        self.more
    }

    /// Poll the USB stack, serve link requests against `store`, send replies; then let
    /// the interrupt in again.
    pub fn service<S: Storage>(&mut self, store: &mut S) {
        let UsbLink {
            dev,
            serial,
            server,
            pump,
            open,
            more,
        } = self;
        let _ = dev.poll(&mut [&mut *serial]);
        if dev.state() != UsbDeviceState::Configured {
            // Unplugged, reset or not yet enumerated: the session is over.
            if *open {
                server.reset(store);
                pump.reset();
                *open = false;
            }
            *more = false;
        } else {
            // A host opening the port raises DTR: a new session starts clean.
            let dtr = serial.dtr();
            if dtr && !*open {
                server.reset(store);
                pump.reset();
            }
            *open = dtr;
            let fed = pump.serve(
                server,
                store,
                |b| serial.read(b).unwrap_or(0),
                BYTES_PER_PASS,
            );
            pump.flush(|w| serial.write(w).unwrap_or(0));
            *more = fed >= BYTES_PER_PASS;
            if pump.lost() > 0 {
                defmt::error!("link: {} replies lost", pump.lost());
            }
        }
        // SAFETY: the OTG_FS handler only masks itself and sets USB_EVENT.
        unsafe { NVIC::unmask(Interrupt::OTG_FS) };
    }
}

/// The OTG_FS handler's work: mask the interrupt until the main loop has polled.
pub fn on_interrupt() {
    NVIC::mask(Interrupt::OTG_FS);
    USB_EVENT.store(true, Ordering::Release);
}
