//! Key names (for scripts) and the laptop keyboard's keys (for the window and the
//! terminal), in one table so the two never disagree.

use leeward_firmware::Key;

/// The named keys of a key script, with the device key each stands for. Digits, `.` and
/// `-` are typed as they are (see [`typed`]).
pub const NAMES: [(&str, Key); 10] = [
    ("ok", Key::Ok),
    ("back", Key::Back),
    ("menu", Key::Menu),
    ("up", Key::Up),
    ("down", Key::Down),
    ("left", Key::Left),
    ("right", Key::Right),
    ("del", Key::Delete),
    ("dot", Key::Dot),
    ("sign", Key::Sign),
];

/// The device key a script name stands for (case does not matter).
pub fn named(name: &str) -> Option<Key> {
    NAMES
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(name))
        .map(|&(_, k)| k)
}

/// The key a typed character stands for: a digit, `.` (decimal point) or `-` (change
/// sign), as on the keypad.
pub fn typed(c: char) -> Option<Key> {
    match c {
        '0'..='9' => Some(Key::Digit(c as u8 - b'0')),
        '.' => Some(Key::Dot),
        '-' => Some(Key::Sign),
        _ => None,
    }
}

/// The keyboard legend shown beside the screen: laptop key, device key.
pub const LEGEND: [(&str, &str); 9] = [
    ("0-9", "digits"),
    (".", "point"),
    ("-", "sign"),
    ("Bksp", "delete"),
    ("arrows", "move"),
    ("Enter", "OK"),
    ("Esc", "BACK"),
    ("Tab, M", "MENU"),
    ("Q", "quit"),
];
