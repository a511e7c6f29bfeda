//! From power-on to each result page with the keys alone: the figures on the screen equal
//! leeward-core's answer for the same inputs (to the last decimal shown). The expected
//! values are computed here by calling the core, never copied from the screen.
mod common;
use common::*;
use leeward_core::column::{depth_for_vorticity, stretch};
use leeward_core::demo;
use leeward_core::rotation::Rotation;
use leeward_firmware::app::Screen;
use leeward_firmware::settings::METRES_PER_FOOT;
use leeward_firmware::storage::{MemStorage, Storage};
use leeward_firmware::{App, Effect, Key, Key::*};

/// Clear the selected field (it starts with the demo value) by deleting from the end.
fn clear() -> Vec<Key> {
    let mut k = vec![Ok]; // start the edit (cursor at the end)
    k.extend(std::iter::repeat_n(Delete, 14));
    k
}

/// Keys that replace the selected field's text with `s` and confirm it.
fn enter(s: &str) -> Vec<Key> {
    let mut k = clear();
    k.extend(typing(s));
    k.push(Ok);
    k
}

#[test]
fn site_with_the_demo_latitude() {
    let mut app = App::default();
    press(&mut app, &[Ok, Down, Ok]);
    assert_eq!(app.screen(), Screen::SiteResult);
    let shot = Shot::of(&app);
    let truth = Rotation::at(demo::SITE.lat_deg).unwrap();
    assert!(
        agrees(&shot.figure(), truth.f),
        "{} vs {}",
        shot.figure(),
        truth.f
    );
    assert!(agrees(&shot.value_of("beta"), truth.beta));
    let hours = truth.inertial_period_s.unwrap() / 3600.0;
    assert!(agrees(&shot.value_of("inertial period"), hours));
    assert!(!shot.has("low latitude"));
    assert_eq!(app.site_result(), Some(&truth));
}

#[test]
fn site_typed_south_and_low() {
    let mut app = App::default();
    press(&mut app, &[Ok]);
    press(&mut app, &enter("-10.25"));
    // OK on the field moved the selection to Compute.
    press(&mut app, &[Ok]);
    assert_eq!(app.screen(), Screen::SiteResult, "{:?}", app.notice());
    let shot = Shot::of(&app);
    let truth = Rotation::at(-10.25).unwrap();
    assert!(truth.f < 0.0);
    assert!(agrees(&shot.figure(), truth.f), "{}", shot.figure());
    assert!(shot.value_of("latitude").ends_with('S'));
    // The core's low-latitude warning is on the page, whole.
    let warning = truth.regime.warning().unwrap();
    let words: String = shot
        .texts
        .iter()
        .map(|d| d.text.as_str())
        .collect::<Vec<_>>()
        .join(" ");
    assert!(words.contains(warning), "{words}");
    shot.assert_clean("site result at -10.25");
}

#[test]
fn site_at_the_equator_warns_and_has_no_period() {
    let mut app = App::default();
    press(&mut app, &[Ok]);
    press(&mut app, &enter("0"));
    press(&mut app, &[Ok]);
    let shot = Shot::of(&app);
    let truth = Rotation::at(0.0).unwrap();
    assert!(truth.inertial_period_s.is_none());
    assert!(shot.value_of("inertial period").contains("none"));
    assert!(shot.has("equator"), "{}", shot.dump());
    shot.assert_clean("site result at 0");
}

#[test]
fn site_in_degrees_and_minutes() {
    let mut app = App::default();
    // Home → Settings (second from last), up to Latitude entry, change it, back home.
    press(&mut app, &[Up, Up, Ok, Up, Ok, Back]);
    assert_eq!(
        app.settings().lat_entry,
        leeward_firmware::settings::LatEntry::DegMin
    );
    press(&mut app, &[Digit(1), Ok]);
    assert_eq!(app.screen(), Screen::SiteForm);
    // The demo latitude was re-expressed: 45.5 → 45°30.
    assert!(Shot::of(&app).has("45°30"), "{}", Shot::of(&app).dump());
    let mut keys = clear();
    keys.extend([Digit(4), Digit(7), Dot, Digit(1), Digit(5), Ok, Ok]);
    press(&mut app, &keys);
    assert_eq!(app.screen(), Screen::SiteResult, "{:?}", app.notice());
    let truth = Rotation::at(47.25).unwrap();
    assert!(agrees(&Shot::of(&app).figure(), truth.f));
    assert!(Shot::of(&app).value_of("latitude").starts_with("47°15"));
}

#[test]
fn column_stretch_with_the_demo_values() {
    let mut app = App::default();
    // Home → Column → Stretch → Up wraps to Compute → OK.
    press(&mut app, &[Down, Ok, Ok, Up, Ok]);
    assert_eq!(app.screen(), Screen::StretchResult, "{:?}", app.notice());
    let la = demo::SITE.lat_deg;
    let truth = stretch(
        la,
        0.0,
        demo::LID_M - demo::PLAIN_M,
        la,
        demo::LID_M - demo::CREST_M,
    )
    .unwrap();
    let shot = Shot::of(&app);
    assert!(
        agrees(&shot.figure(), truth.end.zeta / 1e-5),
        "{}",
        shot.figure()
    );
    assert!(shot.has(&format!("End zeta: {}", truth.end.sense.word())));
    assert_eq!(truth.end.sense.word(), "anticyclonic"); // squashed over the crest
    assert!(agrees(
        &shot.value_of("change of zeta"),
        truth.zeta_change / 1e-5
    ));
    assert_eq!(shot.value_of("the change is"), truth.change_sense.word());
    assert!(agrees(
        &shot.value_of("zeta+f at end"),
        truth.end.abs_vorticity
    ));
    assert!(agrees(&shot.value_of("PV (zeta+f)/H"), truth.pv));
}

#[test]
fn column_stretch_typed_southward_at_fixed_depth() {
    let mut app = App::default();
    press(&mut app, &[Down, Ok, Ok]);
    for v in ["50", "2", "8000", "40", "8000"] {
        press(&mut app, &enter(v));
    }
    press(&mut app, &[Ok]);
    assert_eq!(app.screen(), Screen::StretchResult, "{:?}", app.notice());
    let truth = stretch(50.0, 2e-5, 8000.0, 40.0, 8000.0).unwrap();
    let shot = Shot::of(&app);
    assert!(agrees(&shot.figure(), truth.end.zeta / 1e-5));
    assert_eq!(shot.value_of("the change is"), truth.change_sense.word());
    assert_eq!(truth.change_sense.word(), "cyclonic");
}

#[test]
fn column_depth_for_a_vorticity() {
    let mut app = App::default();
    press(&mut app, &[Down, Ok, Down, Ok]);
    assert_eq!(app.screen(), Screen::DepthForm);
    press(&mut app, &[Down, Down, Down, Down]);
    press(&mut app, &enter("-1.5"));
    press(&mut app, &[Ok]);
    assert_eq!(app.screen(), Screen::DepthResult, "{:?}", app.notice());
    let la = demo::SITE.lat_deg;
    let truth = depth_for_vorticity(la, 0.0, demo::LID_M - demo::PLAIN_M, la, -1.5e-5).unwrap();
    let shot = Shot::of(&app);
    assert!(
        agrees(&shot.figure(), truth.end.depth_m),
        "{}",
        shot.figure()
    );
    assert!(agrees(
        &shot.value_of("change of depth"),
        truth.end.depth_m - truth.start.depth_m
    ));
}

#[test]
fn column_in_feet_gives_the_same_answer() {
    let mut app = App::default();
    // Settings → Height unit → ft.
    press(&mut app, &[Up, Up, Ok, Ok, Back]);
    press(&mut app, &[Digit(2), Ok, Ok, Up, Ok]);
    assert_eq!(app.screen(), Screen::StretchResult, "{:?}", app.notice());
    let la = demo::SITE.lat_deg;
    let truth = stretch(
        la,
        0.0,
        demo::LID_M - demo::PLAIN_M,
        la,
        demo::LID_M - demo::CREST_M,
    )
    .unwrap();
    let shot = Shot::of(&app);
    // The depths went through feet and back: ζ may differ only in the last decimals.
    assert!(
        agrees(&shot.figure(), truth.end.zeta / 1e-5),
        "{}",
        shot.figure()
    );
    let d = shot.value_of("depth");
    assert!(d.ends_with("ft"), "{d}");
    assert!(agrees(&d, truth.start.depth_m / METRES_PER_FOOT), "{d}");
}

#[test]
fn a_core_refusal_shows_its_own_words() {
    let mut app = App::default();
    press(&mut app, &[Down, Ok, Ok, Down]);
    press(&mut app, &enter("-15")); // ζ1 = −1.5e-4: ζ + f < 0 at 45.5°
                                    // Confirming field 1 selected field 2; three rows down is Compute.
    press(&mut app, &[Down, Down, Down, Ok]);
    let err = stretch(
        demo::SITE.lat_deg,
        -15e-5,
        10_500.0,
        demo::SITE.lat_deg,
        8200.0,
    )
    .unwrap_err();
    let n = app
        .notice()
        .unwrap_or_else(|| panic!("no notice on {:?}", app.screen()));
    assert_eq!(n.heading, "Cannot compute");
    assert_eq!(n.text.as_str(), err.to_string());
    let shot = Shot::of(&app);
    shot.assert_clean("core error notice");
    // Any key closes the notice; the form keeps the typed value.
    app.handle(Back);
    assert!(app.notice().is_none());
    assert!(Shot::of(&app).has("-15"));
}

#[test]
fn an_out_of_range_entry_is_kept_and_named() {
    let mut app = App::default();
    press(&mut app, &[Ok]);
    press(&mut app, &enter("95"));
    let n = app.notice().expect("a notice");
    assert!(n.text.contains("-90 to 90"), "{}", n.text);
    assert!(n.text.contains("95"));
    Shot::of(&app).assert_clean("range notice");
    // Close it, leave the edit with BACK, go home and come back: still 95, marked.
    press(&mut app, &[Ok, Back, Menu, Ok]);
    let shot = Shot::of(&app);
    assert!(shot.has("95") && shot.has("!"), "{}", shot.dump());
    // Compute refuses it again and does not clamp it to 90.
    press(&mut app, &[Down, Ok]);
    assert_ne!(app.screen(), Screen::SiteResult);
    assert!(app.notice().is_some());
    assert!(app.site_result().is_none());
}

#[test]
fn back_always_leads_home_and_erases_nothing() {
    let mut app = App::default();
    press(&mut app, &[Down, Ok, Ok, Down]);
    press(&mut app, &clear());
    press(&mut app, &typing("3.5"));
    for _ in 0..6 {
        app.handle(Back);
    }
    assert_eq!(app.screen(), Screen::Home);
    // Home still has Column selected, the Column menu still Stretch.
    press(&mut app, &[Ok, Ok]);
    assert!(Shot::of(&app).has("3.5"));
}

#[test]
fn settings_are_stored_once_per_change_and_restored() {
    let mut st = MemStorage::new();
    let mut app = App::power_on(&mut st);
    // The first power-on stores the demo station set and the settings.
    assert_eq!(st.writes(), 2);
    for k in [Up, Up, Ok, Down, Up, Down] {
        let e = app.handle(k);
        app.apply(e, &mut st).unwrap();
    }
    assert_eq!(st.writes(), 2, "moving around must not write");
    let e = app.handle(Ok); // wind: m/s → kt
    assert_eq!(e, Effect::SaveSettings);
    app.apply(e, &mut st).unwrap();
    let e = app.handle(Left); // and back: kt → m/s, then Right twice → km/h
    app.apply(e, &mut st).unwrap();
    for _ in 0..2 {
        let e = app.handle(Right);
        app.apply(e, &mut st).unwrap();
    }
    assert_eq!(st.writes(), 6);
    let again = App::power_on(&mut st);
    assert_eq!(again.settings(), app.settings());
    assert_eq!(
        st.load_settings().unwrap().wind,
        leeward_firmware::settings::WindUnit::KmPerHour
    );
}

// ---- Network ----------------------------------------------------------------------------

use leeward_core::network::{analyse, FitOptions, Network, NetworkFit, Station};

/// Home → Network (third row) → the station list.
const TO_NETWORK: [Key; 3] = [Down, Down, Ok];

/// The core's answer for the demo stations.
fn demo_fit(net: &Network) -> NetworkFit {
    analyse(net, &FitOptions::default()).unwrap()
}

/// The number after '±' in `s`.
fn after_pm(s: &str) -> &str {
    s.split_once('±')
        .unwrap_or_else(|| panic!("no ± in {s:?}"))
        .1
}

/// Keys that roll a new identifier character `c` into place with Up alone (A first, then
/// on through the alphabet and the digits), then step right to the next one.
fn roll(c: char) -> Vec<Key> {
    let cycle = "ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-_";
    let n = cycle.find(c).unwrap();
    let mut k = vec![Up; n + 1];
    k.push(Right);
    k
}

#[test]
fn network_with_the_demo_stations() {
    let mut app = App::default();
    press(&mut app, &TO_NETWORK);
    assert_eq!(app.screen(), Screen::NetworkList);
    assert!(Shot::of(&app).has("AVEN"));
    // Up wraps to Compute.
    press(&mut app, &[Up, Ok]);
    assert_eq!(app.screen(), Screen::NetworkResult(0), "{:?}", app.notice());
    let net = demo::network().unwrap();
    let truth = demo_fit(&net);

    // Page 1: speed ± σ, direction, model.
    let shot = Shot::of(&app);
    shot.assert_clean("network wind");
    let fig = shot.figure();
    assert!(
        agrees(&fig, truth.wind.speed_ms.value),
        "{fig} vs {:?}",
        truth.wind
    );
    assert!(agrees(after_pm(&fig), truth.wind.speed_ms.sigma), "{fig}");
    let from = shot.value_of("from");
    assert!(agrees(&from, truth.wind.dir_from_deg.value), "{from}");
    assert!(
        agrees(after_pm(&from), truth.wind.dir_from_deg.sigma),
        "{from}"
    );
    assert!(shot.value_of("model").starts_with(truth.model.name()));
    let uv = shot.value_of("u, v");
    assert!(agrees(&uv, truth.wind.u_ms.value), "{uv}");
    assert!(agrees(uv.split_once(',').unwrap().1, truth.wind.v_ms.value));
    // The demo's answer is the westerly of about 20 m/s it was made from.
    assert!((truth.wind.speed_ms.value - demo::U0_MS).abs() < 3.0);

    // Page 2: ζ_g ± σ with its word.
    press(&mut app, &[Right]);
    assert_eq!(app.screen(), Screen::NetworkResult(1));
    let shot = Shot::of(&app);
    shot.assert_clean("network zeta");
    let z = truth.zeta_g.unwrap();
    let fig = shot.figure();
    assert!(agrees(&fig, z.value / 1e-5), "{fig} vs {z:?}");
    assert!(agrees(after_pm(&fig), z.sigma / 1e-5), "{fig}");
    let word = truth.sense.unwrap().word();
    assert!(shot.has(&format!("zeta_g: {word}")), "{}", shot.dump());
    let zb = truth.zeta_beta.unwrap();
    assert!(agrees(&shot.value_of("with beta term"), zb.value / 1e-5));
    assert!(agrees(&shot.value_of("f at reference"), truth.f0));

    // Page 3: a residual per station, against the core's.
    press(&mut app, &[Right]);
    let shot = Shot::of(&app);
    shot.assert_clean("network residuals");
    for (st, sf) in net.stations.iter().zip(&truth.stations) {
        let r = shot.value_of(&st.id);
        assert!(
            agrees(&r, sf.residual_m),
            "{}: {r} vs {}",
            st.id,
            sf.residual_m
        );
    }
    assert_eq!(truth.suspect, None);
    assert!(!shot.has("suspect"));

    // Page 4: the map's words; BACK returns to the list, which kept its stations.
    press(&mut app, &[Right]);
    let shot = Shot::of(&app);
    shot.assert_clean("network map");
    let dir = format!("from {:.0}°", truth.wind.dir_from_deg.value);
    assert!(shot.has(&dir), "{}", shot.dump());
    assert!(shot.has("no suspect"));
    press(&mut app, &[Right]);
    assert_eq!(app.screen(), Screen::NetworkResult(3), "four pages only");
    press(&mut app, &[Back]);
    assert_eq!(app.screen(), Screen::NetworkList);
    assert_eq!(app.stations().len(), 7);
}

#[test]
fn network_wind_in_knots() {
    let mut app = App::default();
    // Settings → Wind unit → kt, back home, then Network.
    press(&mut app, &[Up, Up, Ok, Down, Ok, Back]);
    press(&mut app, &[Digit(3), Ok, Up, Ok]);
    assert_eq!(app.screen(), Screen::NetworkResult(0), "{:?}", app.notice());
    let truth = demo_fit(&demo::network().unwrap());
    let shot = Shot::of(&app);
    let kt = leeward_firmware::settings::MS_PER_KNOT;
    assert!(agrees(&shot.figure(), truth.wind.speed_ms.value / kt));
    assert!(agrees(
        after_pm(&shot.figure()),
        truth.wind.speed_ms.sigma / kt
    ));
    assert!(shot.has("kt"));
}

#[test]
fn network_a_bad_height_is_the_suspect() {
    let mut app = App::default();
    press(&mut app, &TO_NETWORK);
    // Third station (CAIRN): Down to Height (id, lat, lon, height) and type 5900.
    press(&mut app, &[Down, Down, Ok, Down, Down, Down]);
    assert_eq!(app.screen(), Screen::StationEdit);
    press(&mut app, &enter("5900"));
    // Back at the list on CAIRN; Compute is the last row: up three, wrapping.
    press(&mut app, &[Back, Up, Up, Up, Ok]);
    assert_eq!(app.screen(), Screen::NetworkResult(0), "{:?}", app.notice());
    let mut net = demo::network().unwrap();
    net.stations[2].height_m = 5900.0;
    let truth = demo_fit(&net);
    let suspect = truth.suspect.expect("the core names a suspect") as usize;
    assert_eq!(net.stations[suspect].id.as_str(), "CAIRN");
    assert!(agrees(&Shot::of(&app).figure(), truth.wind.speed_ms.value));
    press(&mut app, &[Right, Right]);
    let shot = Shot::of(&app);
    shot.assert_clean("residuals with a suspect");
    // The suspect's row has the mark and the word, at its height.
    let row_y = shot
        .texts
        .iter()
        .find(|d| d.text == "CAIRN")
        .unwrap()
        .area
        .top_left
        .y;
    let on_row: Vec<&str> = shot
        .texts
        .iter()
        .filter(|d| d.area.top_left.y == row_y)
        .map(|d| d.text.as_str())
        .collect();
    assert!(
        on_row.contains(&"!") && on_row.contains(&"suspect"),
        "{on_row:?}"
    );
    assert_eq!(shot.texts.iter().filter(|d| d.text == "suspect").count(), 1);
    let r = shot.value_of("CAIRN");
    assert!(agrees(&r, truth.stations[suspect].residual_m), "{r}");
    press(&mut app, &[Right]);
    assert!(Shot::of(&app).has("filled: CAIRN"));
}

#[test]
fn network_a_station_added_with_the_arrows() {
    let mut app = App::default();
    press(&mut app, &TO_NETWORK);
    // The Add row is second from the bottom: Up twice (Compute, then Add).
    press(&mut app, &[Up, Up, Ok]);
    assert_eq!(app.screen(), Screen::StationEdit);
    assert_eq!(app.stations().len(), 8);
    let mut keys = vec![Ok];
    for c in "HX-2".chars() {
        keys.extend(roll(c));
    }
    keys.push(Ok); // identifier done; the latitude is selected
    press(&mut app, &keys);
    assert_eq!(app.stations()[7].id.text().as_str(), "HX-2");
    press(&mut app, &enter("47.1"));
    press(&mut app, &enter("-139"));
    press(&mut app, &enter("5650"));
    press(&mut app, &enter("20"));
    press(&mut app, &[Back]);
    assert_eq!(app.screen(), Screen::NetworkList);
    press(&mut app, &[Down, Down, Down, Down, Ok]); // from the new station: Save, Load, Add, Compute
    assert_eq!(app.screen(), Screen::NetworkResult(0), "{:?}", app.notice());
    let mut net = demo::network().unwrap();
    net.push(Station::new("HX-2", 47.1, -139.0, 5650.0, Some(20.0)).unwrap())
        .unwrap();
    let truth = demo_fit(&net);
    // The list shows the demo heights to 0.1 mm, and computes with what it shows.
    let (fit, used) = app.network_result().unwrap();
    assert_eq!(used.len(), net.len());
    for (a, b) in used.stations.iter().zip(&net.stations) {
        assert_eq!((&a.id, a.pos, a.sigma_m), (&b.id, b.pos, b.sigma_m));
        assert!((a.height_m - b.height_m).abs() <= 0.5e-4, "{a:?} vs {b:?}");
    }
    assert!((fit.wind.speed_ms.value - truth.wind.speed_ms.value).abs() < 1e-4);
    let shot = Shot::of(&app);
    assert!(agrees(&shot.figure(), truth.wind.speed_ms.value));
    assert!(shot.value_of("model").starts_with(truth.model.name()));
    // Eight stations: the residual table scrolls to the eighth, one row at a time.
    press(&mut app, &[Right, Right]);
    assert!(!Shot::of(&app).has("HX-2"));
    assert_eq!(app.handle(Down), Effect::Redraw);
    let shot = Shot::of(&app);
    shot.assert_clean("residuals scrolled");
    assert!(!shot.has("AVEN"), "{}", shot.dump());
    assert!(agrees(&shot.value_of("HX-2"), truth.stations[7].residual_m));
    assert_eq!(app.handle(Down), Effect::Nothing, "no further to scroll");
}

#[test]
fn network_too_few_stations_says_so() {
    let mut app = App::default();
    press(&mut app, &TO_NETWORK);
    // Open the first station, Up to Delete, OK: five times.
    for _ in 0..5 {
        press(&mut app, &[Ok, Up, Ok]);
    }
    assert_eq!(app.stations().len(), 2);
    press(&mut app, &[Up, Ok]);
    let mut net = demo::network().unwrap();
    net.stations.rotate_left(5);
    net.stations.truncate(2);
    let err = analyse(&net, &FitOptions::default()).unwrap_err();
    let n = app.notice().expect("a notice");
    assert_eq!(n.heading, "Cannot compute");
    assert_eq!(n.text.as_str(), err.to_string());
    assert!(
        n.text.contains("need 3") && n.text.contains("have 2"),
        "{}",
        n.text
    );
    Shot::of(&app).assert_clean("too few stations");
}

#[test]
fn network_a_station_on_top_of_another_is_refused_by_the_core() {
    let mut app = App::default();
    press(&mut app, &TO_NETWORK);
    press(&mut app, &[Up, Up, Ok, Ok, Up, Ok]); // Add; identifier "A"
    press(&mut app, &enter("48.3"));
    press(&mut app, &enter("-144.1"));
    press(&mut app, &enter("5700"));
    press(&mut app, &[Back, Down, Down, Down, Down, Ok]);
    let mut net = demo::network().unwrap();
    net.push(Station::new("A", 48.3, -144.1, 5700.0, Some(10.0)).unwrap())
        .unwrap();
    let err = analyse(&net, &FitOptions::default()).unwrap_err();
    let n = app.notice().expect("a notice");
    assert_eq!(n.text.as_str(), err.to_string());
    assert_eq!(app.screen(), Screen::NetworkList);
}

#[test]
fn network_entries_are_checked_and_kept() {
    let mut app = App::default();
    press(&mut app, &TO_NETWORK);
    // A new station with no height: Compute names it and the field.
    press(&mut app, &[Up, Up, Ok, Back, Down, Down, Down, Down, Ok]);
    let n = app.notice().expect("a notice").clone();
    assert!(n.text.starts_with("Station 8: "), "{}", n.text);
    assert!(n.text.contains("identifier"), "{}", n.text);
    // Give it an identifier; now the empty height is named with its allowed range.
    // (The notice put the list on station 8.)
    press(
        &mut app,
        &[Back, Ok, Ok, Up, Ok, Back, Down, Down, Down, Down, Ok],
    );
    let n = app.notice().expect("a notice").clone();
    assert!(n.text.starts_with("Station 8 A: Height"), "{}", n.text);
    assert!(n.text.contains("-1000 to 40000 m"), "{}", n.text);
    // A latitude out of range is refused at the field and kept as typed.
    press(&mut app, &[Back, Ok, Down]);
    let mut k = vec![Ok];
    k.extend(std::iter::repeat_n(Delete, 14));
    k.extend(typing("95"));
    k.push(Ok);
    press(&mut app, &k);
    let n = app.notice().expect("a notice").clone();
    assert!(n.text.contains("-90 to 90"), "{}", n.text);
    assert_eq!(app.stations()[7].form.fields[0].display().as_str(), "95");
    Shot::of(&app).assert_clean("station latitude notice");
}

// ---- Sounding ---------------------------------------------------------------------------

use leeward_core::sounding::ridge_flow::RidgeCheck;
use leeward_core::sounding::summary::{summarise, Summary, SummaryOptions};

/// The core's summary of the demo ascent against the Tessel Range (upstream plain to
/// crest, axis north–south), as `leeward demo` asks for it.
fn demo_summary() -> Summary {
    let profile = demo::sounding().unwrap();
    let opts = SummaryOptions {
        ridge: Some(RidgeCheck {
            ground_m: demo::PLAIN_M,
            crest_m: demo::CREST_M,
            axis_deg: Some(0.0),
        }),
        ..SummaryOptions::default()
    };
    summarise(&profile, &opts).unwrap()
}

fn all_words(shot: &Shot) -> String {
    shot.texts
        .iter()
        .map(|d| d.text.as_str())
        .collect::<Vec<_>>()
        .join(" ")
}

#[test]
fn sounding_summary_of_the_demo_ascent() {
    let mut app = App::default();
    press(&mut app, &[Down, Down, Down, Ok]);
    assert_eq!(
        app.screen(),
        Screen::SoundingResult(0),
        "{:?}",
        app.notice()
    );
    let truth = demo_summary();

    // Page 1: tropopause, lid, bulk N, the height check.
    let shot = Shot::of(&app);
    shot.assert_clean("sounding column");
    let tp = truth.tropopauses.first.unwrap();
    assert!(agrees(&shot.figure(), tp.height_m), "{}", shot.figure());
    let lid = truth.lid.unwrap();
    let shown = shot.value_of("lid");
    assert!(agrees(&shown, lid.height_m), "{shown}");
    assert!(shown.ends_with(lid.source.statement()), "{shown}");
    assert!(agrees(
        &shot.value_of("bulk N to lid"),
        truth.bulk_n_per_s.unwrap()
    ));
    let check = shot.value_of("height check");
    if truth.heights.flagged == 0 {
        assert!(check.starts_with("all within"), "{check}");
    } else {
        assert!(agrees(&check, truth.heights.flagged as f64), "{check}");
        let worst = truth.heights.worst.unwrap().1;
        assert!(agrees(&shot.value_of("worst height diff."), worst));
    }
    assert!(agrees(
        check.split("> ").last().unwrap(),
        truth.heights.tolerance_m
    ));
    // The demo was made with a tropopause near 10.8 km.
    assert!((tp.height_m - demo::LID_M).abs() < 300.0);

    // Page 2: the Froude check and its verdict, whole.
    press(&mut app, &[Right]);
    let shot = Shot::of(&app);
    shot.assert_clean("sounding froude");
    let rf = truth.ridge_flow.unwrap().unwrap();
    assert!(agrees(&shot.figure(), rf.froude), "{}", shot.figure());
    assert!(agrees(
        &shot.value_of("cross-ridge wind"),
        rf.cross_ridge_ms
    ));
    assert!(agrees(&shot.value_of("N below the crest"), rf.n_per_s));
    match rf.blocked_depth_m {
        Some(d) => assert!(agrees(&shot.value_of("blocked depth"), d)),
        None => assert!(agrees(&shot.value_of("ridge height h"), rf.ridge_height_m)),
    }
    assert!(
        all_words(&shot).contains(rf.verdict.statement()),
        "{}",
        shot.dump()
    );

    // Page 3: barotropy.
    press(&mut app, &[Right]);
    let shot = Shot::of(&app);
    shot.assert_clean("sounding barotropy");
    let b = truth.barotropy.as_ref().unwrap();
    assert!(agrees(&shot.figure(), b.ratio), "{}", shot.figure());
    assert!(agrees(&shot.value_of("thermal wind"), b.thermal_speed_ms));
    let turning = shot.value_of("turning");
    assert!(agrees(&turning, b.turning_deg), "{turning}");
    assert!(turning.ends_with(b.turning.word()));
    assert!(all_words(&shot).contains(b.verdict.statement()));

    // Page 4: the profile plot. Its scales are the core's: from the ground to 3 km above
    // the tropopause, temperatures rounded out to 10 °C.
    press(&mut app, &[Right]);
    assert_eq!(app.screen(), Screen::SoundingResult(3));
    let shot = Shot::of(&app);
    shot.assert_clean("sounding profile");
    let ground = truth.heights.best_m(0).unwrap();
    let top = tp.height_m + 3000.0;
    let scales = &shot.texts[2].text;
    assert!(
        scales.starts_with(&format!("{ground:.0} to {top:.0} m; ")),
        "{scales}"
    );
    let profile = demo::sounding().unwrap();
    let temps = profile
        .levels()
        .iter()
        .zip(truth.heights.best_all())
        .filter(|(_, z)| z.is_some_and(|z| z <= top))
        .flat_map(|(l, _)| [l.temperature_k, l.dewpoint_k])
        .flatten()
        .map(|k| k - 273.15);
    let (lo, hi) = temps.fold((f64::MAX, f64::MIN), |(a, b), t| (a.min(t), b.max(t)));
    let (lo, hi) = (
        ((lo - 2.0) / 10.0).floor() * 10.0,
        ((hi + 2.0) / 10.0).ceil() * 10.0,
    );
    assert!(
        scales.ends_with(&format!("{lo:.0} to {hi:.0} °C")),
        "{scales}"
    );
    // The plotted levels are the ascent's, at the core's best heights.
    let plot = &app.sounding().unwrap().plot;
    assert_eq!(plot.levels.len(), profile.len());
    for (i, l) in plot.levels.iter().enumerate() {
        assert!((l.height_m as f64 - truth.heights.best_m(i).unwrap()).abs() < 0.01);
    }
    press(&mut app, &[Right]);
    assert_eq!(app.screen(), Screen::SoundingResult(3), "four pages only");
    press(&mut app, &[Back]);
    assert_eq!(app.screen(), Screen::Home);
}

#[test]
fn sounding_in_feet_and_knots() {
    let mut app = App::default();
    // Settings: height → ft, wind → kt.
    press(&mut app, &[Up, Up, Ok, Ok, Down, Ok, Back]);
    press(&mut app, &[Digit(4), Ok]);
    assert_eq!(
        app.screen(),
        Screen::SoundingResult(0),
        "{:?}",
        app.notice()
    );
    let truth = demo_summary();
    let shot = Shot::of(&app);
    let tp = truth.tropopauses.first.unwrap().height_m;
    assert!(agrees(&shot.figure(), tp / METRES_PER_FOOT));
    assert!(shot.has("ft"));
    press(&mut app, &[Right]);
    let rf = truth.ridge_flow.unwrap().unwrap();
    let kt = leeward_firmware::settings::MS_PER_KNOT;
    let shown = Shot::of(&app).value_of("cross-ridge wind");
    assert!(agrees(&shown, rf.cross_ridge_ms / kt), "{shown}");
    assert!(shown.ends_with("kt"));
}

// ---- Ridge crossing ---------------------------------------------------------------------

// The device runs the f32 track (leeward_firmware::crossing): its answers are the truth
// the screens are checked against.
use leeward_core::crossing::{run_f32 as run, CrossingInput, Discard, Unavailable};

/// From anywhere (no notice open) to the Ridge crossing form: home, row 5, open.
const TO_CROSSING: [Key; 3] = [Menu, Digit(5), Ok];

/// `x` as a form shows it: at most four decimals in the unit shown.
fn as_shown(x: f64) -> f64 {
    format!("{x:.4}").parse().unwrap()
}

/// The demo crossing with the lid and N of the core's summary of the demo ascent, as the
/// form holds them (lid in m, N typed in units of 1e-3 /s), and this wind.
fn demo_crossing(speed_ms: f64, dir_deg: f64) -> CrossingInput {
    let truth = demo_summary();
    let mut c = demo::crossing(speed_ms, dir_deg);
    c.lid_m = as_shown(truth.lid.unwrap().height_m);
    c.brunt_vaisala = Some(as_shown(truth.ridge_flow.unwrap().unwrap().n_per_s * 1e3) / 1e3);
    c
}

/// Check the three figure pages against the core's answers for `input`.
fn check_crossing_pages(app: &mut App, input: &CrossingInput, what: &str) {
    assert_eq!(
        app.screen(),
        Screen::CrossingResult(0),
        "{:?}",
        app.notice()
    );
    let truth = run(input, &mut Discard).unwrap();
    let flat = run(&input.without_ridge(), &mut Discard).unwrap();
    let t = truth.trough.unwrap();

    let shot = Shot::of(app);
    shot.assert_clean(&format!("{what}: trough"));
    assert!(
        agrees(&shot.figure(), t.axis_distance_m / 1e3),
        "{}",
        shot.figure()
    );
    assert!(agrees(
        &shot.value_of("north of start"),
        t.displacement_north_m / 1e3
    ));
    assert!(agrees(
        &shot.value_of("zeta at trough"),
        t.point.zeta / 1e-5
    ));
    let sense = leeward_core::crossing::sense_at(&t.point).word();
    assert_eq!(shot.value_of("sense"), sense);
    assert!(agrees(
        &shot.value_of("over the ridge"),
        truth.most_anticyclonic_zeta / 1e-5
    ));
    match flat.trough {
        Result::Ok(f) => assert!(agrees(
            &shot.value_of("no-ridge trough"),
            f.axis_distance_m / 1e3
        )),
        Err(_) => assert_eq!(shot.value_of("no-ridge trough"), "none"),
    }

    press(app, &[Right]);
    let shot = Shot::of(app);
    shot.assert_clean(&format!("{what}: wave"));
    assert!(
        agrees(&shot.figure(), truth.wavelength_m.unwrap() / 1e3),
        "{}",
        shot.figure()
    );
    let lin = truth.stationary_wavelength_m.unwrap();
    assert!(agrees(&shot.value_of("linear 2pi sqrt(V/beta)"), lin / 1e3));
    assert!(agrees(&shot.value_of("track length"), truth.end.s_m / 1e3));
    assert!(all_words(&shot).contains(truth.ended.statement()));

    press(app, &[Right]);
    let shot = Shot::of(app);
    shot.assert_clean(&format!("{what}: Froude"));
    let fr = truth.froude.unwrap();
    assert!(agrees(&shot.figure(), fr.number), "{}", shot.figure());
    let words = all_words(&shot);
    assert_eq!(words.contains("Below 1"), fr.blocked, "{words}");

    // The plots write their scales: degrees of the plan view, km and ζ of the section.
    for (page, scale) in [(3, "°N"), (4, "e-5/s")] {
        press(app, &[Right]);
        assert_eq!(app.screen(), Screen::CrossingResult(page));
        let shot = Shot::of(app);
        shot.assert_clean(&format!("{what}: plot {page}"));
        assert!(shot.has(scale), "{}", shot.dump());
    }
    press(app, &[Right]);
    assert_eq!(app.screen(), Screen::CrossingResult(4), "five pages only");
    press(app, &[Back]);
    assert_eq!(app.screen(), Screen::CrossingForm);
}

#[test]
fn crossing_with_the_demo_wind_and_the_sounding_lid() {
    let mut app = App::default();
    press(&mut app, &TO_CROSSING);
    assert_eq!(app.screen(), Screen::CrossingForm);
    let shot = Shot::of(&app);
    shot.assert_clean("crossing form");
    assert!(shot.has("wind: demo"));
    // The lid shown is the core's lid of the demo ascent.
    let lid = demo_summary().lid.unwrap().height_m;
    assert!(agrees(&shot.value_of("Lid height"), lid), "{}", shot.dump());
    // Up from the first field is the Compute row.
    press(&mut app, &[Up, Ok]);
    let input = demo_crossing(demo::U0_MS, 270.0);
    check_crossing_pages(&mut app, &input, "demo");
    // The plan view's longitudes span the ridge track, written with its hemisphere.
    let view = app.crossing_result().unwrap();
    assert_eq!(view.ridge, run(&input, &mut Discard).unwrap());
}

#[test]
fn crossing_takes_the_last_network_wind() {
    let mut app = App::default();
    press(&mut app, &[Down, Down, Ok, Up, Ok]);
    assert_eq!(app.screen(), Screen::NetworkResult(0), "{:?}", app.notice());
    press(&mut app, &[Menu]);
    press(&mut app, &TO_CROSSING);
    assert!(Shot::of(&app).has("wind: network"));
    let fit = analyse(&demo::network().unwrap(), &FitOptions::default()).unwrap();
    let input = demo_crossing(
        as_shown(fit.wind.speed_ms.value),
        as_shown(fit.wind.dir_from_deg.value),
    );
    press(&mut app, &[Up, Ok]);
    check_crossing_pages(&mut app, &input, "network wind");
}

#[test]
fn crossing_in_knots_and_feet_with_a_typed_wind() {
    let mut app = App::default();
    // Settings: height → ft, wind → kt.
    press(&mut app, &[Up, Up, Ok, Ok, Down, Ok, Back]);
    press(&mut app, &TO_CROSSING);
    press(&mut app, &enter("50"));
    press(&mut app, &enter("250"));
    let shot = Shot::of(&app);
    assert_eq!(shot.value_of("Wind speed"), "50");
    assert!(shot.has("kt") && shot.has("ft"));
    // Selection is on the lid now: Up three times reaches Compute.
    press(&mut app, &[Up, Up, Up, Ok]);
    let kt = leeward_firmware::settings::MS_PER_KNOT;
    let mut input = demo_crossing(50.0 * kt, 250.0);
    // The lid went through feet and back at four decimals.
    let lid_ft = as_shown(demo_summary().lid.unwrap().height_m / METRES_PER_FOOT);
    input.lid_m = lid_ft * METRES_PER_FOOT;
    for (i, v) in [
        (4, demo::CREST_M),
        (5, demo::PLAIN_M),
        (6, demo::HALF_WIDTH_M),
    ] {
        let m = as_shown(v / METRES_PER_FOOT) * METRES_PER_FOOT;
        match (&mut input.ridge.profile, i) {
            (leeward_core::crossing::Profile::Bell { crest_m, .. }, 4) => *crest_m = m,
            (leeward_core::crossing::Profile::Bell { base_m, .. }, 5) => *base_m = m,
            (leeward_core::crossing::Profile::Bell { half_width_m, .. }, _) => *half_width_m = m,
            _ => unreachable!(),
        }
    }
    check_crossing_pages(&mut app, &input, "kt and ft");
    // Back on the form, on its Compute row.
    press(&mut app, &[Ok, Right, Right]);
    let ridge_h = run(&input, &mut Discard)
        .unwrap()
        .froude
        .unwrap()
        .ridge_height_m;
    let shown = Shot::of(&app).value_of("ridge height h");
    assert!(agrees(&shown, ridge_h / METRES_PER_FOOT), "{shown}");
    assert!(shown.ends_with("ft"));
}

#[test]
fn crossing_in_an_easterly_states_why_not() {
    let mut app = App::default();
    press(&mut app, &TO_CROSSING);
    press(&mut app, &[Down]);
    press(&mut app, &enter("90"));
    press(&mut app, &[Up, Up, Up, Ok]);
    assert_eq!(
        app.screen(),
        Screen::CrossingResult(0),
        "{:?}",
        app.notice()
    );
    let input = demo_crossing(demo::U0_MS, 90.0);
    let truth = run(&input, &mut Discard).unwrap();
    assert_eq!(truth.trough.unwrap_err(), Unavailable::EasterlyFlow);
    let statement = Unavailable::EasterlyFlow.statement();
    let shot = Shot::of(&app);
    shot.assert_clean("easterly trough");
    assert_eq!(shot.figure(), "-");
    assert!(all_words(&shot).contains(statement), "{}", shot.dump());
    press(&mut app, &[Right]);
    let shot = Shot::of(&app);
    shot.assert_clean("easterly wave");
    assert!(all_words(&shot).contains(statement), "{}", shot.dump());
    assert_eq!(shot.value_of("linear 2pi sqrt(V/beta)"), "none");
    for _ in 0..3 {
        press(&mut app, &[Right]);
        Shot::of(&app).assert_clean("easterly pages");
    }
}

#[test]
fn crossing_refuses_a_wind_out_of_range_and_keeps_it() {
    let mut app = App::default();
    press(&mut app, &TO_CROSSING);
    press(&mut app, &enter("200"));
    let n = app.notice().expect("a notice");
    assert!(n.text.contains("0.5 to 150 m/s"), "{}", n.text);
    Shot::of(&app).assert_clean("crossing wind notice");
    press(&mut app, &[Back, Back]);
    assert_eq!(app.crossing_form().fields[0].display().as_str(), "200");
    // Compute points at the field again rather than computing.
    press(&mut app, &[Up, Ok]);
    assert!(app.notice().is_some());
    assert_eq!(app.screen(), Screen::CrossingForm);
}

#[test]
fn crossing_with_the_lid_below_the_crest_is_a_notice() {
    let mut app = App::default();
    press(&mut app, &TO_CROSSING);
    press(&mut app, &[Down, Down]);
    press(&mut app, &enter("2650"));
    press(&mut app, &[Up, Up, Up, Up, Ok]);
    let n = app.notice().expect("a notice");
    let mut input = demo_crossing(demo::U0_MS, 270.0);
    input.lid_m = 2650.0;
    let e = run(&input, &mut Discard).unwrap_err();
    assert_eq!(n.heading, "Cannot compute");
    assert_eq!(n.text.as_str(), format!("{e}"));
    Shot::of(&app).assert_clean("crossing lid notice");
}

// ---- Data ---------------------------------------------------------------------------------

#[test]
fn data_list_view_rename_delete_save_load() {
    use leeward_firmware::storage::{decode_stations, DataKind, MAX_STATION_SET_BYTES};
    let mut st = MemStorage::new();
    let mut app = App::power_on(&mut st);
    let demo_net = demo::network().unwrap();
    // Home → Data (third from the bottom): the demo set, its kind and size, the free bytes.
    press_stored(&mut app, &mut st, &[Up, Up, Up, Ok]);
    assert_eq!(app.screen(), Screen::DataList);
    let shot = Shot::of(&app);
    let size = st.list()[0].bytes;
    assert_eq!(shot.value_of("DEMO"), format!("stations  {size} B"));
    assert!(
        shot.has(&format!("{} B free", st.free_bytes())),
        "{}",
        shot.dump()
    );
    // View: the summary counts the stations.
    press_stored(&mut app, &mut st, &[Ok, Ok]);
    assert_eq!(app.screen(), Screen::DataView);
    assert_eq!(Shot::of(&app).figure(), demo_net.len().to_string());
    // Rename to DEMO7 (a digit typed at the end).
    press_stored(&mut app, &mut st, &[Back, Down, Ok, Digit(7), Ok]);
    assert_eq!(app.screen(), Screen::DataItem, "{:?}", app.notice());
    assert_eq!(st.list()[0].name.as_str(), "DEMO7");
    // Delete: BACK keeps it, OK deletes it.
    press_stored(&mut app, &mut st, &[Down, Ok, Back]);
    assert_eq!(st.list().len(), 1);
    press_stored(&mut app, &mut st, &[Ok, Ok]);
    assert!(st.list().is_empty());
    assert_eq!(app.screen(), Screen::DataList);
    // Network: save the stations as 12, then load it back after deleting a station.
    press_stored(
        &mut app,
        &mut st,
        &[Menu, Up, Up, Up, Ok, Up, Up, Up, Up, Ok],
    );
    assert_eq!(app.screen(), Screen::NetworkSave);
    press_stored(&mut app, &mut st, &[Digit(1), Digit(2), Ok]);
    assert_eq!(app.notice().map(|n| n.heading), Some("Saved"));
    let mut buf = [0u8; MAX_STATION_SET_BYTES];
    let (kind, n) = st.get("12", &mut buf).unwrap();
    assert_eq!(kind, DataKind::Stations);
    let saved = decode_stations(&buf[..n]).unwrap();
    assert_eq!(saved.len(), demo_net.len());
    press_stored(&mut app, &mut st, &[Back, Digit(1), Ok, Up, Ok]); // close the notice; delete the first station
    assert_eq!(app.stations().len(), demo_net.len() - 1);
    // Load set is third from the bottom.
    press_stored(&mut app, &mut st, &[Up, Up, Up, Ok, Ok]);
    assert_eq!(app.screen(), Screen::NetworkList, "{:?}", app.notice());
    assert_eq!(app.stations().len(), demo_net.len());
    // Saving under a taken name is refused and the name is kept in the editor.
    press_stored(&mut app, &mut st, &[Up, Up, Up, Up, Ok, Ok]);
    assert_eq!(app.notice().map(|n| n.heading), Some("Cannot save"));
    assert_eq!(st.list().len(), 1);
}

#[test]
fn data_use_a_stored_sounding_in_the_sounding_task() {
    use leeward_core::sounding::{Level, Profile, StationInfo};
    use leeward_firmware::flash::{sim::SimFlash, FlashStore};
    use leeward_firmware::records::Record;
    use leeward_firmware::sounding::{demo_options, SoundingView, DEVICE_LEVELS};
    use leeward_firmware::storage::DataKind;
    // A flash store of 6 + 2 pages of 16 KiB (the in-memory store is too small for the
    // long sounding below).
    const PAGE: usize = 16 * 1024;
    let flash: SimFlash<Vec<u8>, 4, PAGE> = SimFlash::new(vec![0xFF; 8 * PAGE], 1);
    let page = PAGE as u32;
    let mut st = FlashStore::open(flash, 0..6 * page, 6 * page..8 * page).unwrap();
    let mut app = App::power_on(&mut st);
    // A sounding other than the demo's: the demo ascent 3 K colder, under another name.
    let demo_p = demo::sounding().unwrap();
    let mut station = demo_p.station.clone();
    station.id = "ALT".try_into().unwrap();
    let mut cold = Profile::new(station);
    for l in demo_p.levels() {
        cold.push(Level {
            temperature_k: l.temperature_k.map(|t| t - 3.0),
            dewpoint_k: l.dewpoint_k.map(|t| t - 3.0),
            ..*l
        })
        .unwrap();
    }
    let mut buf = vec![0u8; 16 * 1024];
    let n = cold.encode(&mut buf).unwrap();
    st.put(DataKind::Sounding, "ALT", &buf[..n]).unwrap();
    // 200 levels: more than the device holds.
    let mut long = Profile::new(StationInfo::default());
    for i in 0..200 {
        let z = i as f64 * 80.0;
        long.push(Level {
            height_m: Some(z),
            temperature_k: Some(288.15 - 0.0065 * z.min(11_000.0)),
            ..Level::at_pressure(101_325.0 * (-z / 8000.0).exp())
        })
        .unwrap();
    }
    let n = long.encode(&mut buf).unwrap();
    st.put(DataKind::Sounding, "LONG", &buf[..n]).unwrap();
    // As after a push from the laptop: the app reads the store's list again.
    app.open_store(&mut st);
    let at = |app: &App, name: &str| app.catalog().iter().position(|d| d.name == name).unwrap();

    // Home → Data → ALT → Use (the fourth row).
    press_stored(&mut app, &mut st, &[Up, Up, Up, Ok]);
    let mut keys = vec![Down; at(&app, "ALT")];
    keys.extend([Ok, Down, Down, Down, Ok]);
    press_stored(&mut app, &mut st, &keys);
    assert_eq!(
        app.screen(),
        Screen::SoundingResult(0),
        "{:?}",
        app.notice()
    );
    let truth = summarise(&cold, &demo_options()).unwrap();
    assert_eq!(app.sounding(), Some(&SoundingView::of(&cold, &truth)));
    assert_eq!(app.sounding_source().map(|n| n.as_str()), Some("ALT"));
    // The colder ascent's figures on the screen, not the demo's.
    let shot = Shot::of(&app);
    shot.assert_clean("stored sounding column");
    let tp = truth.tropopauses.first.unwrap();
    assert!(agrees(&shot.figure(), tp.height_m), "{}", shot.figure());
    assert!(agrees(
        &shot.value_of("bulk N to lid"),
        truth.bulk_n_per_s.unwrap()
    ));
    // It stays the current sounding when the task is opened again from home.
    // (The home menu keeps its row: Data, two below Sounding.)
    press_stored(&mut app, &mut st, &[Menu, Up, Up, Ok]);
    assert_eq!(app.screen(), Screen::SoundingResult(0));
    assert_eq!(app.sounding_source().map(|n| n.as_str()), Some("ALT"));

    // A sounding longer than the device holds is refused with both counts, and the
    // current sounding is kept.
    press_stored(&mut app, &mut st, &[Menu, Down, Down, Ok]);
    assert_eq!(app.screen(), Screen::DataList);
    let mut keys = vec![Down; at(&app, "LONG")];
    keys.extend([Ok, Down, Down, Down, Ok]);
    press_stored(&mut app, &mut st, &keys);
    let notice = app.notice().expect("a notice");
    assert_eq!(notice.heading, "Cannot read");
    let words = notice.text.as_str();
    assert!(
        words.contains("200 levels") && words.contains(&DEVICE_LEVELS.to_string()),
        "{words}"
    );
    assert_eq!(app.sounding_source().map(|n| n.as_str()), Some("ALT"));

    // A station set is used in the Network task.
    press_stored(&mut app, &mut st, &[Back]);
    assert!(app.notice().is_none());
    let mut keys = vec![Menu, Ok];
    keys.extend(vec![Down; at(&app, "DEMO")]);
    keys.extend([Ok, Down, Down, Down, Ok]);
    press_stored(&mut app, &mut st, &keys);
    assert_eq!(app.screen(), Screen::NetworkList, "{:?}", app.notice());
}

#[test]
fn data_use_a_stored_ridge_in_the_crossing_task() {
    use leeward_core::crossing::{Profile as Terrain, ProfilePoint, Ridge};
    use leeward_firmware::records::Record;
    use leeward_firmware::storage::DataKind;
    let mut st = MemStorage::new();
    let mut app = App::power_on(&mut st);
    // A tabulated cross-section the bell cannot be: a plateau between steep flanks, on the
    // demo ridge's axis.
    let (plain, crest) = (demo::PLAIN_M, demo::CREST_M);
    let mut pts = heapless::Vec::new();
    for (d_km, h) in [
        (-200.0, plain),
        (-40.0, plain),
        (-25.0, crest),
        (25.0, crest),
        (40.0, plain),
        (200.0, plain),
    ] {
        pts.push(ProfilePoint {
            distance_m: d_km * 1000.0,
            height_m: h,
        })
        .unwrap();
    }
    let table = Ridge {
        profile: Terrain::Table(pts),
        ..demo::ridge()
    };
    let bell = Ridge {
        profile: Terrain::Bell {
            base_m: 500.0,
            crest_m: 2200.0,
            half_width_m: 40_000.0,
        },
        ..demo::ridge()
    };
    let mut buf = [0u8; 2048];
    for (name, r) in [("MESA", &table), ("BELL", &bell)] {
        let n = r.encode(&mut buf).unwrap();
        st.put(DataKind::Ridge, name, &buf[..n]).unwrap();
    }
    app.open_store(&mut st);
    let at = |app: &App, name: &str| app.catalog().iter().position(|d| d.name == name).unwrap();
    let use_keys = |app: &App, name: &str| {
        let mut k = vec![Menu, Digit(6), Ok]; // Data is the sixth row
        k.extend(vec![Down; at(app, name)]);
        k.extend([Ok, Down, Down, Down, Ok]);
        k
    };

    // Data → MESA → Use: the crossing form, named after the ridge, with its figures.
    let keys = use_keys(&app, "MESA");
    press_stored(&mut app, &mut st, &keys);
    assert_eq!(app.screen(), Screen::CrossingForm, "{:?}", app.notice());
    let shot = Shot::of(&app);
    shot.assert_clean("crossing form with a stored ridge");
    assert!(shot.has("ridge MESA"), "{}", shot.dump());
    assert!(agrees(&shot.value_of("Crest height"), crest));
    assert!(agrees(&shot.value_of("Plain height"), plain));
    // Half the width above the half height: 25 + 7.5 km either side of the axis.
    assert!(
        agrees(&shot.value_of("Half-width"), 32_500.0),
        "{}",
        shot.dump()
    );
    // Compute: the core ran the table, and the pages show the core's answer for it.
    press_stored(&mut app, &mut st, &[Up, Ok]);
    let input = app.crossing_result().expect("a result").input.clone();
    assert_eq!(input.ridge.profile, table.profile);
    check_crossing_pages(&mut app, &input, "stored table ridge");

    // Typing another crest brings back the form's bell (the pages' check ends on the
    // form, on its Compute row).
    assert_eq!(app.screen(), Screen::CrossingForm);
    press_stored(&mut app, &mut st, &[Up; 6]);
    press_stored(&mut app, &mut st, &enter("2700"));
    // (OK moves on to the next field: the Compute row is five below.)
    press_stored(&mut app, &mut st, &[Down; 5]);
    assert!(
        !Shot::of(&app).has("ridge MESA"),
        "{}",
        Shot::of(&app).dump()
    );
    press_stored(&mut app, &mut st, &[Ok]);
    let input = app.crossing_result().expect("a result").input.clone();
    assert!(
        matches!(input.ridge.profile, Terrain::Bell { crest_m, .. } if (crest_m - 2700.0).abs() < 1e-9),
        "{:?}",
        input.ridge.profile
    );

    // A stored bell is written into the form and computed as the form's own.
    let keys = use_keys(&app, "BELL");
    press_stored(&mut app, &mut st, &keys);
    assert_eq!(app.screen(), Screen::CrossingForm, "{:?}", app.notice());
    assert!(app.ridge_table().is_none());
    press_stored(&mut app, &mut st, &[Up, Ok]);
    let input = app.crossing_result().expect("a result").input.clone();
    assert_eq!(input.ridge.profile, bell.profile);
}
