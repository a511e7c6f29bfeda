//! # leeward-qemu
//!
//! leeward on an emulated Cortex-M4F: QEMU's `mps2-an386` machine runs this image, which
//! checks leeward-core's results against sourced check values, counts the instructions of
//! each calculation and of the firmware's screens, measures their stack by painting, and
//! compares f32 with f64 versions of the kernels. It prints through semihosting and exits
//! with a failing status on any failed check or broken budget. Run it with
//! `scripts/target-check` (or `cargo run --release` here); see docs/performance.md.
#![no_std]
#![no_main]

mod calc;
mod meter;
mod report;
mod screens;
mod study;

use cortex_m_rt::entry;
use cortex_m_semihosting::{debug, hprintln};

use report::Report;

#[entry]
fn main() -> ! {
    meter::start_counter();
    let mut r = Report::new();
    match meter::calibrate() {
        Ok(n) => hprintln!(
            "info calibration: a loop of 2000000 instructions counted {}",
            n
        ),
        Err(n) => {
            hprintln!(
                "check FAIL calibration: a loop of 2000000 instructions counted {} (is QEMU run with -icount shift=0?)",
                n
            );
            debug::exit(debug::EXIT_FAILURE);
        }
    }
    calc::rotation(&mut r);
    calc::network(&mut r, 8, "network fit, 8 stations");
    calc::network(&mut r, 32, "network fit, 32 stations");
    calc::stretching(&mut r);
    calc::crossing(&mut r);
    calc::standard_atmosphere(&mut r);
    calc::sounding_100(&mut r);
    calc::demo_sounding(&mut r);
    calc::temp_decode(&mut r);
    calc::breakdown(&mut r);
    screens::run(&mut r);
    study::run(&mut r);
    hprintln!("stack {} {}", r.deepest.bytes, r.deepest.name);
    hprintln!("info {} checks, {} failures", r.checks, r.failures);
    debug::exit(if r.failures == 0 {
        debug::EXIT_SUCCESS
    } else {
        debug::EXIT_FAILURE
    });
    loop {
        cortex_m::asm::wfi();
    }
}

/// A fault (a stack overflow into the statics, a bad access) is a failure too, not a hang.
#[cortex_m_rt::exception]
unsafe fn HardFault(frame: &cortex_m_rt::ExceptionFrame) -> ! {
    hprintln!("check FAIL hard fault at pc {:#010x}", frame.pc());
    debug::exit(debug::EXIT_FAILURE);
    loop {
        cortex_m::asm::wfi();
    }
}

/// A panic is a failure: say where, and exit with a failing status.
#[panic_handler]
fn panic(info: &core::panic::PanicInfo) -> ! {
    hprintln!("check FAIL panic: {}", info);
    debug::exit(debug::EXIT_FAILURE);
    loop {
        cortex_m::asm::wfi();
    }
}
