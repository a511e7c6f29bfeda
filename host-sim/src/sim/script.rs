//! Key scripts: plain text that walks the device from power-on, for `leeward shots` and
//! the golden screenshots.
//!
//! ```text
//! # A comment runs from '#' to the end of the line.
//! ok down ok        # keys by name: ok back menu up down left right del dot sign
//! 45.5              # a string of digits, '.' and '-' is typed key by key
//! del*14            # a token followed by *N is repeated N times (1 to 999)
//! @site-result      # take a screenshot here, named site-result (site-result.png)
//! ```
//!
//! Tokens are separated by spaces, tabs or line ends; key names ignore case. A shot name
//! is 1 to 64 of a-z, 0-9, '-' and '_', and each name is used once per script.

use super::keys;
use leeward_firmware::Key;
use std::fmt;

/// Longest repeat a token may ask for.
pub const MAX_REPEAT: u32 = 999;
/// Longest shot name.
pub const MAX_SHOT_NAME: usize = 64;

/// One step of a script.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Step {
    /// Press this key.
    Press(Key),
    /// Take a screenshot with this name.
    Shot(String),
}

/// What is wrong with a script, and where.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ScriptError {
    /// Line of the script, from 1.
    pub line: usize,
    /// The token as written.
    pub token: String,
    /// What is wrong with it.
    pub kind: ErrorKind,
}

/// The ways a token can be wrong.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ErrorKind {
    /// Not a key name, nor digits, '.' and '-'.
    UnknownKey,
    /// A repeat count that is not a number from 1 to [`MAX_REPEAT`].
    BadRepeat,
    /// A shot name that is empty, too long or has a character outside a-z, 0-9, - and _.
    BadShotName,
    /// A shot name already used in this script.
    DuplicateShot,
}

impl fmt::Display for ScriptError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let (line, t) = (self.line, &self.token);
        match self.kind {
            ErrorKind::UnknownKey => write!(
                f,
                "line {line}: unknown key '{t}' (keys: {}, or digits with '.' and '-')",
                keys::NAMES.map(|(n, _)| n).join(" ")
            ),
            ErrorKind::BadRepeat => write!(
                f,
                "line {line}: '{t}': a repeat is *N with N from 1 to {MAX_REPEAT}"
            ),
            ErrorKind::BadShotName => write!(
                f,
                "line {line}: '{t}': a shot name is @ then 1 to {MAX_SHOT_NAME} of a-z, 0-9, - and _"
            ),
            ErrorKind::DuplicateShot => {
                write!(f, "line {line}: '{t}': this shot name is used twice")
            }
        }
    }
}

impl std::error::Error for ScriptError {}

fn valid_shot_name(n: &str) -> bool {
    !n.is_empty()
        && n.len() <= MAX_SHOT_NAME
        && n.bytes()
            .all(|b| b.is_ascii_lowercase() || b.is_ascii_digit() || b == b'-' || b == b'_')
}

/// The keys one token (without its repeat) stands for.
fn token_keys(word: &str) -> Option<Vec<Key>> {
    if let Some(k) = keys::named(word) {
        return Some(vec![k]);
    }
    word.chars().map(keys::typed).collect()
}

/// Read a whole script into steps; the first bad token is the error.
pub fn parse(text: &str) -> Result<Vec<Step>, ScriptError> {
    let mut steps = Vec::new();
    let mut shots: Vec<String> = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let code = raw.split('#').next().unwrap_or("");
        for token in code.split_whitespace() {
            let err = |kind| ScriptError {
                line,
                token: token.to_string(),
                kind,
            };
            if let Some(name) = token.strip_prefix('@') {
                if !valid_shot_name(name) {
                    return Err(err(ErrorKind::BadShotName));
                }
                if shots.iter().any(|s| s == name) {
                    return Err(err(ErrorKind::DuplicateShot));
                }
                shots.push(name.to_string());
                steps.push(Step::Shot(name.to_string()));
                continue;
            }
            let (word, times) = match token.split_once('*') {
                Some((w, n)) => match n.parse::<u32>() {
                    Ok(n) if (1..=MAX_REPEAT).contains(&n) && !w.is_empty() => (w, n),
                    _ => return Err(err(ErrorKind::BadRepeat)),
                },
                None => (token, 1),
            };
            let keys = token_keys(word).ok_or_else(|| err(ErrorKind::UnknownKey))?;
            for _ in 0..times {
                steps.extend(keys.iter().map(|&k| Step::Press(k)));
            }
        }
    }
    Ok(steps)
}

#[cfg(test)]
mod tests {
    use super::*;
    use Key::*;

    fn keys(s: &str) -> Vec<Key> {
        parse(s)
            .unwrap()
            .into_iter()
            .map(|st| match st {
                Step::Press(k) => k,
                Step::Shot(n) => panic!("unexpected shot {n}"),
            })
            .collect()
    }

    #[test]
    fn names_digits_and_repeats() {
        assert_eq!(keys("ok Down  OK\tback"), [Ok, Down, Ok, Back]);
        assert_eq!(
            keys("-10.25"),
            [Sign, Digit(1), Digit(0), Dot, Digit(2), Digit(5)]
        );
        assert_eq!(keys("del*3 up*1"), [Delete, Delete, Delete, Up]);
        assert_eq!(keys("12*2"), [Digit(1), Digit(2), Digit(1), Digit(2)]);
        assert_eq!(
            keys("menu left right dot sign"),
            [Menu, Left, Right, Dot, Sign]
        );
        assert_eq!(keys(". -"), [Dot, Sign]);
    }

    #[test]
    fn comments_and_blank_lines() {
        assert_eq!(keys("# nothing\n\n  ok # then ok\n#ok\nup#down"), [Ok, Up]);
        assert!(parse("").unwrap().is_empty());
    }

    #[test]
    fn shots_in_order() {
        let s = parse("@home ok\n@site-form").unwrap();
        assert_eq!(
            s,
            [
                Step::Shot("home".into()),
                Step::Press(Ok),
                Step::Shot("site-form".into())
            ]
        );
    }

    #[test]
    fn errors_name_the_token_and_line() {
        let e = parse("ok\n\nok enter").unwrap_err();
        assert_eq!(
            (e.line, e.token.as_str(), e.kind),
            (3, "enter", ErrorKind::UnknownKey)
        );
        assert!(
            e.to_string().starts_with("line 3: unknown key 'enter'"),
            "{e}"
        );
        // A typo inside a digit string is not typed halfway.
        assert_eq!(parse("45x5").unwrap_err().kind, ErrorKind::UnknownKey);
        for bad in ["ok*0", "ok*1000", "ok*", "*3", "ok*x"] {
            assert_eq!(parse(bad).unwrap_err().kind, ErrorKind::BadRepeat, "{bad}");
        }
        for bad in ["@", "@Home", "@a/b", "@a.png"] {
            assert_eq!(
                parse(bad).unwrap_err().kind,
                ErrorKind::BadShotName,
                "{bad}"
            );
        }
        let long = format!("@{}", "a".repeat(MAX_SHOT_NAME + 1));
        assert_eq!(parse(&long).unwrap_err().kind, ErrorKind::BadShotName);
        let e = parse("@a ok\n@a").unwrap_err();
        assert_eq!((e.line, e.kind), (2, ErrorKind::DuplicateShot));
    }
}
