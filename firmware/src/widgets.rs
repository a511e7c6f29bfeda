//! The screen parts every task is built from: a list, a form of numeric fields, a result
//! page with one large primary figure, and a framed notice for messages.

use crate::field::{Field, FieldError, FieldSpec};
use crate::key::Key;
use crate::settings::Settings;
use crate::text::{message, Line, Message};
use crate::ui::{
    row_box, Align, Font, Inspect, Painter, BODY_LINES, BODY_TOP, BODY_W, INK, LINE_H, MARGIN,
    PAPER,
};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;

/// What a key did to a list.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ListOutcome {
    /// Nothing happened.
    Nothing,
    /// The selection moved.
    Moved,
    /// OK (or Right) on this row.
    Chosen(usize),
    /// Left on this row (lists of choices step back through the values).
    Previous(usize),
    /// BACK.
    Back,
}

/// A vertical list with one selected row; it wraps around at either end.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct List {
    /// The selected row.
    pub sel: u8,
}

impl List {
    /// Apply a key to a list of `n` rows.
    pub fn handle(&mut self, key: Key, n: usize) -> ListOutcome {
        let n = n.clamp(1, 255) as u8;
        if self.sel >= n {
            self.sel = n - 1;
        }
        match key {
            Key::Up => {
                self.sel = if self.sel == 0 { n - 1 } else { self.sel - 1 };
                ListOutcome::Moved
            }
            Key::Down => {
                self.sel = if self.sel + 1 >= n { 0 } else { self.sel + 1 };
                ListOutcome::Moved
            }
            Key::Ok | Key::Right => ListOutcome::Chosen(self.sel as usize),
            Key::Left => ListOutcome::Previous(self.sel as usize),
            Key::Back => ListOutcome::Back,
            Key::Digit(d) if d >= 1 && d <= n && d <= 9 => {
                // A digit jumps to that row: a shortcut, never the only way.
                self.sel = d - 1;
                ListOutcome::Moved
            }
            _ => ListOutcome::Nothing,
        }
    }
}

/// Draw rows of (label, value) with `sel` shown as a dark bar; scrolls to keep it in view.
pub fn draw_list<D, I>(
    p: &mut Painter<'_, D, I>,
    rows: &[(&str, &str)],
    sel: usize,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let first = sel.saturating_sub(BODY_LINES - 1);
    for (i, (label, value)) in rows.iter().enumerate().skip(first).take(BODY_LINES) {
        let r = i - first;
        let on = i == sel;
        let bar = row_box(r, 0, crate::ui::SCREEN_W);
        p.fill(bar, if on { INK } else { PAPER })?;
        let vw = Font::Body.measure(value).width;
        let label_w = BODY_W.saturating_sub(vw + if vw > 0 { 10 } else { 0 } + 20);
        // A pointer before the selected row: shape as well as shade.
        if on {
            p.text(row_box(r, MARGIN, 20), ">", Font::Body, Align::Left, true)?;
        }
        p.text(
            row_box(r, MARGIN + 20, label_w),
            label,
            Font::Body,
            Align::Left,
            on,
        )?;
        if vw > 0 {
            let x = MARGIN + BODY_W as i32 - vw as i32;
            p.text(row_box(r, x, vw), value, Font::Body, Align::Right, on)?;
        }
    }
    Ok(())
}

/// What a key did to a form.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FormOutcome {
    /// Nothing happened.
    Nothing,
    /// The form changed (text, cursor, selection).
    Changed,
    /// OK on the Compute row with every field valid.
    Compute,
    /// BACK while not editing: leave the form (it keeps its text).
    Leave,
    /// A field's check failed: its index and why. The text stays as typed.
    Invalid(usize, FieldError),
}

/// A form of `N` numeric fields and a Compute row.
#[derive(Debug, Clone, PartialEq)]
pub struct Form<const N: usize> {
    /// The fields, in the order of the specs.
    pub fields: [Field; N],
    /// Selected row: 0..N the fields, N the Compute row.
    pub sel: u8,
    /// True while the selected field is being edited.
    pub editing: bool,
}

/// Left edge of a form row's label, pixels.
pub const LABEL_X: i32 = MARGIN + 20;
/// Width of a form row's label, pixels.
pub const LABEL_W: u32 = 160;
/// Left edge of a form row's value box, pixels.
pub const VALUE_X: i32 = 196;
/// Width of a form row's value box, pixels.
pub const VALUE_W: u32 = 134;
/// Left edge of a form row's unit, pixels.
pub const UNIT_X: i32 = 336;
/// Width of a form row's unit, pixels.
pub const UNIT_W: u32 = 56;

/// Label of the row that runs the calculation.
pub const COMPUTE_LABEL: &str = "Compute";

impl<const N: usize> Form<N> {
    /// A form with these fields, the first selected.
    pub fn new(fields: [Field; N]) -> Self {
        Form {
            fields,
            sel: 0,
            editing: false,
        }
    }

    /// Apply a key.
    pub fn handle(&mut self, key: Key, specs: &[FieldSpec; N], s: &Settings) -> FormOutcome {
        let rows = N + 1;
        let i = (self.sel as usize).min(N);
        if self.editing && i < N {
            let f = &mut self.fields[i];
            return match key {
                Key::Ok => {
                    f.finish();
                    match f.value(&specs[i], s) {
                        Ok(_) => {
                            self.editing = false;
                            self.sel = (i + 1).min(N) as u8;
                            FormOutcome::Changed
                        }
                        // Stay in the edit with the text as typed.
                        Err(e) => FormOutcome::Invalid(i, e),
                    }
                }
                Key::Back => {
                    f.finish();
                    self.editing = false;
                    FormOutcome::Changed
                }
                k => {
                    if f.edit(k, s.lat_entry, specs[i].kind) {
                        FormOutcome::Changed
                    } else {
                        FormOutcome::Nothing
                    }
                }
            };
        }
        self.editing = false;
        match key {
            Key::Up => {
                self.sel = ((i + rows - 1) % rows) as u8;
                FormOutcome::Changed
            }
            Key::Down => {
                self.sel = ((i + 1) % rows) as u8;
                FormOutcome::Changed
            }
            Key::Back => FormOutcome::Leave,
            Key::Ok | Key::Right if i == N => match self.values(specs, s) {
                Ok(_) => FormOutcome::Compute,
                Err((j, e)) => {
                    self.sel = j as u8;
                    FormOutcome::Invalid(j, e)
                }
            },
            Key::Ok | Key::Right => {
                self.editing = true;
                FormOutcome::Changed
            }
            Key::Digit(_) | Key::Dot | Key::Sign | Key::Delete if i < N => {
                // Typing on a selected field starts the edit at the end of its text.
                self.editing = true;
                self.fields[i].edit(key, s.lat_entry, specs[i].kind);
                FormOutcome::Changed
            }
            _ => FormOutcome::Nothing,
        }
    }

    /// Every field's SI value, or the first field that fails and why.
    pub fn values(
        &self,
        specs: &[FieldSpec; N],
        s: &Settings,
    ) -> Result<[f64; N], (usize, FieldError)> {
        let mut out = [0.0; N];
        for (j, (f, spec)) in self.fields.iter().zip(specs.iter()).enumerate() {
            out[j] = f.value(spec, s).map_err(|e| (j, e))?;
        }
        Ok(out)
    }

    /// Re-express the fields after a change of settings.
    pub fn convert(&mut self, specs: &[FieldSpec; N], from: &Settings, to: &Settings) {
        for (f, spec) in self.fields.iter_mut().zip(specs.iter()) {
            f.convert(spec, from, to);
        }
    }

    /// Draw the form: label, value box, unit; a mark before a field that fails its check.
    pub fn draw<D, I>(
        &self,
        p: &mut Painter<'_, D, I>,
        specs: &[FieldSpec; N],
        s: &Settings,
    ) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        let sel = (self.sel as usize).min(N);
        self.draw_rows(p, specs, s, 0, Some(sel), COMPUTE_LABEL)
    }

    /// Draw the form from body line `first`, with row `sel` selected (`None`: a row above
    /// the form is), and `action` as the label of the last row.
    pub fn draw_rows<D, I>(
        &self,
        p: &mut Painter<'_, D, I>,
        specs: &[FieldSpec; N],
        s: &Settings,
        first: usize,
        sel: Option<usize>,
        action: &str,
    ) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        self.draw_window(p, specs, s, first, 0, sel, action)
    }

    /// Draw a form longer than the screen: the rows scroll so that the selected one is
    /// always in view (the Compute row last).
    pub fn draw_scrolled<D, I>(
        &self,
        p: &mut Painter<'_, D, I>,
        specs: &[FieldSpec; N],
        s: &Settings,
    ) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        let sel = (self.sel as usize).min(N);
        let skip = sel.saturating_sub(BODY_LINES - 1);
        self.draw_window(p, specs, s, 0, skip, Some(sel), COMPUTE_LABEL)
    }

    /// Rows `skip..` of the form from body line `first`, as many as the body holds.
    #[allow(clippy::too_many_arguments)]
    fn draw_window<D, I>(
        &self,
        p: &mut Painter<'_, D, I>,
        specs: &[FieldSpec; N],
        s: &Settings,
        first: usize,
        skip: usize,
        sel: Option<usize>,
        action: &str,
    ) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        let sel = sel.map_or(usize::MAX, |i| i.min(N));
        for (j, (f, spec)) in self.fields.iter().zip(specs.iter()).enumerate() {
            if j < skip || first + j - skip >= BODY_LINES {
                continue;
            }
            let on = j == sel;
            let i = j + first - skip;
            p.fill(
                row_box(i, 0, crate::ui::SCREEN_W),
                if on { INK } else { PAPER },
            )?;
            let bad = !f.is_empty() && f.value(spec, s).is_err() && !(on && self.editing);
            if bad {
                p.text(row_box(i, MARGIN, 16), "!", Font::Body, Align::Left, on)?;
            } else if on {
                p.text(row_box(i, MARGIN, 16), ">", Font::Body, Align::Left, true)?;
            }
            p.text(
                row_box(i, LABEL_X, LABEL_W),
                spec.label,
                Font::Body,
                Align::Left,
                on,
            )?;
            let vbox = row_box(i, VALUE_X, VALUE_W);
            let text = f.display();
            if on && self.editing {
                draw_edit_box(p, vbox, &text, f.cursor())?;
            } else {
                let shown: &str = if text.is_empty() { "-" } else { &text };
                p.text(vbox, shown, Font::Body, Align::Right, on)?;
            }
            p.text(
                row_box(i, UNIT_X, UNIT_W),
                spec.unit(s),
                Font::Body,
                Align::Left,
                on,
            )?;
        }
        let on = sel == N;
        let r = N + first - skip.min(N);
        if r >= BODY_LINES {
            return Ok(());
        }
        p.fill(
            row_box(r, 0, crate::ui::SCREEN_W),
            if on { INK } else { PAPER },
        )?;
        if on {
            p.text(row_box(r, MARGIN, 16), ">", Font::Body, Align::Left, true)?;
        }
        p.text(
            row_box(r, LABEL_X, LABEL_W),
            action,
            Font::Body,
            Align::Left,
            on,
        )?;
        Ok(())
    }
}

/// A value being edited: light box, dark frame, the cursor cell dark.
pub fn draw_edit_box<D, I>(
    p: &mut Painter<'_, D, I>,
    vbox: Rectangle,
    text: &str,
    cursor: usize,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    p.fill(vbox, PAPER)?;
    p.frame(vbox, 2)?;
    let inner = Rectangle::new(
        vbox.top_left + Point::new(4, 0),
        vbox.size - Size::new(8, 0),
    );
    p.text(inner, text, Font::Body, Align::Left, false)?;
    let cw = Font::Body.cell_w();
    let cur = Rectangle::new(
        inner.top_left + Point::new((cursor as u32 * cw) as i32, 1),
        Size::new(cw, LINE_H as u32 - 2),
    );
    let ch: Line = text.chars().nth(cursor).map_or_else(
        || Line::try_from(" ").unwrap_or_default(),
        |c| {
            let mut l = Line::new();
            let _ = l.push(c);
            l
        },
    );
    p.fill(cur, INK)?;
    // The character's box is the whole line's height (the text sits where it did, centred):
    // one line of text stays one line, for the body-line count.
    let cell = Rectangle::new(
        Point::new(cur.top_left.x, vbox.top_left.y),
        Size::new(cw, vbox.size.height),
    );
    p.text(cell, &ch, Font::Body, Align::Left, true)
}

/// The words for a field that fails its check: names the field and the allowed range.
pub fn entry_message(spec: &FieldSpec, field: &Field, err: FieldError, s: &Settings) -> Message {
    let range = spec.range_text(s);
    let label = spec.label;
    let text = field.display();
    match err {
        FieldError::Empty => message(format_args!("{label}: nothing entered. Allowed: {range}.")),
        FieldError::NotANumber => message(format_args!(
            "{label}: \"{text}\" is not a number. Allowed: {range}."
        )),
        FieldError::BadMinutes => message(format_args!(
            "{label}: \"{text}\": whole degrees, then ° and minutes 0 to 59.99."
        )),
        FieldError::OutOfRange => message(format_args!(
            "{label}: {text} is outside the allowed {range}."
        )),
    }
}

/// A result page: one large primary figure with its label and unit, a few more rows of
/// (label, value), and an optional note (a warning) wrapped below them.
#[derive(Debug, Clone, Default)]
pub struct Page {
    /// The line above the figure: what it is.
    pub head: Line,
    /// The primary figure, drawn large.
    pub figure: Line,
    /// Its unit, drawn after it in the body font.
    pub unit: Line,
    /// Secondary rows.
    pub rows: heapless::Vec<(Line, Line), 5>,
    /// A warning or remark, wrapped into the lines left.
    pub note: Option<Message>,
}

impl Page {
    /// Add a secondary row (rows past five are dropped; pages are designed for five).
    pub fn row(&mut self, label: Line, value: Line) {
        let _ = self.rows.push((label, value));
    }

    /// Draw the page's body.
    pub fn draw<D, I>(&self, p: &mut Painter<'_, D, I>) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        p.text(
            row_box(0, MARGIN, BODY_W),
            &self.head,
            Font::Body,
            Align::Left,
            false,
        )?;
        let fig_w = Font::Big.measure(&self.figure).width;
        let unit_w = Font::Body.measure(&self.unit).width;
        let fig_box = Rectangle::new(
            Point::new(MARGIN, BODY_TOP + LINE_H + 2),
            Size::new(BODY_W.saturating_sub(unit_w + 8).min(fig_w.max(1)), 42),
        );
        // A figure too wide for the line is reported by the painter (its box is the line).
        let fig_box = if fig_w + unit_w + 8 > BODY_W {
            Rectangle::new(
                fig_box.top_left,
                Size::new(BODY_W.saturating_sub(unit_w + 8), 42),
            )
        } else {
            fig_box
        };
        p.text(fig_box, &self.figure, Font::Big, Align::Left, false)?;
        let ux = fig_box.top_left.x + fig_box.size.width as i32 + 8;
        p.text(
            row_box(2, ux, unit_w.max(1)),
            &self.unit,
            Font::Body,
            Align::Left,
            false,
        )?;
        let mut r = 3;
        for (label, value) in &self.rows {
            let vw = Font::Body.measure(value).width.min(BODY_W);
            let lw = BODY_W.saturating_sub(vw + 10);
            p.text(
                row_box(r, MARGIN, lw),
                label,
                Font::Body,
                Align::Left,
                false,
            )?;
            let vx = MARGIN + BODY_W as i32 - vw as i32;
            p.text(
                row_box(r, vx, vw.max(1)),
                value,
                Font::Body,
                Align::Right,
                false,
            )?;
            r += 1;
        }
        if let Some(note) = &self.note {
            p.paragraph(note, r, BODY_LINES.saturating_sub(r), MARGIN, BODY_W)?;
        }
        Ok(())
    }
}

/// Draw a framed notice over the body: a dark heading and the message wrapped below.
pub fn draw_notice<D, I>(
    p: &mut Painter<'_, D, I>,
    heading: &str,
    msg: &str,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let outer = Rectangle::new(Point::new(10, BODY_TOP - 3), Size::new(380, 190));
    p.fill(outer, PAPER)?;
    p.frame(outer, 3)?;
    let band = Rectangle::new(Point::new(13, BODY_TOP), Size::new(374, LINE_H as u32));
    p.fill(band, INK)?;
    p.text(
        Rectangle::new(Point::new(20, BODY_TOP), Size::new(360, LINE_H as u32)),
        heading,
        Font::Body,
        Align::Left,
        true,
    )?;
    p.paragraph(msg, 1, BODY_LINES - 1, 20, 360)?;
    Ok(())
}

/// Characters of message text a notice holds: 7 lines of 36.
pub const NOTICE_CHARS_PER_LINE: usize = 36;
/// Lines of message text a notice holds.
pub const NOTICE_LINES: usize = BODY_LINES - 1;

#[cfg(test)]
mod tests {
    use super::*;
    use crate::field::Kind;
    use embedded_graphics::mock_display::MockDisplay;

    #[test]
    fn list_wraps_and_chooses() {
        let mut l = List::default();
        assert_eq!(l.handle(Key::Up, 3), ListOutcome::Moved);
        assert_eq!(l.sel, 2);
        assert_eq!(l.handle(Key::Down, 3), ListOutcome::Moved);
        assert_eq!(l.sel, 0);
        assert_eq!(l.handle(Key::Ok, 3), ListOutcome::Chosen(0));
        assert_eq!(l.handle(Key::Digit(3), 3), ListOutcome::Moved);
        assert_eq!(l.sel, 2);
        assert_eq!(l.handle(Key::Digit(4), 3), ListOutcome::Nothing);
        assert_eq!(l.handle(Key::Back, 3), ListOutcome::Back);
    }

    const SPECS: [FieldSpec; 1] = [FieldSpec {
        label: "Lat",
        kind: Kind::Latitude,
        min: -90.0,
        max: 90.0,
    }];

    #[test]
    fn form_keeps_an_invalid_entry_and_names_the_range() {
        let s = Settings::default();
        let mut f = Form::new([Field::with_text("")]);
        for k in [Key::Ok, Key::Digit(9), Key::Digit(5)] {
            f.handle(k, &SPECS, &s);
        }
        let out = f.handle(Key::Ok, &SPECS, &s);
        assert_eq!(out, FormOutcome::Invalid(0, FieldError::OutOfRange));
        assert!(f.editing);
        assert_eq!(f.fields[0].display().as_str(), "95");
        let m = entry_message(&SPECS[0], &f.fields[0], FieldError::OutOfRange, &s);
        assert!(m.contains("-90 to 90"), "{m}");
        // BACK leaves the edit, keeps the text; Compute refuses and points at it.
        assert_eq!(f.handle(Key::Back, &SPECS, &s), FormOutcome::Changed);
        assert_eq!(f.fields[0].display().as_str(), "95");
        f.handle(Key::Down, &SPECS, &s);
        assert_eq!(
            f.handle(Key::Ok, &SPECS, &s),
            FormOutcome::Invalid(0, FieldError::OutOfRange)
        );
        assert_eq!(f.sel, 0);
        assert_eq!(f.handle(Key::Back, &SPECS, &s), FormOutcome::Leave);
    }

    #[test]
    fn list_draws_inside_a_small_display() {
        // MockDisplay is 64×64 and fails on any pixel outside it: a list row box is the
        // whole screen width, so draw a clipped view of the top-left corner.
        let mut d: MockDisplay<BinaryColor> = MockDisplay::new();
        d.set_allow_overdraw(true);
        let area = Rectangle::new(Point::zero(), Size::new(64, 64));
        let mut c = d.clipped(&area);
        let mut no = ();
        let mut p = Painter::new(&mut c, &mut no);
        draw_list(&mut p, &[("A", ""), ("B", "")], 1).unwrap();
        // Row 1 is selected: its bar is dark at the left edge, row 0's is not.
        assert_eq!(d.get_pixel(Point::new(1, BODY_TOP + LINE_H + 1)), Some(INK));
        assert_eq!(d.get_pixel(Point::new(1, BODY_TOP + 1)), Some(PAPER));
    }
}
