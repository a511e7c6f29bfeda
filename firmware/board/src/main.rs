//! # leeward-board
//!
//! leeward on the handheld: an STM32F411CE (Cortex-M4F) driving a 400×240 memory-in-pixel
//! display over SPI1 and reading a 4×5 key matrix. The behaviour is all in
//! `leeward-firmware`; this binary maps keys to [`leeward_firmware::Key`], renders into a
//! [`FrameBuffer`] and sends the changed lines. The hardware-free parts (debouncing, key
//! map, the display's framing) live in `leeward-board-logic` and are tested on the host.
//!
//! Pins (docs/board.md has the wiring): display SCK PA5, MOSI PA7, SCS PA4 (active high),
//! DISP PB0, EXTCOMIN and EXTMODE tied low; keypad rows PB12–PB15 (open drain), columns
//! PB5–PB9 (pull-up, EXTI9_5).
//!
//! The loop sleeps (WFI) whenever there is nothing to do. While no key is held the rows
//! are driven low and a key press pulls its column low, which raises EXTI9_5 and wakes the
//! core; it then scans every 5 ms (TIM2) until the debouncer reports all keys released,
//! and sleeps on the key interrupt again. TIM5 wakes it once a second to invert the
//! display's VCOM; the USB interrupt wakes it for the data link.
//!
//! Settings, datasets and the results log are kept in the internal flash (the store's map
//! in sectors 1–3, its log in sector 7: `flash.rs`, docs/board.md "Flash storage"); the
//! data link is USB CDC serial on PA11/PA12 (`link.rs`). The clock is 48 MHz from the
//! 25 MHz crystal through the PLL, or the internal 16 MHz without USB if the crystal does
//! not start.
#![no_std]
#![no_main]
#![deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

mod flash;
mod link;

use core::cell::RefCell;
use core::sync::atomic::{AtomicBool, Ordering};

use defmt_rtt as _;
use embedded_hal::delay::DelayNs;
use embedded_hal::digital::OutputPin;
use embedded_hal::spi::SpiBus;
use panic_probe as _;
use stm32f4xx_hal::{
    gpio::{AnyPin, Edge, ExtiPin, Input, OpenDrain, Output},
    otg_fs::{UsbBus, UsbBusType, USB},
    pac::{self, interrupt, Interrupt, NVIC},
    prelude::*,
    rcc::Config,
    spi::{Mode, Phase, Polarity},
    timer::Event,
};
use usb_device::bus::UsbBusAllocator;
use usb_device::device::{StringDescriptors, UsbDeviceBuilder, UsbVidPid};
use usbd_serial::SerialPort;

use leeward_board_logic::flash::{Window, LOG_AREA, LOG_ERASE, MAP_AREA, MAP_ERASE};
use leeward_board_logic::keypad::{self, Debouncer, COLS, ROWS};
use leeward_board_logic::memlcd::{timing, MemoryLcd};
use leeward_board_logic::pump::Watched;
use leeward_board_logic::recovery::{Choice, Prompt};
use leeward_firmware::flash::{FlashStore, TwoFlash};
use leeward_firmware::link::{LinkServer, STAGING_BYTES};
use leeward_firmware::storage::Storage;
use leeward_firmware::{framebuffer::FrameBuffer, App, Effect, Key};

/// The store on the internal flash: the map in sectors 1-3, the log in sector 7.
type Store = FlashStore<TwoFlash<flash::Sectors<MAP_ERASE>, flash::Sectors<LOG_ERASE>>>;

/// EXTI lines of the keypad columns PB5–PB9.
const COL_EXTI_LINES: u32 = 0b11_1110_0000;
/// Matrix scan rate while a key is held or settling, Hz (5 ms; see keypad::STABLE_SCANS).
const SCAN_HZ: u32 = 200;
/// Core cycles for a row to settle through the column pull-ups: 5 µs at 48 MHz (15 µs
/// on the 16 MHz fallback clock: longer is harmless).
const ROW_SETTLE_CYCLES: u32 = 240;
/// The crystal: 25 MHz on the WeAct "Black Pill" F411CE (from memory of its schematic:
/// check it on the board used).
const HSE_HZ: u32 = 25_000_000;
/// Checks of HSERDY, 100 µs apart at the 16 MHz reset clock: about 100 ms for the crystal
/// to start (its start-up time is a few ms, from memory of the datasheet).
const HSE_POLLS: u32 = 1000;
/// Words of USB endpoint memory (OUT buffers: control 64 B and bulk 64 B need 32 words).
const EP_WORDS: usize = 64;

static KEY_EDGE: AtomicBool = AtomicBool::new(false);
static SCAN_TICK: AtomicBool = AtomicBool::new(false);
static VCOM_TICK: AtomicBool = AtomicBool::new(false);

#[interrupt]
fn EXTI9_5() {
    // SAFETY: writing ones to EXTI_PR clears only the column lines' pending bits; no other
    // code writes PR while this handler can run (main masks the lines before touching it).
    unsafe { (*pac::EXTI::ptr()).pr().write(|w| w.bits(COL_EXTI_LINES)) };
    KEY_EDGE.store(true, Ordering::Release);
}

#[interrupt]
fn TIM2() {
    // SAFETY: clears TIM2's update flag (write 0 to clear); main never writes TIM2_SR.
    unsafe { (*pac::TIM2::ptr()).sr().write(|w| w.bits(0)) };
    SCAN_TICK.store(true, Ordering::Release);
}

#[interrupt]
fn TIM5() {
    // SAFETY: as for TIM2, on TIM5.
    unsafe { (*pac::TIM5::ptr()).sr().write(|w| w.bits(0)) };
    VCOM_TICK.store(true, Ordering::Release);
}

#[interrupt]
fn OTG_FS() {
    link::on_interrupt();
}

/// Start the crystal oscillator; false (and it is switched off again) if it is not ready
/// within [`HSE_POLLS`] checks. The HAL's own start waits forever.
fn hse_starts(rcc: &pac::RCC) -> bool {
    rcc.cr().modify(|_, w| w.hseon().set_bit());
    for _ in 0..HSE_POLLS {
        if rcc.cr().read().hserdy().bit_is_set() {
            return true;
        }
        cortex_m::asm::delay(1600);
    }
    rcc.cr().modify(|_, w| w.hseon().clear_bit());
    false
}

/// Stop with a message in the log (no panic: the device just waits for a reset).
fn halt(why: &str) -> ! {
    defmt::error!("halted: {}", why);
    loop {
        cortex_m::asm::wfi();
    }
}

/// The display on any embedded-hal 1.0 SPI bus, select pin and delay.
struct Panel<S, P, D> {
    spi: S,
    scs: P,
    delay: D,
    lcd: MemoryLcd,
}

impl<S: SpiBus<u8>, P: OutputPin, D: DelayNs> Panel<S, P, D> {
    /// One chip-select frame around `send` (the panel's select is active high).
    fn frame<R>(&mut self, send: impl FnOnce(&mut S, &mut MemoryLcd) -> R) -> R {
        // A GPIO write on this chip cannot fail; the Results are the trait's.
        let _ = self.scs.set_high();
        self.delay.delay_us(timing::CS_SETUP_US);
        let r = send(&mut self.spi, &mut self.lcd);
        let _ = self.spi.flush();
        self.delay.delay_us(timing::CS_HOLD_US);
        let _ = self.scs.set_low();
        r
    }

    fn command(&mut self, make: impl FnOnce(&mut MemoryLcd) -> [u8; 2]) {
        if self.frame(|spi, lcd| spi.write(&make(lcd))).is_err() {
            defmt::warn!("display command failed");
        }
    }

    /// Send the lines that changed since the last flush.
    fn flush(&mut self, fb: &mut FrameBuffer) {
        if fb.dirty_count() == 0 {
            return;
        }
        match self.frame(|spi, lcd| lcd.flush(fb, |b| spi.write(b))) {
            Ok(n) => defmt::debug!("sent {} lines", n),
            Err(_) => defmt::warn!("display write failed; lines kept for the next flush"),
        }
    }
}

type Row = AnyPin<Output<OpenDrain>>;
type Col = AnyPin<Input>;

/// One pass over the matrix: bit `row * COLS + col` set for a key that reads pressed.
fn scan(rows: &mut [Row; ROWS], cols: &[Col; COLS]) -> u32 {
    let mut raw = 0;
    for row in rows.iter_mut() {
        row.set_high(); // open drain: released
    }
    for (r, row) in rows.iter_mut().enumerate() {
        row.set_low();
        cortex_m::asm::delay(ROW_SETTLE_CYCLES);
        for (c, col) in cols.iter().enumerate() {
            if col.is_low() {
                raw |= keypad::bit(r, c).unwrap_or(0);
            }
        }
        row.set_high();
    }
    raw
}

/// Drive every row low and re-arm the column interrupts, so any key wakes the core.
fn arm_wake(rows: &mut [Row; ROWS], cols: &mut [Col; COLS], exti: &mut pac::EXTI) {
    for row in rows.iter_mut() {
        row.set_low();
    }
    cortex_m::asm::delay(ROW_SETTLE_CYCLES);
    for col in cols.iter_mut() {
        col.clear_interrupt_pending_bit();
        col.enable_interrupt(exti);
    }
    // A key pressed while the lines were masked made no edge: look once.
    if cols.iter().any(|c| c.is_low()) {
        KEY_EDGE.store(true, Ordering::Release);
    }
}

/// Wait for one key press (scanning every 5 ms, VCOM kept going): for the power-on
/// question, before the main loop runs.
fn wait_key<S: SpiBus<u8>, P: OutputPin, D: DelayNs>(
    rows: &mut [Row; ROWS],
    cols: &[Col; COLS],
    debouncer: &mut Debouncer,
    panel: &mut Panel<S, P, D>,
    scan_cycles: u32,
) -> Key {
    loop {
        if VCOM_TICK.swap(false, Ordering::AcqRel) {
            panel.command(|lcd| lcd.toggle_vcom());
        }
        if let Some(key) = debouncer.update(scan(rows, cols)).into_iter().next() {
            return key;
        }
        cortex_m::asm::delay(scan_cycles);
    }
}

/// Open the store on the internal flash; `None` if the layout is refused (a build
/// mistake: the check runs on the host too).
fn open_store(ctl: &'static RefCell<pac::FLASH>) -> Option<Store> {
    let map = flash::Sectors::new(ctl, Window::new(MAP_AREA, MAP_ERASE)?);
    let log = flash::Sectors::new(ctl, Window::new(LOG_AREA, LOG_ERASE)?);
    FlashStore::open(TwoFlash { map, log }, MAP_AREA, LOG_AREA).ok()
}

/// The frame buffer, in a static of its own: a new buffer is all zero bytes, so it lies
/// in .bss, takes no flash and is not built on the stack first (as `singleton!` would).
fn frame_buffer() -> &'static mut FrameBuffer {
    static mut FB: FrameBuffer = FrameBuffer::new();
    static TAKEN: AtomicBool = AtomicBool::new(false);
    if TAKEN.swap(true, Ordering::AcqRel) {
        halt("frame buffer already made");
    }
    // SAFETY: `TAKEN` lets this run once, so the one `&mut` to FB is the one returned.
    unsafe { &mut *core::ptr::addr_of_mut!(FB) }
}

#[cortex_m_rt::entry]
fn main() -> ! {
    let (Some(dp), Some(cp)) = (pac::Peripherals::take(), cortex_m::Peripherals::take()) else {
        halt("peripherals taken twice");
    };
    // USB full speed needs 48 MHz within 0.25 %: the crystal through the PLL (the
    // internal oscillator is only trimmed to about 1 %). 25 MHz / 25 x 384 = 384 MHz;
    // / 8 = 48 MHz for the core and / 8 = 48 MHz for USB. Should the crystal not start
    // (cold, damage), the device runs from the internal 16 MHz without USB rather than
    // not at all.
    let usb_clock = hse_starts(&dp.RCC);
    let cfg = if usb_clock {
        Config::hse(HSE_HZ.Hz()).sysclk(48.MHz()).require_pll48clk()
    } else {
        Config::hsi().sysclk(16.MHz())
    };
    let mut rcc = dp.RCC.freeze(cfg);
    if !usb_clock {
        defmt::warn!("crystal did not start: 16 MHz internal clock, no USB link");
    }
    // Core cycles of one 5 ms scan period (the power-on question's busy wait).
    let scan_cycles = rcc.clocks.sysclk().raw() / SCAN_HZ;
    let gpioa = dp.GPIOA.split(&mut rcc);
    let gpiob = dp.GPIOB.split(&mut rcc);
    let mut syscfg = dp.SYSCFG.constrain(&mut rcc);
    let mut exti = dp.EXTI;
    // Keep the bus clocked in WFI so the probe can read the RTT buffer while the core
    // sleeps (costs sleep current: for the bench, not the field).
    #[cfg(feature = "debug-sleep")]
    dp.DBGMCU.cr().modify(|_, w| w.dbg_sleep().set_bit());

    // Display: SPI mode 0, MSB first (memlcd reverses the bytes the panel reads LSB first).
    let spi = dp.SPI1.spi(
        (Some(gpioa.pa5), pac::SPI1::NoMiso, Some(gpioa.pa7)),
        Mode {
            polarity: Polarity::IdleLow,
            phase: Phase::CaptureOnFirstTransition,
        },
        (timing::SPI_MAX_HZ / 2).Hz(),
        &mut rcc,
    );
    let scs = gpioa.pa4.into_push_pull_output();
    let mut disp = gpiob.pb0.into_push_pull_output();
    let delay = cp.SYST.delay(&rcc.clocks);
    let mut panel = Panel {
        spi,
        scs,
        delay,
        lcd: MemoryLcd::new(),
    };

    // Keypad.
    let mut rows: [Row; ROWS] = [
        gpiob.pb12.into_open_drain_output().erase(),
        gpiob.pb13.into_open_drain_output().erase(),
        gpiob.pb14.into_open_drain_output().erase(),
        gpiob.pb15.into_open_drain_output().erase(),
    ];
    let mut cols: [Col; COLS] = [
        gpiob.pb5.into_pull_up_input().erase(),
        gpiob.pb6.into_pull_up_input().erase(),
        gpiob.pb7.into_pull_up_input().erase(),
        gpiob.pb8.into_pull_up_input().erase(),
        gpiob.pb9.into_pull_up_input().erase(),
    ];
    for col in cols.iter_mut() {
        col.make_interrupt_source(&mut syscfg);
        col.trigger_on_edge(&mut exti, Edge::Falling);
    }

    let mut scan_timer = dp.TIM2.counter_hz(&mut rcc);
    scan_timer.listen(Event::Update);
    let mut vcom_timer = dp.TIM5.counter_hz(&mut rcc);
    vcom_timer.listen(Event::Update);
    if vcom_timer
        .start((1000 / timing::VCOM_PERIOD_MS).Hz())
        .is_err()
    {
        defmt::warn!("VCOM timer did not start");
    }

    let fb = frame_buffer();
    panel.command(|lcd| lcd.clear_command());
    disp.set_high();

    // Settings, datasets and the results log, kept in the internal flash.
    let Some(flash_ctl) = cortex_m::singleton!(: RefCell<pac::FLASH> = RefCell::new(dp.FLASH))
    else {
        halt("flash taken twice");
    };
    // The store lives in this frame, which never returns, rather than in a static:
    // no copy of it on the way there.
    let Some(mut store) = open_store(flash_ctl) else {
        halt("flash layout refused");
    };
    let storage = &mut store;
    let health = storage.health();
    defmt::info!("store: {}", health);
    let mut debouncer = Debouncer::new();
    if let Some(prompt) = Prompt::for_health(&health) {
        // SAFETY: the handler touches only its own flag and pending bit.
        unsafe { NVIC::unmask(Interrupt::TIM5) };
        if prompt.draw(fb, &mut ()).is_err() {
            defmt::warn!("prompt not drawn");
        }
        panel.flush(fb);
        let key = wait_key(&mut rows, &cols, &mut debouncer, &mut panel, scan_cycles);
        if let Choice::Erase { map, log } = prompt.answer(key) {
            if map && storage.erase_datasets().is_err() {
                defmt::warn!("map area not erased");
            }
            if log && storage.erase_log().is_err() {
                defmt::warn!("log area not erased");
            }
            defmt::info!("store after erasing: {}", storage.health());
        }
    }
    // The app lives in this frame, which never returns: made here, it is built in place
    // (a `static` would take it through a 19 KB copy on the stack). size.py counts this
    // frame with the static RAM.
    // App::power_on's two steps written out: through power_on the app is made in its
    // frame and then copied into this one, 19 KB more stack for good.
    let mut app = App::new(storage.load_settings().unwrap_or_default());
    app.open_store(storage);

    // The data link on USB (none without the crystal's clock).
    let mut usb = None;
    if usb_clock {
        let periph = USB::new(
            (dp.OTG_FS_GLOBAL, dp.OTG_FS_DEVICE, dp.OTG_FS_PWRCLK),
            (gpioa.pa11, gpioa.pa12),
            &rcc.clocks,
        );
        let (Some(ep), Some(staging)) = (
            cortex_m::singleton!(: [u32; EP_WORDS] = [0; EP_WORDS]),
            cortex_m::singleton!(: [u8; STAGING_BYTES] = [0; STAGING_BYTES]),
        ) else {
            halt("USB buffers already made");
        };
        let Some(bus) =
            cortex_m::singleton!(: UsbBusAllocator<UsbBusType> = UsbBus::new(periph, ep))
        else {
            halt("USB bus already made");
        };
        let serial = SerialPort::new(bus);
        // The shared test IDs of stm32f4xx-hal's USB serial examples (a product needs
        // its own vendor and product IDs).
        let Ok(builder) = UsbDeviceBuilder::new(bus, UsbVidPid(0x16c0, 0x27dd))
            .device_class(usbd_serial::USB_CLASS_CDC)
            .strings(&[StringDescriptors::default()
                .manufacturer("leeward")
                .product("leeward handheld")
                .serial_number("1")])
        else {
            halt("USB strings refused");
        };
        let server = LinkServer::new(staging);
        // In this frame, as the app and the store are: no static, no copy on the way.
        usb = Some(link::UsbLink::new(builder.build(), serial, server));
    }
    if app.render(fb).is_err() {
        defmt::warn!("first render failed");
    }
    panel.flush(fb);

    let mut scanning = false;
    arm_wake(&mut rows, &mut cols, &mut exti);
    // SAFETY: the handlers above touch only their own flags and pending bits.
    unsafe {
        NVIC::unmask(Interrupt::EXTI9_5);
        NVIC::unmask(Interrupt::TIM2);
        NVIC::unmask(Interrupt::TIM5);
        if usb.is_some() {
            NVIC::unmask(Interrupt::OTG_FS);
        }
    }
    defmt::info!("leeward ready");

    loop {
        if VCOM_TICK.swap(false, Ordering::AcqRel) {
            panel.command(|lcd| lcd.toggle_vcom());
        }
        if KEY_EDGE.swap(false, Ordering::AcqRel) && !scanning {
            for col in cols.iter_mut() {
                col.disable_interrupt(&mut exti);
            }
            if scan_timer.start(SCAN_HZ.Hz()).is_err() {
                defmt::warn!("scan timer did not start");
            }
            scanning = true;
            SCAN_TICK.store(true, Ordering::Release); // first scan now
        }
        if scanning && SCAN_TICK.swap(false, Ordering::AcqRel) {
            let mut redraw = false;
            for key in debouncer.update(scan(&mut rows, &cols)) {
                let effect = app.handle(key);
                defmt::debug!("{} -> {}", key, effect);
                if app.apply(effect, storage).is_err() {
                    defmt::warn!("settings not stored");
                }
                redraw |= effect != Effect::Nothing;
            }
            if redraw {
                if app.render(fb).is_err() {
                    defmt::warn!("render failed");
                }
                panel.flush(fb);
            }
            if debouncer.is_idle() {
                let _ = scan_timer.cancel();
                scanning = false;
                arm_wake(&mut rows, &mut cols, &mut exti);
            }
        }
        if let Some(link) = usb.as_mut() {
            if link::USB_EVENT.swap(false, Ordering::AcqRel) || link.wants_more() {
                let mut watched = Watched::new(&mut *storage);
                link.service(&mut watched);
                if watched.changed() {
                    // The laptop stored or deleted a dataset: the lists show it now.
                    app.open_store(storage);
                    if app.render(fb).is_err() {
                        defmt::warn!("render failed");
                    }
                    panel.flush(fb);
                }
            }
        }
        // Check the flags with interrupts off, so none can slip in between the check and
        // the WFI; a pending interrupt still ends the WFI.
        let link_more = usb.as_ref().is_some_and(|l| l.wants_more());
        cortex_m::interrupt::free(|_| {
            let busy = KEY_EDGE.load(Ordering::Acquire)
                || VCOM_TICK.load(Ordering::Acquire)
                || (scanning && SCAN_TICK.load(Ordering::Acquire))
                || link::USB_EVENT.load(Ordering::Acquire)
                || link_more;
            if !busy {
                cortex_m::asm::wfi();
            }
        });
    }
}
