//! The demo files under `demo/` are what leeward-core's demo scenario builds, so that the
//! files a user runs the commands on tell the same (invented) story as `leeward demo`.
//!
//! After a deliberate change to the scenario, refresh them with
//! `LEEWARD_WRITE_DEMO=1 cargo test -p leeward-tests --test demo_files`.

use leeward_core::demo;
use leeward_core::sounding::csv;
use std::fmt::Write;
use std::path::PathBuf;

fn path(name: &str) -> PathBuf {
    [env!("CARGO_MANIFEST_DIR"), "..", "demo", name]
        .iter()
        .collect()
}

/// Compare `fresh` with the committed file, or write it when asked.
fn check(name: &str, fresh: &str) {
    let p = path(name);
    if std::env::var_os("LEEWARD_WRITE_DEMO").is_some() {
        std::fs::write(&p, fresh).unwrap();
        return;
    }
    let committed = std::fs::read_to_string(&p)
        .unwrap_or_else(|e| panic!("{}: {e} (LEEWARD_WRITE_DEMO=1 writes it)", p.display()));
    assert_eq!(
        committed, fresh,
        "{name} differs from the demo scenario; refresh with LEEWARD_WRITE_DEMO=1"
    );
}

#[test]
fn sounding_csv_is_the_demo_ascent() {
    let mut text = String::from(
        "# Tessel Col radiosonde ascent: INVENTED demo data (fictional place), made by\n\
         # leeward-core's demo module from a stated analytic profile.\n",
    );
    csv::write(&demo::sounding().unwrap(), &mut text).unwrap();
    check("tessel-col-sounding.csv", &text);
    // And it reads back as the same profile.
    let back = csv::parse(&text).unwrap();
    assert_eq!(back.len(), demo::sounding().unwrap().len());
}

#[test]
fn stations_csv_is_the_demo_network() {
    let mut text = String::from(
        "# 500 hPa heights around the Tessel Range: INVENTED demo data, an analytic field\n\
         # plus invented report errors (leeward-core demo module).\n\
         id,lat,lon,height_m,sigma_m\n",
    );
    for s in &demo::network().unwrap().stations {
        writeln!(
            text,
            "{},{},{},{:.1},{}",
            s.id,
            s.pos.lat_deg,
            s.pos.lon_deg,
            s.height_m,
            s.sigma()
        )
        .unwrap();
    }
    check("tessel-stations.csv", &text);
}

/// The demo ascent as a coded report, with the invented station number of the scenario.
fn demo_temp() -> String {
    let p = demo::sounding().unwrap();
    let t = p.station.time.unwrap();
    format!(
        "Tessel Col ascent as a WMO FM 35 TEMP report: INVENTED demo data (fictional place,\n\
         made-up station number {}), coded by the test encoder in tests/src/lib.rs.\n\n{}",
        demo::SONDE_WMO_NUMBER,
        leeward_tests::temp_encode::encode_profile(&p, demo::SONDE_WMO_NUMBER, t.day, t.hour)
    )
}

#[test]
fn temp_report_is_the_demo_ascent() {
    use leeward_core::temp_code::{decode, DecodeOptions};
    let text = demo_temp();
    check("tessel-col.temp", &text);
    // Decoded, it is the same ascent within the code's resolution (FIELD-NOTES §7):
    // whole hPa in Part B, 0.1 °C, dew-point depression 0.1 K to 5 K and whole degrees
    // above, wind direction to 5° and speed to 1 kt, heights to 1 m (to 700 hPa) or 1 dam.
    let r = decode(
        &text,
        &DecodeOptions {
            elevation_m: Some(demo::SITE_ELEVATION_M),
        },
    )
    .unwrap();
    assert!(r.issues.iter().all(|i| i.kind.is_note()), "{:?}", r.issues);
    let want = demo::sounding().unwrap();
    assert_eq!(r.profile.len(), want.len());
    for (got, w) in r.profile.levels().iter().zip(want.levels()) {
        let what = format!("{} hPa", w.pressure_pa / 100.0);
        assert!((got.pressure_pa - w.pressure_pa).abs() <= 50.0, "{what}");
        let (t, tw) = (got.temperature_k.unwrap(), w.temperature_k.unwrap());
        assert!((t - tw).abs() <= 0.11, "{what}: T {t} vs {tw}");
        let dep = tw - w.dewpoint_k.unwrap();
        let dep_got = t - got.dewpoint_k.unwrap();
        let res = if dep <= 5.0 { 0.11 } else { 0.6 };
        assert!(
            (dep - dep_got).abs() <= res,
            "{what}: depression {dep_got} vs {dep}"
        );
        let (wg, ww) = (got.wind.unwrap(), w.wind.unwrap());
        assert!(
            (wg.dir_from_deg - ww.dir_from_deg).abs() <= 2.5,
            "{what}: wind dir"
        );
        assert!(
            (wg.speed_ms - ww.speed_ms).abs() <= 0.26,
            "{what}: wind speed"
        );
        if w.kind.contains(leeward_core::sounding::LevelKind::STANDARD) {
            let tol = if w.pressure_pa >= 70_000.0 { 0.5 } else { 5.0 };
            let z = got.height_m.unwrap();
            assert!((z - w.height_m.unwrap()).abs() <= tol, "{what}: height {z}");
        }
    }
}
