//! The Sounding task: the summary of the current sounding (for now the demo ascent from
//! Tessel Col, checked against the demo ridge), kept as the few core results the result
//! pages show. The profile and the core's full summary (with a height per level) live on
//! the stack only while the summary is made.

use leeward_core::demo;
use leeward_core::sounding::barotropy::Barotropy;
use leeward_core::sounding::lid::Lid;
use leeward_core::sounding::ridge_flow::{RidgeCheck, RidgeFlow};
use leeward_core::sounding::stability::Tropopauses;
use leeward_core::sounding::summary::{summarise, Summary, SummaryOptions};
use leeward_core::{Error, Result};

/// What the Sounding pages show, each part as the core returned it.
#[derive(Debug, Clone, PartialEq)]
pub struct SoundingView {
    /// Station identifier of the sounding.
    pub station: heapless::String<8>,
    /// Tropopauses.
    pub tropopauses: Tropopauses,
    /// The column lid, or why there is none.
    pub lid: Result<Lid>,
    /// Bulk N from the ground to the lid, s⁻¹.
    pub bulk_n_per_s: Result<f64>,
    /// The Froude check against the ridge.
    pub ridge_flow: Result<RidgeFlow>,
    /// The barotropy check.
    pub barotropy: Result<Barotropy>,
    /// Levels whose reported height disagrees with the hypsometric one.
    pub heights_flagged: u16,
    /// The worst disagreement, m.
    pub heights_worst_m: Option<f64>,
    /// Tolerance of the height check, m.
    pub height_tolerance_m: f64,
}

impl SoundingView {
    /// The parts of a core summary the pages show.
    pub fn of(station: &str, s: &Summary) -> Self {
        let mut id = heapless::String::new();
        let _ = id.push_str(station);
        SoundingView {
            station: id,
            tropopauses: s.tropopauses,
            lid: s.lid,
            bulk_n_per_s: s.bulk_n_per_s,
            ridge_flow: s.ridge_flow.unwrap_or(Err(Error::NoData {
                what: "a ridge for the Froude check",
            })),
            barotropy: s.barotropy.clone(),
            heights_flagged: s.heights.flagged,
            heights_worst_m: s.heights.worst.map(|(_, d)| d),
            height_tolerance_m: s.heights.tolerance_m,
        }
    }
}

/// The ridge the demo sounding is checked against: the Tessel Range from its upstream
/// plain, axis north–south.
pub fn demo_ridge() -> RidgeCheck {
    RidgeCheck {
        ground_m: demo::PLAIN_M,
        crest_m: demo::CREST_M,
        axis_deg: Some(0.0),
    }
}

/// The summary options the device uses: the core's defaults with the demo ridge.
pub fn demo_options() -> SummaryOptions {
    SummaryOptions {
        ridge: Some(demo_ridge()),
        ..SummaryOptions::default()
    }
}

/// Summarise the demo sounding.
pub fn demo_view() -> Result<SoundingView> {
    let profile = demo::sounding()?;
    let summary = summarise(&profile, &demo_options())?;
    Ok(SoundingView::of(&profile.station.id, &summary))
}
