//! Where the device keeps what must survive a power cut: the settings and named datasets
//! (station sets, soundings). The app never touches storage while handling a key: it
//! returns an [`crate::Effect`] and the caller's loop carries it out through this trait
//! ([`crate::App::apply`]). This crate provides [`MemStorage`] (RAM) and
//! [`crate::flash::FlashStore`] (NOR flash, power-cut safe).
//!
//! Datasets are bytes to the store. A station set is written in a fixed layout of our own
//! ([`encode_stations`], [`decode_stations`]) until the postcard encoding arrives with
//! the flash storage.

use crate::settings::{Settings, SETTINGS_BYTES};
use leeward_core::network::{Network, MAX_STATIONS};

/// Characters of a dataset name.
pub const NAME_LEN: usize = 8;
/// A dataset name: 1 to 8 of A-Z, 0-9, `-` and `_` (what the identifier editor types).
pub type DataName = heapless::String<NAME_LEN>;
/// Most datasets a store lists.
pub const MAX_DATASETS: usize = 16;
/// Bytes of data [`MemStorage`] holds, headers included (a fixed buffer, no heap).
pub const MEM_CAPACITY: usize = 4096;
/// Bytes each stored dataset costs besides its contents (kind, name, length).
pub const RECORD_HEADER: usize = 1 + NAME_LEN + 2;
/// Most bytes of one station in a station-set record (postcard: identifier length and up
/// to 8 characters, latitude and longitude, height, and the optional height error).
pub const STATION_BYTES: usize = 1 + NAME_LEN + 2 * 8 + 8 + 1 + 8;
/// Largest station-set record, bytes (tag and version, a count, then the stations).
pub const MAX_STATION_SET_BYTES: usize =
    crate::records::RECORD_PREFIX + 1 + MAX_STATIONS * STATION_BYTES;

/// What a dataset holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum DataKind {
    /// A station set for the Network task.
    Stations,
    /// An upper-air sounding.
    Sounding,
    /// A named site.
    Site,
    /// A ridge profile.
    Ridge,
}

impl DataKind {
    /// The word shown on the device.
    pub fn word(self) -> &'static str {
        match self {
            DataKind::Stations => "stations",
            DataKind::Sounding => "sounding",
            DataKind::Site => "site",
            DataKind::Ridge => "ridge",
        }
    }
    /// The kind's code in stored records and on the link.
    pub fn to_byte(self) -> u8 {
        match self {
            DataKind::Stations => 1,
            DataKind::Sounding => 2,
            DataKind::Site => 3,
            DataKind::Ridge => 4,
        }
    }
    /// The kind of a code; `None` for a code no kind has.
    pub fn from_byte(b: u8) -> Option<Self> {
        match b {
            1 => Some(DataKind::Stations),
            2 => Some(DataKind::Sounding),
            3 => Some(DataKind::Site),
            4 => Some(DataKind::Ridge),
            _ => None,
        }
    }
}

/// One entry of the store's list.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DataInfo {
    /// What it holds.
    pub kind: DataKind,
    /// Its name.
    pub name: DataName,
    /// Size of its contents, bytes.
    pub bytes: u16,
}

/// The store's list, in storage order.
pub type Catalog = heapless::Vec<DataInfo, MAX_DATASETS>;

/// Why a dataset operation failed.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum StoreError {
    /// Not enough free space: the dataset needs `need` bytes, `free` are left.
    Full {
        /// Bytes the dataset needs, its header included.
        need: usize,
        /// Bytes free.
        free: usize,
    },
    /// The store already lists as many datasets as it can.
    TooMany {
        /// How many it holds.
        max: usize,
    },
    /// Another dataset has this name.
    NameTaken,
    /// No dataset has this name.
    NotFound,
    /// The name is empty, too long, or holds a character a name cannot hold.
    BadName,
    /// The dataset is larger than the buffer given to read it, or than a dataset can be.
    TooBig {
        /// Its size, bytes.
        bytes: usize,
        /// The most that fits.
        max: usize,
    },
    /// The stored bytes are not a valid dataset of the kind expected.
    Damaged,
    /// The flash did not complete a write or read (the operation may not have
    /// happened).
    Flash,
    /// The storage area could not be read even after repair; it needs erasing.
    Corrupted,
    /// The results log is full: export it, then clear old entries.
    LogFull,
}

impl core::fmt::Display for StoreError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match *self {
            StoreError::Full { need, free } => {
                write!(f, "storage full: needs {need} bytes, {free} free")
            }
            StoreError::TooMany { max } => write!(f, "storage holds at most {max} datasets"),
            StoreError::NameTaken => write!(f, "that name is taken; choose another"),
            StoreError::NotFound => write!(f, "no dataset has that name"),
            StoreError::BadName => write!(f, "a name needs 1 to 8 of A-Z, 0-9, - and _"),
            StoreError::TooBig { bytes, max } => {
                write!(f, "dataset of {bytes} bytes; at most {max} fit")
            }
            StoreError::Damaged => write!(f, "the stored dataset is damaged"),
            StoreError::Flash => {
                write!(
                    f,
                    "flash did not answer; the change may not be saved: try again"
                )
            }
            StoreError::Corrupted => write!(
                f,
                "storage area unreadable: export what you can, then erase it under Data"
            ),
            StoreError::LogFull => {
                write!(f, "results log full: export it, then clear old entries")
            }
        }
    }
}

impl core::error::Error for StoreError {}

/// True when `name` can name a dataset.
pub fn valid_name(name: &str) -> bool {
    !name.is_empty()
        && name.len() <= NAME_LEN
        && name
            .bytes()
            .all(|b| b.is_ascii_uppercase() || b.is_ascii_digit() || b == b'-' || b == b'_')
}

/// A place to keep settings and named datasets.
pub trait Storage {
    /// Why a settings write failed.
    type Error;
    /// The stored settings, or `None` when nothing valid is stored.
    fn load_settings(&mut self) -> Option<Settings>;
    /// Store the settings.
    fn save_settings(&mut self, settings: &Settings) -> Result<(), Self::Error>;
    /// Every stored dataset.
    fn list(&mut self) -> Catalog;
    /// Read dataset `name` into `buf`: its kind and length.
    fn get(&mut self, name: &str, buf: &mut [u8]) -> Result<(DataKind, usize), StoreError>;
    /// Store a new dataset; an existing name is [`StoreError::NameTaken`], never
    /// overwritten.
    fn put(&mut self, kind: DataKind, name: &str, bytes: &[u8]) -> Result<(), StoreError>;
    /// Give dataset `from` the name `to`.
    fn rename(&mut self, from: &str, to: &str) -> Result<(), StoreError>;
    /// Remove dataset `name`.
    fn delete(&mut self, name: &str) -> Result<(), StoreError>;
    /// Bytes free for datasets (each costs [`RECORD_HEADER`] besides its contents).
    fn free_bytes(&mut self) -> usize;

    /// Entries in the results log, oldest first (a store without a log has none).
    fn log_len(&mut self) -> u32 {
        0
    }

    /// Results-log entry `index` (0 = the oldest kept) as its stored record, copied into
    /// `buf`; its length.
    fn log_entry(&mut self, index: u32, buf: &mut [u8]) -> Result<usize, StoreError> {
        let _ = (index, buf);
        Err(StoreError::NotFound)
    }
}

/// Storage in RAM, for the host and for tests; it holds the same bytes flash would.
///
/// Datasets lie packed in one buffer of [`MEM_CAPACITY`] bytes, each as kind (1 byte),
/// name (8, zero-padded), length (2, little-endian) and contents; deleting moves the
/// later ones down, so the free space is always one piece at the end.
#[derive(Debug, Clone)]
pub struct MemStorage {
    settings: Option<[u8; SETTINGS_BYTES]>,
    data: [u8; MEM_CAPACITY],
    used: usize,
    writes: u32,
}

impl Default for MemStorage {
    fn default() -> Self {
        MemStorage {
            settings: None,
            data: [0; MEM_CAPACITY],
            used: 0,
            writes: 0,
        }
    }
}

/// A record's place in the buffer.
#[derive(Debug, Clone, Copy)]
struct Record {
    start: usize,
    kind: DataKind,
    len: usize,
}

impl Record {
    fn end(&self) -> usize {
        self.start + RECORD_HEADER + self.len
    }
    fn body(&self) -> core::ops::Range<usize> {
        self.start + RECORD_HEADER..self.end()
    }
}

impl MemStorage {
    /// Empty storage, as after erasing.
    pub fn new() -> Self {
        Self::default()
    }
    /// How many writes it has taken (flash wears: tests check the app does not write
    /// on every key).
    pub fn writes(&self) -> u32 {
        self.writes
    }
    /// The raw stored settings record, if any.
    pub fn raw(&self) -> Option<&[u8; SETTINGS_BYTES]> {
        self.settings.as_ref()
    }
    /// Overwrite the raw settings record (tests use it to store garbage).
    pub fn _set_raw(&mut self, b: [u8; SETTINGS_BYTES]) {
        self.settings = Some(b);
    }
    /// Overwrite byte `i` of the dataset buffer (tests use it to damage a dataset).
    pub fn _poke(&mut self, i: usize, b: u8) {
        if let Some(x) = self.data.get_mut(i) {
            *x = b;
        }
    }

    /// The records in order; stops at the first header that does not make sense.
    fn records(&self) -> impl Iterator<Item = (Record, &[u8])> + '_ {
        let mut at = 0;
        core::iter::from_fn(move || {
            let head = self.data.get(at..at + RECORD_HEADER)?;
            if at + RECORD_HEADER > self.used {
                return None;
            }
            let kind = DataKind::from_byte(head[0])?;
            let len = u16::from_le_bytes([head[1 + NAME_LEN], head[2 + NAME_LEN]]) as usize;
            let r = Record {
                start: at,
                kind,
                len,
            };
            if r.end() > self.used {
                return None;
            }
            at = r.end();
            Some((r, &head[1..1 + NAME_LEN]))
        })
    }

    fn find(&self, name: &str) -> Option<Record> {
        self.records()
            .find(|(_, n)| name_eq(n, name))
            .map(|(r, _)| r)
    }

    fn count(&self) -> usize {
        self.records().count()
    }

    fn write_name(&mut self, at: usize, name: &str) {
        if let Some(slot) = self.data.get_mut(at + 1..at + 1 + NAME_LEN) {
            slot.fill(0);
            for (d, s) in slot.iter_mut().zip(name.bytes()) {
                *d = s;
            }
        }
    }

    fn wrote(&mut self) {
        self.writes = self.writes.saturating_add(1);
    }
}

fn name_eq(stored: &[u8], name: &str) -> bool {
    let n = stored.iter().position(|&b| b == 0).unwrap_or(stored.len());
    &stored[..n] == name.as_bytes()
}

fn name_of(stored: &[u8]) -> DataName {
    let mut out = DataName::new();
    for &b in stored.iter().take_while(|&&b| b != 0) {
        let _ = out.push(b as char);
    }
    out
}

impl Storage for MemStorage {
    type Error = core::convert::Infallible;

    fn load_settings(&mut self) -> Option<Settings> {
        self.settings.and_then(|b| Settings::from_bytes(&b))
    }

    fn save_settings(&mut self, settings: &Settings) -> Result<(), Self::Error> {
        self.settings = Some(settings.to_bytes());
        self.wrote();
        Ok(())
    }

    fn list(&mut self) -> Catalog {
        let mut c = Catalog::new();
        for (r, n) in self.records() {
            let info = DataInfo {
                kind: r.kind,
                name: name_of(n),
                bytes: r.len as u16,
            };
            if c.push(info).is_err() {
                break;
            }
        }
        c
    }

    fn get(&mut self, name: &str, buf: &mut [u8]) -> Result<(DataKind, usize), StoreError> {
        let r = self.find(name).ok_or(StoreError::NotFound)?;
        let max = buf.len();
        let out = buf
            .get_mut(..r.len)
            .ok_or(StoreError::TooBig { bytes: r.len, max })?;
        let body = self.data.get(r.body()).ok_or(StoreError::Damaged)?;
        out.copy_from_slice(body);
        Ok((r.kind, r.len))
    }

    fn put(&mut self, kind: DataKind, name: &str, bytes: &[u8]) -> Result<(), StoreError> {
        if !valid_name(name) {
            return Err(StoreError::BadName);
        }
        if self.find(name).is_some() {
            return Err(StoreError::NameTaken);
        }
        if bytes.len() > u16::MAX as usize {
            return Err(StoreError::TooBig {
                bytes: bytes.len(),
                max: u16::MAX as usize,
            });
        }
        if self.count() >= MAX_DATASETS {
            return Err(StoreError::TooMany { max: MAX_DATASETS });
        }
        let need = RECORD_HEADER + bytes.len();
        let free = self.free_bytes();
        if need > free {
            return Err(StoreError::Full { need, free });
        }
        let at = self.used;
        let len = (bytes.len() as u16).to_le_bytes();
        if let Some(h) = self.data.get_mut(at..at + RECORD_HEADER) {
            h[0] = kind.to_byte();
            h[1 + NAME_LEN] = len[0];
            h[2 + NAME_LEN] = len[1];
        }
        self.write_name(at, name);
        if let Some(b) = self.data.get_mut(at + RECORD_HEADER..at + need) {
            b.copy_from_slice(bytes);
        }
        self.used = at + need;
        self.wrote();
        Ok(())
    }

    fn rename(&mut self, from: &str, to: &str) -> Result<(), StoreError> {
        if !valid_name(to) {
            return Err(StoreError::BadName);
        }
        let r = self.find(from).ok_or(StoreError::NotFound)?;
        if from == to {
            return Ok(());
        }
        if self.find(to).is_some() {
            return Err(StoreError::NameTaken);
        }
        self.write_name(r.start, to);
        self.wrote();
        Ok(())
    }

    fn delete(&mut self, name: &str) -> Result<(), StoreError> {
        let r = self.find(name).ok_or(StoreError::NotFound)?;
        let end = r.end();
        self.data.copy_within(end..self.used, r.start);
        self.used -= end - r.start;
        self.data[self.used..].fill(0);
        self.wrote();
        Ok(())
    }

    fn free_bytes(&mut self) -> usize {
        MEM_CAPACITY.saturating_sub(self.used)
    }
}

/// Encode a station set as its stored record ([`crate::records`]: tag, schema version,
/// postcard) into `buf`; its length.
pub fn encode_stations(net: &Network, buf: &mut [u8]) -> Result<usize, StoreError> {
    use crate::records::Record;
    net.encode(buf).map_err(|_| StoreError::TooBig {
        bytes: MAX_STATION_SET_BYTES,
        max: buf.len(),
    })
}

/// Decode a stored station-set record, every station checked as if typed in.
pub fn decode_stations(bytes: &[u8]) -> Result<Network, StoreError> {
    use crate::records::Record;
    Network::decode(bytes).map_err(|_| StoreError::Damaged)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::settings::WindUnit;

    #[test]
    fn save_then_load() {
        let mut st = MemStorage::new();
        assert_eq!(st.load_settings(), None);
        let s = Settings {
            wind: WindUnit::Knot,
            ..Settings::default()
        };
        st.save_settings(&s).unwrap();
        assert_eq!(st.load_settings(), Some(s));
        assert_eq!(st.writes(), 1);
        st._set_raw([0; SETTINGS_BYTES]);
        assert_eq!(st.load_settings(), None);
    }
}
