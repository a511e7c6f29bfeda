//! The one error type of the core: every failure is a value with a message a field user
//! understands.

use core::fmt;

/// Which fitted quantity or input a message speaks of.
pub type What = &'static str;

/// Everything that can go wrong in a leeward-core calculation.
///
/// The `Display` text is written for the person holding the device: it names the input
/// and, where it helps, the allowed range.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Error {
    /// An input was NaN or infinite.
    NotFinite {
        /// The input's name.
        what: What,
    },
    /// An input lies outside the range the calculation accepts.
    OutOfRange {
        /// The input's name.
        what: What,
        /// The value given.
        value: f64,
        /// Smallest accepted value.
        min: f64,
        /// Largest accepted value.
        max: f64,
    },
    /// Geostrophic balance is refused this close to the equator.
    NearEquator {
        /// Latitude of the reference point, degrees.
        lat_deg: f64,
        /// Smallest accepted |latitude|, degrees.
        min_deg: f64,
    },
    /// Too few stations for the requested height-field model.
    TooFewStations {
        /// Stations the model needs.
        need: u8,
        /// Stations given.
        got: u8,
    },
    /// A network holds at most this many stations.
    TooManyStations {
        /// Capacity of a network.
        max: u8,
    },
    /// Two stations share an identifier or a position.
    DuplicateStation {
        /// Index (0-based) of the later station.
        index: u8,
        /// Index (0-based) of the station it repeats.
        other: u8,
    },
    /// A station identifier is empty, longer than 8 characters, or not printable ASCII.
    BadStationId {
        /// Length of the identifier given, bytes.
        len: u8,
    },
    /// A station lies too far from the reference point for a local plane.
    StationTooFar {
        /// Index (0-based) of the station.
        index: u8,
        /// Its distance from the reference point, km.
        distance_km: f64,
        /// Largest accepted distance, km.
        max_km: f64,
    },
    /// The stations lie (nearly) on one line: no gradient across it can be found.
    StationsCollinear {
        /// Length of the station spread over its width (principal axes); infinite for an
        /// exact line.
        aspect: f64,
    },
    /// The stations are too clustered or too unevenly spread for the chosen model.
    PoorGeometry {
        /// Parameters of the model that was tried.
        params: u8,
        /// Condition number of the scaled design matrix.
        condition: f64,
        /// Largest accepted condition number.
        limit: f64,
    },
    /// A column depth is zero or negative.
    DepthNotPositive {
        /// Which depth.
        what: What,
        /// The depth, m.
        depth_m: f64,
    },
    /// The absolute vorticity has the opposite sign to f: the column is inertially
    /// unstable and potential-vorticity reasoning does not apply.
    InertiallyUnstable {
        /// Absolute vorticity ζ + f, s⁻¹.
        abs_vorticity: f64,
    },
    /// No positive depth gives the requested vorticity.
    NoDepthForVorticity,
    /// The wind blows along the ridge, so the column never crosses it.
    WindAlongRidge {
        /// Angle between the wind and the ridge axis, degrees.
        angle_deg: f64,
    },
    /// The terrain reaches the lid, so the column would vanish.
    LidBelowTerrain {
        /// Lid height, m above sea level.
        lid_m: f64,
        /// Highest terrain, m above sea level.
        terrain_m: f64,
    },
    /// A point of a ridge cross-profile is out of order.
    BadProfile {
        /// Index (0-based) of the point.
        index: u8,
    },
    /// A sounding level is impossible or out of order.
    BadLevel {
        /// Index (0-based, from the ground) of the level.
        index: u16,
        /// What is wrong with it.
        problem: crate::sounding::LevelProblem,
    },
    /// A calculation needs data the input does not have.
    NoData {
        /// What is missing.
        what: What,
    },
    /// A height lies outside the part of the sounding that has the data needed there.
    OutsideProfile {
        /// Which height.
        what: What,
        /// The height asked for, m.
        height_m: f64,
        /// Lowest usable height, m.
        bottom_m: f64,
        /// Highest usable height, m.
        top_m: f64,
    },
    /// The layer is neutral or statically unstable: N² ≤ 0.
    NotStable {
        /// N², s⁻².
        n2: f64,
    },
    /// The sounding shows no tropopause by the WMO lapse-rate definition.
    NoTropopause,
    /// A fixed-capacity buffer is full.
    CapacityExceeded {
        /// What was being stored.
        what: What,
        /// Its capacity.
        capacity: u16,
    },
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Error::NotFinite { what } => write!(f, "{what} is not a number"),
            Error::OutOfRange { what, value, min, max } => {
                write!(
                    f,
                    "{what} {} is out of range ({} to {})",
                    Short(value),
                    Short(min),
                    Short(max)
                )
            }
            Error::NearEquator { lat_deg, min_deg } => write!(
                f,
                "latitude {lat_deg:.1} is within {min_deg} degrees of the equator: \
                 geostrophic balance does not hold there"
            ),
            Error::TooFewStations { need, got } => write!(f, "need {need} stations, have {got}"),
            Error::TooManyStations { max } => write!(f, "at most {max} stations in a network"),
            Error::DuplicateStation { index, other } => write!(
                f,
                "station {} repeats station {} (same id or same position)",
                u32::from(index) + 1,
                u32::from(other) + 1
            ),
            Error::BadStationId { len } => write!(
                f,
                "station id must be 1 to 8 letters, digits or -_ (got {len} characters)"
            ),
            Error::StationTooFar { index, distance_km, max_km } => write!(
                f,
                "station {} is {distance_km:.0} km from the reference point (at most {max_km:.0} km)",
                u32::from(index) + 1
            ),
            Error::StationsCollinear { aspect } => write!(
                f,
                "stations lie nearly on one line (spread {aspect:.0} times longer than wide): \
                 add a station off that line"
            ),
            Error::PoorGeometry { params, condition, limit } => write!(
                f,
                "stations too clustered for a {params}-term fit (condition number {condition:.1e}, \
                 limit {limit:.0e}): use a simpler model or spread the stations"
            ),
            Error::DepthNotPositive { what, depth_m } => {
                write!(f, "{what} must be above zero (got {depth_m:.0} m)")
            }
            Error::InertiallyUnstable { abs_vorticity } => write!(
                f,
                "absolute vorticity {abs_vorticity:.2e} /s has the wrong sign: \
                 the column is inertially unstable"
            ),
            Error::NoDepthForVorticity => f.write_str(
                "no positive depth gives that vorticity: its absolute vorticity has the wrong sign",
            ),
            Error::WindAlongRidge { angle_deg } => write!(
                f,
                "wind within {angle_deg:.0} degrees of the ridge axis: the air does not cross it"
            ),
            Error::LidBelowTerrain { lid_m, terrain_m } => write!(
                f,
                "lid at {lid_m:.0} m is not above the terrain ({terrain_m:.0} m)"
            ),
            Error::BadProfile { index } => write!(
                f,
                "ridge profile point {}: distances must increase and heights be finite",
                u32::from(index) + 1
            ),
            Error::BadLevel { index, problem } => {
                write!(f, "sounding level {}: {}", u32::from(index) + 1, problem.statement())
            }
            Error::NoData { what } => write!(f, "no data: need {what}"),
            Error::OutsideProfile {
                what,
                height_m,
                bottom_m,
                top_m,
            } => write!(
                f,
                "{what} {height_m:.0} m is outside the sounding's data ({bottom_m:.0} to {top_m:.0} m)"
            ),
            Error::NotStable { n2 } => write!(
                f,
                "the layer is not stably stratified (N squared {n2:.1e} /s2): no buoyancy frequency"
            ),
            Error::NoTropopause => f.write_str(
                "no tropopause in the sounding (WMO lapse-rate definition): set the lid another way",
            ),
            Error::CapacityExceeded { what, capacity } => {
                write!(f, "too many {what} (at most {capacity})")
            }
        }
    }
}

impl core::error::Error for Error {}

/// A number in a few characters for a message: up to four decimals without trailing
/// zeros, or e notation beyond a million or below 1e-3.
struct Short(f64);

impl fmt::Display for Short {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let v = self.0;
        let a = libm::fabs(v);
        if !v.is_finite() || (a != 0.0 && !(1e-3..1e6).contains(&a)) {
            return write!(f, "{v:.3e}");
        }
        let mut buf: heapless::String<24> = heapless::String::new();
        if core::fmt::Write::write_fmt(&mut buf, format_args!("{v:.4}")).is_err() {
            return write!(f, "{v:.3e}");
        }
        let t = buf.trim_end_matches('0').trim_end_matches('.');
        f.write_str(if t == "-0" { "0" } else { t })
    }
}

/// Result type of the core.
pub type Result<T> = core::result::Result<T, Error>;

/// Check that `value` is finite, naming it in the error.
pub(crate) fn finite(what: What, value: f64) -> Result<f64> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(Error::NotFinite { what })
    }
}

/// Check that `value` is finite and within `[min, max]`.
pub(crate) fn in_range(what: What, value: f64, min: f64, max: f64) -> Result<f64> {
    finite(what, value)?;
    if value < min || value > max {
        Err(Error::OutOfRange {
            what,
            value,
            min,
            max,
        })
    } else {
        Ok(value)
    }
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::*;
    use std::string::ToString;

    #[test]
    fn messages_stay_short_and_never_overflow() {
        let e = Error::OutOfRange {
            what: "latitude",
            value: 95.000_000_000_000_01,
            min: -90.0,
            max: 90.0,
        };
        assert_eq!(e.to_string(), "latitude 95 is out of range (-90 to 90)");
        let tiny = Error::OutOfRange {
            what: "x",
            value: 0.1 + 0.2,
            min: 1e-9,
            max: 1e12,
        };
        assert_eq!(
            tiny.to_string(),
            "x 0.3 is out of range (1.000e-9 to 1.000e12)"
        );
        // The largest indices must not overflow when shown 1-based.
        let s = Error::BadLevel {
            index: u16::MAX,
            problem: crate::sounding::LevelProblem::Height,
        }
        .to_string();
        assert!(s.starts_with("sounding level 65536:"), "{s}");
        let d = Error::DuplicateStation {
            index: 255,
            other: 255,
        }
        .to_string();
        assert!(d.contains("256"), "{d}");
    }
}
