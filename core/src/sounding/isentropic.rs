//! Isentropic layer potential vorticity between two θ surfaces, in PVU.

use super::heights::Heights;
use super::profile::Profile;
use super::thermo::potential_temperature;
use crate::constants::{G0, PVU};
use crate::error::{finite, Error, Result};

/// PV of an isentropic layer.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IsentropicPv {
    /// Lower θ, K.
    pub theta_low_k: f64,
    /// Upper θ, K.
    pub theta_high_k: f64,
    /// Pressure of the lower θ surface, Pa.
    pub p_low_pa: f64,
    /// Pressure of the upper θ surface, Pa.
    pub p_high_pa: f64,
    /// Height of the lower surface, m, where the heights allow.
    pub z_low_m: Option<f64>,
    /// Height of the upper surface, m.
    pub z_high_m: Option<f64>,
    /// P = −g0 (ζ + f) Δθ/Δp, PVU (FIELD-NOTES §6).
    pub pv_pvu: f64,
}

/// Pressure (and height) where θ first reaches `theta_k`, going up from the ground:
/// ln p and z interpolated linearly in θ between the two levels around it.
fn find_theta<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    theta_k: f64,
) -> Option<(f64, Option<f64>)> {
    let mut prev: Option<(f64, f64, Option<f64>)> = None;
    for (l, z) in profile.levels().iter().zip(heights.best_all()) {
        let Some(t) = l.temperature_k else { continue };
        let th = potential_temperature(t, l.pressure_pa);
        let lp = libm::log(l.pressure_pa);
        if th == theta_k {
            return Some((l.pressure_pa, z));
        }
        if let Some((th0, lp0, z0)) = prev {
            if (th0 - theta_k) * (th - theta_k) < 0.0 {
                let w = (theta_k - th0) / (th - th0);
                let zi = match (z0, z) {
                    (Some(a), Some(b)) => Some(a + w * (b - a)),
                    _ => None,
                };
                return Some((libm::exp(lp0 + w * (lp - lp0)), zi));
            }
        }
        prev = Some((th, lp, z));
    }
    None
}

/// Isentropic layer PV between `theta_low_k` and `theta_high_k` for vorticity `zeta`
/// and Coriolis parameter `f`, s⁻¹.
pub fn layer_pv<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    theta_low_k: f64,
    theta_high_k: f64,
    zeta: f64,
    f: f64,
) -> Result<IsentropicPv> {
    finite("lower theta", theta_low_k)?;
    finite("upper theta", theta_high_k)?;
    finite("vorticity", zeta)?;
    finite("Coriolis parameter", f)?;
    if theta_high_k <= theta_low_k {
        return Err(Error::DepthNotPositive {
            what: "theta layer (upper minus lower, K)",
            depth_m: theta_high_k - theta_low_k,
        });
    }
    let range = profile
        .levels()
        .iter()
        .filter_map(|l| {
            l.temperature_k
                .map(|t| potential_temperature(t, l.pressure_pa))
        })
        .fold(None, |acc: Option<(f64, f64)>, th| {
            Some(acc.map_or((th, th), |(a, b)| (a.min(th), b.max(th))))
        })
        .ok_or(Error::NoData {
            what: "temperatures in the sounding",
        })?;
    let out = |v| Error::OutOfRange {
        what: "theta",
        value: v,
        min: range.0,
        max: range.1,
    };
    let (p_low, z_low) = find_theta(profile, heights, theta_low_k).ok_or(out(theta_low_k))?;
    let (p_high, z_high) = find_theta(profile, heights, theta_high_k).ok_or(out(theta_high_k))?;
    if p_high >= p_low {
        // θ falls with height somewhere between: the layer is not stably stratified.
        return Err(Error::NotStable { n2: 0.0 });
    }
    let pv = -G0 * (zeta + f) * (theta_high_k - theta_low_k) / (p_high - p_low);
    Ok(IsentropicPv {
        theta_low_k,
        theta_high_k,
        p_low_pa: p_low,
        p_high_pa: p_high,
        z_low_m: z_low,
        z_high_m: z_high,
        pv_pvu: pv / PVU,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sounding::heights::heights;
    use crate::sounding::testing::{constant_n, SCALE_HEIGHT_M};
    use approx::assert_relative_eq;

    #[test]
    fn layer_pv_of_a_constant_n_profile() {
        // θ = 290 exp(N² z/g0), p = 1e5 exp(−z/8 km): the θ surfaces lie at
        // z = (g0/N²) ln(θ/290) and P = −g0 (ζ + f) Δθ/Δp (FIELD-NOTES §6), computed.
        let n = 0.012;
        let p = constant_n(n, 15_000.0, 100.0, |_| None);
        let h = heights(&p, None, 20.0).unwrap();
        let f = crate::rotation::coriolis(45.0);
        let (lo, hi) = (300.0, 320.0);
        let z = |th: f64| G0 / (n * n) * libm::log(th / 290.0);
        let pr = |th: f64| 1e5 * libm::exp(-z(th) / SCALE_HEIGHT_M);
        let expected = -G0 * f * (hi - lo) / (pr(hi) - pr(lo)) / PVU;
        let pv = layer_pv(&p, &h, lo, hi, 0.0, f).unwrap();
        assert_relative_eq!(pv.pv_pvu, expected, max_relative = 1e-3);
        assert_relative_eq!(pv.z_low_m.unwrap(), z(lo), epsilon = 2.0);
        // Tropospheric values are a fraction of a PVU (common practice).
        assert!(pv.pv_pvu > 0.1 && pv.pv_pvu < 1.5, "{}", pv.pv_pvu);
        // Cyclonic vorticity raises it in proportion to ζ + f.
        let cyc = layer_pv(&p, &h, lo, hi, f, f).unwrap();
        assert_relative_eq!(cyc.pv_pvu, 2.0 * pv.pv_pvu, max_relative = 1e-12);
    }

    #[test]
    fn theta_outside_the_profile_is_refused() {
        let p = constant_n(0.012, 5000.0, 250.0, |_| None);
        let h = heights(&p, None, 20.0).unwrap();
        assert!(matches!(
            layer_pv(&p, &h, 295.0, 400.0, 0.0, 1e-4),
            Err(Error::OutOfRange { .. })
        ));
        assert!(layer_pv(&p, &h, 300.0, 295.0, 0.0, 1e-4).is_err());
        assert!(layer_pv(&p, &h, 295.0, 300.0, f64::NAN, 1e-4).is_err());
    }
}
