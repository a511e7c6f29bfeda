//! Text without a heap: fixed-capacity strings, number formatting for the screen, and
//! word wrapping to a width in characters.

use core::fmt::Write;

/// One line of screen text (a line holds at most 40 characters of the body font; the
/// spare room keeps a long value from being cut before the overflow check sees it).
pub type Line = heapless::String<64>;

/// A message of a few lines (core error texts are up to about 150 characters).
pub type Message = heapless::String<256>;

/// Format into a [`Line`]; text past its capacity is dropped (and then shows as cut).
pub fn line(args: core::fmt::Arguments<'_>) -> Line {
    let mut s = Line::new();
    let _ = s.write_fmt(args);
    s
}

/// Format into a [`Message`]; text past its capacity is dropped.
pub fn message(args: core::fmt::Arguments<'_>) -> Message {
    let mut s = Message::new();
    let _ = s.write_fmt(args);
    s
}

/// Most lines [`wrap`] returns.
pub const MAX_WRAPPED: usize = 12;

/// Break `text` into lines of at most `width` characters, at spaces where possible and
/// inside a word only when the word alone is longer than a line. Lines past
/// [`MAX_WRAPPED`] are dropped; the caller sees that from the count it asked for.
pub fn wrap(text: &str, width: usize) -> heapless::Vec<&str, MAX_WRAPPED> {
    let mut out = heapless::Vec::new();
    let width = width.max(1);
    let mut rest = text.trim();
    while !rest.is_empty() {
        // Byte index of the end of the first `width` characters.
        let end = rest
            .char_indices()
            .nth(width)
            .map_or(rest.len(), |(i, _)| i);
        let (take, next) = if end == rest.len() {
            (rest, "")
        } else if rest[end..].starts_with(' ') {
            (&rest[..end], &rest[end..])
        } else {
            match rest[..end].rfind(' ') {
                Some(sp) if sp > 0 => (&rest[..sp], &rest[sp..]),
                _ => (&rest[..end], &rest[end..]),
            }
        };
        if out.push(take.trim_end()).is_err() {
            break;
        }
        rest = next.trim_start();
    }
    out
}

/// Number of characters in `s` (the fonts are monospaced: one cell per character).
pub fn chars(s: &str) -> usize {
    s.chars().count()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wraps_at_spaces() {
        let w = wrap("need 3 stations, have 2", 12);
        assert_eq!(w.as_slice(), ["need 3", "stations,", "have 2"]);
        for l in &w {
            assert!(chars(l) <= 12);
        }
    }

    #[test]
    fn breaks_a_word_longer_than_the_line() {
        let w = wrap("0.30000000000000004 is long", 8);
        assert_eq!(w[0], "0.300000");
        assert!(w.iter().all(|l| chars(l) <= 8));
        let joined: heapless::String<64> = w.iter().fold(heapless::String::new(), |mut s, l| {
            for c in l.chars().filter(|&c| c != ' ') {
                let _ = s.push(c);
            }
            s
        });
        assert_eq!(joined.as_str(), "0.30000000000000004islong");
    }

    #[test]
    fn counts_characters_not_bytes() {
        let w = wrap("±±±± °°", 4);
        assert_eq!(w.as_slice(), ["±±±±", "°°"]);
        assert_eq!(wrap("", 10).len(), 0);
        assert_eq!(wrap("   ", 10).len(), 0);
    }
}
