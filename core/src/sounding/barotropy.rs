//! Is the layer close to barotropic? Shear, turning of the wind and the thermal wind
//! from one sounding.

use heapless::Vec;

use super::heights::Heights;
use super::profile::{Profile, Wind};
use super::ridge_flow::mean_wind;
use crate::constants::R_DRY;
use crate::error::{finite, Error, Result};
use crate::rotation::coriolis;

/// Ratio |V_T| / |V̄| below which the layer counts as close to barotropic (our choice).
pub const NEAR_BAROTROPIC_RATIO: f64 = 0.3;
/// Ratio above which the layer counts as baroclinic (our choice).
pub const BAROCLINIC_RATIO: f64 = 0.6;
/// Total turning below which the wind counts as steady in direction, degrees (our choice).
pub const STEADY_TURNING_DEG: f64 = 10.0;
/// Thinnest sub-layer for the shear list, m (our choice: keeps the list short).
pub const MIN_SHEAR_LAYER_M: f64 = 500.0;
/// Most sub-layers in the shear list.
pub const MAX_SHEAR_LAYERS: usize = 32;

/// How the wind turns with height.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Turning {
    /// Clockwise with height.
    Veering,
    /// Anticlockwise with height.
    Backing,
    /// Less than 10° either way.
    Steady,
}

impl Turning {
    /// The word.
    pub fn word(self) -> &'static str {
        match self {
            Turning::Veering => "veering",
            Turning::Backing => "backing",
            Turning::Steady => "steady",
        }
    }

    /// What the turning implies by the thermal-wind relation (FIELD-NOTES §6): in the
    /// Northern Hemisphere veering means warm advection and backing cold; in the Southern
    /// Hemisphere (f < 0) the other way round.
    pub fn meaning(self, lat_deg: f64) -> &'static str {
        let north = lat_deg >= 0.0;
        match (self, north) {
            (Turning::Steady, _) => "little temperature advection",
            (Turning::Veering, true) | (Turning::Backing, false) => "warm advection",
            (Turning::Veering, false) | (Turning::Backing, true) => "cold advection",
        }
    }
}

/// The barotropy verdict.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum BarotropyVerdict {
    /// Thermal wind small against the mean wind.
    NearBarotropic,
    /// Some thermal wind.
    WeaklyBaroclinic,
    /// Thermal wind comparable with the mean wind.
    Baroclinic,
}

impl BarotropyVerdict {
    /// The verdict for ratio |V_T| / |V̄|.
    pub fn of(ratio: f64) -> Self {
        if ratio < NEAR_BAROTROPIC_RATIO {
            BarotropyVerdict::NearBarotropic
        } else if ratio < BAROCLINIC_RATIO {
            BarotropyVerdict::WeaklyBaroclinic
        } else {
            BarotropyVerdict::Baroclinic
        }
    }

    /// The verdict in words.
    pub fn statement(self) -> &'static str {
        match self {
            BarotropyVerdict::NearBarotropic => "close to barotropic: the column argument is sound",
            BarotropyVerdict::WeaklyBaroclinic => {
                "weakly baroclinic: use the column argument with care"
            }
            BarotropyVerdict::Baroclinic => "baroclinic: the column argument is doubtful",
        }
    }
}

/// Shear across one sub-layer.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ShearLayer {
    /// Base, m.
    pub base_m: f64,
    /// Top, m.
    pub top_m: f64,
    /// Shear vector (top wind − base wind), eastward part, m/s.
    pub du_ms: f64,
    /// Shear vector, northward part, m/s.
    pub dv_ms: f64,
    /// |ΔV| / Δz, s⁻¹.
    pub shear_per_s: f64,
    /// Turning from base to top, degrees, positive clockwise (veering).
    pub turning_deg: f64,
}

/// The barotropy check of a layer.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct Barotropy {
    /// Base of the layer, m.
    pub base_m: f64,
    /// Top of the layer, m.
    pub top_m: f64,
    /// Wind at the base.
    pub base_wind: Wind,
    /// Wind at the top.
    pub top_wind: Wind,
    /// Height-mean wind of the layer.
    pub mean_wind: Wind,
    /// Thermal wind V_T = V(top) − V(base), eastward part, m/s (geostrophic winds assumed).
    pub thermal_u_ms: f64,
    /// Thermal wind, northward part, m/s.
    pub thermal_v_ms: f64,
    /// |V_T|, m/s.
    pub thermal_speed_ms: f64,
    /// |V_T| / |V̄|: the number behind the verdict.
    pub ratio: f64,
    /// Total turning from base to top, degrees, positive clockwise.
    pub turning_deg: f64,
    /// Veering, backing or steady.
    pub turning: Turning,
    /// Layer-mean temperature advection implied by the thermal wind, K per hour
    /// (positive warm): −V̄·∇T̄ = −f (u_b v_t − v_b u_t) / (Rd ln(p_b/p_t)), from
    /// V_T = (Rd/f) ln(p_b/p_t) k × ∇T̄ (FIELD-NOTES §6, worked out).
    pub advection_k_per_h: f64,
    /// The verdict.
    pub verdict: BarotropyVerdict,
    /// Shear of sub-layers at least 500 m deep, ground up.
    pub layers: Vec<ShearLayer, MAX_SHEAR_LAYERS>,
}

/// Signed angle from direction `a` to `b`, degrees in (−180, 180], positive clockwise.
fn turn(a: &Wind, b: &Wind) -> f64 {
    let mut d = b.dir_from_deg - a.dir_from_deg;
    while d > 180.0 {
        d -= 360.0;
    }
    while d <= -180.0 {
        d += 360.0;
    }
    d
}

/// Check the layer between `base_m` and `top_m` at latitude `lat_deg`.
pub fn barotropy<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    base_m: f64,
    top_m: f64,
    lat_deg: f64,
) -> Result<Barotropy> {
    finite("layer base", base_m)?;
    finite("layer top", top_m)?;
    crate::rotation::Rotation::at(lat_deg)?;
    if top_m <= base_m {
        return Err(Error::DepthNotPositive {
            what: "layer depth",
            depth_m: top_m - base_m,
        });
    }
    let has_wind = |l: &super::Level| l.wind.map(|_| 0.0);
    let (wb, wt) = heights.span(profile, has_wind).ok_or(Error::NoData {
        what: "winds with heights in the sounding",
    })?;
    let outside = |what, z| Error::OutsideProfile {
        what,
        height_m: z,
        bottom_m: wb,
        top_m: wt,
    };
    if base_m < wb {
        return Err(outside("layer base", base_m));
    }
    if top_m > wt {
        return Err(outside("layer top", top_m));
    }
    let has = |l: &super::Level| l.wind.is_some();
    let wind_at = |z: f64| -> Option<Wind> {
        let u = heights.interpolate(profile, z, has, |l| l.wind.map(|w| w.components().0))?;
        let v = heights.interpolate(profile, z, has, |l| l.wind.map(|w| w.components().1))?;
        Some(Wind::from_components(u, v))
    };
    let missing = Error::NoData {
        what: "winds in the layer",
    };
    let bw = wind_at(base_m).ok_or(missing)?;
    let tw = wind_at(top_m).ok_or(missing)?;
    let (mu, mv) = mean_wind(profile, heights, base_m, top_m).ok_or(missing)?;
    let mean = Wind::from_components(mu, mv);
    let (ub, vb) = bw.components();
    let (ut, vt) = tw.components();
    let (du, dv) = (ut - ub, vt - vb);
    let thermal = libm::hypot(du, dv);

    // Turning and sub-layers, following the wind levels inside the layer.
    let mut layers = Vec::new();
    let mut total_turn = 0.0;
    let mut prev = (base_m, bw);
    let mut sub_base = (base_m, bw);
    // The wind levels inside the layer, as reported (a level's own wind is what
    // interpolating at its height gives).
    let levels = profile.levels();
    let inner = heights
        .indexed(profile, has)
        .filter(|&(_, z)| z > base_m && z < top_m)
        .map(|(i, z)| (z, levels[i].wind));
    for (z, w) in inner.chain(core::iter::once((top_m, Some(tw)))) {
        let w = w.ok_or(missing)?;
        if w.speed_ms > 0.0 && prev.1.speed_ms > 0.0 {
            total_turn += turn(&prev.1, &w);
        }
        prev = (z, w);
        let dz = z - sub_base.0;
        if dz >= MIN_SHEAR_LAYER_M || z == top_m {
            let (u0, v0) = sub_base.1.components();
            let (u1, v1) = w.components();
            let layer = ShearLayer {
                base_m: sub_base.0,
                top_m: z,
                du_ms: u1 - u0,
                dv_ms: v1 - v0,
                shear_per_s: libm::hypot(u1 - u0, v1 - v0) / dz,
                turning_deg: if w.speed_ms > 0.0 && sub_base.1.speed_ms > 0.0 {
                    turn(&sub_base.1, &w)
                } else {
                    0.0
                },
            };
            // A full list drops the remaining sub-layers only; the totals stay exact.
            let _ = layers.push(layer);
            sub_base = (z, w);
        }
    }
    let turning = if total_turn >= STEADY_TURNING_DEG {
        Turning::Veering
    } else if total_turn <= -STEADY_TURNING_DEG {
        Turning::Backing
    } else {
        Turning::Steady
    };

    let ln_p = |l: &super::Level| Some(libm::log(l.pressure_pa));
    let lpb = heights.value_at(profile, base_m, ln_p).ok_or(missing)?;
    let lpt = heights.value_at(profile, top_m, ln_p).ok_or(missing)?;
    let f = coriolis(lat_deg);
    let advection = -f * (ub * vt - vb * ut) / (R_DRY * (lpb - lpt)) * 3600.0;
    let ratio = if mean.speed_ms > 0.0 {
        thermal / mean.speed_ms
    } else {
        f64::INFINITY
    };
    Ok(Barotropy {
        base_m,
        top_m,
        base_wind: bw,
        top_wind: tw,
        mean_wind: mean,
        thermal_u_ms: du,
        thermal_v_ms: dv,
        thermal_speed_ms: thermal,
        ratio,
        turning_deg: total_turn,
        turning,
        advection_k_per_h: advection,
        verdict: BarotropyVerdict::of(ratio),
        layers,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sounding::heights::heights;
    use crate::sounding::testing::{constant_n, SCALE_HEIGHT_M};
    use approx::assert_relative_eq;

    /// Wind turning linearly from `d0` to `d1` (degrees from) over 0–6 km at 10 m/s.
    fn turning(d0: f64, d1: f64) -> Profile {
        constant_n(0.01, 6000.0, 500.0, move |z| {
            Some(Wind {
                dir_from_deg: d0 + (d1 - d0) * z / 6000.0,
                speed_ms: 10.0,
            })
        })
    }

    #[test]
    fn uniform_wind_is_barotropic() {
        let p = turning(270.0, 270.0);
        let h = heights(&p, None, 20.0).unwrap();
        let b = barotropy(&p, &h, 0.0, 6000.0, 45.0).unwrap();
        assert!(b.thermal_speed_ms < 1e-9);
        assert_eq!(b.verdict, BarotropyVerdict::NearBarotropic);
        assert_eq!(b.turning, Turning::Steady);
        assert!(b.advection_k_per_h.abs() < 1e-9);
        assert_eq!(b.layers.len(), 12);
    }

    #[test]
    fn veering_is_warm_advection_in_the_north_and_cold_in_the_south() {
        // Southerly at the base, westerly at the top: veering through 90°.
        let p = turning(180.0, 270.0);
        let h = heights(&p, None, 20.0).unwrap();
        let north = barotropy(&p, &h, 0.0, 6000.0, 45.0).unwrap();
        assert_eq!(north.turning, Turning::Veering);
        assert_relative_eq!(north.turning_deg, 90.0, epsilon = 1e-9);
        assert_eq!(north.turning.meaning(45.0), "warm advection");
        // Computed by hand from −f (u_b v_t − v_b u_t)/(Rd ln(p_b/p_t)): u_b = 0,
        // v_b = 10, u_t = 10, v_t = 0, ln(p_b/p_t) = 6000/8000, f(45°) = 1.0313e-4:
        // 1.0313e-4 · 100 / (287.047 · 0.75) · 3600 = 0.1724 K/h.
        let expected =
            crate::rotation::coriolis(45.0) * 100.0 / (R_DRY * 6000.0 / SCALE_HEIGHT_M) * 3600.0;
        assert_relative_eq!(north.advection_k_per_h, expected, max_relative = 1e-9);
        assert!((expected - 0.1724).abs() < 1e-3);
        // |V_T| = 10√2 against a mean of about 9 m/s: baroclinic.
        assert_relative_eq!(north.thermal_speed_ms, 200f64.sqrt(), max_relative = 1e-9);
        assert_eq!(north.verdict, BarotropyVerdict::Baroclinic);
        let south = barotropy(&p, &h, 0.0, 6000.0, -45.0).unwrap();
        assert_eq!(south.turning, Turning::Veering);
        assert_eq!(south.turning.meaning(-45.0), "cold advection");
        assert_relative_eq!(south.advection_k_per_h, -expected, max_relative = 1e-9);
    }

    #[test]
    fn backing_through_north_is_counted_the_short_way() {
        // From 20° to 340°: backing by 40°, not veering by 320°.
        let p = constant_n(0.01, 6000.0, 500.0, |z| {
            let d = 20.0 - 40.0 * z / 6000.0;
            Some(Wind {
                dir_from_deg: if d < 0.0 { d + 360.0 } else { d },
                speed_ms: 10.0,
            })
        });
        let h = heights(&p, None, 20.0).unwrap();
        let b = barotropy(&p, &h, 0.0, 6000.0, 45.0).unwrap();
        assert_eq!(b.turning, Turning::Backing);
        assert!((b.turning_deg + 40.0).abs() < 0.5, "{}", b.turning_deg);
        assert!(b.advection_k_per_h < 0.0);
    }

    #[test]
    fn layers_outside_the_winds_are_refused() {
        let p = turning(270.0, 270.0);
        let h = heights(&p, None, 20.0).unwrap();
        assert!(matches!(
            barotropy(&p, &h, 0.0, 9000.0, 45.0),
            Err(Error::OutsideProfile { .. })
        ));
        assert!(barotropy(&p, &h, 3000.0, 1000.0, 45.0).is_err());
        assert!(barotropy(&p, &h, 0.0, 3000.0, 95.0).is_err());
    }
}
