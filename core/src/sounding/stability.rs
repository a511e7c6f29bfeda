//! Static stability: lapse rates, inversions and stable layers, N², bulk N, and the
//! tropopause by the WMO lapse-rate definition.

use heapless::Vec;

use super::heights::Heights;
use super::profile::{Level, Profile};
use super::thermo::potential_temperature;
use crate::constants::G0;
use crate::error::{Error, Result};

/// N² at and above which a layer counts as stable, s⁻² (our choice: about a 3 K/km lapse
/// rate at 260 K, half-way between the standard atmosphere's 6.5 K/km, N² ≈ 1.2e-4, and an
/// isothermal layer, N² ≈ 3.7e-4; FIELD-NOTES §6 formula).
pub const STABLE_N2: f64 = 2.5e-4;

/// Most inversions and stable layers listed; more are counted, not listed.
pub const MAX_LAYERS: usize = 16;

/// Lapse rate of the WMO (1957) tropopause definition, K/km.
pub const TROPOPAUSE_LAPSE_K_PER_KM: f64 = 2.0;
/// Depth over which the tropopause lapse rate must hold, m (WMO 1957).
pub const TROPOPAUSE_DEPTH_M: f64 = 2000.0;
/// Lapse rate that, held over 1 km above a first tropopause, opens the search for a
/// second one, K/km (WMO 1957).
pub const SECOND_TROPOPAUSE_LAPSE_K_PER_KM: f64 = 3.0;
/// Highest pressure at which a tropopause is looked for, Pa (500 hPa: keeps low-level
/// inversions out of the search; common practice, not part of the WMO text).
pub const TROPOPAUSE_MAX_PRESSURE_PA: f64 = 50_000.0;

/// One layer between two adjacent temperature levels.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LayerStability {
    /// Index of the lower level.
    pub base_index: u16,
    /// Index of the upper level.
    pub top_index: u16,
    /// Base height, m.
    pub base_m: f64,
    /// Top height, m.
    pub top_m: f64,
    /// Lapse rate −dT/dz, K/km (negative in an inversion).
    pub lapse_k_per_km: f64,
    /// N² = g0 Δ(ln θ)/Δz, s⁻² (FIELD-NOTES §6).
    pub n2: f64,
}

/// A run of adjacent layers sharing a property: an inversion or a stable layer.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LayerRun {
    /// Index of the base level.
    pub base_index: u16,
    /// Index of the top level.
    pub top_index: u16,
    /// Base height, m.
    pub base_m: f64,
    /// Top height, m.
    pub top_m: f64,
    /// Base pressure, Pa.
    pub base_pressure_pa: f64,
    /// Top pressure, Pa.
    pub top_pressure_pa: f64,
    /// Temperature change from base to top, K (positive in an inversion).
    pub temperature_change_k: f64,
    /// Potential-temperature change from base to top, K: the layer's strength.
    pub theta_change_k: f64,
    /// Bulk N² of the run, s⁻².
    pub n2: f64,
}

/// The stability of a whole sounding.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct Stability {
    /// Inversions (temperature rising with height), ground up.
    pub inversions: Vec<LayerRun, MAX_LAYERS>,
    /// Stable layers (N² ≥ [`STABLE_N2`]), ground up; inversions are among them.
    pub stable_layers: Vec<LayerRun, MAX_LAYERS>,
    /// Runs found beyond the lists' capacity.
    pub not_listed: u16,
}

/// Levels with both a best height and a temperature: (index, z m, T K).
fn temperature_heights<'a, const N: usize>(
    profile: &'a Profile<N>,
    heights: &'a Heights<N>,
) -> impl Iterator<Item = (usize, f64, f64)> + 'a {
    profile
        .levels()
        .iter()
        .zip(heights.best_all())
        .enumerate()
        .filter_map(|(i, (l, z))| Some((i, z?, l.temperature_k?)))
}

/// Levels with both a best height and a temperature: (index, z m, T K, θ K).
fn temperature_levels<'a, const N: usize>(
    profile: &'a Profile<N>,
    heights: &'a Heights<N>,
) -> impl Iterator<Item = (usize, f64, f64, f64)> + 'a {
    let levels = profile.levels();
    temperature_heights(profile, heights)
        .map(move |(i, z, t)| (i, z, t, potential_temperature(t, levels[i].pressure_pa)))
}

/// Every layer between adjacent temperature levels, ground up.
pub fn layers<'a, const N: usize>(
    profile: &'a Profile<N>,
    heights: &'a Heights<N>,
) -> impl Iterator<Item = LayerStability> + 'a {
    let mut below: Option<(usize, f64, f64, f64)> = None;
    temperature_levels(profile, heights).filter_map(move |(i, z, t, th)| {
        let prev = below.replace((i, z, t, th));
        let (ib, zb, tb, thb) = prev?;
        let dz = z - zb;
        (dz > 0.0).then(|| LayerStability {
            base_index: ib as u16,
            top_index: i as u16,
            base_m: zb,
            top_m: z,
            lapse_k_per_km: -(t - tb) / dz * 1000.0,
            n2: G0 * libm::log(th / thb) / dz,
        })
    })
}

/// Find the inversions and stable layers of a sounding, in the layers whose top is at or
/// below `below_m` (the tropopause, to leave the stratosphere out) or in all of it.
pub fn stability<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    below_m: Option<f64>,
) -> Stability {
    let mut out = Stability::default();
    stability_into(profile, heights, below_m, &mut out);
    out
}

/// [`stability`] written into `out` (overwritten whole), for a caller that keeps it in
/// place: the lists are kilobytes, and a returned value is another copy on the stack.
pub fn stability_into<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    below_m: Option<f64>,
    out: &mut Stability,
) {
    out.inversions.clear();
    out.stable_layers.clear();
    out.not_listed = 0;
    let levels = profile.levels();
    let mut inv: Option<(LayerStability, LayerStability)> = None;
    let mut stab: Option<(LayerStability, LayerStability)> = None;
    let close = |run: Option<(LayerStability, LayerStability)>,
                 list: &mut Vec<LayerRun, MAX_LAYERS>,
                 not_listed: &mut u16| {
        if let Some((first, last)) = run {
            let (b, t) = (
                &levels[first.base_index as usize],
                &levels[last.top_index as usize],
            );
            let (tb, tt) = (
                b.temperature_k.unwrap_or(0.0),
                t.temperature_k.unwrap_or(0.0),
            );
            let thb = potential_temperature(tb, b.pressure_pa);
            let tht = potential_temperature(tt, t.pressure_pa);
            let dz = last.top_m - first.base_m;
            let run = LayerRun {
                base_index: first.base_index,
                top_index: last.top_index,
                base_m: first.base_m,
                top_m: last.top_m,
                base_pressure_pa: b.pressure_pa,
                top_pressure_pa: t.pressure_pa,
                temperature_change_k: tt - tb,
                theta_change_k: tht - thb,
                n2: G0 * libm::log(tht / thb) / dz,
            };
            if list.push(run).is_err() {
                *not_listed = not_listed.saturating_add(1);
            }
        }
    };
    let limit = below_m.unwrap_or(f64::INFINITY);
    for layer in layers(profile, heights).take_while(|l| l.top_m <= limit) {
        if layer.lapse_k_per_km < 0.0 {
            inv = Some(inv.map_or((layer, layer), |(first, _)| (first, layer)));
        } else {
            close(inv.take(), &mut out.inversions, &mut out.not_listed);
        }
        if layer.n2 >= STABLE_N2 {
            stab = Some(stab.map_or((layer, layer), |(first, _)| (first, layer)));
        } else {
            close(stab.take(), &mut out.stable_layers, &mut out.not_listed);
        }
    }
    close(inv, &mut out.inversions, &mut out.not_listed);
    close(stab, &mut out.stable_layers, &mut out.not_listed);
}

/// Bulk buoyancy frequency N, s⁻¹, between heights `z1_m` < `z2_m`:
/// N² = g0 ln(θ2/θ1)/(z2 − z1), the layer form of (g0/θ) dθ/dz (FIELD-NOTES §6), exact
/// where θ grows exponentially with height as in an isothermal layer; θ at each end is
/// interpolated linearly in height.
pub fn bulk_n<const N: usize>(
    profile: &Profile<N>,
    heights: &Heights<N>,
    z1_m: f64,
    z2_m: f64,
) -> Result<f64> {
    crate::error::finite("lower height", z1_m)?;
    crate::error::finite("upper height", z2_m)?;
    if z2_m <= z1_m {
        return Err(Error::DepthNotPositive {
            what: "layer depth for N",
            depth_m: z2_m - z1_m,
        });
    }
    let theta = |l: &super::Level| {
        l.temperature_k
            .map(|t| potential_temperature(t, l.pressure_pa))
    };
    let has = |l: &super::Level| l.temperature_k.is_some();
    let (bottom, top) = heights
        .span(profile, |l| l.temperature_k)
        .ok_or(Error::NoData {
            what: "temperatures with heights",
        })?;
    let outside = |what, z| Error::OutsideProfile {
        what,
        height_m: z,
        bottom_m: bottom,
        top_m: top,
    };
    let th1 = heights
        .interpolate(profile, z1_m, has, theta)
        .ok_or(outside("lower height", z1_m))?;
    let th2 = heights
        .interpolate(profile, z2_m, has, theta)
        .ok_or(outside("upper height", z2_m))?;
    let n2 = G0 * libm::log(th2 / th1) / (z2_m - z1_m);
    if n2 > 0.0 {
        Ok(libm::sqrt(n2))
    } else {
        Err(Error::NotStable { n2 })
    }
}

/// A tropopause found in the sounding.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Tropopause {
    /// Index of its level.
    pub index: u16,
    /// Height, m.
    pub height_m: f64,
    /// Pressure, Pa.
    pub pressure_pa: f64,
    /// Temperature, K.
    pub temperature_k: f64,
}

/// First and (where there is one) second tropopause.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Tropopauses {
    /// The first (lowest) tropopause.
    pub first: Option<Tropopause>,
    /// A second tropopause above it.
    pub second: Option<Tropopause>,
}

/// Whether the WMO (1957) tropopause condition holds at temperature level `k` of `pts`:
/// the lapse rate to the next level is ≤ 2 K/km and the mean lapse rate from `k` to
/// every level within 2 km above (and to the point 2 km above, interpolated) is ≤ 2 K/km.
/// The levels with a best height and a temperature, as indices into the profile, their
/// height and temperature looked up when needed: a list of indices keeps the stack small
/// (24 bytes a level as values, 2 as indices; the handheld summarises on its stack).
struct Points<'a, const N: usize> {
    idx: Vec<u16, N>,
    levels: &'a [Level],
    heights: &'a Heights<N>,
}

impl<'a, const N: usize> Points<'a, N> {
    fn of(profile: &'a Profile<N>, heights: &'a Heights<N>) -> Self {
        let mut idx = Vec::new();
        for (i, _, _) in temperature_heights(profile, heights) {
            // Capacities match and N levels fit 16 bits, so neither can fail; a failure
            // would only shorten the search.
            if let Ok(i) = u16::try_from(i) {
                let _ = idx.push(i);
            }
        }
        Points {
            idx,
            levels: profile.levels(),
            heights,
        }
    }
    fn len(&self) -> usize {
        self.idx.len()
    }
    /// Point `k`: (level index, z m, T K).
    fn get(&self, k: usize) -> Option<(usize, f64, f64)> {
        let i = usize::from(*self.idx.get(k)?);
        Some((
            i,
            self.heights.best_m(i)?,
            self.levels.get(i)?.temperature_k?,
        ))
    }
}

fn tropopause_at<const N: usize>(pts: &Points<'_, N>, k: usize) -> bool {
    let (Some((_, z0, t0)), Some((_, z1, t1))) = (pts.get(k), pts.get(k + 1)) else {
        return false;
    };
    let lapse = |z: f64, t: f64| (t0 - t) / (z - z0) * 1000.0;
    if lapse(z1, t1) > TROPOPAUSE_LAPSE_K_PER_KM {
        return false;
    }
    let top = z0 + TROPOPAUSE_DEPTH_M;
    let mut prev = (z0, t0);
    for j in k + 1..pts.len() {
        let Some((_, z, t)) = pts.get(j) else {
            return false;
        };
        if z >= top {
            // The point exactly 2 km above, interpolated.
            let tt = prev.1 + (t - prev.1) * (top - prev.0) / (z - prev.0);
            return lapse(top, tt) <= TROPOPAUSE_LAPSE_K_PER_KM;
        }
        if lapse(z, t) > TROPOPAUSE_LAPSE_K_PER_KM {
            return false;
        }
        prev = (z, t);
    }
    // The sounding ends within 2 km: the condition cannot be confirmed.
    false
}

/// Tropopauses by the WMO (1957) lapse-rate definition (FIELD-NOTES §6): the lowest
/// level, at or above 500 hPa, at which the lapse rate falls to 2 K/km or less and the mean
/// lapse rate to every level within the next 2 km stays at or below 2 K/km. A second
/// tropopause is sought only above a layer, over the first, whose mean lapse rate over
/// 1 km exceeds 3 K/km.
pub fn tropopauses<const N: usize>(profile: &Profile<N>, heights: &Heights<N>) -> Tropopauses {
    let pts = Points::of(profile, heights);
    let levels = profile.levels();
    let found = |k: usize| {
        let (i, z, t) = pts.get(k)?;
        Some(Tropopause {
            index: i as u16,
            height_m: z,
            pressure_pa: levels.get(i)?.pressure_pa,
            temperature_k: t,
        })
    };
    let first_k = (0..pts.len())
        .filter(|&k| {
            pts.get(k)
                .and_then(|(i, _, _)| levels.get(i))
                .is_some_and(|l| l.pressure_pa <= TROPOPAUSE_MAX_PRESSURE_PA)
        })
        .find(|&k| tropopause_at(&pts, k));
    let Some(first_k) = first_k else {
        return Tropopauses {
            first: None,
            second: None,
        };
    };
    // Above the first: a level from which the mean lapse rate to every level within
    // 1 km above, and to the point 1 km above, exceeds 3 K/km. The second tropopause may
    // lie within or above that layer (WMO 1957).
    let steep_from = |k: usize| {
        let Some((_, z0, t0)) = pts.get(k) else {
            return false;
        };
        let lapse = |z: f64, t: f64| (t0 - t) / (z - z0) * 1000.0;
        let mut prev = (z0, t0);
        for j in k + 1..pts.len() {
            let Some((_, z, t)) = pts.get(j) else {
                return false;
            };
            if z >= z0 + 1000.0 {
                let tt = prev.1 + (t - prev.1) * (z0 + 1000.0 - prev.0) / (z - prev.0);
                return lapse(z0 + 1000.0, tt) > SECOND_TROPOPAUSE_LAPSE_K_PER_KM;
            }
            if lapse(z, t) <= SECOND_TROPOPAUSE_LAPSE_K_PER_KM {
                return false;
            }
            prev = (z, t);
        }
        false
    };
    let second = (first_k + 1..pts.len())
        .find(|&k| steep_from(k))
        .and_then(|k| (k + 1..pts.len()).find(|&j| tropopause_at(&pts, j)))
        .and_then(found);
    Tropopauses {
        first: found(first_k),
        second,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sounding::heights::heights;
    use crate::sounding::profile::{Level, StationInfo};
    use approx::assert_relative_eq;

    /// A profile with temperatures at given heights (pressures from an isothermal guess
    /// are fine here: the analysis uses the reported heights).
    fn by_height(points: &[(f64, f64)]) -> (Profile, Heights) {
        let mut p = Profile::new(StationInfo::default());
        for &(z, t_c) in points {
            let p_pa = 101_325.0 * libm::exp(-z / 8000.0);
            p.push(Level {
                height_m: Some(z),
                temperature_k: Some(t_c + 273.15),
                ..Level::at_pressure(p_pa)
            })
            .unwrap();
        }
        let h = heights(&p, None, 20.0).unwrap();
        (p, h)
    }

    #[test]
    fn inversion_and_stable_layer_found() {
        // Lapse 6.5 K/km to 3 km, +3 K inversion to 3.5 km, 6.5 K/km above (invented for
        // the test).
        let (p, h) = by_height(&[
            (0.0, 15.0),
            (1000.0, 8.5),
            (3000.0, -4.5),
            (3500.0, -1.5),
            (6000.0, -17.75),
        ]);
        let s = stability(&p, &h, None);
        assert_eq!(s.inversions.len(), 1);
        let inv = s.inversions[0];
        assert_eq!((inv.base_m, inv.top_m), (3000.0, 3500.0));
        assert_relative_eq!(inv.temperature_change_k, 3.0, epsilon = 1e-9);
        assert!(inv.theta_change_k > 3.0);
        assert_eq!(s.stable_layers.len(), 1);
        assert_eq!(s.stable_layers[0].top_m, 3500.0);
        let lapse: Vec<f64, 8> = layers(&p, &h).map(|l| l.lapse_k_per_km).collect();
        assert_relative_eq!(lapse[0], 6.5, epsilon = 1e-9);
        assert_relative_eq!(lapse[2], -6.0, epsilon = 1e-9);
    }

    #[test]
    fn bulk_n_of_an_isothermal_layer() {
        // N² = g²/(cp T) for an isothermal layer (from dθ/dz = θ g/(cp T), computed):
        // at 250 K, N ≈ 0.0196 /s. Built hydrostatically so θ(z) is exact.
        let t = 250.0;
        let mut p = Profile::new(StationInfo::default());
        let h_scale = crate::constants::R_DRY * t / G0;
        for k in 0..=10 {
            let z = 1000.0 * k as f64;
            p.push(Level {
                height_m: Some(z),
                temperature_k: Some(t),
                ..Level::at_pressure(100_000.0 * libm::exp(-z / h_scale))
            })
            .unwrap();
        }
        let h = heights(&p, None, 20.0).unwrap();
        let n = bulk_n(&p, &h, 1000.0, 9000.0).unwrap();
        let expected = G0 / libm::sqrt(crate::constants::CP_DRY * t);
        assert_relative_eq!(n, expected, max_relative = 1e-6);
        assert!(matches!(
            bulk_n(&p, &h, 1000.0, 20_000.0),
            Err(Error::OutsideProfile { .. })
        ));
        assert!(bulk_n(&p, &h, 3000.0, 3000.0).is_err());
    }

    #[test]
    fn unstable_layer_has_no_n() {
        // Superadiabatic: 12 K/km (invented for the test).
        let (p, h) = by_height(&[(0.0, 20.0), (1000.0, 8.0), (2000.0, -4.0)]);
        assert!(matches!(
            bulk_n(&p, &h, 0.0, 2000.0),
            Err(Error::NotStable { .. })
        ));
    }

    #[test]
    fn tropopause_of_a_standard_like_profile() {
        // US Standard Atmosphere 1976 shape: 6.5 K/km to 11 km, isothermal above
        // (FIELD-NOTES §6): tropopause at 11 000 m.
        let mut pts: Vec<(f64, f64), 32> = Vec::new();
        for k in 0..=16 {
            let z = 1000.0 * k as f64;
            let t = if z <= 11_000.0 {
                15.0 - 6.5e-3 * z
            } else {
                -56.5
            };
            pts.push((z, t)).unwrap();
        }
        let (p, h) = by_height(&pts);
        let tp = tropopauses(&p, &h);
        let first = tp.first.unwrap();
        assert_eq!(first.height_m, 11_000.0);
        assert_relative_eq!(first.temperature_k, 216.65, epsilon = 1e-9);
        assert!(tp.second.is_none());
    }

    #[test]
    fn a_second_tropopause_above_a_cold_layer() {
        // Invented for the test: first tropopause at 10 km, a 5 K/km layer from 12 to
        // 14 km, a second tropopause at 14 km.
        let mut pts: Vec<(f64, f64), 32> = Vec::new();
        for k in 0..=18 {
            let z = 1000.0 * k as f64;
            let t = if z <= 10_000.0 {
                15.0 - 6.5e-3 * z
            } else if z <= 12_000.0 {
                -50.0
            } else if z <= 14_000.0 {
                -50.0 - 5e-3 * (z - 12_000.0)
            } else {
                -60.0
            };
            pts.push((z, t)).unwrap();
        }
        let (p, h) = by_height(&pts);
        let tp = tropopauses(&p, &h);
        assert_eq!(tp.first.unwrap().height_m, 10_000.0);
        assert_eq!(tp.second.unwrap().height_m, 14_000.0);
    }

    #[test]
    fn a_low_inversion_is_not_a_tropopause() {
        // A strong inversion at 1 km (850 hPa or so) and no stratosphere: no tropopause.
        let (p, h) = by_height(&[
            (0.0, 5.0),
            (1000.0, 10.0),
            (3000.0, 0.0),
            (6000.0, -20.0),
            (9000.0, -40.0),
        ]);
        assert_eq!(tropopauses(&p, &h).first, None);
    }
}
