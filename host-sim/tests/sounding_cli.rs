//! `leeward sounding`, `leeward ridge --sounding` and `leeward demo`'s sounding: every flag
//! and every bad-input path. Expected figures come from the demo scenario's stated story
//! (core/src/demo.rs) or from leeward-core called directly with the same inputs.

mod common;
use common::{data, demo_file, json, num, refused, text};
use leeward_core::sounding::csv;
use leeward_core::sounding::isentropic::layer_pv;
use leeward_core::sounding::ridge_flow::{ridge_flow, RidgeCheck};
use leeward_core::sounding::summary::{summarise, SummaryOptions};

fn demo_csv() -> String {
    demo_file("tessel-col-sounding.csv")
}

#[test]
fn json_has_every_key_of_the_summary() {
    let v = json(&["sounding", &demo_csv()]);
    for key in [
        "levels",
        "tropopause_height_m",
        "tropopause_pressure_hpa",
        "lid_height_m",
        "height_check",
        "stable_layers",
        "n_bulk",
        "froude",
        "crossing_verdict",
        "thermal_wind_ms",
        "barotropic_verdict",
        "decode_problems",
    ] {
        assert!(v.get(key).is_some(), "{key} missing");
    }
    let l0 = &v["levels"][0];
    for key in [
        "pressure_hpa",
        "height_m",
        "temperature_c",
        "theta_k",
        "dewpoint_c",
    ] {
        assert!(l0.get(key).is_some(), "level key {key} missing");
    }
    // The demo story (core/src/demo.rs): tropopause at 10.8 km, the lid by default; one
    // stable layer capped at 3.5 km; a 40 m error at 400 hPa caught by the height check.
    assert_eq!(num(&v, "tropopause_height_m"), 10_800.0);
    assert_eq!(num(&v, "lid_height_m"), 10_800.0);
    assert_eq!(v["stable_layers"].as_array().unwrap().len(), 1);
    assert_eq!(num(&v["stable_layers"][0], "top_m"), 3500.0);
    assert_eq!(num(&v["height_check"], "flagged"), 1.0);
    assert_eq!(num(&v["height_check"], "worst_pressure_hpa"), 400.0);
    // No ridge given: the Froude number is null with its reason.
    assert!(v["froude"].is_null());
    assert!(v["froude_reason"]
        .as_str()
        .unwrap()
        .contains("--ridge-height"));
    assert_eq!(
        v["barotropic_verdict"].as_str().unwrap(),
        "close to barotropic: the column argument is sound"
    );
}

#[test]
fn ridge_flags_give_the_cores_froude_number() {
    let v = json(&[
        "sounding",
        &demo_csv(),
        "--ridge-height",
        "2600",
        "--ground",
        "300",
        "--ridge-axis",
        "0",
    ]);
    let p = csv::parse(&std::fs::read_to_string(demo_csv()).unwrap()).unwrap();
    let s = summarise(&p, &SummaryOptions::default()).unwrap();
    let r = ridge_flow(
        &p,
        &s.heights,
        &RidgeCheck {
            ground_m: 300.0,
            crest_m: 2600.0,
            axis_deg: Some(0.0),
        },
    )
    .unwrap();
    assert!((num(&v, "froude") - r.froude).abs() < 1e-12);
    assert_eq!(v["crossing_verdict"], r.verdict.statement());
    assert!((num(&v["ridge_flow"], "ridge_height_m") - 2300.0).abs() < 1e-9);
    // Without --ground the upstream ground is the station: h = 750 m, a larger Fr.
    let near = json(&["sounding", &demo_csv(), "--ridge-height", "2600"]);
    assert!((num(&near["ridge_flow"], "ridge_height_m") - 750.0).abs() < 1e-9);
    assert!(num(&near, "froude") > num(&v, "froude"));
    let t = text(&[
        "sounding",
        &demo_csv(),
        "--ridge-height",
        "2600",
        "--ground",
        "300",
    ]);
    assert!(t.contains("Froude number"), "{t}");
    assert!(t.contains("the sounding covers"), "{t}");
}

#[test]
fn lid_choices() {
    let stable = json(&["sounding", &demo_csv(), "--lid", "stable:1"]);
    assert_eq!(num(&stable, "lid_height_m"), 3500.0);
    let set = json(&["sounding", &demo_csv(), "--lid", "9000"]);
    assert_eq!(num(&set, "lid_height_m"), 9000.0);
    assert_eq!(set["lid_source"], "height set by the user");
    refused(&["sounding", &demo_csv(), "--lid", "banana"], "--lid");
    refused(&["sounding", &demo_csv(), "--lid", "stable:0"], "stable:N");
    // A stable layer that is not there is a reason in the output, not a crash.
    let none = json(&["sounding", &demo_csv(), "--lid", "stable:4"]);
    assert!(none["lid_height_m"].is_null());
    assert!(none["lid_height_m_reason"]
        .as_str()
        .unwrap()
        .contains("stable layer number"));
}

#[test]
fn layer_pv_matches_the_core() {
    let v = json(&[
        "sounding",
        &demo_csv(),
        "--zeta",
        "2e-5",
        "--theta-layer",
        "305,330",
    ]);
    let p = csv::parse(&std::fs::read_to_string(demo_csv()).unwrap()).unwrap();
    let s = summarise(&p, &SummaryOptions::default()).unwrap();
    let f = leeward_core::rotation::coriolis(45.5);
    let pv = layer_pv(&p, &s.heights, 305.0, 330.0, 2e-5, f).unwrap();
    assert!((num(&v, "layer_pv_pvu") - pv.pv_pvu).abs() < 1e-12);
    // The default layer runs from the lowest level to the lid.
    let d = json(&["sounding", &demo_csv(), "--zeta", "-1e-5"]);
    assert!(num(&d["layer_pv"], "p_high_hpa") < 250.0);
    refused(
        &[
            "sounding",
            &demo_csv(),
            "--zeta",
            "1e-5",
            "--theta-layer",
            "305",
        ],
        "two numbers",
    );
    refused(
        &["sounding", &demo_csv(), "--theta-layer", "305,330"],
        "--zeta",
    );
}

#[test]
fn barotropy_layer_latitude_and_tolerance() {
    let v = json(&["sounding", &demo_csv(), "--layer", "2000,8000"]);
    assert_eq!(num(&v["barotropy"], "base_m"), 2000.0);
    assert_eq!(num(&v["barotropy"], "top_m"), 8000.0);
    refused(
        &["sounding", &demo_csv(), "--layer", "2000;8000"],
        "two numbers",
    );
    // No latitude in the file: the barotropy check says why, --lat supplies it.
    let nolat = json(&["sounding", &data("sounding_nolat.csv")]);
    assert!(nolat["barotropic_verdict"].is_null());
    assert!(nolat["barotropic_verdict_reason"]
        .as_str()
        .unwrap()
        .contains("latitude"));
    let withlat = json(&["sounding", &data("sounding_nolat.csv"), "--lat", "-40"]);
    assert!(withlat["barotropic_verdict"].is_string());
    // US-standard-like shape: the lapse-rate tropopause is the 11 km level.
    assert_eq!(num(&withlat, "tropopause_height_m"), 11_000.0);
    let loose = json(&["sounding", &demo_csv(), "--tolerance", "50"]);
    assert_eq!(num(&loose["height_check"], "flagged"), 0.0);
}

#[test]
fn write_csv_saves_the_same_profile() {
    let dir = std::env::temp_dir().join(format!("leeward-cli-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join("copy.csv");
    let v = json(&[
        "sounding",
        &demo_csv(),
        "--write-csv",
        out.to_str().unwrap(),
    ]);
    let copy = json(&["sounding", out.to_str().unwrap()]);
    assert_eq!(v["levels"], copy["levels"]);
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn bad_sounding_files_are_refused() {
    refused(&["sounding", "/nonexistent/x.csv"], "cannot read");
    refused(&["sounding", &data("sounding_badheader.csv")], "column 1");
    refused(&["sounding", &data("sounding_badrow.csv")], "line 3");
    refused(
        &["sounding", &data("sounding_order.csv")],
        "pressure must decrease",
    );
    refused(&["sounding", &demo_csv(), "--format", "xml"], "xml");
    refused(
        &["sounding", &demo_csv(), "--ground", "300"],
        "--ridge-height",
    );
    refused(
        &["sounding", &demo_csv(), "--tolerance", "x"],
        "--tolerance",
    );
}

#[test]
fn ridge_takes_lid_wind_and_n_from_a_sounding() {
    let base = [
        "ridge",
        "--sounding",
        "",
        "--lat",
        "45.5",
        "--lon",
        "-140",
        "--crest-height",
        "2600",
        "--half-width-km",
        "60",
        "--base-height",
        "300",
    ];
    let file = demo_csv();
    let mut args: Vec<&str> = base.to_vec();
    args[2] = &file;
    let v = json(&args);
    assert_eq!(num(&v, "lid_m"), 10_800.0);
    let sw = num(&v["sounding"], "mean_wind_ms");
    assert!((num(&v, "wind_ms") - sw).abs() < 1e-12);
    assert!(num(&v["sounding"], "n_below_crest") > 0.009);
    assert!(v["froude"].is_object());
    // Explicit flags win over the sounding.
    let mut over = args.clone();
    over.extend_from_slice(&["--wind", "25", "--lid", "stable:1"]);
    let o = json(&over);
    assert_eq!(num(&o, "wind_ms"), 25.0);
    assert_eq!(num(&o, "lid_m"), 3500.0);
    // Without a sounding, the lid must be a height and wind and direction are required.
    refused(
        &[
            "ridge",
            "--lat",
            "45",
            "--wind",
            "20",
            "--dir",
            "270",
            "--lid",
            "tropopause",
            "--crest-height",
            "2000",
            "--half-width-km",
            "50",
        ],
        "need --sounding",
    );
    refused(
        &[
            "ridge",
            "--lat",
            "45",
            "--lid",
            "10000",
            "--crest-height",
            "2000",
            "--half-width-km",
            "50",
        ],
        "--wind",
    );
}

#[test]
fn demo_uses_its_sounding() {
    let v = json(&["demo"]);
    assert_eq!(num(&v["sounding"], "lid_m"), 10_800.0);
    assert_eq!(num(&v["column"], "lid_m"), 10_800.0);
    let n = num(&v["sounding"], "n_below_crest");
    // MISSION.md / demo.rs: N ≈ 0.010 /s below the crest.
    assert!((n - 0.010).abs() < 0.0015, "{n}");
    let t = text(&["demo"]);
    assert!(t.contains("Tessel Col ascent"));
    assert!(t.contains("close to barotropic"));
}

#[test]
fn temp_reports_are_read_like_csv() {
    // The demo report is the demo ascent coded in FM 35 (tests/tests/demo_files.rs checks
    // that): told apart by its contents, it gives the same lid and stable layer.
    let temp = demo_file("tessel-col.temp");
    let v = json(&["sounding", &temp, "--elevation", "1850", "--lat", "45.5"]);
    let c = json(&["sounding", &demo_csv()]);
    assert!((num(&v, "tropopause_height_m") - num(&c, "tropopause_height_m")).abs() < 20.0);
    assert!(
        (num(&v["stable_layers"][0], "top_m") - num(&c["stable_layers"][0], "top_m")).abs() < 10.0
    );
    assert_eq!(v["decode_problems"].as_array().unwrap().len(), 0);
    assert_eq!(num(&v["height_check"], "flagged"), 1.0);
    assert_eq!(v["barotropic_verdict"], c["barotropic_verdict"]);
    // --format temp says the same; --format csv reads it as a (bad) CSV.
    let forced = json(&["sounding", &temp, "--format", "temp", "--lat", "45.5"]);
    assert_eq!(forced["levels"].as_array().unwrap().len(), 15);
    refused(&["sounding", &temp, "--format", "csv"], "column");
    // Without a latitude the barotropy check asks for one.
    let t = text(&["sounding", &temp]);
    assert!(t.contains("give --lat"), "{t}");
}

#[test]
fn garbled_temp_groups_are_named() {
    let g = data("temp_garbled.txt");
    let v = json(&["sounding", &g, "--lat", "45.5"]);
    let probs = v["decode_problems"].as_array().unwrap();
    assert_eq!(probs.len(), 2, "{probs:?}");
    assert_eq!(probs[0]["part"], "A");
    assert!(probs[0]["problem"].as_str().unwrap().contains("garbled"));
    // The good levels are still there: 500 hPa keeps its height and temperature.
    let l500 = v["levels"]
        .as_array()
        .unwrap()
        .iter()
        .find(|l| l["pressure_hpa"] == 500.0)
        .unwrap();
    assert_eq!(num(l500, "height_m"), 5610.0);
    assert!((num(l500, "temperature_c") + 10.3).abs() < 0.05);
    let t = text(&["temp", &g, "--elevation", "1850"]);
    assert!(t.contains("Groups the decoder could not read"));
    assert!(t.contains("part A, group 22"), "{t}");
    let tj = json(&["temp", &g]);
    assert_eq!(tj["decode_problems"].as_array().unwrap().len(), 2);
    assert_eq!(tj["station"]["id"], "08888");
}

#[test]
fn unreadable_temp_reports_are_refused() {
    refused(
        &["sounding", &data("temp_useless.txt")],
        "could not be read",
    );
    refused(&["temp", &data("temp_useless.txt")], "could not be read");
    refused(&["temp", "/nonexistent.txt"], "cannot read");
    refused(
        &[
            "temp",
            &demo_file("tessel-col.temp"),
            "--elevation",
            "20000",
        ],
        "elevation",
    );
}

#[test]
fn write_csv_turns_a_temp_report_into_leeward_csv() {
    let dir = std::env::temp_dir().join(format!("leeward-temp-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join("decoded.csv");
    let v = json(&[
        "sounding",
        &demo_file("tessel-col.temp"),
        "--lat",
        "45.5",
        "--write-csv",
        out.to_str().unwrap(),
    ]);
    let back = json(&["sounding", out.to_str().unwrap(), "--lat", "45.5"]);
    assert_eq!(v["levels"], back["levels"]);
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn ridge_takes_a_temp_sounding_with_its_elevation() {
    let v = json(&[
        "ridge",
        "--sounding",
        &demo_file("tessel-col.temp"),
        "--elevation",
        "1850",
        "--lat",
        "45.5",
        "--lon",
        "-140",
        "--crest-height",
        "2600",
        "--half-width-km",
        "60",
        "--base-height",
        "300",
    ]);
    // The coded tropopause (243 hPa) sits within the code's resolution of the CSV's 10.8 km.
    assert!((num(&v, "lid_m") - 10_800.0).abs() < 30.0);
    assert!(num(&v["sounding"], "n_below_crest") > 0.009);
    refused(
        &[
            "ridge",
            "--lat",
            "45",
            "--wind",
            "20",
            "--dir",
            "270",
            "--lid",
            "10000",
            "--crest-height",
            "2000",
            "--half-width-km",
            "50",
            "--elevation",
            "100",
        ],
        "--sounding",
    );
}
