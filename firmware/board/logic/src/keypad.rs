//! The keypad: a 4×5 matrix of 20 keys, scanned row by row, debounced per key.
//!
//! The board drives one row low at a time and reads the five columns (pulled up, so a
//! pressed key reads low); it hands each full scan to [`Debouncer::update`] as a bit mask,
//! bit `row * COLS + col` set for a key that reads pressed. A key's debounced state
//! changes only after its raw reading has differed from it for [`STABLE_SCANS`] scans in a
//! row, so contact bounce (a few milliseconds on membrane and tactile keys) and single
//! glitches never make a press. Each debounced press yields its [`Key`] once; releases
//! yield nothing. There is no auto-repeat.
//!
//! Layout (our own choice), looking at the keypad:
//!
//! ```text
//!          col 0   col 1   col 2   col 3   col 4
//! row 0      7       8       9      DEL    MENU
//! row 1      4       5       6      UP     BACK
//! row 2      1       2       3      DOWN    OK
//! row 3      0       .       ±      LEFT   RIGHT
//! ```

use leeward_firmware::Key;

/// Rows of the matrix (driven by the board).
pub const ROWS: usize = 4;
/// Columns of the matrix (read by the board).
pub const COLS: usize = 5;
/// Keys in the matrix.
pub const KEYS: usize = ROWS * COLS;

/// Consecutive scans a new reading must last before it counts. With the board's 5 ms scan
/// period that is 20 ms, a common debounce time for tactile keys (common practice; our
/// choice).
pub const STABLE_SCANS: u8 = 4;

/// The key at each matrix position, `[row][col]`.
pub const KEY_MAP: [[Key; COLS]; ROWS] = [
    [
        Key::Digit(7),
        Key::Digit(8),
        Key::Digit(9),
        Key::Delete,
        Key::Menu,
    ],
    [
        Key::Digit(4),
        Key::Digit(5),
        Key::Digit(6),
        Key::Up,
        Key::Back,
    ],
    [
        Key::Digit(1),
        Key::Digit(2),
        Key::Digit(3),
        Key::Down,
        Key::Ok,
    ],
    [Key::Digit(0), Key::Dot, Key::Sign, Key::Left, Key::Right],
];

/// The key at matrix bit `index` (`row * COLS + col`); `None` past the matrix.
pub fn key_at(index: usize) -> Option<Key> {
    KEY_MAP
        .get(index / COLS)
        .and_then(|row| row.get(index % COLS))
        .copied()
}

/// The matrix bit of `(row, col)`, for building a scan mask; `None` outside the matrix.
pub fn bit(row: usize, col: usize) -> Option<u32> {
    (row < ROWS && col < COLS).then(|| 1 << (row * COLS + col))
}

/// Per-key debouncing of matrix scans.
#[derive(Debug, Clone, Default)]
pub struct Debouncer {
    /// Debounced state, one bit per key (set = pressed).
    stable: u32,
    /// Scans in a row each key's reading has differed from its debounced state.
    count: [u8; KEYS],
}

/// The keys that became pressed in one scan, in matrix order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Presses(u32);

impl Iterator for Presses {
    type Item = Key;
    fn next(&mut self) -> Option<Key> {
        while self.0 != 0 {
            let i = self.0.trailing_zeros() as usize;
            self.0 &= self.0 - 1;
            if let Some(k) = key_at(i) {
                return Some(k);
            }
        }
        None
    }
}

impl Debouncer {
    /// All keys released, nothing pending.
    pub const fn new() -> Self {
        Debouncer {
            stable: 0,
            count: [0; KEYS],
        }
    }

    /// Take one scan (bit set = key reads pressed; bits past the matrix are ignored) and
    /// return the keys whose press it confirmed.
    pub fn update(&mut self, raw: u32) -> Presses {
        let mut pressed = 0;
        for (i, count) in self.count.iter_mut().enumerate() {
            let mask = 1u32 << i;
            if (raw ^ self.stable) & mask == 0 {
                *count = 0;
                continue;
            }
            *count = count.saturating_add(1);
            if *count >= STABLE_SCANS {
                *count = 0;
                self.stable ^= mask;
                if self.stable & mask != 0 {
                    pressed |= mask;
                }
            }
        }
        Presses(pressed)
    }

    /// The debounced state, one bit per key.
    pub fn held(&self) -> u32 {
        self.stable
    }

    /// No key held and no change pending: the board may stop scanning and sleep until a
    /// key's interrupt.
    pub fn is_idle(&self) -> bool {
        self.stable == 0 && self.count.iter().all(|&c| c == 0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn feed(d: &mut Debouncer, raw: u32, scans: usize) -> [Option<Key>; 8] {
        let mut out = [None; 8];
        let mut n = 0;
        for _ in 0..scans {
            for k in d.update(raw) {
                out[n] = Some(k);
                n += 1;
            }
        }
        out
    }

    #[test]
    fn map_holds_every_key_once() {
        // Every real key of the device (Key::ALL less its out-of-range digit) appears once.
        for k in Key::ALL.iter().filter(|k| **k != Key::Digit(10)) {
            let n = KEY_MAP.iter().flatten().filter(|m| *m == k).count();
            assert_eq!(n, 1, "{k:?}");
        }
        assert_eq!(key_at(KEYS), None);
        assert_eq!(bit(3, 4), Some(1 << 19));
        assert_eq!(bit(4, 0), None);
        assert_eq!(key_at(19), Some(Key::Right));
    }

    #[test]
    fn a_steady_press_yields_its_key_once() {
        let mut d = Debouncer::new();
        let ok = bit(2, 4).unwrap();
        // Not yet after STABLE_SCANS - 1 scans.
        let first = feed(&mut d, ok, (STABLE_SCANS - 1) as usize);
        assert_eq!(first[0], None);
        let more = feed(&mut d, ok, 50);
        assert_eq!(more[..2], [Some(Key::Ok), None]);
        assert!(!d.is_idle());
        // Release: no event, and idle once the release is confirmed.
        let rel = feed(&mut d, 0, STABLE_SCANS as usize);
        assert_eq!(rel[0], None);
        assert!(d.is_idle());
    }

    #[test]
    fn bounce_makes_one_press() {
        let mut d = Debouncer::new();
        let five = bit(1, 1).unwrap();
        let mut keys = 0;
        // Contact bounce on press, a hold, bounce on release, then quiet.
        let pattern = [five, 0, five, 0, five, five, 0, five]
            .into_iter()
            .chain([five; 20])
            .chain([0, five, 0, 0, five, 0])
            .chain([0; 20]);
        for raw in pattern {
            keys += d.update(raw).count();
        }
        assert_eq!(keys, 1);
        assert!(d.is_idle());
    }

    #[test]
    fn a_short_glitch_is_ignored() {
        let mut d = Debouncer::new();
        let mut keys = 0;
        for raw in [0, 1, 1, 1, 0, 0, 1, 0].into_iter().chain([0; 10]) {
            keys += d.update(raw).count();
        }
        assert_eq!(keys, 0);
        assert!(d.is_idle());
    }

    #[test]
    fn two_keys_and_bits_past_the_matrix() {
        let mut d = Debouncer::new();
        let raw = bit(0, 0).unwrap() | bit(3, 3).unwrap() | 0xFFF0_0000;
        let got = feed(&mut d, raw, STABLE_SCANS as usize);
        assert_eq!(got[..3], [Some(Key::Digit(7)), Some(Key::Left), None]);
        assert_eq!(d.held(), bit(0, 0).unwrap() | bit(3, 3).unwrap());
        // Holding one while the other is released and pressed again gives that key again.
        feed(&mut d, bit(0, 0).unwrap(), STABLE_SCANS as usize);
        let again = feed(&mut d, raw, STABLE_SCANS as usize);
        assert_eq!(again[..2], [Some(Key::Left), None]);
    }
}
