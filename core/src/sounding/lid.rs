//! The column lid for the potential-vorticity calculations.

use super::stability::{Stability, Tropopauses};
use crate::error::{Error, Result};

/// How the lid is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum LidChoice {
    /// The first tropopause (the default).
    #[default]
    Tropopause,
    /// The top of the n-th stable layer counted from the ground, 1-based.
    StableLayerTop {
        /// Which stable layer, 1 = lowest.
        nth: u8,
    },
    /// A height set by the user, m above sea level.
    Height {
        /// The height, m.
        height_m: f64,
    },
}

/// Where the lid came from.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum LidSource {
    /// The first tropopause of the sounding.
    Tropopause,
    /// The top of a stable layer.
    StableLayerTop {
        /// Which one, 1 = lowest.
        nth: u8,
        /// Its base, m.
        base_m: f64,
    },
    /// Set by the user.
    SetHeight,
}

impl LidSource {
    /// A few words for the user.
    pub fn statement(self) -> &'static str {
        match self {
            LidSource::Tropopause => "tropopause",
            LidSource::StableLayerTop { .. } => "top of a stable layer",
            LidSource::SetHeight => "height set by the user",
        }
    }
}

/// The column lid.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Lid {
    /// Lid height, m above sea level.
    pub height_m: f64,
    /// Where it came from.
    pub source: LidSource,
}

/// Choose the lid.
pub fn lid(choice: LidChoice, tropopauses: &Tropopauses, stability: &Stability) -> Result<Lid> {
    match choice {
        LidChoice::Tropopause => tropopauses
            .first
            .map(|t| Lid {
                height_m: t.height_m,
                source: LidSource::Tropopause,
            })
            .ok_or(Error::NoTropopause),
        LidChoice::StableLayerTop { nth } => {
            let n = stability.stable_layers.len();
            if nth == 0 || usize::from(nth) > n {
                return Err(if n == 0 {
                    Error::NoData {
                        what: "a stable layer in the sounding",
                    }
                } else {
                    Error::OutOfRange {
                        what: "stable layer number",
                        value: f64::from(nth),
                        min: 1.0,
                        max: n as f64,
                    }
                });
            }
            let layer = stability.stable_layers[usize::from(nth) - 1];
            Ok(Lid {
                height_m: layer.top_m,
                source: LidSource::StableLayerTop {
                    nth,
                    base_m: layer.base_m,
                },
            })
        }
        LidChoice::Height { height_m } => {
            crate::error::in_range("lid height", height_m, 0.0, 30_000.0)?;
            Ok(Lid {
                height_m,
                source: LidSource::SetHeight,
            })
        }
    }
}
