//! Rossby-wave figures on a β-plane: the stationary wavelength of a westerly current and
//! the phase speed of a wave of given wavelength.
//!
//! Linearised barotropic vorticity equation on a β-plane (FIELD-NOTES §5): a wave of total
//! wavenumber K in a uniform zonal wind U moves at c = U − β/K² (Rossby–Haurwitz); it is
//! stationary at K_s = √(β/U), wavelength L_s = 2π√(U/β). Waves here are taken as purely
//! zonal (no meridional wavenumber), so K = 2π/L.

use crate::error::{in_range, Result};
use crate::rotation::{beta, geostrophic_regime};
use core::f64::consts::PI;
use libm::sqrt;

/// Rossby-wave figures for a wind at a latitude.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RossbyWave {
    /// β at the latitude, m⁻¹ s⁻¹.
    pub beta: f64,
    /// Stationary wavelength 2π√(U/β), m; `None` for easterly or calm wind, which holds
    /// no stationary Rossby wave.
    pub stationary_wavelength_m: Option<f64>,
    /// Phase speed of the given wavelength, m s⁻¹ (eastward positive); `None` without one.
    pub phase_speed_ms: Option<f64>,
    /// Wavelength the phase speed refers to, m.
    pub wavelength_m: Option<f64>,
}

/// Stationary wavelength 2π√(U/β) for a zonal wind `u_ms` at `lat_deg`, m; `None` when the
/// wind is not westerly.
pub fn stationary_wavelength(lat_deg: f64, u_ms: f64) -> Option<f64> {
    let b = beta(lat_deg);
    (u_ms > 0.0 && b > 0.0).then(|| 2.0 * PI * sqrt(u_ms / b))
}

/// Rossby-wave figures for zonal wind `u_ms` (eastward positive) at `lat_deg`, with an
/// optional wavelength for the phase speed.
pub fn rossby(lat_deg: f64, u_ms: f64, wavelength_m: Option<f64>) -> Result<RossbyWave> {
    geostrophic_regime(lat_deg)?;
    let u = in_range("wind", u_ms, -150.0, 150.0)?;
    let b = beta(lat_deg);
    let wl = match wavelength_m {
        Some(l) => Some(in_range("wavelength", l, 10_000.0, 40_075_000.0)?),
        None => None,
    };
    let phase = wl.map(|l| {
        let k = 2.0 * PI / l;
        u - b / (k * k)
    });
    Ok(RossbyWave {
        beta: b,
        stationary_wavelength_m: stationary_wavelength(lat_deg, u),
        phase_speed_ms: phase,
        wavelength_m: wl,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn stationary_wavelength_at_45() {
        // FIELD-NOTES §5 check value: V = 15 m/s at 45° gives about 6050 km (computed).
        let l = stationary_wavelength(45.0, 15.0).unwrap();
        assert!((l / 1000.0 - 6050.0).abs() < 15.0, "{l}");
    }

    #[test]
    fn stationary_wave_has_zero_phase_speed() {
        let l = stationary_wavelength(45.5, 20.0).unwrap();
        let w = rossby(45.5, 20.0, Some(l)).unwrap();
        assert_relative_eq!(w.phase_speed_ms.unwrap(), 0.0, epsilon = 1e-9);
        // Longer waves retrogress (move west), shorter ones drift east (common practice).
        assert!(
            rossby(45.5, 20.0, Some(2.0 * l))
                .unwrap()
                .phase_speed_ms
                .unwrap()
                < 0.0
        );
        assert!(
            rossby(45.5, 20.0, Some(0.5 * l))
                .unwrap()
                .phase_speed_ms
                .unwrap()
                > 0.0
        );
    }

    #[test]
    fn easterlies_have_no_stationary_wave() {
        assert!(rossby(45.0, -10.0, None)
            .unwrap()
            .stationary_wavelength_m
            .is_none());
        assert!(rossby(2.0, 10.0, None).is_err());
        assert!(rossby(45.0, f64::NAN, None).is_err());
    }
}
