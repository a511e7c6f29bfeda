//! The data sections of Parts A and B: levels found by [`align::walk`], decoded group by
//! group, and handed to [`Ctx::add`].

use super::align::{self, Event, Layout, Step};
use super::groups::{self, figures, has_indicator, value};
use super::text::Groups;
use super::{Ctx, Ident, IssueKind, PartId};
use crate::sounding::{Level, LevelKind};

/// Part A's surfaces in order: indicator and pressure (hPa); the surface (`99`) first.
const STANDARD: [([u8; 2], u16); 12] = [
    (*b"99", 0),
    (*b"00", 1000),
    (*b"92", 925),
    (*b"85", 850),
    (*b"70", 700),
    (*b"50", 500),
    (*b"40", 400),
    (*b"30", 300),
    (*b"25", 250),
    (*b"20", 200),
    (*b"15", 150),
    (*b"10", 100),
];

/// Whether `g` is one of the section indicators 21212, 31313, 41414, 51515 … 59595,
/// 61616 … 69696.
fn is_marker(g: &[u8]) -> bool {
    if g.len() != 5 || !g.iter().all(u8::is_ascii_digit) {
        return false;
    }
    let repeated = g[0] == g[2] && g[2] == g[4] && g[1] == g[3];
    repeated && g[1] == b'1' && matches!(g[0], b'2'..=b'4')
        || repeated && matches!(g[0], b'5' | b'6') && g[1] != b'0'
}

/// Whether `g` starts Part A's section 3 or 4 (or a later one).
fn starts_section_a(g: &[u8]) -> bool {
    (has_indicator(g, *b"88") || has_indicator(g, *b"77") || has_indicator(g, *b"66"))
        || is_marker(g)
}

/// Part A's section 2 for one `Id`: `wind_top_hpa` is the last surface with a wind
/// group (`None`: no winds above the surface).
struct LayoutA {
    wind_top_hpa: Option<u16>,
}

impl LayoutA {
    /// `Id` (code table 1734, from memory): the hundreds of hectopascals of the last
    /// standard surface with a wind; 0 is 1000 hPa, `/` none. A surface has its wind group
    /// when its pressure is not below `Id` hundreds (so `Id` = 1 includes 150 hPa).
    fn for_id(id: Option<u8>) -> Self {
        LayoutA {
            wind_top_hpa: id.map(|d| if d == 0 { 1000 } else { u16::from(d) * 100 }),
        }
    }
}

impl Layout for LayoutA {
    fn groups(&self, j: usize) -> usize {
        match STANDARD.get(j) {
            Some(_) if j == 0 => 3,
            Some(&(_, p)) if self.wind_top_hpa.is_some_and(|top| p >= top) => 3,
            _ => 2,
        }
    }

    fn strength(&self, g: &[u8], j: usize, _prev: Option<u16>) -> (u8, Option<u16>) {
        let Some(&(ind, p)) = STANDARD.get(j) else {
            return (0, None);
        };
        if has_indicator(g, ind) && figures(g).is_ok() {
            (2, Some(p))
        } else if g.len() >= 2 && g[..2] == ind {
            (1, Some(p))
        } else {
            (0, None)
        }
    }

    fn ends(&self, g: &[u8]) -> bool {
        // Only a readable indicator ends the standard surfaces: a garbled group that
        // happens to start with 88, 77 or 66 is a damaged level, and the walk
        // resynchronises on the indicators after it.
        starts_section_a(g) && figures(g).is_ok()
    }
}

/// Part B's sections 5 and 6: `nnPPP` and one data group per level; nn is 00 for the
/// surface, then 11, 22 … 99, 11 …; the pressure must fall level by level.
struct LayoutB;

fn nn(j: usize) -> [u8; 2] {
    if j == 0 {
        *b"00"
    } else {
        let d = b'1' + ((j - 1) % 9) as u8;
        [d, d]
    }
}

impl Layout for LayoutB {
    fn groups(&self, _j: usize) -> usize {
        2
    }

    fn strength(&self, g: &[u8], j: usize, prev: Option<u16>) -> (u8, Option<u16>) {
        if !has_indicator(g, nn(j)) {
            return (0, None);
        }
        let p = figures(g)
            .ok()
            .and_then(|f| value(&f[2..5]))
            .map(groups::pressure_with_thousand_hpa);
        match p {
            Some(p) if p > 0 && prev.is_none_or(|q| p < q) => (2, Some(p)),
            _ => (1, None),
        }
    }

    fn ends(&self, g: &[u8]) -> bool {
        is_marker(g)
    }
}

/// The data groups of a level found with `found` groups where `n` belong: their indices,
/// or `None` (with the issue said) when they cannot be told apart.
fn data_groups(
    ctx: &mut Ctx,
    part: PartId,
    g: &Groups,
    step: &Step,
    n: usize,
) -> Option<heapless::Vec<usize, 2>> {
    let found = step.end - step.start;
    let mut out = heapless::Vec::new();
    if found == n {
        for i in step.start + 1..step.end {
            let _ = out.push(i);
        }
        return Some(out);
    }
    if found < n {
        ctx.issue(part, g, step.start, IssueKind::GroupMissing);
        return None;
    }
    // More groups than belong: usable only if the extra ones are plain noise.
    let readable = (step.start + 1..step.end)
        .filter(|&i| figures(g.get(i)).is_ok())
        .count();
    if readable == n - 1 {
        for i in step.start + 1..step.end {
            if figures(g.get(i)).is_ok() {
                let _ = out.push(i);
            } else {
                ctx.issue(part, g, i, IssueKind::ExtraGroup);
            }
        }
        Some(out)
    } else {
        ctx.issue(part, g, step.start + 1, IssueKind::ExtraGroup);
        None
    }
}

/// Decode a `TTTaDD` group into `level`, saying what is wrong.
fn put_temp(ctx: &mut Ctx, part: PartId, g: &Groups, i: usize, level: &mut Level) {
    match groups::temp_dew(g.get(i)) {
        Ok(td) => {
            level.temperature_k = td.temp_c.map(|t| t + 273.15);
            level.dewpoint_k = td.dewpoint_c.map(|t| t + 273.15);
            if let Some(kind) = td.dew_issue {
                ctx.issue(part, g, i, kind);
            }
        }
        Err(kind) => ctx.issue(part, g, i, kind),
    }
}

/// Decode a wind group into `level` (nothing when the unit is unknown: said once at the
/// date group).
fn put_wind(
    ctx: &mut Ctx,
    part: PartId,
    g: &Groups,
    i: usize,
    knots: Option<bool>,
    level: &mut Level,
) {
    let Some(knots) = knots else { return };
    match groups::wind(g.get(i), knots) {
        Ok(w) => level.wind = w,
        Err(kind) => ctx.issue(part, g, i, kind),
    }
}

fn say_out_of_step(ctx: &mut Ctx, part: PartId, g: &Groups, start: usize, end: usize) {
    let groups = (end - start).min(u16::MAX as usize) as u16;
    ctx.issue(part, g, start, IssueKind::OutOfStep { groups });
}

fn say_skipped(ctx: &mut Ctx, part: PartId, g: &Groups, step: &Step) {
    if step.skipped > 0 {
        let levels = step.skipped.min(u16::MAX as usize) as u16;
        ctx.issue(part, g, step.start, IssueKind::LevelsMissing { levels });
    }
}

/// Decode Part A's sections 2 to 4 (and pass over the rest).
pub(crate) fn part_a(ctx: &mut Ctx, g: &Groups, id: &Ident, knots: Option<bool>) {
    let part = PartId::A;
    // Id: read, or (garbled) the reading under which the indicators fit best.
    let id_figure = id.day.map(|d| d.last);
    let layout = match id_figure {
        Some(last) => LayoutA::for_id(last),
        None => {
            const CANDIDATES: [Option<u8>; 10] = [
                Some(1),
                Some(2),
                Some(3),
                Some(4),
                Some(5),
                Some(7),
                Some(8),
                Some(9),
                Some(0),
                None,
            ];
            let mut best = (i32::MIN, LayoutA::for_id(Some(1)));
            for c in CANDIDATES {
                let l = LayoutA::for_id(c);
                let score = align::fit(&l, g, id.data_at);
                if score > best.0 {
                    best = (score, l);
                }
            }
            ctx.issue(part, g, id.day_at.unwrap_or(1), IssueKind::WindTopGuessed);
            best.1
        }
    };

    let end = align::walk(&layout, g, id.data_at, &mut |event| match event {
        Event::OutOfStep { start, end } => say_out_of_step(ctx, part, g, start, end),
        Event::Level(step) => standard_level(ctx, g, &layout, &step, knots),
    });
    tail_a(ctx, g, end, knots);
}

fn standard_level(ctx: &mut Ctx, g: &Groups, layout: &LayoutA, step: &Step, knots: Option<bool>) {
    let part = PartId::A;
    say_skipped(ctx, part, g, step);
    let Some(&(_, p_std)) = STANDARD.get(step.level) else {
        return;
    };
    let ind = g.get(step.start);
    let hhh = if step.strength == 2 {
        figures(ind).ok().map(|f| value(&f[2..5]))
    } else {
        ctx.issue(part, g, step.start, IssueKind::BadIndicator);
        None
    };
    let surface = step.level == 0;
    let mut level = if surface {
        match hhh.flatten() {
            Some(ppp) => {
                let p = f64::from(groups::pressure_with_thousand_hpa(ppp)) * 100.0;
                ctx.surface_pa = Some(p);
                Level::at_pressure(p)
            }
            None => {
                if step.strength == 2 {
                    ctx.issue(part, g, step.start, IssueKind::BadPressure);
                }
                return;
            }
        }
    } else {
        let mut l = Level::at_pressure(f64::from(p_std) * 100.0);
        l.height_m = hhh
            .flatten()
            .and_then(|h| groups::standard_height_m(p_std, h));
        l
    };
    level.kind = if surface {
        LevelKind::SURFACE
    } else {
        LevelKind::STANDARD
    };
    let n = layout.groups(step.level);
    if let Some(data) = data_groups(ctx, part, g, step, n) {
        if let Some(&i) = data.first() {
            put_temp(ctx, part, g, i, &mut level);
        }
        if let Some(&i) = data.get(1) {
            put_wind(ctx, part, g, i, knots, &mut level);
        }
    }
    ctx.add(level, part, g, step.start);
}

/// Data groups after the indicator at `i` before the next section starts, at most `max`.
fn run_len(g: &Groups, i: usize, max: usize) -> usize {
    (i + 1..g.len())
        .take(max)
        .take_while(|&k| !starts_section_a(g.get(k)))
        .count()
}

/// Part A's sections 3 and 4 from group `i`, then the regional sections.
fn tail_a(ctx: &mut Ctx, g: &Groups, mut i: usize, knots: Option<bool>) {
    let part = PartId::A;
    while i < g.len() {
        let t = g.get(i);
        let tropopause = has_indicator(t, *b"88");
        let max_wind = has_indicator(t, *b"77") || has_indicator(t, *b"66");
        if is_marker(t) {
            // Regional and national groups run to the end of the part.
            ctx.issue(part, g, i, IssueKind::SectionSkipped);
            return;
        }
        if !(tropopause || max_wind) {
            ctx.issue(part, g, i, IssueKind::UnexpectedGroup);
            i += 1;
            continue;
        }
        let ppp = figures(t).ok().and_then(|f| value(&f[2..5]));
        if ppp == Some(999) {
            i += 1;
            continue;
        }
        let need = if tropopause { 2 } else { 1 };
        let run = run_len(g, i, need);
        let pressure = match ppp {
            Some(p) if (1..=1100).contains(&p) => Some(f64::from(p) * 100.0),
            _ => {
                ctx.issue(part, g, i, IssueKind::BadPressure);
                None
            }
        };
        let mut level = Level::at_pressure(pressure.unwrap_or(0.0));
        if run < need {
            ctx.issue(part, g, i, IssueKind::GroupMissing);
        } else if tropopause {
            level.kind = LevelKind::TROPOPAUSE;
            put_temp(ctx, part, g, i + 1, &mut level);
            put_wind(ctx, part, g, i + 2, knots, &mut level);
        } else {
            level.kind = LevelKind::MAX_WIND;
            put_wind(ctx, part, g, i + 1, knots, &mut level);
        }
        if pressure.is_some() && run >= need {
            ctx.add(level, part, g, i);
        }
        i += 1 + run;
        // The vertical wind shear group 4vbvbvava after a maximum wind.
        if max_wind && run >= need {
            let s = g.get(i);
            if s.len() == 5 && s[0] == b'4' && !starts_section_a(s) {
                i += 1;
            }
        }
    }
}

/// Decode Part B's sections 5 and 6 (and pass over the rest).
pub(crate) fn part_b(ctx: &mut Ctx, g: &Groups, id: &Ident, knots: Option<bool>) {
    let part = PartId::B;
    let mut i = align::walk(&LayoutB, g, id.data_at, &mut |event| match event {
        Event::OutOfStep { start, end } => say_out_of_step(ctx, part, g, start, end),
        Event::Level(step) => significant_level(ctx, g, &step, false, knots),
    });
    while i < g.len() {
        let t = g.get(i);
        if t == b"21212" {
            i = align::walk(&LayoutB, g, i + 1, &mut |event| match event {
                Event::OutOfStep { start, end } => say_out_of_step(ctx, part, g, start, end),
                Event::Level(step) => significant_level(ctx, g, &step, true, knots),
            });
        } else if is_marker(t) {
            ctx.issue(part, g, i, IssueKind::SectionSkipped);
            i += 1;
            while i < g.len() && !is_marker(g.get(i)) {
                i += 1;
            }
        } else {
            ctx.issue(part, g, i, IssueKind::UnexpectedGroup);
            i += 1;
        }
    }
}

fn significant_level(ctx: &mut Ctx, g: &Groups, step: &Step, wind: bool, knots: Option<bool>) {
    let part = PartId::B;
    // The wind section need not repeat the surface.
    if !(wind && step.level == 1 && step.skipped == 1) {
        say_skipped(ctx, part, g, step);
    }
    let p_hpa = match (step.strength, step.pressure_hpa) {
        (2, Some(p)) => p,
        (1, _) => {
            ctx.issue(part, g, step.start, IssueKind::BadPressure);
            return;
        }
        _ => {
            ctx.issue(part, g, step.start, IssueKind::BadIndicator);
            return;
        }
    };
    let p = f64::from(p_hpa) * 100.0;
    let surface = step.level == 0;
    if surface {
        match ctx.surface_pa {
            Some(ps) if (ps - p).abs() > 0.5 => {
                // Part B's surface disagrees with the one already known.
                ctx.issue(part, g, step.start, IssueKind::BadPressure);
                return;
            }
            None => ctx.surface_pa = Some(p),
            _ => {}
        }
    }
    let mut level = Level::at_pressure(p);
    level.kind = match (surface, wind) {
        (true, _) => LevelKind::SURFACE,
        (false, false) => LevelKind::SIGNIFICANT_TEMPERATURE,
        (false, true) => LevelKind::SIGNIFICANT_WIND,
    };
    if let Some(data) = data_groups(ctx, part, g, step, 2) {
        if let Some(&i) = data.first() {
            if wind {
                put_wind(ctx, part, g, i, knots, &mut level);
            } else {
                put_temp(ctx, part, g, i, &mut level);
            }
        }
    }
    ctx.add(level, part, g, step.start);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn section_markers() {
        // WMO-306 FM 35 section indicators as described in the Aerographer's Mate
        // manual: 21212 (section 6), 31313 (7), 41414 (8), 51515 … 59595 regional,
        // 61616 … 69696 national.
        for m in [
            b"21212", b"31313", b"41414", b"51515", b"59595", b"61616", b"69696",
        ] {
            assert!(is_marker(m), "{m:?}");
        }
        for not in [b"11111", b"50505", b"12121", b"5151/", b"71717"] {
            assert!(!is_marker(not), "{not:?}");
        }
    }

    #[test]
    fn wind_groups_follow_id() {
        // From memory (code table 1734): Id = hundreds of hPa of the last standard
        // surface with a wind; 0 = 1000 hPa; / = none.
        let l = LayoutA::for_id(Some(7));
        let with: heapless::Vec<usize, 12> = (0..12).map(|j| l.groups(j)).collect();
        assert_eq!(with.as_slice(), &[3, 3, 3, 3, 3, 2, 2, 2, 2, 2, 2, 2]);
        let l = LayoutA::for_id(Some(1));
        assert!((0..12).all(|j| l.groups(j) == 3));
        let l = LayoutA::for_id(None);
        assert_eq!(l.groups(0), 3);
        assert!((1..12).all(|j| l.groups(j) == 2));
        let l = LayoutA::for_id(Some(0));
        assert_eq!((l.groups(1), l.groups(2)), (3, 2));
    }

    #[test]
    fn part_b_indicators_cycle_and_pressure_falls() {
        // WMO-306 FM 35 as described in the Aerographer's Mate manual: 00 surface,
        // then 11, 22 … 99, 11 …
        assert_eq!(nn(0), *b"00");
        assert_eq!(nn(1), *b"11");
        assert_eq!(nn(9), *b"99");
        assert_eq!(nn(10), *b"11");
        assert_eq!(LayoutB.strength(b"11850", 1, Some(1013)), (2, Some(850)));
        assert_eq!(LayoutB.strength(b"11850", 1, Some(800)), (1, None));
        assert_eq!(LayoutB.strength(b"00013", 0, None), (2, Some(1013)));
        assert_eq!(LayoutB.strength(b"22850", 1, None), (0, None));
    }
}
