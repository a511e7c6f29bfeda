//! The profile model: levels of one radiosonde ascent, validated on entry.

use heapless::{String, Vec};

use crate::error::{Error, Result};

/// Most levels a profile holds (a TEMP Part A + B ascent rarely exceeds 100).
pub const MAX_LEVELS: usize = 256;

/// Longest station identifier, bytes (WMO block and station number is 5; call signs up to 8).
pub const MAX_ID_LEN: usize = 8;

/// Lowest pressure accepted, Pa (0.1 hPa: well above any balloon's burst height).
pub const MIN_PRESSURE_PA: f64 = 10.0;
/// Highest pressure accepted, Pa (1100 hPa: above any sea-level pressure on record).
pub const MAX_PRESSURE_PA: f64 = 110_000.0;
/// Temperature range accepted, K (−100 °C to +60 °C: the physically possible range of
/// the troposphere and lower stratosphere, common practice).
pub const TEMPERATURE_RANGE_K: (f64, f64) = (173.15, 333.15);
/// Height range accepted, m (Dead Sea shore to 60 km).
pub const HEIGHT_RANGE_M: (f64, f64) = (-500.0, 60_000.0);
/// Highest wind speed accepted, m/s (above any jet-stream wind on record).
pub const MAX_WIND_MS: f64 = 150.0;

/// A wind: where it blows from and how fast.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Wind {
    /// Direction the wind blows from, degrees clockwise from true north (0 ≤ d < 360;
    /// calm has speed 0 and direction 0).
    pub dir_from_deg: f64,
    /// Speed, m/s.
    pub speed_ms: f64,
}

impl Wind {
    /// Eastward and northward components (u, v), m/s.
    pub fn components(&self) -> (f64, f64) {
        let d = self.dir_from_deg.to_radians();
        (-self.speed_ms * libm::sin(d), -self.speed_ms * libm::cos(d))
    }

    /// The wind with components (u, v), m/s.
    pub fn from_components(u: f64, v: f64) -> Self {
        let speed_ms = libm::hypot(u, v);
        let dir = if speed_ms == 0.0 {
            0.0
        } else {
            libm::atan2(-u, -v).to_degrees()
        };
        Wind {
            dir_from_deg: if dir < 0.0 { dir + 360.0 } else { dir },
            speed_ms,
        }
    }
}

/// What a level is, as the report or file marks it. Several may apply at once.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LevelKind(pub u8);

impl LevelKind {
    /// The surface (launch) level.
    pub const SURFACE: LevelKind = LevelKind(1);
    /// A standard isobaric surface (1000, 925, 850, 700, 500 … hPa).
    pub const STANDARD: LevelKind = LevelKind(2);
    /// A significant level for temperature or humidity.
    pub const SIGNIFICANT_TEMPERATURE: LevelKind = LevelKind(4);
    /// A significant level for wind.
    pub const SIGNIFICANT_WIND: LevelKind = LevelKind(8);
    /// A tropopause reported by the station.
    pub const TROPOPAUSE: LevelKind = LevelKind(16);
    /// A level of maximum wind reported by the station.
    pub const MAX_WIND: LevelKind = LevelKind(32);

    /// No mark.
    pub const NONE: LevelKind = LevelKind(0);

    /// Whether every mark of `other` is set here.
    pub fn contains(self, other: LevelKind) -> bool {
        self.0 & other.0 == other.0 && other.0 != 0
    }

    /// Both sets of marks.
    pub fn with(self, other: LevelKind) -> LevelKind {
        LevelKind(self.0 | other.0)
    }
}

/// One level of a sounding. Missing values are `None`, never zero.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Level {
    /// Pressure, Pa.
    pub pressure_pa: f64,
    /// Geopotential height, gpm above mean sea level.
    pub height_m: Option<f64>,
    /// Air temperature, K.
    pub temperature_k: Option<f64>,
    /// Dew point, K.
    pub dewpoint_k: Option<f64>,
    /// Wind.
    pub wind: Option<Wind>,
    /// What the level is.
    pub kind: LevelKind,
}

impl Level {
    /// A level at `pressure_pa` with nothing else known yet.
    pub fn at_pressure(pressure_pa: f64) -> Self {
        Level {
            pressure_pa,
            height_m: None,
            temperature_k: None,
            dewpoint_k: None,
            wind: None,
            kind: LevelKind::NONE,
        }
    }

    /// Check every value for physical possibility.
    pub fn validate(&self) -> core::result::Result<(), LevelProblem> {
        let p = self.pressure_pa;
        if !p.is_finite() || !(MIN_PRESSURE_PA..=MAX_PRESSURE_PA).contains(&p) {
            return Err(LevelProblem::Pressure);
        }
        if let Some(z) = self.height_m {
            if !z.is_finite() || !(HEIGHT_RANGE_M.0..=HEIGHT_RANGE_M.1).contains(&z) {
                return Err(LevelProblem::Height);
            }
        }
        let (t_lo, t_hi) = TEMPERATURE_RANGE_K;
        if let Some(t) = self.temperature_k {
            if !t.is_finite() || !(t_lo..=t_hi).contains(&t) {
                return Err(LevelProblem::Temperature);
            }
        }
        if let Some(td) = self.dewpoint_k {
            // A dew point may be very low in dry stratospheric air; it never exceeds the
            // temperature by more than measurement noise (0.5 K, common practice).
            if !td.is_finite() || td < t_lo - 40.0 || td > t_hi {
                return Err(LevelProblem::DewPoint);
            }
            if let Some(t) = self.temperature_k {
                if td > t + 0.5 {
                    return Err(LevelProblem::DewPointAboveTemperature);
                }
            }
        }
        if let Some(w) = self.wind {
            if !w.dir_from_deg.is_finite() || !(0.0..=360.0).contains(&w.dir_from_deg) {
                return Err(LevelProblem::WindDirection);
            }
            if !w.speed_ms.is_finite() || !(0.0..=MAX_WIND_MS).contains(&w.speed_ms) {
                return Err(LevelProblem::WindSpeed);
            }
        }
        Ok(())
    }
}

/// Why a level was refused.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum LevelProblem {
    /// Pressure missing, not a number, or outside 0.1 to 1100 hPa.
    Pressure,
    /// Pressure not lower than the level below it.
    PressureNotDecreasing,
    /// Height outside −500 to 60 000 m.
    Height,
    /// Height not above the level below it.
    HeightNotIncreasing,
    /// Temperature outside −100 to +60 °C.
    Temperature,
    /// Dew point not a possible value.
    DewPoint,
    /// Dew point above the temperature.
    DewPointAboveTemperature,
    /// Wind direction outside 0 to 360 degrees.
    WindDirection,
    /// Wind speed negative or above 150 m/s.
    WindSpeed,
}

impl LevelProblem {
    /// The problem in a few words.
    pub fn statement(self) -> &'static str {
        match self {
            LevelProblem::Pressure => "pressure missing or outside 0.1 to 1100 hPa",
            LevelProblem::PressureNotDecreasing => {
                "pressure must decrease upward (each level lower than the one below)"
            }
            LevelProblem::Height => "height outside -500 to 60000 m",
            LevelProblem::HeightNotIncreasing => "height must increase upward",
            LevelProblem::Temperature => "temperature outside -100 to +60 C",
            LevelProblem::DewPoint => "dew point is not a possible value",
            LevelProblem::DewPointAboveTemperature => "dew point above the temperature",
            LevelProblem::WindDirection => "wind direction outside 0 to 360 degrees",
            LevelProblem::WindSpeed => "wind speed negative or above 150 m/s",
        }
    }
}

/// Observation time as reported: day of month and UTC hour and minute.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ObsTime {
    /// Day of the month, 1–31.
    pub day: u8,
    /// Hour, UTC, 0–23.
    pub hour: u8,
    /// Minute, 0–59 (0 when the report gives whole hours only).
    pub minute: u8,
}

/// Where and when the sounding was made. Every part is optional.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct StationInfo {
    /// Station identifier (WMO number or call sign), up to 8 characters.
    pub id: String<MAX_ID_LEN>,
    /// Latitude, degrees north.
    pub lat_deg: Option<f64>,
    /// Longitude, degrees east.
    pub lon_deg: Option<f64>,
    /// Station elevation, m above mean sea level.
    pub elevation_m: Option<f64>,
    /// Observation time.
    pub time: Option<ObsTime>,
}

/// A sounding: station information and up to `N` levels ordered from the ground up
/// (pressure strictly decreasing). `N` is [`MAX_LEVELS`] unless a caller with less memory
/// (the handheld) chooses fewer; every analysis works on any `N`.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Profile<const N: usize = MAX_LEVELS> {
    /// Where and when.
    pub station: StationInfo,
    levels: Vec<Level, N>,
}

impl Default for Profile {
    fn default() -> Self {
        Profile::new(StationInfo::default())
    }
}

impl Profile {
    /// An empty profile of [`MAX_LEVELS`] levels for `station`.
    pub fn new(station: StationInfo) -> Self {
        Profile::empty(station)
    }
}

impl<const N: usize> Profile<N> {
    /// An empty profile of `N` levels for `station`.
    pub fn empty(station: StationInfo) -> Self {
        Profile {
            station,
            levels: Vec::new(),
        }
    }

    /// Drop every level and set the station: the profile is then as [`Profile::empty`]
    /// made it, without a new value being built (and moved) on the stack.
    pub fn reset(&mut self, station: StationInfo) {
        self.station = station;
        self.levels.clear();
    }

    /// The most levels the profile holds.
    pub const fn capacity(&self) -> usize {
        N
    }

    /// The levels, ground up.
    pub fn levels(&self) -> &[Level] {
        &self.levels
    }

    /// Number of levels.
    pub fn len(&self) -> usize {
        self.levels.len()
    }

    /// Whether there are no levels.
    pub fn is_empty(&self) -> bool {
        self.levels.is_empty()
    }

    /// Append a level above the current top. It must be valid and its pressure lower
    /// (and its height, where both are known, higher) than every level below.
    pub fn push(&mut self, level: Level) -> Result<()> {
        let index = self.levels.len();
        let at = |problem| Error::BadLevel {
            index: index as u16,
            problem,
        };
        level.validate().map_err(at)?;
        if let Some(below) = self.levels.last() {
            if level.pressure_pa >= below.pressure_pa {
                return Err(at(LevelProblem::PressureNotDecreasing));
            }
        }
        if let Some(z) = level.height_m {
            if let Some(zb) = self.levels.iter().rev().find_map(|l| l.height_m) {
                if z <= zb {
                    return Err(at(LevelProblem::HeightNotIncreasing));
                }
            }
        }
        self.levels
            .push(level)
            .map_err(|_| Error::CapacityExceeded {
                what: "sounding levels",
                capacity: N as u16,
            })
    }

    /// Put a level in its place by pressure, whatever the order of arrival. A level at a
    /// pressure already present (within 0.5 Pa) fills the values that one lacks, keeps
    /// the values it has, and adds its marks: this is how the parts of a coded report
    /// merge. The level must be valid, and heights must still increase upward; a refused
    /// level leaves the profile unchanged.
    pub fn merge(&mut self, level: Level) -> Result<()> {
        let capacity = Error::CapacityExceeded {
            what: "sounding levels",
            capacity: N as u16,
        };
        // First level (from the ground) whose pressure is not above the new one's.
        let pos = self
            .levels
            .iter()
            .position(|l| l.pressure_pa <= level.pressure_pa + 0.5)
            .unwrap_or(self.levels.len());
        let same = self
            .levels
            .get(pos)
            .is_some_and(|l| libm::fabs(l.pressure_pa - level.pressure_pa) <= 0.5);
        let candidate = if same {
            let old = self.levels[pos];
            Level {
                pressure_pa: old.pressure_pa,
                height_m: old.height_m.or(level.height_m),
                temperature_k: old.temperature_k.or(level.temperature_k),
                dewpoint_k: old.dewpoint_k.or(level.dewpoint_k),
                wind: old.wind.or(level.wind),
                kind: old.kind.with(level.kind),
            }
        } else {
            level
        };
        let bad = |problem| Error::BadLevel {
            index: pos as u16,
            problem,
        };
        candidate.validate().map_err(bad)?;
        if let Some(z) = candidate.height_m {
            let below = self.levels[..pos].iter().rev().find_map(|l| l.height_m);
            let above_from = if same { pos + 1 } else { pos };
            let above = self
                .levels
                .get(above_from..)
                .and_then(|rest| rest.iter().find_map(|l| l.height_m));
            if below.is_some_and(|zb| z <= zb) || above.is_some_and(|za| z >= za) {
                return Err(bad(LevelProblem::HeightNotIncreasing));
            }
        }
        if same {
            self.levels[pos] = candidate;
            Ok(())
        } else {
            self.levels.insert(pos, candidate).map_err(|_| capacity)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lvl(p_hpa: f64, z: Option<f64>, t_c: Option<f64>) -> Level {
        Level {
            height_m: z,
            temperature_k: t_c.map(|t| t + 273.15),
            ..Level::at_pressure(p_hpa * 100.0)
        }
    }

    #[test]
    fn push_requires_decreasing_pressure_and_rising_height() {
        let mut p = Profile::default();
        p.push(lvl(1000.0, Some(100.0), Some(15.0))).unwrap();
        assert_eq!(
            p.push(lvl(1000.0, None, Some(14.0))),
            Err(Error::BadLevel {
                index: 1,
                problem: LevelProblem::PressureNotDecreasing
            })
        );
        // A level without a height between two with heights is accepted.
        p.push(lvl(950.0, None, Some(12.0))).unwrap();
        assert_eq!(
            p.push(lvl(900.0, Some(90.0), None)),
            Err(Error::BadLevel {
                index: 2,
                problem: LevelProblem::HeightNotIncreasing
            })
        );
        assert_eq!(p.len(), 2);
    }

    #[test]
    fn impossible_values_are_named() {
        let mut p = Profile::default();
        let hot = lvl(1000.0, None, Some(75.0));
        assert_eq!(
            p.push(hot),
            Err(Error::BadLevel {
                index: 0,
                problem: LevelProblem::Temperature
            })
        );
        let wet = Level {
            dewpoint_k: Some(290.0),
            ..lvl(1000.0, None, Some(10.0))
        };
        assert_eq!(wet.validate(), Err(LevelProblem::DewPointAboveTemperature));
        let nan = Level::at_pressure(f64::NAN);
        assert_eq!(nan.validate(), Err(LevelProblem::Pressure));
        let gale = Level {
            wind: Some(Wind {
                dir_from_deg: 270.0,
                speed_ms: 200.0,
            }),
            ..Level::at_pressure(50_000.0)
        };
        assert_eq!(gale.validate(), Err(LevelProblem::WindSpeed));
    }

    #[test]
    fn merge_orders_levels_and_fills_gaps() {
        let mut p = Profile::default();
        p.merge(lvl(500.0, Some(5570.0), None)).unwrap();
        p.merge(lvl(850.0, Some(1460.0), Some(5.0))).unwrap();
        p.merge(lvl(700.0, None, Some(-3.0))).unwrap();
        // The same pressure again: fills the temperature, keeps the height.
        let again = Level {
            kind: LevelKind::SIGNIFICANT_TEMPERATURE,
            ..lvl(500.0, Some(9999.0), Some(-21.0))
        };
        p.merge(again).unwrap();
        let ps: heapless::Vec<f64, 4> = p.levels().iter().map(|l| l.pressure_pa).collect();
        assert_eq!(ps.as_slice(), &[85_000.0, 70_000.0, 50_000.0]);
        assert_eq!(p.levels()[2].height_m, Some(5570.0));
        assert_eq!(p.levels()[2].temperature_k, Some(-21.0 + 273.15));
        assert!(p.levels()[2]
            .kind
            .contains(LevelKind::SIGNIFICANT_TEMPERATURE));
        // A height that would break the order is refused and changes nothing.
        let before = p.clone();
        assert!(p.merge(lvl(600.0, Some(1000.0), None)).is_err());
        assert_eq!(p, before);
    }

    #[test]
    fn wind_components_round_trip() {
        // Meteorological convention (common practice): a west wind (from 270°) blows east.
        let w = Wind {
            dir_from_deg: 270.0,
            speed_ms: 20.0,
        };
        let (u, v) = w.components();
        assert!((u - 20.0).abs() < 1e-12 && v.abs() < 1e-12);
        let back = Wind::from_components(u, v);
        assert!((back.dir_from_deg - 270.0).abs() < 1e-9);
        let n = Wind::from_components(0.0, -5.0);
        assert!(n.dir_from_deg.abs() < 1e-9 && (n.speed_ms - 5.0).abs() < 1e-12);
    }
}
