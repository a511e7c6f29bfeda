//! Not a check: writes every screen as a PBM picture under target/screens when run with
//! `cargo test -p leeward-firmware --test dump -- --ignored`, for a person to look at.
mod common;
use common::*;
use leeward_firmware::{App, Key::*};

#[test]
#[ignore]
fn dump_screens() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../target/screens");
    std::fs::create_dir_all(&dir).unwrap();
    let seqs: &[(&str, &[leeward_firmware::Key])] = &[
        ("home", &[]),
        ("site-form", &[Ok]),
        ("site-edit", &[Ok, Ok, Left]),
        ("site-result", &[Ok, Down, Ok]),
        ("site-bad", &[Ok, Ok, Digit(9), Ok]),
        ("column-menu", &[Down, Ok]),
        ("stretch-form", &[Down, Ok, Ok]),
        ("stretch-result", &[Down, Ok, Ok, Up, Ok]),
        ("depth-result", &[Down, Ok, Down, Ok, Up, Ok]),
        ("settings", &[Up, Up, Ok]),
        ("about-1", &[Up, Ok]),
        ("about-2", &[Up, Ok, Right]),
        ("about-3", &[Up, Ok, Right, Right]),
        ("network-list", &[Down, Down, Ok]),
        ("sounding-1", &[Down, Down, Down, Ok]),
        ("sounding-2", &[Down, Down, Down, Ok, Right]),
        ("sounding-3", &[Down, Down, Down, Ok, Right, Right]),
        ("sounding-4", &[Down, Down, Down, Ok, Right, Right, Right]),
        ("station-edit", &[Down, Down, Ok, Ok, Ok, Left, Up]),
        ("network-wind", &[Down, Down, Ok, Up, Ok]),
        ("network-zeta", &[Down, Down, Ok, Up, Ok, Right]),
        ("network-residuals", &[Down, Down, Ok, Up, Ok, Right, Right]),
        (
            "network-map",
            &[Down, Down, Ok, Up, Ok, Right, Right, Right],
        ),
        ("crossing-form", &[Down, Down, Down, Down, Ok]),
        (
            "crossing-easterly-plan",
            &[
                Down,
                Down,
                Down,
                Down,
                Ok,
                Down,
                Ok,
                Delete,
                Delete,
                Delete,
                Digit(9),
                Digit(0),
                Ok,
                Up,
                Up,
                Up,
                Ok,
                Right,
                Right,
                Right,
            ],
        ),
        (
            "crossing-easterly-section",
            &[
                Down,
                Down,
                Down,
                Down,
                Ok,
                Down,
                Ok,
                Delete,
                Delete,
                Delete,
                Digit(9),
                Digit(0),
                Ok,
                Up,
                Up,
                Up,
                Ok,
                Right,
                Right,
                Right,
                Right,
            ],
        ),
        (
            "crossing-easterly-1",
            &[
                Down,
                Down,
                Down,
                Down,
                Ok,
                Down,
                Ok,
                Delete,
                Delete,
                Delete,
                Digit(9),
                Digit(0),
                Ok,
                Up,
                Up,
                Up,
                Ok,
            ],
        ),
        ("crossing-form-end", &[Down, Down, Down, Down, Ok, Up]),
        ("crossing-1", &[Down, Down, Down, Down, Ok, Up, Ok]),
        ("crossing-2", &[Down, Down, Down, Down, Ok, Up, Ok, Right]),
        (
            "crossing-3",
            &[Down, Down, Down, Down, Ok, Up, Ok, Right, Right],
        ),
        (
            "crossing-4",
            &[Down, Down, Down, Down, Ok, Up, Ok, Right, Right, Right],
        ),
        (
            "crossing-5",
            &[
                Down, Down, Down, Down, Ok, Up, Ok, Right, Right, Right, Right,
            ],
        ),
    ];
    for (name, keys) in seqs {
        let mut app = App::default();
        press(&mut app, keys);
        Shot::of(&app).save_pbm(&dir.join(format!("{name}.pbm")));
    }
}
