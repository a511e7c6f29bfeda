//! Where the simulated device keeps its settings and datasets: chosen here, and only
//! here, so the front ends never name a store.
//!
//! It is the firmware's flash store on a flash image file ([`crate::flash_file`]), as the
//! handheld keeps them in its internal flash: a rehearsal survives quitting and starting
//! again, and `leeward device` and `leeward link` can use the same file. `leeward shots`
//! starts each run from a new, erased image, so its pictures never depend on what an
//! earlier run stored.

use crate::CliError;
use std::path::{Path, PathBuf};

/// The store the simulator uses.
pub type SimStorage = leeward_firmware::flash::FlashStore<crate::flash_file::FileFlash>;

/// The store on the image `path` (created erased when absent).
pub fn open(path: &Path) -> Result<SimStorage, CliError> {
    crate::flash_file::open_store(path).map_err(CliError::input)
}

/// The image `leeward sim` uses without `--flash`: `$LEEWARD_FLASH`, else
/// `$XDG_DATA_HOME/leeward/flash.img`, else `~/.local/share/leeward/flash.img`.
pub fn default_path() -> Result<PathBuf, CliError> {
    if let Some(p) = std::env::var_os("LEEWARD_FLASH") {
        return Ok(PathBuf::from(p));
    }
    let base = match std::env::var_os("XDG_DATA_HOME") {
        Some(d) => PathBuf::from(d),
        None => match std::env::var_os("HOME") {
            Some(h) => PathBuf::from(h).join(".local").join("share"),
            None => {
                return Err(CliError::input(
                    "sim: no home folder for the flash image; give --flash FILE",
                ))
            }
        },
    };
    let dir = base.join("leeward");
    std::fs::create_dir_all(&dir)
        .map_err(|e| CliError::input(format!("sim: cannot create {}: {e}", dir.display())))?;
    Ok(dir.join("flash.img"))
}

/// A new, erased image in the temporary folder, removed when dropped.
pub struct Scratch(pub PathBuf);

impl Scratch {
    /// A fresh scratch image path (the file is made when the store opens it).
    pub fn new() -> Scratch {
        use std::sync::atomic::{AtomicU32, Ordering};
        static N: AtomicU32 = AtomicU32::new(0);
        let n = N.fetch_add(1, Ordering::Relaxed);
        let p = std::env::temp_dir().join(format!("leeward-shots-{}-{n}.img", std::process::id()));
        let _ = std::fs::remove_file(&p);
        Scratch(p)
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_file(&self.0);
    }
}

/// One line for help texts and the terminal front end.
pub const STORAGE_NOTE: &str = "Datasets and settings are kept in a flash image file, as the \
handheld keeps them in flash: by default ~/.local/share/leeward/flash.img (or $LEEWARD_FLASH, \
or --flash FILE), so a rehearsal survives a restart; `leeward device --flash FILE` serves the \
same file to `leeward link`. `leeward shots` starts from a new, erased image every run.";
