//! Everything a field user checks in a sounding, in one pass.

use super::barotropy::{barotropy, Barotropy};
use super::heights::{heights, Heights, DEFAULT_HEIGHT_TOLERANCE_M};
use super::lid::{lid, Lid, LidChoice};
use super::profile::Profile;
use super::ridge_flow::{ridge_flow, RidgeCheck, RidgeFlow};
use super::stability::{bulk_n, stability, tropopauses, Stability, Tropopauses};
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

/// The sounding summary. Each part that could not be worked out holds the reason.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Summary {
    /// Heights and the height check.
    pub heights: Heights,
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
pub fn summarise(profile: &Profile, opts: &SummaryOptions) -> Result<Summary> {
    let h = heights(profile, opts.elevation_m, opts.height_tolerance_m)?;
    let tp = tropopauses(profile, &h);
    let st = stability(profile, &h, tp.first.map(|t| t.height_m));
    let lid = lid(opts.lid, &tp, &st);
    let ground = h.best_m.iter().find_map(|z| *z);
    let bulk = match (ground, &lid) {
        (Some(g), Ok(l)) => bulk_n(profile, &h, g, l.height_m),
        (None, _) => Err(Error::NoData {
            what: "heights in the sounding",
        }),
        (_, Err(e)) => Err(*e),
    };
    let rf = opts.ridge.map(|r| ridge_flow(profile, &h, &r));
    let lat = opts.lat_deg.or(profile.station.lat_deg);
    let layer = match opts.layer_m {
        Some(l) => Some(l),
        None => h.span(profile, |l| l.wind.map(|_| 0.0)).map(|(b, t)| {
            let top = lid.as_ref().map_or(t, |l| l.height_m.min(t));
            (b, top)
        }),
    };
    let baro = match (lat, layer) {
        (Some(lat), Some((b, t))) => barotropy(profile, &h, b, t, lat),
        (None, _) => Err(Error::NoData {
            what: "the station latitude",
        }),
        (_, None) => Err(Error::NoData {
            what: "winds with heights in the sounding",
        }),
    };
    Ok(Summary {
        heights: h,
        stability: st,
        tropopauses: tp,
        lid,
        bulk_n_per_s: bulk,
        ridge_flow: rf,
        barotropy: baro,
    })
}
