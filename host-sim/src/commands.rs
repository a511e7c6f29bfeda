//! The subcommands: each gathers inputs, calls leeward-core, and returns the readable
//! report or the JSON object as a string.

use crate::input::{read_network, read_profile};
use crate::text::{heading, hours, line, sci, sci_pm};
use crate::{CliError, ColumnArgs, GeostrophicArgs, RidgeArgs, StretchArgs, CAUTIONS};
use leeward_core::column::{self, Stretch};
use leeward_core::crossing::{
    self, Crossing, CrossingInput, Profile, Ridge, TrackPoint, Unavailable,
};
use leeward_core::demo;
use leeward_core::geo::LatLon;
use leeward_core::network::{self, FitOptions, Model, ModelChoice, Network, NetworkFit, Reference};
use leeward_core::rossby;
use leeward_core::rotation::{Regime, Rotation};
use serde_json::{json, Map, Value};

type Out = Result<String, CliError>;

pub(crate) fn emit(json_mode: bool, human: String, value: Value) -> String {
    if json_mode {
        let mut s = serde_json::to_string_pretty(&value).unwrap_or_else(|_| "{}".into());
        s.push('\n');
        s
    } else {
        human
    }
}

/// Insert `key: value` or, when the figure cannot be had, `key: null` and `key_reason`.
fn put_or_reason(m: &mut Map<String, Value>, key: &str, v: Result<f64, &str>) {
    match v {
        Ok(x) => {
            m.insert(key.into(), json!(x));
        }
        Err(why) => {
            m.insert(key.into(), Value::Null);
            m.insert(format!("{key}_reason"), json!(why));
        }
    }
}

// ---------------------------------------------------------------- coriolis

fn rotation_parts(lat: f64, ctx: &str) -> Result<(String, Value), CliError> {
    let r = Rotation::at(lat).map_err(|e| CliError::core(ctx, e))?;
    let mut h = String::new();
    h += &line("latitude", format!("{:.3}°", r.lat_deg));
    h += &line("Coriolis parameter f", format!("{} s⁻¹", sci(r.f)));
    h += &line("beta = df/dy", format!("{} m⁻¹ s⁻¹", sci(r.beta)));
    h += &line(
        "inertial period 2π/|f|",
        r.inertial_period_s
            .map_or("none at the equator".into(), hours),
    );
    if let Some(w) = r.regime.warning() {
        h += &format!("  note: {w}\n");
    }
    let mut m = Map::new();
    m.insert("lat_deg".into(), json!(r.lat_deg));
    m.insert("f".into(), json!(r.f));
    m.insert("beta".into(), json!(r.beta));
    put_or_reason(
        &mut m,
        "inertial_period_s",
        r.inertial_period_s.ok_or("f is zero at the equator"),
    );
    m.insert("regime".into(), json!(regime_name(r.regime)));
    m.insert("warning".into(), json!(r.regime.warning()));
    Ok((h, Value::Object(m)))
}

fn regime_name(r: Regime) -> &'static str {
    match r {
        Regime::Balanced => "balanced",
        Regime::LowLatitude => "low_latitude",
        Regime::Equatorial => "equatorial",
    }
}

pub fn coriolis(lat: f64, json_mode: bool) -> Out {
    let (h, v) = rotation_parts(lat, "--lat")?;
    Ok(emit(
        json_mode,
        format!("{}{h}", heading("Rotation at the site")),
        v,
    ))
}

// ---------------------------------------------------------------- geostrophic

fn fit_parts(net: &Network, fit: &NetworkFit) -> (String, Value) {
    let w = &fit.wind;
    let mut h = String::new();
    h += &line(
        "reference point",
        format!(
            "{:.3}°, {:.3}°",
            fit.reference.lat_deg, fit.reference.lon_deg
        ),
    );
    h += &line(
        "model",
        format!(
            "{} ({} stations, {} spare)",
            fit.model.name(),
            net.len(),
            fit.dof
        ),
    );
    h += &line("f0", format!("{} s⁻¹", sci(fit.f0)));
    h += &line(
        "geostrophic wind",
        format!(
            "{:.1} ± {:.1} m/s from {:.0}° ± {:.0}°",
            w.speed_ms.value, w.speed_ms.sigma, w.dir_from_deg.value, w.dir_from_deg.sigma
        ),
    );
    h += &line(
        "  u_g, v_g",
        format!(
            "{:+.1} ± {:.1}, {:+.1} ± {:.1} m/s",
            w.u_ms.value, w.u_ms.sigma, w.v_ms.value, w.v_ms.sigma
        ),
    );
    match (fit.zeta_g, fit.zeta_beta, fit.sense) {
        (Some(z), Some(zb), Some(sense)) => {
            let significant = z.value.abs() > 2.0 * z.sigma;
            h += &line(
                "vorticity ζ_g",
                format!(
                    "{} s⁻¹ {}{}",
                    sci_pm(z.value, z.sigma),
                    sense.word(),
                    if significant {
                        ""
                    } else {
                        " (within 2σ of zero)"
                    }
                ),
            );
            h += &line(
                "  with β term",
                format!("{} s⁻¹", sci_pm(zb.value, zb.sigma)),
            );
        }
        _ => {
            h += &line(
                "vorticity ζ_g",
                "not available from a plane (needs 4+ stations)",
            )
        }
    }
    if let Some(d) = fit.deformation {
        h += &line(
            "deformation",
            format!(
                "{} s⁻¹, dilatation axis {:.0}°",
                sci(d.total),
                d.dilatation_axis_deg
            ),
        );
    }
    h += &line("residual RMS", format!("{:.1} m", fit.residual_rms_m));
    if let Some(c) = fit.reduced_chi2 {
        h += &line(
            "reduced χ²",
            format!(
                "{c:.2}{}",
                if fit.chi2_high {
                    "  HIGH: reports disagree beyond their stated errors"
                } else {
                    ""
                }
            ),
        );
    }
    h += "\n  station      lat      lon   height_m  resid_m  others_m  score\n";
    let mut stations = Vec::new();
    for (i, (s, r)) in net.stations.iter().zip(fit.stations.iter()).enumerate() {
        let suspect = fit.suspect == Some(i as u8);
        h += &format!(
            "  {:<8} {:>7.2} {:>8.2} {:>9.1} {:>8.1} {:>9} {:>6}{}\n",
            s.id.as_str(),
            s.pos.lat_deg,
            s.pos.lon_deg,
            s.height_m,
            r.residual_m,
            r.loo_residual_m.map_or("-".into(), |x| format!("{x:.1}")),
            r.loo_score.map_or("-".into(), |x| format!("{x:.1}")),
            if suspect {
                "  <- suspect: the others contradict it"
            } else {
                ""
            }
        );
        stations.push(json!({
            "id": s.id.as_str(),
            "lat": s.pos.lat_deg,
            "lon": s.pos.lon_deg,
            "height_m": s.height_m,
            "sigma_m": s.sigma(),
            "x_m": r.x_m,
            "y_m": r.y_m,
            "residual_m": r.residual_m,
            "loo_residual_m": r.loo_residual_m,
            "loo_score": r.loo_score,
            "suspect": suspect,
        }));
    }
    if let Some(wn) = fit.regime.warning() {
        h += &format!("  note: {wn}\n");
    }
    let mut m = Map::new();
    m.insert("model".into(), json!(fit.model.name()));
    m.insert("ref_lat".into(), json!(fit.reference.lat_deg));
    m.insert("ref_lon".into(), json!(fit.reference.lon_deg));
    m.insert("f0".into(), json!(fit.f0));
    m.insert("beta0".into(), json!(fit.beta0));
    m.insert("height_m".into(), json!(fit.height_m.value));
    m.insert("height_m_sigma".into(), json!(fit.height_m.sigma));
    m.insert("dz_dx".into(), json!(fit.dz_dx.value));
    m.insert("dz_dy".into(), json!(fit.dz_dy.value));
    m.insert("u_g".into(), json!(w.u_ms.value));
    m.insert("u_g_sigma".into(), json!(w.u_ms.sigma));
    m.insert("v_g".into(), json!(w.v_ms.value));
    m.insert("v_g_sigma".into(), json!(w.v_ms.sigma));
    m.insert("speed".into(), json!(w.speed_ms.value));
    m.insert("speed_sigma".into(), json!(w.speed_ms.sigma));
    m.insert("dir_from_deg".into(), json!(w.dir_from_deg.value));
    m.insert("dir_from_deg_sigma".into(), json!(w.dir_from_deg.sigma));
    let no_curv = "the plane model has no curvature";
    put_or_reason(&mut m, "zeta_g", fit.zeta_g.map(|z| z.value).ok_or(no_curv));
    put_or_reason(
        &mut m,
        "zeta_g_sigma",
        fit.zeta_g.map(|z| z.sigma).ok_or(no_curv),
    );
    put_or_reason(
        &mut m,
        "zeta_beta",
        fit.zeta_beta.map(|z| z.value).ok_or(no_curv),
    );
    put_or_reason(
        &mut m,
        "zeta_beta_sigma",
        fit.zeta_beta.map(|z| z.sigma).ok_or(no_curv),
    );
    put_or_reason(
        &mut m,
        "laplacian_z",
        fit.laplacian.map(|z| z.value).ok_or(no_curv),
    );
    m.insert("sense".into(), json!(fit.sense.map(|s| s.word())));
    match fit.deformation {
        Some(d) => {
            m.insert(
                "deformation".into(),
                json!({
                    "stretching": d.stretching.value, "stretching_sigma": d.stretching.sigma,
                    "shearing": d.shearing.value, "shearing_sigma": d.shearing.sigma,
                    "total": d.total, "dilatation_axis_deg": d.dilatation_axis_deg,
                }),
            );
        }
        None => {
            m.insert("deformation".into(), Value::Null);
            m.insert(
                "deformation_reason".into(),
                json!("only the quadratic model gives deformation"),
            );
        }
    }
    m.insert("residual_rms_m".into(), json!(fit.residual_rms_m));
    m.insert("dof".into(), json!(fit.dof));
    put_or_reason(
        &mut m,
        "reduced_chi2",
        fit.reduced_chi2.ok_or("no spare stations"),
    );
    m.insert("chi2_high".into(), json!(fit.chi2_high));
    m.insert(
        "suspect".into(),
        json!(fit
            .suspect
            .and_then(|i| net.stations.get(i as usize))
            .map(|s| s.id.as_str())),
    );
    m.insert("condition".into(), json!(fit.condition));
    m.insert("warning".into(), json!(fit.regime.warning()));
    m.insert("stations".into(), Value::Array(stations));
    (h, Value::Object(m))
}

pub fn geostrophic(a: &GeostrophicArgs, json_mode: bool) -> Out {
    let model = match a.model.as_str() {
        "auto" => ModelChoice::Auto,
        name => ModelChoice::Force(Model::from_name(name).ok_or_else(|| {
            CliError::input(format!(
                "--model: '{name}' is not one of auto, plane, curvature, quadratic"
            ))
        })?),
    };
    let reference = match (a.ref_lat, a.ref_lon) {
        (Some(lat), Some(lon)) => Reference::Point(
            LatLon::new(lat, lon).map_err(|e| CliError::core("--ref-lat/--ref-lon", e))?,
        ),
        _ => Reference::Centroid,
    };
    let net = read_network(&a.file)?;
    let fit = network::analyse(&net, &FitOptions { model, reference })
        .map_err(|e| CliError::core(&a.file.display().to_string(), e))?;
    let (h, v) = fit_parts(&net, &fit);
    Ok(emit(
        json_mode,
        format!("{}{h}", heading("Geostrophic wind and vorticity")),
        v,
    ))
}

// ---------------------------------------------------------------- stretch, column

fn stretch_parts(s: &Stretch, inverse: bool) -> (String, Value) {
    let mut h = String::new();
    h += &line(
        "start",
        format!(
            "{:.2}°, ζ {} s⁻¹, H {:.0} m, ζ+f {} s⁻¹",
            s.start.lat_deg,
            sci(s.start.zeta),
            s.start.depth_m,
            sci(s.start.abs_vorticity)
        ),
    );
    h += &line("potential vorticity q", format!("{} m⁻¹ s⁻¹", sci(s.pv)));
    if inverse {
        h += &line("depth giving that ζ", format!("{:.0} m", s.end.depth_m));
    }
    h += &line(
        "end",
        format!(
            "{:.2}°, ζ {} s⁻¹ ({}), H {:.0} m",
            s.end.lat_deg,
            sci(s.end.zeta),
            s.end.sense.word(),
            s.end.depth_m
        ),
    );
    h += &line(
        "absolute vorticity ζ+f",
        format!("{} s⁻¹", sci(s.end.abs_vorticity)),
    );
    h += &line(
        "change of ζ",
        format!("{} s⁻¹ ({})", sci(s.zeta_change), s.change_sense.word()),
    );
    let v = json!({
        "mode": if inverse { "inverse" } else { "forward" },
        "pv": s.pv,
        "f1": s.start.f,
        "f2": s.end.f,
        "zeta1": s.start.zeta,
        "depth1_m": s.start.depth_m,
        "zeta2": s.end.zeta,
        "depth2_m": s.end.depth_m,
        "abs_vort2": s.end.abs_vorticity,
        "sense2": s.end.sense.word(),
        "zeta_change": s.zeta_change,
        "change_sense": s.change_sense.word(),
    });
    (h, v)
}

pub fn stretch(a: &StretchArgs, json_mode: bool) -> Out {
    let (s, inverse) = match (a.depth2, a.zeta2) {
        (Some(d2), None) => (
            column::stretch(a.lat1, a.zeta1, a.depth1, a.lat2, d2),
            false,
        ),
        (None, Some(z2)) => (
            column::depth_for_vorticity(a.lat1, a.zeta1, a.depth1, a.lat2, z2),
            true,
        ),
        _ => return Err(CliError::input("give exactly one of --depth2 and --zeta2")),
    };
    let s = s.map_err(|e| CliError::core("stretch", e))?;
    let (h, v) = stretch_parts(&s, inverse);
    Ok(emit(
        json_mode,
        format!("{}{h}", heading("Column stretching, (ζ+f)/H conserved")),
        v,
    ))
}

pub fn column(a: &ColumnArgs, json_mode: bool) -> Out {
    let depth =
        column::column_depth(a.ground, a.lid).map_err(|e| CliError::core("--ground/--lid", e))?;
    let mut h = heading("Column depth");
    h += &line("depth H = lid − ground", format!("{depth:.0} m"));
    let mut m = Map::new();
    m.insert("depth_m".into(), json!(depth));
    match a.lat {
        Some(lat) => {
            let r = Rotation::at(lat).map_err(|e| CliError::core("--lat", e))?;
            let q = column::potential_vorticity(a.zeta, r.f, depth)
                .map_err(|e| CliError::core("--zeta", e))?;
            h += &line("potential vorticity q", format!("{} m⁻¹ s⁻¹", sci(q)));
            m.insert("f".into(), json!(r.f));
            m.insert("pv".into(), json!(q));
        }
        None => {
            m.insert("pv".into(), Value::Null);
            m.insert(
                "pv_reason".into(),
                json!("give --lat for the potential vorticity"),
            );
        }
    }
    Ok(emit(json_mode, h, Value::Object(m)))
}

// ---------------------------------------------------------------- ridge

fn point_json(p: &TrackPoint) -> Value {
    json!({
        "s_m": p.s_m, "lat": p.pos.lat_deg, "lon": p.pos.lon_deg, "heading_deg": p.heading_deg,
        "axis_distance_m": p.axis_distance_m, "terrain_m": p.terrain_m, "depth_m": p.depth_m,
        "f": p.f, "zeta": p.zeta,
    })
}

/// Run a crossing, keeping a point every `every_m` (and the last one).
fn run_track(
    input: &CrossingInput,
    every_m: f64,
) -> Result<(Crossing, Vec<TrackPoint>), leeward_core::Error> {
    let mut pts: Vec<TrackPoint> = Vec::new();
    let mut next = 0.0;
    let mut last = None;
    let c = crossing::run(input, &mut |p: &TrackPoint| {
        if p.s_m >= next - 1e-6 {
            pts.push(*p);
            next += every_m;
        }
        last = Some(*p);
    })?;
    if let Some(l) = last {
        if pts.last().is_some_and(|p| p.s_m < l.s_m) {
            pts.push(l);
        }
    }
    Ok((c, pts))
}

fn crossing_json(c: &Crossing, track: &[TrackPoint]) -> Map<String, Value> {
    let why = |u: Unavailable| u.statement();
    let mut m = Map::new();
    put_or_reason(
        &mut m,
        "trough_distance_km",
        c.trough.map(|t| t.axis_distance_m / 1000.0).map_err(why),
    );
    put_or_reason(
        &mut m,
        "trough_displacement_km",
        c.trough
            .map(|t| t.displacement_north_m / 1000.0)
            .map_err(why),
    );
    put_or_reason(
        &mut m,
        "trough_zeta",
        c.trough.map(|t| t.point.zeta).map_err(why),
    );
    put_or_reason(
        &mut m,
        "trough_lat",
        c.trough.map(|t| t.point.pos.lat_deg).map_err(why),
    );
    put_or_reason(
        &mut m,
        "trough_lon",
        c.trough.map(|t| t.point.pos.lon_deg).map_err(why),
    );
    put_or_reason(
        &mut m,
        "wavelength_km",
        c.wavelength_m.map(|w| w / 1000.0).map_err(why),
    );
    put_or_reason(
        &mut m,
        "stationary_wavelength_km",
        c.stationary_wavelength_m.map(|w| w / 1000.0).map_err(why),
    );
    m.insert("pv".into(), json!(c.pv));
    m.insert("pv_drift_rel".into(), json!(c.pv_drift_rel));
    m.insert("min_depth_m".into(), json!(c.min_depth_m));
    m.insert(
        "most_anticyclonic_zeta".into(),
        json!(c.most_anticyclonic_zeta),
    );
    m.insert("start".into(), point_json(&c.start));
    m.insert("end".into(), point_json(&c.end));
    m.insert("ended".into(), json!(c.ended.statement()));
    m.insert("steps".into(), json!(c.steps));
    m.insert("step_m".into(), json!(c.step_m));
    m.insert(
        "track".into(),
        Value::Array(track.iter().map(point_json).collect()),
    );
    m
}

fn ridge_parts(
    input: &CrossingInput,
    every_m: f64,
    keep_tracks: bool,
) -> Result<(String, Value), CliError> {
    let (c, track) = run_track(input, every_m).map_err(|e| CliError::core("ridge", e))?;
    let (c0, track0) = run_track(&input.without_ridge(), every_m)
        .map_err(|e| CliError::core("ridge (no-ridge track)", e))?;
    let mut h = String::new();
    h += &line(
        "start",
        format!(
            "{:.2}°, {:.2}°, heading {:.0}°, {:.0} km upwind",
            c.start.pos.lat_deg,
            c.start.pos.lon_deg,
            c.start.heading_deg,
            -c.start.axis_distance_m / 1000.0
        ),
    );
    h += &line(
        "upstream ζ, H",
        format!("{} s⁻¹, {:.0} m", sci(c.start.zeta), c.start.depth_m),
    );
    h += &line("potential vorticity q", format!("{} m⁻¹ s⁻¹", sci(c.pv)));
    h += &line(
        "over the ridge",
        format!(
            "H down to {:.0} m, ζ down to {} s⁻¹ ({})",
            c.min_depth_m,
            sci(c.most_anticyclonic_zeta),
            leeward_core::rotation::Sense::of(c.most_anticyclonic_zeta, c.start.f).word()
        ),
    );
    match c.trough {
        Ok(t) => {
            h += &line(
                "lee trough",
                format!(
                    "{:.0} km downstream of the axis, {:+.0} km north of the start",
                    t.axis_distance_m / 1000.0,
                    t.displacement_north_m / 1000.0
                ),
            );
            h += &line(
                "  at",
                format!(
                    "{:.2}°, {:.2}°, ζ {} s⁻¹ ({})",
                    t.point.pos.lat_deg,
                    t.point.pos.lon_deg,
                    sci(t.point.zeta),
                    crossing::sense_at(&t.point).word()
                ),
            );
        }
        Err(u) => h += &line("lee trough", u.statement()),
    }
    match c.wavelength_m {
        Ok(w) => h += &line("trough to next trough", format!("{:.0} km", w / 1000.0)),
        Err(u) => h += &line("trough to next trough", u.statement()),
    }
    match c.stationary_wavelength_m {
        Ok(w) => h += &line("linear 2π√(V/β)", format!("{:.0} km", w / 1000.0)),
        Err(u) => h += &line("linear 2π√(V/β)", u.statement()),
    }
    let lat_shift = c0.end.pos.lat_deg - c0.start.pos.lat_deg;
    h += &line(
        "without the ridge",
        match c0.trough {
            Ok(t) => format!(
                "trough {:.0} km downstream (from the upstream ζ alone)",
                t.axis_distance_m / 1000.0
            ),
            Err(_) => format!("no trough; latitude changes by {lat_shift:+.2}° over the track"),
        },
    );
    if let Some(fr) = c.froude {
        h += &line(
            "bulk Froude number V/(Nh)",
            format!(
                "{:.2}{}",
                fr.number,
                if fr.blocked {
                    "  BELOW 1: low-level air is blocked or turned aside; the column argument holds only above the blocked layer"
                } else {
                    "  air can cross the ridge"
                }
            ),
        );
    }
    h += &line(
        "PV drift along the track",
        format!("{:.1e} (relative)", c.pv_drift_rel),
    );
    h += &line(
        "track",
        format!("{} ({:.0} km)", c.ended.statement(), c.end.s_m / 1000.0),
    );

    let mut m = crossing_json(&c, if keep_tracks { &track } else { &[] });
    match c.froude {
        Some(fr) => {
            m.insert("froude".into(), json!({"number": fr.number, "ridge_height_m": fr.ridge_height_m, "blocked": fr.blocked}));
        }
        None => {
            m.insert("froude".into(), Value::Null);
            m.insert(
                "froude_reason".into(),
                json!("give --brunt-vaisala for the Froude check"),
            );
        }
    }
    m.insert(
        "no_ridge".into(),
        Value::Object(crossing_json(&c0, if keep_tracks { &track0 } else { &[] })),
    );
    Ok((h, Value::Object(m)))
}

/// What a sounding gives the ridge crossing: lid, wind and N, with words for the report.
struct FromSounding {
    lid_m: f64,
    wind_ms: f64,
    dir_deg: f64,
    n: Option<f64>,
    notes: String,
    json: Value,
}

fn from_sounding(
    a: &RidgeArgs,
    path: &std::path::Path,
    crest_m: f64,
) -> Result<FromSounding, CliError> {
    use crate::sounding_cmd::{load, parse_lid, Format};
    use leeward_core::sounding::ridge_flow::{ridge_flow, RidgeCheck};
    use leeward_core::sounding::summary::{summarise, SummaryOptions};
    let lid = parse_lid(a.lid.as_deref().unwrap_or("tropopause"))
        .map_err(|e| CliError::input(format!("--lid {e}")))?;
    let loaded = load(path, Format::Auto, a.elevation)?;
    let ctx = path.display().to_string();
    let s = summarise(
        &loaded.profile,
        &SummaryOptions {
            elevation_m: a.elevation,
            lid,
            lat_deg: Some(a.lat),
            ..Default::default()
        },
    )
    .map_err(|e| CliError::core(&ctx, e))?;
    let l = s
        .lid
        .map_err(|e| CliError::core(&format!("{ctx}: lid"), e))?;
    let b = s
        .barotropy
        .as_ref()
        .map_err(|e| CliError::core(&format!("{ctx}: mean wind"), *e))?;
    let rf = ridge_flow(
        &loaded.profile,
        &s.heights,
        &RidgeCheck {
            ground_m: a.base_height,
            crest_m,
            axis_deg: None,
        },
    );
    let mut notes = String::new();
    notes += &line(
        "from the sounding",
        format!(
            "lid {:.0} m ({}), mean wind {:03.0}° {:.1} m/s ({:.0}–{:.0} m), {}",
            l.height_m,
            l.source.statement(),
            b.mean_wind.dir_from_deg,
            b.mean_wind.speed_ms,
            b.base_m,
            b.top_m,
            b.verdict.statement()
        ),
    );
    match &rf {
        Ok(r) => notes += &crate::sounding_cmd::n_and_froude_lines(r, "  "),
        Err(e) => notes += &line("  N below the crest", format!("none: {e}")),
    }
    let json = json!({
        "file": ctx,
        "lid_m": l.height_m,
        "lid_source": l.source.statement(),
        "mean_wind_ms": b.mean_wind.speed_ms,
        "mean_wind_dir_deg": b.mean_wind.dir_from_deg,
        "barotropic_verdict": b.verdict.statement(),
        "n_below_crest": rf.as_ref().ok().map(|r| r.n_per_s),
        "froude_below_crest": rf.as_ref().ok().map(|r| r.froude),
        "crossing_verdict": rf.as_ref().ok().map(|r| r.verdict.statement()),
    });
    Ok(FromSounding {
        lid_m: l.height_m,
        wind_ms: b.mean_wind.speed_ms,
        dir_deg: b.mean_wind.dir_from_deg,
        n: rf.ok().map(|r| r.n_per_s),
        notes,
        json,
    })
}

fn lid_height(s: Option<&str>) -> Result<f64, CliError> {
    let s = s.unwrap_or("");
    s.trim_end_matches('m').parse::<f64>().map_err(|_| {
        CliError::input(format!(
            "--lid '{s}' must be a height in metres (tropopause and stable:N need --sounding)"
        ))
    })
}

pub fn ridge(a: &RidgeArgs, json_mode: bool) -> Out {
    let profile = match &a.profile {
        Some(p) => read_profile(p)?,
        None => Profile::Bell {
            base_m: a.base_height,
            crest_m: a.crest_height.unwrap_or(0.0),
            half_width_m: a.half_width_km.unwrap_or(0.0) * 1000.0,
        },
    };
    let anchor = LatLon::new(a.lat, a.lon).map_err(|e| CliError::core("--lat/--lon", e))?;
    let sonde = match &a.sounding {
        Some(path) => Some(from_sounding(a, path, profile.max_height())?),
        None => None,
    };
    let ridge = Ridge {
        profile,
        axis_deg: a.axis_deg,
        anchor,
    };
    let (lid, wind, dir, n) = match &sonde {
        Some(s) => (
            match a.lid.as_deref() {
                Some(l) if l.trim_end_matches('m').parse::<f64>().is_ok() => lid_height(Some(l))?,
                _ => s.lid_m,
            },
            a.wind.unwrap_or(s.wind_ms),
            a.dir.unwrap_or(s.dir_deg),
            a.brunt_vaisala.or(s.n),
        ),
        None => (
            lid_height(a.lid.as_deref())?,
            a.wind.unwrap_or(f64::NAN),
            a.dir.unwrap_or(f64::NAN),
            a.brunt_vaisala,
        ),
    };
    let mut input = CrossingInput::new(ridge, wind, dir, lid);
    input.upstream_zeta = a.zeta;
    input.upwind_m = a.upwind_km * 1000.0;
    input.max_length_m = a.length_km * 1000.0;
    input.step_m = a.step_km * 1000.0;
    input.brunt_vaisala = n;
    input.stop_after_second_trough = !a.full_length;
    if !(a.track_every_km.is_finite() && a.track_every_km >= 1.0) {
        return Err(CliError::input("--track-every-km must be at least 1"));
    }
    let (mut h, mut v) = ridge_parts(&input, a.track_every_km * 1000.0, true)?;
    if let Some(s) = sonde {
        h = format!("{}{h}", s.notes);
        if let Value::Object(m) = &mut v {
            m.insert("sounding".into(), s.json);
            m.insert("wind_ms".into(), json!(wind));
            m.insert("dir_from_deg".into(), json!(dir));
            m.insert("lid_m".into(), json!(lid));
        }
    }
    Ok(emit(
        json_mode,
        format!(
            "{}{h}\n{}\n",
            heading("Ridge crossing, (ζ+f)/H conserved"),
            wrap(CAUTIONS)
        ),
        v,
    ))
}

// ---------------------------------------------------------------- rossby

fn rossby_parts(
    lat: f64,
    wind: f64,
    wavelength_km: Option<f64>,
) -> Result<(String, Value), CliError> {
    let r = rossby::rossby(lat, wind, wavelength_km.map(|k| k * 1000.0))
        .map_err(|e| CliError::core("rossby", e))?;
    let mut h = String::new();
    h += &line("beta", format!("{} m⁻¹ s⁻¹", sci(r.beta)));
    let easterly = "easterly or calm wind: no stationary Rossby wave";
    h += &line(
        "stationary wavelength",
        r.stationary_wavelength_m
            .map_or(easterly.into(), |l| format!("{:.0} km", l / 1000.0)),
    );
    match (r.phase_speed_ms, r.wavelength_m) {
        (Some(c), Some(l)) => {
            h += &line(
                "phase speed",
                format!(
                    "{c:+.1} m/s at {:.0} km ({})",
                    l / 1000.0,
                    if c.abs() < 0.05 {
                        "stationary"
                    } else if c > 0.0 {
                        "moves east"
                    } else {
                        "moves west"
                    }
                ),
            )
        }
        _ => h += &line("phase speed", "give --wavelength-km"),
    }
    let mut m = Map::new();
    m.insert("beta".into(), json!(r.beta));
    put_or_reason(
        &mut m,
        "stationary_wavelength_km",
        r.stationary_wavelength_m
            .map(|l| l / 1000.0)
            .ok_or(easterly),
    );
    put_or_reason(
        &mut m,
        "phase_speed",
        r.phase_speed_ms.ok_or("no wavelength given"),
    );
    put_or_reason(
        &mut m,
        "wavelength_km",
        r.wavelength_m
            .map(|l| l / 1000.0)
            .ok_or("no wavelength given"),
    );
    Ok((h, Value::Object(m)))
}

pub fn rossby(lat: f64, wind: f64, wavelength_km: Option<f64>, json_mode: bool) -> Out {
    let (h, v) = rossby_parts(lat, wind, wavelength_km)?;
    Ok(emit(
        json_mode,
        format!("{}{h}", heading("Rossby waves")),
        v,
    ))
}

// ---------------------------------------------------------------- demo

pub(crate) fn wrap(text: &str) -> String {
    let mut out = String::new();
    let mut len = 0;
    for w in text.split_whitespace() {
        if len + w.len() + 1 > 78 && len > 0 {
            out.push('\n');
            len = 0;
        } else if len > 0 {
            out.push(' ');
            len += 1;
        }
        out.push_str(w);
        len += w.len();
    }
    out
}

pub fn demo(json_mode: bool) -> Out {
    let ctx = |e| CliError::core("demo", e);
    let mut h = String::new();
    h += "leeward demo: the Tessel Range (an invented ridge and invented data)\n\n";
    h += &wrap(
        "A north-south ridge 2600 m high and 120 km wide at half height, at 45.5°N 140°W \
         (open ocean in reality: the place is fictional). The field site Tessel Col sits on \
         the upwind flank at 1850 m. Seven invented stations report 500 hPa heights from a \
         stated analytic field (westerly of 20 m/s, weak trough 400 km upstream) plus small \
         invented errors.",
    );
    h += "\n\n";

    let (rh, rv) = rotation_parts(demo::SITE.lat_deg, "demo site")?;
    h += &heading("1. Rotation at Tessel Col");
    h += &rh;

    let net = demo::network().map_err(ctx)?;
    let fit = network::analyse(
        &net,
        &FitOptions {
            model: ModelChoice::Auto,
            reference: Reference::Point(demo::SITE),
        },
    )
    .map_err(ctx)?;
    let (gh, gv) = fit_parts(&net, &fit);
    h += "\n";
    h += &heading("2. Geostrophic wind and vorticity at the site (500 hPa)");
    h += &gh;

    // The local ascent: lid, stability and the cross-checks.
    let sonde = demo::sounding().map_err(ctx)?;
    let sopts = leeward_core::sounding::summary::SummaryOptions {
        ridge: Some(leeward_core::sounding::ridge_flow::RidgeCheck {
            ground_m: demo::PLAIN_M,
            crest_m: demo::CREST_M,
            axis_deg: Some(0.0),
        }),
        ..Default::default()
    };
    let ss = leeward_core::sounding::summary::summarise(&sonde, &sopts).map_err(ctx)?;
    let lid_m = ss.lid.map_err(ctx)?.height_m;
    let rf = ss
        .ridge_flow
        .ok_or(CliError::input("demo: no ridge check"))?
        .map_err(ctx)?;
    let baro = ss.barotropy.as_ref().map_err(|e| ctx(*e))?;
    h += "\n";
    h += &heading("3. The Tessel Col ascent (demo/tessel-col-sounding.csv)");
    h += &line("tropopause = lid", format!("{lid_m:.0} m"));
    if let Some(sl) = ss.stability.stable_layers.first() {
        h += &line(
            "stable layer",
            format!(
                "{:.0}–{:.0} m, Δθ {:+.1} K",
                sl.base_m, sl.top_m, sl.theta_change_k
            ),
        );
    }
    h += &crate::sounding_cmd::n_and_froude_lines(&rf, "");
    h += &line(
        "thermal wind / mean wind",
        format!("{:.2}: {}", baro.ratio, baro.verdict.statement()),
    );
    h += &line(
        "height check",
        match ss.heights.worst {
            Some((i, d)) if ss.heights.flagged > 0 => format!(
                "{} level(s) flagged; {:+.0} m at {:.0} hPa: probably a garbled report, check it",
                ss.heights.flagged,
                d,
                sonde.levels()[usize::from(i)].pressure_pa / 100.0
            ),
            _ => "all reported heights agree with the hypsometric ones".into(),
        },
    );
    let sondev = json!({
        "lid_m": lid_m,
        "stable_layer_top_m": ss.stability.stable_layers.first().map(|l| l.top_m),
        "n_below_crest": rf.n_per_s,
        "froude": rf.froude,
        "crossing_verdict": rf.verdict.statement(),
        "thermal_wind_ratio": baro.ratio,
        "barotropic_verdict": baro.verdict.statement(),
        "height_flags": ss.heights.flagged,
    });

    let upstream = column::column_depth(demo::PLAIN_M, lid_m).map_err(ctx)?;
    let at_site = column::column_depth(demo::SITE_ELEVATION_M, lid_m).map_err(ctx)?;
    let at_crest = column::column_depth(demo::CREST_M, lid_m).map_err(ctx)?;
    h += "\n";
    h += &heading(&format!(
        "4. Column depth under the tropopause lid ({:.1} km)",
        lid_m / 1000.0
    ));
    h += &line("upstream plain (300 m)", format!("{upstream:.0} m"));
    h += &line("Tessel Col (1850 m)", format!("{at_site:.0} m"));
    h += &line("crest (2600 m)", format!("{at_crest:.0} m"));

    let zeta_up = fit.zeta_beta.map_or(0.0, |z| z.value);
    let st = column::stretch(
        demo::SITE.lat_deg,
        zeta_up,
        upstream,
        demo::SITE.lat_deg,
        at_crest,
    )
    .map_err(ctx)?;
    let (sh, sv) = stretch_parts(&st, false);
    h += "\n";
    h += &heading("5. Squashing from the plain to the crest at the same latitude");
    h += &sh;

    let wind = fit.wind.speed_ms.value;
    let dir = fit.wind.dir_from_deg.value;
    let mut input = demo::crossing(wind, dir);
    input.lid_m = lid_m;
    input.brunt_vaisala = Some(rf.n_per_s);
    let (xh, mut xv) = ridge_parts(&input, 50_000.0, true)?;
    h += "\n";
    h += &heading(&format!(
        "6. Ridge crossing with the network wind ({wind:.1} m/s from {dir:.0}°)"
    ));
    h += &xh;

    let (wh, wv) = rossby_parts(demo::SITE.lat_deg, wind, Some(4000.0))?;
    h += "\n";
    h += &heading("7. Rossby waves in that wind");
    h += &wh;
    h += "\n";
    h += &wrap(CAUTIONS);
    h += "\n";

    if let Value::Object(m) = &mut xv {
        m.insert("wind_ms".into(), json!(wind));
        m.insert("dir_from_deg".into(), json!(dir));
    }
    let v = json!({
        "scenario": "Tessel Range (invented)",
        "site": { "lat": demo::SITE.lat_deg, "lon": demo::SITE.lon_deg, "elevation_m": demo::SITE_ELEVATION_M },
        "coriolis": rv,
        "geostrophic": gv,
        "sounding": sondev,
        "column": { "upstream_depth_m": upstream, "site_depth_m": at_site, "crest_depth_m": at_crest, "lid_m": lid_m },
        "stretch": sv,
        "ridge": xv,
        "rossby": wv,
        "cautions": CAUTIONS,
    });
    Ok(emit(json_mode, h, v))
}
