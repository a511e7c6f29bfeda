//! leeward-core's calculations on the target: each one counted, its stack measured, and
//! its result compared with a check value whose source is named beside it.

use core::fmt::Write as _;
use core::hint::black_box;

use leeward_core::column::stretch;
use leeward_core::crossing::{run, run_f32, CrossingInput, Discard};
use leeward_core::demo;
use leeward_core::geo::{LatLon, TangentPlane};
use leeward_core::network::{analyse, FitOptions, Model, Network, Reference, Station};
use leeward_core::rotation::{beta, coriolis};
use leeward_core::sounding::heights::heights;
use leeward_core::sounding::lid::LidSource;
use leeward_core::sounding::stability::tropopauses;
use leeward_core::sounding::summary::{summarise, SummaryOptions};
use leeward_core::sounding::{Level, LevelKind, Profile, StationInfo};
use leeward_core::temp_code::{decode, DecodeOptions};

use crate::meter::measure;
use crate::report::{rel, Report};

/// Each calculation's budget: 3 million instructions, about 50 ms at 64 MHz (issue 7).
pub const CALC_BUDGET: u64 = 3_000_000;

/// Ω, rad/s (IERS Conventions 2010, FIELD-NOTES §1), typed here apart from the core.
pub const OMEGA: f64 = 7.292115e-5;
/// g0, m/s² (3rd CGPM 1901, FIELD-NOTES §1).
pub const G0: f64 = 9.80665;
/// Mean Earth radius R1, m (IUGG, FIELD-NOTES §1).
pub const A: f64 = 6_371_008.8;
/// Dry-air gas constant, J/(kg K) (FIELD-NOTES §1).
pub const RD: f64 = 287.047;

/// f = 2Ω sin φ (FIELD-NOTES §2).
pub fn f_at(lat_deg: f64) -> f64 {
    2.0 * OMEGA * libm::sin(lat_deg.to_radians())
}

/// β = 2Ω cos φ / a (FIELD-NOTES §2).
pub fn beta_at(lat_deg: f64) -> f64 {
    2.0 * OMEGA * libm::cos(lat_deg.to_radians()) / A
}

/// f and β at 45° (`rotation::coriolis`, `rotation::beta`).
pub fn rotation(r: &mut Report) {
    let (m, (f, b)) = measure(|| {
        let lat = black_box(45.0);
        (coriolis(lat), beta(lat))
    });
    r.count("f and beta at 45 deg", &m, CALC_BUDGET);
    // FIELD-NOTES §2, computed from the formulas: f(45°) = 1.0313e-4 /s, β = 1.619e-11.
    r.check(
        "f at 45 deg",
        rel(f, 1.0313e-4) < 1e-4,
        format_args!("{:e} /s (FIELD-NOTES 2: 1.0313e-4)", f),
    );
    r.check(
        "beta at 45 deg",
        rel(b, 1.619e-11) < 1e-3,
        format_args!("{:e} /m/s (FIELD-NOTES 2: 1.619e-11)", b),
    );
}

/// The analytic 500 hPa field of the host benches (tests/benches/core.rs): a westerly
/// gradient and a weak quadratic, gpm at plane position (x east, y north, m).
pub fn field(x: f64, y: f64) -> f64 {
    5600.0 - 1e-4 * y + 3e-5 * x + 0.6e-10 * x * x + 0.2e-10 * x * y + 0.9e-10 * y * y
}

/// Origin of the analytic networks (the demo's latitude).
pub const NET_LAT: f64 = 45.5;
const NET_LON: f64 = -140.0;

/// Plane positions of station `i` of `n`: a golden-angle spiral 100 to 600 km out.
pub fn spiral_xy(i: usize, n: usize) -> (f64, f64) {
    let t = i as f64 * 2.39996;
    let rad = 100_000.0 + 500_000.0 * (i as f64 + 0.5) / n as f64;
    (rad * libm::cos(t), rad * libm::sin(t))
}

/// `n` stations of the field above, σ 10 m, placed on the core's own tangent plane.
fn spiral_network(n: usize) -> Option<Network> {
    let plane = TangentPlane::new(LatLon::new(NET_LAT, NET_LON).ok()?);
    let mut net = Network::new();
    for i in 0..n {
        let (x, y) = spiral_xy(i, n);
        let p = plane.to_latlon(x, y);
        let mut id: heapless::String<8> = heapless::String::new();
        write!(id, "S{i}").ok()?;
        let s = Station::new(&id, p.lat_deg, p.lon_deg, field(x, y), Some(10.0)).ok()?;
        net.push(s).ok()?;
    }
    Some(net)
}

/// The network fit of `n` stations on the analytic field, automatic model choice.
pub fn network(r: &mut Report, n: usize, name: &'static str) {
    let Some(net) = spiral_network(n) else {
        r.check(name, false, format_args!("the network could not be built"));
        return;
    };
    let opts = FitOptions {
        reference: Reference::Point(LatLon {
            lat_deg: NET_LAT,
            lon_deg: NET_LON,
        }),
        ..FitOptions::default()
    };
    let (m, fit) = measure(|| analyse(black_box(&net), black_box(&opts)));
    r.count(name, &m, CALC_BUDGET);
    let Ok(fit) = fit else {
        r.check(name, false, format_args!("the fit was refused"));
        return;
    };
    // FIELD-NOTES §3 on the analytic field: u = −(g0/f)∂Z/∂y, v = (g0/f)∂Z/∂x at the
    // origin, ∇²Z = 2(c3 + c5) = 3e-10 /m, ζ_g = (g0/f)∇²Z. The heights are exact on the
    // plane, so only rounding is left (tolerances of tests/tests/network_analytic.rs).
    let k = G0 / f_at(NET_LAT);
    let (u, v, zeta) = (k * 1e-4, k * 3e-5, k * 3e-10);
    let zg = fit.zeta_g.map(|e| e.value).unwrap_or(f64::NAN);
    let ok = fit.model == Model::Quadratic
        && libm::fabs(fit.wind.u_ms.value - u) < 1e-6
        && libm::fabs(fit.wind.v_ms.value - v) < 1e-6
        && libm::fabs(zg - zeta) < 1e-12;
    r.check(
        name,
        ok,
        format_args!(
            "u {:.6} v {:.6} m/s, zeta_g {:e} /s (analytic field: {:.6} {:.6}, {:e})",
            fit.wind.u_ms.value, fit.wind.v_ms.value, zg, u, v, zeta
        ),
    );
}

/// The stretching solve's inputs (as in the host bench): 45.5°, ζ 1.2e-5, 10.5 km deep,
/// to 43° and 8.2 km.
pub const STRETCH: (f64, f64, f64, f64, f64) = (45.5, 1.2e-5, 10_500.0, 43.0, 8_200.0);

/// ζ2 = (ζ1 + f1) H2/H1 − f2 (FIELD-NOTES §4).
pub fn stretch_expected() -> f64 {
    let (l1, z1, h1, l2, h2) = STRETCH;
    (z1 + f_at(l1)) * h2 / h1 - f_at(l2)
}

/// The stretching solve (`column::stretch`).
pub fn stretching(r: &mut Report) {
    let (l1, z1, h1, l2, h2) = STRETCH;
    let (m, s) = measure(|| {
        stretch(
            black_box(l1),
            black_box(z1),
            black_box(h1),
            black_box(l2),
            black_box(h2),
        )
    });
    r.count("stretching solve", &m, CALC_BUDGET);
    let want = stretch_expected();
    let got = s.map(|s| s.end.zeta).unwrap_or(f64::NAN);
    r.check(
        "stretching solve",
        rel(got, want) < 1e-9,
        format_args!("zeta2 {:e} /s (FIELD-NOTES 4, computed: {:e})", got, want),
    );
}

/// A 3000 km ridge crossing over the demo ridge at the default step, as the device runs
/// it (`crossing::run_f32`, the firmware's path), checked against the physics and
/// against the f64 track (`crossing::run`, counted as a part).
pub fn crossing(r: &mut Report) {
    // 3000 km over the demo ridge at the default 5 km step, 20 m/s from the west.
    let mut input = CrossingInput::new(demo::ridge(), 20.0, 270.0, demo::LID_M);
    input.max_length_m = 3_000_000.0;
    input.stop_after_second_trough = false;
    let (m, c) = measure(|| run_f32(black_box(&input), &mut Discard));
    r.count("ridge crossing 3000 km, 5 km step", &m, CALC_BUDGET);
    let (m64, c64) = measure(|| run(black_box(&input), &mut Discard));
    r.stack("ridge crossing in f64", &m64);
    cortex_m_semihosting::hprintln!(
        "part {:>9} {:>6} ridge crossing 3000 km, 5 km step, the track in f64 (crossing::run)",
        m64.instructions,
        m64.stack_bytes
    );
    // What the device's Ridge crossing task computes for the demo wind: both tracks (over
    // the ridge, to its second trough, and over flat ground, its full 16 000 km).
    let (mf, _) = measure(|| {
        leeward_firmware::crossing::compute(black_box(demo::crossing(demo::U0_MS, 270.0)))
    });
    r.stack("firmware crossing::compute", &mf);
    cortex_m_semihosting::hprintln!(
        "part {:>9} {:>6} firmware crossing::compute, demo wind (both f32 tracks: over the ridge to its second trough, flat ground 16000 km)",
        mf.instructions,
        mf.stack_bytes
    );
    let (Ok(c), Ok(c64)) = (c, c64) else {
        r.check(
            "ridge crossing",
            false,
            format_args!("the track was refused"),
        );
        return;
    };
    // FIELD-NOTES §5: L_s = 2π√(V/β) at the start, which lies on the anchor's parallel.
    let ls = 2.0 * core::f64::consts::PI * libm::sqrt(20.0 / beta_at(demo::RIDGE_ANCHOR.lat_deg));
    let got_ls = c.stationary_wavelength_m.unwrap_or(f64::NAN);
    r.check(
        "ridge crossing: stationary wavelength",
        rel(got_ls, ls) < 1e-9,
        format_args!(
            "{:.0} m (FIELD-NOTES 5, 2 pi sqrt(V/beta): {:.0} m)",
            got_ls, ls
        ),
    );
    // FIELD-NOTES §4: the column shrinks over the ridge and turns anticyclonic; a lee
    // trough lies downstream of the axis; (ζ + f)/H is conserved: to rounding, 1e-10 in
    // f64 as in tests/tests/crossing.rs, 1e-5 in f32 (its rounding is 6e-8 relative; ζ + f
    // is a sum of terms of order f, each rounded); 3000 km at 5 km is 600 steps.
    let trough_x = c.trough.map(|t| t.axis_distance_m).unwrap_or(f64::NAN);
    let ok = c.steps == 600
        && c.pv_drift_rel < 1e-5
        && c64.pv_drift_rel < 1e-10
        && c.most_anticyclonic_zeta < 0.0
        && trough_x > 0.0;
    r.check(
        "ridge crossing: PV kept, lee trough downstream",
        ok,
        format_args!(
            "{} steps, PV drift f32 {:e} f64 {:e}, most anticyclonic zeta {:e} /s, lee trough {:.0} km past the axis",
            c.steps,
            c.pv_drift_rel,
            c64.pv_drift_rel,
            c.most_anticyclonic_zeta,
            trough_x / 1000.0
        ),
    );
    // The f32 track against the f64 one on the target, with the tolerances of the host's
    // differential test (tests/tests/crossing_f32.rs): the trough within two steps, the
    // end point within 0.1 % of the path, ζ at the trough within 0.1 % of the track's
    // signal (|ζ − ζ_start| there).
    let t64 = c64.trough.map(|t| t.axis_distance_m).unwrap_or(f64::NAN);
    let z = |c: &leeward_core::crossing::Crossing| c.trough.map_or(f64::NAN, |t| t.point.zeta);
    let signal = libm::fabs(z(&c64) - c64.start.zeta);
    let end_m = leeward_core::geo::distance_m(c.end.pos, c64.end.pos);
    r.check(
        "ridge crossing: f32 track against the f64 one",
        libm::fabs(trough_x - t64) <= 10_000.0
            && end_m <= 1e-3 * c64.end.s_m
            && libm::fabs(z(&c) - z(&c64)) <= 1e-3 * signal,
        format_args!(
            "lee trough {:.1} km (f64 {:.1} km), end points {:.1} m apart, zeta at the trough {:e} (f64 {:e}) /s",
            trough_x / 1000.0,
            t64 / 1000.0,
            end_m,
            z(&c),
            z(&c64)
        ),
    );
}

/// US Standard Atmosphere 1976 (FIELD-NOTES §6): sea-level pressure, Pa.
pub const USSA_P0: f64 = 101_325.0;
/// Sea-level temperature, K.
pub const USSA_T0: f64 = 288.15;
/// Tropospheric lapse rate, K/m.
pub const USSA_LAPSE: f64 = 0.0065;
/// Tropopause height, gpm.
pub const USSA_Z_TROP: f64 = 11_000.0;
/// Tropopause temperature, K.
pub const USSA_T_TROP: f64 = 216.65;

/// The standard's tropopause pressure, p0 (T/T0)^(g0/(Rd L)).
pub fn ussa_p_trop() -> f64 {
    USSA_P0 * libm::pow(USSA_T_TROP / USSA_T0, G0 / (RD * USSA_LAPSE))
}

/// Temperature of the standard at pressure `p` (Pa), to 20 km.
pub fn ussa_t(p: f64) -> f64 {
    if p >= ussa_p_trop() {
        USSA_T0 * libm::pow(p / USSA_P0, RD * USSA_LAPSE / G0)
    } else {
        USSA_T_TROP
    }
}

/// Geopotential height of the standard at pressure `p` (Pa), from its layer formulas.
pub fn ussa_z(p: f64) -> f64 {
    if p >= ussa_p_trop() {
        USSA_T0 / USSA_LAPSE * (1.0 - libm::pow(p / USSA_P0, RD * USSA_LAPSE / G0))
    } else {
        USSA_Z_TROP + RD * USSA_T_TROP / G0 * libm::log(ussa_p_trop() / p)
    }
}

/// Dry standard-atmosphere profile on the given pressures (descending), surface at 0 m.
fn standard_profile(pressures: &[f64]) -> Option<Profile> {
    let mut prof = Profile::new(StationInfo::default());
    for (i, &p) in pressures.iter().enumerate() {
        prof.push(Level {
            height_m: (i == 0).then_some(0.0),
            temperature_k: Some(ussa_t(p)),
            kind: if i == 0 {
                LevelKind::SURFACE
            } else {
                LevelKind::NONE
            },
            ..Level::at_pressure(p)
        })
        .ok()?;
    }
    Some(prof)
}

/// 100 levels: sea level, the tropopause and 98 levels evenly spaced in ln p from 1000 to
/// 100 hPa.
pub fn pressures_100() -> [f64; 100] {
    let mut p = [0.0; 100];
    p[0] = USSA_P0;
    for (k, slot) in p[1..99].iter_mut().enumerate() {
        *slot = 100_000.0 * libm::pow(10.0, -(k as f64) / 97.0);
    }
    p[99] = ussa_p_trop();
    // Descending order, the tropopause in its place.
    p[1..].sort_unstable_by(|a, b| b.total_cmp(a));
    p
}

/// Hypsometric heights and the tropopause of the US Standard Atmosphere 1976.
pub fn standard_atmosphere(r: &mut Report) {
    // The FIELD-NOTES §6 table (computed there from the standard's layer formulas), on the
    // profile of tests/tests/sounding_standard.rs: sea level, the tropopause and every
    // 25 hPa from 1000 to 100 hPa.
    let mut pressures: heapless::Vec<f64, 40> = heapless::Vec::new();
    let _ = pressures.push(USSA_P0);
    for k in (4..=40).rev() {
        let _ = pressures.push(k as f64 * 2500.0);
    }
    let _ = pressures.push(ussa_p_trop());
    pressures.sort_unstable_by(|a, b| b.total_cmp(a));
    let table = [
        (1000.0, 111.0),
        (925.0, 762.0),
        (850.0, 1457.0),
        (700.0, 3012.0),
        (500.0, 5574.0),
        (400.0, 7185.0),
        (300.0, 9164.0),
        (250.0, 10363.0),
        (200.0, 11784.0),
        (150.0, 13608.0),
        (100.0, 16180.0),
    ];
    let prof = standard_profile(&pressures);
    let h = prof.as_ref().and_then(|p| heights(p, None, 20.0).ok());
    let (Some(prof), Some(h)) = (prof, h) else {
        r.check(
            "US Standard Atmosphere heights",
            false,
            format_args!("refused"),
        );
        return;
    };
    let mut worst = 0.0f64;
    for (hpa, z) in table {
        let got = prof
            .levels()
            .iter()
            .position(|l| libm::fabs(l.pressure_pa - hpa * 100.0) < 0.01)
            .and_then(|i| h.computed_m(i));
        worst = worst.max(got.map(|g| libm::fabs(g - z)).unwrap_or(f64::INFINITY));
    }
    r.check(
        "US Standard Atmosphere 1976 heights, 1000-100 hPa",
        worst <= 2.0,
        format_args!(
            "worst |hypsometric - table| {:.2} m (FIELD-NOTES 6 table, within 2 m)",
            worst
        ),
    );
    let tp = tropopauses(&prof, &h)
        .first
        .map(|t| t.height_m)
        .unwrap_or(f64::NAN);
    r.check(
        "US Standard Atmosphere 1976 tropopause",
        libm::fabs(tp - USSA_Z_TROP) <= 2.0,
        format_args!("{:.1} m (the standard: 11000 m)", tp),
    );
}

/// The sounding summary of a 100-level standard atmosphere.
pub fn sounding_100(r: &mut Report) {
    let Some(prof) = standard_profile(&pressures_100()) else {
        r.check("100-level sounding", false, format_args!("refused"));
        return;
    };
    let opts = SummaryOptions::default();
    let (m, s) = measure(|| summarise(black_box(&prof), black_box(&opts)));
    r.count("sounding analysis, 100 levels", &m, CALC_BUDGET);
    let Ok(s) = s else {
        r.check("100-level sounding", false, format_args!("refused"));
        return;
    };
    // Every level against the standard's layer formulas (FIELD-NOTES §6), within 2 m.
    let mut worst = 0.0f64;
    for (l, z) in prof.levels().iter().zip(s.heights.computed_all()) {
        let d = z.map(|z| libm::fabs(z - ussa_z(l.pressure_pa)));
        worst = worst.max(d.unwrap_or(f64::INFINITY));
    }
    let tp = s.tropopauses.first.map(|t| t.height_m).unwrap_or(f64::NAN);
    r.check(
        "100-level standard atmosphere: heights and tropopause",
        worst <= 2.0 && libm::fabs(tp - USSA_Z_TROP) <= 2.0,
        format_args!(
            "worst height error {:.2} m, tropopause {:.1} m (US Standard Atmosphere 1976 layer formulas)",
            worst, tp
        ),
    );
}

/// The demo ascent's summary and its tropopause.
pub fn demo_sounding(r: &mut Report) {
    // The demo ascent's stated profile (core/src/demo.rs, invented): its tropopause is put
    // at LID_M = 10 800 m, and the lid is taken from it.
    let Ok(prof) = demo::sounding() else {
        r.check("demo sounding", false, format_args!("refused"));
        return;
    };
    let (m, s) = measure(|| summarise(black_box(&prof), &SummaryOptions::default()));
    r.count("demo sounding summary", &m, CALC_BUDGET);
    let tp = s
        .as_ref()
        .ok()
        .and_then(|s| s.tropopauses.first)
        .map(|t| t.height_m);
    let lid_ok = s
        .as_ref()
        .ok()
        .and_then(|s| s.lid.ok())
        .is_some_and(|l| l.source == LidSource::Tropopause);
    r.check(
        "demo sounding tropopause",
        tp == Some(demo::LID_M) && lid_ok,
        format_args!(
            "{:?} m (the demo's stated 10800 m, and the lid taken from it)",
            tp
        ),
    );
}

/// The demo TEMP report (Parts A and B), coded from the demo ascent.
pub const DEMO_TEMP: &str = include_str!("../../../demo/tessel-col.temp");

/// The TEMP decode of the demo report, Parts A and B.
pub fn temp_decode(r: &mut Report) {
    let opts = DecodeOptions {
        elevation_m: Some(demo::SITE_ELEVATION_M),
    };
    let (m, rep) = measure(|| decode(black_box(DEMO_TEMP), black_box(&opts)));
    r.count("TEMP Part A+B decode", &m, CALC_BUDGET);
    let Ok(rep) = rep else {
        r.check("TEMP decode", false, format_args!("refused"));
        return;
    };
    let at = |hpa: f64| {
        rep.profile
            .levels()
            .iter()
            .find(|l| l.pressure_pa == hpa * 100.0)
            .copied()
    };
    let kt = 1852.0 / 3600.0;
    // Groups read by hand with the FM 35 rules (WMO-No. 306; FIELD-NOTES §7):
    // 50561 10363 26536: 500 hPa, 561 dam; 10.3 with odd tenths → −10.3 °C; depression 63
    // → 13 K; 265° 36 kt. 10676: 100 hPa at 676 + 1000 dam. Part B 11747 05420: 747 hPa,
    // +5.4 °C (even tenths), depression 2.0 K.
    let c = 273.15;
    let near = |a: Option<f64>, b: f64| a.is_some_and(|a| libm::fabs(a - b) < 1e-6);
    let l500 = at(500.0);
    let ok500 = l500.is_some_and(|l| {
        l.height_m == Some(5610.0)
            && near(l.temperature_k, c - 10.3)
            && near(l.dewpoint_k, c - 23.3)
            && l.wind.is_some_and(|w| {
                w.dir_from_deg == 265.0 && libm::fabs(w.speed_ms - 36.0 * kt) < 1e-6
            })
    });
    let ok100 = at(100.0).is_some_and(|l| l.height_m == Some(16_760.0));
    let ok747 =
        at(747.0).is_some_and(|l| near(l.temperature_k, c + 5.4) && near(l.dewpoint_k, c + 3.4));
    r.check(
        "TEMP decode of the demo report",
        rep.parts.a && rep.parts.b && rep.knots && ok500 && ok100 && ok747,
        format_args!(
            "parts A {} B {}, {} levels; 500 hPa {:?} m; 100 hPa and 747 hPa {} (hand-decoded groups, WMO-No. 306 FM 35)",
            rep.parts.a,
            rep.parts.b,
            rep.profile.len(),
            l500.and_then(|l| l.height_m),
            if ok100 && ok747 { "as coded" } else { "DIFFER" }
        ),
    );
}

/// Parts of the costly calculations, to show where their instructions go (no budget).
pub fn breakdown(r: &mut Report) {
    let part = |r: &mut Report, name: &'static str, m: &crate::meter::Measure| {
        r.stack(name, m);
        cortex_m_semihosting::hprintln!("part {:>9} {:>6} {}", m.instructions, m.stack_bytes, name);
    };
    for (n, name) in [
        (
            8,
            "network fit, 8 stations, quadratic forced (no model choice)",
        ),
        (
            32,
            "network fit, 32 stations, quadratic forced (no model choice)",
        ),
    ] {
        if let Some(net) = spiral_network(n) {
            let opts = FitOptions {
                reference: Reference::Point(LatLon {
                    lat_deg: NET_LAT,
                    lon_deg: NET_LON,
                }),
                model: leeward_core::network::ModelChoice::Force(Model::Quadratic),
            };
            let (m, _) = measure(|| analyse(black_box(&net), black_box(&opts)));
            part(r, name, &m);
        }
    }
    if let Some(net) = spiral_network(32) {
        let plane = TangentPlane::new(LatLon {
            lat_deg: NET_LAT,
            lon_deg: NET_LON,
        });
        let (m, _) = measure(|| {
            let mut xy = [(0.0, 0.0); 32];
            for (p, s) in xy.iter_mut().zip(&black_box(&net).stations) {
                *p = plane.to_xy(s.pos);
            }
            xy
        });
        part(
            r,
            "32 stations onto the tangent plane (geo::TangentPlane::to_xy)",
            &m,
        );
    }
    for n in [8usize, 32] {
        let mut ls = leeward_core::linalg::LeastSquares::new(6);
        for i in 0..n {
            let (x, y) = spiral_xy(i, n);
            let (x, y) = (x / 1e5, y / 1e5);
            if let Some(ls) = ls.as_mut() {
                let _ = ls.push(
                    &[1.0, x, y, x * x, x * y, y * y],
                    field(x * 1e5, y * 1e5),
                    0.01,
                );
            }
        }
        if let Some(ls) = ls {
            let (m, _) = measure(|| black_box(&ls).solve());
            let name = if n == 8 {
                "one least-squares solve, 8 x 6 (QR, covariance, Jacobi condition number)"
            } else {
                "one least-squares solve, 32 x 6 (QR, covariance, Jacobi condition number)"
            };
            part(r, name, &m);
        }
    }
    let (m, _) = measure(|| {
        let mut p = leeward_firmware::sounding::DeviceProfile::empty(Default::default());
        let done = demo::sounding_integrated(&mut p);
        black_box(&p);
        done
    });
    part(
        r,
        "demo ascent integrated (analytic profile, 100 m hydrostatic steps)",
        &m,
    );
    let (m, prof) = measure(demo::sounding);
    part(r, "demo ascent read from its table (demo::sounding)", &m);
    if let Ok(prof) = prof {
        let (m, _) = measure(|| heights(black_box(&prof), None, 20.0));
        part(r, "demo ascent: hypsometric heights only", &m);
    }
    // Into a view held in a static, as the app holds it (the device's path).
    if let Some(view) = cortex_m::singleton!(: leeward_firmware::sounding::SoundingView =
        leeward_firmware::sounding::SoundingView::blank())
    {
        let (m, _) = measure(|| leeward_firmware::sounding::demo_view_into(black_box(&mut *view)));
        part(
            r,
            "firmware sounding::demo_view_into (build + summary + view, in place)",
            &m,
        );
    }
}
