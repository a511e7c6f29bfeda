//! The TEMP decoder against a profile we code ourselves, a hand-written report, garbled
//! copies of both, and random text.
//!
//! The encoder below is written from the code rules (WMO-306 FM 35 as described in the
//! US Navy Aerographer's Mate manual, and FIELD-NOTES §7 from memory) the simple way an
//! encoder works: "the last three figures". The decoder has to get the thousands back
//! from the ranges of each surface, so the round trip checks one against the other.

use std::fmt::Write as _;

use approx::assert_abs_diff_eq;
use leeward_core::sounding::{Level, LevelKind, Profile};
use leeward_core::temp_code::{decode, DecodeOptions, IssueKind, PartId, Report};
use leeward_tests::temp_encode::{code_height, code_temp, code_wind, indicator, level_id};
use proptest::prelude::*;

/// Metres per second in one knot (1852 m per hour: the international nautical mile).
const KT: f64 = 1852.0 / 3600.0;

// ----------------------------------------------------------------------------------
// The known profile: US Standard Atmosphere 1976.

/// Temperature of the US Standard Atmosphere 1976 at geopotential height z (m), °C:
/// 288.15 K less 6.5 K/km up to 11 km, 216.65 K above (to 20 km).
fn ussa_t_from_z(z: f64) -> f64 {
    if z <= 11_000.0 {
        15.0 - 0.0065 * z
    } else {
        216.65 - 273.15
    }
}

/// The same atmosphere's temperature at pressure p (hPa), °C, from the hydrostatic
/// power law of a constant lapse rate: T = T0 (p/p0)^(R L / g0), R = 287.053 J/(kg K)
/// (the standard's R* / M0), L = 6.5 K/km, g0 = 9.80665 m/s²; isothermal above
/// 226.32 hPa.
fn ussa_t_from_p(p: f64) -> f64 {
    if p <= 226.32 {
        216.65 - 273.15
    } else {
        288.15 * (p / 1013.25).powf(287.053 * 0.0065 / 9.80665) - 273.15
    }
}

/// A level to code: pressure (hPa), height (m), temperature and dew-point depression
/// (°C), wind (degrees, knots).
#[derive(Debug, Clone, Copy)]
struct Obs {
    p: u16,
    z: Option<f64>,
    t: Option<f64>,
    dep: Option<f64>,
    wind: Option<(u16, u16)>,
}

/// Standard surfaces with the FIELD-NOTES §6 heights (computed from the USSA 1976 layer
/// formulas), our own choice of dew-point depressions (both code ranges) and winds
/// (jet over 100 kt, 5-degree directions).
fn standard_obs() -> Vec<Obs> {
    let table: [(u16, f64, f64, (u16, u16)); 11] = [
        (1000, 111.0, 0.6, (200, 8)),
        (925, 762.0, 2.4, (215, 15)),
        (850, 1457.0, 4.0, (230, 22)),
        (700, 3012.0, 9.0, (245, 35)),
        (500, 5574.0, 17.0, (255, 55)),
        (400, 7185.0, 25.0, (260, 70)),
        (300, 9164.0, 31.0, (265, 95)),
        (250, 10_363.0, 33.0, (270, 118)),
        (200, 11_784.0, 35.0, (275, 133)),
        (150, 13_608.0, 38.0, (280, 90)),
        (100, 16_180.0, 40.0, (285, 45)),
    ];
    table
        .iter()
        .map(|&(p, z, dep, wind)| Obs {
            p,
            z: Some(z),
            t: Some(ussa_t_from_z(z)),
            dep: Some(dep),
            wind: Some(wind),
        })
        .collect()
}

const SURFACE: Obs = Obs {
    p: 1013,
    z: None,
    t: Some(15.0),
    dep: Some(0.8),
    wind: Some((190, 6)),
};

/// The tropopause at 11 km (226.32 hPa, coded to the whole hPa).
fn tropopause() -> Obs {
    Obs {
        p: 226,
        z: None,
        t: Some(216.65 - 273.15),
        dep: Some(34.0),
        wind: Some((270, 127)),
    }
}

/// Maximum wind: 275° 150 kt at 240 hPa.
const MAX_WIND: Obs = Obs {
    p: 240,
    z: None,
    t: None,
    dep: None,
    wind: Some((275, 150)),
};

/// Significant temperature levels of Part B (pressures our choice, temperatures of the
/// same atmosphere); 700 hPa repeats a standard surface on purpose.
fn sig_temp_obs() -> Vec<Obs> {
    [
        (962u16, 1.2),
        (874, 3.5),
        (700, 9.0),
        (612, 14.0),
        (226, 34.0),
        (180, 36.0),
        (100, 40.0),
    ]
    .iter()
    .map(|&(p, dep)| Obs {
        p,
        z: None,
        t: Some(ussa_t_from_p(f64::from(p))),
        dep: Some(dep),
        wind: None,
    })
    .collect()
}

/// Significant wind levels of Part B.
fn sig_wind_obs() -> Vec<Obs> {
    [
        (955u16, (195u16, 12u16)),
        (780, (240, 30)),
        (455, (255, 60)),
        (240, (275, 150)),
        (120, (285, 60)),
    ]
    .iter()
    .map(|&(p, wind)| Obs {
        p,
        z: None,
        t: None,
        dep: None,
        wind: Some(wind),
    })
    .collect()
}

// ----------------------------------------------------------------------------------
// Our encoder (the group coders are in leeward_tests::temp_encode).

/// Part A, winds in knots (day + 50), Id = 1 (winds up to 100 hPa).
fn encode_part_a(station: &str, day: u8, hour: u8) -> String {
    let mut s = format!("TTAA {:02}{:02}1 {station}", day + 50, hour);
    let _ = write!(
        s,
        " 99{:03} {} {}",
        SURFACE.p % 1000,
        code_temp(SURFACE.t, SURFACE.dep),
        code_wind(SURFACE.wind)
    );
    for o in standard_obs() {
        let _ = write!(
            s,
            " {}{} {} {}",
            indicator(o.p),
            code_height(o.p, o.z),
            code_temp(o.t, o.dep),
            code_wind(o.wind)
        );
    }
    let tp = tropopause();
    let _ = write!(
        s,
        " 88{:03} {} {}",
        tp.p,
        code_temp(tp.t, tp.dep),
        code_wind(tp.wind)
    );
    let _ = write!(s, " 77{:03} {} 41020", MAX_WIND.p, code_wind(MAX_WIND.wind));
    s.push_str(" 51515 10164 00098=");
    s
}

/// Part B: sections 5, 6 (21212) and 7 (31313).
fn encode_part_b(station: &str, day: u8, hour: u8) -> String {
    let mut s = format!("TTBB {:02}{:02}/ {station}", day + 50, hour);
    let _ = write!(
        s,
        " 00{:03} {}",
        SURFACE.p % 1000,
        code_temp(SURFACE.t, SURFACE.dep)
    );
    for (i, o) in sig_temp_obs().iter().enumerate() {
        let _ = write!(
            s,
            " {}{:03} {}",
            level_id(i + 1),
            o.p % 1000,
            code_temp(o.t, o.dep)
        );
    }
    let _ = write!(
        s,
        " 21212 00{:03} {}",
        SURFACE.p % 1000,
        code_wind(SURFACE.wind)
    );
    for (i, o) in sig_wind_obs().iter().enumerate() {
        let _ = write!(
            s,
            " {}{:03} {}",
            level_id(i + 1),
            o.p % 1000,
            code_wind(o.wind)
        );
    }
    s.push_str(" 31313 58708 81104=");
    s
}

fn full_report() -> String {
    format!(
        "USXX01 LEEW 141200\r\n{}\r\n\r\nUSXX02 LEEW 141200\r\n{}\r\n",
        encode_part_a("07145", 14, 12),
        encode_part_b("07145", 14, 12)
    )
}

// ----------------------------------------------------------------------------------
// Checks.

fn level_at(profile: &Profile, p_hpa: f64) -> Option<Level> {
    profile
        .levels()
        .iter()
        .copied()
        .find(|l| (l.pressure_pa - p_hpa * 100.0).abs() < 0.5)
}

/// Compare a decoded level with what was coded, within the code's resolution:
/// heights 0.5 m (metres) or 5 m (decametres); temperature 0.1 °C (the tenths carry the
/// sign, so one tenth either way); depression 0.05 °C in tenths or 0.5 °C in whole
/// degrees; wind direction exact (5-degree steps), speed half a knot.
fn assert_matches(l: &Level, o: &Obs, what: &str) {
    if let Some(z) = o.z {
        let tol = if o.p >= 700 { 0.5 } else { 5.0 };
        assert_abs_diff_eq!(l.height_m.expect(what), z, epsilon = tol + 1e-9);
    }
    if let Some(t) = o.t {
        let got = l.temperature_k.expect(what) - 273.15;
        assert_abs_diff_eq!(got, t, epsilon = 0.1 + 1e-9);
        if let Some(dep) = o.dep {
            let dep_tol = if dep <= 5.0 { 0.05 } else { 0.5 };
            let got_dep = got - (l.dewpoint_k.expect(what) - 273.15);
            assert_abs_diff_eq!(got_dep, dep, epsilon = dep_tol + 1e-9);
        }
    }
    if let Some((dir, kt)) = o.wind {
        let w = l.wind.expect(what);
        let dir = f64::from(dir % 360);
        assert_eq!(w.dir_from_deg, dir, "{what}");
        assert_abs_diff_eq!(w.speed_ms, f64::from(kt) * KT, epsilon = 0.5 * KT);
    }
}

fn decode_ok(text: &str, elevation_m: Option<f64>) -> Report {
    match decode(text, &DecodeOptions { elevation_m }) {
        Ok(r) => r,
        Err(e) => panic!("decode failed: {e}\n{text}"),
    }
}

fn faults(r: &Report) -> Vec<(PartId, u16, IssueKind)> {
    r.issues
        .iter()
        .filter(|i| !i.kind.is_note())
        .map(|i| (i.part, i.group, i.kind))
        .collect()
}

#[test]
fn round_trip_of_the_standard_atmosphere() {
    let text = full_report();
    let r = decode_ok(&text, Some(2.0));
    assert!(r.parts.a && r.parts.b);
    assert!(r.knots);
    assert_eq!(faults(&r), vec![], "{text}");
    // Notes: Part A's 51515 and Part B's 31313.
    assert_eq!(r.issues.len(), 2);
    assert_eq!(r.profile.station.id.as_str(), "07145");
    let time = r.profile.station.time.unwrap();
    assert_eq!((time.day, time.hour), (14, 12));

    let p = &r.profile;
    let sfc = p.levels()[0];
    assert_eq!(sfc.pressure_pa, 101_300.0);
    assert!(sfc.kind.contains(LevelKind::SURFACE));
    assert_eq!(sfc.height_m, Some(2.0));
    assert_matches(&sfc, &SURFACE, "surface");
    for o in standard_obs() {
        let l = level_at(p, f64::from(o.p)).unwrap_or_else(|| panic!("{} hPa", o.p));
        assert!(l.kind.contains(LevelKind::STANDARD), "{} hPa", o.p);
        assert_matches(&l, &o, &format!("{} hPa", o.p));
    }
    let tp = level_at(p, 226.0).unwrap();
    assert!(tp.kind.contains(LevelKind::TROPOPAUSE));
    assert!(tp.kind.contains(LevelKind::SIGNIFICANT_TEMPERATURE));
    assert_matches(&tp, &tropopause(), "tropopause");
    let mw = level_at(p, 240.0).unwrap();
    assert!(mw.kind.contains(LevelKind::MAX_WIND) && mw.kind.contains(LevelKind::SIGNIFICANT_WIND));
    assert_matches(&mw, &MAX_WIND, "max wind");
    for o in sig_temp_obs() {
        let l = level_at(p, f64::from(o.p)).unwrap();
        assert!(l.kind.contains(LevelKind::SIGNIFICANT_TEMPERATURE));
        assert_matches(&l, &o, &format!("sig T {} hPa", o.p));
    }
    for o in sig_wind_obs() {
        let l = level_at(p, f64::from(o.p)).unwrap();
        assert!(l.kind.contains(LevelKind::SIGNIFICANT_WIND));
        assert_matches(&l, &o, &format!("sig wind {} hPa", o.p));
    }
    // 700 hPa is in both parts: one level with both marks.
    let l700 = level_at(p, 700.0).unwrap();
    assert!(l700
        .kind
        .contains(LevelKind::STANDARD.with(LevelKind::SIGNIFICANT_TEMPERATURE)));
    // Every distinct pressure once: surface, 11 standard, tropopause, max wind, and the
    // Part B levels not already there (700, 226, 100 and 240 repeat).
    let expected = 1 + 11 + 1 + 1 + (7 - 3) + (5 - 1);
    assert_eq!(p.len(), expected);
    // Ground up, pressure strictly falling.
    assert!(p
        .levels()
        .windows(2)
        .all(|w| w[1].pressure_pa < w[0].pressure_pa));
}

#[test]
fn parts_in_either_order_give_the_same_profile() {
    let a = encode_part_a("07145", 14, 12);
    let b = encode_part_b("07145", 14, 12);
    let ab = decode_ok(&format!("{a}\n{b}"), None);
    let ba = decode_ok(&format!("{b}\n\n   {a}"), None);
    assert_eq!(ab.profile, ba.profile);
    // A repeated part changes nothing.
    let aab = decode_ok(&format!("{a} {a} {b}"), None);
    assert_eq!(aab.profile, ab.profile);
}

#[test]
fn winds_in_metres_per_second() {
    // Invented, for the test: day 14 without 50 added, so m/s (WMO-306 FM 35 as
    // described in the Aerographer's Mate manual / FIELD-NOTES §7).
    let text = "TTAA 14121 07145 99013 15008 19006 00111 14206 20008 92762 10024 21515=";
    let r = decode_ok(text, None);
    assert!(!r.knots);
    let w = level_at(&r.profile, 925.0).unwrap().wind.unwrap();
    assert_eq!((w.dir_from_deg, w.speed_ms), (215.0, 15.0));
}

/// Invented, for the test: a Part B before its Part A, with bulletin headings, CR LF line
/// ends and ragged spacing. Station 06610 at 491 m, 12 UTC on the 3rd, winds in knots,
/// surface 955 hPa so 1000 hPa lies below the ground; Id = 7 (winds up to 700 hPa).
const HAND: &str = "ZCZC 123\r\nULXX20 LEEW 031200\r\n\
TTBB 5312/ 06610 00955 08456 11921 05658 22850 01064\r\n\
     33700 08371 21212 00955 23008 11900 25516 22700 26530 31313 58708 81108=\r\n\
NNNN\r\nUSXX20 LEEW 031200\r\n\
TTAA 53127 06610 99955 08456 23008 00087 ///// ///// 92814 06256 24512\r\n\
  85525 01064 25520 70129 08371 26530 50571 21761 40725 33967 30938 49560\r\n\
  25055 55960 20190 58558 15378 56361 10651 60960 88211 57157 26075 77230 26588 41018=\r\n";

#[test]
fn hand_written_report() {
    let r = decode_ok(HAND, Some(491.0));
    assert_eq!(faults(&r), vec![]);
    assert_eq!(
        r.below_ground, 1,
        "1000 hPa at 87 m is below a 955 hPa surface"
    );
    let p = &r.profile;
    // Surface 955 hPa, 8.4 °C (84 tenths, even: positive), depression 5.6 → 6 degrees.
    let sfc = p.levels()[0];
    assert_eq!(sfc.pressure_pa, 95_500.0);
    assert_eq!(sfc.height_m, Some(491.0));
    assert_abs_diff_eq!(sfc.temperature_k.unwrap() - 273.15, 8.4, epsilon = 1e-9);
    assert_abs_diff_eq!(sfc.dewpoint_k.unwrap() - 273.15, 2.4, epsilon = 1e-9);
    // 23008: 230°, 8 kt.
    let w = sfc.wind.unwrap();
    assert_eq!(w.dir_from_deg, 230.0);
    assert_abs_diff_eq!(w.speed_ms, 8.0 * KT, epsilon = 1e-9);
    // 92814: 814 m; 06256: 6.2 °C, depression 6 → 0.2 °C; 24512: 245° 12 kt.
    let l = level_at(p, 925.0).unwrap();
    assert_eq!(l.height_m, Some(814.0));
    assert_abs_diff_eq!(l.dewpoint_k.unwrap() - 273.15, 0.2, epsilon = 1e-9);
    assert_eq!(l.wind.unwrap().dir_from_deg, 245.0);
    // 70129: 3129 m; 08371: -8.3 °C (odd tenths), depression 21.
    let l = level_at(p, 700.0).unwrap();
    assert_eq!(l.height_m, Some(3129.0));
    assert_abs_diff_eq!(l.temperature_k.unwrap() - 273.15, -8.3, epsilon = 1e-9);
    assert!(
        l.kind.contains(LevelKind::SIGNIFICANT_TEMPERATURE),
        "repeated in Part B"
    );
    // Id = 7: no wind group above 700 hPa, so 50571 is 500 hPa at 5710 m, 21761 its
    // temperature (-21.7, depression 11), and 40725 the next surface.
    let l = level_at(p, 500.0).unwrap();
    assert_eq!(l.height_m, Some(5710.0));
    assert_eq!(l.wind, None);
    assert_abs_diff_eq!(l.temperature_k.unwrap() - 273.15, -21.7, epsilon = 1e-9);
    // 25055: 10 550 m (055 dam below 500: +1000 dam); 10651: 16 510 m.
    assert_eq!(level_at(p, 250.0).unwrap().height_m, Some(10_550.0));
    assert_eq!(level_at(p, 100.0).unwrap().height_m, Some(16_510.0));
    // 88211 57157 26075: tropopause 211 hPa, -57.1 °C, depression 7, 260° 75 kt.
    let tp = level_at(p, 211.0).unwrap();
    assert!(tp.kind.contains(LevelKind::TROPOPAUSE));
    assert_abs_diff_eq!(tp.temperature_k.unwrap() - 273.15, -57.1, epsilon = 1e-9);
    assert_abs_diff_eq!(tp.dewpoint_k.unwrap() - 273.15, -64.1, epsilon = 1e-9);
    assert_eq!(tp.wind.unwrap().dir_from_deg, 260.0);
    // Max wind 77230 26588: 265°, 88 kt; 41018 the shear group.
    let mw = level_at(p, 230.0).unwrap();
    assert!(mw.kind.contains(LevelKind::MAX_WIND));
    assert_eq!(mw.wind.unwrap().dir_from_deg, 265.0);
    assert_abs_diff_eq!(mw.wind.unwrap().speed_ms, 88.0 * KT, epsilon = 1e-9);
    // Part B: 11921 05658: 921 hPa, 5.6 °C, depression 8.
    let l = level_at(p, 921.0).unwrap();
    assert_abs_diff_eq!(l.dewpoint_k.unwrap() - 273.15, -2.4, epsilon = 1e-9);
    // Wind levels: 25516 at 900 hPa: 255°, 16 kt.
    let l = level_at(p, 900.0).unwrap();
    assert!(l.kind.contains(LevelKind::SIGNIFICANT_WIND));
    assert_eq!(l.wind.unwrap().dir_from_deg, 255.0);
}

// ----------------------------------------------------------------------------------
// Garbled copies of Part A (alone, so that Part B cannot fill what A lost).

/// Part A's groups; the last carries no `=` (it is put back by `join`).
fn part_a_groups() -> Vec<String> {
    let a = encode_part_a("07145", 14, 12);
    a.trim_end_matches('=')
        .split(' ')
        .map(String::from)
        .collect()
}

fn join(groups: &[String]) -> String {
    format!("{}=", groups.join(" "))
}

/// Byte offset of group `i` in `join(groups)`.
fn offset_of(groups: &[String], i: usize) -> u32 {
    groups[..i].iter().map(|g| g.len() as u32 + 1).sum()
}

/// Group index of the indicator of standard surface `p` in the clean Part A.
fn index_of(p: u16) -> usize {
    let order = [1000u16, 925, 850, 700, 500, 400, 300, 250, 200, 150, 100];
    6 + 3 * order.iter().position(|&q| q == p).unwrap()
}

/// Every standard surface except `but` decodes as coded.
fn others_intact(r: &Report, but: &[u16]) {
    for o in standard_obs().iter().filter(|o| !but.contains(&o.p)) {
        let l = level_at(&r.profile, f64::from(o.p)).unwrap_or_else(|| panic!("{} hPa", o.p));
        assert_matches(&l, o, &format!("{} hPa", o.p));
    }
    let tp = level_at(&r.profile, 226.0).expect("tropopause");
    assert_matches(&tp, &tropopause(), "tropopause");
}

#[test]
fn deleted_group_costs_only_its_level() {
    let mut g = part_a_groups();
    let i700 = index_of(700);
    g.remove(i700 + 1); // 700 hPa's temperature group
    let text = join(&g);
    let r = decode_ok(&text, None);
    assert_eq!(
        faults(&r),
        vec![(PartId::A, i700 as u16, IssueKind::GroupMissing)]
    );
    assert_eq!(r.issues[0].offset, offset_of(&g, i700));
    let l = level_at(&r.profile, 700.0).unwrap();
    assert_abs_diff_eq!(l.height_m.unwrap(), 3012.0);
    assert_eq!((l.temperature_k, l.wind), (None, None));
    others_intact(&r, &[700]);
}

#[test]
fn letters_in_an_indicator_or_a_temperature() {
    let mut g = part_a_groups();
    let (i850, i500) = (index_of(850), index_of(500));
    g[i850] = g[i850].replacen('5', "S", 1); // "85457" -> "8S457"
    g[i500 + 1] = format!("{}O{}", &g[i500 + 1][..2], &g[i500 + 1][3..]);
    let text = join(&g);
    let r = decode_ok(&text, None);
    assert_eq!(
        faults(&r),
        vec![
            (PartId::A, i850 as u16, IssueKind::BadIndicator),
            (PartId::A, (i500 + 1) as u16, IssueKind::Unreadable),
        ]
    );
    assert_eq!(r.issues[0].offset, offset_of(&g, i850));
    assert_eq!(r.issues[1].offset, offset_of(&g, i500 + 1));
    // 850 hPa: placed by its neighbours, no height, temperature and wind kept.
    let l = level_at(&r.profile, 850.0).unwrap();
    assert_eq!(l.height_m, None);
    assert!(l.temperature_k.is_some() && l.wind.is_some());
    // 500 hPa: height and wind kept without the temperature.
    let l = level_at(&r.profile, 500.0).unwrap();
    assert_eq!(l.temperature_k, None);
    assert_abs_diff_eq!(l.height_m.unwrap(), 5570.0);
    assert_eq!(l.wind.unwrap().dir_from_deg, 255.0);
    others_intact(&r, &[850, 500]);
}

#[test]
fn a_whole_level_lost_and_a_group_doubled() {
    let mut g = part_a_groups();
    let (i925, i400) = (index_of(925), index_of(400));
    g.drain(i400..i400 + 3);
    let doubled = g[i925 + 1].clone();
    g.insert(i925 + 1, doubled);
    let text = join(&g);
    let r = decode_ok(&text, None);
    // 300 hPa's indicator: 3 groups removed at 400, 1 inserted before it.
    let i300 = i400 + 1;
    assert_eq!(
        faults(&r),
        vec![
            (PartId::A, (i925 + 1) as u16, IssueKind::ExtraGroup),
            (
                PartId::A,
                i300 as u16,
                IssueKind::LevelsMissing { levels: 1 }
            ),
        ]
    );
    assert_eq!(&g[i300][..2], "30");
    assert!(level_at(&r.profile, 400.0).is_none());
    let l925 = level_at(&r.profile, 925.0).unwrap();
    assert_abs_diff_eq!(l925.height_m.unwrap(), 762.0);
    assert_eq!(l925.temperature_k, None);
    others_intact(&r, &[925, 400]);
}

#[test]
fn noise_characters_and_tokens() {
    let mut g = part_a_groups();
    let (i850, i300) = (index_of(850), index_of(300));
    g[i300 + 2] = "26~95".into();
    g.insert(i850 + 2, "#*".into()); // noise between 850's temperature and wind
    let text = join(&g);
    let r = decode_ok(&text, None);
    let i300 = i300 + 1;
    assert_eq!(
        faults(&r),
        vec![
            (PartId::A, (i850 + 2) as u16, IssueKind::ExtraGroup),
            (PartId::A, (i300 + 2) as u16, IssueKind::Unreadable),
        ]
    );
    assert_eq!(r.issues[1].offset, offset_of(&g, i300 + 2));
    let l300 = level_at(&r.profile, 300.0).unwrap();
    assert_eq!(l300.wind, None);
    assert!(l300.temperature_k.is_some() && l300.height_m.is_some());
    others_intact(&r, &[300]);
}

#[test]
fn truncated_text_keeps_what_came_through() {
    let g = part_a_groups();
    let i500 = index_of(500);
    // Cut inside 500 hPa's temperature group, no '='.
    let mut text = g[..=i500 + 1].join(" ");
    text.truncate(text.len() - 3);
    let r = decode(&text, &DecodeOptions::default()).unwrap();
    let f = faults(&r);
    assert!(
        f.contains(&(PartId::A, (i500 + 2) as u16, IssueKind::NoEndMarker)),
        "{f:?}"
    );
    assert!(
        f.contains(&(PartId::A, i500 as u16, IssueKind::GroupMissing)),
        "{f:?}"
    );
    assert_eq!(r.issues.last().unwrap().offset as usize, text.len());
    for o in standard_obs().iter().filter(|o| o.p >= 700) {
        assert_matches(
            &level_at(&r.profile, f64::from(o.p)).unwrap(),
            o,
            "below the cut",
        );
    }
    assert_abs_diff_eq!(
        level_at(&r.profile, 500.0).unwrap().height_m.unwrap(),
        5570.0
    );
    assert!(level_at(&r.profile, 400.0).is_none());
}

#[test]
fn missing_end_marker_between_parts() {
    let a = encode_part_a("07145", 14, 12);
    let b = encode_part_b("07145", 14, 12);
    let text = format!("{} {b}", a.trim_end_matches('='));
    let r = decode_ok(&text, None);
    let n_a = a.split(' ').count() as u16;
    assert_eq!(faults(&r), vec![(PartId::A, n_a, IssueKind::NoEndMarker)]);
    assert_eq!(r.profile, decode_ok(&full_report(), None).profile);
}

#[test]
fn part_of_another_station_is_not_merged() {
    let text = format!(
        "{} {}",
        encode_part_a("07145", 14, 12),
        encode_part_b("07110", 14, 12)
    );
    let r = decode_ok(&text, None);
    assert_eq!(faults(&r), vec![(PartId::B, 0, IssueKind::OtherStation)]);
    assert!(level_at(&r.profile, 962.0).is_none());
    assert!(r.parts.a && !r.parts.b);
}

#[test]
fn nothing_usable_is_refused_with_a_reason() {
    let e = decode(
        "TTAA 6212/ 07145 ##### ##### NNNN=",
        &DecodeOptions::default(),
    )
    .unwrap_err();
    assert!(e.to_string().contains("no level survived"), "{e}");
    let e = decode("no report here", &DecodeOptions::default()).unwrap_err();
    assert!(e.to_string().contains("TTAA"), "{e}");
}

// ----------------------------------------------------------------------------------
// No input panics.

/// Check what every decode must hold, whatever the input.
fn sound(text: &str) {
    if let Ok(r) = decode(
        text,
        &DecodeOptions {
            elevation_m: Some(100.0),
        },
    ) {
        assert!(!r.profile.is_empty());
        let ls = r.profile.levels();
        assert!(ls.windows(2).all(|w| w[1].pressure_pa < w[0].pressure_pa));
        assert!(ls.iter().all(|l| l.validate().is_ok()));
        assert!(r.issues.iter().all(|i| i.offset as usize <= text.len()));
    }
}

#[derive(Debug, Clone)]
enum Edit {
    Delete(usize),
    Insert(usize, char),
    Replace(usize, char),
}

fn edit() -> impl Strategy<Value = Edit> {
    let ch = prop::sample::select(vec![
        '0', '1', '5', '9', '/', ' ', '=', '\n', 'T', 'A', 'B', '#', 'é',
    ]);
    prop_oneof![
        any::<usize>().prop_map(Edit::Delete),
        (any::<usize>(), ch.clone()).prop_map(|(i, c)| Edit::Insert(i, c)),
        (any::<usize>(), ch).prop_map(|(i, c)| Edit::Replace(i, c)),
    ]
}

fn apply(text: &str, edits: &[Edit]) -> String {
    let mut chars: Vec<char> = text.chars().collect();
    for e in edits {
        let n = chars.len().max(1);
        match *e {
            Edit::Delete(i) if !chars.is_empty() => {
                chars.remove(i % n);
            }
            Edit::Insert(i, c) => chars.insert(i % (chars.len() + 1), c),
            Edit::Replace(i, c) if !chars.is_empty() => chars[i % n] = c,
            _ => {}
        }
    }
    chars.into_iter().collect()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 512, ..ProptestConfig::default() })]

    #[test]
    fn random_text_never_panics(s in any::<String>()) {
        sound(&s);
        sound(&format!("TTAA {s}"));
    }

    #[test]
    fn code_like_text_never_panics(s in "(TTAA|TTBB|[0-9/]{5}| |=|\n|21212|88999|77|99){0,120}") {
        sound(&s);
    }

    #[test]
    fn mutated_reports_never_panic(edits in prop::collection::vec(edit(), 0..16)) {
        let text = apply(&full_report(), &edits);
        sound(&text);
    }

    #[test]
    fn one_replaced_group_leaves_far_levels_alone(which in 3usize..60, junk in "[0-9/#a]{1,7}") {
        // Any single group of Part A replaced by junk: the standard surfaces at least two
        // levels away from it still decode as coded. Junk that reads as a valid section
        // indicator (88PPP, 77PPP, 66PPP, or a regional 31313-style group) opens that
        // section, as a real one would: nothing tells them apart, so the levels after it
        // are lost (a limit stated in docs/methods.md). Such junk is left out here.
        let section_like = junk.len() == 5
            && junk.bytes().all(|b| b.is_ascii_digit())
            && (matches!(&junk[..2], "88" | "77" | "66")
                || (junk[..2] == junk[2..4]
                    && junk[4..] == junk[..1]
                    && junk[..2].parse::<u8>().is_ok_and(|n| (31..=69).contains(&n))));
        prop_assume!(!section_like);
        let mut g = part_a_groups();
        let which = which.min(g.len() - 1);
        g[which] = junk;
        let text = join(&g);
        let r = decode_ok(&text, None);
        for o in standard_obs() {
            let at = index_of(o.p);
            if at.abs_diff(which) >= 6 && which >= 3 {
                let l = level_at(&r.profile, f64::from(o.p));
                prop_assert!(l.is_some(), "{} hPa lost; junk at {which}", o.p);
                assert_matches(&l.unwrap(), &o, &format!("{} hPa", o.p));
            }
        }
    }
}

#[test]
fn a_garbled_group_starting_like_a_section_does_not_end_the_standard_surfaces() {
    // Found by the property below: the 500 hPa indicator replaced by "880#0" (88 as a
    // tropopause section would start, then unreadable) ended section 2 there and lost
    // every surface above. Only a readable indicator starts section 3.
    let mut g = part_a_groups();
    let at = index_of(500);
    g[at] = "880#0".to_string();
    let r = decode_ok(&join(&g), None);
    for o in standard_obs().iter().filter(|o| o.p <= 300) {
        let l = level_at(&r.profile, f64::from(o.p));
        assert!(l.is_some(), "{} hPa lost", o.p);
        assert_matches(&l.unwrap(), o, &format!("{} hPa", o.p));
    }
}

#[test]
fn garbled_day_group_borrows_the_unit_and_guesses_id() {
    // Part A's date group garbled: the wind unit comes from Part B's, and where the
    // wind groups stop (Id) from how the indicators line up.
    let a = encode_part_a("07145", 14, 12).replacen("64121", "6x121", 1);
    let text = format!("{a} {}", encode_part_b("07145", 14, 12));
    let r = decode_ok(&text, None);
    assert_eq!(
        faults(&r),
        vec![
            (PartId::A, 1, IssueKind::BadDayTime),
            (PartId::A, 1, IssueKind::WindTopGuessed),
        ]
    );
    assert!(r.knots);
    others_intact(&r, &[]);
}
