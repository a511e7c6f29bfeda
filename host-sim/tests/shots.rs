//! `leeward shots`: a script runs headless from power-on and writes the screenshots it
//! names; a bad script exits 2 with one line naming the token and its line.

mod common;
use common::{leeward, refused};
use std::path::PathBuf;

/// A fresh folder under the target directory for one test.
fn scratch(name: &str) -> PathBuf {
    let d = PathBuf::from(env!("CARGO_TARGET_TMPDIR"))
        .join("shots")
        .join(name);
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Width, height, colour type and bit depth of a PNG.
fn png_info(path: &std::path::Path) -> (u32, u32, png::ColorType, png::BitDepth) {
    let f = std::io::BufReader::new(std::fs::File::open(path).unwrap());
    let r = png::Decoder::new(f).read_info().unwrap();
    let i = r.info();
    (i.width, i.height, i.color_type, i.bit_depth)
}

#[test]
fn a_script_writes_the_shots_it_names() {
    let d = scratch("good");
    let script = d.join("walk.keys");
    std::fs::write(
        &script,
        "# power-on, then the Site result\n@home\nOK Down ok # keys by name, any case\n@site_1\n\
         menu @home-again\n",
    )
    .unwrap();
    let out = d.join("pictures");
    let o = leeward(&[
        "shots",
        "--keys",
        script.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let report = String::from_utf8(o.stdout).unwrap();
    let mut names: Vec<String> = std::fs::read_dir(&out)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    assert_eq!(names, ["home-again.png", "home.png", "site_1.png"]);
    // The report lists each file in script order with the keys pressed before it.
    let lines: Vec<&str> = report.lines().collect();
    assert_eq!(lines.len(), 3, "{report}");
    assert!(lines[0].ends_with("home.png (after 0 keys)"), "{report}");
    assert!(lines[1].ends_with("site_1.png (after 3 keys)"), "{report}");
    assert!(
        lines[2].ends_with("home-again.png (after 4 keys)"),
        "{report}"
    );
    for n in &names {
        // The device's pixels and nothing else: 400×240, one bit per pixel.
        assert_eq!(
            png_info(&out.join(n)),
            (400, 240, png::ColorType::Grayscale, png::BitDepth::One),
            "{n}"
        );
    }
    // --json lists the same shots as one object.
    let v = common::json(&[
        "shots",
        "--keys",
        script.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    let shots = v["shots"].as_array().unwrap();
    let got: Vec<(&str, u64)> = shots
        .iter()
        .map(|s| {
            (
                s["name"].as_str().unwrap(),
                s["after_keys"].as_u64().unwrap(),
            )
        })
        .collect();
    assert_eq!(got, [("home", 0), ("site_1", 3), ("home-again", 4)]);
    assert!(shots[1]["file"].as_str().unwrap().ends_with("site_1.png"));
    // Home before and after MENU is the same screen; the Site result is another.
    let read = |n: &str| std::fs::read(out.join(n)).unwrap();
    assert_eq!(read("home.png"), read("home-again.png"));
    assert_ne!(read("home.png"), read("site_1.png"));
}

#[test]
fn an_unknown_key_exits_2_naming_it_and_its_line() {
    let d = scratch("unknown");
    let script = d.join("typo.keys");
    std::fs::write(&script, "@home\nok\n  down enter ok\n").unwrap();
    let out = d.join("none");
    let s = script.to_str().unwrap();
    refused(
        &["shots", "--keys", s, "--out", out.to_str().unwrap()],
        "line 3: unknown key 'enter'",
    );
    // Nothing was written: the whole script is read before the first key.
    assert!(!out.exists());
    let o = leeward(&["shots", "--keys", s, "--out", out.to_str().unwrap()]);
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("typo.keys"), "{err}");
}

#[test]
fn bad_tokens_and_files_are_refused() {
    let d = scratch("bad");
    let out = d.join("out");
    let o = out.to_str().unwrap();
    for (text, needle) in [
        ("ok*0", "line 1: 'ok*0': a repeat is *N"),
        ("ok\n@Home", "line 2: '@Home': a shot name"),
        ("@a\n@a", "line 2: '@a': this shot name is used twice"),
    ] {
        let script = d.join("s.keys");
        std::fs::write(&script, text).unwrap();
        refused(
            &["shots", "--keys", script.to_str().unwrap(), "--out", o],
            needle,
        );
    }
    let missing = d.join("missing.keys");
    refused(
        &["shots", "--keys", missing.to_str().unwrap(), "--out", o],
        "cannot read the key script",
    );
    refused(&["shots", "--out", o], "--keys");
}

#[test]
fn help_documents_the_script_syntax_and_the_store() {
    let o = leeward(&["shots", "--help"]);
    assert!(o.status.success());
    let s = String::from_utf8_lossy(&o.stdout);
    for needle in ["@NAME", "TOKEN*N", "# ...", "digits", "status 2"] {
        assert!(
            s.contains(needle),
            "{needle} missing from shots --help: {s}"
        );
    }
    let o = leeward(&["sim", "--help"]);
    let s = String::from_utf8_lossy(&o.stdout);
    assert!(s.contains("--terminal") && s.contains("--zoom"), "{s}");
    assert!(
        s.contains("flash image file") && s.contains("--flash"),
        "{s}"
    );
    assert!(s.contains("libsdl2-dev"), "{s}");
}

#[test]
fn the_terminal_front_end_needs_a_terminal() {
    // Under the test harness standard input is not a terminal: a clear refusal, no mess.
    refused(&["sim", "--terminal"], "not a terminal");
    refused(&["sim", "--blocks", "quad"], "--terminal");
    refused(&["sim", "--terminal", "--json"], "--json");
}

#[cfg(not(feature = "window"))]
#[test]
fn without_the_window_feature_sim_says_how_to_build_it() {
    refused(&["sim"], "--features window");
}
