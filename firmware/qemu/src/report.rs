//! What the image prints through semihosting, and the tally of failures.
//!
//! One line per item, with a leading word that scripts/target-check reads:
//! `check ok|FAIL <name>: <detail>`, `count <instructions> <budget> <stack bytes> ok|OVER
//! <name>`, `study ...` for the f32 study, `info ...` for the rest.

use core::fmt;

use cortex_m_semihosting::hprintln;

use crate::meter::Measure;

/// The deepest stack seen, with the name of what used it.
#[derive(Clone, Copy)]
pub struct Deepest {
    /// Bytes below the caller's frame.
    pub bytes: usize,
    /// What ran.
    pub name: &'static str,
}

/// Failures so far and the deepest stack.
pub struct Report {
    /// Checks failed and budgets broken.
    pub failures: u32,
    /// Checks run.
    pub checks: u32,
    /// The deepest measured stack.
    pub deepest: Deepest,
}

impl Report {
    /// A report with nothing in it.
    pub const fn new() -> Self {
        Report {
            failures: 0,
            checks: 0,
            deepest: Deepest { bytes: 0, name: "" },
        }
    }

    /// One check value: `ok` is the comparison, `detail` says what against what source.
    pub fn check(&mut self, name: &str, ok: bool, detail: fmt::Arguments) {
        self.checks += 1;
        if !ok {
            self.failures += 1;
        }
        let word = if ok { "ok  " } else { "FAIL" };
        hprintln!("check {} {}: {}", word, name, detail);
    }

    /// One measured calculation against its instruction budget.
    pub fn count(&mut self, name: &'static str, m: &Measure, budget: u64) {
        let over = m.instructions > budget;
        self.stack(name, m);
        if over {
            self.failures += 1;
        }
        hprintln!(
            "count {:>9} {:>9} {:>6} {} {}",
            m.instructions,
            budget,
            m.stack_bytes,
            if over { "OVER" } else { "ok" },
            name
        );
    }

    /// Keep the deepest stack; a stack past the painted area is a failure.
    pub fn stack(&mut self, name: &'static str, m: &Measure) {
        if m.stack_overflowed_paint {
            self.failures += 1;
            hprintln!(
                "check FAIL {}: stack reached the bottom of the painted area",
                name
            );
        }
        if m.stack_bytes > self.deepest.bytes {
            self.deepest = Deepest {
                bytes: m.stack_bytes,
                name,
            };
        }
    }
}

/// Relative difference |got − want| / |want| (absolute when `want` is 0).
pub fn rel(got: f64, want: f64) -> f64 {
    let d = libm::fabs(got - want);
    if want == 0.0 {
        d
    } else {
        d / libm::fabs(want)
    }
}
