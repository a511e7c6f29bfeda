//! Display units and the latitude entry style: what the user picks under Settings, and the
//! conversions at the edge between the SI values of leeward-core and what the screen shows.

/// 1 ft = 0.3048 m exactly (international foot, 1959 agreement).
pub const METRES_PER_FOOT: f64 = 0.3048;
/// 1 kt = 1852 m per hour exactly (international nautical mile).
pub const MS_PER_KNOT: f64 = 1852.0 / 3600.0;
/// 1 km/h in m/s.
pub const MS_PER_KMH: f64 = 1.0 / 3.6;
/// 1 inHg = 33.8639 hPa (conventional inch of mercury at 0 °C; from memory: NIST SP 811
/// lists 3.386 389 kPa).
pub const HPA_PER_INHG: f64 = 33.86389;

/// Unit of heights and depths.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum HeightUnit {
    /// Metres.
    #[default]
    Metre,
    /// International feet.
    Foot,
}

/// Unit of wind speed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum WindUnit {
    /// Metres per second.
    #[default]
    MetrePerSecond,
    /// Knots.
    Knot,
    /// Kilometres per hour.
    KmPerHour,
}

/// Unit of pressure.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum PressureUnit {
    /// Hectopascals.
    #[default]
    Hectopascal,
    /// Inches of mercury.
    InchOfMercury,
}

/// How latitudes are typed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum LatEntry {
    /// Decimal degrees, `45.5`.
    #[default]
    Decimal,
    /// Degrees and minutes, `45°30` (the Dot key types the degree mark first).
    DegMin,
}

/// Everything under Settings; kept in the app and in storage.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Settings {
    /// Heights and depths.
    pub height: HeightUnit,
    /// Wind speeds.
    pub wind: WindUnit,
    /// Pressures.
    pub pressure: PressureUnit,
    /// Latitude entry.
    pub lat_entry: LatEntry,
}

/// First byte of stored settings: tells them from erased or foreign data.
const MAGIC: u8 = 0x4C;
/// Layout version of stored settings.
const VERSION: u8 = 1;
/// Stored size of [`Settings`], bytes.
pub const SETTINGS_BYTES: usize = 6;

impl Settings {
    /// The stored form: magic, version, then one byte per choice.
    pub fn to_bytes(&self) -> [u8; SETTINGS_BYTES] {
        [
            MAGIC,
            VERSION,
            self.height as u8,
            self.wind as u8,
            self.pressure as u8,
            self.lat_entry as u8,
        ]
    }

    /// Read the stored form; `None` for anything that is not a valid record.
    pub fn from_bytes(b: &[u8]) -> Option<Self> {
        let [m, v, h, w, p, l] = *b else {
            return None;
        };
        if m != MAGIC || v != VERSION {
            return None;
        }
        Some(Settings {
            height: match h {
                0 => HeightUnit::Metre,
                1 => HeightUnit::Foot,
                _ => return None,
            },
            wind: match w {
                0 => WindUnit::MetrePerSecond,
                1 => WindUnit::Knot,
                2 => WindUnit::KmPerHour,
                _ => return None,
            },
            pressure: match p {
                0 => PressureUnit::Hectopascal,
                1 => PressureUnit::InchOfMercury,
                _ => return None,
            },
            lat_entry: match l {
                0 => LatEntry::Decimal,
                1 => LatEntry::DegMin,
                _ => return None,
            },
        })
    }
}

impl HeightUnit {
    /// Symbol shown after a value.
    pub fn symbol(self) -> &'static str {
        match self {
            HeightUnit::Metre => "m",
            HeightUnit::Foot => "ft",
        }
    }
    /// Metres → this unit.
    pub fn from_m(self, m: f64) -> f64 {
        match self {
            HeightUnit::Metre => m,
            HeightUnit::Foot => m / METRES_PER_FOOT,
        }
    }
    /// This unit → metres.
    pub fn to_m(self, v: f64) -> f64 {
        match self {
            HeightUnit::Metre => v,
            HeightUnit::Foot => v * METRES_PER_FOOT,
        }
    }
    /// The next choice, for the settings list.
    pub fn next(self) -> Self {
        match self {
            HeightUnit::Metre => HeightUnit::Foot,
            HeightUnit::Foot => HeightUnit::Metre,
        }
    }
}

impl WindUnit {
    /// Symbol shown after a value.
    pub fn symbol(self) -> &'static str {
        match self {
            WindUnit::MetrePerSecond => "m/s",
            WindUnit::Knot => "kt",
            WindUnit::KmPerHour => "km/h",
        }
    }
    /// m/s → this unit.
    pub fn from_ms(self, ms: f64) -> f64 {
        match self {
            WindUnit::MetrePerSecond => ms,
            WindUnit::Knot => ms / MS_PER_KNOT,
            WindUnit::KmPerHour => ms / MS_PER_KMH,
        }
    }
    /// This unit → m/s.
    pub fn to_ms(self, v: f64) -> f64 {
        match self {
            WindUnit::MetrePerSecond => v,
            WindUnit::Knot => v * MS_PER_KNOT,
            WindUnit::KmPerHour => v * MS_PER_KMH,
        }
    }
    /// The next choice, for the settings list.
    pub fn next(self) -> Self {
        match self {
            WindUnit::MetrePerSecond => WindUnit::Knot,
            WindUnit::Knot => WindUnit::KmPerHour,
            WindUnit::KmPerHour => WindUnit::MetrePerSecond,
        }
    }
}

impl PressureUnit {
    /// Symbol shown after a value.
    pub fn symbol(self) -> &'static str {
        match self {
            PressureUnit::Hectopascal => "hPa",
            PressureUnit::InchOfMercury => "inHg",
        }
    }
    /// hPa → this unit.
    pub fn from_hpa(self, hpa: f64) -> f64 {
        match self {
            PressureUnit::Hectopascal => hpa,
            PressureUnit::InchOfMercury => hpa / HPA_PER_INHG,
        }
    }
    /// The next choice, for the settings list.
    pub fn next(self) -> Self {
        match self {
            PressureUnit::Hectopascal => PressureUnit::InchOfMercury,
            PressureUnit::InchOfMercury => PressureUnit::Hectopascal,
        }
    }
}

impl LatEntry {
    /// Name shown in the settings list.
    pub fn name(self) -> &'static str {
        match self {
            LatEntry::Decimal => "decimal",
            LatEntry::DegMin => "deg min",
        }
    }
    /// The next choice, for the settings list.
    pub fn next(self) -> Self {
        match self {
            LatEntry::Decimal => LatEntry::DegMin,
            LatEntry::DegMin => LatEntry::Decimal,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stored_form_round_trips_every_choice() {
        for h in [HeightUnit::Metre, HeightUnit::Foot] {
            for w in [
                WindUnit::MetrePerSecond,
                WindUnit::Knot,
                WindUnit::KmPerHour,
            ] {
                for p in [PressureUnit::Hectopascal, PressureUnit::InchOfMercury] {
                    for l in [LatEntry::Decimal, LatEntry::DegMin] {
                        let s = Settings {
                            height: h,
                            wind: w,
                            pressure: p,
                            lat_entry: l,
                        };
                        assert_eq!(Settings::from_bytes(&s.to_bytes()), Some(s));
                    }
                }
            }
        }
    }

    #[test]
    fn bad_records_are_refused() {
        assert_eq!(Settings::from_bytes(&[0xFF; 6]), None); // erased flash
        assert_eq!(Settings::from_bytes(&[MAGIC, VERSION, 0, 3, 0, 0]), None);
        assert_eq!(Settings::from_bytes(&[MAGIC, 2, 0, 0, 0, 0]), None);
        assert_eq!(Settings::from_bytes(&[MAGIC, VERSION, 0, 0, 0]), None);
    }

    #[test]
    fn conversions() {
        // Definitions: 1 ft = 0.3048 m, 1 kt = 1852 m/h.
        assert!((HeightUnit::Foot.from_m(0.3048) - 1.0).abs() < 1e-12);
        assert!((HeightUnit::Foot.to_m(HeightUnit::Foot.from_m(8950.0)) - 8950.0).abs() < 1e-9);
        assert!((WindUnit::Knot.from_ms(1852.0 / 3600.0) - 1.0).abs() < 1e-12);
        assert!((WindUnit::KmPerHour.from_ms(10.0) - 36.0).abs() < 1e-12);
        // Standard sea-level pressure 1013.25 hPa is 29.92 inHg (common practice).
        assert!((PressureUnit::InchOfMercury.from_hpa(1013.25) - 29.92).abs() < 0.005);
    }
}
