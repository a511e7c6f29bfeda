//! Golden screenshots: every key script in tests/golden/ is run through `leeward shots`
//! from power-on, and each screenshot must equal its reference PNG beside the script,
//! pixel for pixel. docs/img/ holds the same pictures for the manual.
//!
//! On a difference the test writes NAME.new.png (what the screen is now) and
//! NAME.diff.png (red: ink only now; blue: ink only in the reference; grey: ink in
//! both) beside the reference and fails naming them. After a deliberate change, refresh
//! the references and docs/img/ with
//! `LEEWARD_BLESS=1 cargo test -p leeward-sim --test golden` and look at the pictures
//! before committing them.

mod common;
use common::leeward;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

fn repo() -> PathBuf {
    let here = Path::new(env!("CARGO_MANIFEST_DIR"));
    here.parent().unwrap_or(here).to_path_buf()
}
fn golden_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/golden")
}
fn docs_img() -> PathBuf {
    repo().join("docs/img")
}
fn bless() -> bool {
    std::env::var_os("LEEWARD_BLESS").is_some_and(|v| v == "1")
}

/// Files in `dir` whose names end with `suffix`, sorted.
fn files(dir: &Path, suffix: &str) -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .map(|rd| rd.map(|e| e.unwrap().path()).collect())
        .unwrap_or_default();
    v.retain(|p| p.to_string_lossy().ends_with(suffix));
    v.sort();
    v
}

/// The reference pictures beside the scripts (not the .new and .diff files a failed run
/// leaves): path and file name.
fn references() -> Vec<(PathBuf, String)> {
    files(&golden_dir(), ".png")
        .into_iter()
        .map(|p| {
            let name = p.file_name().unwrap().to_string_lossy().into_owned();
            (p, name)
        })
        .filter(|(_, n)| !n.ends_with(".new.png") && !n.ends_with(".diff.png"))
        .collect()
}

/// A decoded picture: width, height, and one grey byte per pixel (0 ink, 255 paper).
struct Picture {
    w: u32,
    h: u32,
    grey: Vec<u8>,
}

fn decode(path: &Path) -> Picture {
    let f = std::io::BufReader::new(
        std::fs::File::open(path).unwrap_or_else(|e| panic!("{}: {e}", path.display())),
    );
    let mut d = png::Decoder::new(f);
    d.set_transformations(png::Transformations::EXPAND);
    let mut r = d
        .read_info()
        .unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    let mut buf = vec![0; r.output_buffer_size().unwrap()];
    let info = r.next_frame(&mut buf).unwrap();
    assert_eq!(
        info.color_type,
        png::ColorType::Grayscale,
        "{}: a screenshot is grey",
        path.display()
    );
    buf.truncate(info.buffer_size());
    // One-bit grey expands to 0 or 1 per pixel with EXPAND; scale it to 0 or 255.
    let grey = if info.bit_depth == png::BitDepth::One {
        buf.iter().map(|&b| if b == 0 { 0 } else { 255 }).collect()
    } else {
        buf
    };
    Picture {
        w: info.width,
        h: info.height,
        grey,
    }
}

/// Red where only `new` has ink, blue where only `old` has, grey where both have.
fn write_diff(old: &Picture, new: &Picture, path: &Path) {
    let (w, h) = (new.w, new.h);
    let mut rgb = Vec::with_capacity((w * h * 3) as usize);
    for i in 0..(w * h) as usize {
        let a = old.grey.get(i).is_some_and(|&g| g < 128);
        let b = new.grey[i] < 128;
        rgb.extend_from_slice(match (a, b) {
            (true, true) => &[170, 170, 170],
            (false, true) => &[230, 0, 0],
            (true, false) => &[0, 60, 230],
            (false, false) => &[255, 255, 255],
        });
    }
    let f = std::fs::File::create(path).unwrap();
    let mut enc = png::Encoder::new(std::io::BufWriter::new(f), w, h);
    enc.set_color(png::ColorType::Rgb);
    enc.set_depth(png::BitDepth::Eight);
    let mut wr = enc.write_header().unwrap();
    wr.write_image_data(&rgb).unwrap();
}

/// Run every script; the screenshots by name (unique across scripts).
fn take_all(out: &Path) -> BTreeMap<String, PathBuf> {
    let scripts = files(&golden_dir(), ".keys");
    assert!(scripts.len() >= 8, "the golden scripts are missing");
    let mut shots = BTreeMap::new();
    for script in scripts {
        let stem = script.file_stem().unwrap().to_string_lossy().into_owned();
        let dir = out.join(&stem);
        let _ = std::fs::remove_dir_all(&dir);
        let o = leeward(&[
            "shots",
            "--keys",
            script.to_str().unwrap(),
            "--out",
            dir.to_str().unwrap(),
        ]);
        assert!(
            o.status.success(),
            "{}: {}",
            script.display(),
            String::from_utf8_lossy(&o.stderr)
        );
        for png in files(&dir, ".png") {
            let name = png.file_stem().unwrap().to_string_lossy().into_owned();
            let again = shots.insert(name.clone(), png);
            assert!(again.is_none(), "shot {name} is taken by two scripts");
        }
    }
    shots
}

#[test]
fn every_screen_equals_its_reference() {
    let out = Path::new(env!("CARGO_TARGET_TMPDIR")).join("golden-shots");
    let shots = take_all(&out);
    let gold = golden_dir();
    let mut failures = Vec::new();
    for (name, new_path) in &shots {
        let reference = gold.join(format!("{name}.png"));
        let new_file = gold.join(format!("{name}.new.png"));
        let diff_file = gold.join(format!("{name}.diff.png"));
        let _ = std::fs::remove_file(&new_file);
        let _ = std::fs::remove_file(&diff_file);
        let new = decode(new_path);
        assert_eq!((new.w, new.h), (400, 240), "{name}: the device is 400×240");
        let same = reference.exists() && {
            let old = decode(&reference);
            (old.w, old.h) == (new.w, new.h) && old.grey == new.grey
        };
        if same {
            continue;
        }
        if bless() {
            std::fs::copy(new_path, &reference).unwrap();
            continue;
        }
        std::fs::copy(new_path, &new_file).unwrap();
        if reference.exists() {
            let old = decode(&reference);
            let changed = old
                .grey
                .iter()
                .zip(&new.grey)
                .filter(|(a, b)| a != b)
                .count();
            write_diff(&old, &new, &diff_file);
            failures.push(format!(
                "{name}: {changed} pixels differ; now: {}, difference: {}",
                new_file.display(),
                diff_file.display()
            ));
        } else {
            failures.push(format!(
                "{name}: no reference {}; the screen is in {}",
                reference.display(),
                new_file.display()
            ));
        }
    }
    // A reference that no script takes any more is stale.
    for (reference, file) in references() {
        let name = file.trim_end_matches(".png");
        if !shots.contains_key(name) {
            if bless() {
                std::fs::remove_file(&reference).unwrap();
            } else {
                failures.push(format!(
                    "{}: no script takes this shot any more",
                    reference.display()
                ));
            }
        }
    }
    // docs/img/ holds exactly the references, byte for byte.
    let img = docs_img();
    if bless() {
        std::fs::create_dir_all(&img).unwrap();
        for p in files(&img, ".png") {
            std::fs::remove_file(p).unwrap();
        }
        for name in shots.keys() {
            std::fs::copy(
                gold.join(format!("{name}.png")),
                img.join(format!("{name}.png")),
            )
            .unwrap();
        }
    }
    for name in shots.keys() {
        let (a, b) = (
            gold.join(format!("{name}.png")),
            img.join(format!("{name}.png")),
        );
        if a.exists() && std::fs::read(&a).ok() != std::fs::read(&b).ok() {
            failures.push(format!("{}: not a copy of {}", b.display(), a.display()));
        }
    }
    for p in files(&img, ".png") {
        let name = p.file_stem().unwrap().to_string_lossy().into_owned();
        if !shots.contains_key(&name) {
            failures.push(format!(
                "{}: no golden screenshot has this name",
                p.display()
            ));
        }
    }
    assert!(
        failures.is_empty(),
        "golden screenshots differ (after a deliberate change: \
         LEEWARD_BLESS=1 cargo test -p leeward-sim --test golden):\n{}",
        failures.join("\n")
    );
}

#[test]
fn the_manual_shows_every_screen() {
    let manual = std::fs::read_to_string(repo().join("docs/manual.md")).unwrap();
    for (_, file) in references() {
        assert!(
            manual.contains(&format!("(img/{file})")),
            "docs/manual.md does not show img/{file}"
        );
    }
    // And every picture it shows exists.
    for part in manual.split("](img/").skip(1) {
        let file = part.split(')').next().unwrap();
        assert!(
            docs_img().join(file).exists(),
            "docs/manual.md shows a missing img/{file}"
        );
    }
}
