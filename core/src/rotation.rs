//! The Earth's rotation seen at a latitude: Coriolis parameter f, its meridional gradient
//! β, the inertial period, and whether geostrophic balance can be trusted there.

use crate::constants::{EARTH_RADIUS, OMEGA};
use crate::error::{in_range, Error, Result};
use core::f64::consts::PI;

/// |latitude| below which geostrophic wind and vorticity are refused, degrees.
///
/// Common practice: f → 0 at the equator and the balance degenerates. The threshold
/// is leeward's choice (see docs/methods.md).
pub const GEOSTROPHIC_MIN_LAT_DEG: f64 = 5.0;

/// |latitude| below which geostrophic results carry a low-latitude warning, degrees.
/// Common practice; leeward's threshold.
pub const GEOSTROPHIC_WARN_LAT_DEG: f64 = 15.0;

/// Coriolis parameter f = 2Ω sin φ (s⁻¹). Negative in the Southern Hemisphere.
pub fn coriolis(lat_deg: f64) -> f64 {
    2.0 * OMEGA * libm::sin(lat_deg.to_radians())
}

/// Meridional gradient of f, β = 2Ω cos φ / a (m⁻¹ s⁻¹). Positive in both hemispheres.
pub fn beta(lat_deg: f64) -> f64 {
    2.0 * OMEGA * libm::cos(lat_deg.to_radians()) / EARTH_RADIUS
}

/// Rotation figures at one latitude.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Rotation {
    /// Latitude, degrees north (negative south).
    pub lat_deg: f64,
    /// Coriolis parameter f, s⁻¹.
    pub f: f64,
    /// β = ∂f/∂y, m⁻¹ s⁻¹.
    pub beta: f64,
    /// Inertial period 2π/|f|, s; `None` at the equator, where there is none.
    pub inertial_period_s: Option<f64>,
    /// How far geostrophic reasoning can be trusted at this latitude.
    pub regime: Regime,
}

impl Rotation {
    /// Rotation figures at `lat_deg` (−90 to 90).
    pub fn at(lat_deg: f64) -> Result<Self> {
        let lat_deg = in_range("latitude", lat_deg, -90.0, 90.0)?;
        let f = coriolis(lat_deg);
        // Below ~1e-12 s⁻¹ (0.0000005° from the equator) the period would overflow to
        // a meaningless figure: report none.
        let inertial_period_s = if f.abs() > 1e-12 {
            Some(2.0 * PI / f.abs())
        } else {
            None
        };
        Ok(Rotation {
            lat_deg,
            f,
            beta: beta(lat_deg),
            inertial_period_s,
            regime: Regime::classify(lat_deg),
        })
    }
}

/// How well geostrophic balance holds at a latitude.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Regime {
    /// |φ| ≥ 15°: balance holds for synoptic flow (common practice).
    Balanced,
    /// 5° ≤ |φ| < 15°: figures are given with a warning.
    LowLatitude,
    /// |φ| < 5°: geostrophic figures are refused.
    Equatorial,
}

impl Regime {
    /// The regime at a (valid) latitude.
    pub fn classify(lat_deg: f64) -> Self {
        let a = lat_deg.abs();
        if a < GEOSTROPHIC_MIN_LAT_DEG {
            Regime::Equatorial
        } else if a < GEOSTROPHIC_WARN_LAT_DEG {
            Regime::LowLatitude
        } else {
            Regime::Balanced
        }
    }

    /// A short warning for the user, if any.
    pub fn warning(self) -> Option<&'static str> {
        match self {
            Regime::Balanced => None,
            Regime::LowLatitude => {
                Some("low latitude: geostrophic balance is weak below 15 degrees")
            }
            Regime::Equatorial => {
                Some("geostrophic balance does not hold within 5 degrees of the equator")
            }
        }
    }
}

/// Check that geostrophic quantities may be computed at `lat_deg`; returns the regime
/// (balanced or low-latitude) or the refusal.
pub fn geostrophic_regime(lat_deg: f64) -> Result<Regime> {
    let lat_deg = in_range("latitude", lat_deg, -90.0, 90.0)?;
    match Regime::classify(lat_deg) {
        Regime::Equatorial => Err(Error::NearEquator {
            lat_deg,
            min_deg: GEOSTROPHIC_MIN_LAT_DEG,
        }),
        r => Ok(r),
    }
}

/// Sense of rotation in words that hold in both hemispheres.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Sense {
    /// Turning with the Earth's rotation (ζ/f > 0).
    Cyclonic,
    /// Turning against it (ζ/f < 0).
    Anticyclonic,
    /// No measurable turning.
    Neutral,
}

impl Sense {
    /// The sense of relative vorticity `zeta` where the Coriolis parameter is `f`.
    /// |ζ| below `1e-9` s⁻¹ (far under any measurable value) is neutral.
    pub fn of(zeta: f64, f: f64) -> Self {
        if !zeta.is_finite() || !f.is_finite() || zeta.abs() < 1e-9 || f == 0.0 {
            Sense::Neutral
        } else if (zeta > 0.0) == (f > 0.0) {
            Sense::Cyclonic
        } else {
            Sense::Anticyclonic
        }
    }

    /// The word shown to the user.
    pub fn word(self) -> &'static str {
        match self {
            Sense::Cyclonic => "cyclonic",
            Sense::Anticyclonic => "anticyclonic",
            Sense::Neutral => "neutral",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn f_and_beta_at_45_degrees() {
        // Check values of FIELD-NOTES §2, computed from f = 2Ω sin φ, β = 2Ω cos φ / a.
        let r = Rotation::at(45.0).unwrap();
        assert_relative_eq!(r.f, 1.0313e-4, max_relative = 1e-4);
        assert_relative_eq!(r.beta, 1.619e-11, max_relative = 1e-3);
        // Inertial period at 45°: 2π/f ≈ 16.9 h (common practice: "about 17 hours").
        let hours = r.inertial_period_s.unwrap() / 3600.0;
        assert!((hours - 16.92).abs() < 0.02, "{hours}");
    }

    #[test]
    fn southern_hemisphere_mirrors() {
        let n = Rotation::at(30.0).unwrap();
        let s = Rotation::at(-30.0).unwrap();
        assert_relative_eq!(n.f, -s.f, max_relative = 1e-15);
        assert_relative_eq!(n.beta, s.beta, max_relative = 1e-15);
        assert!(s.f < 0.0 && s.beta > 0.0);
    }

    #[test]
    fn bad_latitudes_are_errors() {
        assert!(matches!(Rotation::at(90.5), Err(Error::OutOfRange { .. })));
        assert!(matches!(
            Rotation::at(f64::NAN),
            Err(Error::NotFinite { .. })
        ));
        assert!(matches!(
            Rotation::at(f64::INFINITY),
            Err(Error::NotFinite { .. })
        ));
        assert!(Rotation::at(0.0).unwrap().inertial_period_s.is_none());
    }

    #[test]
    fn geostrophic_thresholds() {
        assert!(matches!(
            geostrophic_regime(4.9),
            Err(Error::NearEquator { .. })
        ));
        assert!(matches!(
            geostrophic_regime(-4.9),
            Err(Error::NearEquator { .. })
        ));
        assert_eq!(geostrophic_regime(5.0), Ok(Regime::LowLatitude));
        assert_eq!(geostrophic_regime(-14.9), Ok(Regime::LowLatitude));
        assert_eq!(geostrophic_regime(15.0), Ok(Regime::Balanced));
    }

    #[test]
    fn sense_words_hold_in_both_hemispheres() {
        assert_eq!(Sense::of(2e-5, 1e-4), Sense::Cyclonic);
        assert_eq!(Sense::of(-2e-5, -1e-4), Sense::Cyclonic);
        assert_eq!(Sense::of(-2e-5, 1e-4), Sense::Anticyclonic);
        assert_eq!(Sense::of(2e-5, -1e-4), Sense::Anticyclonic);
        assert_eq!(Sense::of(0.0, 1e-4), Sense::Neutral);
    }
}
