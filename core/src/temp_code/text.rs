//! The text as groups: tokens split on blanks and `=`, parts found by their `TTAA` …
//! `TTDD` headers, each part's groups in a fixed-capacity table.

use heapless::Vec;

/// Most groups one part may hold; a longer part is cut there (with an issue).
pub(crate) const MAX_GROUPS: usize = 400;
/// Most parts one text may hold.
pub(crate) const MAX_PARTS: usize = 8;

/// Which part a header names.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Header {
    A,
    B,
    C,
    D,
}

/// Where one part lies in the text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct PartSpan {
    pub header: Header,
    /// Byte offset of the header.
    pub start: usize,
    /// Byte offset where the part ends (its `=`, the next header, or the end of text).
    pub end: usize,
    /// Whether the part ended with `=`.
    pub ended: bool,
}

/// Group separators: blanks and every ASCII control character (radio text carries
/// start/end-of-message bytes and carriage returns).
fn is_separator(b: u8) -> bool {
    b == b' ' || b.is_ascii_control()
}

/// The next token at or after `from`: `(start, end)`. `=` is a token of its own.
pub(crate) fn next_token(text: &[u8], from: usize) -> Option<(usize, usize)> {
    let mut i = from;
    while text.get(i).is_some_and(|&b| is_separator(b)) {
        i += 1;
    }
    let first = *text.get(i)?;
    if first == b'=' {
        return Some((i, i + 1));
    }
    let start = i;
    while text.get(i).is_some_and(|&b| !is_separator(b) && b != b'=') {
        i += 1;
    }
    Some((start, i))
}

fn header_of(token: &[u8]) -> Option<Header> {
    match token {
        b"TTAA" => Some(Header::A),
        b"TTBB" => Some(Header::B),
        b"TTCC" => Some(Header::C),
        b"TTDD" => Some(Header::D),
        _ => None,
    }
}

/// Find the parts of the text. Text before the first header and between a `=` and the
/// next header (bulletin headings, other reports) is not part of any part. Returns the
/// parts and how many more did not fit.
pub(crate) fn locate_parts(text: &[u8]) -> (Vec<PartSpan, MAX_PARTS>, u16) {
    let mut parts = Vec::new();
    let mut extra = 0u16;
    let mut open: Option<PartSpan> = None;
    let mut close = |span: PartSpan, parts: &mut Vec<PartSpan, MAX_PARTS>| {
        if parts.push(span).is_err() {
            extra = extra.saturating_add(1);
        }
    };
    let mut at = 0;
    while let Some((s, e)) = next_token(text, at) {
        at = e;
        let token = text.get(s..e).unwrap_or(&[]);
        if let Some(header) = header_of(token) {
            if let Some(mut span) = open.take() {
                span.end = s;
                close(span, &mut parts);
            }
            open = Some(PartSpan {
                header,
                start: s,
                end: text.len(),
                ended: false,
            });
        } else if token == b"=" {
            if let Some(mut span) = open.take() {
                span.end = s;
                span.ended = true;
                close(span, &mut parts);
            }
        }
    }
    if let Some(span) = open.take() {
        close(span, &mut parts);
    }
    (parts, extra)
}

/// The groups of one part: index 0 is the header.
pub(crate) struct Groups<'a> {
    text: &'a [u8],
    toks: Vec<(u32, u32), MAX_GROUPS>,
    /// Byte offset of the part's end.
    pub end: usize,
    /// Whether groups were left out because the table was full.
    pub overflow: bool,
}

impl<'a> Groups<'a> {
    /// Split the part `span` of `text` (at most `u32::MAX` bytes long).
    pub(crate) fn of(text: &'a [u8], span: &PartSpan) -> Self {
        let mut toks = Vec::new();
        let mut overflow = false;
        let mut at = span.start;
        while let Some((s, e)) = next_token(text, at) {
            if s >= span.end {
                break;
            }
            at = e;
            if toks.push((s as u32, e as u32)).is_err() {
                overflow = true;
                break;
            }
        }
        Groups {
            text,
            toks,
            end: span.end,
            overflow,
        }
    }

    /// Number of groups, header included.
    pub(crate) fn len(&self) -> usize {
        self.toks.len()
    }

    /// The group at `i`; empty past the end.
    pub(crate) fn get(&self, i: usize) -> &'a [u8] {
        match self.toks.get(i) {
            Some(&(s, e)) => self.text.get(s as usize..e as usize).unwrap_or(&[]),
            None => &[],
        }
    }

    /// Byte offset of the group at `i` in the whole text; the part's end past the last.
    pub(crate) fn offset(&self, i: usize) -> usize {
        match self.toks.get(i) {
            Some(&(s, _)) => s as usize,
            None => self.end,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tokens_split_on_blanks_and_equals() {
        // Invented, for the test.
        let t = b" TTAA\r\n 62121\t03005= x";
        let mut at = 0;
        let mut got: Vec<(usize, usize), 8> = Vec::new();
        while let Some((s, e)) = next_token(t, at) {
            got.push((s, e)).unwrap();
            at = e;
        }
        assert_eq!(
            got.as_slice(),
            &[(1, 5), (8, 13), (14, 19), (19, 20), (21, 22)]
        );
    }

    #[test]
    fn parts_end_at_equals_or_the_next_header() {
        // Invented, for the test: a heading, Part A ended by '=', Part B without '='
        // followed by Part C.
        let t = b"USXX01 LEEW 121200\nTTAA 62121 03005 99013=\nTTBB 6212/ 03005 00013 TTCC 1";
        let (parts, extra) = locate_parts(t);
        assert_eq!(extra, 0);
        assert_eq!(parts.len(), 3);
        assert_eq!(parts[0].header, Header::A);
        assert!(parts[0].ended);
        assert_eq!(&t[parts[0].start..parts[0].end], b"TTAA 62121 03005 99013");
        assert_eq!(parts[1].header, Header::B);
        assert!(!parts[1].ended);
        assert_eq!(parts[2].header, Header::C);
        let g = Groups::of(t, &parts[1]);
        assert_eq!(g.len(), 4);
        assert_eq!(g.get(3), b"00013");
        assert_eq!(g.offset(3), parts[1].start + 17);
        assert_eq!(g.get(4), b"");
        assert_eq!(g.offset(4), parts[1].end);
    }
}
