//! Any text given to the TEMP decoder gives a report or an error, never a panic or a
//! hang; a decoded profile is valid (pressure falling upward) and the sounding analysis
//! runs on it without a panic.
#![no_main]

use leeward_core::sounding::summary::{summarise, SummaryOptions};
use leeward_core::temp_code::{decode, DecodeOptions};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = core::str::from_utf8(data) else {
        return;
    };
    let opts = DecodeOptions {
        elevation_m: Some(500.0),
    };
    let Ok(report) = decode(text, &opts) else {
        return;
    };
    let levels = report.profile.levels();
    assert!(levels
        .windows(2)
        .all(|w| w[1].pressure_pa < w[0].pressure_pa));
    let _ = summarise(&report.profile, &SummaryOptions::default());
});
