//! Everything a field user checks in a sounding, in one pass.

use super::barotropy::{barotropy, Barotropy};
use super::heights::{heights, heights_into, Heights, DEFAULT_HEIGHT_TOLERANCE_M};
use super::lid::{lid, Lid, LidChoice};
use super::profile::{Profile, MAX_LEVELS};
use super::ridge_flow::{ridge_flow, RidgeCheck, RidgeFlow};
use super::stability::{bulk_n, stability_into, tropopauses, Stability, Tropopauses};
use crate::error::{Error, Result};

/// What the summary needs besides the profile.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct SummaryOptions {
    /// Station elevation, m, where the profile has no surface height (overrides the
    /// station information).
    pub elevation_m: Option<f64>,
    /// Tolerance of the height check, m.
    pub height_tolerance_m: f64,
    /// How to choose the lid.
    pub lid: LidChoice,
    /// The ridge for the Froude check, if any.
    pub ridge: Option<RidgeCheck>,
    /// Latitude, degrees, for the barotropy check (defaults to the station's).
    pub lat_deg: Option<f64>,
    /// Layer of the barotropy check (base, top), m; defaults to the lowest wind level up
    /// to the lid (or the highest wind level, if lower).
    pub layer_m: Option<(f64, f64)>,
}

impl Default for SummaryOptions {
    fn default() -> Self {
        SummaryOptions {
            elevation_m: None,
            height_tolerance_m: DEFAULT_HEIGHT_TOLERANCE_M,
            lid: LidChoice::Tropopause,
            ridge: None,
            lat_deg: None,
            layer_m: None,
        }
    }
}

/// The sounding summary of a profile of up to `N` levels. Each part that could not be
/// worked out holds the reason.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Summary<const N: usize = MAX_LEVELS> {
    /// Heights and the height check.
    pub heights: Heights<N>,
    /// Inversions and stable layers below the first tropopause.
    pub stability: Stability,
    /// Tropopauses.
    pub tropopauses: Tropopauses,
    /// The column lid.
    pub lid: Result<Lid>,
    /// Bulk N from the lowest level to the lid, s⁻¹.
    pub bulk_n_per_s: Result<f64>,
    /// The Froude check, when a ridge was given.
    pub ridge_flow: Option<Result<RidgeFlow>>,
    /// The barotropy check.
    pub barotropy: Result<Barotropy>,
}

/// Analyse `profile`.
pub fn summarise<const N: usize>(
    profile: &Profile<N>,
    opts: &SummaryOptions,
) -> Result<Summary<N>> {
    let h = heights(profile, opts.elevation_m, opts.height_tolerance_m)?;
    Ok(summary_of(profile, opts, h))
}

/// [`summarise`] written into `out` (overwritten whole), for a caller that keeps the
/// summary in place: on the handheld a summary and its profile are kilobytes, and each
/// move through a `Result` would be another copy on the stack. On an error `out` holds
/// the reason in every part.
pub fn summarise_into<const N: usize>(
    profile: &Profile<N>,
    opts: &SummaryOptions,
    out: &mut Summary<N>,
) -> Result<()> {
    let done = heights_into(
        profile,
        opts.elevation_m,
        opts.height_tolerance_m,
        &mut out.heights,
    );
    if let Err(e) = done {
        out.stability = Stability::default();
        out.tropopauses = Tropopauses::default();
        out.lid = Err(e);
        out.bulk_n_per_s = Err(e);
        out.ridge_flow = opts.ridge.map(|_| Err(e));
        out.barotropy = Err(e);
        return Err(e);
    }
    fill(profile, opts, out);
    Ok(())
}

fn summary_of<const N: usize>(
    profile: &Profile<N>,
    opts: &SummaryOptions,
    h: Heights<N>,
) -> Summary<N> {
    let mut s = Summary::with_heights(h);
    fill(profile, opts, &mut s);
    s
}

impl<const N: usize> Summary<N> {
    /// A summary of no sounding yet (every part says so), to be filled in place by
    /// [`summarise_into`].
    pub fn empty() -> Self {
        Summary::with_heights(Heights::empty())
    }

    fn with_heights(heights: Heights<N>) -> Self {
        let none = Error::NoData { what: "a sounding" };
        Summary {
            heights,
            stability: Stability::default(),
            tropopauses: Tropopauses::default(),
            lid: Err(none),
            bulk_n_per_s: Err(none),
            ridge_flow: None,
            barotropy: Err(none),
        }
    }
}

/// Every part after the heights, from `s.heights`.
fn fill<const N: usize>(profile: &Profile<N>, opts: &SummaryOptions, s: &mut Summary<N>) {
    let h = &s.heights;
    s.tropopauses = tropopauses(profile, h);
    stability_into(
        profile,
        h,
        s.tropopauses.first.map(|t| t.height_m),
        &mut s.stability,
    );
    s.lid = lid(opts.lid, &s.tropopauses, &s.stability);
    let ground = h.best_all().find_map(|z| z);
    s.bulk_n_per_s = match (ground, &s.lid) {
        (Some(g), Ok(l)) => bulk_n(profile, h, g, l.height_m),
        (None, _) => Err(Error::NoData {
            what: "heights in the sounding",
        }),
        (_, Err(e)) => Err(*e),
    };
    s.ridge_flow = opts.ridge.map(|r| ridge_flow(profile, h, &r));
    let lat = opts.lat_deg.or(profile.station.lat_deg);
    let layer = match opts.layer_m {
        Some(l) => Some(l),
        None => h.span(profile, |l| l.wind.map(|_| 0.0)).map(|(b, t)| {
            let top = s.lid.as_ref().map_or(t, |l| l.height_m.min(t));
            (b, top)
        }),
    };
    s.barotropy = match (lat, layer) {
        (Some(lat), Some((b, t))) => barotropy(profile, h, b, t, lat),
        (None, _) => Err(Error::NoData {
            what: "the station latitude",
        }),
        (_, None) => Err(Error::NoData {
            what: "winds with heights in the sounding",
        }),
    };
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sounding::testing::constant_n;
    use crate::sounding::{Level, StationInfo, Wind};

    fn west(_z: f64) -> Option<Wind> {
        Some(Wind {
            dir_from_deg: 270.0,
            speed_ms: 15.0,
        })
    }

    #[test]
    fn in_place_equals_moved_on_any_capacity() {
        let opts = SummaryOptions {
            lat_deg: Some(45.0),
            ..SummaryOptions::default()
        };
        let big = constant_n(0.012, 16_000.0, 500.0, west);
        let moved = summarise(&big, &opts).unwrap();
        let mut small: Profile<64> = Profile::empty(big.station.clone());
        for l in big.levels() {
            small.push(*l).unwrap();
        }
        let mut out = Summary::empty();
        summarise_into(&small, &opts, &mut out).unwrap();
        assert_eq!(out.tropopauses, moved.tropopauses);
        assert_eq!(out.stability, moved.stability);
        assert_eq!(out.lid, moved.lid);
        assert_eq!(out.bulk_n_per_s, moved.bulk_n_per_s);
        assert_eq!(out.barotropy, moved.barotropy);
        assert!(big.levels().len() > 20);
        for i in 0..big.levels().len() {
            assert_eq!(out.heights.best_m(i), moved.heights.best_m(i));
            assert_eq!(out.heights.computed_m(i), moved.heights.computed_m(i));
        }
        // Filling the same summary again from another sounding leaves nothing behind.
        let mut short: Profile<64> = Profile::empty(StationInfo::default());
        for l in big.levels().iter().take(3) {
            short.push(*l).unwrap();
        }
        summarise_into(&short, &opts, &mut out).unwrap();
        assert_eq!(out.heights.best_m(3), None);
        assert_eq!(out.heights.best_all().count(), 3);
    }

    #[test]
    fn an_error_in_place_says_so_in_every_part() {
        let mut out: Summary<8> = Summary::empty();
        let empty: Profile<8> = Profile::empty(StationInfo::default());
        let e = summarise_into(&empty, &SummaryOptions::default(), &mut out).unwrap_err();
        assert!(matches!(e, Error::NoData { .. }));
        assert_eq!(out.lid, Err(e));
        assert_eq!(out.barotropy, Err(e));
        assert_eq!(out.heights.best_all().count(), 0);
    }

    #[test]
    fn a_small_profile_refuses_a_level_past_its_capacity() {
        let mut p: Profile<2> = Profile::empty(StationInfo::default());
        p.push(Level::at_pressure(100_000.0)).unwrap();
        p.push(Level::at_pressure(90_000.0)).unwrap();
        assert_eq!(
            p.push(Level::at_pressure(80_000.0)),
            Err(Error::CapacityExceeded {
                what: "sounding levels",
                capacity: 2
            })
        );
        assert_eq!(p.capacity(), 2);
    }
}
