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
    /// No streamed write is open (it was never begun, or another change to the store
    /// ended it): the dataset must be sent again.
    Interrupted,
    /// A streamed part of `bytes` bytes where the store takes whole pieces of `part`
    /// (only the last part of a dataset may be shorter).
    PartSize {
        /// Bytes in the part.
        bytes: usize,
        /// The piece size of the store ([`Storage::part_bytes`]).
        part: usize,
    },
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
            StoreError::Interrupted => {
                write!(
                    f,
                    "the transfer was interrupted by another change: send it again"
                )
            }
            StoreError::PartSize { bytes, part } => {
                write!(
                    f,
                    "a piece of {bytes} bytes; the store takes pieces of {part}"
                )
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

/// What the store keeps about a dataset besides its bytes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DataHead {
    /// What it holds.
    pub kind: DataKind,
    /// Its length, bytes.
    pub len: usize,
    /// CRC-32 (ISO-HDLC, [`crate::flash::crc32`]) of all its bytes.
    pub crc: u32,
}

/// A place to keep settings and named datasets.
///
/// A dataset can be read a piece at a time ([`Storage::read_at`]) and written as it
/// arrives ([`Storage::put_begin`], [`Storage::put_part`], [`Storage::put_end`]), so that
/// no caller needs a buffer the size of the largest dataset: the link's pieces go to the
/// store as they come, and the Sounding task reads a stored sounding through a small
/// window. One streamed write is open at a time: [`Storage::put_begin`] and every other
/// change to the store (a put, rename, delete or settings write) end an open one, whose
/// later parts are then refused with [`StoreError::Interrupted`]. A streamed dataset is
/// seen by readers only once [`Storage::put_end`] has checked its CRC-32 and committed it.
pub trait Storage {
    /// Why a settings write failed.
    type Error;
    /// The stored settings, or `None` when nothing valid is stored.
    fn load_settings(&mut self) -> Option<Settings>;
    /// Store the settings.
    fn save_settings(&mut self, settings: &Settings) -> Result<(), Self::Error>;
    /// Every stored dataset.
    fn list(&mut self) -> Catalog;
    /// Copy the bytes of dataset `name` from byte `offset` into `buf`, as many as fit
    /// up to its end (none from an offset at or past the end): its head and how many
    /// were copied. The CRC is not checked on a piece; a reader that takes every piece
    /// checks it against [`DataHead::crc`] ([`Storage::get`], [`DataReader`]).
    fn read_at(
        &mut self,
        name: &str,
        offset: usize,
        buf: &mut [u8],
    ) -> Result<(DataHead, usize), StoreError>;
    /// Largest dataset the store takes, bytes.
    fn max_dataset_bytes(&self) -> usize;
    /// The size of the pieces [`Storage::put_part`] takes: every part but the last of a
    /// dataset is a whole number of them.
    fn part_bytes(&self) -> usize;
    /// Start a streamed write of a new dataset of `len` bytes: checks the name (an
    /// existing name is [`StoreError::NameTaken`], never overwritten), the size and the
    /// room, and ends any streamed write still open.
    fn put_begin(&mut self, kind: DataKind, name: &str, len: usize) -> Result<(), StoreError>;
    /// The next bytes of the open streamed write.
    fn put_part(&mut self, bytes: &[u8]) -> Result<(), StoreError>;
    /// Finish the open streamed write: once all `len` bytes are in and what the store
    /// holds has CRC-32 `crc`, the dataset is stored; a CRC that differs is
    /// [`StoreError::Damaged`] and nothing is stored. The write is closed either way.
    fn put_end(&mut self, crc: u32) -> Result<(), StoreError>;
    /// Drop the open streamed write, if any (nothing of it is kept).
    fn put_cancel(&mut self);
    /// Give dataset `from` the name `to`.
    fn rename(&mut self, from: &str, to: &str) -> Result<(), StoreError>;
    /// Remove dataset `name`.
    fn delete(&mut self, name: &str) -> Result<(), StoreError>;
    /// Bytes free for datasets (each costs [`RECORD_HEADER`] besides its contents).
    fn free_bytes(&mut self) -> usize;

    /// Read dataset `name` whole into `buf`, its CRC checked: its kind and length.
    fn get(&mut self, name: &str, buf: &mut [u8]) -> Result<(DataKind, usize), StoreError> {
        let (head, n) = self.read_at(name, 0, buf)?;
        if n < head.len {
            return Err(StoreError::TooBig {
                bytes: head.len,
                max: buf.len(),
            });
        }
        if crate::flash::crc32(buf.get(..n).unwrap_or(&[])) != head.crc {
            return Err(StoreError::Damaged);
        }
        Ok((head.kind, n))
    }

    /// Store a new dataset whole; an existing name is [`StoreError::NameTaken`], never
    /// overwritten.
    fn put(&mut self, kind: DataKind, name: &str, bytes: &[u8]) -> Result<(), StoreError> {
        self.put_begin(kind, name, bytes.len())?;
        // One part: the last part of a dataset may be of any length.
        if let Err(e) = self.put_part(bytes) {
            self.put_cancel();
            return Err(e);
        }
        self.put_end(crate::flash::crc32(bytes))
    }

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

/// A stored dataset read front to back through a small window, for a decoder that takes
/// its values one by one: the whole dataset never needs to be in RAM. Reading to the end
/// ([`DataReader::finish`]) checks its CRC-32.
pub struct DataReader<'w> {
    window: &'w mut [u8],
    /// Unread bytes are `window[start..end]`.
    start: usize,
    end: usize,
    /// Dataset offset of `window[end]`.
    offset: usize,
    head: DataHead,
    digest: crc::Digest<'static, u32>,
}

impl<'w> DataReader<'w> {
    /// Open dataset `name` for reading through `window` (its length bounds the largest
    /// value [`DataReader::take`] can decode).
    pub fn open<S: Storage>(
        store: &mut S,
        name: &str,
        window: &'w mut [u8],
    ) -> Result<Self, StoreError> {
        let (head, n) = store.read_at(name, 0, window)?;
        let mut digest = crate::flash::CRC32.digest();
        digest.update(window.get(..n).unwrap_or(&[]));
        Ok(DataReader {
            window,
            start: 0,
            end: n,
            offset: n,
            head,
            digest,
        })
    }

    /// What the store keeps about the dataset.
    pub fn head(&self) -> DataHead {
        self.head
    }

    /// The unread bytes in the window, refilled from the store first when fewer than
    /// `want` are left (fewer come back only at the dataset's end).
    pub fn peek<S: Storage>(
        &mut self,
        store: &mut S,
        name: &str,
        want: usize,
    ) -> Result<&[u8], StoreError> {
        if self.end - self.start < want && self.offset < self.head.len {
            self.window.copy_within(self.start..self.end, 0);
            self.end -= self.start;
            self.start = 0;
            let (head, n) = store.read_at(name, self.offset, &mut self.window[self.end..])?;
            if head != self.head {
                // Changed under the reader (deleted and written again): not one dataset.
                return Err(StoreError::Damaged);
            }
            self.digest.update(&self.window[self.end..self.end + n]);
            self.end += n;
            self.offset += n;
        }
        Ok(&self.window[self.start..self.end])
    }

    /// Mark `n` bytes of the window read.
    pub fn consume(&mut self, n: usize) {
        self.start = (self.start + n).min(self.end);
    }

    /// Read the rest of the dataset (a later firmware's additions, left undecoded) and
    /// check the CRC-32 of the whole: [`StoreError::Damaged`] if it differs.
    pub fn finish<S: Storage>(mut self, store: &mut S, name: &str) -> Result<(), StoreError> {
        while self.offset < self.head.len {
            self.start = self.end;
            let want = self.window.len();
            self.peek(store, name, want)?;
            if self.end == self.start {
                return Err(StoreError::Damaged);
            }
        }
        if self.digest.finalize() == self.head.crc {
            Ok(())
        } else {
            Err(StoreError::Damaged)
        }
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
    /// The streamed write open, its bytes going in after the last record.
    filling: Option<Filling>,
}

/// A streamed write into [`MemStorage`].
#[derive(Debug, Clone)]
struct Filling {
    kind: DataKind,
    name: DataName,
    len: usize,
    done: usize,
}

impl Default for MemStorage {
    fn default() -> Self {
        MemStorage {
            settings: None,
            data: [0; MEM_CAPACITY],
            used: 0,
            writes: 0,
            filling: None,
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
        self.filling = None;
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

    fn read_at(
        &mut self,
        name: &str,
        offset: usize,
        buf: &mut [u8],
    ) -> Result<(DataHead, usize), StoreError> {
        let r = self.find(name).ok_or(StoreError::NotFound)?;
        let body = self.data.get(r.body()).ok_or(StoreError::Damaged)?;
        let head = DataHead {
            kind: r.kind,
            len: r.len,
            crc: crate::flash::crc32(body),
        };
        let from = body.get(offset..).unwrap_or(&[]);
        let n = from.len().min(buf.len());
        buf[..n].copy_from_slice(&from[..n]);
        Ok((head, n))
    }

    fn max_dataset_bytes(&self) -> usize {
        MEM_CAPACITY - RECORD_HEADER
    }

    fn part_bytes(&self) -> usize {
        // Any size will do in RAM.
        1
    }

    fn put_begin(&mut self, kind: DataKind, name: &str, len: usize) -> Result<(), StoreError> {
        self.filling = None;
        if !valid_name(name) {
            return Err(StoreError::BadName);
        }
        if self.find(name).is_some() {
            return Err(StoreError::NameTaken);
        }
        if len > self.max_dataset_bytes() {
            return Err(StoreError::TooBig {
                bytes: len,
                max: self.max_dataset_bytes(),
            });
        }
        if self.count() >= MAX_DATASETS {
            return Err(StoreError::TooMany { max: MAX_DATASETS });
        }
        let need = RECORD_HEADER + len;
        let free = self.free_bytes();
        if need > free {
            return Err(StoreError::Full { need, free });
        }
        self.filling = Some(Filling {
            kind,
            name: name_of(name.as_bytes()),
            len,
            done: 0,
        });
        Ok(())
    }

    fn put_part(&mut self, bytes: &[u8]) -> Result<(), StoreError> {
        let f = self.filling.as_mut().ok_or(StoreError::Interrupted)?;
        if f.done + bytes.len() > f.len {
            return Err(StoreError::TooBig {
                bytes: f.done + bytes.len(),
                max: f.len,
            });
        }
        let at = self.used + RECORD_HEADER + f.done;
        let dst = self
            .data
            .get_mut(at..at + bytes.len())
            .ok_or(StoreError::Damaged)?;
        dst.copy_from_slice(bytes);
        f.done += bytes.len();
        Ok(())
    }

    fn put_end(&mut self, crc: u32) -> Result<(), StoreError> {
        let f = self.filling.take().ok_or(StoreError::Interrupted)?;
        if f.done != f.len {
            return Err(StoreError::Interrupted);
        }
        let at = self.used;
        let body = self
            .data
            .get(at + RECORD_HEADER..at + RECORD_HEADER + f.len)
            .ok_or(StoreError::Damaged)?;
        if crate::flash::crc32(body) != crc {
            return Err(StoreError::Damaged);
        }
        let len = (f.len as u16).to_le_bytes();
        if let Some(h) = self.data.get_mut(at..at + RECORD_HEADER) {
            h[0] = f.kind.to_byte();
            h[1 + NAME_LEN] = len[0];
            h[2 + NAME_LEN] = len[1];
        }
        self.write_name(at, &f.name);
        self.used = at + RECORD_HEADER + f.len;
        self.wrote();
        Ok(())
    }

    fn put_cancel(&mut self) {
        self.filling = None;
    }

    fn rename(&mut self, from: &str, to: &str) -> Result<(), StoreError> {
        self.filling = None;
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
        self.filling = None;
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
