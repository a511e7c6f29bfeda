//! Physical constants, each with its published source.
//!
//! All values are SI. Derived quantities (κ) are computed from the stated values so
//! that there is one source of truth per constant.

/// Nominal mean angular velocity of the Earth, Ω (rad s⁻¹).
///
/// Source: IERS Conventions (2010), IERS Technical Note 36, Table 1.1; the same value is
/// used by WMO.
pub const OMEGA: f64 = 7.292_115e-5;

/// Standard acceleration of gravity, g0 (m s⁻²).
///
/// Source: 3rd General Conference on Weights and Measures (CGPM, 1901). It defines the
/// geopotential metre: 1 gpm = 9.80665 J kg⁻¹ / g0.
pub const G0: f64 = 9.806_65;

/// Mean radius of the Earth, a (m).
///
/// Source: IUGG mean radius R1 of the Geodetic Reference System 1980 (Moritz, 1980,
/// Bulletin Géodésique 54).
pub const EARTH_RADIUS: f64 = 6_371_008.8;

/// Gas constant of dry air, Rd (J kg⁻¹ K⁻¹).
///
/// Source: CODATA molar gas constant 8.314462618 J mol⁻¹ K⁻¹ divided by the molar mass of
/// dry air 28.9645 g mol⁻¹ (US Standard Atmosphere 1976).
pub const R_DRY: f64 = 287.047;

/// Specific heat of dry air at constant pressure, cp (J kg⁻¹ K⁻¹). Common practice.
pub const CP_DRY: f64 = 1004.7;

/// Poisson constant κ = Rd / cp (≈ 2/7, common practice).
pub const KAPPA: f64 = R_DRY / CP_DRY;

/// Ratio of the molar masses of water vapour and dry air, ε. Common practice.
pub const EPSILON: f64 = 0.622;

/// One potential-vorticity unit, 1 PVU = 1e-6 K m² kg⁻¹ s⁻¹ (common practice).
pub const PVU: f64 = 1e-6;

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn kappa_is_close_to_two_sevenths() {
        // Common practice: κ ≈ 2/7 for a diatomic ideal gas.
        assert_relative_eq!(KAPPA, 2.0 / 7.0, max_relative = 2e-3);
    }

    #[test]
    fn omega_matches_sidereal_day() {
        // Sidereal day 86164.0905 s (IERS): 2π / T agrees with the nominal Ω to 2e-7.
        assert_relative_eq!(
            OMEGA,
            2.0 * core::f64::consts::PI / 86_164.090_5,
            max_relative = 2e-7
        );
    }
}
