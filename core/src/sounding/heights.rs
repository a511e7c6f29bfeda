//! Heights from the hypsometric equation, and the radiosonde's own consistency check.

use heapless::Vec;

use super::profile::{Level, Profile, MAX_LEVELS};
use super::thermo::level_virtual_temperature_k;
use crate::constants::{G0, R_DRY};
use crate::error::{Error, Result};

/// Default tolerance of the height check, m: a reported height that differs from the
/// hypsometric one by more than this is flagged (common practice for radiosonde
/// consistency checks; our default).
pub const DEFAULT_HEIGHT_TOLERANCE_M: f64 = 20.0;

/// Where the integration started.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum HeightStart {
    /// At the lowest level, whose height the profile gives.
    ReportedSurface,
    /// At the lowest level, placed at the station elevation.
    StationElevation,
    /// At the lowest level that has a reported height (index from the ground).
    LowestReported {
        /// Index of that level.
        index: u16,
    },
}

/// Hypsometric heights of every level of a profile of up to `N` levels, and their
/// comparison with the reported ones. A missing height is stored as NaN and read back as
/// `None` (half the memory of `Option<f64>`, which matters on the handheld).
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct Heights<const N: usize = MAX_LEVELS> {
    /// Height integrated from the start level, gpm; NaN where the temperature needed to
    /// reach the level is missing.
    computed: Vec<f64, N>,
    /// Best height of each level: the reported one where there is one, else the
    /// computed; NaN where neither.
    best: Vec<f64, N>,
    /// Where the integration started.
    pub start: HeightStart,
    /// Tolerance of the check, m.
    pub tolerance_m: f64,
    /// Number of levels whose reported height is off by more than the tolerance.
    pub flagged: u16,
    /// The level with the largest |reported − computed|, and that difference, m.
    pub worst: Option<(u16, f64)>,
}

fn stored(z: Option<f64>) -> f64 {
    z.unwrap_or(f64::NAN)
}

fn read(z: f64) -> Option<f64> {
    (!z.is_nan()).then_some(z)
}

impl<const N: usize> Heights<N> {
    /// Heights of no levels (what [`heights_into`] starts from).
    pub fn empty() -> Self {
        Heights {
            computed: Vec::new(),
            best: Vec::new(),
            start: HeightStart::ReportedSurface,
            tolerance_m: DEFAULT_HEIGHT_TOLERANCE_M,
            flagged: 0,
            worst: None,
        }
    }

    /// Height of level `i` integrated from the start level, gpm (`None` where the
    /// temperature needed to reach it is missing, or past the top).
    pub fn computed_m(&self, i: usize) -> Option<f64> {
        read(*self.computed.get(i)?)
    }

    /// Best height of level `i`, gpm: the reported one where there is one, else the
    /// computed one.
    pub fn best_m(&self, i: usize) -> Option<f64> {
        read(*self.best.get(i)?)
    }

    /// The computed height of every level, ground up.
    pub fn computed_all(&self) -> impl Iterator<Item = Option<f64>> + '_ {
        self.computed.iter().map(|z| read(*z))
    }

    /// The best height of every level, ground up.
    pub fn best_all(&self) -> impl Iterator<Item = Option<f64>> + '_ {
        self.best.iter().map(|z| read(*z))
    }

    /// Reported minus computed height of level `i`, m, where both exist.
    pub fn difference_m(&self, profile: &Profile<N>, i: usize) -> Option<f64> {
        let reported = profile.levels().get(i)?.height_m?;
        let computed = self.computed_m(i)?;
        Some(reported - computed)
    }

    /// Levels that have a best height and a value of `get`, as (height m, value), ground up.
    pub fn samples<'a>(
        &'a self,
        profile: &'a Profile<N>,
        get: impl Fn(&Level) -> Option<f64> + 'a,
    ) -> impl Iterator<Item = (f64, f64)> + 'a {
        profile
            .levels()
            .iter()
            .zip(self.best_all())
            .filter_map(move |(l, z)| Some((z?, get(l)?)))
    }

    /// Lowest and highest heights, m, at which `get` has a value.
    pub fn span(
        &self,
        profile: &Profile<N>,
        get: impl Fn(&Level) -> Option<f64>,
    ) -> Option<(f64, f64)> {
        let mut it = self.samples(profile, get);
        let first = it.next()?.0;
        let last = it.last().map_or(first, |s| s.0);
        Some((first, last))
    }

    /// The levels that have a best height and pass `has`, as (index, height m), ground up.
    pub fn indexed<'a>(
        &'a self,
        profile: &'a Profile<N>,
        has: impl Fn(&Level) -> bool + 'a,
    ) -> impl Iterator<Item = (usize, f64)> + 'a {
        profile
            .levels()
            .iter()
            .zip(self.best_all())
            .enumerate()
            .filter_map(move |(i, (l, z))| z.filter(|_| has(l)).map(|z| (i, z)))
    }

    /// The value of `get` at height `z_m`, linear in height between the two levels
    /// around it that have a value (`None` outside them).
    pub fn value_at(
        &self,
        profile: &Profile<N>,
        z_m: f64,
        get: impl Fn(&Level) -> Option<f64>,
    ) -> Option<f64> {
        self.interpolate(profile, z_m, |l| get(l).is_some(), &get)
    }

    /// As [`Heights::value_at`] over the levels that pass `has` (which must be exactly
    /// those where `get` has a value), calling `get` on the one or two levels used only:
    /// on the handheld `get` may be a software sine or power, and `value_at` calls it on
    /// every level below `z_m`.
    pub fn interpolate(
        &self,
        profile: &Profile<N>,
        z_m: f64,
        has: impl Fn(&Level) -> bool,
        get: impl Fn(&Level) -> Option<f64>,
    ) -> Option<f64> {
        let levels = profile.levels();
        let mut below: Option<(usize, f64)> = None;
        for (i, z) in self.indexed(profile, has) {
            if z == z_m {
                return get(&levels[i]);
            }
            if z > z_m {
                let (ib, zb) = below?;
                let (vb, v) = (get(&levels[ib])?, get(&levels[i])?);
                return Some(vb + (v - vb) * (z_m - zb) / (z - zb));
            }
            below = Some((i, z));
        }
        None
    }

    /// Whether level `i` fails the check.
    pub fn is_flagged(&self, profile: &Profile<N>, i: usize) -> bool {
        self.difference_m(profile, i)
            .is_some_and(|d| libm::fabs(d) > self.tolerance_m)
    }
}

/// Virtual temperature of level `i`, interpolated linearly in ln p between the nearest
/// levels below and above that have one where the level lacks it; `None` outside them.
/// Worked out level by level rather than kept in a table: a table is a kilobyte or two of
/// stack on the handheld, and most levels have their own temperature.
fn virtual_temperature_at(levels: &[Level], i: usize) -> Option<f64> {
    let own = |k: usize| level_virtual_temperature_k(&levels[k]);
    if let Some(t) = own(i) {
        return Some(t);
    }
    let (b, tb) = (0..i).rev().find_map(|k| Some((k, own(k)?)))?;
    let (a, ta) = (i + 1..levels.len()).find_map(|k| Some((k, own(k)?)))?;
    let (lb, la, li) = (
        libm::log(levels[b].pressure_pa),
        libm::log(levels[a].pressure_pa),
        libm::log(levels[i].pressure_pa),
    );
    Some(tb + (ta - tb) * (li - lb) / (la - lb))
}

/// Thickness between two levels, gpm, by the hypsometric equation with the mean virtual
/// temperature of the layer: Z2 − Z1 = (Rd/g0) T̄v ln(p1/p2) (FIELD-NOTES §6; exact where
/// Tv is linear in ln p).
pub fn thickness_m(p1_pa: f64, tv1_k: f64, p2_pa: f64, tv2_k: f64) -> f64 {
    R_DRY / G0 * 0.5 * (tv1_k + tv2_k) * libm::log(p1_pa / p2_pa)
}

/// Integrate the hypsometric equation through `profile` and compare with the reported
/// heights.
///
/// The integration starts at the lowest level: at its reported height, or else at
/// `elevation_m` (the station elevation; the profile's own if `None`), or else at the
/// lowest level with a reported height, from which it runs both ways.
pub fn heights<const N: usize>(
    profile: &Profile<N>,
    elevation_m: Option<f64>,
    tolerance_m: f64,
) -> Result<Heights<N>> {
    let mut out = Heights::empty();
    heights_into(profile, elevation_m, tolerance_m, &mut out)?;
    Ok(out)
}

/// [`heights`] written into `out`, which is overwritten whole (on an error it holds no
/// levels). For callers that keep the heights in place rather than move them.
pub fn heights_into<const N: usize>(
    profile: &Profile<N>,
    elevation_m: Option<f64>,
    tolerance_m: f64,
    out: &mut Heights<N>,
) -> Result<()> {
    out.computed.clear();
    out.best.clear();
    out.tolerance_m = tolerance_m;
    out.flagged = 0;
    out.worst = None;
    let levels = profile.levels();
    if levels.is_empty() {
        return Err(Error::NoData {
            what: "sounding levels",
        });
    }
    crate::error::in_range("height tolerance", tolerance_m, 0.0, 10_000.0)?;
    let elevation = elevation_m.or(profile.station.elevation_m);
    let (start_index, start_height, start) = if let Some(z) = levels[0].height_m {
        (0, z, HeightStart::ReportedSurface)
    } else if let Some(z) = elevation {
        crate::error::in_range("station elevation", z, -500.0, 9000.0)?;
        (0, z, HeightStart::StationElevation)
    } else if let Some((i, z)) = levels
        .iter()
        .enumerate()
        .find_map(|(i, l)| l.height_m.map(|z| (i, z)))
    {
        (i, z, HeightStart::LowestReported { index: i as u16 })
    } else {
        return Err(Error::NoData {
            what: "a height or a station elevation to start the height integration",
        });
    };
    out.start = start;

    // Both tables have exactly as many entries as the profile has levels (at most N).
    for _ in levels {
        let _ = out.computed.push(f64::NAN);
    }
    out.computed[start_index] = start_height;
    let mut tv_below = virtual_temperature_at(levels, start_index);
    for i in start_index + 1..levels.len() {
        let tv = virtual_temperature_at(levels, i);
        out.computed[i] = match (read(out.computed[i - 1]), tv_below, tv) {
            (Some(z), Some(t1), Some(t2)) => {
                z + thickness_m(levels[i - 1].pressure_pa, t1, levels[i].pressure_pa, t2)
            }
            _ => f64::NAN,
        };
        tv_below = tv;
    }
    let mut tv_above = virtual_temperature_at(levels, start_index);
    for i in (0..start_index).rev() {
        let tv = virtual_temperature_at(levels, i);
        out.computed[i] = match (read(out.computed[i + 1]), tv_above, tv) {
            (Some(z), Some(t1), Some(t2)) => {
                z - thickness_m(levels[i].pressure_pa, t2, levels[i + 1].pressure_pa, t1)
            }
            _ => f64::NAN,
        };
        tv_above = tv;
    }
    for (l, c) in levels.iter().zip(out.computed.iter()) {
        let _ = out.best.push(stored(l.height_m.or(read(*c))));
    }
    for i in 0..levels.len() {
        if let Some(d) = out.difference_m(profile, i) {
            if libm::fabs(d) > tolerance_m {
                out.flagged = out.flagged.saturating_add(1);
            }
            if out.worst.is_none_or(|(_, w)| libm::fabs(d) > libm::fabs(w)) {
                out.worst = Some((i as u16, d));
            }
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sounding::profile::StationInfo;
    use approx::assert_relative_eq;

    fn isothermal(t_k: f64) -> Profile {
        let mut p = Profile::new(StationInfo::default());
        for hpa in [1000.0, 850.0, 700.0, 500.0] {
            p.push(Level {
                temperature_k: Some(t_k),
                ..Level::at_pressure(hpa * 100.0)
            })
            .unwrap();
        }
        p
    }

    #[test]
    fn isothermal_thickness_1000_to_500() {
        // FIELD-NOTES §6 (computed): 273.15 K isothermal, 1000 to 500 hPa: 5542 m.
        let h = heights(&isothermal(273.15), Some(0.0), 20.0).unwrap();
        let z500 = h.computed_m(3).unwrap();
        assert!((z500 - 5542.0).abs() < 1.0, "{z500}");
        assert_eq!(h.start, HeightStart::StationElevation);
        assert_eq!(h.flagged, 0);
    }

    #[test]
    fn a_wrong_reported_height_is_flagged() {
        let mut p = isothermal(273.15);
        let mut q = Profile::new(StationInfo::default());
        for (i, l) in p.levels().iter().enumerate() {
            let mut l = *l;
            if i == 0 {
                l.height_m = Some(0.0);
            }
            if i == 3 {
                // 60 m too high: a typical garbled or mis-coded height.
                l.height_m = Some(5542.0 + 60.0);
            }
            q.push(l).unwrap();
        }
        p = q;
        let h = heights(&p, None, DEFAULT_HEIGHT_TOLERANCE_M).unwrap();
        assert_eq!(h.start, HeightStart::ReportedSurface);
        assert_eq!(h.flagged, 1);
        let (i, d) = h.worst.unwrap();
        assert_eq!(i, 3);
        assert_relative_eq!(d, 60.0, epsilon = 1.0);
        assert!(h.is_flagged(&p, 3) && !h.is_flagged(&p, 2));
        assert_eq!(h.best_m(3), Some(5602.0));
    }

    #[test]
    fn integration_runs_down_from_the_lowest_reported_height() {
        let src = isothermal(250.0);
        let mut p = Profile::new(StationInfo::default());
        for (i, l) in src.levels().iter().enumerate() {
            let mut l = *l;
            if i == 2 {
                l.height_m = Some(3000.0);
            }
            p.push(l).unwrap();
        }
        let h = heights(&p, None, 20.0).unwrap();
        assert_eq!(h.start, HeightStart::LowestReported { index: 2 });
        let z0 = h.computed_m(0).unwrap();
        let expected = 3000.0 - R_DRY / G0 * 250.0 * libm::log(1000.0 / 700.0);
        assert_relative_eq!(z0, expected, epsilon = 1e-6);
    }

    #[test]
    fn interpolate_calls_get_on_the_bracketing_levels_only_and_agrees_with_value_at() {
        use core::cell::Cell;
        let mut p = isothermal(260.0);
        let mut q = Profile::new(StationInfo::default());
        for (i, l) in p.levels().iter().enumerate() {
            let mut l = *l;
            if i == 1 {
                l.temperature_k = None;
            }
            q.push(l).unwrap();
        }
        p = q;
        let h = heights(&p, Some(0.0), 20.0).unwrap();
        let calls = Cell::new(0);
        let get = |l: &Level| {
            calls.set(calls.get() + 1);
            l.temperature_k.map(|t| t + l.pressure_pa / 1000.0)
        };
        let has = |l: &Level| l.temperature_k.is_some();
        for z in [0.0, 700.0, 2500.0, 4000.0, 5000.0, 9000.0, -1.0] {
            calls.set(0);
            let a = h.interpolate(&p, z, has, get);
            assert!(calls.get() <= 2, "{} calls at {z}", calls.get());
            assert_eq!(a, h.value_at(&p, z, get), "at {z}");
        }
        assert!(h.interpolate(&p, 2500.0, has, get).is_some());
        assert_eq!(h.interpolate(&p, 9000.0, has, get), None);
    }

    #[test]
    fn no_start_is_an_error() {
        let p = isothermal(260.0);
        assert!(matches!(heights(&p, None, 20.0), Err(Error::NoData { .. })));
        assert!(heights(&Profile::default(), Some(0.0), 20.0).is_err());
    }
}
