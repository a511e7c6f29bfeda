//! The messages of the link. Each request gets exactly one reply with the request's
//! sequence number: the reply it asked for, or [`Reply::Error`].
//!
//! A session opens with [`Request::Hello`], which carries the host's protocol version; the
//! device refuses every other request until a Hello of its own version has arrived.

use serde::{Deserialize, Serialize};

/// The protocol version; the Hello exchange compares it.
pub const PROTOCOL_VERSION: u16 = 1;

/// Largest piece of a dataset in one frame, bytes.
pub const MAX_CHUNK: usize = 256;

/// Host to device.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum Request<'a> {
    /// Open a session: the host's protocol version.
    Hello {
        /// The host's [`PROTOCOL_VERSION`].
        version: u16,
    },
    /// How many datasets the device holds, and its free space.
    Status,
    /// The dataset at `index` of the device's list (0 = first).
    Entry {
        /// Position in the list.
        index: u16,
    },
    /// Up to [`MAX_CHUNK`] bytes of dataset `name` from `offset`.
    Get {
        /// Dataset name.
        name: &'a str,
        /// First byte wanted.
        offset: u32,
    },
    /// Start sending a dataset of `total` bytes whose CRC-32 is `crc`.
    PutBegin {
        /// Name to store it under.
        name: &'a str,
        /// Dataset kind code ([`crate::storage::DataKind`]).
        kind: u8,
        /// Size, bytes.
        total: u32,
        /// CRC-32 of the whole dataset.
        crc: u32,
    },
    /// The next piece of the dataset being sent.
    PutData {
        /// Where the piece goes.
        offset: u32,
        /// The piece (at most [`MAX_CHUNK`] bytes).
        bytes: &'a [u8],
    },
    /// All of it is sent: check and store it.
    PutCommit,
    /// Delete dataset `name`.
    Delete {
        /// Dataset name.
        name: &'a str,
    },
    /// Results-log entry `index` (0 = oldest kept).
    Log {
        /// Position in the log.
        index: u32,
    },
    /// Set the device clock.
    SetClock {
        /// Seconds since 1970-01-01 00:00 UTC.
        unix_s: u64,
    },
}

/// Device to host.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum Reply<'a> {
    /// The session is open.
    Hello {
        /// The device's [`PROTOCOL_VERSION`].
        version: u16,
        /// Largest dataset the device takes in one put, bytes.
        max_dataset: u32,
        /// Firmware version.
        firmware: &'a str,
    },
    /// The store's state.
    Status {
        /// Datasets stored.
        count: u16,
        /// Free space, bytes.
        free: u32,
        /// The device clock, seconds since 1970 UTC, if the host has set it.
        clock_unix_s: Option<u64>,
    },
    /// One entry of the dataset list.
    Entry {
        /// Datasets in the list.
        count: u16,
        /// Name.
        name: &'a str,
        /// Kind code.
        kind: u8,
        /// Size, bytes.
        bytes: u32,
        /// Free space of the store, bytes.
        free: u32,
    },
    /// A piece of a dataset.
    Chunk {
        /// Size of the whole dataset, bytes.
        total: u32,
        /// CRC-32 of the whole dataset.
        crc: u32,
        /// Kind code.
        kind: u8,
        /// Where the piece starts.
        offset: u32,
        /// The piece.
        bytes: &'a [u8],
    },
    /// Ready for the piece at `next` (after PutBegin and each PutData).
    Ready {
        /// Offset of the next byte wanted.
        next: u32,
    },
    /// The dataset is stored; what was read back.
    Stored {
        /// Size stored, bytes.
        bytes: u32,
        /// CRC-32 of the stored dataset, read back from the store.
        crc: u32,
    },
    /// The request was carried out (Delete, SetClock).
    Done,
    /// One results-log entry, as its stored bytes.
    LogEntry {
        /// Entries in the log.
        count: u32,
        /// The entry's bytes.
        bytes: &'a [u8],
    },
    /// The request was refused or the frame could not be read; nothing changed.
    Error {
        /// Why.
        error: LinkError,
    },
}

/// Why a request was refused. Every one leaves the device's data as it was.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum LinkError {
    /// The frame was damaged (COBS, CRC or length).
    Damaged,
    /// The frame was intact but not a request of this protocol.
    NotUnderstood,
    /// A request came before the Hello.
    NeedHello,
    /// The host speaks another protocol version.
    Version {
        /// The device's version.
        device: u16,
    },
    /// PutData or PutCommit without a PutBegin.
    NoPut,
    /// A piece at the wrong offset.
    OutOfOrder {
        /// The offset the device expects.
        next: u32,
    },
    /// PutCommit before every byte arrived.
    Incomplete {
        /// Bytes received.
        got: u32,
        /// Bytes announced.
        total: u32,
    },
    /// The assembled dataset's CRC-32 is not the one announced.
    CrcMismatch,
    /// The dataset or piece is larger than the device takes.
    TooBig {
        /// The most it takes, bytes.
        max: u32,
    },
    /// Not a dataset kind the device knows.
    BadKind,
    /// No dataset or log entry at that name or index.
    NotFound,
    /// A name needs 1 to 8 of A–Z, 0–9, - and _.
    BadName,
    /// A dataset of that name exists; delete it first or choose another name.
    NameTaken,
    /// The store is full.
    Full {
        /// Bytes needed.
        need: u32,
        /// Bytes free.
        free: u32,
    },
    /// The store holds its most datasets.
    TooMany {
        /// How many it holds.
        max: u16,
    },
    /// The stored dataset is damaged.
    StoreDamaged,
    /// The store failed to write.
    StoreFailed,
    /// The device keeps no results log.
    NoLog,
    /// The results log is full.
    LogFull,
}

impl core::fmt::Display for LinkError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match *self {
            LinkError::Damaged => write!(f, "the frame was damaged on the way"),
            LinkError::NotUnderstood => write!(f, "the device did not understand the request"),
            LinkError::NeedHello => write!(f, "the session was not opened (no Hello)"),
            LinkError::Version { device } => write!(
                f,
                "protocol mismatch: the device speaks version {device}, this program {PROTOCOL_VERSION}"
            ),
            LinkError::NoPut => write!(f, "no dataset is being sent"),
            LinkError::OutOfOrder { next } => write!(f, "piece out of order; expected offset {next}"),
            LinkError::Incomplete { got, total } => {
                write!(f, "dataset incomplete: {got} of {total} bytes arrived")
            }
            LinkError::CrcMismatch => write!(f, "the dataset arrived damaged (CRC mismatch); not stored"),
            LinkError::TooBig { max } => write!(f, "too large: the device takes at most {max} bytes"),
            LinkError::BadKind => write!(f, "the device does not know that kind of dataset"),
            LinkError::NotFound => write!(f, "the device has no dataset of that name"),
            LinkError::BadName => write!(f, "a name needs 1 to 8 of A-Z, 0-9, - and _"),
            LinkError::NameTaken => {
                write!(f, "the device already has a dataset of that name; delete it first or choose another name")
            }
            LinkError::Full { need, free } => {
                write!(f, "the device's storage is full: needs {need} bytes, {free} free")
            }
            LinkError::TooMany { max } => write!(f, "the device holds at most {max} datasets"),
            LinkError::StoreDamaged => write!(f, "the stored dataset is damaged"),
            LinkError::StoreFailed => write!(f, "the device's storage failed to write"),
            LinkError::NoLog => write!(f, "the device keeps no results log"),
            LinkError::LogFull => {
                write!(f, "the device's results log is full: export it, then clear old entries")
            }
        }
    }
}

impl core::error::Error for LinkError {}

impl From<crate::storage::StoreError> for LinkError {
    fn from(e: crate::storage::StoreError) -> Self {
        use crate::storage::StoreError as S;
        let n = |x: usize| u32::try_from(x).unwrap_or(u32::MAX);
        match e {
            S::Full { need, free } => LinkError::Full {
                need: n(need),
                free: n(free),
            },
            S::TooMany { max } => LinkError::TooMany {
                max: u16::try_from(max).unwrap_or(u16::MAX),
            },
            S::NameTaken => LinkError::NameTaken,
            S::NotFound => LinkError::NotFound,
            S::BadName => LinkError::BadName,
            S::TooBig { max, .. } => LinkError::TooBig { max: n(max) },
            S::Damaged | S::Corrupted => LinkError::StoreDamaged,
            S::Flash => LinkError::StoreFailed,
            S::LogFull => LinkError::LogFull,
            S::Interrupted => LinkError::NoPut,
            S::PartSize { .. } => LinkError::StoreFailed,
        }
    }
}
