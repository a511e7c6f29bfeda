//! The keypad: every key the device has, as the state machine sees it.

/// One key press. The board and the simulator map their buttons to these.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Key {
    /// A digit key, 0 to 9 (larger values are ignored by the editor).
    Digit(u8),
    /// Decimal point (and, in degrees-minutes entry, the degree mark).
    Dot,
    /// Change sign.
    Sign,
    /// Delete the character before the cursor.
    Delete,
    /// Arrow up.
    Up,
    /// Arrow down.
    Down,
    /// Arrow left.
    Left,
    /// Arrow right.
    Right,
    /// Confirm, open, compute.
    Ok,
    /// One step back; never discards anything typed.
    Back,
    /// Straight to the home menu; forms keep what was typed.
    Menu,
}

impl Key {
    /// Every distinct key, for tests and key-map checks.
    pub const ALL: [Key; 21] = [
        Key::Digit(0),
        Key::Digit(1),
        Key::Digit(2),
        Key::Digit(3),
        Key::Digit(4),
        Key::Digit(5),
        Key::Digit(6),
        Key::Digit(7),
        Key::Digit(8),
        Key::Digit(9),
        Key::Dot,
        Key::Sign,
        Key::Delete,
        Key::Up,
        Key::Down,
        Key::Left,
        Key::Right,
        Key::Ok,
        Key::Back,
        Key::Menu,
        // An out-of-range digit, which a broken key map could send: it must be harmless.
        Key::Digit(10),
    ];
}

/// What the device should do after a key press.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Effect {
    /// The key changed nothing: no redraw is needed.
    Nothing,
    /// The screen changed: render and flush.
    Redraw,
    /// The settings changed: store them (see [`crate::storage`]), then redraw.
    SaveSettings,
    /// A dataset operation waits: carry it out with [`crate::App::apply`], then redraw.
    Store,
}
