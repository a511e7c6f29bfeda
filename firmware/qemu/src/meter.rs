//! Instruction counts and stack depth on the emulated core.
//!
//! Counts: QEMU runs with `-icount shift=0`, so its virtual clock advances exactly 1 ns per
//! instruction executed. SysTick runs from the MPS2's 25 MHz CPU clock, so it moves one tick
//! every 40 instructions, from run to run the same. [`calibrate`] checks that scale against a
//! loop of known length before any figure is trusted; counts are exact to one tick (±40).
//!
//! SysTick counts down from 2^24 − 1 and its exception counts the wraps, so a count of any
//! length is exact (each wrap's exception adds a few dozen instructions and a 32-byte
//! frame on the stack, once per 671 million instructions).
//!
//! Stack: [`measure`] paints the free stack below the caller with a pattern, runs the work
//! and looks for the deepest word that changed (stack painting).

use core::ptr::{addr_of, read_volatile, write_volatile};
use core::sync::atomic::{AtomicU32, Ordering};

use cortex_m::peripheral::SYST;

/// Instructions per SysTick tick expected under `-icount shift=0` on the 25 MHz clock.
pub const INSTRUCTIONS_PER_TICK: u64 = 40;
/// SysTick's reload: the whole 24-bit range.
const RELOAD: u32 = 0x00FF_FFFF;
/// Wraps of the counter since [`start_counter`].
static WRAPS: AtomicU32 = AtomicU32::new(0);

#[cortex_m_rt::exception]
fn SysTick() {
    WRAPS.fetch_add(1, Ordering::Relaxed);
}
/// Painted below the caller's stack pointer (the deepest path needs about 40 KiB).
pub const PAINT_BYTES: usize = 192 * 1024;
/// Left unpainted just below the caller's frame (the painting loop calls nothing, so
/// this only covers the rare SysTick exception frame); a depth below it reads as 64 B.
const PAINT_GAP: usize = 64;
const PATTERN: u32 = 0xA5C3_5A3C;

extern "C" {
    /// End of the statics (cortex-m-rt's link.x): the lowest address the stack may reach.
    static __sheap: u32;
}

fn syst() -> &'static cortex_m::peripheral::syst::RegisterBlock {
    // SAFETY: SysTick's registers are always mapped on a Cortex-M; the image is single
    // threaded and enables no SysTick interrupt, so nothing else touches them.
    unsafe { &*SYST::PTR }
}

/// Start SysTick free-running on the processor clock, its exception counting the wraps.
pub fn start_counter() {
    let s = syst();
    // SAFETY: plain register writes: reload, clear, enable with CLKSOURCE = processor and
    // TICKINT (the handler above only counts).
    unsafe {
        s.rvr.write(RELOAD);
        s.cvr.write(0);
        s.csr.write(0b111);
    }
}

/// Ticks since [`start_counter`]: the wraps and the down-counter read consistently.
#[inline(always)]
fn ticks() -> u64 {
    let s = syst();
    loop {
        let w0 = WRAPS.load(Ordering::Relaxed);
        let v = s.cvr.read() & RELOAD;
        let w1 = WRAPS.load(Ordering::Relaxed);
        if w0 == w1 {
            return (w0 as u64 + 1) * (RELOAD as u64 + 1) - v as u64;
        }
    }
}

/// What one measurement found.
#[derive(Clone, Copy)]
pub struct Measure {
    /// Instructions executed, to one tick.
    pub instructions: u64,
    /// Deepest stack use below the caller's frame, bytes.
    pub stack_bytes: usize,
    /// The stack reached the bottom of the painted area: `stack_bytes` is a lower bound.
    pub stack_overflowed_paint: bool,
}

#[inline(always)]
fn sp() -> usize {
    cortex_m::register::msp::read() as usize
}

/// Run `work`, counting its instructions and measuring its stack.
#[inline(never)]
pub fn measure<R>(work: impl FnOnce() -> R) -> (Measure, R) {
    let top = sp() - PAINT_GAP;
    // `__sheap` is a linker symbol: only its address is taken.
    let floor = addr_of!(__sheap) as usize;
    let bottom = top.saturating_sub(PAINT_BYTES).max(floor) & !3;
    let mut a = bottom;
    while a < top {
        // SAFETY: [bottom, top) lies between the end of the statics and the live stack
        // (PAINT_GAP below this frame): nothing lives there (SysTick's rare exception frame
        // lands within the gap).
        unsafe { write_volatile(a as *mut u32, PATTERN) };
        a += 4;
    }
    let t0 = ticks();
    let r = work();
    let t1 = ticks();
    let mut low = bottom;
    // SAFETY: the same painted range, read back.
    while low < top && unsafe { read_volatile(low as *const u32) } == PATTERN {
        low += 4;
    }
    let m = Measure {
        instructions: (t1 - t0) * INSTRUCTIONS_PER_TICK,
        stack_bytes: (top + PAINT_GAP).saturating_sub(low),
        stack_overflowed_paint: low == bottom,
    };
    (m, r)
}

/// A loop of exactly `2 * n` instructions (a subtract and a branch per turn).
#[inline(never)]
fn known_loop(n: u32) {
    // SAFETY: register-only arithmetic and a local branch.
    unsafe {
        core::arch::asm!(
            "2:",
            "subs {0}, {0}, #1",
            "bne 2b",
            inout(reg) n => _,
            options(nomem, nostack),
        )
    };
}

/// Count a loop of known length; `Err` with the count when the scale is not one tick per
/// 40 instructions (QEMU not run with `-icount shift=0`, or another clock).
pub fn calibrate() -> Result<u64, u64> {
    const TURNS: u32 = 1_000_000;
    let (m, ()) = measure(|| known_loop(core::hint::black_box(TURNS)));
    let expected = 2 * TURNS as u64;
    // The call, the loop's set-up and one tick of rounding: well under 200 instructions.
    if m.instructions.abs_diff(expected) <= 200 {
        Ok(m.instructions)
    } else {
        Err(m.instructions)
    }
}
