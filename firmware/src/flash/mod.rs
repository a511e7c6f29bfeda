//! The flash store: settings, named datasets and the results log on NOR flash, kept
//! through power cuts.
//!
//! Two areas of the flash, each a whole number of erase pages:
//! - the **map** area, a sequential-storage map from `u32` keys to byte values: the
//!   settings record, one commit record per dataset slot, and the dataset chunks;
//! - the **log** area, a sequential-storage queue of [`LogEntry`] records, oldest first.
//!
//! Both areas may be on one NOR flash, or on two flash types of different erase sizes
//! ([`TwoFlash`], as the board's 16 KiB and 128 KiB sectors): see [`Areas`].
//! The board's layout of the two areas, which the simulator's flash image copies, is
//! in [`layout`].
//!
//! A dataset is split into chunks of at most [`CHUNK_BYTES`] (a map item must fit in one
//! erase page, and a long sounding does not). Each slot has two banks of chunk keys; a new
//! generation of a dataset writes all its chunks into the bank the current generation
//! does not use, then one commit record (kind, name, generation, length, CRC-32 of the
//! whole dataset, chunk size). The commit is a single map item, so it is there or not:
//! a reader follows the commit to chunks of its own generation (each chunk carries the
//! generation number) and checks the CRC, so it never sees a mix of generations. Every
//! commit is checked at boot.
//!
//! Nothing is removed in place: a deleted dataset's commit and chunks are overwritten by
//! tombstones (a newer value for the same key), which works on flash that may not be
//! written twice. The log's oldest entries go only when [`FlashStore::log_drop_oldest`]
//! is called; [`FlashStore::log_warning`] says when the log is nearly full.
//!
//! The flash seen by sequential-storage must have a write size of at least 4 bytes
//! (its map loses items under power cuts on 1-byte words: docs/reliability.md).

pub mod blocking;
pub mod layout;
pub mod sim;

use core::ops::Range;

use embedded_storage::nor_flash::{MultiwriteNorFlash, NorFlash, ReadNorFlash};
use sequential_storage::cache::{Cache, Uncached};
use sequential_storage::map::{MapConfig, MapStorage};
use sequential_storage::queue::{QueueConfig, QueueStorage};

use self::blocking::{block_on, Async};
use crate::records::{LogEntry, Record};
use crate::settings::Settings;
use crate::storage::{
    valid_name, Catalog, DataHead, DataInfo, DataKind, DataName, Storage, StoreError, MAX_DATASETS,
};

/// Most bytes of dataset per chunk (less on flash with small pages).
pub const CHUNK_BYTES: usize = 1024;
/// Largest dataset, bytes: the largest sounding with room to spare.
pub const MAX_DATASET_BYTES: usize = 16 * 1024;
/// Smallest write size accepted (see the module documentation).
pub const MIN_WRITE_SIZE: usize = 4;
/// Bytes a chunk value carries besides its data: the generation number.
const CHUNK_HEAD: usize = 4;
/// Working buffer: one chunk item with its key, rounded up for 32-byte flash words.
const BUF_BYTES: usize = CHUNK_BYTES + CHUNK_HEAD + 64;
/// Most chunks of one dataset.
const MAX_CHUNKS: usize = 64;

/// The log counts as nearly full below this share of its area (1/8: our choice, about a
/// day of entries on the board's 128 KiB log).
pub const LOG_WARN_DIVISOR: u32 = 8;

type NoCache<K> = Cache<Uncached, Uncached, Uncached, K>;

/// The CRC-32 of datasets (ISO-HDLC, as in zlib and Ethernet).
pub static CRC32: crc::Crc<u32> = crc::Crc::<u32>::new(&crc::CRC_32_ISO_HDLC);

const SETTINGS_KEY: u32 = 1;
const COMMIT_TAG: u8 = 0xC1;
const COMMIT_VERSION: u8 = 1;
const TOMBSTONE: u8 = 0;

fn commit_key(slot: usize) -> u32 {
    0x0100_0000 | slot as u32
}

fn chunk_key(slot: usize, bank: u32, index: usize) -> u32 {
    0x0200_0000 | (slot as u32) << 16 | (bank & 1) << 8 | index as u32
}

/// CRC-32 (ISO-HDLC, as in zlib and Ethernet) of `bytes`.
pub fn crc32(bytes: &[u8]) -> u32 {
    CRC32.checksum(bytes)
}

/// A dataset's commit record.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
struct Commit {
    kind: u8,
    name: DataName,
    gen: u32,
    len: u32,
    crc: u32,
    chunk: u16,
}

impl Commit {
    fn chunks(&self) -> usize {
        (self.len as usize).div_ceil(self.chunk.max(1) as usize)
    }
    fn encode(&self, buf: &mut [u8]) -> Result<usize, StoreError> {
        let (head, body) = buf.split_at_mut_checked(2).ok_or(StoreError::Damaged)?;
        head.copy_from_slice(&[COMMIT_TAG, COMMIT_VERSION]);
        let n = postcard::to_slice(self, body)
            .map_err(|_| StoreError::Damaged)?
            .len();
        Ok(2 + n)
    }
}

/// What a slot's commit key holds.
#[derive(Debug, Clone, PartialEq, Eq)]
enum Slot {
    /// Never used, or deleted at generation `gen`.
    Free { gen: u32 },
    /// A dataset, checked at boot.
    Used(Commit),
    /// A dataset whose chunks do not match its commit (kept until deleted).
    Damaged(Commit),
    /// A commit this firmware cannot read (a newer one wrote it): left alone.
    Foreign,
}

/// One area's state after boot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum AreaState {
    /// Read without trouble.
    Ok,
    /// Could not be read even after sequential-storage's repair: its data cannot be
    /// trusted until the user erases the area ([`FlashStore::erase_datasets`],
    /// [`FlashStore::erase_log`]). Nothing is erased without being asked.
    Unreadable,
}

/// What the store found at boot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Health {
    /// The map area (settings and datasets).
    pub map: AreaState,
    /// The log area.
    pub log: AreaState,
    /// Datasets whose chunks do not match their commit record.
    pub damaged: u8,
    /// Commit records written by a newer firmware.
    pub foreign: u8,
    /// Whether a settings record was there but could not be read.
    pub settings_lost: bool,
    /// Log entries that could not be read (skipped).
    pub log_skipped: u16,
}

impl Health {
    /// Both areas readable, nothing damaged, lost or skipped.
    pub const OK: Health = Health {
        map: AreaState::Ok,
        log: AreaState::Ok,
        damaged: 0,
        foreign: 0,
        settings_lost: false,
        log_skipped: 0,
    };
}

/// A warning that the log is filling up.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LogWarning {
    /// Bytes left.
    pub free: u32,
    /// Bytes of the log area.
    pub capacity: u32,
}

impl core::fmt::Display for LogWarning {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        write!(
            f,
            "results log nearly full ({} of {} bytes left): export it, then clear old entries",
            self.free, self.capacity
        )
    }
}

/// Where the store's two areas live: a single NOR flash holds both (every `NorFlash` is
/// one), or a [`TwoFlash`] puts the map and the log on flash of different geometry, such
/// as a microcontroller's 16 KiB and 128 KiB sectors (sequential-storage wants equal
/// pages within an area, not across areas).
pub trait Areas {
    /// The flash of the map area (settings and datasets).
    type Map: NorFlash;
    /// The flash of the log area.
    type Log: NorFlash;
    /// The map area's flash.
    fn map(&mut self) -> &mut Self::Map;
    /// The log area's flash.
    fn log(&mut self) -> &mut Self::Log;
}

impl<F: NorFlash> Areas for F {
    type Map = F;
    type Log = F;
    fn map(&mut self) -> &mut F {
        self
    }
    fn log(&mut self) -> &mut F {
        self
    }
}

/// The map on one flash and the log on another (each with its own erase size). Both
/// see the same address space: the store's area ranges are offsets into it, and it
/// refuses areas that overlap.
#[derive(Debug, Clone)]
pub struct TwoFlash<M, L> {
    /// Flash of the map area.
    pub map: M,
    /// Flash of the log area.
    pub log: L,
}

impl<M: NorFlash, L: NorFlash> Areas for TwoFlash<M, L> {
    type Map = M;
    type Log = L;
    fn map(&mut self) -> &mut M {
        &mut self.map
    }
    fn log(&mut self) -> &mut L {
        &mut self.log
    }
}

/// Settings, datasets and results log on the flash areas `A`: one NOR flash, or a
/// [`TwoFlash`] with its map and its log on flash of different erase sizes.
#[derive(Debug)]
pub struct FlashStore<A> {
    flash: A,
    map_range: Range<u32>,
    log_range: Range<u32>,
    slots: [Slot; MAX_DATASETS],
    settings: Option<Settings>,
    health: Health,
    next_seq: u32,
    log_entries: u32,
    /// The streamed write open ([`Storage::put_begin`]).
    filling: Option<Filling>,
    buf: [u8; BUF_BYTES],
}

/// A streamed write: generation `gen` of slot `slot`, `done` of `len` bytes written
/// as chunks, no commit yet.
#[derive(Debug, Clone)]
struct Filling {
    slot: usize,
    gen: u32,
    kind: DataKind,
    name: DataName,
    len: usize,
    done: usize,
}

/// Why a store could not be set up on a flash (a wiring mistake, not damage).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum ConfigError {
    /// An area is not whole erase pages, overlaps the other, or is too small (the map
    /// needs 2 pages, the log 1).
    BadArea,
    /// The flash writes words of fewer than [`MIN_WRITE_SIZE`] bytes.
    WriteSizeTooSmall,
}

fn ss_err<E>(e: sequential_storage::Error<E>) -> StoreError {
    use sequential_storage::Error as E;
    match e {
        E::FullStorage => StoreError::Full { need: 0, free: 0 },
        E::Storage { .. } => StoreError::Flash,
        E::BufferTooSmall(n) => StoreError::TooBig {
            bytes: n,
            max: BUF_BYTES,
        },
        E::ItemTooBig | E::BufferTooBig => StoreError::TooBig {
            bytes: 0,
            max: CHUNK_BYTES,
        },
        E::SerializationError(_) => StoreError::Damaged,
        _ => StoreError::Corrupted,
    }
}

/// The map on `flash`, for one call.
fn map<'f, F: NorFlash>(
    flash: &'f mut F,
    range: &Range<u32>,
) -> Result<MapStorage<u32, Async<'f, F>, NoCache<u32>>, StoreError> {
    let cfg = MapConfig::try_new(range.clone()).map_err(|_| StoreError::Corrupted)?;
    Ok(MapStorage::new(Async(flash), cfg, Cache::new_uncached()))
}

/// The log queue on `flash`, for one call.
fn queue<'f, F: NorFlash>(
    flash: &'f mut F,
    range: &Range<u32>,
) -> Result<QueueStorage<Async<'f, F>, NoCache<()>>, StoreError> {
    let cfg = QueueConfig::try_new(range.clone()).map_err(|_| StoreError::Corrupted)?;
    Ok(QueueStorage::new(Async(flash), cfg, Cache::new_uncached()))
}

fn fetch<'d, F: NorFlash>(
    flash: &mut F,
    range: &Range<u32>,
    buf: &'d mut [u8],
    key: u32,
) -> Result<Option<&'d [u8]>, StoreError> {
    let mut m = map(flash, range)?;
    block_on(m.fetch_item::<&[u8]>(buf, &key)).map_err(ss_err)
}

fn store<F: NorFlash>(
    flash: &mut F,
    range: &Range<u32>,
    buf: &mut [u8],
    key: u32,
    value: &[u8],
) -> Result<(), StoreError> {
    let mut m = map(flash, range)?;
    block_on(m.store_item(buf, &key, &value)).map_err(ss_err)
}

impl<A: Areas> FlashStore<A> {
    /// Open the store on `flash`, with the map in `map_area` and the log in `log_area`
    /// (byte ranges of the flash, whole erase pages of their own area's flash, not
    /// overlapping: on a [`TwoFlash`] both ranges are offsets in one address space, as on
    /// a chip with sectors of two sizes). Reads and checks everything stored: see
    /// [`Self::health`]. An erased flash is an empty store.
    pub fn open(flash: A, map_area: Range<u32>, log_area: Range<u32>) -> Result<Self, ConfigError> {
        if A::Map::WRITE_SIZE < MIN_WRITE_SIZE || A::Log::WRITE_SIZE < MIN_WRITE_SIZE {
            return Err(ConfigError::WriteSizeTooSmall);
        }
        Self::_open_any_word(flash, map_area, log_area)
    }

    /// [`Self::open`] without the write-size check: only for the test that shows why
    /// the check is there.
    pub fn _open_any_word(
        mut flash: A,
        map_area: Range<u32>,
        log_area: Range<u32>,
    ) -> Result<Self, ConfigError> {
        let overlap = map_area.start < log_area.end && log_area.start < map_area.end;
        let fits = map_area.end as usize <= flash.map().capacity()
            && log_area.end as usize <= flash.log().capacity();
        if overlap
            || !fits
            || MapConfig::<Async<'_, A::Map>>::try_new(map_area.clone()).is_err()
            || QueueConfig::<Async<'_, A::Log>>::try_new(log_area.clone()).is_err()
        {
            return Err(ConfigError::BadArea);
        }
        let mut s = FlashStore {
            flash,
            map_range: map_area,
            log_range: log_area,
            slots: core::array::from_fn(|_| Slot::Free { gen: 0 }),
            settings: None,
            health: Health::OK,
            next_seq: 0,
            log_entries: 0,
            filling: None,
            buf: [0; BUF_BYTES],
        };
        s.boot_map();
        s.boot_log();
        Ok(s)
    }

    fn boot_map(&mut self) {
        self.health.map = AreaState::Ok;
        self.health.damaged = 0;
        self.health.foreign = 0;
        self.health.settings_lost = false;
        self.settings = None;
        match fetch(
            self.flash.map(),
            &self.map_range,
            &mut self.buf,
            SETTINGS_KEY,
        ) {
            Ok(Some(b)) => match Settings::decode(b) {
                Ok(s) => self.settings = Some(s),
                Err(_) => self.health.settings_lost = true,
            },
            Ok(None) => {}
            Err(_) => self.health.map = AreaState::Unreadable,
        }
        for i in 0..MAX_DATASETS {
            let slot = match self.read_slot(i) {
                Ok(s) => s,
                Err(_) => {
                    self.health.map = AreaState::Unreadable;
                    Slot::Foreign
                }
            };
            match slot {
                Slot::Damaged(_) => self.health.damaged += 1,
                Slot::Foreign => self.health.foreign += 1,
                _ => {}
            }
            self.slots[i] = slot;
        }
        if self.health.map == AreaState::Unreadable {
            self.health.foreign = 0;
        }
    }

    /// Write slot `i`'s commit record: the one item whose write makes a dataset's new
    /// generation (or its new name) the one readers see.
    fn write_commit(&mut self, i: usize, commit: &Commit) -> Result<(), StoreError> {
        let mut cbytes = [0u8; 64];
        let n = commit.encode(&mut cbytes)?;
        store(
            self.flash.map(),
            &self.map_range,
            &mut self.buf,
            commit_key(i),
            &cbytes[..n],
        )
    }

    fn read_slot(&mut self, i: usize) -> Result<Slot, StoreError> {
        let commit = match fetch(
            self.flash.map(),
            &self.map_range,
            &mut self.buf,
            commit_key(i),
        )? {
            None => return Ok(Slot::Free { gen: 0 }),
            Some([TOMBSTONE, g @ ..]) => {
                let gen = g
                    .try_into()
                    .map(u32::from_le_bytes)
                    .map_err(|_| StoreError::Damaged);
                return Ok(match gen {
                    Ok(gen) => Slot::Free { gen },
                    Err(_) => Slot::Foreign,
                });
            }
            Some([COMMIT_TAG, COMMIT_VERSION, body @ ..]) => {
                match postcard::from_bytes::<Commit>(body) {
                    Ok(c) => c,
                    Err(_) => return Ok(Slot::Foreign),
                }
            }
            Some(_) => return Ok(Slot::Foreign),
        };
        if !valid_name(&commit.name) || DataKind::from_byte(commit.kind).is_none() {
            return Ok(Slot::Foreign);
        }
        Ok(match self.read_chunks(i, &commit, None) {
            Ok(_) => Slot::Used(commit),
            Err(StoreError::Damaged) => Slot::Damaged(commit),
            Err(e) => return Err(e),
        })
    }

    /// Read (and check) the chunks of `c` in slot `i`, copying them into `out` if given.
    fn read_chunks(
        &mut self,
        i: usize,
        c: &Commit,
        mut out: Option<&mut [u8]>,
    ) -> Result<(), StoreError> {
        let len = c.len as usize;
        let chunk = c.chunk as usize;
        if len > MAX_DATASET_BYTES || chunk == 0 || chunk > CHUNK_BYTES || c.chunks() > MAX_CHUNKS {
            return Err(StoreError::Damaged);
        }
        let mut digest = CRC32.digest();
        for k in 0..c.chunks() {
            let data = self.chunk_data(i, c, k)?;
            let want = data.len();
            digest.update(data);
            if let Some(o) = out.as_deref_mut() {
                o.get_mut(k * chunk..k * chunk + want)
                    .ok_or(StoreError::Damaged)?
                    .copy_from_slice(data);
            }
        }
        if digest.finalize() != c.crc {
            return Err(StoreError::Damaged);
        }
        Ok(())
    }

    /// Chunk `k` of `c` in slot `i`, read into the working buffer and checked to be of
    /// `c`'s generation and of its length: its data.
    fn chunk_data(&mut self, i: usize, c: &Commit, k: usize) -> Result<&[u8], StoreError> {
        let chunk = c.chunk as usize;
        let want = chunk.min((c.len as usize).saturating_sub(k * chunk));
        let key = chunk_key(i, c.gen, k);
        let got = fetch(self.flash.map(), &self.map_range, &mut self.buf, key)?
            .ok_or(StoreError::Damaged)?;
        match got.split_at_checked(CHUNK_HEAD) {
            Some((g, data)) if g == c.gen.to_le_bytes() && data.len() == want => Ok(data),
            _ => Err(StoreError::Damaged),
        }
    }

    fn boot_log(&mut self) {
        self.health.log = AreaState::Ok;
        self.health.log_skipped = 0;
        self.next_seq = 0;
        self.log_entries = 0;
        let mut last = None;
        let mut skipped = 0u16;
        let mut count = 0u32;
        let r = self.for_each_raw(|b| {
            count += 1;
            match LogEntry::decode(b) {
                Ok(e) => last = Some(e.seq),
                Err(_) => skipped = skipped.saturating_add(1),
            }
        });
        if r.is_err() {
            self.health.log = AreaState::Unreadable;
        }
        self.next_seq = last.map_or(0, |s| s.wrapping_add(1));
        self.log_entries = count;
        self.health.log_skipped = skipped;
    }

    fn for_each_raw(&mut self, mut f: impl FnMut(&[u8])) -> Result<(), StoreError> {
        let mut q = queue(self.flash.log(), &self.log_range)?;
        let mut it = block_on(q.iter()).map_err(ss_err)?;
        loop {
            match block_on(it.next(&mut self.buf)).map_err(ss_err)? {
                Some(entry) => f(&entry[..]),
                None => return Ok(()),
            }
        }
    }

    /// What boot found.
    pub fn health(&self) -> Health {
        self.health
    }

    /// Give the flash back.
    pub fn into_flash(self) -> A {
        self.flash
    }

    /// The flash, to look at it.
    pub fn flash(&self) -> &A {
        &self.flash
    }

    /// The flash, for tests that set faults on it.
    pub fn _flash_mut(&mut self) -> &mut A {
        &mut self.flash
    }

    fn find(&self, name: &str) -> Option<usize> {
        self.slots.iter().position(|s| match s {
            Slot::Used(c) | Slot::Damaged(c) => c.name == name,
            _ => false,
        })
    }

    fn map_ok(&self) -> Result<(), StoreError> {
        match self.health.map {
            AreaState::Ok => Ok(()),
            AreaState::Unreadable => Err(StoreError::Corrupted),
        }
    }

    fn chunk_len(&self) -> usize {
        // A chunk item (header, key, generation, data, padding) must fit in one page
        // with room for the page markers; half a page leaves room for migration.
        let w = A::Map::WRITE_SIZE.max(A::Map::READ_SIZE);
        let room = (A::Map::ERASE_SIZE.saturating_sub(4 * w + 64) / 2) / w * w;
        CHUNK_BYTES.min(room).max(w)
    }

    fn item_bytes(&self, value: usize) -> usize {
        let w = A::Map::WRITE_SIZE.max(A::Map::READ_SIZE);
        MapStorage::<u32, Async<'_, A::Map>, NoCache<u32>>::item_overhead_size() as usize
            + (4 + value).div_ceil(w) * w
    }

    /// Flash bytes a dataset of `len` bytes takes, its commit included.
    fn dataset_cost(&self, len: usize) -> usize {
        let chunk = self.chunk_len();
        let chunks = len.div_ceil(chunk);
        chunks * self.item_bytes(CHUNK_HEAD + chunk) + self.item_bytes(48)
    }

    /// Write generation `gen` of `bytes` into slot `i` and commit it; the commit.
    fn write_generation(
        &mut self,
        i: usize,
        gen: u32,
        kind: DataKind,
        name: &str,
        bytes: &[u8],
    ) -> Result<Commit, StoreError> {
        let chunk = self.chunk_len();
        let commit = self.commit_for(gen, kind, name, bytes.len(), crc32(bytes))?;
        for (k, part) in bytes.chunks(chunk).enumerate() {
            self.write_chunk(i, gen, k, part)?;
        }
        self.write_commit(i, &commit)?;
        Ok(commit)
    }

    /// The commit record of generation `gen` of a dataset.
    fn commit_for(
        &self,
        gen: u32,
        kind: DataKind,
        name: &str,
        len: usize,
        crc: u32,
    ) -> Result<Commit, StoreError> {
        let mut cname = DataName::new();
        cname.push_str(name).map_err(|_| StoreError::BadName)?;
        Ok(Commit {
            kind: kind.to_byte(),
            name: cname,
            gen,
            len: len as u32,
            crc,
            chunk: self.chunk_len() as u16,
        })
    }

    /// Write chunk `k` of generation `gen` in slot `i`.
    fn write_chunk(&mut self, i: usize, gen: u32, k: usize, part: &[u8]) -> Result<(), StoreError> {
        let mut value = [0u8; CHUNK_HEAD + CHUNK_BYTES];
        let v = value
            .get_mut(..CHUNK_HEAD + part.len())
            .ok_or(StoreError::PartSize {
                bytes: part.len(),
                part: CHUNK_BYTES,
            })?;
        v[..CHUNK_HEAD].copy_from_slice(&gen.to_le_bytes());
        v[CHUNK_HEAD..].copy_from_slice(part);
        store(
            self.flash.map(),
            &self.map_range,
            &mut self.buf,
            chunk_key(i, gen, k),
            v,
        )
    }

    /// End the streamed write open, if any, burying what it wrote (best effort: its
    /// chunks are never read, since no commit points at them).
    fn end_filling(&mut self) {
        if let Some(f) = self.filling.take() {
            let chunks = f.done.div_ceil(self.chunk_len());
            let _ = self.bury(f.slot, f.gen, chunks);
        }
    }

    /// Overwrite the chunks of `c` with tombstones (frees their space; best effort:
    /// leftovers are never read, since no commit points at them).
    fn bury_chunks(&mut self, i: usize, c: &Commit) -> Result<(), StoreError> {
        self.bury(i, c.gen, c.chunks())
    }

    /// Overwrite the first `chunks` chunks of generation `gen` in slot `i` with
    /// tombstones.
    fn bury(&mut self, i: usize, gen: u32, chunks: usize) -> Result<(), StoreError> {
        for k in 0..chunks.min(MAX_CHUNKS) {
            store(
                self.flash.map(),
                &self.map_range,
                &mut self.buf,
                chunk_key(i, gen, k),
                &[TOMBSTONE],
            )?;
        }
        Ok(())
    }

    fn check_new(&mut self, len: usize) -> Result<(), StoreError> {
        if len > MAX_DATASET_BYTES {
            return Err(StoreError::TooBig {
                bytes: len,
                max: MAX_DATASET_BYTES,
            });
        }
        let need = self.dataset_cost(len);
        let free = self.free_flash();
        if need > free {
            return Err(StoreError::Full { need, free });
        }
        Ok(())
    }

    fn full(&mut self, e: StoreError, len: usize) -> StoreError {
        match e {
            StoreError::Full { .. } => StoreError::Full {
                need: self.dataset_cost(len),
                free: self.free_flash(),
            },
            e => e,
        }
    }

    /// Store `bytes` as dataset `name`, replacing the dataset of that name if there is
    /// one (atomically: a power cut leaves the old or the new version, never a mix).
    pub fn replace(&mut self, kind: DataKind, name: &str, bytes: &[u8]) -> Result<(), StoreError> {
        self.map_ok()?;
        if !valid_name(name) {
            return Err(StoreError::BadName);
        }
        let Some(i) = self.find(name) else {
            return self.put(kind, name, bytes);
        };
        self.end_filling();
        self.check_new(bytes.len())?;
        let old = match &self.slots[i] {
            Slot::Used(c) | Slot::Damaged(c) => c.clone(),
            _ => return Err(StoreError::NotFound),
        };
        let commit = self
            .write_generation(i, old.gen.wrapping_add(1), kind, name, bytes)
            .map_err(|e| self.full(e, bytes.len()))?;
        self.slots[i] = Slot::Used(commit);
        // Replaced once the commit is written; burying the old chunks only frees space.
        let _ = self.bury_chunks(i, &old);
        Ok(())
    }

    /// Erase the map area (settings and every dataset): the recovery path when
    /// [`Health::map`] is [`AreaState::Unreadable`]. Only on the user's explicit request.
    pub fn erase_datasets(&mut self) -> Result<(), StoreError> {
        self.filling = None;
        let mut m = map(self.flash.map(), &self.map_range)?;
        block_on(m.erase_all()).map_err(ss_err)?;
        self.boot_map();
        Ok(())
    }

    /// Erase the log area: the recovery path when [`Health::log`] is
    /// [`AreaState::Unreadable`]. Only on the user's explicit request.
    pub fn erase_log(&mut self) -> Result<(), StoreError> {
        let mut q = queue(self.flash.log(), &self.log_range)?;
        block_on(q.erase_all()).map_err(ss_err)?;
        self.boot_log();
        Ok(())
    }

    /// Bytes of map flash not taken by live items, less the room kept to delete the
    /// largest dataset and to move items between pages. An estimate (old tombstones are
    /// not counted): sequential-storage's own full-storage answer has the last word.
    fn free_flash(&self) -> usize {
        let pages = (self.map_range.end - self.map_range.start) as usize / A::Map::ERASE_SIZE;
        let w = A::Map::WRITE_SIZE.max(A::Map::READ_SIZE);
        let page_data = A::Map::ERASE_SIZE.saturating_sub(2 * w);
        let chunk_item = self.item_bytes(CHUNK_HEAD + self.chunk_len());
        // One page stays free for moving items; a page of chunks wastes its remainder.
        let capacity = pages.saturating_sub(1) * (page_data - page_data % chunk_item);
        let mut used = self.item_bytes(16); // settings
        let mut largest = 0;
        for s in &self.slots {
            used += match s {
                Slot::Used(c) | Slot::Damaged(c) => {
                    largest = largest.max(c.chunks());
                    self.dataset_cost(c.len as usize)
                }
                Slot::Free { gen: 0 } => 0,
                _ => self.item_bytes(8),
            };
        }
        // Tombstones to delete the largest dataset (a chunk's and the commit's).
        used += (largest + 1) * self.item_bytes(CHUNK_HEAD + 1);
        capacity.saturating_sub(used)
    }

    // ---- the results log ----

    /// Append `entry` to the log, numbered with the next running number (returned).
    /// A full log is [`StoreError::LogFull`]: entries are dropped only on request.
    pub fn log_push(&mut self, entry: &LogEntry) -> Result<u32, StoreError> {
        if self.health.log == AreaState::Unreadable {
            return Err(StoreError::Corrupted);
        }
        let mut e = entry.clone();
        e.seq = self.next_seq;
        let mut bytes = [0u8; 256];
        let n = e.encode(&mut bytes).map_err(|_| StoreError::TooBig {
            bytes: 256,
            max: 256,
        })?;
        let mut q = queue(self.flash.log(), &self.log_range)?;
        match block_on(q.push(&bytes[..n], false)).map_err(ss_err) {
            Ok(()) => {}
            Err(StoreError::Full { .. }) => return Err(StoreError::LogFull),
            Err(e) => return Err(e),
        }
        self.next_seq = self.next_seq.wrapping_add(1);
        self.log_entries += 1;
        Ok(e.seq)
    }

    /// Entries in the log.
    pub fn log_len(&self) -> u32 {
        self.log_entries
    }

    /// Bytes left in the log area.
    pub fn log_free(&mut self) -> Result<u32, StoreError> {
        let mut q = queue(self.flash.log(), &self.log_range)?;
        block_on(q.space_left()).map_err(ss_err)
    }

    /// A warning when less than 1/[`LOG_WARN_DIVISOR`] of the log area is left.
    pub fn log_warning(&mut self) -> Option<LogWarning> {
        let capacity = self.log_range.end - self.log_range.start;
        let free = self.log_free().unwrap_or(0);
        (free < capacity / LOG_WARN_DIVISOR).then_some(LogWarning { free, capacity })
    }

    /// Every readable log entry, oldest first; the number of entries that could not be
    /// read (skipped).
    pub fn log_for_each(&mut self, mut f: impl FnMut(&LogEntry)) -> Result<u32, StoreError> {
        let mut skipped = 0;
        self.for_each_raw(|b| match LogEntry::decode(b) {
            Ok(e) => f(&e),
            Err(_) => skipped += 1,
        })?;
        Ok(skipped)
    }
}

impl<A: Areas> FlashStore<A>
where
    A::Log: MultiwriteNorFlash,
{
    /// Drop the `n` oldest log entries (the user asked for it, having exported them);
    /// how many were dropped. Their space comes back a whole erase page at a time, once
    /// every entry on the page is gone.
    pub fn log_drop_oldest(&mut self, n: u32) -> Result<u32, StoreError> {
        let mut q = queue(self.flash.log(), &self.log_range)?;
        let mut dropped = 0;
        while dropped < n {
            match block_on(q.pop(&mut self.buf)).map_err(ss_err)? {
                Some(_) => dropped += 1,
                None => break,
            }
        }
        self.log_entries = self.log_entries.saturating_sub(dropped);
        Ok(dropped)
    }
}

impl<A: Areas> Storage for FlashStore<A> {
    type Error = StoreError;

    fn log_len(&mut self) -> u32 {
        self.log_entries
    }

    fn log_entry(&mut self, index: u32, buf: &mut [u8]) -> Result<usize, StoreError> {
        let mut i = 0u32;
        let mut found: Result<usize, StoreError> = Err(StoreError::NotFound);
        self.for_each_raw(|b| {
            if i == index {
                found = match buf.get_mut(..b.len()) {
                    Some(dst) => {
                        dst.copy_from_slice(b);
                        Ok(b.len())
                    }
                    None => Err(StoreError::TooBig {
                        bytes: b.len(),
                        max: buf.len(),
                    }),
                };
            }
            i += 1;
        })?;
        found
    }

    fn load_settings(&mut self) -> Option<Settings> {
        self.settings
    }

    fn save_settings(&mut self, settings: &Settings) -> Result<(), StoreError> {
        self.end_filling();
        self.map_ok()?;
        let mut bytes = [0u8; 32];
        let n = settings
            .encode(&mut bytes)
            .map_err(|_| StoreError::Damaged)?;
        store(
            self.flash.map(),
            &self.map_range,
            &mut self.buf,
            SETTINGS_KEY,
            &bytes[..n],
        )?;
        self.settings = Some(*settings);
        Ok(())
    }

    fn list(&mut self) -> Catalog {
        let mut c = Catalog::new();
        for s in &self.slots {
            if let Slot::Used(m) | Slot::Damaged(m) = s {
                if let Some(kind) = DataKind::from_byte(m.kind) {
                    let info = DataInfo {
                        kind,
                        name: m.name.clone(),
                        bytes: m.len.min(u16::MAX as u32) as u16,
                    };
                    let _ = c.push(info);
                }
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
        self.map_ok()?;
        let i = self.find(name).ok_or(StoreError::NotFound)?;
        let c = match &self.slots[i] {
            Slot::Used(c) => c.clone(),
            _ => return Err(StoreError::Damaged),
        };
        let head = DataHead {
            kind: DataKind::from_byte(c.kind).ok_or(StoreError::Damaged)?,
            len: c.len as usize,
            crc: c.crc,
        };
        let chunk = c.chunk as usize;
        if chunk == 0 || chunk > CHUNK_BYTES {
            return Err(StoreError::Damaged);
        }
        // Chunk by chunk from the one holding `offset`, each checked to be of this
        // generation and of its length; the whole dataset's CRC was checked at boot.
        let mut at = offset;
        let mut n = 0;
        while n < buf.len() && at < head.len {
            let k = at / chunk;
            let data = self.chunk_data(i, &c, k)?;
            let from = &data[at - k * chunk..];
            let m = from.len().min(buf.len() - n);
            buf[n..n + m].copy_from_slice(&from[..m]);
            n += m;
            at += m;
        }
        Ok((head, n))
    }

    fn max_dataset_bytes(&self) -> usize {
        MAX_DATASET_BYTES
    }

    fn part_bytes(&self) -> usize {
        self.chunk_len()
    }

    fn put_begin(&mut self, kind: DataKind, name: &str, len: usize) -> Result<(), StoreError> {
        self.end_filling();
        self.map_ok()?;
        if !valid_name(name) {
            return Err(StoreError::BadName);
        }
        if self.find(name).is_some() {
            return Err(StoreError::NameTaken);
        }
        let i = self
            .slots
            .iter()
            .position(|s| matches!(s, Slot::Free { .. }))
            .ok_or(StoreError::TooMany { max: MAX_DATASETS })?;
        self.check_new(len)?;
        let gen = match self.slots[i] {
            Slot::Free { gen } => gen.wrapping_add(1),
            _ => 1,
        };
        let mut dname = DataName::new();
        dname.push_str(name).map_err(|_| StoreError::BadName)?;
        self.filling = Some(Filling {
            slot: i,
            gen,
            kind,
            name: dname,
            len,
            done: 0,
        });
        Ok(())
    }

    fn put_part(&mut self, bytes: &[u8]) -> Result<(), StoreError> {
        let f = self.filling.clone().ok_or(StoreError::Interrupted)?;
        let chunk = self.chunk_len();
        if f.done + bytes.len() > f.len {
            self.end_filling();
            return Err(StoreError::TooBig {
                bytes: f.done + bytes.len(),
                max: f.len,
            });
        }
        let mut done = f.done;
        let mut wrote = Ok(());
        for part in bytes.chunks(chunk) {
            wrote = if part.len() == chunk || done + part.len() == f.len {
                self.write_chunk(f.slot, f.gen, done / chunk, part)
            } else {
                Err(StoreError::PartSize {
                    bytes: part.len(),
                    part: chunk,
                })
            };
            if wrote.is_err() {
                break;
            }
            done += part.len();
        }
        if let Some(open) = self.filling.as_mut() {
            open.done = done;
        }
        if let Err(e) = wrote {
            // What was written of it is buried.
            self.end_filling();
            return Err(self.full(e, f.len));
        }
        Ok(())
    }

    fn put_end(&mut self, crc: u32) -> Result<(), StoreError> {
        let f = self.filling.clone().ok_or(StoreError::Interrupted)?;
        if f.done != f.len {
            self.end_filling();
            return Err(StoreError::Interrupted);
        }
        let commit = self.commit_for(f.gen, f.kind, &f.name, f.len, crc)?;
        // What the flash holds is checked against the CRC before it is committed.
        if let Err(e) = self.read_chunks(f.slot, &commit, None) {
            self.end_filling();
            return Err(e);
        }
        if let Err(e) = self.write_commit(f.slot, &commit) {
            self.end_filling();
            return Err(self.full(e, f.len));
        }
        self.filling = None;
        self.slots[f.slot] = Slot::Used(commit);
        Ok(())
    }

    fn put_cancel(&mut self) {
        self.end_filling();
    }

    fn rename(&mut self, from: &str, to: &str) -> Result<(), StoreError> {
        self.end_filling();
        self.map_ok()?;
        if !valid_name(to) {
            return Err(StoreError::BadName);
        }
        let i = self.find(from).ok_or(StoreError::NotFound)?;
        if from == to {
            return Ok(());
        }
        if self.find(to).is_some() {
            return Err(StoreError::NameTaken);
        }
        let (mut c, damaged) = match &self.slots[i] {
            Slot::Used(c) => (c.clone(), false),
            Slot::Damaged(c) => (c.clone(), true),
            _ => return Err(StoreError::NotFound),
        };
        c.name.clear();
        c.name.push_str(to).map_err(|_| StoreError::BadName)?;
        self.write_commit(i, &c)?;
        self.slots[i] = if damaged {
            Slot::Damaged(c)
        } else {
            Slot::Used(c)
        };
        Ok(())
    }

    fn delete(&mut self, name: &str) -> Result<(), StoreError> {
        self.end_filling();
        self.map_ok()?;
        let i = self.find(name).ok_or(StoreError::NotFound)?;
        let c = match &self.slots[i] {
            Slot::Used(c) | Slot::Damaged(c) => c.clone(),
            _ => return Err(StoreError::NotFound),
        };
        let mut t = [TOMBSTONE; 5];
        t[1..].copy_from_slice(&c.gen.to_le_bytes());
        store(
            self.flash.map(),
            &self.map_range,
            &mut self.buf,
            commit_key(i),
            &t,
        )?;
        self.slots[i] = Slot::Free { gen: c.gen };
        if matches!(self.health.damaged, 1..)
            && self.slots.iter().all(|s| !matches!(s, Slot::Damaged(_)))
        {
            self.health.damaged = 0;
        }
        // The dataset is gone once the commit is; its chunks only free space.
        let _ = self.bury_chunks(i, &c);
        Ok(())
    }

    fn free_bytes(&mut self) -> usize {
        self.free_flash()
    }
}
