//! `leeward sounding` and `leeward temp`: a radiosonde profile checked for the column
//! argument, and a coded report shown level by level.

use crate::text::{heading, line};
use crate::{CliError, SoundingArgs, CAUTIONS};
use leeward_core::sounding::barotropy::Barotropy;
use leeward_core::sounding::heights::Heights;
use leeward_core::sounding::isentropic::layer_pv;
use leeward_core::sounding::lid::{LidChoice, LidSource};
use leeward_core::sounding::ridge_flow::{RidgeCheck, RidgeFlow};
use leeward_core::sounding::stability::LayerRun;
use leeward_core::sounding::summary::{summarise, Summary, SummaryOptions};
use leeward_core::sounding::thermo::{LevelThermo, ZERO_CELSIUS_K};
use leeward_core::sounding::{csv as sonde_csv, LevelKind, Profile};
use leeward_core::temp_code;
use serde_json::{json, Map, Value};
use std::path::Path;

/// How a sounding file is written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// Decide from the contents: a TEMP report starts its parts with TTAA or TTBB.
    Auto,
    /// leeward's sounding CSV.
    Csv,
    /// WMO FM 35 TEMP text, Parts A and/or B.
    Temp,
}

/// A problem the decoder reported for one group, in words.
pub struct DecodeNote {
    /// Where, for the human report.
    pub place: String,
    /// Why.
    pub why: String,
    /// The JSON form.
    pub json: Value,
}

/// A loaded sounding and, for a TEMP report, the groups that could not be read.
pub struct Loaded {
    pub profile: Profile,
    pub format: Format,
    pub problems: Vec<DecodeNote>,
    pub problems_not_listed: u32,
}

/// Whether `text` reads as a TEMP report (a TTAA or TTBB group) rather than CSV.
pub fn looks_like_temp(text: &str) -> bool {
    text.split_whitespace()
        .any(|w| w.eq_ignore_ascii_case("TTAA") || w.eq_ignore_ascii_case("TTBB"))
}

/// Read a sounding from `path` as CSV or TEMP.
pub fn load(path: &Path, format: Format, elevation_m: Option<f64>) -> Result<Loaded, CliError> {
    if let Some(e) = elevation_m {
        if !(-500.0..=9000.0).contains(&e) {
            return Err(CliError::input(format!(
                "--elevation {e} is out of range (-500 to 9000 m)"
            )));
        }
    }
    let text = std::fs::read_to_string(path)
        .map_err(|e| CliError::input(format!("cannot read {}: {e}", path.display())))?;
    let format = match format {
        Format::Auto if looks_like_temp(&text) => Format::Temp,
        Format::Auto => Format::Csv,
        f => f,
    };
    match format {
        Format::Temp => load_temp(path, &text, elevation_m),
        _ => {
            let mut profile = sonde_csv::parse(&text)
                .map_err(|e| CliError::input(format!("{}: {e}", path.display())))?;
            if elevation_m.is_some() {
                profile.station.elevation_m = elevation_m;
            }
            Ok(Loaded {
                profile,
                format: Format::Csv,
                problems: Vec::new(),
                problems_not_listed: 0,
            })
        }
    }
}

fn load_temp(path: &Path, text: &str, elevation_m: Option<f64>) -> Result<Loaded, CliError> {
    let opts = temp_code::DecodeOptions { elevation_m };
    let report = temp_code::decode(text, &opts)
        .map_err(|e| CliError::input(format!("{}: {e}", path.display())))?;
    let problems = report
        .issues
        .iter()
        .map(|i| {
            let part = format!("{:?}", i.part);
            DecodeNote {
                place: format!("part {part}, group {} (byte {})", i.group, i.offset),
                why: i.kind.statement().to_string(),
                json: json!({
                    "part": part,
                    "group": i.group,
                    "byte": i.offset,
                    "problem": i.kind.statement(),
                    "note_only": i.kind.is_note(),
                    "text": i.to_string(),
                }),
            }
        })
        .collect();
    Ok(Loaded {
        profile: report.profile,
        format: Format::Temp,
        problems,
        problems_not_listed: u32::from(report.issues_dropped),
    })
}

/// Parse `--lid`: `tropopause`, `stable:N` or a height in metres.
pub fn parse_lid(s: &str) -> Result<LidChoice, String> {
    let t = s.trim().to_ascii_lowercase();
    if t == "tropopause" {
        return Ok(LidChoice::Tropopause);
    }
    if let Some(n) = t.strip_prefix("stable:") {
        let nth: u8 = n.parse().ok().filter(|&n| n >= 1).ok_or_else(|| {
            format!("'{s}': stable:N needs N = 1, 2, … (1 = lowest stable layer)")
        })?;
        return Ok(LidChoice::StableLayerTop { nth });
    }
    match t.trim_end_matches('m').parse::<f64>() {
        Ok(h) if h.is_finite() => Ok(LidChoice::Height { height_m: h }),
        _ => Err(format!(
            "'{s}' is not a lid: use tropopause, stable:N or a height in metres"
        )),
    }
}

/// Parse a pair `A,B` of numbers.
pub fn parse_pair(s: &str) -> Result<(f64, f64), String> {
    let (a, b) = s
        .split_once(',')
        .ok_or_else(|| format!("'{s}': give two numbers separated by a comma"))?;
    let num = |x: &str| {
        x.trim()
            .parse::<f64>()
            .ok()
            .filter(|v| v.is_finite())
            .ok_or_else(|| format!("'{x}' is not a number"))
    };
    Ok((num(a)?, num(b)?))
}

fn kind_words(k: LevelKind) -> String {
    let words = [
        (LevelKind::SURFACE, "surface"),
        (LevelKind::STANDARD, "standard"),
        (LevelKind::SIGNIFICANT_TEMPERATURE, "sig. temp"),
        (LevelKind::SIGNIFICANT_WIND, "sig. wind"),
        (LevelKind::TROPOPAUSE, "tropopause"),
        (LevelKind::MAX_WIND, "max wind"),
    ];
    words
        .iter()
        .filter(|(m, _)| k.contains(*m))
        .map(|(_, w)| *w)
        .collect::<Vec<_>>()
        .join(", ")
}

fn opt(v: Option<f64>, f: impl Fn(f64) -> String) -> String {
    v.map_or("-".into(), f)
}

/// The levels, as a table for people and as JSON objects.
fn levels_parts(p: &Profile, heights: Option<&Heights>) -> (String, Value) {
    let mut h = String::from(
        "   hPa       m   check     °C    Td °C     θ K   r g/kg  RH %   wind         kind\n",
    );
    let mut rows = Vec::new();
    for (i, l) in p.levels().iter().enumerate() {
        let th = LevelThermo::of(l);
        let computed = heights.and_then(|hs| hs.computed_m(i));
        let diff = heights.and_then(|hs| hs.difference_m(p, i));
        let flagged = heights.is_some_and(|hs| hs.is_flagged(p, i));
        let best = heights.and_then(|hs| hs.best_m(i)).or(l.height_m);
        h += &format!(
            "{:>7.1} {:>7} {:>7} {:>6} {:>8} {:>7} {:>7} {:>5} {:>12}  {}\n",
            l.pressure_pa / 100.0,
            opt(best, |z| format!(
                "{z:.0}{}",
                if l.height_m.is_some() { "" } else { "*" }
            )),
            opt(diff, |d| format!(
                "{d:+.0}{}",
                if flagged { "!" } else { "" }
            )),
            opt(l.temperature_k, |t| format!("{:.1}", t - ZERO_CELSIUS_K)),
            opt(l.dewpoint_k, |t| format!("{:.1}", t - ZERO_CELSIUS_K)),
            opt(th.theta_k, |t| format!("{t:.1}")),
            opt(th.mixing_ratio, |r| format!("{:.2}", r * 1000.0)),
            opt(th.relative_humidity, |r| format!("{:.0}", r * 100.0)),
            l.wind.map_or("-".into(), |w| format!(
                "{:03.0}°/{:.1} m/s",
                w.dir_from_deg, w.speed_ms
            )),
            kind_words(l.kind),
        );
        let c = |t: f64| t - ZERO_CELSIUS_K;
        rows.push(json!({
            "pressure_hpa": l.pressure_pa / 100.0,
            "height_m": l.height_m,
            "height_computed_m": computed,
            "height_diff_m": diff,
            "height_flag": flagged,
            "temperature_c": l.temperature_k.map(c),
            "dewpoint_c": l.dewpoint_k.map(c),
            "theta_k": th.theta_k,
            "virtual_temperature_k": th.virtual_temperature_k,
            "mixing_ratio_g_kg": th.mixing_ratio.map(|r| r * 1000.0),
            "relative_humidity_pct": th.relative_humidity.map(|r| r * 100.0),
            "wind_dir_deg": l.wind.map(|w| w.dir_from_deg),
            "wind_speed_ms": l.wind.map(|w| w.speed_ms),
            "kind": kind_words(l.kind),
        }));
    }
    if heights.is_some() {
        h += "   (* computed height; check = reported − hypsometric, ! beyond tolerance)\n";
    }
    (h, Value::Array(rows))
}

fn run_json(r: &LayerRun) -> Value {
    json!({
        "base_m": r.base_m, "top_m": r.top_m,
        "base_pressure_hpa": r.base_pressure_pa / 100.0,
        "top_pressure_hpa": r.top_pressure_pa / 100.0,
        "temperature_change_k": r.temperature_change_k,
        "theta_change_k": r.theta_change_k,
        "n2_per_s2": r.n2,
    })
}

fn run_text(r: &LayerRun) -> String {
    format!(
        "{:.0}–{:.0} m ({:.0}–{:.0} hPa), ΔT {:+.1} K, Δθ {:+.1} K",
        r.base_m,
        r.top_m,
        r.base_pressure_pa / 100.0,
        r.top_pressure_pa / 100.0,
        r.temperature_change_k,
        r.theta_change_k
    )
}

fn insert_result<T>(
    m: &mut Map<String, Value>,
    key: &str,
    r: &leeward_core::Result<T>,
    value: impl Fn(&T) -> Value,
) {
    match r {
        Ok(v) => {
            m.insert(key.into(), value(v));
        }
        Err(e) => {
            m.insert(key.into(), Value::Null);
            m.insert(format!("{key}_reason"), json!(e.to_string()));
        }
    }
}

/// The two lines a ridge crossing quotes from a sounding's Froude check: N below the crest
/// (with its layer) and the Froude number with its verdict.
pub fn n_and_froude_lines(r: &RidgeFlow, indent: &str) -> String {
    line(
        &format!("{indent}N below the crest"),
        format!(
            "{:.4} s⁻¹ ({:.0}–{:.0} m)",
            r.n_per_s, r.layer_base_m, r.layer_top_m
        ),
    ) + &line(
        &format!("{indent}Froude number U/(N h)"),
        format!("{:.2}: {}", r.froude, r.verdict.statement()),
    )
}

fn froude_text(r: &RidgeFlow) -> String {
    let mut h = String::new();
    let covered = (r.layer_top_m - r.layer_base_m) / r.ridge_height_m;
    h += &line(
        "layer used",
        format!(
            "{:.0}–{:.0} m{}",
            r.layer_base_m,
            r.layer_top_m,
            if covered < 0.999 {
                format!(
                    " (the sounding covers {:.0} % of the ridge height)",
                    covered * 100.0
                )
            } else {
                String::new()
            }
        ),
    );
    h += &line(
        "mean wind below the crest",
        format!(
            "{:03.0}° {:.1} m/s (across the ridge {:.1} m/s)",
            r.mean_wind.dir_from_deg, r.mean_wind.speed_ms, r.cross_ridge_ms
        ),
    );
    h += &line("bulk N", format!("{:.4} s⁻¹", r.n_per_s));
    h += &line(
        "Froude number U/(N h)",
        format!("{:.2} (h = {:.0} m)", r.froude, r.ridge_height_m),
    );
    h += &line("verdict", r.verdict.statement());
    if let Some(d) = r.blocked_depth_m {
        h += &line(
            "blocked layer",
            format!("lowest {d:.0} m above the upstream ground"),
        );
    }
    h += &line(
        "mountain-wave λz = 2πU/N",
        format!("{:.1} km", r.vertical_wavelength_m / 1000.0),
    );
    h
}

fn barotropy_text(b: &Barotropy, lat: f64) -> String {
    let mut h = String::new();
    h += &line("layer", format!("{:.0}–{:.0} m", b.base_m, b.top_m));
    h += &line(
        "wind at base, top",
        format!(
            "{:03.0}° {:.1} m/s, {:03.0}° {:.1} m/s",
            b.base_wind.dir_from_deg,
            b.base_wind.speed_ms,
            b.top_wind.dir_from_deg,
            b.top_wind.speed_ms
        ),
    );
    h += &line(
        "mean wind",
        format!(
            "{:03.0}° {:.1} m/s",
            b.mean_wind.dir_from_deg, b.mean_wind.speed_ms
        ),
    );
    h += &line(
        "thermal wind (top − base)",
        format!(
            "{:.1} m/s (u {:+.1}, v {:+.1})",
            b.thermal_speed_ms, b.thermal_u_ms, b.thermal_v_ms
        ),
    );
    h += &line(
        "turning with height",
        format!(
            "{:+.0}° {} → {}",
            b.turning_deg,
            b.turning.word(),
            b.turning.meaning(lat)
        ),
    );
    h += &line(
        "temperature advection",
        format!("{:+.2} K/h (layer mean)", b.advection_k_per_h),
    );
    h += &line(
        "|thermal| / |mean|",
        format!("{:.2} → {}", b.ratio, b.verdict.statement()),
    );
    h
}

fn barotropy_json(b: &Barotropy) -> Value {
    json!({
        "base_m": b.base_m, "top_m": b.top_m,
        "base_wind": {"dir_deg": b.base_wind.dir_from_deg, "speed_ms": b.base_wind.speed_ms},
        "top_wind": {"dir_deg": b.top_wind.dir_from_deg, "speed_ms": b.top_wind.speed_ms},
        "mean_wind": {"dir_deg": b.mean_wind.dir_from_deg, "speed_ms": b.mean_wind.speed_ms},
        "thermal_wind_u_ms": b.thermal_u_ms,
        "thermal_wind_v_ms": b.thermal_v_ms,
        "ratio": b.ratio,
        "turning_deg": b.turning_deg,
        "turning": b.turning.word(),
        "advection_k_per_h": b.advection_k_per_h,
        "shear_layers": b.layers.iter().map(|l| json!({
            "base_m": l.base_m, "top_m": l.top_m, "du_ms": l.du_ms, "dv_ms": l.dv_ms,
            "shear_per_s": l.shear_per_s, "turning_deg": l.turning_deg,
        })).collect::<Vec<_>>(),
    })
}

/// Options of the sounding analysis taken from the command line.
pub fn summary_options(a: &SoundingArgs, lid: LidChoice) -> SummaryOptions {
    SummaryOptions {
        elevation_m: a.elevation,
        height_tolerance_m: a.tolerance,
        lid,
        ridge: a.ridge_height.map(|crest| RidgeCheck {
            ground_m: a.ground.unwrap_or(f64::NAN),
            crest_m: crest,
            axis_deg: a.ridge_axis,
        }),
        lat_deg: a.lat,
        layer_m: a.layer,
    }
}

/// The readable report and JSON of a sounding summary.
pub fn summary_parts(
    loaded: &Loaded,
    s: &Summary,
    opts: &SummaryOptions,
    zeta: Option<f64>,
    theta_layer: Option<(f64, f64)>,
) -> (String, Value) {
    let p = &loaded.profile;
    let mut h = String::new();
    let st = &p.station;
    h += &line(
        "station",
        format!(
            "{}{}{}{}",
            if st.id.is_empty() {
                "(no id)"
            } else {
                st.id.as_str()
            },
            st.lat_deg.map_or(String::new(), |v| format!(", {v:.3}°")),
            st.lon_deg.map_or(String::new(), |v| format!(" {v:.3}°")),
            st.elevation_m
                .map_or(String::new(), |v| format!(", {v:.0} m")),
        ),
    );
    if let Some(t) = st.time {
        h += &line(
            "time",
            format!("day {} {:02}:{:02} UTC", t.day, t.hour, t.minute),
        );
    }
    h += &line(
        "levels",
        format!(
            "{} ({})",
            p.len(),
            match loaded.format {
                Format::Temp => "decoded from TEMP",
                _ => "from CSV",
            }
        ),
    );
    let (lh, lv) = levels_parts(p, Some(&s.heights));
    h += "\n";
    h += &lh;

    let mut m = Map::new();
    m.insert(
        "station".into(),
        serde_json::to_value(st).unwrap_or(Value::Null),
    );
    m.insert("levels".into(), lv);

    // Height check.
    h += "\n";
    h += &heading("Height check (hypsometric)");
    let hc = &s.heights;
    h += &line(
        "flagged levels",
        format!(
            "{} beyond {:.0} m{}",
            hc.flagged,
            hc.tolerance_m,
            hc.worst.map_or(String::new(), |(i, d)| format!(
                "; largest {d:+.0} m at {:.0} hPa",
                p.levels()[usize::from(i)].pressure_pa / 100.0
            ))
        ),
    );
    m.insert(
        "height_check".into(),
        json!({
            "tolerance_m": hc.tolerance_m,
            "flagged": hc.flagged,
            "start": format!("{:?}", hc.start),
            "worst_pressure_hpa": hc.worst.map(|(i, _)| p.levels()[usize::from(i)].pressure_pa / 100.0),
            "worst_diff_m": hc.worst.map(|(_, d)| d),
            "levels": (0..p.len()).map(|i| json!({
                "pressure_hpa": p.levels()[i].pressure_pa / 100.0,
                "diff_m": hc.difference_m(p, i),
                "flag": hc.is_flagged(p, i),
            })).collect::<Vec<_>>(),
        }),
    );

    // Stability, tropopause and lid.
    h += "\n";
    h += &heading("Stability, tropopause, lid");
    match s.tropopauses.first {
        Some(t) => {
            h += &line(
                "tropopause (WMO)",
                format!(
                    "{:.0} m, {:.0} hPa, {:.1} °C",
                    t.height_m,
                    t.pressure_pa / 100.0,
                    t.temperature_k - ZERO_CELSIUS_K
                ),
            );
            m.insert("tropopause_height_m".into(), json!(t.height_m));
            m.insert(
                "tropopause_pressure_hpa".into(),
                json!(t.pressure_pa / 100.0),
            );
        }
        None => {
            h += &line("tropopause (WMO)", "none found");
            m.insert("tropopause_height_m".into(), Value::Null);
            m.insert("tropopause_pressure_hpa".into(), Value::Null);
            m.insert(
                "tropopause_reason".into(),
                json!("no level meets the WMO lapse-rate definition"),
            );
        }
    }
    if let Some(t) = s.tropopauses.second {
        h += &line(
            "second tropopause",
            format!("{:.0} m, {:.0} hPa", t.height_m, t.pressure_pa / 100.0),
        );
    }
    m.insert(
        "second_tropopause_height_m".into(),
        json!(s.tropopauses.second.map(|t| t.height_m)),
    );
    if s.stability.stable_layers.is_empty() {
        h += &line("stable layers", "none below the tropopause");
    }
    for (k, r) in s.stability.stable_layers.iter().enumerate() {
        h += &line(&format!("stable layer {}", k + 1), run_text(r));
    }
    for r in &s.stability.inversions {
        h += &line("inversion", run_text(r));
    }
    m.insert(
        "stable_layers".into(),
        Value::Array(s.stability.stable_layers.iter().map(run_json).collect()),
    );
    m.insert(
        "inversions".into(),
        Value::Array(s.stability.inversions.iter().map(run_json).collect()),
    );
    match &s.lid {
        Ok(l) => {
            h += &line(
                "column lid",
                format!(
                    "{:.0} m ({}{})",
                    l.height_m,
                    l.source.statement(),
                    match l.source {
                        LidSource::StableLayerTop { nth, .. } => format!(" {nth}"),
                        _ => String::new(),
                    }
                ),
            );
        }
        Err(e) => h += &line("column lid", format!("none: {e}")),
    }
    insert_result(&mut m, "lid_height_m", &s.lid, |l| json!(l.height_m));
    if let Ok(l) = &s.lid {
        m.insert("lid_source".into(), json!(l.source.statement()));
    }
    match &s.bulk_n_per_s {
        Ok(n) => h += &line("bulk N, ground to lid", format!("{n:.4} s⁻¹")),
        Err(e) => h += &line("bulk N, ground to lid", format!("none: {e}")),
    }
    insert_result(&mut m, "n_bulk", &s.bulk_n_per_s, |n| json!(n));

    // Ridge.
    h += "\n";
    h += &heading("Will the air cross the ridge?");
    match &s.ridge_flow {
        None => {
            h += "  give --ridge-height for the Froude check\n";
            m.insert("froude".into(), Value::Null);
            m.insert("froude_reason".into(), json!("give --ridge-height"));
            m.insert("crossing_verdict".into(), Value::Null);
        }
        Some(Err(e)) => {
            h += &format!("  no Froude check: {e}\n");
            m.insert("froude".into(), Value::Null);
            m.insert("froude_reason".into(), json!(e.to_string()));
            m.insert("crossing_verdict".into(), Value::Null);
        }
        Some(Ok(r)) => {
            h += &froude_text(r);
            m.insert("froude".into(), json!(r.froude));
            m.insert("crossing_verdict".into(), json!(r.verdict.statement()));
            m.insert(
                "ridge_flow".into(),
                json!({
                    "layer_base_m": r.layer_base_m, "layer_top_m": r.layer_top_m,
                    "mean_wind_dir_deg": r.mean_wind.dir_from_deg,
                    "mean_wind_speed_ms": r.mean_wind.speed_ms,
                    "cross_ridge_ms": r.cross_ridge_ms,
                    "n_per_s": r.n_per_s,
                    "ridge_height_m": r.ridge_height_m,
                    "blocked_depth_m": r.blocked_depth_m,
                    "vertical_wavelength_m": r.vertical_wavelength_m,
                }),
            );
        }
    }

    // Barotropy.
    h += "\n";
    h += &heading("Is the layer close to barotropic?");
    let lat = opts.lat_deg.or(st.lat_deg).unwrap_or(0.0);
    match &s.barotropy {
        Ok(b) => h += &barotropy_text(b, lat),
        Err(e) => {
            let hint = if opts.lat_deg.or(st.lat_deg).is_none() {
                " (give --lat)"
            } else {
                ""
            };
            h += &format!("  no barotropy check: {e}{hint}\n");
        }
    }
    insert_result(&mut m, "thermal_wind_ms", &s.barotropy, |b| {
        json!(b.thermal_speed_ms)
    });
    insert_result(&mut m, "barotropic_verdict", &s.barotropy, |b| {
        json!(b.verdict.statement())
    });
    insert_result(&mut m, "barotropy", &s.barotropy, barotropy_json);

    // Isentropic layer PV.
    if let Some(z) = zeta {
        h += "\n";
        h += &heading("Isentropic layer potential vorticity");
        let f = leeward_core::rotation::Rotation::at(lat).map(|r| r.f);
        let layer = theta_layer
            .map(Ok)
            .unwrap_or_else(|| default_theta_layer(p, s));
        let pv = f.and_then(|f| {
            let (lo, hi) = layer?;
            layer_pv(p, &s.heights, lo, hi, z, f)
        });
        match &pv {
            Ok(v) => {
                h += &line(
                    "layer",
                    format!(
                        "θ {:.1}–{:.1} K ({:.0}–{:.0} hPa)",
                        v.theta_low_k,
                        v.theta_high_k,
                        v.p_low_pa / 100.0,
                        v.p_high_pa / 100.0
                    ),
                );
                h += &line(
                    &format!("PV with ζ = {}", crate::text::sci(z)),
                    format!("{:.2} PVU", v.pv_pvu),
                );
            }
            Err(e) => h += &format!("  no layer PV: {e}\n"),
        }
        insert_result(&mut m, "layer_pv_pvu", &pv, |v| json!(v.pv_pvu));
        if let Ok(v) = &pv {
            m.insert(
                "layer_pv".into(),
                json!({"theta_low_k": v.theta_low_k, "theta_high_k": v.theta_high_k,
                       "p_low_hpa": v.p_low_pa / 100.0, "p_high_hpa": v.p_high_pa / 100.0,
                       "zeta_per_s": z}),
            );
        }
    }

    // Decoder notes.
    if loaded.format == Format::Temp {
        h += "\n";
        h += &problems_text(loaded);
    }
    m.insert(
        "decode_problems".into(),
        Value::Array(loaded.problems.iter().map(|n| n.json.clone()).collect()),
    );
    (h, Value::Object(m))
}

/// The decoder's list of groups it could not read, for people.
fn problems_text(loaded: &Loaded) -> String {
    let mut h = heading("Groups the decoder could not read");
    if loaded.problems.is_empty() {
        h += "  none\n";
    }
    for n in &loaded.problems {
        h += &line(&n.place, &n.why);
    }
    if loaded.problems_not_listed > 0 {
        h += &format!("  … and {} more\n", loaded.problems_not_listed);
    }
    h
}

/// θ at the lowest level to θ at the lid: the whole column, the baroclinic counterpart of
/// (ζ + f)/H.
fn default_theta_layer(p: &Profile, s: &Summary) -> leeward_core::Result<(f64, f64)> {
    let theta = |l: &leeward_core::sounding::Level| LevelThermo::of(l).theta_k;
    let low = p
        .levels()
        .iter()
        .find_map(theta)
        .ok_or(leeward_core::Error::NoData {
            what: "temperatures in the sounding",
        })?;
    let lid = s.lid.as_ref().map_err(|e| *e)?;
    let high = s
        .heights
        .value_at(p, lid.height_m, theta)
        .ok_or(leeward_core::Error::NoData {
            what: "a temperature at the lid",
        })?;
    Ok((low, high))
}

/// `leeward sounding`.
pub fn sounding(a: &SoundingArgs, json_mode: bool) -> Result<String, CliError> {
    let lid = parse_lid(&a.lid).map_err(|e| CliError::input(format!("--lid {e}")))?;
    let loaded = load(&a.file, a.format, a.elevation)?;
    if let Some(out) = &a.write_csv {
        let mut text = String::new();
        sonde_csv::write(&loaded.profile, &mut text)
            .map_err(|_| CliError::input("cannot format the sounding as CSV"))?;
        std::fs::write(out, text)
            .map_err(|e| CliError::input(format!("cannot write {}: {e}", out.display())))?;
    }
    let mut opts = summary_options(a, lid);
    if let Some(r) = &mut opts.ridge {
        if r.ground_m.is_nan() {
            // Default upstream ground: the sounding's lowest level.
            r.ground_m = loaded
                .profile
                .station
                .elevation_m
                .or(loaded.profile.levels().first().and_then(|l| l.height_m))
                .unwrap_or(0.0);
        }
    }
    let s = summarise(&loaded.profile, &opts)
        .map_err(|e| CliError::core(&a.file.display().to_string(), e))?;
    let (h, v) = summary_parts(&loaded, &s, &opts, a.zeta, a.theta_layer);
    Ok(crate::commands::emit(
        json_mode,
        format!(
            "{}{h}\n{}\n",
            heading("Sounding"),
            crate::commands::wrap(CAUTIONS)
        ),
        v,
    ))
}

/// `leeward temp`: the decoded report, level by level, for checking against the text.
pub fn temp(file: &Path, elevation_m: Option<f64>, json_mode: bool) -> Result<String, CliError> {
    let loaded = load(file, Format::Temp, elevation_m)?;
    let p = &loaded.profile;
    let mut h = heading("Decoded TEMP report");
    h += &line(
        "station",
        if p.station.id.is_empty() {
            "(none)"
        } else {
            p.station.id.as_str()
        },
    );
    if let Some(t) = p.station.time {
        h += &line(
            "time",
            format!("day {} {:02}:{:02} UTC", t.day, t.hour, t.minute),
        );
    }
    h += &line("levels", p.len());
    h += "\n";
    let (lh, lv) = levels_parts(p, None);
    h += &lh;
    h += "\n";
    h += &problems_text(&loaded);
    let v = json!({
        "station": serde_json::to_value(&p.station).unwrap_or(Value::Null),
        "levels": lv,
        "decode_problems": loaded.problems.iter().map(|n| n.json.clone()).collect::<Vec<_>>(),
        "decode_problems_not_listed": loaded.problems_not_listed,
    });
    Ok(crate::commands::emit(json_mode, h, v))
}
