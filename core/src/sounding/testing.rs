//! Profiles built from formulas, for the unit tests of the analysis modules.

use super::profile::{Level, Profile, StationInfo, Wind};
use super::thermo::temperature_from_theta;
use crate::constants::G0;

/// Scale height of the test profiles' pressure, m.
pub const SCALE_HEIGHT_M: f64 = 8000.0;

/// A profile every `step_m` from 0 to `top_m` with constant N (θ = θ0 exp(N² z / g0),
/// so g0 d ln θ/dz = N² exactly), pressure p0 exp(−z/8 km), and the wind `wind(z)`.
/// Pressure and height need not be in hydrostatic balance: the analysis uses the given
/// heights.
pub fn constant_n(n: f64, top_m: f64, step_m: f64, wind: impl Fn(f64) -> Option<Wind>) -> Profile {
    let mut p = Profile::new(StationInfo::default());
    let mut z = 0.0;
    while z <= top_m {
        let pres = 100_000.0 * libm::exp(-z / SCALE_HEIGHT_M);
        let theta = 290.0 * libm::exp(n * n * z / G0);
        let _ = p.push(Level {
            height_m: Some(z),
            temperature_k: Some(temperature_from_theta(theta, pres)),
            wind: wind(z),
            ..Level::at_pressure(pres)
        });
        z += step_m;
    }
    p
}
