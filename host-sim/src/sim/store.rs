//! Where the simulated device keeps its settings and datasets: chosen here, and only
//! here, so the front ends never name a store.
//!
//! Today this is the firmware's [`MemStorage`], in memory: a rehearsal starts from a blank
//! store (the demo station set and default settings) every time `leeward` starts, and what
//! is saved is lost when it quits. When the flash storage lands, `open` will hand out the
//! flash implementation over an image file, so that datasets survive a restart.

use leeward_firmware::storage::MemStorage;

/// The store the simulator uses.
pub type SimStorage = MemStorage;

/// A blank store, as a new device has (see the module doc: in memory for now).
pub fn open() -> SimStorage {
    MemStorage::new()
}

/// One line for help texts and the terminal front end.
pub const STORAGE_NOTE: &str = "Datasets are kept in memory for now: each run starts from a \
blank store holding the demo station set, and what is saved is lost on quitting (a flash \
image file will keep them once the device storage lands).";
