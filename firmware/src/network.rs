//! The Network task's inputs and its two drawn result pages: the station list, each
//! station's editor (an identifier typed with the arrows, four numeric fields), the
//! gathering of the entries into a leeward-core [`Network`], the per-station residual
//! table and the small station map with the wind arrow.

use crate::field::{Field, FieldError, FieldSpec, Kind};
use crate::key::Key;
use crate::settings::Settings;
use crate::text::{line, Line};
use crate::ui::{row_box, Align, Font, Inspect, Painter, BODY_TOP, INK, LINE_H, MARGIN, PAPER};
use crate::widgets::{
    draw_edit_box, Form, FormOutcome, LABEL_W, LABEL_X, UNIT_W, UNIT_X, VALUE_W, VALUE_X,
};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;
use leeward_core::network::{Network, NetworkFit, Station, MAX_STATIONS};
use leeward_core::Error;

/// Characters of a station identifier (the core's limit).
pub const ID_LEN: usize = 8;

/// What Up rolls the character under the cursor through, in order; the gap comes last and
/// is removed when the edit ends, so the arrows alone can shorten an identifier.
const ID_CYCLE: &[u8] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-_ ";
/// The gap (drawn as a blank cell under the cursor).
const GAP: u8 = b' ';

/// A station identifier being typed: letters need the arrows (the keypad has digits only).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct IdField {
    buf: heapless::Vec<u8, ID_LEN>,
    cursor: u8,
}

impl IdField {
    /// A field holding `id` (characters an identifier cannot hold are dropped), cursor at
    /// the end.
    pub fn with_text(id: &str) -> Self {
        let mut f = IdField::default();
        let upper = id.bytes().map(|b| b.to_ascii_uppercase());
        for b in upper.filter(|b| ID_CYCLE.contains(b) && *b != GAP) {
            let _ = f.buf.push(b);
        }
        f.cursor = f.buf.len() as u8;
        f
    }

    /// The identifier as typed.
    pub fn text(&self) -> Line {
        let mut l = Line::new();
        for &b in &self.buf {
            let _ = l.push(b as char);
        }
        l
    }

    /// Cursor position in characters.
    pub fn cursor(&self) -> usize {
        self.cursor as usize
    }

    /// Apply an editing key: Up/Down roll the character under the cursor (at the end they
    /// start a new one), Left/Right move, digits type, Delete removes before the cursor.
    pub fn edit(&mut self, key: Key) {
        let c = self.cursor().min(self.buf.len());
        match key {
            Key::Digit(d) if d <= 9 && self.buf.insert(c, b'0' + d).is_ok() => {
                self.cursor = (c + 1) as u8;
            }
            Key::Delete if c > 0 => {
                self.buf.remove(c - 1);
                self.cursor = (c - 1) as u8;
            }
            Key::Delete if !self.buf.is_empty() => {
                self.buf.remove(0);
            }
            Key::Left => self.cursor = self.cursor.saturating_sub(1),
            Key::Right if c < self.buf.len() => self.cursor += 1,
            Key::Up | Key::Down => {
                let up = key == Key::Up;
                let n = ID_CYCLE.len();
                if c >= self.buf.len() {
                    // A new character: A rolling up, the gap's neighbour (_) rolling down.
                    let b = if up { ID_CYCLE[0] } else { ID_CYCLE[n - 2] };
                    if self.buf.push(b).is_ok() {
                        self.cursor = (self.buf.len() - 1) as u8;
                    }
                    return;
                }
                let i = ID_CYCLE
                    .iter()
                    .position(|&x| x == self.buf[c])
                    .unwrap_or(n - 1);
                let j = if up { (i + 1) % n } else { (i + n - 1) % n };
                self.buf[c] = ID_CYCLE[j];
            }
            _ => {}
        }
    }

    /// End an edit: remove gaps, cursor to the end.
    pub fn finish(&mut self) {
        self.buf.retain(|&b| b != GAP);
        self.cursor = self.buf.len() as u8;
    }
}

/// The numeric fields of a station, in the order shown.
pub const STATION_FIELDS: [FieldSpec; 4] = [
    FieldSpec {
        label: "Latitude",
        kind: Kind::Latitude,
        min: -90.0,
        max: 90.0,
    },
    FieldSpec {
        label: "Longitude",
        kind: Kind::Longitude,
        min: -180.0,
        max: 180.0,
    },
    // The core's accepted ranges for a report (network::Station::new).
    FieldSpec {
        label: "Height",
        kind: Kind::Height,
        min: -1000.0,
        max: 40_000.0,
    },
    FieldSpec {
        label: "Height error",
        kind: Kind::Height,
        min: 0.01,
        max: 1000.0,
    },
];

/// Rows of the station editor: the identifier, four fields, then Delete.
const ID_ROW: usize = 0;
const DELETE_ROW: usize = STATION_FIELDS.len() + 1;

/// What a key did to a station editor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EditorOutcome {
    /// Nothing happened.
    Nothing,
    /// Something changed on screen.
    Changed,
    /// BACK while not editing: back to the list.
    Leave,
    /// OK on the Delete row.
    Delete,
    /// A numeric field failed its check (field index, why); its text is kept.
    Invalid(usize, FieldError),
    /// The identifier was confirmed empty.
    EmptyId,
}

/// One station as entered: identifier, numeric fields, and where the editor is.
#[derive(Debug, Clone, PartialEq)]
pub struct StationEntry {
    /// The identifier.
    pub id: IdField,
    /// Latitude, longitude, height, height error.
    pub form: Form<4>,
    /// Selected row: 0 the identifier, 1–4 the fields, 5 Delete.
    pub sel: u8,
    /// True while the identifier is being edited.
    pub id_editing: bool,
}

impl StationEntry {
    /// An entry showing `st` in the settings' units.
    pub fn from_station(st: &Station, s: &Settings) -> Self {
        let v = [
            st.pos.lat_deg,
            st.pos.lon_deg,
            st.height_m,
            st.sigma_m.unwrap_or(leeward_core::network::DEFAULT_SIGMA_M),
        ];
        StationEntry {
            id: IdField::with_text(&st.id),
            form: Form::new([
                Field::with_value(&STATION_FIELDS[0], v[0], s),
                Field::with_value(&STATION_FIELDS[1], v[1], s),
                Field::with_value(&STATION_FIELDS[2], v[2], s),
                Field::with_value(&STATION_FIELDS[3], v[3], s),
            ]),
            sel: 0,
            id_editing: false,
        }
    }

    /// True while any part is being edited.
    pub fn editing(&self) -> bool {
        self.id_editing || self.form.editing
    }

    /// Stop any edit, keeping the text.
    pub fn finish(&mut self) {
        self.id_editing = false;
        self.id.finish();
        self.form.editing = false;
        for f in &mut self.form.fields {
            f.finish();
        }
    }

    /// Apply a key.
    pub fn handle(&mut self, key: Key, s: &Settings) -> EditorOutcome {
        let rows = DELETE_ROW + 1;
        let sel = (self.sel as usize).min(DELETE_ROW);
        if self.id_editing {
            return match key {
                Key::Ok => {
                    self.id.finish();
                    if self.id.buf.is_empty() {
                        EditorOutcome::EmptyId
                    } else {
                        self.id_editing = false;
                        self.sel = 1;
                        EditorOutcome::Changed
                    }
                }
                Key::Back => {
                    self.id.finish();
                    self.id_editing = false;
                    EditorOutcome::Changed
                }
                Key::Menu | Key::Dot | Key::Sign | Key::Digit(10..) => EditorOutcome::Nothing,
                k => {
                    self.id.edit(k);
                    EditorOutcome::Changed
                }
            };
        }
        if self.form.editing && (1..DELETE_ROW).contains(&sel) {
            return match self.form.handle(key, &STATION_FIELDS, s) {
                FormOutcome::Nothing => EditorOutcome::Nothing,
                FormOutcome::Invalid(i, e) => EditorOutcome::Invalid(i, e),
                _ => {
                    // The form moves its selection on after a confirmed field.
                    self.sel = (self.form.sel as usize + 1).min(DELETE_ROW) as u8;
                    EditorOutcome::Changed
                }
            };
        }
        self.form.editing = false;
        match key {
            Key::Up => {
                self.sel = ((sel + rows - 1) % rows) as u8;
                EditorOutcome::Changed
            }
            Key::Down => {
                self.sel = ((sel + 1) % rows) as u8;
                EditorOutcome::Changed
            }
            Key::Back => EditorOutcome::Leave,
            Key::Ok | Key::Right if sel == DELETE_ROW => EditorOutcome::Delete,
            Key::Ok | Key::Right if sel == ID_ROW => {
                self.id_editing = true;
                EditorOutcome::Changed
            }
            Key::Digit(d) if sel == ID_ROW && d <= 9 => {
                self.id_editing = true;
                self.id.edit(key);
                EditorOutcome::Changed
            }
            Key::Ok | Key::Right | Key::Digit(_) | Key::Dot | Key::Sign | Key::Delete
                if sel < DELETE_ROW && sel != ID_ROW =>
            {
                self.form.sel = (sel - 1) as u8;
                match self.form.handle(key, &STATION_FIELDS, s) {
                    FormOutcome::Nothing => EditorOutcome::Nothing,
                    _ => EditorOutcome::Changed,
                }
            }
            _ => EditorOutcome::Nothing,
        }
    }

    /// Draw the editor's body.
    pub fn draw<D, I>(&self, p: &mut Painter<'_, D, I>, s: &Settings) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        let sel = (self.sel as usize).min(DELETE_ROW);
        let on = sel == ID_ROW;
        p.fill(
            row_box(0, 0, crate::ui::SCREEN_W),
            if on { INK } else { PAPER },
        )?;
        if on {
            p.text(row_box(0, MARGIN, 16), ">", Font::Body, Align::Left, true)?;
        }
        p.text(
            row_box(0, LABEL_X, LABEL_W),
            "Identifier",
            Font::Body,
            Align::Left,
            on,
        )?;
        let vbox = row_box(0, VALUE_X, VALUE_W);
        let text = self.id.text();
        if self.id_editing {
            draw_edit_box(p, vbox, &text, self.id.cursor())?;
        } else {
            let shown: &str = if text.is_empty() { "-" } else { &text };
            p.text(vbox, shown, Font::Body, Align::Right, on)?;
        }
        p.text(
            row_box(0, UNIT_X, UNIT_W),
            if self.id_editing { "A-Z" } else { "" },
            Font::Body,
            Align::Left,
            on,
        )?;
        let form_sel = if sel == ID_ROW { None } else { Some(sel - 1) };
        self.form
            .draw_rows(p, &STATION_FIELDS, s, 1, form_sel, "Delete station")
    }
}

/// The entries of a network, in the settings' units.
pub fn entries(net: &Network, s: &Settings) -> heapless::Vec<StationEntry, MAX_STATIONS> {
    let mut v = heapless::Vec::new();
    for st in &net.stations {
        let _ = v.push(StationEntry::from_station(st, s));
    }
    v
}

/// Why the entries do not make a network.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GatherError {
    /// Station `station` (0-based) has an empty identifier.
    EmptyId {
        /// Index of the station.
        station: usize,
    },
    /// A field of station `station` fails its check.
    Field {
        /// Index of the station.
        station: usize,
        /// Index of the field in [`STATION_FIELDS`].
        field: usize,
        /// Why.
        err: FieldError,
    },
    /// The core refused station `station`.
    Core {
        /// Index of the station.
        station: usize,
        /// The core's reason.
        err: Error,
    },
}

/// The network the entries describe, or the first entry that is not a station.
pub fn gather(list: &[StationEntry], s: &Settings) -> Result<Network, GatherError> {
    let mut net = Network::new();
    for (i, e) in list.iter().enumerate() {
        let id = e.id.text();
        if id.is_empty() {
            return Err(GatherError::EmptyId { station: i });
        }
        let v = e
            .form
            .values(&STATION_FIELDS, s)
            .map_err(|(field, err)| GatherError::Field {
                station: i,
                field,
                err,
            })?;
        let st = Station::new(&id, v[0], v[1], v[2], Some(v[3]))
            .map_err(|err| GatherError::Core { station: i, err })?;
        // The list holds at most MAX_STATIONS entries, as does the network.
        net.push(st).map_err(|_| GatherError::Core {
            station: i,
            err: Error::TooManyStations {
                max: MAX_STATIONS as u8,
            },
        })?;
    }
    Ok(net)
}

/// Station rows the residual table shows at once (a heading line above them).
pub const RESIDUAL_ROWS: usize = 7;

/// The residual table: per station, reported minus fitted height and the score against
/// the others; the suspect station marked with `!` and the word "suspect".
pub fn draw_residuals<D, I>(
    p: &mut Painter<'_, D, I>,
    fit: &NetworkFit,
    net: &Network,
    first: usize,
    s: &Settings,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let h = s.height;
    let head = [
        (MARGIN + 20, 90, "station", Align::Left),
        (MARGIN + 110, 120, "resid", Align::Right),
        (MARGIN + 240, 70, "score", Align::Right),
    ];
    for (x, w, t, a) in head {
        p.text(row_box(0, x, w), t, Font::Body, a, false)?;
    }
    for (r, (i, (sf, st))) in fit
        .stations
        .iter()
        .zip(net.stations.iter())
        .enumerate()
        .skip(first)
        .take(RESIDUAL_ROWS)
        .enumerate()
    {
        let row = r + 1;
        let suspect = fit.suspect.map(usize::from) == Some(i);
        if suspect {
            p.text(
                row_box(row, MARGIN, 16),
                "!",
                Font::Body,
                Align::Left,
                false,
            )?;
        }
        p.text(
            row_box(row, MARGIN + 20, 90),
            &st.id,
            Font::Body,
            Align::Left,
            false,
        )?;
        let res = line(format_args!(
            "{:+.1} {}",
            h.from_m(sf.residual_m),
            h.symbol()
        ));
        p.text(
            row_box(row, MARGIN + 110, 120),
            &res,
            Font::Body,
            Align::Right,
            false,
        )?;
        let score = match sf.loo_score {
            Some(z) => line(format_args!("{z:.1}")),
            None => line(format_args!("-")),
        };
        p.text(
            row_box(row, MARGIN + 240, 70),
            &score,
            Font::Body,
            Align::Right,
            false,
        )?;
        if suspect {
            p.text(
                row_box(row, MARGIN + 316, 68),
                "suspect",
                Font::Small,
                Align::Left,
                false,
            )?;
        }
    }
    Ok(())
}

/// The map's box on the screen: the left part of the body.
pub const MAP_BOX: Rectangle = Rectangle::new(
    Point::new(MARGIN, BODY_TOP),
    Size::new(200, (LINE_H * 8) as u32 - 4),
);

/// The station map: stations as rings (the suspect filled), the reference point as a
/// cross, the wind as an arrow from it towards where the air goes, north up; the frame is
/// the map's box and nothing is drawn outside it. Beside it: the scale and the wind.
pub fn draw_map<D, I>(
    p: &mut Painter<'_, D, I>,
    fit: &NetworkFit,
    net: &Network,
    s: &Settings,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let b = MAP_BOX;
    p.frame(b, 2)?;
    let c = b.center();
    // Room inside the frame for a ring of 9 px and a 3 px line.
    let half = (b.size.width.min(b.size.height) / 2) as f64 - 10.0;
    let reach = fit
        .stations
        .iter()
        .map(|sf| sf.x_m.abs().max(sf.y_m.abs()))
        .fold(1.0, f64::max);
    let k = half / reach;
    let at = |x: f64, y: f64| {
        let px = (x * k).clamp(-half, half) as i32;
        let py = (y * k).clamp(-half, half) as i32;
        c + Point::new(px, -py)
    };
    // The reference point.
    p.line(c - Point::new(5, 0), c + Point::new(5, 0), 1)?;
    p.line(c - Point::new(0, 5), c + Point::new(0, 5), 1)?;
    for (i, sf) in fit.stations.iter().enumerate() {
        let suspect = fit.suspect.map(usize::from) == Some(i);
        p.circle(at(sf.x_m, sf.y_m), 9, suspect)?;
    }
    // The arrow: fixed length, pointing downwind, along (u, v); no arrow in a calm.
    let u = fit.wind.u_ms.value;
    let v = fit.wind.v_ms.value;
    let speed = fit.wind.speed_ms.value;
    if speed.is_finite() && speed > 0.05 {
        let (sx, sy) = (u / speed, v / speed);
        let len = half * 0.6;
        let tip = c + Point::new((sx * len) as i32, -(sy * len) as i32);
        p.line(c, tip, 3)?;
        // Two barbs of the head, 12 px back from the tip, turned ±30° (cos, sin).
        let (cs, sn) = (0.866, 0.5);
        for sn in [sn, -sn] {
            let bx = sx * cs - sy * sn;
            let by = sx * sn + sy * cs;
            let back = tip - Point::new((bx * 12.0) as i32, -(by * 12.0) as i32);
            p.line(tip, back, 3)?;
        }
    } else {
        p.circle(c, 15, false)?;
    }
    // North mark in the frame's top-right corner.
    let n_box = Rectangle::new(
        b.top_left + Point::new(b.size.width as i32 - 18, 4),
        Size::new(12, 20),
    );
    p.text(n_box, "N", Font::Body, Align::Left, false)?;
    // Beside the map: scale, wind, suspect.
    let x = MARGIN + b.size.width as i32 + 10;
    let w = crate::ui::SCREEN_W - x as u32 - MARGIN as u32;
    let half_km = reach / 1000.0;
    let wind = s.wind;
    let rows = [
        line(format_args!("edge {half_km:.0} km")),
        line(format_args!("from centre")),
        line(format_args!(
            "{:.1} {}",
            wind.from_ms(fit.wind.speed_ms.value),
            wind.symbol()
        )),
        line(format_args!("from {:.0}°", fit.wind.dir_from_deg.value)),
        match fit.suspect.and_then(|i| net.stations.get(usize::from(i))) {
            Some(st) => line(format_args!("filled: {}", st.id)),
            None => line(format_args!("no suspect")),
        },
    ];
    for (r, t) in rows.iter().enumerate() {
        p.text(row_box(r, x, w), t, Font::Body, Align::Left, false)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::framebuffer::FrameBuffer;

    fn typed(keys: &[Key]) -> IdField {
        let mut f = IdField::default();
        for &k in keys {
            f.edit(k);
        }
        f.finish();
        f
    }

    #[test]
    fn arrows_alone_type_an_identifier() {
        use Key::*;
        // Up starts an A, Up → B; Right to the end, Down starts an _, Down → -.
        let f = typed(&[Up, Up, Right, Down, Down, Right, Digit(7)]);
        assert_eq!(f.text().as_str(), "B-7");
        // Up past _ reaches the gap, which deletes the character when the edit ends.
        let f = typed(&[Down, Up]);
        assert_eq!(f.text().as_str(), "");
        // Down from A wraps to the gap, then to _.
        let f = typed(&[Up, Down, Down]);
        assert_eq!(f.text().as_str(), "_");
    }

    #[test]
    fn identifier_stops_at_eight_and_lower_case_is_raised() {
        let f = IdField::with_text("abcdefghij");
        assert_eq!(f.text().as_str(), "ABCDEFGH");
        let mut f = f;
        f.edit(Key::Digit(1));
        assert_eq!(f.text().as_str(), "ABCDEFGH");
    }

    #[test]
    fn the_map_stays_in_its_box() {
        let net = leeward_core::demo::network().unwrap();
        let fit = leeward_core::network::analyse(&net, &Default::default()).unwrap();
        let mut fb = FrameBuffer::new();
        let mut no = ();
        let mut p = Painter::new(&mut fb, &mut no);
        p.clear().unwrap();
        draw_map(&mut p, &fit, &net, &Settings::default()).unwrap();
        // Only the map's box and the text column right of it are inked.
        let right = MAP_BOX.top_left.x + MAP_BOX.size.width as i32;
        let mut inked_in_box = 0;
        for y in 0..240 {
            for x in 0..right as usize + 5 {
                if fb.pixel(x, y) == Some(INK) {
                    assert!(
                        MAP_BOX.contains(Point::new(x as i32, y as i32)),
                        "ink at {x},{y} outside the map box"
                    );
                    inked_in_box += 1;
                }
            }
        }
        assert!(inked_in_box > 200);
    }
}
