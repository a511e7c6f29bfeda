//! A NOR flash kept in a file, for the simulated device: each write and erase goes to the
//! file at once (positioned writes), so a simulated device killed at any moment leaves the
//! flash as a power cut would between two flash operations, and the next start reads it
//! back as the board reads its internal flash after a reboot.

use embedded_storage::nor_flash::{
    ErrorType, MultiwriteNorFlash, NorFlash, NorFlashError, NorFlashErrorKind, ReadNorFlash,
};
use std::fs::{File, OpenOptions};
use std::os::unix::fs::FileExt;
use std::path::Path;

/// Write word, bytes (the STM32F4's internal flash writes words of 4).
pub const WRITE_SIZE: usize = 4;
/// Erase page, bytes (the STM32F411's small sectors, 16 KiB).
pub const ERASE_SIZE: usize = 16 * 1024;

/// What went wrong with the flash file.
#[derive(Debug)]
pub enum FileFlashError {
    /// Outside the flash, or not on a word or page boundary.
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

/// A flash of `pages` erase pages in a file.
pub struct FileFlash {
    file: File,
    capacity: usize,
}

impl FileFlash {
    /// Open `path`, creating it erased (all 0xFF) when absent. An existing file must be
    /// exactly the flash's size: anything else is not a flash image of this device.
    pub fn open(path: &Path, pages: usize) -> Result<FileFlash, String> {
        let capacity = pages * ERASE_SIZE;
        let fresh = !path.exists();
        let file = OpenOptions::new()
            .read(true)
            .write(true)
            .create(true)
            .truncate(false)
            .open(path)
            .map_err(|e| format!("cannot open the flash image {}: {e}", path.display()))?;
        if fresh {
            file.write_all_at(&vec![0xFF; capacity], 0)
                .and_then(|_| file.sync_all())
                .map_err(|e| format!("cannot create the flash image {}: {e}", path.display()))?;
        }
        let len = file
            .metadata()
            .map_err(|e| format!("cannot read {}: {e}", path.display()))?
            .len();
        if len != capacity as u64 {
            return Err(format!(
                "{} is {len} bytes, not a flash image of this device ({capacity} bytes)",
                path.display()
            ));
        }
        Ok(FileFlash { file, capacity })
    }

    fn check(&self, offset: u32, len: usize, align: usize) -> Result<(), FileFlashError> {
        let end = offset as usize + len;
        if end > self.capacity {
            return Err(FileFlashError::Bounds(NorFlashErrorKind::OutOfBounds));
        }
        if offset as usize % align != 0 || len % align != 0 {
            return Err(FileFlashError::Bounds(NorFlashErrorKind::NotAligned));
        }
        Ok(())
    }
}

fn io_error(e: std::io::Error) -> FileFlashError {
    eprintln!("leeward: the flash image file failed: {e}");
    FileFlashError::Io
}

impl ErrorType for FileFlash {
    type Error = FileFlashError;
}

impl ReadNorFlash for FileFlash {
    const READ_SIZE: usize = 1;

    fn read(&mut self, offset: u32, bytes: &mut [u8]) -> Result<(), Self::Error> {
        self.check(offset, bytes.len(), 1)?;
        self.file
            .read_exact_at(bytes, u64::from(offset))
            .map_err(io_error)
    }

    fn capacity(&self) -> usize {
        self.capacity
    }
}

impl NorFlash for FileFlash {
    const WRITE_SIZE: usize = WRITE_SIZE;
    const ERASE_SIZE: usize = ERASE_SIZE;

    fn erase(&mut self, from: u32, to: u32) -> Result<(), Self::Error> {
        if to < from {
            return Err(FileFlashError::Bounds(NorFlashErrorKind::OutOfBounds));
        }
        self.check(from, (to - from) as usize, ERASE_SIZE)?;
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
// flash of the firmware's tests allows: the store's tombstones rely on it.
impl MultiwriteNorFlash for FileFlash {}

/// Pages of the simulated device's flash: the map (settings and datasets) first, then
/// the results log.
pub const MAP_PAGES: u32 = 6;
/// Pages of the results log.
pub const LOG_PAGES: u32 = 2;

/// The flash store of the simulated device on the image file `path`.
pub fn open_store(path: &Path) -> Result<leeward_firmware::flash::FlashStore<FileFlash>, String> {
    let flash = FileFlash::open(path, (MAP_PAGES + LOG_PAGES) as usize)?;
    let page = ERASE_SIZE as u32;
    leeward_firmware::flash::FlashStore::open(
        flash,
        0..MAP_PAGES * page,
        MAP_PAGES * page..(MAP_PAGES + LOG_PAGES) * page,
    )
    .map_err(|e| {
        format!(
            "the flash image {} cannot hold a store: {e:?}",
            path.display()
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_new_image_is_erased_and_writes_only_clear_bits() {
        let dir = std::env::temp_dir().join(format!("leeward-flash-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("t.img");
        let _ = std::fs::remove_file(&path);
        let mut f = FileFlash::open(&path, 2).unwrap();
        let mut b = [0u8; 8];
        f.read(0, &mut b).unwrap();
        assert_eq!(b, [0xFF; 8]);
        f.write(4, &[0x0F, 0xF0, 0xAA, 0x55]).unwrap();
        f.write(4, &[0xFF, 0x0F, 0xFF, 0xFF]).unwrap();
        f.read(4, &mut b[..4]).unwrap();
        assert_eq!(&b[..4], &[0x0F, 0x00, 0xAA, 0x55]);
        assert!(f.write(2, &[0; 4]).is_err(), "unaligned write taken");
        assert!(f.erase(0, 100).is_err(), "part of a page erased");
        // Survives a reopen; a file of another size is refused.
        drop(f);
        let mut f = FileFlash::open(&path, 2).unwrap();
        f.read(4, &mut b[..4]).unwrap();
        assert_eq!(&b[..4], &[0x0F, 0x00, 0xAA, 0x55]);
        f.erase(0, ERASE_SIZE as u32).unwrap();
        f.read(4, &mut b[..4]).unwrap();
        assert_eq!(&b[..4], &[0xFF; 4]);
        drop(f);
        assert!(FileFlash::open(&path, 3).is_err());
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
