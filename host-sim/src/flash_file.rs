//! A NOR flash kept in a file, for the simulated device: each write and erase goes to the
//! file at once (positioned writes), so a simulated device killed at any moment leaves the
//! flash as a power cut would between two flash operations, and the next start reads it
//! back as the board reads its internal flash after a reboot.
//!
//! The image has the board's geometry exactly (`leeward_firmware::flash::layout`, the one
//! definition both use): a file of the internal flash's size, the map (settings and
//! datasets) where the board keeps it, in pages of 16 KiB, and the results log where the
//! board keeps it, one page of 128 KiB, both written in 4-byte words. The bytes outside the
//! two areas (the board's vector table and program) are never touched and stay erased. As
//! on the board, the store sees the two areas as two flashes of different erase sizes
//! ([`FileArea`]) combined by `TwoFlash`, so a simulated device holds what the board holds,
//! no more.

use std::fs::{File, OpenOptions};
use std::ops::Range;
use std::os::unix::fs::FileExt;
use std::path::Path;

use embedded_storage::nor_flash::{
    ErrorType, MultiwriteNorFlash, NorFlash, NorFlashError, NorFlashErrorKind, ReadNorFlash,
};
use leeward_firmware::flash::layout::{
    FLASH_BYTES, LOG_AREA, LOG_ERASE, MAP_AREA, MAP_ERASE, WRITE_SIZE,
};
use leeward_firmware::flash::{FlashStore, TwoFlash};

/// What went wrong with the flash file.
#[derive(Debug)]
pub enum FileFlashError {
    /// Outside the area, or not on a word or page boundary.
    Bounds(NorFlashErrorKind),
    /// The file could not be read or written (the reason is printed when it happens:
    /// the store above sees only that the flash failed).
    Io,
}

impl NorFlashError for FileFlashError {
    fn kind(&self) -> NorFlashErrorKind {
        match self {
            FileFlashError::Bounds(k) => *k,
            FileFlashError::Io => NorFlashErrorKind::Other,
        }
    }
}

/// One area of a flash image file as a NOR flash of pages of `ERASE` bytes. Offsets are
/// from the start of the file (the board's offsets from the start of its flash), and only
/// the area may be read, written or erased, as the board's driver allows only its window.
pub struct FileArea<const ERASE: usize> {
    file: File,
    area: Range<u32>,
}

/// The simulated device's flash: the image file as the board's map and log areas.
pub type FileFlash = TwoFlash<FileArea<MAP_ERASE>, FileArea<LOG_ERASE>>;

/// Open the image `path` as the board's flash, creating it erased (all 0xFF) when absent.
/// An existing file must be exactly the board's flash size: anything else (such as an image
/// written by an earlier leeward, whose layout was different) is refused and left as it is.
pub fn open_image(path: &Path) -> Result<FileFlash, String> {
    let file = open_file(path, FLASH_BYTES as usize)?;
    let copy = file
        .try_clone()
        .map_err(|e| format!("cannot open the flash image {}: {e}", path.display()))?;
    Ok(TwoFlash {
        map: FileArea {
            file,
            area: MAP_AREA,
        },
        log: FileArea {
            file: copy,
            area: LOG_AREA,
        },
    })
}

fn open_file(path: &Path, size: usize) -> Result<File, String> {
    let fresh = !path.exists();
    let file = OpenOptions::new()
        .read(true)
        .write(true)
        .create(fresh)
        .truncate(false)
        .open(path)
        .map_err(|e| format!("cannot open the flash image {}: {e}", path.display()))?;
    if fresh {
        file.write_all_at(&vec![0xFF; size], 0)
            .and_then(|_| file.sync_all())
            .map_err(|e| format!("cannot create the flash image {}: {e}", path.display()))?;
    }
    let len = file
        .metadata()
        .map_err(|e| format!("cannot read {}: {e}", path.display()))?
        .len();
    if len != size as u64 {
        return Err(format!(
            "{} is {len} bytes, not a flash image of this device ({size} bytes, laid out as \
             the handheld's flash; an image from an earlier leeward, 131072 bytes, has another \
             layout and cannot be read): move it away or delete it to start a blank image \
             there, or give --flash (or LEEWARD_FLASH) a new file",
            path.display()
        ));
    }
    Ok(file)
}

impl<const ERASE: usize> FileArea<ERASE> {
    fn check(&self, offset: u32, len: usize, align: usize) -> Result<(), FileFlashError> {
        let end = offset as u64 + len as u64;
        if offset < self.area.start || end > u64::from(self.area.end) {
            return Err(FileFlashError::Bounds(NorFlashErrorKind::OutOfBounds));
        }
        if (offset - self.area.start) as usize % align != 0 || len % align != 0 {
            return Err(FileFlashError::Bounds(NorFlashErrorKind::NotAligned));
        }
        Ok(())
    }
}

fn io_error(e: std::io::Error) -> FileFlashError {
    eprintln!("leeward: the flash image file failed: {e}");
    FileFlashError::Io
}

impl<const ERASE: usize> ErrorType for FileArea<ERASE> {
    type Error = FileFlashError;
}

impl<const ERASE: usize> ReadNorFlash for FileArea<ERASE> {
    const READ_SIZE: usize = 1;

    fn read(&mut self, offset: u32, bytes: &mut [u8]) -> Result<(), Self::Error> {
        self.check(offset, bytes.len(), 1)?;
        self.file
            .read_exact_at(bytes, u64::from(offset))
            .map_err(io_error)
    }

    fn capacity(&self) -> usize {
        // The address space up to the area's end, as the board's driver (the store checks
        // that its area fits).
        self.area.end as usize
    }
}

impl<const ERASE: usize> NorFlash for FileArea<ERASE> {
    const WRITE_SIZE: usize = WRITE_SIZE;
    const ERASE_SIZE: usize = ERASE;

    fn erase(&mut self, from: u32, to: u32) -> Result<(), Self::Error> {
        if to < from {
            return Err(FileFlashError::Bounds(NorFlashErrorKind::OutOfBounds));
        }
        self.check(from, (to - from) as usize, ERASE)?;
        self.file
            .write_all_at(&vec![0xFF; (to - from) as usize], u64::from(from))
            .map_err(io_error)
    }

    fn write(&mut self, offset: u32, bytes: &[u8]) -> Result<(), Self::Error> {
        self.check(offset, bytes.len(), WRITE_SIZE)?;
        // NOR flash only clears bits: the stored value is the old one AND the new one.
        let mut old = vec![0u8; bytes.len()];
        self.file
            .read_exact_at(&mut old, u64::from(offset))
            .map_err(io_error)?;
        for (o, b) in old.iter_mut().zip(bytes) {
            *o &= *b;
        }
        self.file
            .write_all_at(&old, u64::from(offset))
            .map_err(io_error)
    }
}

// Writing a word again can only clear more bits (see `write`), as the fault-injecting
// flash of the firmware's tests allows and as the board's flash does: the store's
// tombstones rely on it.
impl<const ERASE: usize> MultiwriteNorFlash for FileArea<ERASE> {}

/// The flash store of the simulated device on the image file `path`, with the board's
/// areas.
pub fn open_store(path: &Path) -> Result<FlashStore<FileFlash>, String> {
    FlashStore::open(open_image(path)?, MAP_AREA, LOG_AREA).map_err(|e| {
        format!(
            "the flash image {} cannot hold a store: {e:?}",
            path.display()
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(name: &str) -> std::path::PathBuf {
        let dir = std::env::temp_dir().join(format!("leeward-flash-{}-{name}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        dir
    }

    #[test]
    fn a_new_image_is_erased_and_writes_only_clear_bits() {
        let dir = scratch("bits");
        let path = dir.join("t.img");
        let mut f = open_image(&path).unwrap();
        let m = MAP_AREA.start;
        let mut b = [0u8; 8];
        f.map.read(m, &mut b).unwrap();
        assert_eq!(b, [0xFF; 8]);
        f.map.write(m + 4, &[0x0F, 0xF0, 0xAA, 0x55]).unwrap();
        f.map.write(m + 4, &[0xFF, 0x0F, 0xFF, 0xFF]).unwrap();
        f.map.read(m + 4, &mut b[..4]).unwrap();
        assert_eq!(&b[..4], &[0x0F, 0x00, 0xAA, 0x55]);
        assert!(
            f.map.write(m + 2, &[0; 4]).is_err(),
            "unaligned write taken"
        );
        assert!(f.map.erase(m, m + 100).is_err(), "part of a page erased");
        // Survives a reopen.
        drop(f);
        let mut f = open_image(&path).unwrap();
        f.map.read(m + 4, &mut b[..4]).unwrap();
        assert_eq!(&b[..4], &[0x0F, 0x00, 0xAA, 0x55]);
        f.map.erase(m, m + MAP_ERASE as u32).unwrap();
        f.map.read(m + 4, &mut b[..4]).unwrap();
        assert_eq!(&b[..4], &[0xFF; 4]);
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn the_image_has_the_boards_geometry() {
        // The board (docs/board.md, "Flash storage"; RM0383's sector map): 512 KiB of
        // flash, the map in sectors 1-3 (3 pages of 16 KiB at 0x4000), the log in sector 7
        // (1 page of 128 KiB at 0x6_0000), 4-byte words. Written out here rather than
        // taken from the shared constants, so a change there shows up as a failure.
        let dir = scratch("geometry");
        let path = dir.join("t.img");
        let mut f = open_image(&path).unwrap();
        assert_eq!(std::fs::metadata(&path).unwrap().len(), 512 * 1024);
        assert_eq!(<FileArea<MAP_ERASE> as NorFlash>::ERASE_SIZE, 16 * 1024);
        assert_eq!(<FileArea<LOG_ERASE> as NorFlash>::ERASE_SIZE, 128 * 1024);
        assert_eq!(<FileArea<MAP_ERASE> as NorFlash>::WRITE_SIZE, 4);
        assert_eq!(<FileArea<LOG_ERASE> as NorFlash>::WRITE_SIZE, 4);
        assert_eq!(f.map.area, 0x4000..0x1_0000);
        assert_eq!(f.log.area, 0x6_0000..0x8_0000);
        assert_eq!((f.map.area.end - f.map.area.start) / (16 * 1024), 3);
        assert_eq!((f.log.area.end - f.log.area.start) / (128 * 1024), 1);
        // Each view keeps to its own area and its own pages, as the board's windows do.
        assert!(f.map.erase(0, 0x4000).is_err(), "the vector table's sector");
        assert!(
            f.map.read(0x1_0000, &mut [0; 4]).is_err(),
            "the program's sectors"
        );
        assert!(
            f.log.erase(0x6_0000, 0x6_4000).is_err(),
            "16 KiB of the log page"
        );
        assert!(f.log.write(0x5_FFFC, &[0; 4]).is_err(), "below the log");
        f.log.erase(0x6_0000, 0x8_0000).unwrap();
        f.map.erase(0xC000, 0x1_0000).unwrap();
        drop(f);
        // The store opens on it with the board's areas, and what it stores lands in them:
        // every byte outside the two areas is still erased.
        use leeward_firmware::storage::Storage;
        let mut st = open_store(&path).unwrap();
        // The log is one 128 KiB page (less sequential-storage's page marks), more than
        // the 32 KiB of the earlier image's two small pages.
        let free = st.log_free().unwrap();
        assert!(free > 120 * 1024 && free <= 128 * 1024, "{free}");
        st.save_settings(&leeward_firmware::settings::Settings::default())
            .unwrap();
        drop(st);
        let bytes = std::fs::read(&path).unwrap();
        let outside = bytes
            .iter()
            .enumerate()
            .filter(|(i, _)| {
                let i = *i as u32;
                !MAP_AREA.contains(&i) && !LOG_AREA.contains(&i)
            })
            .all(|(_, b)| *b == 0xFF);
        assert!(outside, "the store wrote outside its areas");
        assert!(
            bytes[0x4000..0x1_0000].iter().any(|b| *b != 0xFF),
            "settings not in the map"
        );
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn an_image_of_another_size_is_refused_and_left_alone() {
        // 131072 bytes: the earlier simulator's image (8 pages of 16 KiB).
        let dir = scratch("old");
        let path = dir.join("old.img");
        let old: Vec<u8> = (0..128 * 1024).map(|i| (i % 251) as u8).collect();
        std::fs::write(&path, &old).unwrap();
        let e = open_store(&path).err().expect("an old image opened");
        assert!(e.contains("131072 bytes") && e.contains("524288"), "{e}");
        assert!(e.contains("delete") && e.contains("--flash"), "{e}");
        assert_eq!(
            std::fs::read(&path).unwrap(),
            old,
            "the old image was changed"
        );
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
