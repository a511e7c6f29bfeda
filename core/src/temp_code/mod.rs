//! Decoder of WMO FM 35 TEMP upper-air reports (WMO Manual on Codes, WMO-No. 306,
//! Vol. I.1), Parts A and B, into one [`Profile`]. Works on `&str`, without allocation.
//!
//! ```
//! use leeward_core::temp_code::{decode, DecodeOptions};
//! // Invented, for the example: surface 1013 hPa, 1000, 925 and 850 hPa, no tropopause
//! // or maximum wind, winds in knots up to 850 hPa (Id = 8), then the end of the part.
//! let text = "TTAA 62128 03005 99013 15208 27010 00111 14408 27515 \
//!             92762 09618 28020 85457 06217 28525 88999 77999=";
//! let report = decode(text, &DecodeOptions { elevation_m: Some(5.0) }).unwrap();
//! assert_eq!(report.profile.len(), 4);
//! assert!(report.knots && report.issues.is_empty());
//! // 850 hPa: "85457" is 1457 m (the thousand is left out).
//! let top = report.profile.levels()[3];
//! assert_eq!((top.pressure_pa, top.height_m), (85_000.0, Some(1457.0)));
//! ```
//!
//! # What is decoded
//!
//! - **Part A** (`TTAA`): section 1 (`YYGGId`: day, hour, winds in knots when the day has
//!   50 added, `Id` the last standard surface with a wind group; `IIiii` the station);
//!   section 2, the surface (`99PoPoPo`) and the standard surfaces 1000 … 100 hPa with
//!   their height, temperature and dew-point depression, and wind up to `Id`;
//!   section 3, tropopauses (`88PPP`, `88999` for none); section 4, maximum winds
//!   (`77PPP` / `66PPP`, with the optional `4vbvbvava` shear group read over;
//!   `77999` for none).
//! - **Part B** (`TTBB`): section 5, significant temperature levels (`nnPPP TTTaDD`,
//!   nn = 00 for the surface, then 11, 22 … 99, 11 …); section 6 (`21212`), significant
//!   wind levels (`nnPPP dddff`).
//! - Sections 7 to 10 (`31313`, `41414`, `51515` … `69696`) are passed over with a note;
//!   Parts C and D (`TTCC`, `TTDD`, above 100 hPa) likewise.
//!
//! The text may hold Part A, Part B or both, in either order, repeated, with any blanks
//! and line breaks and with heading lines before the parts. A part ends at `=`, at the
//! next part's header, or at the end of the text.
//!
//! # Into the profile
//!
//! Every level goes in through [`Profile::merge`], ground up with the pressure strictly
//! decreasing; a level that is in both parts (a standard surface that is also a
//! significant level) becomes one level with the marks of both ([`LevelKind`]). Part A
//! is merged first, so its values win where the parts disagree. Heights come only from
//! Part A's standard surfaces; the surface height is the station elevation when the
//! caller gives it ([`DecodeOptions::elevation_m`]), the code does not carry it.
//! Standard surfaces below the ground (a pressure above the surface pressure) carry an
//! extrapolated height and no data in TEMP: they are not levels ([`Report::below_ground`]
//! counts them). When the surface pressure cannot be read from either part, standard
//! surfaces that carry only a height are left out for the same reason. Winds are
//! converted to m/s (1 kt = 1852 m per hour).
//!
//! # Garbled text
//!
//! Each group is decoded on its own: a bad temperature group leaves the level's height
//! and wind standing. Levels are found by their indicators, not by counting groups (see
//! `align`), so a deleted or doubled group costs only its own level's data. Every group
//! that could not be used is listed in [`Report::issues`] with its part, group index and
//! byte offset, and why ([`IssueKind`]); past [`MAX_ISSUES`] they are only counted. The
//! decoder refuses ([`DecodeError`]) only when no level is left.
//!
//! Sources: the code form and tables as described in the US Navy Aerographer's Mate
//! training manual (module 2, TEMP code) and public TEMP tutorials, checked against
//! FIELD-NOTES §7 (from memory); see `groups` for each table and where they differ.

mod align;
mod groups;
mod parts;
mod text;

use core::fmt;

use heapless::{String, Vec};

use crate::error::Error;
use crate::sounding::profile::HEIGHT_RANGE_M;
use crate::sounding::{Level, LevelKind, LevelProblem, ObsTime, Profile, StationInfo};
use groups::{has_indicator, value};
use text::{Groups, Header, PartSpan};

/// Most issues a report lists; further ones are counted in [`Report::issues_dropped`].
pub const MAX_ISSUES: usize = 32;
/// Longest text accepted, bytes (a TEMP bulletin is a few kilobytes).
pub const MAX_TEXT_BYTES: usize = 1 << 20;

/// What the caller knows that the code does not say.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DecodeOptions {
    /// Station elevation, m above mean sea level: becomes the surface level's height.
    pub elevation_m: Option<f64>,
}

/// Which part of a TEMP report.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum PartId {
    /// `TTAA`: standard surfaces up to 100 hPa.
    A,
    /// `TTBB`: significant levels up to 100 hPa.
    B,
    /// `TTCC`: standard surfaces above 100 hPa (not decoded).
    C,
    /// `TTDD`: significant levels above 100 hPa (not decoded).
    D,
}

/// The parts that were decoded.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Parts {
    /// A Part A was decoded.
    pub a: bool,
    /// A Part B was decoded.
    pub b: bool,
    /// Parts passed over: C, D, parts of another station or time, parts past the
    /// capacity.
    pub skipped: u8,
}

/// Why a group was not used (or, for the notes, what was passed over).
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum IssueKind {
    /// Characters other than figures and `/`.
    Unreadable,
    /// Not five characters.
    WrongLength,
    /// The date/time group cannot be read.
    BadDayTime,
    /// The station number cannot be read.
    BadStation,
    /// The wind unit is unknown (no readable date group in any part): winds not used.
    WindUnitUnknown,
    /// The `Id` figure cannot be read: where winds stop was guessed from the layout.
    WindTopGuessed,
    /// A level indicator is garbled: the level was placed by its neighbours.
    BadIndicator,
    /// A pressure is unreadable, impossible or out of order.
    BadPressure,
    /// The surface pressure cannot be read: surfaces with only a height were left out.
    SurfaceUnknown,
    /// A height figure is unreadable.
    BadHeight,
    /// A temperature outside −100 … +60 °C.
    BadTemperature,
    /// A dew-point depression code 51–55 (not used by the code).
    BadDewPoint,
    /// A wind direction above 360° or a speed above 150 m/s.
    BadWind,
    /// The level has a group missing: its data groups were not used.
    GroupMissing,
    /// A group too many in a level: left out.
    ExtraGroup,
    /// Groups that fit no level, from here on (how many).
    OutOfStep {
        /// Groups passed over.
        groups: u16,
    },
    /// Levels of the code's sequence are missing before this one (how many).
    LevelsMissing {
        /// Levels missing.
        levels: u16,
    },
    /// A group where none belongs.
    UnexpectedGroup,
    /// The level contradicts the others and was not used.
    LevelRefused {
        /// What is wrong.
        problem: LevelProblem,
    },
    /// The profile is full ([`crate::sounding::MAX_LEVELS`]).
    TooManyLevels,
    /// The part has more groups than the decoder holds: the rest was not read.
    TooManyGroups,
    /// The part is of another station or time than the first part: not merged.
    OtherStation,
    /// No `=` at the end of the part: the text may be cut short.
    NoEndMarker,
    /// Note: a regional, national, cloud or instrument section, not decoded.
    SectionSkipped,
    /// Note: a Part C or D (above 100 hPa), not decoded.
    PartSkipped,
}

impl IssueKind {
    /// The issue in a few words.
    pub fn statement(self) -> &'static str {
        match self {
            IssueKind::Unreadable => "garbled: characters other than figures and /",
            IssueKind::WrongLength => "not five figures",
            IssueKind::BadDayTime => "date and time group unreadable",
            IssueKind::BadStation => "station number unreadable",
            IssueKind::WindUnitUnknown => "wind unit unknown (knots or m/s): winds not used",
            IssueKind::WindTopGuessed => {
                "last wind level figure unreadable: guessed from the layout"
            }
            IssueKind::BadIndicator => "level indicator garbled: level placed by its neighbours",
            IssueKind::BadPressure => "pressure unreadable, impossible or out of order",
            IssueKind::SurfaceUnknown => {
                "surface pressure unreadable: levels with only a height left out"
            }
            IssueKind::BadHeight => "height unreadable",
            IssueKind::BadTemperature => "temperature impossible (outside -100 to +60 C)",
            IssueKind::BadDewPoint => "dew-point code 51 to 55 is not used",
            IssueKind::BadWind => "wind impossible (direction over 360 or speed over 150 m/s)",
            IssueKind::GroupMissing => "a group of this level is missing: its data not used",
            IssueKind::ExtraGroup => "a group too many: left out",
            IssueKind::OutOfStep { .. } => "groups out of step with the code: skipped",
            IssueKind::LevelsMissing { .. } => "levels missing before this one",
            IssueKind::UnexpectedGroup => "group where none belongs: skipped",
            IssueKind::LevelRefused { .. } => "level contradicts the others: not used",
            IssueKind::TooManyLevels => "too many levels: the rest not used",
            IssueKind::TooManyGroups => "part too long: the rest not read",
            IssueKind::OtherStation => "part of another station or time: not merged",
            IssueKind::NoEndMarker => "no = at the end: the text may be cut short",
            IssueKind::SectionSkipped => "note: regional or extra section not decoded",
            IssueKind::PartSkipped => "note: part C or D (above 100 hPa) not decoded",
        }
    }

    /// Whether this is a note (something passed over by design) rather than a fault.
    pub fn is_note(self) -> bool {
        matches!(self, IssueKind::SectionSkipped | IssueKind::PartSkipped)
    }
}

/// One group that could not be used, and where it is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GroupIssue {
    /// The part.
    pub part: PartId,
    /// Index of the group in its part: 0 is the `TTAA`/`TTBB` header; the part's group
    /// count for something missing at its end.
    pub group: u16,
    /// Byte offset of the group in the text (the part's end for something missing there).
    pub offset: u32,
    /// Why.
    pub kind: IssueKind,
}

impl fmt::Display for GroupIssue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let part = match self.part {
            PartId::A => 'A',
            PartId::B => 'B',
            PartId::C => 'C',
            PartId::D => 'D',
        };
        write!(
            f,
            "part {part} group {} (byte {}): {}",
            self.group,
            self.offset,
            self.kind.statement()
        )?;
        match self.kind {
            IssueKind::OutOfStep { groups } => write!(f, " ({groups} groups)"),
            IssueKind::LevelsMissing { levels } => write!(f, " ({levels})"),
            IssueKind::LevelRefused { problem } => write!(f, " ({})", problem.statement()),
            _ => Ok(()),
        }
    }
}

/// A decoded report.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Report {
    /// The sounding: station, time and levels from the ground up.
    pub profile: Profile,
    /// Which parts were decoded.
    pub parts: Parts,
    /// Whether the report gave its winds in knots (false: m/s, or no readable date
    /// group). The profile's winds are in m/s either way.
    pub knots: bool,
    /// Standard surfaces below the ground, left out.
    pub below_ground: u8,
    /// Groups that could not be used, and notes, in the order found.
    pub issues: Vec<GroupIssue, MAX_ISSUES>,
    /// Issues past [`MAX_ISSUES`], counted only.
    pub issues_dropped: u16,
}

/// Why a text could not be decoded at all.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum DecodeError {
    /// No `TTAA` or `TTBB` header in the text.
    NoReport,
    /// Parts were found, but no level could be read from them.
    NothingUsable {
        /// Parts A and B found.
        parts: u8,
        /// Groups that could not be used.
        issues: u16,
    },
    /// The station elevation given is not a number or outside −500 … 60 000 m.
    BadElevation {
        /// The elevation given, m.
        elevation_m: f64,
    },
    /// The text is longer than [`MAX_TEXT_BYTES`].
    TextTooLong {
        /// Its length, bytes.
        len: usize,
    },
}

impl fmt::Display for DecodeError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            DecodeError::NoReport => f.write_str(
                "no TEMP report found: the text must hold a Part A (TTAA) or Part B (TTBB)",
            ),
            DecodeError::NothingUsable { parts, issues } => write!(
                f,
                "the TEMP report could not be read: no level survived \
                 ({parts} parts, {issues} unusable groups)"
            ),
            DecodeError::BadElevation { elevation_m } => write!(
                f,
                "station elevation {elevation_m} m is not possible (-500 to 60000 m)"
            ),
            DecodeError::TextTooLong { len } => write!(
                f,
                "text of {len} bytes is too long for a TEMP report (at most {MAX_TEXT_BYTES})"
            ),
        }
    }
}

impl core::error::Error for DecodeError {}

/// Decode the TEMP Parts A and B in `text` into one profile (see the module doc).
pub fn decode(text: &str, opts: &DecodeOptions) -> Result<Report, DecodeError> {
    let bytes = text.as_bytes();
    if bytes.len() > MAX_TEXT_BYTES {
        return Err(DecodeError::TextTooLong { len: bytes.len() });
    }
    if let Some(z) = opts.elevation_m {
        if !z.is_finite() || !(HEIGHT_RANGE_M.0..=HEIGHT_RANGE_M.1).contains(&z) {
            return Err(DecodeError::BadElevation { elevation_m: z });
        }
    }
    let (spans, extra) = text::locate_parts(bytes);
    if !spans
        .iter()
        .any(|s| matches!(s.header, Header::A | Header::B))
    {
        return Err(DecodeError::NoReport);
    }
    let mut ctx = Ctx::new(opts.elevation_m);
    ctx.parts.skipped = ctx.parts.skipped.saturating_add(extra.min(255) as u8);

    // Pass 1: identification of every part, the wind unit and the surface pressure.
    let mut idents: Vec<Ident, { text::MAX_PARTS }> = Vec::new();
    for span in &spans {
        let g = Groups::of(bytes, span);
        let _ = idents.push(Ident::read(&g, span));
    }
    let knots = idents.iter().find_map(|i| i.day.map(|d| d.knots));
    ctx.knots = knots;
    for header in [Header::A, Header::B] {
        for (span, id) in spans.iter().zip(&idents) {
            if span.header == header && ctx.surface_pa.is_none() {
                let g = Groups::of(bytes, span);
                ctx.surface_pa =
                    surface_prescan(&g, header, id.data_at).map(|p| f64::from(p) * 100.0);
            }
        }
    }

    // Pass 2: Part A first (its values win), then Part B.
    let mut parts_found = 0u8;
    for header in [Header::A, Header::B, Header::C, Header::D] {
        for (span, id) in spans.iter().zip(&idents) {
            if span.header != header {
                continue;
            }
            let g = Groups::of(bytes, span);
            let part = id.part;
            if matches!(header, Header::C | Header::D) {
                ctx.issue(part, &g, 0, IssueKind::PartSkipped);
                ctx.parts.skipped = ctx.parts.skipped.saturating_add(1);
                continue;
            }
            parts_found = parts_found.saturating_add(1);
            if !ctx.same_sounding(id) {
                ctx.issue(part, &g, 0, IssueKind::OtherStation);
                ctx.parts.skipped = ctx.parts.skipped.saturating_add(1);
                continue;
            }
            id.report_issues(&mut ctx, &g);
            if g.get(id.data_at) != b"NIL" {
                let knots = id.day.map(|d| d.knots).or(ctx.knots);
                match header {
                    Header::A => parts::part_a(&mut ctx, &g, id, knots),
                    _ => parts::part_b(&mut ctx, &g, id, knots),
                }
            }
            if g.overflow {
                ctx.issue(part, &g, g.len(), IssueKind::TooManyGroups);
            } else if !span.ended {
                ctx.issue(part, &g, g.len(), IssueKind::NoEndMarker);
            }
            match header {
                Header::A => ctx.parts.a = true,
                _ => ctx.parts.b = true,
            }
        }
    }

    if ctx.profile.is_empty() {
        return Err(DecodeError::NothingUsable {
            parts: parts_found,
            issues: (ctx.issues.len() as u16).saturating_add(ctx.dropped),
        });
    }
    Ok(Report {
        profile: ctx.profile,
        parts: ctx.parts,
        knots: ctx.knots.unwrap_or(false),
        below_ground: ctx.below_ground,
        issues: ctx.issues,
        issues_dropped: ctx.dropped,
    })
}

/// Section 1 of a part, read before anything else.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Ident {
    pub part: PartId,
    /// Date/time group, where readable.
    pub day: Option<groups::DayTime>,
    /// Index of the date group, or `None` if it seems to be missing.
    pub day_at: Option<usize>,
    /// Station number, where readable.
    pub station: Option<[u8; 5]>,
    /// Index of the station group, or `None` if it seems to be missing.
    pub station_at: Option<usize>,
    /// Index of the first group of the data sections.
    pub data_at: usize,
}

impl Ident {
    fn read(g: &Groups, span: &PartSpan) -> Ident {
        let part = match span.header {
            Header::A => PartId::A,
            Header::B => PartId::B,
            Header::C => PartId::C,
            Header::D => PartId::D,
        };
        let surface_ind = if part == PartId::B { *b"00" } else { *b"99" };
        let (t1, t2) = (g.get(1), g.get(2));
        // A surface group where the station should be: one of the two groups is lost.
        let lost_one = has_indicator(t2, surface_ind) && !has_indicator(t1, surface_ind);
        let (day_at, station_at, data_at) = if lost_one {
            if groups::day_time(t1).is_ok() || !groups::is_station(t1) {
                (Some(1), None, 2)
            } else {
                (None, Some(1), 2)
            }
        } else {
            (Some(1), Some(2), 3)
        };
        let day = day_at.and_then(|i| groups::day_time(g.get(i)).ok());
        let station = station_at.and_then(|i| {
            let s = g.get(i);
            if groups::is_station(s) {
                let mut id = [0u8; 5];
                id.copy_from_slice(s);
                Some(id)
            } else {
                None
            }
        });
        Ident {
            part,
            day,
            day_at,
            station,
            station_at,
            data_at,
        }
    }

    fn report_issues(&self, ctx: &mut Ctx, g: &Groups) {
        match self.day_at {
            Some(i) if self.day.is_none() => ctx.issue(self.part, g, i, IssueKind::BadDayTime),
            None => ctx.issue(self.part, g, 1, IssueKind::BadDayTime),
            _ => {}
        }
        match self.station_at {
            Some(i) if self.station.is_none() => ctx.issue(self.part, g, i, IssueKind::BadStation),
            None => ctx.issue(self.part, g, 1, IssueKind::BadStation),
            _ => {}
        }
        if self.day.is_none() && ctx.knots.is_none() {
            ctx.issue(self.part, g, 1, IssueKind::WindUnitUnknown);
        }
    }
}

/// The surface pressure of a part, hPa, read ahead so that every part knows where the
/// ground is.
fn surface_prescan(g: &Groups, header: Header, data_at: usize) -> Option<u16> {
    let ind = match header {
        Header::A => *b"99",
        Header::B => *b"00",
        _ => return None,
    };
    (data_at.saturating_sub(1)..=data_at + 1)
        .map(|i| g.get(i))
        .find(|t| has_indicator(t, ind))
        .and_then(|t| groups::figures(t).ok())
        .and_then(|f| value(&f[2..5]))
        .map(groups::pressure_with_thousand_hpa)
}

/// The decoding state shared by the parts.
pub(crate) struct Ctx {
    pub profile: Profile,
    pub issues: Vec<GroupIssue, MAX_ISSUES>,
    pub dropped: u16,
    pub parts: Parts,
    pub knots: Option<bool>,
    /// Surface pressure, Pa.
    pub surface_pa: Option<f64>,
    pub elevation_m: Option<f64>,
    pub below_ground: u8,
    /// `SurfaceUnknown` was reported already.
    surface_unknown_said: bool,
    /// Station and time of the first part that had them.
    station: Option<[u8; 5]>,
    time: Option<(u8, u8)>,
}

impl Ctx {
    fn new(elevation_m: Option<f64>) -> Self {
        Ctx {
            profile: Profile::new(StationInfo {
                elevation_m,
                ..StationInfo::default()
            }),
            issues: Vec::new(),
            dropped: 0,
            parts: Parts::default(),
            knots: None,
            surface_pa: None,
            elevation_m,
            below_ground: 0,
            surface_unknown_said: false,
            station: None,
            time: None,
        }
    }

    /// Record an issue at group `i` of `g`.
    pub(crate) fn issue(&mut self, part: PartId, g: &Groups, i: usize, kind: IssueKind) {
        let issue = GroupIssue {
            part,
            group: i.min(u16::MAX as usize) as u16,
            offset: g.offset(i).min(u32::MAX as usize) as u32,
            kind,
        };
        if self.issues.push(issue).is_err() {
            self.dropped = self.dropped.saturating_add(1);
        }
    }

    /// Whether the part `id` belongs to the sounding of the parts before it; the first
    /// part with a station or time sets them.
    fn same_sounding(&mut self, id: &Ident) -> bool {
        if let (Some(a), Some(b)) = (self.station, id.station) {
            if a != b {
                return false;
            }
        }
        let time = id.day.map(|d| (d.day, d.hour));
        if let (Some(a), Some(b)) = (self.time, time) {
            if a != b {
                return false;
            }
        }
        if self.station.is_none() {
            if let Some(s) = id.station {
                self.station = Some(s);
                let mut name: String<{ crate::sounding::profile::MAX_ID_LEN }> = String::new();
                for &b in &s {
                    let _ = name.push(char::from(b));
                }
                self.profile.station.id = name;
            }
        }
        if self.time.is_none() {
            if let Some(d) = id.day {
                self.time = Some((d.day, d.hour));
                self.profile.station.time = Some(ObsTime {
                    day: d.day,
                    hour: d.hour,
                    minute: 0,
                });
            }
        }
        true
    }

    /// Put a decoded level into the profile, or say why not. `i` is its indicator group.
    pub(crate) fn add(&mut self, mut level: Level, part: PartId, g: &Groups, i: usize) {
        let surface = level.kind.contains(LevelKind::SURFACE);
        if surface && level.height_m.is_none() {
            level.height_m = self.elevation_m;
        }
        let has_data =
            level.temperature_k.is_some() || level.dewpoint_k.is_some() || level.wind.is_some();
        if !surface && !has_data && level.height_m.is_none() {
            return;
        }
        let standard = level.kind.contains(LevelKind::STANDARD);
        match self.surface_pa {
            Some(ps) if !surface && level.pressure_pa > ps + 0.5 => {
                if standard {
                    self.below_ground = self.below_ground.saturating_add(1);
                } else {
                    self.issue(part, g, i, IssueKind::BadPressure);
                }
                return;
            }
            None if standard && !has_data => {
                if !self.surface_unknown_said {
                    self.surface_unknown_said = true;
                    self.issue(part, g, i, IssueKind::SurfaceUnknown);
                }
                return;
            }
            _ => {}
        }
        match self.profile.merge(level) {
            Ok(()) => {}
            Err(Error::BadLevel { problem, .. }) => {
                self.issue(part, g, i, IssueKind::LevelRefused { problem })
            }
            Err(Error::CapacityExceeded { .. }) => self.issue(part, g, i, IssueKind::TooManyLevels),
            Err(_) => self.issue(
                part,
                g,
                i,
                IssueKind::LevelRefused {
                    problem: LevelProblem::Pressure,
                },
            ),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn opts(z: Option<f64>) -> DecodeOptions {
        DecodeOptions { elevation_m: z }
    }

    fn level_at(r: &Report, hpa: f64) -> Level {
        *r.profile
            .levels()
            .iter()
            .find(|l| (l.pressure_pa - hpa * 100.0).abs() < 0.5)
            .unwrap()
    }

    #[test]
    fn surfaces_below_the_ground_are_not_levels() {
        // Invented, for the test, by the WMO-306 FM 35 rules (as described in the
        // Aerographer's Mate manual; below-ground surfaces carry an extrapolated height
        // and slashes, from memory): station at 950 hPa, so 1000 hPa is below ground.
        let text = "TTAA 12127 01234 99950 10206 18005 00012 ///// ///// \
                    92760 09807 19010 85450 05021 20015 70/// ///// ///// 88999 77999=";
        let r = decode(text, &opts(Some(540.0))).unwrap();
        assert_eq!(r.below_ground, 1);
        assert!(!r.knots, "day 12 without 50 added: m/s");
        let ps: Vec<f64, 8> = r.profile.levels().iter().map(|l| l.pressure_pa).collect();
        // 700 hPa has nothing at all: not a level either.
        assert_eq!(ps.as_slice(), &[95_000.0, 92_500.0, 85_000.0]);
        let sfc = r.profile.levels()[0];
        assert_eq!(sfc.height_m, Some(540.0));
        assert!(sfc.kind.contains(LevelKind::SURFACE));
        let w = level_at(&r, 850.0).wind.unwrap();
        assert_eq!((w.dir_from_deg, w.speed_ms), (200.0, 15.0));
        assert_eq!(level_at(&r, 850.0).height_m, Some(1450.0));
        assert!(r.issues.is_empty(), "{:?}", r.issues);
    }

    #[test]
    fn tropopause_and_maximum_wind() {
        // Invented, for the test (WMO-306 FM 35 section 3 and 4 forms as described in
        // the Aerographer's Mate manual): winds in knots, tropopause at 228 hPa,
        // maximum wind 275° 125 kt at 240 hPa with a shear group.
        let text = "TTAA 62121 03005 99013 15208 27010 00111 14408 27515 92762 09618 28020 \
                    85457 06217 28525 70012 02740 29030 50557 21160 29545 40719 33370 29560 \
                    30916 47770 28580 25036 53570 27595 20178 55170 27590 15361 57370 27570 \
                    10618 59170 27050 88228 55570 27110 77240 27625 41020 51515 10164 00098=";
        let r = decode(text, &opts(None)).unwrap();
        assert!(r.issues.iter().all(|i| i.kind.is_note()), "{:?}", r.issues);
        assert_eq!(r.issues.len(), 1);
        assert_eq!(r.issues[0].kind, IssueKind::SectionSkipped);
        let tp = level_at(&r, 228.0);
        assert!(tp.kind.contains(LevelKind::TROPOPAUSE));
        assert_abs_diff_eq!(tp.temperature_k.unwrap(), -55.5 + 273.15, epsilon = 1e-9);
        assert_abs_diff_eq!(
            tp.wind.unwrap().speed_ms,
            110.0 * 1852.0 / 3600.0,
            epsilon = 1e-9
        );
        let mw = level_at(&r, 240.0);
        assert!(mw.kind.contains(LevelKind::MAX_WIND));
        assert_eq!(mw.wind.unwrap().dir_from_deg, 275.0);
        assert_abs_diff_eq!(
            mw.wind.unwrap().speed_ms,
            125.0 * 1852.0 / 3600.0,
            epsilon = 1e-9
        );
        // Surface unknown height without an elevation.
        assert_eq!(r.profile.levels()[0].height_m, None);
        assert_eq!(r.profile.station.id.as_str(), "03005");
        assert_eq!(
            r.profile.station.time,
            Some(ObsTime {
                day: 12,
                hour: 12,
                minute: 0
            })
        );
        assert_eq!(level_at(&r, 100.0).height_m, Some(16_180.0));
    }

    #[test]
    fn part_b_significant_temperature_and_wind_levels() {
        // Invented, for the test (WMO-306 FM 35 sections 5 to 8 as described in the
        // Aerographer's Mate manual).
        let text = "TTBB 6212/ 03005 00013 15208 11962 12010 22874 07019 33745 01522 \
                    21212 00013 27010 11940 28020 22800 28530 \
                    31313 58708 81104 41414 45701=";
        let r = decode(text, &opts(Some(5.0))).unwrap();
        let ps: Vec<f64, 8> = r.profile.levels().iter().map(|l| l.pressure_pa).collect();
        assert_eq!(
            ps.as_slice(),
            &[101_300.0, 96_200.0, 94_000.0, 87_400.0, 80_000.0, 74_500.0]
        );
        let kinds: Vec<LevelKind, 8> = r.profile.levels().iter().map(|l| l.kind).collect();
        assert_eq!(kinds[0], LevelKind::SURFACE);
        assert_eq!(kinds[1], LevelKind::SIGNIFICANT_TEMPERATURE);
        assert_eq!(kinds[2], LevelKind::SIGNIFICANT_WIND);
        // 33745 01522: -1.5 °C, depression 2.2.
        let l = level_at(&r, 745.0);
        assert_abs_diff_eq!(l.temperature_k.unwrap(), -1.5 + 273.15, epsilon = 1e-9);
        assert_abs_diff_eq!(l.dewpoint_k.unwrap(), -3.7 + 273.15, epsilon = 1e-9);
        // The surface wind from section 6 fills the surface level.
        assert!(r.profile.levels()[0].wind.is_some());
        let notes = r
            .issues
            .iter()
            .filter(|i| i.kind == IssueKind::SectionSkipped)
            .count();
        assert_eq!(notes, 2, "{:?}", r.issues);
        assert_eq!(r.issues.len(), 2);
    }

    #[test]
    fn refusals_have_a_clear_reason() {
        assert_eq!(
            decode("hello 12345", &opts(None)),
            Err(DecodeError::NoReport)
        );
        let e = decode("TTAA 62121 03005 ##### =", &opts(None)).unwrap_err();
        assert!(matches!(e, DecodeError::NothingUsable { parts: 1, .. }));
        assert!(std_string(&e).contains("no level survived"));
        assert!(matches!(
            decode("TTAA", &opts(Some(f64::NAN))),
            Err(DecodeError::BadElevation { .. })
        ));
    }

    #[test]
    fn a_missing_925_surface_is_said_not_guessed() {
        // Invented, for the test: 925 hPa left out (as in reports from before 925 hPa
        // became standard): 850 hPa must be read as 850, with the gap said.
        let text = "TTAA 62128 03005 99013 15208 27010 00111 14408 27515 \
                    85457 06217 28525 88999 77999=";
        let r = decode(text, &opts(None)).unwrap();
        assert_eq!(level_at(&r, 850.0).height_m, Some(1457.0));
        assert_eq!(r.issues.len(), 1);
        assert_eq!(r.issues[0].kind, IssueKind::LevelsMissing { levels: 1 });
        assert_eq!(r.issues[0].group, 9);
    }

    fn std_string(e: &DecodeError) -> String<160> {
        let mut s = String::new();
        let _ = core::fmt::write(&mut s, format_args!("{e}"));
        s
    }
}
