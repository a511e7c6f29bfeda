//! The Data task's parts: the operations on stored datasets the app asks its caller to
//! carry out, the summary of one dataset, and the drawing of the dataset lists and the
//! name editor. The store itself is [`crate::storage`].

use crate::network::IdField;
use crate::pages;
use crate::settings::Settings;
use crate::storage::{DataInfo, DataKind, DataName};
use crate::text::{line, Line};
use crate::ui::{row_box, Align, Font, Inspect, Painter, BODY_LINES, BODY_W, MARGIN};
use crate::widgets::{
    draw_edit_box, draw_list, Page, LABEL_W, LABEL_X, UNIT_W, UNIT_X, VALUE_W, VALUE_X,
};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use leeward_core::network::Network;

/// A dataset operation waiting for [`crate::App::apply`] (the app does not own the store).
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum StoreOp {
    /// Read a dataset for its summary page.
    View(DataName),
    /// Rename a dataset.
    Rename {
        /// Its name now.
        from: DataName,
        /// The new name.
        to: DataName,
    },
    /// Delete a dataset (the user confirmed).
    Delete(DataName),
    /// Store the Network task's stations as a new station set.
    SaveStations(DataName),
    /// Replace the Network task's stations with a stored set.
    LoadStations(DataName),
    /// Use a dataset in its task: a station set in Network, a sounding in Sounding.
    Use(DataName),
}

/// Figures of a stored station set.
#[derive(Debug, Clone, PartialEq)]
pub struct StationSummary {
    /// Number of stations.
    pub count: usize,
    /// First and last identifier in the set.
    pub first: DataName,
    /// Last identifier.
    pub last: DataName,
    /// Southernmost and northernmost latitude, degrees.
    pub lat_deg: (f64, f64),
    /// Westernmost and easternmost longitude, degrees.
    pub lon_deg: (f64, f64),
    /// Lowest and highest reported height, m.
    pub height_m: (f64, f64),
}

impl StationSummary {
    /// The figures of `net`.
    pub fn of(net: &Network) -> Self {
        let mut s = StationSummary {
            count: net.len(),
            first: DataName::new(),
            last: DataName::new(),
            lat_deg: (f64::INFINITY, f64::NEG_INFINITY),
            lon_deg: (f64::INFINITY, f64::NEG_INFINITY),
            height_m: (f64::INFINITY, f64::NEG_INFINITY),
        };
        let widen = |r: &mut (f64, f64), v: f64| *r = (r.0.min(v), r.1.max(v));
        for st in &net.stations {
            widen(&mut s.lat_deg, st.pos.lat_deg);
            widen(&mut s.lon_deg, st.pos.lon_deg);
            widen(&mut s.height_m, st.height_m);
        }
        if let (Some(a), Some(b)) = (net.stations.first(), net.stations.last()) {
            let _ = s.first.push_str(&a.id);
            let _ = s.last.push_str(&b.id);
        }
        s
    }
}

/// What the summary page of one dataset shows.
#[derive(Debug, Clone, PartialEq)]
pub struct DataSummary {
    /// The dataset as listed.
    pub info: DataInfo,
    /// A station set's figures (a sounding is summarised by Use, in its task).
    pub stations: Option<StationSummary>,
}

/// The summary page.
pub fn summary_page(v: &DataSummary, s: &Settings) -> Page {
    let mut p = Page {
        head: line(format_args!("{}: {}", v.info.name, v.info.kind.word())),
        ..Page::default()
    };
    match (&v.stations, v.info.kind) {
        (Some(st), _) => {
            p.figure = line(format_args!("{}", st.count));
            p.unit = line(format_args!(
                "{}",
                if st.count == 1 { "station" } else { "stations" }
            ));
            if st.count > 0 {
                p.row(
                    line(format_args!("identifiers")),
                    line(format_args!("{} to {}", st.first, st.last)),
                );
                p.row(
                    line(format_args!("latitude")),
                    line(format_args!(
                        "{} to {}",
                        pages::latitude(st.lat_deg.0, s),
                        pages::latitude(st.lat_deg.1, s)
                    )),
                );
                p.row(
                    line(format_args!("longitude")),
                    line(format_args!(
                        "{} to {}",
                        pages::longitude(st.lon_deg.0, s),
                        pages::longitude(st.lon_deg.1, s)
                    )),
                );
                let h = s.height;
                p.row(
                    line(format_args!("height")),
                    line(format_args!(
                        "{:.0} to {:.0} {}",
                        h.from_m(st.height_m.0),
                        h.from_m(st.height_m.1),
                        h.symbol()
                    )),
                );
            }
        }
        (None, kind) => {
            p.figure = line(format_args!("{}", v.info.bytes));
            p.unit = line(format_args!("bytes"));
            if kind == DataKind::Sounding {
                p.note = Some(crate::text::message(format_args!(
                    "Use puts it in the Sounding task, summarised against the Tessel Range."
                )));
            }
        }
    }
    p.row(
        line(format_args!("size")),
        line(format_args!("{} bytes", v.info.bytes)),
    );
    p
}

/// A list of datasets (name, kind and size), formatting only the rows in view; `empty`
/// is the one row of an empty list.
pub fn draw_catalog<'a, D, I>(
    p: &mut Painter<'_, D, I>,
    entries: impl Iterator<Item = &'a DataInfo> + Clone,
    sel: usize,
    empty: &str,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let n = entries.clone().count();
    if n == 0 {
        return draw_list(p, &[(empty, "")], 0);
    }
    let sel = sel.min(n - 1);
    let first = sel.saturating_sub(BODY_LINES - 1);
    let mut texts: heapless::Vec<(Line, Line), BODY_LINES> = heapless::Vec::new();
    for d in entries.skip(first).take(BODY_LINES) {
        let row = (
            line(format_args!("{}", d.name)),
            line(format_args!("{}  {} B", d.kind.word(), d.bytes)),
        );
        let _ = texts.push(row);
    }
    let mut rows: heapless::Vec<(&str, &str), BODY_LINES> = heapless::Vec::new();
    for (a, b) in &texts {
        let _ = rows.push((a.as_str(), b.as_str()));
    }
    draw_list(p, &rows, sel - first)
}

/// The name editor: the name being typed on the first row, a remark below it.
pub fn draw_name_editor<D, I>(
    p: &mut Painter<'_, D, I>,
    name: &IdField,
    remark: &str,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    p.text(
        row_box(0, LABEL_X, LABEL_W),
        "Name",
        Font::Body,
        Align::Left,
        false,
    )?;
    draw_edit_box(p, row_box(0, VALUE_X, VALUE_W), &name.text(), name.cursor())?;
    p.text(
        row_box(0, UNIT_X, UNIT_W),
        "A-Z",
        Font::Body,
        Align::Left,
        false,
    )?;
    p.paragraph(remark, 2, BODY_LINES - 2, MARGIN, BODY_W)?;
    Ok(())
}
