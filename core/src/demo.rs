//! The built-in demo scenario: the Tessel Range, a fictional ridge.
//!
//! Everything here is invented for rehearsal and testing. The position (45.5°N, 140°W, open
//! ocean in reality) only sets the latitude; no real place is depicted. The upper-air heights
//! come from a stated analytic 500 hPa field plus small invented report errors, so the
//! expected answers are known exactly (see [`field`]).
//!
//! - Tessel Range: north–south ridge, crest 2600 m, plain at 300 m, half-width 60 km
//!   (120 km wide at half height), axis along 140°W.
//! - Tessel Col: the field site, on the upwind (west) flank at 1850 m.
//! - Seven invented upper-air stations 280–450 km around the site.
//! - Local sounding (invented): tropopause near 10.8 km, a stable layer capped near 3.5 km,
//!   N ≈ 0.010 s⁻¹ below the crest.

use crate::crossing::{CrossingInput, Profile, Ridge};
use crate::geo::{LatLon, TangentPlane};
use crate::network::{Network, Station};
use crate::rotation::coriolis;
use crate::Result;
use core::f64::consts::PI;

/// The field site, Tessel Col (on the ridge's west flank).
pub const SITE: LatLon = LatLon {
    lat_deg: 45.5,
    lon_deg: -140.5355,
};
/// Ground height at the site, m.
pub const SITE_ELEVATION_M: f64 = 1850.0;
/// Where the undisturbed westerly meets the ridge axis.
pub const RIDGE_ANCHOR: LatLon = LatLon {
    lat_deg: 45.5,
    lon_deg: -140.0,
};
/// Crest height, m.
pub const CREST_M: f64 = 2600.0;
/// Height of the plain on either side, m.
pub const PLAIN_M: f64 = 300.0;
/// Half-width of the bell, m.
pub const HALF_WIDTH_M: f64 = 60_000.0;
/// Lid for the column: the local tropopause, m.
pub const LID_M: f64 = 10_800.0;
/// Top of the low-level stable layer, m.
pub const STABLE_TOP_M: f64 = 3_500.0;
/// Brunt–Väisälä frequency below the crest from the local sounding, s⁻¹.
pub const BRUNT_VAISALA: f64 = 0.010;
/// Report error stated for every demo station, m.
pub const SIGMA_M: f64 = 15.0;

/// Mean height of the analysed 500 hPa surface, gpm.
pub const Z0_M: f64 = 5600.0;
/// Westerly wind that the uniform north–south gradient balances, m s⁻¹.
pub const U0_MS: f64 = 20.0;
/// Amplitude of the upstream trough, m.
pub const TROUGH_AMPLITUDE_M: f64 = 30.0;
/// Wavelength of the trough, m.
pub const TROUGH_WAVELENGTH_M: f64 = 4_000_000.0;
/// Trough axis, m east of the site (negative: upstream).
pub const TROUGH_X_M: f64 = -400_000.0;

/// Station identifiers, positions and the invented report errors added to the field, m.
pub const STATIONS: [(&str, f64, f64, f64); 7] = [
    ("AVEN", 48.3, -144.1, 4.0),
    ("BRACK", 45.2, -145.6, -7.0),
    ("CAIRN", 42.6, -143.0, 3.0),
    ("DRUM", 42.9, -137.2, -2.0),
    ("ESKER", 45.9, -134.8, 6.0),
    ("FELL", 48.6, -136.9, -5.0),
    ("GLEN", 44.4, -140.4, 1.0),
];

/// The analytic 500 hPa field, gpm, at plane coordinates (x east, y north, m) about the
/// site: Z = Z0 − (f0 U0/g0) y − A cos(2π (x − x_t)/L).
pub fn field(x_m: f64, y_m: f64) -> f64 {
    let g = (coriolis(SITE.lat_deg) * U0_MS) / crate::constants::G0;
    let k = 2.0 * PI / TROUGH_WAVELENGTH_M;
    Z0_M - g * y_m - TROUGH_AMPLITUDE_M * libm::cos(k * (x_m - TROUGH_X_M))
}

/// Exact ∂Z/∂x, ∂Z/∂y and ∇²Z of [`field`] at the site.
pub fn field_derivatives_at_site() -> (f64, f64, f64) {
    let g = (coriolis(SITE.lat_deg) * U0_MS) / crate::constants::G0;
    let k = 2.0 * PI / TROUGH_WAVELENGTH_M;
    let ph = k * (0.0 - TROUGH_X_M);
    (
        TROUGH_AMPLITUDE_M * k * libm::sin(ph),
        -g,
        TROUGH_AMPLITUDE_M * k * k * libm::cos(ph),
    )
}

/// The demo network: the field at each station plus its invented report error.
pub fn network() -> Result<Network> {
    let plane = TangentPlane::new(SITE);
    let mut net = Network::new();
    for (id, lat, lon, err) in STATIONS {
        let p = LatLon::new(lat, lon)?;
        let (x, y) = plane.to_xy(p);
        let s = Station::new(id, lat, lon, field(x, y) + err, Some(SIGMA_M))?;
        net.push(s)
            .map_err(|_| crate::Error::TooManyStations { max: 32 })?;
    }
    Ok(net)
}

/// The Tessel Range as a ridge.
pub fn ridge() -> Ridge {
    Ridge {
        profile: Profile::Bell {
            base_m: PLAIN_M,
            crest_m: CREST_M,
            half_width_m: HALF_WIDTH_M,
        },
        axis_deg: 0.0,
        anchor: RIDGE_ANCHOR,
    }
}

/// A ridge crossing for the demo wind (speed m s⁻¹, direction from, degrees).
pub fn crossing(wind_speed_ms: f64, wind_dir_from_deg: f64) -> CrossingInput {
    let mut c = CrossingInput::new(ridge(), wind_speed_ms, wind_dir_from_deg, LID_M);
    c.brunt_vaisala = Some(BRUNT_VAISALA);
    c
}

/// Surface pressure of the demo sounding at Tessel Col, Pa (chosen so that the 500 hPa
/// surface lies near the analysed 5600 gpm).
pub const SONDE_SURFACE_PA: f64 = 79_900.0;

/// Temperature of the demo sounding, K, at height `z_m`: 6.5 K/km from 9 °C at the site
/// to 3 km, a 2 K inversion to 3.5 km (the stable layer's cap), 6.6 K/km to the tropopause
/// at 10.8 km, then 0.5 K/km warming.
pub fn sonde_temperature_k(z_m: f64) -> f64 {
    let t_c = if z_m <= 3000.0 {
        9.0 - 6.5e-3 * (z_m - SITE_ELEVATION_M)
    } else if z_m <= STABLE_TOP_M {
        sonde_t_c_at_3km() + 4.0e-3 * (z_m - 3000.0)
    } else if z_m <= LID_M {
        sonde_t_c_at_3km() + 2.0 - 6.6e-3 * (z_m - STABLE_TOP_M)
    } else {
        sonde_t_c_at_3km() + 2.0 - 6.6e-3 * (LID_M - STABLE_TOP_M) + 0.5e-3 * (z_m - LID_M)
    };
    t_c + 273.15
}

fn sonde_t_c_at_3km() -> f64 {
    9.0 - 6.5e-3 * (3000.0 - SITE_ELEVATION_M)
}

/// Dew-point depression of the demo sounding, K: moist below the inversion, dry above.
pub fn sonde_dewpoint_depression_k(z_m: f64) -> f64 {
    if z_m <= 3000.0 {
        3.0 - 2.0 * (z_m - SITE_ELEVATION_M) / (3000.0 - SITE_ELEVATION_M)
    } else if z_m <= STABLE_TOP_M {
        1.0 + 14.0 * (z_m - 3000.0) / 500.0
    } else if z_m <= LID_M {
        15.0 - 7.0 * (z_m - STABLE_TOP_M) / (LID_M - STABLE_TOP_M)
    } else {
        20.0
    }
}

/// Wind of the demo sounding at `z_m`: from 262° at 17 m/s at the site, turning to 270°
/// and 21 m/s at the tropopause (a weak thermal wind), easing above.
pub fn sonde_wind(z_m: f64) -> crate::sounding::Wind {
    let s = ((z_m - SITE_ELEVATION_M) / (LID_M - SITE_ELEVATION_M)).clamp(0.0, 1.0);
    let above = ((z_m - LID_M) / 4000.0).clamp(0.0, 1.0);
    crate::sounding::Wind {
        dir_from_deg: 262.0 + 8.0 * s,
        speed_ms: 17.0 + 4.0 * s - 5.0 * above,
    }
}

/// Station number the demo ascent carries in its coded (TEMP) report: made up for the
/// fictional site (it stands for no station of this scenario's world).
pub const SONDE_WMO_NUMBER: &str = "08888";

/// Invented report error of the demo sounding's 400 hPa height, m (a garbled figure, for
/// the height check to find).
pub const SONDE_400_HPA_ERROR_M: f64 = 40.0;

/// The demo radiosonde ascent from Tessel Col: the analytic profile above, integrated
/// hydrostatically (virtual temperature, 100 m steps) and sampled at the surface, the
/// significant levels and the standard isobaric surfaces to 100 hPa, rounded as a
/// radiosonde reports (0.1 hPa, whole metres, 0.1 °C, whole degrees and knots). Read from
/// [`SONDE_REPORT`], which a unit test keeps equal, to the bit, to the integration.
pub fn sounding() -> Result<crate::sounding::Profile> {
    let mut prof = crate::sounding::Profile::default();
    sounding_into(&mut prof)?;
    Ok(prof)
}

/// [`sounding`] written into `prof` (emptied first) of any capacity that holds its 15
/// levels: the handheld builds it in place rather than move a profile on its stack.
pub fn sounding_into<const N: usize>(prof: &mut crate::sounding::Profile<N>) -> Result<()> {
    use crate::sounding::thermo::ZERO_CELSIUS_K;
    use crate::sounding::{Level, Wind};
    prof.reset(sonde_station());
    for &(p_hpa, z, t_c, td_c, dir, kt, kind) in &SONDE_REPORT {
        prof.push(Level {
            pressure_pa: p_hpa * 100.0,
            height_m: Some(z),
            temperature_k: Some(t_c + ZERO_CELSIUS_K),
            dewpoint_k: Some(td_c + ZERO_CELSIUS_K),
            wind: Some(Wind {
                dir_from_deg: dir,
                speed_ms: kt * crate::sounding::csv::MS_PER_KNOT,
            }),
            kind,
        })?;
    }
    Ok(())
}

/// The demo ascent as reported, ground up: pressure hPa, height m, temperature °C, dew
/// point °C, wind direction ° and speed kt, and what the level is. Written out from the
/// integration of the analytic profile (`sounding_with_step`; the 400 hPa height carries
/// [`SONDE_400_HPA_ERROR_M`]), which the unit test `the_report_is_the_integration` checks
/// it against: read from a table, the ascent costs the handheld a few thousand
/// instructions instead of 3.2 million (docs/performance.md).
pub const SONDE_REPORT: [(f64, f64, f64, f64, f64, f64, crate::sounding::LevelKind); 15] = {
    use crate::sounding::LevelKind;
    [
        (799.0, 1850.0, 9.0, 6.0, 262.0, 33.0, LevelKind::SURFACE),
        (
            747.4,
            2400.0,
            5.4,
            3.4,
            262.0,
            34.0,
            LevelKind::SIGNIFICANT_TEMPERATURE,
        ),
        (700.0, 2933.0, 2.0, 0.8, 263.0, 34.0, LevelKind::STANDARD),
        (
            694.2,
            3000.0,
            1.5,
            0.5,
            263.0,
            34.0,
            LevelKind::SIGNIFICANT_TEMPERATURE,
        ),
        (
            652.6,
            3500.0,
            3.5,
            -11.5,
            263.0,
            34.0,
            LevelKind::SIGNIFICANT_TEMPERATURE,
        ),
        (
            500.0,
            5605.0,
            -10.4,
            -23.3,
            265.0,
            36.0,
            LevelKind::STANDARD,
        ),
        (
            415.7,
            7000.0,
            -19.6,
            -31.2,
            267.0,
            38.0,
            LevelKind::SIGNIFICANT_TEMPERATURE,
        ),
        (
            400.0,
            7325.0,
            -21.5,
            -32.8,
            267.0,
            38.0,
            LevelKind::STANDARD,
        ),
        (
            300.0,
            9348.0,
            -35.1,
            -44.5,
            269.0,
            40.0,
            LevelKind::STANDARD,
        ),
        (
            250.0,
            10596.0,
            -43.3,
            -51.5,
            270.0,
            41.0,
            LevelKind::STANDARD,
        ),
        (
            242.5,
            10800.0,
            -44.7,
            -52.7,
            270.0,
            41.0,
            LevelKind::TROPOPAUSE,
        ),
        (
            200.0,
            12091.0,
            -44.0,
            -64.0,
            270.0,
            38.0,
            LevelKind::STANDARD,
        ),
        (
            174.7,
            13000.0,
            -43.6,
            -63.6,
            270.0,
            35.0,
            LevelKind::SIGNIFICANT_TEMPERATURE,
        ),
        (
            150.0,
            14025.0,
            -43.0,
            -63.0,
            270.0,
            33.0,
            LevelKind::STANDARD,
        ),
        (
            100.0,
            16764.0,
            -41.7,
            -61.7,
            270.0,
            31.0,
            LevelKind::STANDARD,
        ),
    ]
};

/// The demo ascent worked out from the analytic profile, as [`SONDE_REPORT`] was written
/// from it: the integration at the 100 m step, sampled and rounded as reported. The same
/// levels as [`sounding`], at about a thousand times the cost on the handheld.
pub fn sounding_integrated<const N: usize>(prof: &mut crate::sounding::Profile<N>) -> Result<()> {
    sounding_with_step(SONDE_STEP_M, prof)
}

/// Where and when the demo ascent was made.
fn sonde_station() -> crate::sounding::StationInfo {
    let mut station = crate::sounding::StationInfo {
        lat_deg: Some(SITE.lat_deg),
        lon_deg: Some(SITE.lon_deg),
        elevation_m: Some(SITE_ELEVATION_M),
        time: Some(crate::sounding::ObsTime {
            day: 14,
            hour: 12,
            minute: 0,
        }),
        ..Default::default()
    };
    // "TCOL" fits the 8-character identifier.
    let _ = station.id.push_str("TCOL");
    station
}

/// Height step of the demo ascent's hydrostatic integration, m. The midpoint rule's error
/// falls with the square of the step; at this step the reported (rounded) ascent is the
/// same as with a step twenty times finer (a unit test checks it; 500 m would not be), at
/// a fiftieth of the cost of the 5 m step first used.
const SONDE_STEP_M: f64 = 100.0;

fn sounding_with_step<const N: usize>(
    dz: f64,
    prof: &mut crate::sounding::Profile<N>,
) -> Result<()> {
    use crate::sounding::thermo::{mixing_ratio_from_dewpoint, virtual_temperature};
    use crate::sounding::{Level, LevelKind};
    let tv = |z: f64, p: f64| {
        let t = sonde_temperature_k(z);
        let r = mixing_ratio_from_dewpoint(t - sonde_dewpoint_depression_k(z), p).unwrap_or(0.0);
        virtual_temperature(t, r)
    };
    let g_over_r = crate::constants::G0 / crate::constants::R_DRY;
    prof.reset(sonde_station());
    let standard = [
        70_000.0, 50_000.0, 40_000.0, 30_000.0, 25_000.0, 20_000.0, 15_000.0, 10_000.0,
    ];
    let significant = [2400.0, 3000.0, STABLE_TOP_M, 7000.0, LID_M, 13_000.0];
    // Reported as a radiosonde reports: 0.1 hPa, 0.1 °C, whole metres, degrees and knots.
    let tenth = |x: f64| libm::round(x * 10.0) / 10.0;
    let celsius = crate::sounding::thermo::ZERO_CELSIUS_K;
    let knot = crate::sounding::csv::MS_PER_KNOT;
    let level = |z: f64, p: f64, kind: LevelKind| {
        let t = sonde_temperature_k(z);
        let w = sonde_wind(z);
        Level {
            pressure_pa: tenth(p / 100.0) * 100.0,
            height_m: Some(libm::round(z)),
            temperature_k: Some(tenth(t - celsius) + celsius),
            dewpoint_k: Some(tenth(t - sonde_dewpoint_depression_k(z) - celsius) + celsius),
            wind: Some(crate::sounding::Wind {
                dir_from_deg: libm::round(w.dir_from_deg),
                speed_ms: libm::round(w.speed_ms / knot) * knot,
            }),
            kind,
        }
    };
    prof.push(level(
        SITE_ELEVATION_M,
        SONDE_SURFACE_PA,
        LevelKind::SURFACE,
    ))?;
    let (mut z, mut p) = (SITE_ELEVATION_M, SONDE_SURFACE_PA);
    let (mut next_std, mut next_sig) = (0, 0);
    while p > standard[standard.len() - 1] && z < 20_000.0 {
        // Midpoint step of d ln p / dz = −g/(Rd Tv).
        let lp_mid = libm::log(p) - 0.5 * dz * g_over_r / tv(z, p);
        let z_mid = z + 0.5 * dz;
        let lp1 = libm::log(p) - dz * g_over_r / tv(z_mid, libm::exp(lp_mid));
        let (z1, p1) = (z + dz, libm::exp(lp1));
        while next_sig < significant.len() && significant[next_sig] <= z1 {
            let zs = significant[next_sig];
            let ps = libm::exp(libm::log(p) + (lp1 - libm::log(p)) * (zs - z) / dz);
            let kind = if zs == LID_M {
                LevelKind::TROPOPAUSE
            } else {
                LevelKind::SIGNIFICANT_TEMPERATURE
            };
            prof.merge(level(zs, ps, kind))?;
            next_sig += 1;
        }
        while next_std < standard.len() && standard[next_std] >= p1 {
            let ps = standard[next_std];
            let zs = z + dz * (libm::log(ps) - libm::log(p)) / (lp1 - libm::log(p));
            let mut l = level(zs, ps, LevelKind::STANDARD);
            if ps == 40_000.0 {
                l.height_m = l.height_m.map(|h| h + SONDE_400_HPA_ERROR_M);
            }
            prof.merge(l)?;
            next_std += 1;
        }
        z = z1;
        p = p1;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::{analyse, FitOptions, Reference};

    #[test]
    fn site_sits_on_the_flank_at_its_elevation() {
        // The site's stated elevation must match the ridge profile under it.
        let d = crate::geo::distance_m(SITE, RIDGE_ANCHOR);
        let h = ridge().profile.height(d);
        assert!((h - SITE_ELEVATION_M).abs() < 5.0, "{h}");
    }

    #[test]
    fn demo_network_fits_with_the_expected_wind() {
        let net = network().unwrap();
        let fit = analyse(
            &net,
            &FitOptions {
                reference: Reference::Point(SITE),
                ..Default::default()
            },
        )
        .unwrap();
        let (dzdx, dzdy, _) = field_derivatives_at_site();
        let k = crate::constants::G0 / coriolis(SITE.lat_deg);
        // Within 2σ of the exact analytic wind.
        assert!((fit.wind.u_ms.value - (-k * dzdy)).abs() < 2.0 * fit.wind.u_ms.sigma + 0.5);
        assert!((fit.wind.v_ms.value - (k * dzdx)).abs() < 2.0 * fit.wind.v_ms.sigma + 0.5);
        assert!(fit.suspect.is_none());
    }
}

#[cfg(test)]
mod sonde_tests {
    use super::*;
    use crate::sounding::barotropy::BarotropyVerdict;
    use crate::sounding::lid::LidSource;
    use crate::sounding::summary::{summarise, SummaryOptions};

    #[test]
    fn the_integration_step_is_fine_enough() {
        // Rounded as a radiosonde reports, the ascent is the same with the step used and
        // with one twenty times finer; the step does not show in the demo.
        let mut used = crate::sounding::Profile::default();
        sounding_with_step(SONDE_STEP_M, &mut used).unwrap();
        let mut fine = crate::sounding::Profile::default();
        sounding_with_step(SONDE_STEP_M / 20.0, &mut fine).unwrap();
        assert_eq!(used.levels(), fine.levels());
    }

    #[test]
    fn the_report_is_the_integration() {
        // The table the device reads is the analytic ascent, to the bit: station, every
        // value and every level mark.
        let mut integrated = crate::sounding::Profile::default();
        sounding_integrated(&mut integrated).unwrap();
        let table = sounding().unwrap();
        assert_eq!(table, integrated);
        assert_eq!(table.len(), SONDE_REPORT.len());
    }

    #[test]
    fn demo_sounding_tells_its_story() {
        // The story of MISSION.md: tropopause near 10.8 km, a stable layer capped near
        // 3.5 km, a 500 hPa height near the analysed 5600 gpm, and one bad height.
        let p = sounding().unwrap();
        let s = summarise(&p, &SummaryOptions::default()).unwrap();
        let z500 = p
            .levels()
            .iter()
            .find(|l| l.pressure_pa == 50_000.0)
            .and_then(|l| l.height_m)
            .unwrap();
        assert!((z500 - Z0_M).abs() < 30.0, "{z500}");
        let tp = s.tropopauses.first.unwrap();
        assert_eq!(tp.height_m, LID_M);
        assert_eq!(s.lid.unwrap().source, LidSource::Tropopause);
        assert_eq!(s.stability.stable_layers.len(), 1);
        assert_eq!(s.stability.stable_layers[0].top_m, STABLE_TOP_M);
        assert_eq!(s.heights.flagged, 1);
        let (i, d) = s.heights.worst.unwrap();
        assert_eq!(p.levels()[usize::from(i)].pressure_pa, 40_000.0);
        assert!((d - SONDE_400_HPA_ERROR_M).abs() < 5.0);
        let b = s.barotropy.unwrap();
        assert_eq!(b.verdict, BarotropyVerdict::NearBarotropic);
        assert!(b.turning_deg > 7.0 && b.turning_deg < 9.0);
    }
}
