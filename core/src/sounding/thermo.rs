//! Thermodynamics of one level: θ, vapour pressure, mixing ratio, virtual temperature,
//! relative humidity.

use crate::constants::{EPSILON, KAPPA};

/// 0 °C in kelvin (definition of the Celsius scale).
pub const ZERO_CELSIUS_K: f64 = 273.15;

/// Reference pressure of potential temperature, Pa (1000 hPa, common practice).
pub const P0_PA: f64 = 100_000.0;

/// Saturation vapour pressure over liquid water, Pa, at temperature `t_k`.
///
/// Bolton (1980), Mon. Wea. Rev. 108, eq. 10: e_s = 6.112 exp(17.67 T / (T + 243.5)) hPa,
/// T in °C; good to 0.1 % between −30 and +35 °C.
pub fn saturation_vapour_pressure_pa(t_k: f64) -> f64 {
    let t_c = t_k - ZERO_CELSIUS_K;
    611.2 * libm::exp(17.67 * t_c / (t_c + 243.5))
}

/// Mixing ratio, kg/kg, of vapour at partial pressure `e_pa` in air at `p_pa`:
/// r = ε e / (p − e) (common practice). `None` where e ≥ p (no such air).
pub fn mixing_ratio(e_pa: f64, p_pa: f64) -> Option<f64> {
    let dry = p_pa - e_pa;
    (dry > 0.0 && e_pa >= 0.0).then(|| EPSILON * e_pa / dry)
}

/// Mixing ratio, kg/kg, of air at pressure `p_pa` with dew point `td_k` (the vapour
/// pressure is the saturation pressure at the dew point; Bolton 1980).
pub fn mixing_ratio_from_dewpoint(td_k: f64, p_pa: f64) -> Option<f64> {
    mixing_ratio(saturation_vapour_pressure_pa(td_k), p_pa)
}

/// Virtual temperature, K: Tv = T (1 + r/ε) / (1 + r) (common practice; exact for an
/// ideal-gas mixture).
pub fn virtual_temperature(t_k: f64, r: f64) -> f64 {
    t_k * (1.0 + r / EPSILON) / (1.0 + r)
}

/// Potential temperature, K: θ = T (1000 hPa / p)^κ (Poisson's equation).
pub fn potential_temperature(t_k: f64, p_pa: f64) -> f64 {
    t_k * libm::pow(P0_PA / p_pa, KAPPA)
}

/// Temperature, K, of air with potential temperature `theta_k` at `p_pa`.
pub fn temperature_from_theta(theta_k: f64, p_pa: f64) -> f64 {
    theta_k * libm::pow(p_pa / P0_PA, KAPPA)
}

/// Relative humidity over water, 0–1: e_s(T_d) / e_s(T) (WMO definition with Bolton's
/// e_s).
pub fn relative_humidity(t_k: f64, td_k: f64) -> f64 {
    saturation_vapour_pressure_pa(td_k) / saturation_vapour_pressure_pa(t_k)
}

/// The derived quantities of one level, each `None` where its inputs are missing.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LevelThermo {
    /// Potential temperature θ, K.
    pub theta_k: Option<f64>,
    /// Virtual temperature, K (equal to T where there is no dew point: dry air assumed).
    pub virtual_temperature_k: Option<f64>,
    /// Mixing ratio, kg/kg.
    pub mixing_ratio: Option<f64>,
    /// Relative humidity over water, 0–1.
    pub relative_humidity: Option<f64>,
}

impl LevelThermo {
    /// The derived quantities of `level`.
    pub fn of(level: &super::Level) -> Self {
        let p = level.pressure_pa;
        let r = level
            .dewpoint_k
            .and_then(|td| mixing_ratio_from_dewpoint(td, p));
        LevelThermo {
            theta_k: level.temperature_k.map(|t| potential_temperature(t, p)),
            virtual_temperature_k: virtual_temperature_with(level, r),
            mixing_ratio: r,
            relative_humidity: match (level.temperature_k, level.dewpoint_k) {
                (Some(t), Some(td)) => Some(relative_humidity(t, td)),
                _ => None,
            },
        }
    }
}

/// Virtual temperature of `level`, K, from its temperature and (where it has one) the
/// mixing ratio of its dew point; dry air where the dew point is missing. The one part
/// of [`LevelThermo`] the height integration needs, without the others' exponentials.
pub fn level_virtual_temperature_k(level: &super::Level) -> Option<f64> {
    let r = level
        .dewpoint_k
        .and_then(|td| mixing_ratio_from_dewpoint(td, level.pressure_pa));
    virtual_temperature_with(level, r)
}

fn virtual_temperature_with(level: &super::Level, r: Option<f64>) -> Option<f64> {
    level
        .temperature_k
        .map(|t| virtual_temperature(t, r.unwrap_or(0.0)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn bolton_check_values() {
        // FIELD-NOTES §6 (computed from Bolton 1980 eq. 10): 6.112 hPa at 0 °C,
        // about 23.37 hPa at 20 °C.
        assert_relative_eq!(saturation_vapour_pressure_pa(273.15), 611.2, epsilon = 1e-9);
        assert_relative_eq!(
            saturation_vapour_pressure_pa(293.15),
            2337.0,
            max_relative = 1e-3
        );
    }

    #[test]
    fn theta_at_reference_pressure_is_temperature() {
        // Definition of θ.
        assert_relative_eq!(potential_temperature(288.0, P0_PA), 288.0);
        // 500 hPa, 250 K: θ = 250 · 2^κ, κ = 287.047/1004.7 (computed) ≈ 304.7 K.
        assert_relative_eq!(
            potential_temperature(250.0, 50_000.0),
            250.0 * libm::pow(2.0, KAPPA),
            max_relative = 1e-12
        );
        assert_relative_eq!(
            temperature_from_theta(potential_temperature(250.0, 50_000.0), 50_000.0),
            250.0,
            max_relative = 1e-12
        );
    }

    #[test]
    fn moist_air_is_virtually_warmer() {
        // r = 10 g/kg at 300 K: Tv = 300 (1 + 0.01/0.622)/1.01 ≈ 301.8 K (computed).
        let tv = virtual_temperature(300.0, 0.010);
        assert_relative_eq!(
            tv,
            300.0 * (1.0 + 0.01 / 0.622) / 1.01,
            max_relative = 1e-12
        );
        assert!(tv > 301.7 && tv < 301.9);
        // Saturated air has relative humidity 1.
        assert_relative_eq!(relative_humidity(280.0, 280.0), 1.0);
        assert!(mixing_ratio(2000.0, 1000.0).is_none());
    }
}
