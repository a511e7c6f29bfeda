//! The numeric field editor: a short text with a cursor, typed with the digit keys or
//! rolled character by character with the arrows alone.
//!
//! The text is the value: nothing is parsed away, rounded or clamped while typing. A field
//! is checked only when the user confirms it or asks for a result, and an entry that fails
//! the check stays exactly as typed, marked, with a message naming the allowed range.

use crate::key::Key;
use crate::settings::{LatEntry, Settings};
use crate::text::{line, Line};
use core::fmt::Write;

/// Characters a field holds.
pub const FIELD_LEN: usize = 12;

/// The degree mark between degrees and minutes (stored as this byte, drawn as `°`).
const DEG: u8 = b'd';
/// A gap left by rolling past the last choice: removed when the edit ends.
const GAP: u8 = b'_';

/// What a field holds, which sets its unit, its conversions and its check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Kind {
    /// A latitude, degrees; typed decimal or as degrees and minutes per the settings.
    Latitude,
    /// A longitude, degrees east (west negative); typed like a latitude.
    Longitude,
    /// A height or depth, m inside; shown in the height unit of the settings.
    Height,
    /// A relative vorticity, s⁻¹ inside; typed in units of 1e-5 s⁻¹.
    Vorticity,
    /// A wind speed, m s⁻¹ inside; shown in the wind unit of the settings.
    Speed,
    /// A direction or azimuth, degrees clockwise from north; always typed decimal.
    Bearing,
    /// A buoyancy (Brunt–Väisälä) frequency, s⁻¹ inside; typed in units of 1e-3 s⁻¹.
    Frequency,
}

impl Kind {
    /// True for angles, which the settings' latitude style (decimal or degrees-minutes)
    /// applies to.
    pub fn is_angle(self) -> bool {
        matches!(self, Kind::Latitude | Kind::Longitude)
    }
}

/// Scale of vorticity entry: values are typed in units of 1e-5 s⁻¹.
pub const VORTICITY_UNIT: f64 = 1e-5;

/// Scale of buoyancy-frequency entry: values are typed in units of 1e-3 s⁻¹.
pub const FREQUENCY_UNIT: f64 = 1e-3;

/// A field's label and the range of SI values it accepts.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FieldSpec {
    /// Label shown before the value (at most 17 characters).
    pub label: &'static str,
    /// What the value is.
    pub kind: Kind,
    /// Smallest accepted value, SI.
    pub min: f64,
    /// Largest accepted value, SI.
    pub max: f64,
}

impl FieldSpec {
    /// Unit shown after the value.
    pub fn unit(&self, s: &Settings) -> &'static str {
        match self.kind {
            Kind::Latitude | Kind::Longitude => "°",
            Kind::Height => s.height.symbol(),
            Kind::Vorticity => "e-5/s",
            Kind::Speed => s.wind.symbol(),
            Kind::Bearing => "°",
            Kind::Frequency => "e-3/s",
        }
    }

    /// SI value → the number shown in the settings' unit.
    pub fn to_display(&self, si: f64, s: &Settings) -> f64 {
        match self.kind {
            Kind::Latitude | Kind::Longitude | Kind::Bearing => si,
            Kind::Height => s.height.from_m(si),
            Kind::Vorticity => si / VORTICITY_UNIT,
            Kind::Speed => s.wind.from_ms(si),
            Kind::Frequency => si / FREQUENCY_UNIT,
        }
    }

    /// The allowed range in words, in the unit shown: "-90 to 90 °".
    pub fn range_text(&self, s: &Settings) -> Line {
        let lo = short_number(self.to_display(self.min, s), 1);
        let hi = short_number(self.to_display(self.max, s), 1);
        line(format_args!("{lo} to {hi} {}", self.unit(s)))
    }
}

/// Why a field's text is not an acceptable value.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum FieldError {
    /// Nothing typed.
    Empty,
    /// The text is not a number (a lone sign or point, two points…).
    NotANumber,
    /// Degrees before the degree mark must be whole, minutes below 60.
    BadMinutes,
    /// A number outside the allowed range.
    OutOfRange,
}

/// One field: its text and cursor (0 = before the first character).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Field {
    buf: heapless::Vec<u8, FIELD_LEN>,
    cursor: u8,
}

impl Field {
    /// A field holding `text` (characters other than digits, `.`, `-` and `°` are dropped),
    /// cursor at the end.
    pub fn with_text(text: &str) -> Self {
        let mut f = Field::default();
        for c in text.chars() {
            let b = match c {
                '0'..='9' | '.' | '-' => c as u8,
                '°' => DEG,
                _ => continue,
            };
            let _ = f.buf.push(b);
        }
        f.cursor = f.buf.len() as u8;
        f
    }

    /// A field showing the SI value `si` in the settings' unit and entry style.
    pub fn with_value(spec: &FieldSpec, si: f64, s: &Settings) -> Self {
        let shown = spec.to_display(si, s);
        if spec.kind.is_angle() && s.lat_entry == LatEntry::DegMin {
            let sign = if shown < 0.0 { "-" } else { "" };
            let a = libm_abs(shown);
            // Degrees-minutes only for what an angle can be; anything larger (or not
            // finite) is shown plainly rather than wrapped or saturated.
            if !a.is_finite() || a >= 1.0e6 {
                return Field::with_text(&short_number(shown, 4));
            }
            let mut deg = a as u32;
            let mut min = (a - deg as f64) * 60.0;
            // 59.999… minutes shows as the next whole degree.
            if min >= 59.995 {
                deg = deg.saturating_add(1);
                min = 0.0;
            }
            let m = short_number(min, 2);
            Field::with_text(&line(format_args!("{sign}{deg}°{m}")))
        } else {
            Field::with_text(&short_number(shown, 4))
        }
    }

    /// The text as shown, with the degree mark and gaps drawn as `°` and `_`.
    pub fn display(&self) -> Line {
        let mut s = Line::new();
        for &b in &self.buf {
            let _ = match b {
                DEG => s.push('°'),
                _ => s.push(b as char),
            };
        }
        s
    }

    /// Cursor position in characters.
    pub fn cursor(&self) -> usize {
        self.cursor as usize
    }

    /// Characters in the field.
    pub fn len(&self) -> usize {
        self.buf.len()
    }

    /// True when nothing is typed.
    pub fn is_empty(&self) -> bool {
        self.buf.is_empty()
    }

    fn insert(&mut self, b: u8) {
        let at = self.cursor().min(self.buf.len());
        if self.buf.insert(at, b).is_ok() {
            self.cursor = (at + 1) as u8;
        }
    }

    /// Apply an editing key. Returns false for keys the editor does not use (OK, BACK,
    /// MENU), which the form handles.
    pub fn edit(&mut self, key: Key, entry: LatEntry, kind: Kind) -> bool {
        let dm = kind.is_angle() && entry == LatEntry::DegMin;
        match key {
            Key::Digit(d) if d <= 9 => self.insert(b'0' + d),
            Key::Digit(_) => {}
            Key::Dot => {
                if dm && !self.buf.contains(&DEG) {
                    self.insert(DEG);
                } else if !self.buf.contains(&b'.') {
                    self.insert(b'.');
                }
            }
            Key::Sign => {
                if self.buf.first() == Some(&b'-') {
                    self.buf.remove(0);
                    self.cursor = self.cursor.saturating_sub(1);
                } else if self.buf.insert(0, b'-').is_ok() {
                    self.cursor += 1;
                }
            }
            Key::Delete => {
                let c = self.cursor();
                if c > 0 && c <= self.buf.len() {
                    self.buf.remove(c - 1);
                    self.cursor -= 1;
                } else if c == 0 && !self.buf.is_empty() {
                    self.buf.remove(0);
                }
            }
            Key::Left => self.cursor = self.cursor.saturating_sub(1),
            Key::Right => {
                if self.cursor() < self.buf.len() {
                    self.cursor += 1;
                }
            }
            Key::Up | Key::Down => self.roll(key == Key::Up, dm),
            Key::Ok | Key::Back | Key::Menu => return false,
        }
        true
    }

    /// Roll the character under the cursor through the characters allowed there; at the
    /// end of the text, start a new character. The gap is the last choice: it deletes the
    /// character when the edit ends, so arrows alone can shorten a value.
    fn roll(&mut self, up: bool, dm: bool) {
        let mut cycle: heapless::Vec<u8, 16> = heapless::Vec::new();
        let _ = cycle.extend_from_slice(b"0123456789.");
        if dm {
            let _ = cycle.push(DEG);
        }
        if self.cursor == 0 {
            let _ = cycle.push(b'-');
        }
        let _ = cycle.push(GAP);
        let n = cycle.len();
        let c = self.cursor();
        if c >= self.buf.len() {
            // A new character: 0 rolling up, 9 rolling down; the cursor stays on it.
            let b = if up { b'0' } else { b'9' };
            if self.buf.push(b).is_ok() {
                self.cursor = (self.buf.len() - 1) as u8;
            }
            return;
        }
        let cur = self.buf[c];
        let i = cycle.iter().position(|&x| x == cur).unwrap_or(n - 1);
        let j = if up { (i + 1) % n } else { (i + n - 1) % n };
        self.buf[c] = cycle[j];
    }

    /// End an edit: remove gaps and put the cursor at the end.
    pub fn finish(&mut self) {
        self.buf.retain(|&b| b != GAP);
        self.cursor = self.buf.len() as u8;
    }

    /// The SI value, or why there is none. The text is not changed.
    pub fn value(&self, spec: &FieldSpec, s: &Settings) -> Result<f64, FieldError> {
        let shown = self.parse(spec.kind, s.lat_entry)?;
        let si = match spec.kind {
            Kind::Latitude | Kind::Longitude | Kind::Bearing => shown,
            Kind::Height => s.height.to_m(shown),
            Kind::Vorticity => shown * VORTICITY_UNIT,
            Kind::Speed => s.wind.to_ms(shown),
            Kind::Frequency => shown * FREQUENCY_UNIT,
        };
        if !si.is_finite() || si < spec.min || si > spec.max {
            return Err(FieldError::OutOfRange);
        }
        Ok(si)
    }

    fn parse(&self, kind: Kind, entry: LatEntry) -> Result<f64, FieldError> {
        let mut t: heapless::String<FIELD_LEN> = heapless::String::new();
        for &b in self.buf.iter().filter(|&&b| b != GAP) {
            let _ = t.push(b as char);
        }
        if t.is_empty() {
            return Err(FieldError::Empty);
        }
        let dm = kind.is_angle() && entry == LatEntry::DegMin;
        match t.split_once(DEG as char) {
            None => number(&t),
            Some(_) if !dm => Err(FieldError::NotANumber),
            Some((d, m)) => {
                let neg = d.starts_with('-');
                let d = d.strip_prefix('-').unwrap_or(d);
                if d.is_empty() || !d.bytes().all(|b| b.is_ascii_digit()) {
                    return Err(FieldError::BadMinutes);
                }
                let deg = number(d)?;
                let min = if m.is_empty() { 0.0 } else { number(m)? };
                if !(0.0..60.0).contains(&min) || m.starts_with('-') {
                    return Err(FieldError::BadMinutes);
                }
                let v = deg + min / 60.0;
                Ok(if neg { -v } else { v })
            }
        }
    }

    /// Re-express the text after a change of settings (unit or latitude style), if it
    /// holds a valid number; an invalid text is kept exactly as typed.
    pub fn convert(&mut self, spec: &FieldSpec, from: &Settings, to: &Settings) {
        let relevant = match spec.kind {
            Kind::Latitude | Kind::Longitude => from.lat_entry != to.lat_entry,
            Kind::Height => from.height != to.height,
            Kind::Speed => from.wind != to.wind,
            Kind::Vorticity | Kind::Bearing | Kind::Frequency => false,
        };
        if !relevant {
            return;
        }
        let shown = match self.parse(spec.kind, from.lat_entry) {
            Ok(v) => v,
            Err(_) => return,
        };
        let si = match spec.kind {
            Kind::Height => from.height.to_m(shown),
            Kind::Speed => from.wind.to_ms(shown),
            _ => shown,
        };
        // An out-of-range value is an invalid entry too: kept as typed, so the range
        // message on OK still shows what the user keyed.
        if !si.is_finite() || si < spec.min || si > spec.max {
            return;
        }
        *self = Field::with_value(spec, si, to);
    }
}

fn number(t: &str) -> Result<f64, FieldError> {
    // Our keys type only digits, one point and a leading sign; anything the float parser
    // would also take (exponents, "inf") cannot be typed, but is refused all the same.
    let body = t.strip_prefix('-').unwrap_or(t);
    if body.is_empty()
        || body == "."
        || !body.bytes().all(|b| b.is_ascii_digit() || b == b'.')
        || body.bytes().filter(|&b| b == b'.').count() > 1
    {
        return Err(FieldError::NotANumber);
    }
    decimal(t).ok_or(FieldError::NotANumber)
}

/// The value of a decimal numeral of digits, at most one point and a leading '-', exactly
/// as `str::parse::<f64>` gives it, without its 15 KB of code on the board (measured,
/// docs/board.md). With at most 15 digits the digits form an integer m < 2⁵³ and the
/// point a power 10ᵏ, k ≤ 15, both exact in f64, so the one correctly rounded division
/// m / 10ᵏ is the correctly rounded value of the numeral (the exact case of Clinger's
/// 1990 algorithm). A field holds at most [`FIELD_LEN`] characters; more than 15 digits
/// are refused (`None`), as is anything else.
fn decimal(t: &str) -> Option<f64> {
    const POW10: [f64; 16] = [
        1.0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
    ];
    let (negative, body) = match t.strip_prefix('-') {
        Some(b) => (true, b),
        None => (false, t),
    };
    let mut mantissa: u64 = 0;
    let mut digits = 0usize;
    let mut fraction: Option<usize> = None;
    for b in body.bytes() {
        match b {
            b'0'..=b'9' => {
                digits += 1;
                if digits > 15 {
                    return None;
                }
                mantissa = mantissa * 10 + u64::from(b - b'0');
                if let Some(k) = fraction.as_mut() {
                    *k += 1;
                }
            }
            b'.' if fraction.is_none() => fraction = Some(0),
            _ => return None,
        }
    }
    if digits == 0 {
        return None;
    }
    let k = fraction.unwrap_or(0);
    // m < 10¹⁵ < 2⁵³: the conversion is exact.
    let v = mantissa as f64 / *POW10.get(k)?;
    Some(if negative { -v } else { v })
}

fn libm_abs(x: f64) -> f64 {
    if x < 0.0 {
        -x
    } else {
        x
    }
}

/// `x` with at most `decimals` decimals and no trailing zeros: 10500, 45.5, -1.25.
pub fn short_number(x: f64, decimals: usize) -> Line {
    let mut s = Line::new();
    let _ = write!(s, "{x:.decimals$}");
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    if s.as_str() == "-0" {
        s.clear();
        let _ = s.push('0');
    }
    s
}

#[cfg(test)]
mod tests {

    #[test]
    fn decimal_is_the_standard_parser_on_every_numeral_a_field_holds() {
        extern crate std;
        use std::{format, vec::Vec};
        // Differential against core's correctly rounded parser (str::parse), on numerals
        // of the keypad's alphabet up to a field's length: exhaustive on short ones,
        // random on long ones (a fixed-seed xorshift, so the run repeats).
        let alphabet = b"0123456789.";
        let check = |t: &str| {
            let want = t.parse::<f64>().ok();
            let got = decimal(t);
            match (want, got) {
                (Some(a), Some(b)) => assert_eq!(a.to_bits(), b.to_bits(), "{t}"),
                (None, None) => {}
                (a, b) => assert_eq!(a, b, "{t}"),
            }
        };
        let mut buf = Vec::new();
        for len in 1..=5u32 {
            for n in 0..11u64.pow(len) {
                buf.clear();
                let mut x = n;
                for _ in 0..len {
                    buf.push(alphabet[(x % 11) as usize]);
                    x /= 11;
                }
                let t = core::str::from_utf8(&buf).unwrap();
                check(t);
                check(&format!("-{t}"));
            }
        }
        let mut r: u64 = 0x9E37_79B9_7F4A_7C15;
        for _ in 0..200_000 {
            r ^= r << 13;
            r ^= r >> 7;
            r ^= r << 17;
            let len = 6 + (r % 7) as usize; // 6 to 12 characters
            buf.clear();
            let mut x = r >> 8;
            for _ in 0..len {
                // Mostly digits, a point now and then.
                buf.push(if x.is_multiple_of(9) {
                    b'.'
                } else {
                    b'0' + (x % 10) as u8
                });
                x /= 7;
                if x == 0 {
                    x = r.rotate_left(17);
                }
            }
            check(core::str::from_utf8(&buf).unwrap());
        }
        for t in [
            "9999999999.9",
            "0.0000000001",
            "123456789012",
            "-0",
            "-.5",
            "5.",
            ".",
        ] {
            check(t);
        }
    }
    use super::*;
    use crate::settings::HeightUnit;
    use crate::settings::LatEntry::{Decimal, DegMin};

    const LAT: FieldSpec = FieldSpec {
        label: "Latitude",
        kind: Kind::Latitude,
        min: -90.0,
        max: 90.0,
    };
    const DEPTH: FieldSpec = FieldSpec {
        label: "Depth",
        kind: Kind::Height,
        min: 1.0,
        max: 30_000.0,
    };

    fn typed(keys: &[Key], entry: LatEntry) -> Field {
        let mut f = Field::default();
        for &k in keys {
            f.edit(k, entry, Kind::Latitude);
        }
        f.finish();
        f
    }

    #[test]
    fn digits_point_and_sign() {
        use Key::*;
        let f = typed(&[Digit(4), Digit(5), Dot, Digit(5), Sign], Decimal);
        assert_eq!(f.display().as_str(), "-45.5");
        assert_eq!(f.value(&LAT, &Settings::default()), Result::Ok(-45.5));
        // A second point is refused, not added.
        let f = typed(&[Digit(1), Dot, Dot, Digit(2)], Decimal);
        assert_eq!(f.display().as_str(), "1.2");
    }

    #[test]
    fn cursor_and_delete() {
        use Key::*;
        // 4 5 5, left, delete → "45" with the cursor before the last 5, then 0 → "405".
        let f = typed(
            &[Digit(4), Digit(5), Digit(5), Left, Delete, Digit(0)],
            Decimal,
        );
        assert_eq!(f.display().as_str(), "405");
        // Delete at the very start removes the first character.
        let f = typed(&[Digit(1), Digit(2), Left, Left, Delete], Decimal);
        assert_eq!(f.display().as_str(), "2");
    }

    #[test]
    fn arrows_alone_type_a_value() {
        use Key::*;
        // Up starts a new 0; Up×4 more → 4; Right to the end; Down starts a 9; Up 0…
        let keys = [Up, Up, Up, Up, Up, Right, Down, Down, Down, Down, Down];
        let f = typed(&keys, Decimal);
        assert_eq!(f.display().as_str(), "45");
        // Rolling a character down past 0 reaches the gap, which deletes it.
        let f = typed(&[Digit(4), Digit(0), Left, Down], Decimal);
        assert_eq!(f.display().as_str(), "4");
    }

    #[test]
    fn degrees_minutes() {
        use Key::*;
        let s = Settings {
            lat_entry: DegMin,
            ..Settings::default()
        };
        let f = typed(&[Digit(4), Digit(5), Dot, Digit(3), Digit(0)], DegMin);
        assert_eq!(f.display().as_str(), "45°30");
        assert_eq!(f.value(&LAT, &s), Result::Ok(45.5));
        let f = typed(&[Digit(4), Dot, Digit(7), Digit(5)], DegMin);
        assert_eq!(f.value(&LAT, &s), Err(FieldError::BadMinutes));
        assert_eq!(f.display().as_str(), "4°75");
        // A degree mark typed in decimal style does not exist: the point is typed.
        let f = typed(&[Digit(4), Dot, Digit(7)], Decimal);
        assert_eq!(f.display().as_str(), "4.7");
    }

    #[test]
    fn out_of_range_is_kept_not_clamped() {
        let f = Field::with_text("91");
        assert_eq!(
            f.value(&LAT, &Settings::default()),
            Err(FieldError::OutOfRange)
        );
        assert_eq!(f.display().as_str(), "91");
        assert_eq!(LAT.range_text(&Settings::default()).as_str(), "-90 to 90 °");
        assert_eq!(
            Field::default().value(&LAT, &Settings::default()),
            Err(FieldError::Empty)
        );
        assert_eq!(
            Field::with_text("-").value(&LAT, &Settings::default()),
            Err(FieldError::NotANumber)
        );
    }

    #[test]
    fn unit_changes_reexpress_valid_values_only() {
        let m = Settings::default();
        let ft = Settings {
            height: HeightUnit::Foot,
            ..m
        };
        let mut f = Field::with_text("8950");
        f.convert(&DEPTH, &m, &ft);
        let back = f.value(&DEPTH, &ft).unwrap();
        assert!((back - 8950.0).abs() < 0.01, "{back}");
        let mut bad = Field::with_text("1.2.3");
        bad.convert(&DEPTH, &m, &ft);
        assert_eq!(bad.display().as_str(), "1.2.3");
        // Latitude style: 45.5 ↔ 45°30.
        let dm = Settings {
            lat_entry: DegMin,
            ..m
        };
        let mut l = Field::with_text("-45.25");
        l.convert(&LAT, &m, &dm);
        assert_eq!(l.display().as_str(), "-45°15");
        l.convert(&LAT, &dm, &m);
        assert_eq!(l.display().as_str(), "-45.25");
    }

    #[test]
    fn full_field_ignores_more_keys() {
        let mut f = Field::default();
        for _ in 0..20 {
            f.edit(Key::Digit(7), Decimal, Kind::Height);
        }
        assert_eq!(f.len(), FIELD_LEN);
        f.edit(Key::Sign, Decimal, Kind::Height);
        assert_eq!(f.len(), FIELD_LEN);
    }

    #[test]
    fn huge_or_out_of_range_values_never_overflow_and_stay_as_typed() {
        // Found by the random-key test: a latitude of 99999999999 typed in decimal degrees,
        // then the entry style switched to degrees-minutes, overflowed the degree count.
        let dec = Settings::default();
        let dm = Settings {
            lat_entry: DegMin,
            ..Settings::default()
        };
        let mut f = Field::with_text("99999999999");
        f.convert(&LAT, &dec, &dm);
        assert_eq!(f.display().as_str(), "99999999999");
        // Built directly from any value, huge or not finite, the field shows a plain number.
        for v in [4.0e9, 1.0e300, f64::INFINITY, f64::NAN, -4.0e9] {
            let g = Field::with_value(&LAT, v, &dm);
            assert!(!g.display().contains('°'), "{v} shown as {}", g.display());
        }
        // An in-range value still converts.
        let mut h = Field::with_text("45.5");
        h.convert(&LAT, &dec, &dm);
        assert_eq!(h.display().as_str(), "45°30");
    }
}
