//! Will the air go over the ridge? The bulk Froude number from the sounding.

use super::heights::Heights;
use super::profile::{Profile, Wind};
use super::stability::bulk_n;
use crate::error::{finite, in_range, Error, Result};

/// Froude number at and above which the flow goes over the ridge (common practice).
pub const FROUDE_OVER: f64 = 1.0;
/// Froude number below which the low-level flow is blocked (common practice for a
/// two-dimensional ridge; our choice of the round figure).
pub const FROUDE_BLOCKED: f64 = 0.5;
/// Least part of the ridge height the sounding must cover for a verdict (our choice).
pub const MIN_COVER: f64 = 0.25;

/// The ridge as the Froude check sees it.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RidgeCheck {
    /// Ground height upstream of the ridge, m.
    pub ground_m: f64,
    /// Crest height, m.
    pub crest_m: f64,
    /// Direction of the ridge axis, degrees from north (0–180); `None` uses the whole
    /// wind speed instead of the cross-ridge part.
    pub axis_deg: Option<f64>,
}

/// The plain verdict.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum FlowVerdict {
    /// Fr ≥ 1: the flow goes over the ridge.
    Over,
    /// 0.5 ≤ Fr < 1: the lowest air is deflected; the upper part crosses.
    PartlyBlocked,
    /// Fr < 0.5: the low-level flow is blocked or goes around.
    Blocked,
}

impl FlowVerdict {
    /// The verdict for Froude number `fr`.
    pub fn of(fr: f64) -> Self {
        if fr >= FROUDE_OVER {
            FlowVerdict::Over
        } else if fr >= FROUDE_BLOCKED {
            FlowVerdict::PartlyBlocked
        } else {
            FlowVerdict::Blocked
        }
    }

    /// The verdict in words.
    pub fn statement(self) -> &'static str {
        match self {
            FlowVerdict::Over => "flow over the ridge",
            FlowVerdict::PartlyBlocked => {
                "partly blocked: low-level air deflected, upper air crosses"
            }
            FlowVerdict::Blocked => {
                "blocked: low-level air goes around, column argument only above"
            }
        }
    }
}

/// The Froude check.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RidgeFlow {
    /// Base of the layer the sounding covers, m (the upstream ground or the lowest data).
    pub layer_base_m: f64,
    /// Top of that layer, m (the crest or the highest data).
    pub layer_top_m: f64,
    /// Height-mean wind of the layer.
    pub mean_wind: Wind,
    /// Part of the mean wind across the ridge, m/s (the whole speed without an axis).
    pub cross_ridge_ms: f64,
    /// Bulk buoyancy frequency of the layer, s⁻¹.
    pub n_per_s: f64,
    /// Ridge height above the upstream ground, m.
    pub ridge_height_m: f64,
    /// Fr = U/(N h) (FIELD-NOTES §4).
    pub froude: f64,
    /// The verdict.
    pub verdict: FlowVerdict,
    /// Depth of the blocked layer above the upstream ground, h (1 − Fr), m, for Fr < 1
    /// (the dividing-streamline estimate, Sheppard 1956, common practice).
    pub blocked_depth_m: Option<f64>,
    /// Mountain-wave vertical wavelength 2πU/N, m (FIELD-NOTES §6).
    pub vertical_wavelength_m: f64,
}

/// Height-mean wind between `z1` and `z2` (trapezoid in height over the wind levels,
/// with the ends interpolated), as (u, v) m/s.
pub fn mean_wind<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    z1: f64,
    z2: f64,
) -> Option<(f64, f64)> {
    let has = |l: &super::Level| l.wind.is_some();
    let at = |z: f64| -> Option<(f64, f64, f64)> {
        let u = heights.interpolate(profile, z, has, |l| l.wind.map(|w| w.components().0))?;
        let v = heights.interpolate(profile, z, has, |l| l.wind.map(|w| w.components().1))?;
        Some((z, u, v))
    };
    let mut prev = at(z1)?;
    let end = at(z2)?;
    let (mut su, mut sv) = (0.0, 0.0);
    // The wind levels inside, each turned into components once.
    let levels = profile.levels();
    let inner = heights
        .indexed(profile, has)
        .filter(|&(_, z)| z > z1 && z < z2)
        .filter_map(|(i, z)| {
            let (u, v) = levels[i].wind?.components();
            Some((z, u, v))
        });
    for cur in inner.chain(core::iter::once(end)) {
        let dz = cur.0 - prev.0;
        su += 0.5 * (cur.1 + prev.1) * dz;
        sv += 0.5 * (cur.2 + prev.2) * dz;
        prev = cur;
    }
    let depth = z2 - z1;
    (depth > 0.0).then(|| (su / depth, sv / depth))
}

/// Bulk Froude check of the flow towards a ridge.
pub fn ridge_flow<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    ridge: &RidgeCheck,
) -> Result<RidgeFlow> {
    finite("upstream ground height", ridge.ground_m)?;
    finite("crest height", ridge.crest_m)?;
    let h = ridge.crest_m - ridge.ground_m;
    if h <= 0.0 {
        return Err(Error::DepthNotPositive {
            what: "ridge height above the upstream ground",
            depth_m: h,
        });
    }
    if let Some(a) = ridge.axis_deg {
        in_range("ridge axis", a, 0.0, 360.0)?;
    }
    let (wb, wt) = heights
        .span(profile, |l| l.wind.map(|_| 0.0))
        .ok_or(Error::NoData {
            what: "winds with heights in the sounding",
        })?;
    let base = ridge.ground_m.max(wb);
    let top = ridge.crest_m.min(wt);
    if top - base < MIN_COVER * h {
        return Err(Error::OutsideProfile {
            what: "ridge crest",
            height_m: ridge.crest_m,
            bottom_m: wb,
            top_m: wt,
        });
    }
    let (u, v) = mean_wind(profile, heights, base, top).ok_or(Error::NoData {
        what: "winds below the crest",
    })?;
    let n = bulk_n(profile, heights, base, top)?;
    let mean = Wind::from_components(u, v);
    let cross = match ridge.axis_deg {
        Some(a) => {
            // Unit normal to the axis; the sign does not matter for Fr.
            let r = a.to_radians();
            libm::fabs(u * libm::cos(r) - v * libm::sin(r))
        }
        None => mean.speed_ms,
    };
    let froude = cross / (n * h);
    Ok(RidgeFlow {
        layer_base_m: base,
        layer_top_m: top,
        mean_wind: mean,
        cross_ridge_ms: cross,
        n_per_s: n,
        ridge_height_m: h,
        froude,
        verdict: FlowVerdict::of(froude),
        blocked_depth_m: (froude < 1.0).then_some(h * (1.0 - froude)),
        vertical_wavelength_m: 2.0 * core::f64::consts::PI * cross / n,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sounding::heights::heights;
    use crate::sounding::testing::constant_n;
    use approx::assert_relative_eq;

    fn westerly(speed: f64) -> impl Fn(f64) -> Option<Wind> {
        move |_| {
            Some(Wind {
                dir_from_deg: 270.0,
                speed_ms: speed,
            })
        }
    }

    #[test]
    fn froude_of_a_uniform_flow() {
        // Fr = U/(N h) (FIELD-NOTES §4), computed: 12 / (0.01 · 1000) = 1.2.
        let p = constant_n(0.01, 5000.0, 250.0, westerly(12.0));
        let h = heights(&p, None, 20.0).unwrap();
        let ridge = RidgeCheck {
            ground_m: 0.0,
            crest_m: 1000.0,
            axis_deg: Some(0.0),
        };
        let r = ridge_flow(&p, &h, &ridge).unwrap();
        assert_relative_eq!(r.n_per_s, 0.01, max_relative = 1e-9);
        assert_relative_eq!(r.cross_ridge_ms, 12.0, max_relative = 1e-9);
        assert_relative_eq!(r.froude, 1.2, max_relative = 1e-9);
        assert_eq!(r.verdict, FlowVerdict::Over);
        assert!(r.blocked_depth_m.is_none());
        // λz = 2πU/N (FIELD-NOTES §6) = 2π · 1200 = 7539.8 m.
        assert_relative_eq!(r.vertical_wavelength_m, 7539.822, max_relative = 1e-6);
        // A ridge at 45° to the wind sees cos 45° of it.
        let r45 = ridge_flow(
            &p,
            &h,
            &RidgeCheck {
                axis_deg: Some(45.0),
                ..ridge
            },
        )
        .unwrap();
        // Fr = 12 cos 45° / 10 = 0.85: partly blocked.
        assert_relative_eq!(
            r45.cross_ridge_ms,
            12.0 * 0.5f64.sqrt(),
            max_relative = 1e-9
        );
        assert_eq!(r45.verdict, FlowVerdict::PartlyBlocked);
    }

    #[test]
    fn weak_wind_is_blocked_with_a_dividing_streamline() {
        // Fr = 3 / (0.01 · 1500) = 0.2; blocked depth h(1 − Fr) = 1200 m (Sheppard 1956).
        let p = constant_n(0.01, 5000.0, 250.0, westerly(3.0));
        let h = heights(&p, None, 20.0).unwrap();
        let r = ridge_flow(
            &p,
            &h,
            &RidgeCheck {
                ground_m: 0.0,
                crest_m: 1500.0,
                axis_deg: None,
            },
        )
        .unwrap();
        assert_eq!(r.verdict, FlowVerdict::Blocked);
        assert_relative_eq!(r.blocked_depth_m.unwrap(), 1200.0, max_relative = 1e-9);
    }

    #[test]
    fn bad_ridges_are_errors() {
        let p = constant_n(0.01, 3000.0, 250.0, westerly(10.0));
        let h = heights(&p, None, 20.0).unwrap();
        let low = RidgeCheck {
            ground_m: 1000.0,
            crest_m: 900.0,
            axis_deg: None,
        };
        assert!(matches!(
            ridge_flow(&p, &h, &low),
            Err(Error::DepthNotPositive { .. })
        ));
        let above = RidgeCheck {
            ground_m: 3200.0,
            crest_m: 6000.0,
            axis_deg: None,
        };
        assert!(matches!(
            ridge_flow(&p, &h, &above),
            Err(Error::OutsideProfile { .. })
        ));
        let calm = constant_n(0.01, 3000.0, 250.0, |_| None);
        let hc = heights(&calm, None, 20.0).unwrap();
        let ok = RidgeCheck {
            ground_m: 0.0,
            crest_m: 1000.0,
            axis_deg: None,
        };
        assert!(matches!(
            ridge_flow(&calm, &hc, &ok),
            Err(Error::NoData { .. })
        ));
    }
}
