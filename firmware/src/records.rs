//! The records the device keeps in flash, and how they are written: a record type tag, a
//! schema version, then the value in postcard's encoding (a compact, documented wire
//! format: varints for integers and lengths, little-endian IEEE 754 for `f64`, a 0/1 tag
//! byte for `Option`, a varint variant index for enums).
//!
//! | record | tag | value |
//! |---|---|---|
//! | [`SiteRecord`] | 1 | a named site: position and ground height |
//! | station set | 2 | a [`Network`] of up to 32 stations |
//! | sounding | 3 | a sounding [`Profile`] of up to 256 levels |
//! | ridge profile | 4 | a [`Ridge`] |
//! | settings | 5 | the [`Settings`] |
//! | [`LogEntry`] | 6 | one line of the results log |
//! | [`SourceText`] | 7 | the text a dataset was pushed as (after a sounding's record) |
//!
//! A sounding dataset is its sounding record, optionally followed by a [`SourceText`]
//! record holding the TEMP report it was decoded from, so that the laptop can have the
//! report back as it was sent ([`encode_sounding`], [`decode_sounding`]). The device
//! reads only the leading sounding record ([`Record::decode`] of [`Profile`] stops there);
//! a dataset without the trailer, as every firmware before this record wrote, is still a
//! sounding and pulls back as CSV.
//!
//! A newer firmware reads what an older one wrote: [`Record::decode`] dispatches on the
//! stored schema version, and each version a firmware ever wrote keeps its decoder here.
//! A version newer than this firmware knows is [`RecordError::NewerVersion`], never a
//! guess. Every decoded value is checked again by the core as if typed in: damaged flash
//! is an error, never a strange sounding.

use heapless::Vec;
use leeward_core::crossing::Ridge;
use leeward_core::geo::LatLon;
use leeward_core::network::{Network, Station};
use leeward_core::sounding::Profile;
use serde::{Deserialize, Serialize};

use crate::settings::Settings;
use crate::storage::{valid_name, DataName};

/// Schema version this firmware writes.
pub const SCHEMA_VERSION: u8 = 1;

/// Bytes before the value: the tag and the schema version.
pub const RECORD_PREFIX: usize = 2;

/// Why stored bytes are not a record.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum RecordError {
    /// Fewer bytes than a record header.
    Truncated,
    /// The bytes hold another type of record.
    WrongType {
        /// Tag expected.
        expected: u8,
        /// Tag found.
        found: u8,
    },
    /// Written by a newer firmware, with a schema this one does not know.
    NewerVersion {
        /// Version found.
        found: u8,
        /// Newest version this firmware reads.
        known: u8,
    },
    /// The bytes do not decode as the record.
    Malformed,
    /// The record decodes, but a value in it is not physically possible.
    Invalid,
    /// The buffer given to write the record into is too small.
    BufferTooSmall,
}

impl core::fmt::Display for RecordError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match *self {
            RecordError::Truncated => write!(f, "stored record is cut short"),
            RecordError::WrongType { .. } => write!(f, "stored record is of another kind"),
            RecordError::NewerVersion { found, known } => write!(
                f,
                "stored record has format {found}; this firmware reads up to {known}: update it"
            ),
            RecordError::Malformed => write!(f, "stored record is damaged"),
            RecordError::Invalid => write!(f, "stored record holds an impossible value"),
            RecordError::BufferTooSmall => write!(f, "record too large for its buffer"),
        }
    }
}

impl core::error::Error for RecordError {}

/// A named observing site.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SiteRecord {
    /// Its name (a dataset name).
    pub name: DataName,
    /// Position.
    pub pos: LatLon,
    /// Ground height, m above mean sea level.
    pub elevation_m: f64,
}

/// Which calculation a results-log entry records.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum LogTask {
    /// f and β at a site.
    Site,
    /// Geostrophic wind and vorticity from a station set.
    Network,
    /// Column stretching.
    Column,
    /// A ridge-crossing track.
    Crossing,
    /// Sounding checks.
    Sounding,
}

/// Most inputs a log entry names.
pub const LOG_INPUTS: usize = 4;
/// Most figures a log entry keeps.
pub const LOG_VALUES: usize = 8;

/// One line of the results log: what was computed, from which inputs, when.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LogEntry {
    /// Running number, from 0 at the first entry ever written.
    pub seq: u32,
    /// UTC time, seconds since 2000-01-01T00:00Z, when the clock was set (by the link);
    /// `None` otherwise.
    pub utc_s: Option<u32>,
    /// Seconds since power on, always known.
    pub uptime_s: u32,
    /// The calculation.
    pub task: LogTask,
    /// Names of the datasets it read (empty when typed in).
    pub inputs: Vec<DataName, LOG_INPUTS>,
    /// Its main figures in SI units, in the order the task's result page shows them.
    pub values: Vec<f64, LOG_VALUES>,
}

/// A value the device stores: a tag, a schema version, and checks on decoding.
pub trait Record: Sized {
    /// The record type's tag.
    const TAG: u8;
    /// Write the record into `buf`; the length written.
    fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError>;
    /// Read a record written by this or any older firmware.
    fn decode(bytes: &[u8]) -> Result<Self, RecordError>;
}

/// Write tag, version and `value`.
fn encode_value<T: Serialize>(tag: u8, value: &T, buf: &mut [u8]) -> Result<usize, RecordError> {
    let (head, body) = buf
        .split_at_mut_checked(RECORD_PREFIX)
        .ok_or(RecordError::BufferTooSmall)?;
    head[0] = tag;
    head[1] = SCHEMA_VERSION;
    let n = postcard::to_slice(value, body)
        .map_err(|_| RecordError::BufferTooSmall)?
        .len();
    Ok(RECORD_PREFIX + n)
}

/// Check tag and version; the version and the value's bytes.
fn open(tag: u8, bytes: &[u8]) -> Result<(u8, &[u8]), RecordError> {
    let [t, v, body @ ..] = bytes else {
        return Err(RecordError::Truncated);
    };
    if *t != tag {
        return Err(RecordError::WrongType {
            expected: tag,
            found: *t,
        });
    }
    if *v > SCHEMA_VERSION {
        return Err(RecordError::NewerVersion {
            found: *v,
            known: SCHEMA_VERSION,
        });
    }
    Ok((*v, body))
}

/// Decode all of `body` as a `T` (trailing bytes mean damage).
fn whole<'a, T: Deserialize<'a>>(body: &'a [u8]) -> Result<T, RecordError> {
    match postcard::take_from_bytes::<T>(body) {
        Ok((v, [])) => Ok(v),
        _ => Err(RecordError::Malformed),
    }
}

/// Decode the value of a record whose schema has only ever had version 1.
fn decode_v1<'a, T: Deserialize<'a>>(tag: u8, bytes: &'a [u8]) -> Result<T, RecordError> {
    match open(tag, bytes)? {
        (1, body) => whole(body),
        // Version 0 was never written: treat as damage.
        _ => Err(RecordError::Malformed),
    }
}

fn finite_in(x: f64, lo: f64, hi: f64) -> Result<f64, RecordError> {
    if x.is_finite() && (lo..=hi).contains(&x) {
        Ok(x)
    } else {
        Err(RecordError::Invalid)
    }
}

impl Record for SiteRecord {
    const TAG: u8 = 1;
    fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError> {
        encode_value(Self::TAG, self, buf)
    }
    fn decode(bytes: &[u8]) -> Result<Self, RecordError> {
        let r: SiteRecord = decode_v1(Self::TAG, bytes)?;
        if !valid_name(&r.name) {
            return Err(RecordError::Invalid);
        }
        let pos = LatLon::new(r.pos.lat_deg, r.pos.lon_deg).map_err(|_| RecordError::Invalid)?;
        // Dead Sea shore to above any summit (the core's terrain range).
        let elevation_m = finite_in(r.elevation_m, -500.0, 9000.0)?;
        Ok(SiteRecord {
            name: r.name,
            pos,
            elevation_m,
        })
    }
}

impl Record for Network {
    const TAG: u8 = 2;
    fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError> {
        encode_value(Self::TAG, self, buf)
    }
    fn decode(bytes: &[u8]) -> Result<Self, RecordError> {
        let raw: Network = decode_v1(Self::TAG, bytes)?;
        let mut net = Network::new();
        for s in &raw.stations {
            let st = Station::new(&s.id, s.pos.lat_deg, s.pos.lon_deg, s.height_m, s.sigma_m)
                .map_err(|_| RecordError::Invalid)?;
            net.push(st).map_err(|_| RecordError::Invalid)?;
        }
        Ok(net)
    }
}

/// The sounding record at the start of `bytes`, checked, and the bytes after it.
fn leading_profile(bytes: &[u8]) -> Result<(Profile, &[u8]), RecordError> {
    let (raw, rest) = match open(Profile::TAG, bytes)? {
        (1, body) => {
            postcard::take_from_bytes::<Profile>(body).map_err(|_| RecordError::Malformed)?
        }
        // Version 0 was never written: treat as damage.
        _ => return Err(RecordError::Malformed),
    };
    // Rebuild level by level so that every check of typed-in data applies.
    let mut p = Profile::new(raw.station.clone());
    for l in raw.levels() {
        p.push(*l).map_err(|_| RecordError::Invalid)?;
    }
    Ok((p, rest))
}

impl Record for Profile {
    const TAG: u8 = 3;
    fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError> {
        encode_value(Self::TAG, self, buf)
    }
    /// Reads the sounding record at the start of `bytes` and ignores what follows it: a
    /// sounding dataset may carry trailing records (its [`SourceText`]) that the device
    /// has no use for. [`decode_sounding`] checks the trailer too.
    fn decode(bytes: &[u8]) -> Result<Self, RecordError> {
        leading_profile(bytes).map(|(p, _)| p)
    }
}

/// The body of a sounding (Profile) record at the start of `bytes`, after its tag and
/// version have been checked: for a reader that takes its levels one by one
/// ([`crate::sounding::load_profile`]).
pub fn open_profile(bytes: &[u8]) -> Result<&[u8], RecordError> {
    match open(<Profile as Record>::TAG, bytes)? {
        (1, body) => Ok(body),
        _ => Err(RecordError::Malformed),
    }
}

/// The text formats a [`SourceText`] can hold.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SourceFormat {
    /// A WMO FM 35 TEMP report (parts TTAA, TTBB, …), as the file held it.
    Temp,
}

/// The text a dataset was pushed as, kept after its record so that the laptop gets the
/// same text back. Borrowed: the device never needs to read it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct SourceText<'a> {
    /// What the text is.
    pub format: SourceFormat,
    /// The text, byte for byte.
    pub text: &'a str,
}

impl<'a> SourceText<'a> {
    /// The record type's tag.
    pub const TAG: u8 = 7;

    /// Write the record into `buf`; the length written.
    pub fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError> {
        encode_value(Self::TAG, self, buf)
    }

    /// Read a source-text record that fills all of `bytes`.
    pub fn decode(bytes: &'a [u8]) -> Result<Self, RecordError> {
        decode_v1(Self::TAG, bytes)
    }
}

/// Write a sounding dataset: the sounding record, then `source` when given; the length.
pub fn encode_sounding(
    profile: &Profile,
    source: Option<&SourceText<'_>>,
    buf: &mut [u8],
) -> Result<usize, RecordError> {
    let n = profile.encode(buf)?;
    let Some(src) = source else {
        return Ok(n);
    };
    let rest = buf.get_mut(n..).ok_or(RecordError::BufferTooSmall)?;
    Ok(n + src.encode(rest)?)
}

/// Read a sounding dataset: the sounding, and the text it was pushed as if the dataset
/// keeps it (`None` for a dataset written without one, as by firmware before the
/// [`SourceText`] record). Anything after the sounding that is not a whole source-text
/// record is an error.
pub fn decode_sounding(bytes: &[u8]) -> Result<(Profile, Option<SourceText<'_>>), RecordError> {
    let (p, rest) = leading_profile(bytes)?;
    if rest.is_empty() {
        return Ok((p, None));
    }
    Ok((p, Some(SourceText::decode(rest)?)))
}

impl Record for Ridge {
    const TAG: u8 = 4;
    fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError> {
        encode_value(Self::TAG, self, buf)
    }
    fn decode(bytes: &[u8]) -> Result<Self, RecordError> {
        let r: Ridge = decode_v1(Self::TAG, bytes)?;
        r.profile.validate().map_err(|_| RecordError::Invalid)?;
        finite_in(r.axis_deg, -360.0, 360.0)?;
        LatLon::new(r.anchor.lat_deg, r.anchor.lon_deg).map_err(|_| RecordError::Invalid)?;
        Ok(r)
    }
}

impl Record for Settings {
    const TAG: u8 = 5;
    fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError> {
        encode_value(Self::TAG, self, buf)
    }
    fn decode(bytes: &[u8]) -> Result<Self, RecordError> {
        decode_v1(Self::TAG, bytes)
    }
}

impl Record for LogEntry {
    const TAG: u8 = 6;
    fn encode(&self, buf: &mut [u8]) -> Result<usize, RecordError> {
        encode_value(Self::TAG, self, buf)
    }
    fn decode(bytes: &[u8]) -> Result<Self, RecordError> {
        let e: LogEntry = decode_v1(Self::TAG, bytes)?;
        // Results are finite numbers: anything else is damage.
        if e.inputs.iter().any(|n| !valid_name(n)) || e.values.iter().any(|v| !v.is_finite()) {
            return Err(RecordError::Invalid);
        }
        Ok(e)
    }
}

/// Decode any record by its tag, checking it; the tag on success. For the fuzz target
/// and for tools that look at raw flash. A sounding is checked as a whole dataset
/// ([`decode_sounding`]): its record and any source text after it.
pub fn check_any(bytes: &[u8]) -> Result<u8, RecordError> {
    let tag = *bytes.first().ok_or(RecordError::Truncated)?;
    match tag {
        SiteRecord::TAG => SiteRecord::decode(bytes).map(|_| tag),
        Network::TAG => Network::decode(bytes).map(|_| tag),
        Profile::TAG => decode_sounding(bytes).map(|_| tag),
        Ridge::TAG => Ridge::decode(bytes).map(|_| tag),
        Settings::TAG => Settings::decode(bytes).map(|_| tag),
        LogEntry::TAG => LogEntry::decode(bytes).map(|_| tag),
        SourceText::TAG => SourceText::decode(bytes).map(|_| tag),
        found => Err(RecordError::WrongType { expected: 0, found }),
    }
}

/// Largest encoded sounding, bytes: 256 levels of at most 54 bytes (pressure 8, three
/// optional values 9 each, an optional wind 17, the kind 1, rounded up) plus the station.
pub const MAX_SOUNDING_BYTES: usize = RECORD_PREFIX + 64 + leeward_core::sounding::MAX_LEVELS * 54;
