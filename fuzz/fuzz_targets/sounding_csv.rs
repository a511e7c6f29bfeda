//! Any text given to the sounding CSV reader gives a profile or an error, never a panic;
//! a profile it reads, written back out, reads again with the same levels; and the whole
//! analysis runs on it without a panic.
#![no_main]

use leeward_core::sounding::csv::{parse, write};
use leeward_core::sounding::summary::{summarise, SummaryOptions};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = core::str::from_utf8(data) else {
        return;
    };
    let Ok(profile) = parse(text) else {
        return;
    };
    let _ = summarise(&profile, &SummaryOptions::default());
    let mut out = String::new();
    write(&profile, &mut out).expect("writing to a String cannot fail");
    let back = parse(&out).expect("a written profile must read back");
    assert_eq!(back.len(), profile.len());
});
