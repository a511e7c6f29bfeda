//! Every screen of every task, drawn into a target that counts pixels outside 400×240,
//! with every piece of text measured against its box; the share of display lines a key
//! press changes; and every core error fitting the notice.
mod common;
use common::*;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;
use leeward_core::sounding::LevelProblem;
use leeward_core::Error;
use leeward_firmware::app::Screen;
use leeward_firmware::framebuffer::{FrameBuffer, HEIGHT};
use leeward_firmware::settings::{HeightUnit, LatEntry, Settings, WindUnit};
use leeward_firmware::storage::MemStorage;
use leeward_firmware::ui::Painter;
use leeward_firmware::widgets::draw_notice;
use leeward_firmware::{App, Key, Key::*};

/// Key sequences from power-on that reach every screen, every form row, editing, the
/// notices, and the results with awkward values.
fn tour() -> Vec<(&'static str, Vec<Key>)> {
    let mut v: Vec<(&'static str, Vec<Key>)> = vec![
        ("home", vec![]),
        ("home last row", vec![Up]),
        ("site form", vec![Ok]),
        ("site edit", vec![Ok, Ok]),
        ("site edit cursor left", vec![Ok, Ok, Left, Left]),
        ("site compute row", vec![Ok, Down]),
        ("site result", vec![Ok, Down, Ok]),
        (
            "site bad entry notice",
            vec![
                Ok,
                Ok,
                Delete,
                Delete,
                Delete,
                Delete,
                Digit(9),
                Digit(9),
                Ok,
            ],
        ),
        (
            "site empty notice",
            vec![Ok, Ok, Delete, Delete, Delete, Delete, Ok],
        ),
        (
            "site not a number",
            vec![Ok, Ok, Delete, Delete, Delete, Delete, Sign, Ok],
        ),
        ("column menu", vec![Down, Ok]),
        ("column menu depth", vec![Down, Ok, Down]),
        ("depth form", vec![Down, Ok, Down, Ok]),
        ("stretch result", vec![Down, Ok, Ok, Up, Ok]),
        ("depth result", vec![Down, Ok, Down, Ok, Up, Ok]),
        ("settings", vec![Up, Up, Ok]),
        (
            "settings changed",
            vec![Up, Up, Ok, Ok, Down, Ok, Ok, Down, Ok, Down, Ok],
        ),
        ("about 1", vec![Up, Ok]),
        ("about 2", vec![Up, Ok, Right]),
        ("about 3", vec![Up, Ok, Right, Right]),
        // Long entries, full fields, extreme results.
        ("stretch full field", {
            let mut k = vec![Down, Ok, Ok, Down, Down, Ok];
            k.extend(std::iter::repeat_n(Digit(9), 20));
            k
        }),
        ("stretch deep end", {
            let mut k = vec![Down, Ok, Ok, Down, Down, Ok];
            k.extend([Delete; 8]);
            k.extend([Digit(1), Ok, Down, Ok]);
            k.extend([Delete; 8]);
            k.extend([Digit(3), Digit(0), Digit(0), Digit(0), Digit(0), Ok, Ok]);
            k
        }),
        ("depth huge", {
            // Start ζ just above −f: a tiny PV, so a huge depth.
            let mut k = vec![Down, Ok, Down, Ok, Down, Ok];
            k.extend([Delete; 8]);
            k.extend(typing("-10.39"));
            k.extend([Ok, Down, Down, Ok]);
            k.extend([Delete; 8]);
            k.extend(typing("150"));
            k.extend([Ok, Ok]);
            k
        }),
    ];
    // Network: the list, every editor row, editing, each result page, the notices.
    let net = vec![Down, Down, Ok];
    let with = |extra: &[Key]| {
        let mut k = net.clone();
        k.extend_from_slice(extra);
        k
    };
    v.extend([
        ("network list", with(&[])),
        ("network list add row", with(&[Up, Up])),
        ("network list save row", with(&[Up, Up, Up, Up])),
        ("network save name", with(&[Up, Up, Up, Up, Ok, Digit(7)])),
        ("network load list", with(&[Up, Up, Up, Ok])),
        ("network list compute row", with(&[Up])),
        ("network wind", with(&[Up, Ok])),
        ("network zeta", with(&[Up, Ok, Right])),
        ("network residuals", with(&[Up, Ok, Right, Right])),
        ("network map", with(&[Up, Ok, Right, Right, Right])),
        ("station id editing", with(&[Ok, Ok, Left, Up, Up])),
        ("station id full", {
            let mut k = with(&[Ok, Ok]);
            k.extend([Digit(8); 10]);
            k
        }),
        ("station new, empty", with(&[Up, Up, Ok])),
        ("station new id notice", with(&[Up, Up, Ok, Ok, Ok])),
        (
            "network empty id notice",
            with(&[Up, Up, Ok, Back, Down, Down, Down, Down, Ok]),
        ),
        ("network too few", {
            let mut k = net.clone();
            for _ in 0..5 {
                k.extend([Ok, Up, Ok]);
            }
            k.extend([Up, Ok]);
            k
        }),
        ("network none left", {
            let mut k = net.clone();
            for _ in 0..7 {
                k.extend([Ok, Up, Ok]);
            }
            k.extend([Up, Ok]);
            k
        }),
        ("network suspect residuals", {
            let mut k = with(&[Down, Down, Ok, Down, Down, Down, Ok]);
            k.extend([Delete; 12]);
            k.extend(typing("5900"));
            k.extend([Ok, Back, Up, Up, Up, Ok, Right, Right]);
            k
        }),
        ("network suspect wind", {
            let mut k = with(&[Down, Down, Ok, Down, Down, Down, Ok]);
            k.extend([Delete; 12]);
            k.extend(typing("5900"));
            k.extend([Ok, Back, Up, Up, Up, Ok]);
            k
        }),
        ("network suspect map", {
            let mut k = with(&[Down, Down, Ok, Down, Down, Down, Ok]);
            k.extend([Delete; 12]);
            k.extend(typing("5900"));
            k.extend([Ok, Back, Up, Up, Up, Ok, Right, Right, Right]);
            k
        }),
        ("network south", {
            // Every latitude negated: the same layout in the southern hemisphere.
            let mut k = net.clone();
            for i in 0..7 {
                k.extend([Ok, Down, Ok, Sign, Ok, Back, Down]);
                let _ = i;
            }
            k.extend([Down, Down, Down, Ok, Right]);
            k
        }),
    ]);
    // Ridge crossing: the form scrolled to each row, editing, every result page, the
    // pages without a trough, the notices.
    let cross = vec![Down, Down, Down, Down, Ok];
    let cwith = |extra: &[Key]| {
        let mut k = cross.clone();
        k.extend_from_slice(extra);
        k
    };
    for rows in 0..11 {
        let mut k = cross.clone();
        k.extend(std::iter::repeat_n(Down, rows));
        v.push(("crossing row", k.clone()));
        if rows < 10 {
            k.push(Ok);
            v.push(("crossing row editing", k));
        }
    }
    v.extend([
        ("crossing trough", cwith(&[Up, Ok])),
        ("crossing wave", cwith(&[Up, Ok, Right])),
        ("crossing froude", cwith(&[Up, Ok, Right, Right])),
        ("crossing plan", cwith(&[Up, Ok, Right, Right, Right])),
        (
            "crossing section",
            cwith(&[Up, Ok, Right, Right, Right, Right]),
        ),
        ("crossing full field", {
            let mut k = cwith(&[Down, Down, Down, Down, Down, Down, Ok]);
            k.extend(std::iter::repeat_n(Digit(9), 20));
            k
        }),
        ("crossing wind notice", {
            let mut k = cwith(&[Ok]);
            k.extend([Delete; 12]);
            k.extend([Digit(9), Digit(9), Digit(9), Ok]);
            k
        }),
    ]);
    for (name, dir, speed) in [
        ("crossing easterly", "90", "20"),
        ("crossing southwesterly strong", "225", "60"),
        ("crossing slow", "280", "1"),
    ] {
        for page in 0..5 {
            let mut k = cwith(&[Ok]);
            k.extend([Delete; 12]);
            k.extend(typing(speed));
            k.push(Ok);
            k.extend([Ok]);
            k.extend([Delete; 12]);
            k.extend(typing(dir));
            k.extend([Ok, Up, Up, Up, Ok]);
            k.extend(std::iter::repeat_n(Right, page));
            v.push((name, k));
        }
    }
    v.extend([
        ("sounding column", vec![Down, Down, Down, Ok]),
        ("sounding ridge", vec![Down, Down, Down, Ok, Right]),
        ("sounding shear", vec![Down, Down, Down, Ok, Right, Right]),
        (
            "sounding profile",
            vec![Down, Down, Down, Ok, Right, Right, Right],
        ),
    ]);
    // Data (third from the bottom of the home menu) and the Network task's saving and
    // loading; the tour's store starts with the demo set, as after a first power-on.
    let data = vec![Up, Up, Up, Ok];
    let dwith = |extra: &[Key]| {
        let mut k = data.clone();
        k.extend_from_slice(extra);
        k
    };
    let nwith = |extra: &[Key]| {
        let mut k = net.clone();
        k.extend_from_slice(extra);
        k
    };
    v.extend([
        ("data list", data.clone()),
        ("data item", dwith(&[Ok])),
        ("data item last row", dwith(&[Ok, Up])),
        ("data view", dwith(&[Ok, Ok])),
        ("data rename", dwith(&[Ok, Down, Ok])),
        (
            "data rename typed",
            dwith(&[Ok, Down, Ok, Digit(7), Delete, Digit(9)]),
        ),
        ("data rename done", dwith(&[Ok, Down, Ok, Digit(7), Ok])),
        (
            "data rename emptied",
            dwith(&[Ok, Down, Ok, Delete, Delete, Delete, Delete, Ok]),
        ),
        ("data delete", dwith(&[Ok, Down, Down, Ok])),
        ("data deleted, list empty", dwith(&[Ok, Down, Down, Ok, Ok])),
        ("network save", nwith(&[Up, Up, Up, Up, Ok])),
        (
            "network save typed",
            nwith(&[Up, Up, Up, Up, Ok, Digit(1), Digit(2)]),
        ),
        (
            "network saved notice",
            nwith(&[Up, Up, Up, Up, Ok, Digit(1), Digit(2), Ok]),
        ),
        ("network save taken", nwith(&[Up, Up, Up, Up, Ok, Ok])),
        ("network load", nwith(&[Up, Up, Up, Ok])),
        ("network loaded", nwith(&[Up, Up, Up, Ok, Ok])),
    ]);
    for rows in 0..6 {
        let mut k = net.clone();
        k.push(Ok);
        k.extend(std::iter::repeat_n(Down, rows));
        v.push(("station row", k.clone()));
        k.push(Ok);
        v.push(("station row editing", k));
    }
    for rows in 0..6 {
        let mut k = vec![Down, Ok, Ok];
        k.extend(std::iter::repeat_n(Down, rows));
        v.push(("stretch row", k.clone()));
        k.push(Ok);
        v.push(("stretch row editing", k));
    }
    v
}

fn all_settings() -> Vec<Settings> {
    let mut out = vec![];
    for height in [HeightUnit::Metre, HeightUnit::Foot] {
        for lat_entry in [LatEntry::Decimal, LatEntry::DegMin] {
            for wind in [WindUnit::MetrePerSecond, WindUnit::KmPerHour] {
                out.push(Settings {
                    height,
                    wind,
                    lat_entry,
                    ..Settings::default()
                });
            }
        }
    }
    out
}

#[test]
fn every_screen_stays_on_the_display_and_in_its_boxes() {
    let mut seen = std::collections::HashSet::new();
    for s in all_settings() {
        for (name, keys) in tour() {
            let mut st = MemStorage::new();
            let mut app = App::new(s);
            app.open_store(&mut st);
            press_stored(&mut app, &mut st, &keys);
            seen.insert(format!("{:?}", app.screen()));
            let shot = Shot::of(&app);
            shot.assert_clean(&format!("{name} with {s:?}"));
            assert!(!shot.texts.is_empty(), "{name}: nothing drawn");
        }
    }
    // The tour reaches every screen there is.
    for screen in [
        Screen::Home,
        Screen::SiteForm,
        Screen::SiteResult,
        Screen::ColumnMenu,
        Screen::StretchForm,
        Screen::StretchResult,
        Screen::DepthForm,
        Screen::DepthResult,
        Screen::NetworkList,
        Screen::StationEdit,
        Screen::NetworkResult(0),
        Screen::NetworkResult(1),
        Screen::NetworkResult(2),
        Screen::NetworkResult(3),
        Screen::SoundingResult(0),
        Screen::SoundingResult(1),
        Screen::SoundingResult(2),
        Screen::SoundingResult(3),
        Screen::CrossingForm,
        Screen::CrossingResult(0),
        Screen::CrossingResult(1),
        Screen::CrossingResult(2),
        Screen::CrossingResult(3),
        Screen::CrossingResult(4),
        Screen::DataList,
        Screen::DataItem,
        Screen::DataView,
        Screen::DataRename,
        Screen::DataDelete,
        Screen::NetworkSave,
        Screen::NetworkLoad,
        Screen::Settings,
        Screen::About(0),
        Screen::About(1),
        Screen::About(2),
    ] {
        assert!(
            seen.contains(&format!("{screen:?}")),
            "tour misses {screen:?}"
        );
    }
}

#[test]
fn the_results_with_awkward_values_are_results() {
    // The tour's extreme cases must reach result pages, not only notices.
    for (name, keys) in tour() {
        let mut app = App::default();
        press(&mut app, &keys);
        match name {
            "stretch deep end" => {
                assert_eq!(app.screen(), Screen::StretchResult, "{:?}", app.notice())
            }
            "depth huge" => assert_eq!(app.screen(), Screen::DepthResult, "{:?}", app.notice()),
            "network suspect residuals" | "network residuals" => {
                assert_eq!(app.screen(), Screen::NetworkResult(2), "{:?}", app.notice())
            }
            "network suspect map" => {
                assert_eq!(app.screen(), Screen::NetworkResult(3), "{:?}", app.notice())
            }
            "network south" => {
                assert_eq!(app.screen(), Screen::NetworkResult(1), "{:?}", app.notice());
                assert!(app.network_result().unwrap().0.f0 < 0.0);
            }
            "crossing trough"
            | "crossing easterly"
            | "crossing southwesterly strong"
            | "crossing slow" => {
                assert!(
                    matches!(app.screen(), Screen::CrossingResult(_)),
                    "{name}: {:?}",
                    app.notice()
                )
            }
            "crossing wind notice" => assert!(app.notice().is_some(), "{name}: no notice"),
            "network too few" | "network none left" | "network empty id notice" => {
                assert!(app.notice().is_some(), "{name}: no notice")
            }
            _ => {}
        }
    }
}

#[test]
fn screens_show_at_most_eight_body_lines() {
    for (name, keys) in tour() {
        let mut app = App::default();
        press(&mut app, &keys);
        let shot = Shot::of(&app);
        // Body lines are the distinct tops of body-font text between the title band and
        // the footer rule.
        let mut tops: Vec<i32> = shot
            .texts
            .iter()
            .filter(|d| !d.text.is_empty() && d.area.top_left.y >= 30 && d.area.top_left.y < 215)
            .map(|d| d.area.top_left.y)
            .collect();
        tops.sort();
        tops.dedup();
        assert!(tops.len() <= 8, "{name}: {} body lines", tops.len());
    }
}

/// Lines changed by one key, after the screen before it was flushed.
fn changed_lines(app: &mut App, key: Key) -> usize {
    let mut fb = FrameBuffer::new();
    app.render(&mut fb).unwrap();
    fb.mark_clean();
    app.handle(key);
    app.render(&mut fb).unwrap();
    fb.dirty_count()
}

#[test]
fn a_typical_key_press_changes_a_small_share_of_lines() {
    // Moving down a menu: two rows change (old and new selection), 23 lines each.
    let mut app = App::default();
    let n = changed_lines(&mut app, Down);
    assert!(n > 0 && n <= 2 * 23, "menu move changed {n} lines");
    // A digit typed in a field changes its row and the footer hint at most.
    let mut app = App::default();
    press(&mut app, &[Ok, Ok]);
    let n = changed_lines(&mut app, Digit(3));
    assert!(n > 0 && n <= 23 + 20, "digit changed {n} lines");
    // Moving the cursor: one row.
    let n = changed_lines(&mut app, Left);
    assert!(n > 0 && n <= 23, "cursor move changed {n} lines");
    // A key that does nothing changes nothing.
    let mut app = App::default();
    let n = changed_lines(&mut app, Sign);
    assert_eq!(n, 0);
    // Over a walk through the forms, the average share stays small.
    let mut app = App::default();
    let walk = [
        Down,
        Ok,
        Ok,
        Down,
        Down,
        Ok,
        Digit(1),
        Left,
        Right,
        Delete,
        Ok,
        Down,
        Up,
        Up,
    ];
    let total: usize = walk.iter().map(|&k| changed_lines(&mut app, k)).sum();
    let share = total as f64 / (walk.len() * HEIGHT) as f64;
    println!("average share of lines changed per key: {share:.3}");
    assert!(share < 0.35, "share {share}");
}

/// One of each core error, with the widest values the core can produce. (Indices stop at
/// the capacities: the core's Display adds 1 to a u8/u16 index, which overflows at the
/// type's maximum — reported, not worked around here.)
fn every_error() -> Vec<Error> {
    vec![
        Error::NotFinite {
            what: "column depth (lid minus ground)",
        },
        Error::OutOfRange {
            what: "column depth (lid minus ground)",
            value: -123_456_789_012.5,
            min: -500.0,
            max: 30_000.0,
        },
        Error::NearEquator {
            lat_deg: -4.99,
            min_deg: 5.0,
        },
        Error::TooFewStations { need: 6, got: 2 },
        Error::TooManyStations { max: 32 },
        Error::DuplicateStation {
            index: 31,
            other: 30,
        },
        Error::BadStationId { len: 255 },
        Error::StationTooFar {
            index: 31,
            distance_km: 19_999.0,
            max_km: 2500.0,
        },
        Error::StationsCollinear {
            aspect: f64::INFINITY,
        },
        Error::StationsCollinear {
            aspect: 123_456_789.0,
        },
        Error::PoorGeometry {
            params: 6,
            condition: 1.234e15,
            limit: 1e4,
        },
        Error::DepthNotPositive {
            what: "column depth (lid minus ground)",
            depth_m: -29_999.0,
        },
        Error::InertiallyUnstable {
            abs_vorticity: -1.5e-3,
        },
        Error::NoDepthForVorticity,
        Error::WindAlongRidge { angle_deg: 10.0 },
        Error::LidBelowTerrain {
            lid_m: 30_000.0,
            terrain_m: 30_000.0,
        },
        Error::BadProfile {
            index: (leeward_core::crossing::MAX_PROFILE_POINTS - 1) as u8,
        },
        Error::BadLevel {
            index: (leeward_core::sounding::MAX_LEVELS - 1) as u16,
            problem: LevelProblem::PressureNotDecreasing,
        },
        Error::NoData {
            what: "a temperature at the lid and the ground",
        },
        Error::OutsideProfile {
            what: "lid height",
            height_m: 30_000.0,
            bottom_m: -500.0,
            top_m: 29_999.0,
        },
        Error::NotStable { n2: -1.0e-4 },
        Error::NoTropopause,
        Error::CapacityExceeded {
            what: "sounding levels",
            capacity: 65_535,
        },
    ]
}

#[test]
fn every_core_error_fits_the_notice() {
    for e in every_error() {
        let words = leeward_firmware::pages::error_words(&e);
        assert_eq!(words.as_str(), e.to_string(), "message cut short");
        let mut target = CheckTarget::new();
        let mut cap = Capture::default();
        let mut p = Painter::new(&mut target, &mut cap);
        draw_notice(&mut p, "Cannot compute", &words).unwrap();
        let shot = Shot {
            target,
            texts: cap.0,
        };
        shot.assert_clean(&format!("{e:?}"));
        // And none of its words is lost: the lines drawn put back together are the text.
        let drawn: Vec<&str> = shot.texts.iter().skip(1).map(|d| d.text.as_str()).collect();
        assert_eq!(
            drawn.join(" ").split_whitespace().collect::<Vec<_>>(),
            e.to_string().split_whitespace().collect::<Vec<_>>()
        );
    }
}

#[test]
fn the_check_target_sees_pixels_off_the_display() {
    // The checker itself must be able to fail.
    let mut t = CheckTarget::new();
    Rectangle::new(Point::new(390, 230), Size::new(20, 20))
        .into_styled(embedded_graphics::primitives::PrimitiveStyle::with_fill(
            embedded_graphics::pixelcolor::BinaryColor::On,
        ))
        .draw(&mut t)
        .unwrap();
    assert_eq!(t.outside, 20 * 20 - 10 * 10);
    t.draw_iter([Pixel(
        Point::new(-1, 0),
        embedded_graphics::pixelcolor::BinaryColor::On,
    )])
    .unwrap();
    assert_eq!(t.outside, 301);
}

#[test]
fn sounding_pages_with_every_part_missing_stay_in_their_boxes() {
    use leeward_core::sounding::stability::Tropopauses;
    use leeward_firmware::sounding::SoundingView;
    let missing = SoundingView {
        station: Default::default(),
        tropopauses: Tropopauses {
            first: None,
            second: None,
        },
        lid: Err(Error::NoTropopause),
        bulk_n_per_s: Err(Error::NotStable { n2: -1.0e-4 }),
        ridge_flow: Err(Error::OutsideProfile {
            what: "ridge crest",
            height_m: 30_000.0,
            bottom_m: -500.0,
            top_m: 29_999.0,
        }),
        barotropy: Err(Error::NoData {
            what: "winds with heights in the sounding",
        }),
        heights_flagged: 65_535,
        heights_worst_m: Some(-99_999.0),
        height_tolerance_m: 20.0,
        plot: Default::default(),
    };
    for s in all_settings() {
        let pages = [
            leeward_firmware::pages::sounding_column(&missing, &s),
            leeward_firmware::pages::sounding_froude(&missing, &s),
            leeward_firmware::pages::sounding_barotropy(&missing, &s),
        ];
        for (i, page) in pages.iter().enumerate() {
            let mut target = CheckTarget::new();
            let mut cap = Capture::default();
            let mut p = Painter::new(&mut target, &mut cap);
            page.draw(&mut p).unwrap();
            let shot = Shot {
                target,
                texts: cap.0,
            };
            shot.assert_clean(&format!("sounding page {i} with errors, {s:?}"));
            // The reason is on the page.
            assert!(page.note.is_some(), "page {i}: no reason shown");
        }
    }
}
