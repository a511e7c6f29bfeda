//! Command-line tests: every subcommand, human and JSON output, and the bad-input cases
//! (exit status 2, one line naming the problem, never a panic).

mod common;
use common::{data, json, leeward, num, refused};

#[test]
fn help_shows_the_cautions() {
    let out = leeward(&["--help"]);
    assert!(out.status.success());
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(s.contains("not a forecast"), "{s}");
    assert!(s.contains("national meteorological service"));
    for sub in [
        "coriolis",
        "geostrophic",
        "stretch",
        "column",
        "ridge",
        "rossby",
        "demo",
    ] {
        assert!(s.contains(sub), "{sub} missing from help");
    }
}

#[test]
fn coriolis_json_and_text() {
    // f = 2Ω sin 45°, β = 2Ω cos 45°/a (FIELD-NOTES §2 check values, computed).
    let v = json(&["coriolis", "--lat", "45"]);
    assert!((num(&v, "f") - 1.0313e-4).abs() < 1e-8);
    assert!((num(&v, "beta") - 1.619e-11).abs() < 1e-14);
    assert!((num(&v, "inertial_period_s") / 3600.0 - 16.92).abs() < 0.02);
    let v = json(&["coriolis", "--lat", "-45"]);
    assert!(num(&v, "f") < 0.0);
    let v = json(&["coriolis", "--lat", "0"]);
    assert!(v["inertial_period_s"].is_null());
    assert!(v["inertial_period_s_reason"].is_string());
    let out = leeward(&["coriolis", "--lat", "45.5"]);
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(s.contains("s⁻¹") && s.contains(" h"), "{s}");
}

#[test]
fn coriolis_bad_input() {
    refused(&["coriolis", "--lat", "95"], "--lat");
    refused(&["coriolis", "--lat", "abc"], "--lat");
    refused(&["coriolis"], "--lat");
    refused(&["coriolis", "--lat", "NaN"], "--lat");
}

#[test]
fn geostrophic_from_a_file() {
    // Heights fall 22.2 m over 2° of latitude northward, 100 m per 1000 km: about
    // 9.5 m/s westerly at 45° (FIELD-NOTES §3 check value).
    let v = json(&["geostrophic", &data("stations_ok.csv"), "--model", "plane"]);
    assert_eq!(v["model"], "plane");
    let u = num(&v, "u_g");
    assert!((u - 9.5).abs() < 0.2, "{u}");
    assert!(num(&v, "v_g").abs() < 0.5);
    assert!((num(&v, "dir_from_deg") - 270.0).abs() < 2.0);
    assert!(v["zeta_g"].is_null() && v["zeta_g_reason"].is_string());
    for k in ["speed", "f0", "residual_rms_m", "u_g_sigma"] {
        num(&v, k);
    }
    assert_eq!(v["stations"].as_array().map(|a| a.len()), Some(5));
    assert!(v["stations"][0]["residual_m"].is_number());

    let v = json(&[
        "geostrophic",
        &data("stations_ok.csv"),
        "--model",
        "curvature",
        "--ref-lat",
        "45",
        "--ref-lon",
        "10",
    ]);
    assert_eq!(v["model"], "curvature");
    num(&v, "zeta_g");
    assert!(num(&v, "zeta_g_sigma") > 0.0);
}

#[test]
fn geostrophic_bad_input() {
    refused(&["geostrophic", "/no/such/file.csv"], "cannot read");
    refused(&["geostrophic", &data("stations_badrow.csv")], "line 3");
    refused(
        &["geostrophic", &data("stations_collinear.csv")],
        "one line",
    );
    refused(
        &["geostrophic", &data("stations_two.csv")],
        "need 3 stations, have 2",
    );
    refused(
        &["geostrophic", &data("stations_badheader.csv")],
        "latitude",
    );
    refused(
        &["geostrophic", &data("stations_ok.csv"), "--model", "cubic"],
        "--model",
    );
    refused(
        &["geostrophic", &data("stations_ok.csv"), "--ref-lat", "45"],
        "--ref-lon",
    );
    refused(
        &[
            "geostrophic",
            &data("stations_ok.csv"),
            "--model",
            "quadratic",
        ],
        "need 6 stations, have 5",
    );
}

#[test]
fn stretch_forward_and_inverse() {
    // ζ2 = (ζ1 + f1) H2/H1 − f2 (FIELD-NOTES §4), f at 45°: (1.0313e-4)(0.8) − 1.0313e-4.
    let v = json(&[
        "stretch", "--lat1", "45", "--zeta1", "0", "--depth1", "10000", "--lat2", "45", "--depth2",
        "8000",
    ]);
    assert!((num(&v, "zeta2") + 0.2 * 1.0313e-4).abs() < 1e-8);
    assert_eq!(v["sense2"], "anticyclonic");
    num(&v, "abs_vort2");
    num(&v, "pv");
    let v = json(&[
        "stretch",
        "--lat1",
        "45",
        "--zeta1",
        "0",
        "--depth1",
        "10000",
        "--lat2",
        "45",
        "--zeta2",
        "-2.0626e-5",
    ]);
    assert!((num(&v, "depth2_m") - 8000.0).abs() < 1.0);
    refused(
        &[
            "stretch", "--lat1", "45", "--zeta1", "0", "--depth1", "0", "--lat2", "45", "--depth2",
            "8000",
        ],
        "depth",
    );
    refused(
        &[
            "stretch", "--lat1", "45", "--zeta1", "0", "--depth1", "1000", "--lat2", "45",
        ],
        "--depth2",
    );
    refused(
        &[
            "stretch", "--lat1", "45", "--zeta1", "0", "--depth1", "1000", "--lat2", "45",
            "--depth2", "1", "--zeta2", "0",
        ],
        "--zeta2",
    );
}

#[test]
fn column_depth_and_pv() {
    let v = json(&[
        "column", "--ground", "1850", "--lid", "10800", "--lat", "45.5",
    ]);
    assert!((num(&v, "depth_m") - 8950.0).abs() < 1e-9);
    assert!(num(&v, "pv") > 0.0);
    refused(
        &["column", "--ground", "3000", "--lid", "2000"],
        "column depth",
    );
}

#[test]
fn ridge_bell_and_profile() {
    let args = [
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
    ];
    let v = json(&args);
    for k in [
        "trough_distance_km",
        "trough_displacement_km",
        "trough_zeta",
        "wavelength_km",
        "stationary_wavelength_km",
        "pv_drift_rel",
    ] {
        num(&v, k);
    }
    assert!(num(&v, "pv_drift_rel") < 1e-9);
    assert!(num(&v, "trough_distance_km") > 0.0);
    // A westerly over a north-south ridge in the NH: the lee trough lies south of the start
    // and is cyclonic (FIELD-NOTES §4).
    assert!(num(&v, "trough_displacement_km") < 0.0);
    assert!(num(&v, "trough_zeta") > 0.0);
    assert!(v["track"].as_array().is_some_and(|t| t.len() > 10));
    assert!(v["no_ridge"]["trough_distance_km"].is_null());

    let mut with_profile = vec![
        "ridge", "--lat", "45", "--wind", "20", "--dir", "270", "--lid", "10000",
    ];
    let p = data("profile_ok.csv");
    with_profile.extend(["--profile", p.as_str()]);
    let w = json(&with_profile);
    // The tabulated bell is coarser but should put the trough within 10% of the bell's.
    let (a, b) = (num(&v, "trough_distance_km"), num(&w, "trough_distance_km"));
    assert!((a - b).abs() < 0.1 * a, "{a} vs {b}");

    let out = leeward(&args);
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(
        s.contains("lee trough") && s.contains(" km") && s.contains("CAUTION"),
        "{s}"
    );
}

#[test]
fn ridge_statements_not_numbers() {
    let v = json(&[
        "ridge",
        "--lat",
        "45",
        "--wind",
        "20",
        "--dir",
        "90",
        "--lid",
        "10000",
        "--crest-height",
        "2000",
        "--half-width-km",
        "50",
    ]);
    for k in [
        "trough_distance_km",
        "wavelength_km",
        "stationary_wavelength_km",
    ] {
        assert!(v[k].is_null(), "{k} should be null for easterly flow");
        let why = v[format!("{k}_reason")].as_str().unwrap_or("");
        assert!(why.contains("easterly"), "{why}");
    }
    let v = json(&[
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
        "--brunt-vaisala",
        "0.01",
    ]);
    // Fr = U/(N h) = 20/(0.01 × 2000) = 1.0 (computed), on the edge: not below 1 by much.
    assert!((v["froude"]["number"].as_f64().unwrap_or(0.0) - 1.0).abs() < 0.01);
}

#[test]
fn ridge_bad_input() {
    let base = [
        "ridge",
        "--lat",
        "45",
        "--wind",
        "20",
        "--dir",
        "270",
        "--half-width-km",
        "50",
    ];
    let mut a = base.to_vec();
    a.extend(["--lid", "1500", "--crest-height", "2000"]);
    refused(&a, "lid");
    let mut a = base.to_vec();
    a.extend([
        "--lid",
        "10000",
        "--crest-height",
        "2000",
        "--axis-deg",
        "90",
    ]);
    refused(&a, "ridge axis");
    let p = data("profile_unordered.csv");
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
            "--profile",
            &p,
        ],
        "profile",
    );
    refused(
        &[
            "ridge", "--lat", "45", "--wind", "20", "--dir", "270", "--lid", "10000",
        ],
        "--crest-height",
    );
    let mut a = base.to_vec();
    a.extend([
        "--lid",
        "10000",
        "--crest-height",
        "2000",
        "--step-km",
        "50",
    ]);
    refused(&a, "step");
}

#[test]
fn rossby_figures() {
    // L_s = 2π√(U/β) = about 6050 km at 15 m/s and 45° (FIELD-NOTES §5, computed).
    let v = json(&["rossby", "--lat", "45", "--wind", "15"]);
    assert!((num(&v, "stationary_wavelength_km") - 6048.0).abs() < 5.0);
    assert!(v["phase_speed"].is_null() && v["phase_speed_reason"].is_string());
    let v = json(&[
        "rossby",
        "--lat",
        "45",
        "--wind",
        "15",
        "--wavelength-km",
        "4000",
    ]);
    // c = U − β (L/2π)² = 15 − 1.6187e-11 × (4e6/2π)² = 15 − 6.56 = 8.44 m/s (computed).
    assert!((num(&v, "phase_speed") - 8.44).abs() < 0.02);
    let v = json(&["rossby", "--lat", "45", "--wind", "-10"]);
    assert!(v["stationary_wavelength_km"].is_null());
    refused(&["rossby", "--lat", "2", "--wind", "10"], "equator");
}

#[test]
fn demo_runs_and_speaks_plainly() {
    let out = leeward(&["demo"]);
    assert!(out.status.success());
    let s = String::from_utf8_lossy(&out.stdout);
    for needle in [
        "Tessel",
        "invented",
        "geostrophic wind",
        "lee trough",
        "CAUTION",
        "Froude",
    ] {
        assert!(
            s.contains(needle),
            "'{needle}' missing from the demo report"
        );
    }
    let v = json(&["demo"]);
    // The demo field balances a 20 m/s westerly with a small southerly component from the
    // trough (core/src/demo.rs); the fit must recover it within its error bars.
    let g = &v["geostrophic"];
    assert!((num(g, "u_g") - 20.0).abs() < 2.0 * num(g, "u_g_sigma"));
    num(&v["ridge"], "trough_distance_km");
    num(&v["coriolis"], "f");
}

#[test]
fn a_flash_image_of_the_old_size_is_refused_not_wiped() {
    // An image from before the simulator's flash matched the board's: 8 pages of 16 KiB
    // (131072 bytes) where the board's flash is 512 KiB. The device refuses it (exit 2,
    // one line saying what to do) and leaves every byte as it was.
    let dir = std::env::temp_dir().join(format!("leeward-cli-oldimg-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let img = dir.join("old.img");
    let old: Vec<u8> = (0..128 * 1024).map(|i| (i % 253) as u8).collect();
    std::fs::write(&img, &old).unwrap();
    let sock = dir.join("dev.sock");
    let (img_s, sock_s) = (img.to_string_lossy(), sock.to_string_lossy());
    refused(
        &["device", "--flash", &img_s, "--socket", &sock_s],
        "delete it",
    );
    refused(
        &["device", "--flash", &img_s, "--socket", &sock_s],
        "is 131072 bytes",
    );
    assert_eq!(
        std::fs::read(&img).unwrap(),
        old,
        "the old image was changed"
    );
    assert!(
        !sock.exists(),
        "the device served a socket on a refused image"
    );
    std::fs::remove_dir_all(&dir).unwrap();
}
