//! The sounding analysis against the US Standard Atmosphere 1976 (NOAA/NASA/USAF, 1976),
//! built from the standard's own layer formulas.

use leeward_core::constants::{G0, R_DRY};
use leeward_core::sounding::heights::heights;
use leeward_core::sounding::stability::{bulk_n, tropopauses};
use leeward_core::sounding::summary::{summarise, SummaryOptions};
use leeward_core::sounding::{Level, LevelKind, Profile, StationInfo};

/// Sea-level pressure, temperature and tropospheric lapse rate of the standard.
const P0: f64 = 101_325.0;
const T0: f64 = 288.15;
const LAPSE: f64 = 0.0065;
/// The standard's tropopause: 11 km geopotential, 216.65 K, 226.32 hPa.
const Z_TROP: f64 = 11_000.0;
const T_TROP: f64 = 216.65;

/// Pressure at the tropopause from the troposphere's formula p = p0 (T/T0)^(g0/(Rd L)).
fn p_trop() -> f64 {
    P0 * (T_TROP / T0).powf(G0 / (R_DRY * LAPSE))
}

/// Temperature of the standard atmosphere at pressure `p` (Pa), to 20 km.
fn temperature_at(p: f64) -> f64 {
    if p >= p_trop() {
        T0 * (p / P0).powf(R_DRY * LAPSE / G0)
    } else {
        T_TROP
    }
}

/// Dry profile at the sea-level pressure, the tropopause pressure and every 25 hPa from
/// 1000 to 100 hPa (a radiosonde reports many more levels than the standard surfaces).
fn standard_profile() -> Profile {
    let mut pressures: Vec<f64> = (4..=40).rev().map(|k| k as f64 * 2500.0).collect();
    pressures.push(P0);
    pressures.push(p_trop());
    pressures.sort_by(|a, b| b.partial_cmp(a).unwrap());
    let mut prof = Profile::new(StationInfo::default());
    for (i, p) in pressures.into_iter().enumerate() {
        prof.push(Level {
            height_m: (i == 0).then_some(0.0),
            temperature_k: Some(temperature_at(p)),
            kind: if i == 0 {
                LevelKind::SURFACE
            } else {
                LevelKind::NONE
            },
            ..Level::at_pressure(p)
        })
        .unwrap();
    }
    prof
}

#[test]
fn hypsometric_heights_match_the_standard_surfaces() {
    // FIELD-NOTES §6 table (computed there from the standard's layer formulas), gpm.
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
    let p = standard_profile();
    let h = heights(&p, None, 20.0).unwrap();
    for (hpa, z) in table {
        let i = p
            .levels()
            .iter()
            .position(|l| (l.pressure_pa - hpa * 100.0).abs() < 0.01)
            .unwrap();
        let got = h.computed_m(i).unwrap();
        assert!(
            (got - z).abs() <= 2.0,
            "{hpa} hPa: computed {got:.1} m, standard {z} m"
        );
    }
}

#[test]
fn lapse_rate_tropopause_is_at_11_km() {
    // The standard's lapse-rate tropopause is at 11 000 m (FIELD-NOTES §6).
    let p = standard_profile();
    let h = heights(&p, None, 20.0).unwrap();
    let tp = tropopauses(&p, &h).first.unwrap();
    assert!((tp.height_m - Z_TROP).abs() <= 2.0, "{}", tp.height_m);
    assert!((tp.temperature_k - T_TROP).abs() < 1e-9);
    assert!(tropopauses(&p, &h).second.is_none());
    // Summary picks it as the default lid.
    let s = summarise(&p, &SummaryOptions::default()).unwrap();
    assert!((s.lid.unwrap().height_m - Z_TROP).abs() <= 2.0);
}

#[test]
fn buoyancy_frequency_of_the_standard_atmosphere() {
    // Troposphere: N² = (g0/T)(g0/cp − L) (from θ = T (p0/p)^κ and hydrostatic balance,
    // computed). Between 1 and 3 km, T̄ ≈ 275.15 K: N ≈ 0.0113 /s. Stratosphere
    // (isothermal 216.65 K): N² = g0²/(cp T) → N ≈ 0.0212 /s.
    let p = standard_profile();
    let h = heights(&p, None, 20.0).unwrap();
    let cp = leeward_core::constants::CP_DRY;
    let n_trop = bulk_n(&p, &h, 1000.0, 3000.0).unwrap();
    let expected = (G0 / 275.15 * (G0 / cp - LAPSE)).sqrt();
    assert!(
        (n_trop - expected).abs() / expected < 0.01,
        "{n_trop} vs {expected}"
    );
    let n_strat = bulk_n(&p, &h, 12_000.0, 16_000.0).unwrap();
    let expected = G0 / (cp * T_TROP).sqrt();
    assert!(
        (n_strat - expected).abs() / expected < 0.01,
        "{n_strat} vs {expected}"
    );
}
