//! Helpers shared by the command-line tests.
#![allow(dead_code)]

use std::path::PathBuf;
use std::process::{Command, Output};

pub fn leeward(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_leeward"))
        .args(args)
        .output()
        .expect("the leeward binary runs")
}

/// A file under host-sim/tests/data.
pub fn data(name: &str) -> String {
    let p: PathBuf = [env!("CARGO_MANIFEST_DIR"), "tests", "data", name]
        .iter()
        .collect();
    p.to_string_lossy().into_owned()
}

/// A file under the repository's demo/ folder.
pub fn demo_file(name: &str) -> String {
    let p: PathBuf = [env!("CARGO_MANIFEST_DIR"), "..", "demo", name]
        .iter()
        .collect();
    p.to_string_lossy().into_owned()
}

/// Run with --json; the command must succeed.
pub fn json(args: &[&str]) -> serde_json::Value {
    let mut a = args.to_vec();
    a.push("--json");
    let out = leeward(&a);
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("valid JSON")
}

/// Run for the readable report; the command must succeed.
pub fn text(args: &[&str]) -> String {
    let out = leeward(args);
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).expect("UTF-8 output")
}

/// A bad input: exit 2, one line on stderr that contains `needle`, nothing on stdout, no panic.
pub fn refused(args: &[&str], needle: &str) {
    let out = leeward(args);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    assert_eq!(
        err.trim_end().lines().count(),
        1,
        "{args:?}: one line expected, got {err}"
    );
    assert!(err.contains(needle), "{args:?}: '{needle}' not in {err}");
    assert!(!err.contains("panicked"), "{err}");
    assert!(out.stdout.is_empty());
}

pub fn num(v: &serde_json::Value, key: &str) -> f64 {
    v[key]
        .as_f64()
        .unwrap_or_else(|| panic!("{key} missing or not a number in {v}"))
}
