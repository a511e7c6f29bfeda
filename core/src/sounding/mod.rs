//! A radiosonde sounding and what it says about the column argument.
//!
//! [`profile`] holds the levels (validated on entry); the analysis modules work on a
//! [`Profile`] and return plain result structs:
//!
//! | module | what it gives |
//! |---|---|
//! | [`csv`] | leeward's sounding CSV: read and write |
//! | [`thermo`] | θ, virtual temperature, mixing ratio, relative humidity per level |
//! | [`heights`] | hypsometric heights and the check of the reported ones |
//! | [`stability`] | lapse rates, inversions, stable layers, N², bulk N, tropopauses |
//! | [`lid`] | the column lid: tropopause, a stable layer's top, or a set height |
//! | [`ridge_flow`] | bulk Froude number and verdict, blocked depth, vertical wavelength |
//! | [`barotropy`] | shear, veering or backing, thermal wind, barotropy verdict |
//! | [`isentropic`] | isentropic layer PV in PVU for a given ζ |
//! | [`summary`] | all of it for one sounding, as the device and command line show it |

pub mod barotropy;
pub mod csv;
pub mod heights;
pub mod isentropic;
pub mod lid;
pub mod profile;
pub mod ridge_flow;
pub mod stability;
pub mod summary;
#[cfg(test)]
pub(crate) mod testing;
pub mod thermo;

pub use profile::{
    Level, LevelKind, LevelProblem, ObsTime, Profile, StationInfo, Wind, MAX_LEVELS,
};
