//! leeward's sounding CSV: read and write, on `&str`, without allocation.
//!
//! ```text
//! # station=TCOL
//! # lat=45.5
//! # lon=-140.5355
//! # elevation_m=1850
//! # time=14 12:00
//! pressure_hpa,height_m,temperature_c,dewpoint_c,wind_dir_deg,wind_speed_kt
//! 799.0,1850,9.0,6.0,262,33.0
//! 700.0,2868,2.4,0.1,263,34.0
//! ```
//!
//! - The header row names the columns; their names carry the units. `pressure_hpa` and
//!   one of `temperature_c` / `temperature_k` are required; `height_m`, `dewpoint_c` /
//!   `dewpoint_k` and a wind (`wind_dir_deg` with `wind_speed_kt` or `wind_speed_ms`) are
//!   optional, and so is `kind` (what the level is: `surface`, `standard`, `sig_temp`,
//!   `sig_wind`, `tropopause`, `max_wind`, joined by `+`). Columns may come in any order.
//! - Rows run from the ground up. An empty cell is a missing value, never zero.
//! - Lines starting with `#` are comments; `# key=value` lines before or after the header
//!   give the station: `station`, `lat`, `lon`, `elevation_m`, `time` (`DD HH:MM`, UTC).
//!   Other comment lines are ignored. Blank lines are ignored.

use core::fmt::{self, Write};

use super::profile::{Level, LevelKind, ObsTime, Profile, StationInfo, Wind, MAX_ID_LEN};
use crate::error::Error;

/// Metres per second in one knot (1852 m per hour; SI Brochure, non-SI units).
pub const MS_PER_KNOT: f64 = 1852.0 / 3600.0;

/// The columns leeward's sounding CSV knows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Column {
    /// `pressure_hpa`
    PressureHpa,
    /// `height_m`
    HeightM,
    /// `temperature_c`
    TemperatureC,
    /// `temperature_k`
    TemperatureK,
    /// `dewpoint_c`
    DewpointC,
    /// `dewpoint_k`
    DewpointK,
    /// `wind_dir_deg`
    WindDirDeg,
    /// `wind_speed_kt`
    WindSpeedKt,
    /// `wind_speed_ms`
    WindSpeedMs,
    /// `kind`: what the level is, words joined by `+` (`surface`, `standard`,
    /// `sig_temp`, `sig_wind`, `tropopause`, `max_wind`).
    Kind,
}

const COLUMNS: [Column; 10] = [
    Column::Kind,
    Column::PressureHpa,
    Column::HeightM,
    Column::TemperatureC,
    Column::TemperatureK,
    Column::DewpointC,
    Column::DewpointK,
    Column::WindDirDeg,
    Column::WindSpeedKt,
    Column::WindSpeedMs,
];

impl Column {
    /// The column's name in the header.
    pub fn name(self) -> &'static str {
        match self {
            Column::PressureHpa => "pressure_hpa",
            Column::HeightM => "height_m",
            Column::TemperatureC => "temperature_c",
            Column::TemperatureK => "temperature_k",
            Column::DewpointC => "dewpoint_c",
            Column::DewpointK => "dewpoint_k",
            Column::WindDirDeg => "wind_dir_deg",
            Column::WindSpeedKt => "wind_speed_kt",
            Column::WindSpeedMs => "wind_speed_ms",
            Column::Kind => "kind",
        }
    }

    fn from_name(s: &str) -> Option<Self> {
        COLUMNS.iter().copied().find(|c| c.name() == s)
    }
}

/// What is wrong with a sounding CSV.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum CsvProblem {
    /// No header row.
    NoHeader,
    /// A header names a column leeward does not know (its position, 1-based).
    UnknownColumn {
        /// Position of the column, 1-based.
        position: u8,
    },
    /// A column appears twice, or both unit variants of one quantity appear.
    DuplicateColumn {
        /// The column.
        column: Column,
    },
    /// A required column is absent.
    MissingColumn {
        /// What is missing.
        what: &'static str,
    },
    /// A wind needs both a direction and a speed column.
    HalfWind,
    /// A row has more or fewer cells than the header.
    FieldCount {
        /// Cells in the header.
        expected: u8,
        /// Cells in the row.
        got: u8,
    },
    /// A cell is not a number.
    BadNumber {
        /// Its column.
        column: Column,
    },
    /// A `kind` cell holds an unknown word.
    BadKind,
    /// A row has no pressure.
    NoPressure,
    /// A row has a wind direction without a speed or the other way round.
    HalfWindCell,
    /// A `# key=value` line has a bad value.
    BadMetadata {
        /// The key.
        key: &'static str,
    },
    /// No data rows.
    NoLevels,
    /// The level is impossible, out of order, or one too many.
    Level(Error),
}

/// A problem and the line (1-based) where it is.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CsvError {
    /// Line number, 1-based (0 for the file as a whole).
    pub line: u32,
    /// What is wrong.
    pub problem: CsvProblem,
}

impl fmt::Display for CsvError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.line > 0 {
            write!(f, "line {}: ", self.line)?;
        }
        match self.problem {
            CsvProblem::NoHeader => f.write_str(
                "no header row: expected column names such as pressure_hpa,height_m,temperature_c",
            ),
            CsvProblem::UnknownColumn { position } => write!(
                f,
                "column {position} has an unknown name (known: pressure_hpa, height_m, \
                 temperature_c, temperature_k, dewpoint_c, dewpoint_k, wind_dir_deg, \
                 wind_speed_kt, wind_speed_ms, kind)"
            ),
            CsvProblem::DuplicateColumn { column } => {
                write!(f, "{} given twice (or in two units)", column.name())
            }
            CsvProblem::MissingColumn { what } => write!(f, "no {what} column"),
            CsvProblem::HalfWind => {
                f.write_str("a wind needs both wind_dir_deg and wind_speed_kt (or wind_speed_ms)")
            }
            CsvProblem::FieldCount { expected, got } => {
                write!(f, "{got} cells, but the header has {expected}")
            }
            CsvProblem::BadNumber { column } => write!(f, "{} is not a number", column.name()),
            CsvProblem::BadKind => f.write_str(
                "kind must be words joined by + from: surface, standard, sig_temp, sig_wind, \
                 tropopause, max_wind",
            ),
            CsvProblem::NoPressure => f.write_str("no pressure"),
            CsvProblem::HalfWindCell => {
                f.write_str("wind direction and speed must both be given or both be empty")
            }
            CsvProblem::BadMetadata { key } => write!(f, "bad value for '{key}'"),
            CsvProblem::NoLevels => f.write_str("no data rows"),
            CsvProblem::Level(e) => write!(f, "{e}"),
        }
    }
}

impl core::error::Error for CsvError {}

const MAX_COLUMNS: usize = 10;

const KIND_WORDS: [(&str, LevelKind); 6] = [
    ("surface", LevelKind::SURFACE),
    ("standard", LevelKind::STANDARD),
    ("sig_temp", LevelKind::SIGNIFICANT_TEMPERATURE),
    ("sig_wind", LevelKind::SIGNIFICANT_WIND),
    ("tropopause", LevelKind::TROPOPAUSE),
    ("max_wind", LevelKind::MAX_WIND),
];

/// Split on commas; trims spaces and a trailing carriage return.
fn cells(line: &str) -> impl Iterator<Item = &str> {
    line.split(',').map(|c| c.trim())
}

fn parse_f64(s: &str) -> Option<f64> {
    s.parse::<f64>().ok().filter(|v| v.is_finite())
}

/// Read a `# key=value` line into `station`; unknown keys are ignored.
fn metadata(body: &str, station: &mut StationInfo) -> Result<(), CsvProblem> {
    let Some((key, value)) = body.split_once('=') else {
        return Ok(());
    };
    let (key, value) = (key.trim(), value.trim());
    let number = |k: &'static str| parse_f64(value).ok_or(CsvProblem::BadMetadata { key: k });
    match key {
        "station" => {
            let mut id = heapless::String::<MAX_ID_LEN>::new();
            let ok = !value.is_empty()
                && value.chars().all(|c| c.is_ascii_graphic())
                && id.push_str(value).is_ok();
            if !ok {
                return Err(CsvProblem::BadMetadata { key: "station" });
            }
            station.id = id;
        }
        "lat" => {
            let v = number("lat")?;
            if !(-90.0..=90.0).contains(&v) {
                return Err(CsvProblem::BadMetadata { key: "lat" });
            }
            station.lat_deg = Some(v);
        }
        "lon" => {
            let v = number("lon")?;
            if !(-180.0..=360.0).contains(&v) {
                return Err(CsvProblem::BadMetadata { key: "lon" });
            }
            station.lon_deg = Some(if v > 180.0 { v - 360.0 } else { v });
        }
        "elevation_m" => {
            let v = number("elevation_m")?;
            if !(-500.0..=9000.0).contains(&v) {
                return Err(CsvProblem::BadMetadata { key: "elevation_m" });
            }
            station.elevation_m = Some(v);
        }
        "time" => {
            station.time = Some(parse_time(value).ok_or(CsvProblem::BadMetadata { key: "time" })?)
        }
        _ => {}
    }
    Ok(())
}

/// `DD HH:MM` → time.
fn parse_time(s: &str) -> Option<ObsTime> {
    let (day, hm) = s.split_once(' ')?;
    let (h, m) = hm.trim().split_once(':')?;
    let t = ObsTime {
        day: day.trim().parse().ok()?,
        hour: h.parse().ok()?,
        minute: m.parse().ok()?,
    };
    ((1..=31).contains(&t.day) && t.hour < 24 && t.minute < 60).then_some(t)
}

/// Parse a sounding CSV.
pub fn parse(text: &str) -> Result<Profile, CsvError> {
    let mut station = StationInfo::default();
    let mut header: heapless::Vec<Column, MAX_COLUMNS> = heapless::Vec::new();
    let mut have_header = false;
    let mut profile: Option<Profile> = None;
    let err = |line: usize, problem| CsvError {
        line: line as u32,
        problem,
    };
    for (n, raw) in text.lines().enumerate() {
        let line_no = n + 1;
        let line = raw.trim();
        if line.is_empty() {
            continue;
        }
        if let Some(body) = line.strip_prefix('#') {
            let target = match profile.as_mut() {
                Some(p) => &mut p.station,
                None => &mut station,
            };
            metadata(body, target).map_err(|p| err(line_no, p))?;
            continue;
        }
        if !have_header {
            for (i, name) in cells(line).enumerate() {
                let col = Column::from_name(&name.to_ascii_lowercase_fixed()).ok_or(err(
                    line_no,
                    CsvProblem::UnknownColumn {
                        position: (i + 1).min(255) as u8,
                    },
                ))?;
                let clash = header.iter().any(|&c| same_quantity(c, col));
                if clash {
                    return Err(err(line_no, CsvProblem::DuplicateColumn { column: col }));
                }
                header
                    .push(col)
                    .map_err(|_| err(line_no, CsvProblem::DuplicateColumn { column: col }))?;
            }
            let has = |c: Column| header.contains(&c);
            if !has(Column::PressureHpa) {
                return Err(err(
                    line_no,
                    CsvProblem::MissingColumn {
                        what: "pressure_hpa",
                    },
                ));
            }
            if !has(Column::TemperatureC) && !has(Column::TemperatureK) {
                return Err(err(
                    line_no,
                    CsvProblem::MissingColumn {
                        what: "temperature_c or temperature_k",
                    },
                ));
            }
            let dir = has(Column::WindDirDeg);
            let speed = has(Column::WindSpeedKt) || has(Column::WindSpeedMs);
            if dir != speed {
                return Err(err(line_no, CsvProblem::HalfWind));
            }
            have_header = true;
            profile = Some(Profile::new(core::mem::take(&mut station)));
            continue;
        }
        let Some(p) = profile.as_mut() else {
            return Err(err(line_no, CsvProblem::NoHeader));
        };
        let level = row(line, &header).map_err(|e| err(line_no, e))?;
        p.push(level)
            .map_err(|e| err(line_no, CsvProblem::Level(e)))?;
    }
    match profile {
        None => Err(err(0, CsvProblem::NoHeader)),
        Some(p) if p.is_empty() => Err(err(0, CsvProblem::NoLevels)),
        Some(p) => Ok(p),
    }
}

/// Two columns that say the same thing (in the same or another unit).
fn same_quantity(a: Column, b: Column) -> bool {
    use Column::*;
    let q = |c| match c {
        PressureHpa => 0,
        HeightM => 1,
        TemperatureC | TemperatureK => 2,
        DewpointC | DewpointK => 3,
        WindDirDeg => 4,
        WindSpeedKt | WindSpeedMs => 5,
        Kind => 6,
    };
    q(a) == q(b)
}

/// Lower-case ASCII without allocation, for header names up to 32 bytes.
trait LowerFixed {
    fn to_ascii_lowercase_fixed(&self) -> heapless::String<32>;
}

impl LowerFixed for str {
    fn to_ascii_lowercase_fixed(&self) -> heapless::String<32> {
        let mut out = heapless::String::new();
        for c in self.chars() {
            if out.push(c.to_ascii_lowercase()).is_err() {
                // Too long for any known name: an unknown column either way.
                break;
            }
        }
        out
    }
}

fn row(line: &str, header: &[Column]) -> Result<Level, CsvProblem> {
    let mut level = Level::at_pressure(f64::NAN);
    let (mut dir, mut speed) = (None, None);
    let mut count = 0usize;
    for (i, cell) in cells(line).enumerate() {
        count += 1;
        let Some(&col) = header.get(i) else {
            continue;
        };
        if cell.is_empty() {
            continue;
        }
        if col == Column::Kind {
            for word in cell.split('+') {
                let k = KIND_WORDS
                    .iter()
                    .find(|(w, _)| *w == word.trim())
                    .ok_or(CsvProblem::BadKind)?;
                level.kind = level.kind.with(k.1);
            }
            continue;
        }
        let v = parse_f64(cell).ok_or(CsvProblem::BadNumber { column: col })?;
        match col {
            Column::PressureHpa => level.pressure_pa = v * 100.0,
            Column::HeightM => level.height_m = Some(v),
            Column::TemperatureC => level.temperature_k = Some(v + super::thermo::ZERO_CELSIUS_K),
            Column::TemperatureK => level.temperature_k = Some(v),
            Column::DewpointC => level.dewpoint_k = Some(v + super::thermo::ZERO_CELSIUS_K),
            Column::DewpointK => level.dewpoint_k = Some(v),
            Column::WindDirDeg => dir = Some(v),
            Column::WindSpeedKt => speed = Some(v * MS_PER_KNOT),
            Column::WindSpeedMs => speed = Some(v),
            Column::Kind => {}
        }
    }
    if count != header.len() {
        return Err(CsvProblem::FieldCount {
            expected: header.len() as u8,
            got: count.min(255) as u8,
        });
    }
    if level.pressure_pa.is_nan() {
        return Err(CsvProblem::NoPressure);
    }
    level.wind = match (dir, speed) {
        (Some(d), Some(s)) => Some(Wind {
            dir_from_deg: d,
            speed_ms: s,
        }),
        (None, None) => None,
        _ => return Err(CsvProblem::HalfWindCell),
    };
    Ok(level)
}

/// Write `v` with at most six decimals and no trailing zeros (1e-6 of a hPa, °C or knot
/// is far below any instrument's resolution).
fn number(out: &mut impl Write, v: f64) -> fmt::Result {
    let mut buf: heapless::String<48> = heapless::String::new();
    if write!(buf, "{v:.6}").is_err() {
        // Beyond 48 characters: no sounding value is that large; write it in full.
        return write!(out, "{v}");
    }
    let t = if buf.contains('.') {
        buf.trim_end_matches('0').trim_end_matches('.')
    } else {
        buf.as_str()
    };
    out.write_str(if t == "-0" { "0" } else { t })
}

/// Write `profile` as leeward's sounding CSV (°C, knots), metadata first; values carry at
/// most six decimals.
pub fn write<const N: usize>(profile: &Profile<N>, out: &mut impl Write) -> fmt::Result {
    let s = &profile.station;
    if !s.id.is_empty() {
        writeln!(out, "# station={}", s.id)?;
    }
    if let Some(v) = s.lat_deg {
        writeln!(out, "# lat={v}")?;
    }
    if let Some(v) = s.lon_deg {
        writeln!(out, "# lon={v}")?;
    }
    if let Some(v) = s.elevation_m {
        writeln!(out, "# elevation_m={v}")?;
    }
    if let Some(t) = s.time {
        writeln!(out, "# time={:02} {:02}:{:02}", t.day, t.hour, t.minute)?;
    }
    writeln!(
        out,
        "pressure_hpa,height_m,temperature_c,dewpoint_c,wind_dir_deg,wind_speed_kt,kind"
    )?;
    let c = super::thermo::ZERO_CELSIUS_K;
    for l in profile.levels() {
        number(out, l.pressure_pa / 100.0)?;
        out.write_char(',')?;
        if let Some(z) = l.height_m {
            number(out, z)?;
        }
        out.write_char(',')?;
        if let Some(t) = l.temperature_k {
            number(out, t - c)?;
        }
        out.write_char(',')?;
        if let Some(td) = l.dewpoint_k {
            number(out, td - c)?;
        }
        out.write_char(',')?;
        if let Some(w) = l.wind {
            number(out, w.dir_from_deg)?;
            out.write_char(',')?;
            number(out, w.speed_ms / MS_PER_KNOT)?;
        } else {
            out.write_char(',')?;
        }
        out.write_char(',')?;
        let mut first = true;
        for (word, k) in KIND_WORDS {
            if l.kind.contains(k) {
                if !first {
                    out.write_char('+')?;
                }
                out.write_str(word)?;
                first = false;
            }
        }
        out.write_char('\n')?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    const SAMPLE: &str = "# station=TCOL\n# lat=45.5\n# lon=-140.5\n# elevation_m=1850\n\
        # time=14 12:00\n# a free comment\n\
        pressure_hpa, height_m, temperature_c, dewpoint_c, wind_dir_deg, wind_speed_kt\n\
        800,1850,9.0,6.0,260,30\n\
        700,,1.5,,265,35\n\
        \n\
        500,5600,-20.5,-30,,\n";

    #[test]
    fn reads_metadata_units_and_missing_cells() {
        let p = parse(SAMPLE).unwrap();
        assert_eq!(p.station.id.as_str(), "TCOL");
        assert_eq!(p.station.elevation_m, Some(1850.0));
        assert_eq!(p.station.time.unwrap().hour, 12);
        assert_eq!(p.len(), 3);
        let l = p.levels()[1];
        assert_eq!(l.pressure_pa, 70_000.0);
        assert_eq!(l.height_m, None);
        assert_eq!(l.dewpoint_k, None);
        assert_relative_eq!(l.temperature_k.unwrap(), 274.65, epsilon = 1e-9);
        // 35 kt = 35 · 1852/3600 m/s (definition of the knot).
        assert_relative_eq!(l.wind.unwrap().speed_ms, 18.005_555, epsilon = 1e-5);
        assert!(p.levels()[2].wind.is_none());
    }

    #[test]
    fn kelvin_and_metres_per_second_columns() {
        let p = parse("wind_speed_ms,temperature_k,pressure_hpa,wind_dir_deg\n10,280,900,90\n")
            .unwrap();
        let l = p.levels()[0];
        assert_eq!(l.temperature_k, Some(280.0));
        assert_eq!(l.wind.unwrap().speed_ms, 10.0);
    }

    #[test]
    fn errors_name_the_line_and_the_problem() {
        let e = |t: &str| parse(t).unwrap_err();
        assert_eq!(e("").problem, CsvProblem::NoHeader);
        assert_eq!(
            e("pressure_hpa,temp\n").problem,
            CsvProblem::UnknownColumn { position: 2 }
        );
        assert_eq!(
            e("pressure_hpa,height_m\n").problem,
            CsvProblem::MissingColumn {
                what: "temperature_c or temperature_k"
            }
        );
        assert_eq!(
            e("pressure_hpa,temperature_c,temperature_k\n").problem,
            CsvProblem::DuplicateColumn {
                column: Column::TemperatureK
            }
        );
        assert_eq!(
            e("pressure_hpa,temperature_c,wind_dir_deg\n").problem,
            CsvProblem::HalfWind
        );
        let bad = e("pressure_hpa,temperature_c\n1000,10\n900,x\n");
        assert_eq!(bad.line, 3);
        assert_eq!(
            bad.problem,
            CsvProblem::BadNumber {
                column: Column::TemperatureC
            }
        );
        assert_eq!(
            e("pressure_hpa,temperature_c\n1000,10,3\n").problem,
            CsvProblem::FieldCount {
                expected: 2,
                got: 3
            }
        );
        let order = e("pressure_hpa,temperature_c\n900,10\n950,12\n");
        assert_eq!(order.line, 3);
        assert!(matches!(
            order.problem,
            CsvProblem::Level(Error::BadLevel { .. })
        ));
        assert_eq!(
            e("pressure_hpa,temperature_c\n").problem,
            CsvProblem::NoLevels
        );
        assert_eq!(
            e("# lat=95\npressure_hpa,temperature_c\n").problem,
            CsvProblem::BadMetadata { key: "lat" }
        );
        let shown = alloc_free_display(&bad);
        assert!(
            shown.starts_with("line 3: temperature_c is not a number"),
            "{shown}"
        );
    }

    fn alloc_free_display(e: &CsvError) -> heapless::String<200> {
        let mut s = heapless::String::new();
        let _ = write!(s, "{e}");
        s
    }

    #[test]
    fn write_then_read_gives_the_same_profile() {
        let mut p = parse(SAMPLE).unwrap();
        let mut top = p.levels()[2];
        top.pressure_pa = 25_000.0;
        top.height_m = Some(10_400.0);
        top.kind = LevelKind::TROPOPAUSE.with(LevelKind::STANDARD);
        p.push(top).unwrap();
        let mut text: heapless::String<2048> = heapless::String::new();
        write(&p, &mut text).unwrap();
        let back = parse(&text).unwrap();
        assert_eq!(back.station, p.station);
        assert_eq!(back.len(), p.len());
        for (a, b) in back.levels().iter().zip(p.levels()) {
            assert_relative_eq!(a.pressure_pa, b.pressure_pa, epsilon = 1e-3);
            assert_eq!(a.height_m, b.height_m);
            assert_eq!(a.kind, b.kind);
            match (a.temperature_k, b.temperature_k) {
                (Some(x), Some(y)) => assert_relative_eq!(x, y, epsilon = 1e-5),
                (x, y) => assert_eq!(x, y),
            }
            match (a.wind, b.wind) {
                (Some(x), Some(y)) => assert_relative_eq!(x.speed_ms, y.speed_ms, epsilon = 1e-5),
                (x, y) => assert_eq!(x, y),
            }
        }
    }
}
