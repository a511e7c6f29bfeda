//! Keeping in step with a garbled report: where each level begins.
//!
//! Both parts are runs of levels, each an indicator group (`85hhh`, `nnPPP`) followed by
//! a known number of data groups. A deleted, doubled or garbled group would shift every
//! later group by one if the decoder only counted. Instead each level's start is chosen
//! among the positions near where it is expected, scoring how well the indicators of the
//! next levels line up from there (a chain of three). A garbled indicator is believed at
//! its expected place only when the levels after it line up; when nothing lines up, the
//! decoder scans ahead for the next point where a chain does, and reports the groups
//! between as out of step. The weights are our choice: a sure indicator counts 2, one with
//! its other figures garbled 1, the expected position 1, a skipped level −1, each group of
//! distance from the expected position −1 (ties go to the surer indicator); the chain
//! also accepts a level one group off, for 1 less; a later
//! section's indicator (or the end) stands for a whole chain.

use super::text::Groups;

/// What a run of levels looks like.
pub(crate) trait Layout {
    /// Groups of level `j`, its indicator included.
    fn groups(&self, j: usize) -> usize;
    /// How surely `g` begins level `j`: 2 sure, 1 indicator right but the rest unreadable
    /// (or the pressure out of order), 0 not at all. `prev` is the pressure of the level
    /// below (hPa), where known; the level's own pressure is returned when read.
    fn strength(&self, g: &[u8], j: usize, prev: Option<u16>) -> (u8, Option<u16>);
    /// Whether `g` starts a later section (and so ends the run of levels).
    fn ends(&self, g: &[u8]) -> bool;
}

/// One level found: groups `start..end` of the part.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Step {
    /// Index of the level in its layout.
    pub level: usize,
    /// First group (the indicator).
    pub start: usize,
    /// One past the last group.
    pub end: usize,
    /// How surely the indicator was read (see [`Layout::strength`]).
    pub strength: u8,
    /// Pressure read from the indicator, hPa.
    pub pressure_hpa: Option<u16>,
    /// Levels of the layout skipped just before this one.
    pub skipped: usize,
}

/// What the walk reports.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Event {
    /// A level.
    Level(Step),
    /// Groups `start..end` that fit no level.
    OutOfStep { start: usize, end: usize },
}

#[derive(Debug, Clone, Copy)]
struct Choice {
    at: usize,
    ends: bool,
    level: usize,
    strength: u8,
    pressure: Option<u16>,
}

const CHAIN: usize = 2;
/// Levels a rescue scan may jump.
const RESCUE_SKIP: usize = 4;

fn chain<L: Layout>(l: &L, g: &Groups, at: usize, level: usize, prev: Option<u16>) -> i32 {
    let (mut c, mut j, mut prev) = (at, level, prev);
    let mut score = 0;
    for d in 0..CHAIN {
        if c >= g.len() || l.ends(g.get(c)) {
            score += 2 * (CHAIN - d) as i32;
            break;
        }
        // The level where expected, or (for 1 less) one group early or late: a later
        // level may itself have lost or gained a group.
        let found = [(c, 0), (c.wrapping_sub(1), 1), (c + 1, 1)]
            .into_iter()
            .filter(|&(k, _)| k < g.len())
            .find_map(|(k, cost)| {
                let (s, p) = l.strength(g.get(k), j, prev);
                (s > 0).then_some((k, i32::from(s) - cost, p))
            });
        let Some((k, s, p)) = found else { break };
        score += s;
        prev = p.or(prev);
        c = k + l.groups(j);
        j += 1;
    }
    score
}

fn select<L: Layout>(
    l: &L,
    g: &Groups,
    from: usize,
    end_from: usize,
    expected: usize,
    jmin: usize,
    prev: Option<u16>,
) -> Option<Choice> {
    let len = g.len();
    let mut best: Option<(i32, usize, Choice)> = None;
    // Ties go to the surer indicator, then to the position nearer the expected one.
    let mut consider = |score: i32, c: Choice| {
        let dist = c.at.abs_diff(expected);
        let better = match best {
            None => true,
            Some((s, d, b)) => {
                score > s
                    || (score == s && c.strength > b.strength)
                    || (score == s && c.strength == b.strength && dist < d)
            }
        };
        if score >= 3 && better {
            best = Some((score, dist, c));
        }
    };
    for c in from..=(expected + 2).min(len) {
        let bonus = |j: usize| i32::from(c == expected && j == jmin);
        if c >= end_from && (c == len || l.ends(g.get(c))) {
            let choice = Choice {
                at: c,
                ends: true,
                level: jmin,
                strength: 0,
                pressure: None,
            };
            consider(2 * (CHAIN as i32 + 1) + bonus(jmin), choice);
            continue;
        }
        for j in jmin..=jmin + 1 {
            let (s, p) = l.strength(g.get(c), j, prev);
            if s == 0 && !(c == expected && j == jmin) {
                continue;
            }
            let rest = chain(l, g, c + l.groups(j), j + 1, p.or(prev));
            let skip = i32::from(j > jmin) + c.abs_diff(expected) as i32;
            let choice = Choice {
                at: c,
                ends: false,
                level: j,
                strength: s,
                pressure: p,
            };
            consider(i32::from(s) + rest + bonus(j) - skip, choice);
        }
    }
    best.map(|(_, _, c)| c)
}

fn rescue<L: Layout>(
    l: &L,
    g: &Groups,
    from: usize,
    jmin: usize,
    prev: Option<u16>,
) -> Option<Choice> {
    for q in from..g.len() {
        if l.ends(g.get(q)) {
            return Some(Choice {
                at: q,
                ends: true,
                level: jmin,
                strength: 0,
                pressure: None,
            });
        }
        for j in jmin..jmin + RESCUE_SKIP {
            let (s, p) = l.strength(g.get(q), j, prev);
            if s == 2 && chain(l, g, q + l.groups(j), j + 1, p.or(prev)) >= 3 {
                return Some(Choice {
                    at: q,
                    ends: false,
                    level: j,
                    strength: s,
                    pressure: p,
                });
            }
        }
    }
    None
}

/// Walk the levels of `g` starting near group `first`, reporting each level and each
/// run of out-of-step groups to `on`. Returns the index of the group that ends the run
/// (a later section's indicator, or `g.len()`).
pub(crate) fn walk<L: Layout>(
    l: &L,
    g: &Groups,
    first: usize,
    on: &mut impl FnMut(Event),
) -> usize {
    let len = g.len();
    let mut current: Option<Step> = None;
    let (mut from, mut expected, mut jmin, mut prev) = (first.saturating_sub(1), first, 0, None);
    loop {
        // The run cannot end before its first group (the group before it may be the
        // section's own indicator).
        let end_from = if current.is_none() { first } else { from };
        let (choice, lost_at) = match select(l, g, from.max(1), end_from, expected, jmin, prev) {
            Some(c) => (Some(c), None),
            None => {
                let at = expected.min(len);
                (rescue(l, g, at, jmin, prev), Some(at))
            }
        };
        let next_at = choice.map_or(len, |c| c.at);
        if let Some(mut step) = current.take() {
            step.end = lost_at.map_or(next_at, |at| at.min(next_at));
            on(Event::Level(step));
        }
        if let Some(at) = lost_at {
            if next_at > at {
                on(Event::OutOfStep {
                    start: at,
                    end: next_at,
                });
            }
        }
        match choice {
            None => return len,
            Some(c) if c.ends => return c.at,
            Some(c) => {
                current = Some(Step {
                    level: c.level,
                    start: c.at,
                    end: c.at,
                    strength: c.strength,
                    pressure_hpa: c.pressure,
                    skipped: c.level - jmin,
                });
                from = c.at + 1;
                expected = c.at + l.groups(c.level);
                jmin = c.level + 1;
                prev = c.pressure.or(prev);
            }
        }
    }
}

/// How well a layout fits: the sum of the indicator strengths found, less the groups
/// out of step. Used to choose among readings when the `Id` figure is garbled.
pub(crate) fn fit<L: Layout>(l: &L, g: &Groups, first: usize) -> i32 {
    let mut score = 0i32;
    walk(l, g, first, &mut |e| match e {
        Event::Level(s) => score += i32::from(s.strength) - 3 * s.skipped as i32,
        Event::OutOfStep { start, end } => score -= (end - start) as i32,
    });
    score
}

#[cfg(test)]
mod tests {
    use super::super::text::{locate_parts, Groups};
    use super::*;

    /// A toy layout: level j is `jjxxx` (j = 1, 2, 3 …) plus one data group; `99999`
    /// ends the run. Invented, for the test.
    struct Toy;
    impl Layout for Toy {
        fn groups(&self, _j: usize) -> usize {
            2
        }
        fn strength(&self, g: &[u8], j: usize, _prev: Option<u16>) -> (u8, Option<u16>) {
            let d = b'1' + (j % 9) as u8;
            if g.len() == 5 && g[0] == d && g[1] == d {
                (2, None)
            } else {
                (0, None)
            }
        }
        fn ends(&self, g: &[u8]) -> bool {
            g == b"99999"
        }
    }

    fn run(text: &[u8]) -> (heapless::Vec<Event, 16>, usize) {
        let (parts, _) = locate_parts(text);
        let g = Groups::of(text, &parts[0]);
        let mut ev = heapless::Vec::new();
        let end = walk(&Toy, &g, 1, &mut |e| {
            let _ = ev.push(e);
        });
        (ev, end)
    }

    fn starts(ev: &[Event]) -> heapless::Vec<(usize, usize, usize), 16> {
        ev.iter()
            .filter_map(|e| match e {
                Event::Level(s) => Some((s.level, s.start, s.end)),
                _ => None,
            })
            .collect()
    }

    #[test]
    fn clean_run_is_counted() {
        let (ev, end) = run(b"TTAA 11000 00001 22000 00002 33000 00003 99999 5");
        assert_eq!(starts(&ev).as_slice(), &[(0, 1, 3), (1, 3, 5), (2, 5, 7)]);
        assert_eq!(end, 7);
    }

    #[test]
    fn a_deleted_group_does_not_shift_the_rest() {
        // Level 2's data group is gone: level 3 starts one group early.
        let (ev, _) = run(b"TTAA 11000 00001 22000 33000 00003 44000 00004 99999");
        assert_eq!(
            starts(&ev).as_slice(),
            &[(0, 1, 3), (1, 3, 4), (2, 4, 6), (3, 6, 8)]
        );
    }

    #[test]
    fn a_garbled_indicator_is_placed_by_its_neighbours() {
        let (ev, _) = run(b"TTAA 11000 00001 2x000 00002 33000 00003 44000 00004");
        let s = starts(&ev);
        assert_eq!(s[1], (1, 3, 5));
        assert_eq!(s[2], (2, 5, 7));
    }

    #[test]
    fn an_inserted_group_is_left_with_its_level() {
        let (ev, _) = run(b"TTAA 11000 00001 ##### 22000 00002 33000 00003 99999");
        assert_eq!(starts(&ev).as_slice(), &[(0, 1, 4), (1, 4, 6), (2, 6, 8)]);
    }

    #[test]
    fn lost_groups_are_reported_and_the_walk_recovers() {
        // Four junk groups where level 2 should be, then levels 4 and 5 in step.
        let (ev, _) =
            run(b"TTAA 11000 00001 aaaaa bbbbb ccccc ddddd 55000 00005 66000 00006 77000 1");
        assert!(ev.contains(&Event::OutOfStep { start: 3, end: 7 }));
        let s = starts(&ev);
        assert_eq!(s[0], (0, 1, 3));
        assert_eq!(s[1], (4, 7, 9));
    }
}
