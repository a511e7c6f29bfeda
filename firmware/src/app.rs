//! The device as a pure state machine: [`App::handle`] takes a key and says what to do
//! next; [`App::render`] draws the current state on any one-bit target.
//!
//! Screens, from power-on:
//!
//! ```text
//! Home ─┬─ Site ──────────── form: latitude ─────────────── result: f, β, period
//!       ├─ Column ─┬─ Stretch: form of 5 ─────────────────── result: ζ at the end
//!       │          └─ Depth:   form of 5 ─────────────────── result: depth at the end
//!       ├─ Network: station list ─┬─ station: id and 4 fields, delete
//!       │                         ├─ Save set: name editor
//!       │                         ├─ Load set: stored station sets
//!       │                         ├─ Add station
//!       │                         └─ Compute ─ 4 result pages: wind, ζ_g, residuals, map
//!       ├─ Sounding: summary of the demo ascent ─ 4 pages: column, Froude, barotropy, profile plot
//!       ├─ Ridge crossing: form of 10 ─ 5 pages: lee trough, wave train, Froude,
//!       │                               plan view, cross-section
//!       ├─ Data: stored datasets ─ dataset ─┬─ View: summary page
//!       │                                    ├─ Rename: name editor
//!       │                                    └─ Delete: confirm (BACK keeps it)
//!       ├─ Settings (units, latitude entry; stored)
//!       └─ About (3 screens: version, caution, model)
//! ```
//!
//! BACK goes one step up and never erases; MENU goes home from anywhere; every form keeps
//! its text while the user looks elsewhere.

use crate::crossing::{self, CrossingView, CROSSING_FIELDS};
use crate::data::{self, DataSummary, StationSummary, StoreOp};
use crate::field::{Field, FieldSpec, Kind};
use crate::key::{Effect, Key};
use crate::network::{
    self as net, EditorOutcome, GatherError, IdField, StationEntry, STATION_FIELDS,
};
use crate::pages;
use crate::settings::Settings;
use crate::sounding::SoundingView;
use crate::storage::{Catalog, DataKind, DataName, Storage, StoreError, MAX_STATION_SET_BYTES};
use crate::text::{line, Line, Message};
use crate::ui::{Inspect, Painter};
use crate::widgets::{draw_list, draw_notice, entry_message, Form, FormOutcome, List, ListOutcome};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use leeward_core::column::{self, Stretch, MAX_ABS_ZETA, MIN_DEPTH_M};
use leeward_core::demo;
use leeward_core::network::{analyse, FitOptions, Network, NetworkFit, MAX_STATIONS};
use leeward_core::rotation::Rotation;

/// Deepest column a form accepts, m (the core's limit).
const MAX_DEPTH_M: f64 = leeward_core::column::MAX_DEPTH_M;

const fn lat(label: &'static str) -> FieldSpec {
    FieldSpec {
        label,
        kind: Kind::Latitude,
        min: -90.0,
        max: 90.0,
    }
}
const fn depth(label: &'static str) -> FieldSpec {
    FieldSpec {
        label,
        kind: Kind::Height,
        min: MIN_DEPTH_M,
        max: MAX_DEPTH_M,
    }
}
const fn zeta(label: &'static str) -> FieldSpec {
    FieldSpec {
        label,
        kind: Kind::Vorticity,
        min: -MAX_ABS_ZETA,
        max: MAX_ABS_ZETA,
    }
}

/// The Site form.
pub const SITE_FIELDS: [FieldSpec; 1] = [lat("Latitude")];
/// The Column stretch form: start latitude, ζ, depth; end latitude, depth.
pub const STRETCH_FIELDS: [FieldSpec; 5] = [
    lat("Start latitude"),
    zeta("Start zeta"),
    depth("Start depth"),
    lat("End latitude"),
    depth("End depth"),
];
/// The Column depth form: start latitude, ζ, depth; end latitude, ζ.
pub const DEPTH_FIELDS: [FieldSpec; 5] = [
    lat("Start latitude"),
    zeta("Start zeta"),
    depth("Start depth"),
    lat("End latitude"),
    zeta("End zeta"),
];

/// Rows of the home menu: (label, a hint of what is inside).
pub const HOME_ROWS: [(&str, &str); 8] = [
    ("Site", "f, beta"),
    ("Column", "stretching"),
    ("Network", "wind, zeta_g"),
    ("Sounding", "lid, Froude"),
    ("Ridge crossing", "lee trough"),
    ("Data", "stored sets"),
    ("Settings", "units"),
    ("About", "cautions"),
];

/// Rows of a dataset's menu in the Data task.
pub const DATA_ROWS: [(&str, &str); 4] = [
    ("View", "summary"),
    ("Rename", ""),
    ("Delete", ""),
    ("Use", "in its task"),
];

/// The name the demo station set is stored under on first power-on.
pub const DEMO_SET_NAME: &str = "DEMO";

/// Rows of the Column menu.
pub const COLUMN_ROWS: [(&str, &str); 2] = [("Stretch", "zeta at end"), ("Depth", "for a zeta")];

/// A stored ridge profile in use in the Ridge crossing task.
#[derive(Debug, Clone, PartialEq)]
pub struct StoredRidge {
    /// Its dataset name.
    pub name: DataName,
    /// The cross-section the crossing uses.
    pub profile: leeward_core::crossing::Profile,
    /// Crest, plain and half-width, m, as put in the form.
    pub shown_m: [f64; 3],
}

/// Crest, plain and half-width of a tabulated cross-section, m: its highest and lowest
/// point, and half the width over which it stands above the height halfway between
/// them (linear between the points), at least 1 km (the form's least half-width).
pub fn table_figures(profile: &leeward_core::crossing::Profile) -> [f64; 3] {
    use leeward_core::crossing::Profile as P;
    match profile {
        P::Bell {
            base_m,
            crest_m,
            half_width_m,
        } => [*crest_m, *base_m, *half_width_m],
        P::Flat { height_m } => [*height_m, *height_m, 1000.0],
        P::Table(pts) => {
            let crest = pts.iter().map(|p| p.height_m).fold(f64::MIN, f64::max);
            let plain = pts.iter().map(|p| p.height_m).fold(f64::MAX, f64::min);
            let half = 0.5 * (crest + plain);
            // Where the profile crosses the half height, first rising and last falling.
            let cross = |a: &leeward_core::crossing::ProfilePoint,
                         b: &leeward_core::crossing::ProfilePoint| {
                let t = (half - a.height_m) / (b.height_m - a.height_m);
                a.distance_m + t * (b.distance_m - a.distance_m)
            };
            let mut left = None;
            let mut right = None;
            for w in pts.windows(2) {
                let (a, b) = (&w[0], &w[1]);
                if a.height_m < half && b.height_m >= half && left.is_none() {
                    left = Some(cross(a, b));
                }
                if a.height_m >= half && b.height_m < half {
                    right = Some(cross(a, b));
                }
            }
            let first = pts.first().map_or(0.0, |p| p.distance_m);
            let last = pts.last().map_or(0.0, |p| p.distance_m);
            let width = right.unwrap_or(last) - left.unwrap_or(first);
            [crest, plain, (0.5 * width).max(1000.0)]
        }
    }
}

/// Which screen is showing.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Screen {
    /// The home menu.
    Home,
    /// Site: the latitude form.
    SiteForm,
    /// Site: f, β, inertial period.
    SiteResult,
    /// Column: choose stretch or depth.
    ColumnMenu,
    /// Column stretch form.
    StretchForm,
    /// Column stretch result.
    StretchResult,
    /// Column depth form.
    DepthForm,
    /// Column depth result.
    DepthResult,
    /// Network: the station list with Add and Compute rows.
    NetworkList,
    /// Network: one station's editor.
    StationEdit,
    /// Network results, page 0 to 3: wind, vorticity, residuals, map.
    NetworkResult(u8),
    /// Sounding summary, page 0 to 3: column, Froude check, barotropy, profile plot.
    SoundingResult(u8),
    /// Ridge crossing: the input form.
    CrossingForm,
    /// Ridge crossing results, page 0 to 4: lee trough, wave train, Froude, plan view,
    /// cross-section.
    CrossingResult(u8),
    /// Data: the stored datasets and the free space.
    DataList,
    /// Data: one dataset's menu (view, rename, delete).
    DataItem,
    /// Data: one dataset's summary.
    DataView,
    /// Data: a dataset's new name.
    DataRename,
    /// Data: delete a dataset? (OK deletes, BACK keeps.)
    DataDelete,
    /// Network: the name to save the stations under.
    NetworkSave,
    /// Network: the stored station sets to load from.
    NetworkLoad,
    /// Settings list.
    Settings,
    /// About, screen 0, 1 or 2.
    About(u8),
}

/// A message over the current screen; any key closes it.
#[derive(Debug, Clone, PartialEq)]
pub struct Notice {
    /// Dark heading.
    pub heading: &'static str,
    /// The words.
    pub text: Message,
}

/// The whole device state.
#[derive(Debug, Clone)]
pub struct App {
    settings: Settings,
    screen: Screen,
    home: List,
    column_menu: List,
    settings_list: List,
    site: Form<1>,
    stretch: Form<5>,
    depth: Form<5>,
    site_result: Option<Rotation>,
    stretch_result: Option<Stretch>,
    depth_result: Option<Stretch>,
    stations: heapless::Vec<StationEntry, MAX_STATIONS>,
    station_list: List,
    station: u8,
    network_fit: Option<NetworkFit>,
    network_used: Network,
    residual_first: u8,
    /// The Sounding task's current summary, kept in place (it is kilobytes: made where
    /// it is kept, never moved), valid when `sounding_set`.
    sounding: SoundingView,
    sounding_set: bool,
    /// The sounding shown is a stored one (its dataset name), not the demo ascent.
    sounding_from: Option<DataName>,
    /// A stored tabulated ridge the crossing uses instead of the form's bell, with the
    /// crest, plain and half-width it put in the form (editing any of them brings the
    /// bell back).
    ridge_table: Option<StoredRidge>,
    crossing: Form<10>,
    crossing_view: Option<CrossingView>,
    /// Lid and N in the crossing form came from the sounding summary.
    crossing_seeded: bool,
    /// Counts Network results; the crossing form's wind came from result number
    /// `crossing_wind_from` (0: the demo wind).
    network_serial: u32,
    crossing_wind_from: u32,
    notice: Option<Notice>,
    /// The store's list and free bytes as last read (`None`: the store was never read).
    catalog: Catalog,
    free_bytes: Option<usize>,
    data_list: List,
    data_menu: List,
    load_list: List,
    /// The dataset the Data task is working on.
    data_name: DataName,
    data_summary: Option<DataSummary>,
    /// The name being typed (rename, save).
    name_edit: IdField,
    /// The station set last loaded or saved: the name Save offers.
    set_name: DataName,
    /// The dataset operation waiting for [`App::apply`].
    pending: Option<StoreOp>,
}

/// Result pages of the Ridge crossing task.
pub const CROSSING_PAGES: u8 = 5;

/// Result pages of the Sounding task.
pub const SOUNDING_PAGES: u8 = 4;

/// Result pages of the Network task.
pub const NETWORK_PAGES: u8 = 4;

impl Default for App {
    fn default() -> Self {
        Self::new(Settings::default())
    }
}

impl App {
    /// The state at power-on with these settings; forms hold the demo scenario's values
    /// (Tessel Col, column from the plain to the crest under the tropopause lid).
    /// Not inlined, so that a caller can have it built straight where the app is kept
    /// (the app is about 19 KB).
    #[inline(never)]
    pub fn new(settings: Settings) -> Self {
        let s = &settings;
        let plain = demo::LID_M - demo::PLAIN_M;
        let crest = demo::LID_M - demo::CREST_M;
        let la = demo::SITE.lat_deg;
        let site = Form::new([Field::with_value(&SITE_FIELDS[0], la, s)]);
        let f = |specs: &[FieldSpec; 5], v: [f64; 5]| {
            Form::new([
                Field::with_value(&specs[0], v[0], s),
                Field::with_value(&specs[1], v[1], s),
                Field::with_value(&specs[2], v[2], s),
                Field::with_value(&specs[3], v[3], s),
                Field::with_value(&specs[4], v[4], s),
            ])
        };
        // The demo network is built from constants the core checks in its own tests; should
        // it ever fail, the list starts empty rather than the device stopping.
        let network = demo::network().unwrap_or_default();
        let stations = net::entries(&network, s);
        let dv = |i: usize, v: f64| Field::with_value(&CROSSING_FIELDS[i], v, s);
        let crossing = Form::new([
            dv(0, demo::U0_MS),
            dv(1, 270.0),
            dv(2, demo::LID_M),
            dv(3, demo::BRUNT_VAISALA),
            dv(4, demo::CREST_M),
            dv(5, demo::PLAIN_M),
            dv(6, demo::HALF_WIDTH_M),
            dv(7, 0.0),
            dv(8, demo::RIDGE_ANCHOR.lat_deg),
            dv(9, demo::RIDGE_ANCHOR.lon_deg),
        ]);
        App {
            crossing,
            crossing_view: None,
            crossing_seeded: false,
            network_serial: 0,
            crossing_wind_from: 0,
            stations,
            station_list: List::default(),
            station: 0,
            network_fit: None,
            network_used: Network::new(),
            residual_first: 0,
            sounding: SoundingView::blank(),
            sounding_set: false,
            sounding_from: None,
            ridge_table: None,
            settings,
            screen: Screen::Home,
            home: List::default(),
            column_menu: List::default(),
            settings_list: List::default(),
            site,
            stretch: f(&STRETCH_FIELDS, [la, 0.0, plain, la, crest]),
            depth: f(&DEPTH_FIELDS, [la, 0.0, plain, la, -2.0e-5]),
            site_result: None,
            stretch_result: None,
            depth_result: None,
            notice: None,
            catalog: Catalog::new(),
            free_bytes: None,
            data_list: List::default(),
            data_menu: List::default(),
            load_list: List::default(),
            data_name: DataName::new(),
            data_summary: None,
            name_edit: IdField::default(),
            set_name: DataName::new(),
            pending: None,
        }
    }

    /// Power on from storage: stored settings if valid, else the defaults; then
    /// [`App::open_store`]. The app comes back by value, through a copy: the board, which
    /// keeps it in its main frame, writes the two steps out instead (19 KB less stack).
    pub fn power_on<S: Storage>(storage: &mut S) -> Self {
        let mut app = Self::new(storage.load_settings().unwrap_or_default());
        app.open_store(storage);
        app
    }

    /// Read the store's list. A blank store (no settings, no datasets: the first
    /// power-on) first receives the demo station set and the settings, so the Data list
    /// is not empty and the demo set is not put back after the user deletes it.
    // Not inlined: an entry point of the board's loop, whose frame would otherwise
    // gather the stack of every path below it (docs/performance.md, "Stack").
    #[inline(never)]
    pub fn open_store<S: Storage>(&mut self, storage: &mut S) {
        if storage.load_settings().is_none() && storage.list().is_empty() {
            let mut buf = [0u8; MAX_STATION_SET_BYTES];
            let put = demo::network()
                .map_err(|_| StoreError::Damaged)
                .and_then(|n| crate::storage::encode_stations(&n, &mut buf))
                .and_then(|n| storage.put(DataKind::Stations, DEMO_SET_NAME, &buf[..n]));
            if let Err(e) = put {
                self.store_notice("Not stored", e);
            }
            if storage.save_settings(&self.settings).is_err() {
                self.notice = Some(Notice {
                    heading: "Not stored",
                    text: line_message("the settings could not be stored"),
                });
            }
        }
        self.refresh(storage);
    }

    /// Carry out an effect that needs storage (the caller's loop does this after
    /// [`App::handle`], before drawing): settings are stored, a dataset operation is done
    /// and its outcome (a new screen, or a notice naming the problem) shown.
    // Not inlined: an entry point of the board's loop, whose frame would otherwise
    // gather the stack of every path below it (docs/performance.md, "Stack").
    #[inline(never)]
    pub fn apply<S: Storage>(&mut self, effect: Effect, storage: &mut S) -> Result<(), S::Error> {
        match effect {
            Effect::SaveSettings => storage.save_settings(&self.settings)?,
            Effect::Store => {
                if let Some(op) = self.pending.take() {
                    self.run(op, storage);
                }
            }
            Effect::Nothing | Effect::Redraw => {}
        }
        Ok(())
    }

    fn refresh<S: Storage>(&mut self, storage: &mut S) {
        self.catalog = storage.list();
        self.free_bytes = Some(storage.free_bytes());
    }

    fn store_notice(&mut self, heading: &'static str, e: StoreError) {
        self.notice = Some(Notice {
            heading,
            text: crate::text::message(format_args!("{e}")),
        });
    }

    /// One dataset operation against the store.
    fn run<S: Storage>(&mut self, op: StoreOp, storage: &mut S) {
        // Each operation with a buffer has a function of its own (not inlined), so that
        // this frame stays small under the Sounding task's deep summary.
        match op {
            StoreOp::View(name) => self.view_dataset(name, storage),
            StoreOp::Rename { from, to } => match storage.rename(&from, &to) {
                Ok(()) => {
                    self.refresh(storage);
                    if self.set_name == from {
                        self.set_name = to.clone();
                    }
                    if self.sounding_from.as_ref() == Some(&from) {
                        self.sounding_from = Some(to.clone());
                    }
                    self.data_name = to;
                    self.screen = Screen::DataItem;
                }
                Err(e) => self.store_notice("Cannot rename", e),
            },
            StoreOp::Delete(name) => match storage.delete(&name) {
                Ok(()) => {
                    self.refresh(storage);
                    let rows = self.catalog.len().max(1);
                    self.data_list.sel = self.data_list.sel.min(rows as u8 - 1);
                    self.screen = Screen::DataList;
                }
                Err(e) => self.store_notice("Cannot delete", e),
            },
            StoreOp::SaveStations(name) => self.save_stations(name, storage),
            StoreOp::Use(name) => {
                let kind = self.catalog.iter().find(|d| d.name == name).map(|d| d.kind);
                match kind {
                    Some(DataKind::Stations) => self.load_stations(name, storage),
                    Some(DataKind::Sounding) => self.use_sounding(name, storage),
                    Some(DataKind::Ridge) => self.use_ridge(name, storage),
                    Some(k) => {
                        self.notice = Some(Notice {
                            heading: "Not used here",
                            text: crate::text::message(format_args!(
                                "A {} is kept for the laptop: the device uses station sets \
                                 (Network), soundings (Sounding) and ridges (Ridge crossing).",
                                k.word()
                            )),
                        })
                    }
                    None => self.store_notice("Cannot read", StoreError::NotFound),
                }
            }
            StoreOp::LoadStations(name) => self.load_stations(name, storage),
        }
    }

    /// Show what dataset `name` holds.
    #[inline(never)]
    fn view_dataset<S: Storage>(&mut self, name: DataName, storage: &mut S) {
        let mut buf = [0u8; MAX_STATION_SET_BYTES];
        let Some(info) = self.catalog.iter().find(|d| d.name == name).cloned() else {
            return self.store_notice("Cannot read", StoreError::NotFound);
        };
        let stations = if info.kind == DataKind::Stations {
            let got = storage
                .get(&name, &mut buf)
                .and_then(|(_, n)| crate::storage::decode_stations(buf.get(..n).unwrap_or(&[])));
            match got {
                Ok(n) => Some(StationSummary::of(&n)),
                Err(e) => return self.store_notice("Cannot read", e),
            }
        } else {
            None
        };
        self.data_summary = Some(DataSummary { info, stations });
        self.screen = Screen::DataView;
    }

    /// Save the station list as dataset `name`.
    #[inline(never)]
    fn save_stations<S: Storage>(&mut self, name: DataName, storage: &mut S) {
        let mut buf = [0u8; MAX_STATION_SET_BYTES];
        let Ok(network) = net::gather(&self.stations, &self.settings) else {
            // The entries were checked when OK was pressed; show, never hide.
            return self.store_notice("Cannot save", StoreError::Damaged);
        };
        let put = crate::storage::encode_stations(&network, &mut buf)
            .and_then(|n| storage.put(DataKind::Stations, &name, &buf[..n]));
        self.refresh(storage);
        match put {
            Ok(()) => {
                self.notice = Some(Notice {
                    heading: "Saved",
                    text: crate::text::message(format_args!(
                        "{} stations saved as {name}.",
                        network.len()
                    )),
                });
                self.set_name = name;
                self.screen = Screen::NetworkList;
            }
            Err(e) => self.store_notice("Cannot save", e),
        }
    }

    /// Load station set `name` into the Network task.
    #[inline(never)]
    fn load_stations<S: Storage>(&mut self, name: DataName, storage: &mut S) {
        let mut buf = [0u8; MAX_STATION_SET_BYTES];
        let got = storage.get(&name, &mut buf).and_then(|(kind, n)| {
            if kind == DataKind::Stations {
                crate::storage::decode_stations(buf.get(..n).unwrap_or(&[]))
            } else {
                Err(StoreError::NotFound)
            }
        });
        match got {
            Ok(network) => {
                self.stations = net::entries(&network, &self.settings);
                self.station_list.sel = 0;
                self.set_name = name;
                self.screen = Screen::NetworkList;
            }
            Err(e) => self.store_notice("Cannot load", e),
        }
    }

    /// Make stored sounding `name` the Sounding task's current one and show its summary.
    #[inline(never)]
    fn use_sounding<S: Storage>(&mut self, name: DataName, storage: &mut S) {
        match crate::sounding::stored_view_into(storage, &name, &mut self.sounding) {
            Ok(()) => {
                self.sounding_set = true;
                self.sounding_from = Some(name);
                // The crossing form takes its lid and N from this sounding next time.
                self.crossing_seeded = false;
                self.screen = Screen::SoundingResult(0);
            }
            Err(crate::sounding::StoredError::Load(crate::sounding::LoadError::Store(e))) => {
                self.store_notice("Cannot read", e)
            }
            Err(crate::sounding::StoredError::Load(e)) => {
                self.notice = Some(Notice {
                    heading: "Cannot read",
                    text: crate::text::message(format_args!("{name}: {e}.")),
                })
            }
            Err(crate::sounding::StoredError::Core(e)) => {
                self.notice = Some(Notice {
                    heading: "Cannot compute",
                    text: pages::error_words(&e),
                })
            }
        }
    }

    /// Put stored ridge `name` in the Ridge crossing form and open it.
    #[inline(never)]
    fn use_ridge<S: Storage>(&mut self, name: DataName, storage: &mut S) {
        use crate::records::Record;
        let mut buf = [0u8; MAX_STATION_SET_BYTES];
        let got = match storage.get(&name, &mut buf) {
            Ok((DataKind::Ridge, n)) => {
                leeward_core::crossing::Ridge::decode(buf.get(..n).unwrap_or(&[]))
                    .map_err(|e| crate::text::message(format_args!("{name}: {e}.")))
            }
            Ok(_) => return self.store_notice("Cannot read", StoreError::NotFound),
            Err(e) => return self.store_notice("Cannot read", e),
        };
        let ridge = match got {
            Ok(r) => r,
            Err(text) => {
                self.notice = Some(Notice {
                    heading: "Cannot read",
                    text,
                });
                return;
            }
        };
        let shown = table_figures(&ridge.profile);
        let s = self.settings;
        let values = [
            (4, shown[0]),
            (5, shown[1]),
            (6, shown[2]),
            (7, {
                let a = libm::fmod(ridge.axis_deg, 360.0);
                if a < 0.0 {
                    a + 360.0
                } else {
                    a
                }
            }),
            (8, ridge.anchor.lat_deg),
            (9, ridge.anchor.lon_deg),
        ];
        for (i, v) in values {
            self.crossing.fields[i] = Field::with_value(&CROSSING_FIELDS[i], v, &s);
        }
        // A bell is the form's own shape; any other is kept and used while the form still
        // shows its figures.
        self.ridge_table = match ridge.profile {
            leeward_core::crossing::Profile::Bell { .. } => None,
            profile => Some(StoredRidge {
                name,
                profile,
                shown_m: shown,
            }),
        };
        // The form opens at its top, on the first of the figures it received.
        self.crossing.sel = 0;
        self.crossing.editing = false;
        self.enter_crossing();
        self.screen = Screen::CrossingForm;
    }

    /// The stored ridge profile the crossing uses instead of the form's bell, if any.
    pub fn ridge_table(&self) -> Option<&StoredRidge> {
        self.ridge_table.as_ref()
    }

    /// Whether the crossing form's crest, plain and half-width (SI values `v`) are still
    /// those a stored table put there (to the display's rounding: 1 m, or a thousandth
    /// of the half-width).
    fn table_in_force(&self, v: &[f64; 10]) -> Option<&StoredRidge> {
        let t = self.ridge_table.as_ref()?;
        let near = |a: f64, b: f64, tol: f64| (a - b).abs() <= tol;
        (near(v[4], t.shown_m[0], 1.0)
            && near(v[5], t.shown_m[1], 1.0)
            && near(v[6], t.shown_m[2], 1.0 + 1e-3 * t.shown_m[2]))
        .then_some(t)
    }

    /// The stored sounding the Sounding task shows (`None`: the demo ascent).
    pub fn sounding_source(&self) -> Option<&DataName> {
        self.sounding_from.as_ref()
    }

    /// The store's list as last read.
    pub fn catalog(&self) -> &Catalog {
        &self.catalog
    }
    /// The store's free bytes as last read (`None` before the store was read).
    pub fn free_bytes(&self) -> Option<usize> {
        self.free_bytes
    }
    /// The summary on the Data task's view page.
    pub fn data_summary(&self) -> Option<&DataSummary> {
        self.data_summary.as_ref()
    }

    /// The screen showing.
    pub fn screen(&self) -> Screen {
        self.screen
    }
    /// The current settings.
    pub fn settings(&self) -> &Settings {
        &self.settings
    }
    /// The notice showing, if any.
    pub fn notice(&self) -> Option<&Notice> {
        self.notice.as_ref()
    }
    /// The last Site result (what the result screen shows).
    pub fn site_result(&self) -> Option<&Rotation> {
        self.site_result.as_ref()
    }
    /// The last Column stretch result.
    pub fn stretch_result(&self) -> Option<&Stretch> {
        self.stretch_result.as_ref()
    }
    /// The last Column depth result.
    pub fn depth_result(&self) -> Option<&Stretch> {
        self.depth_result.as_ref()
    }

    /// The last Network result and the stations it was computed from.
    pub fn network_result(&self) -> Option<(&NetworkFit, &Network)> {
        self.network_fit.as_ref().map(|f| (f, &self.network_used))
    }
    /// The last sounding summary shown.
    pub fn sounding(&self) -> Option<&SoundingView> {
        self.sounding_set.then_some(&self.sounding)
    }
    /// The last Ridge crossing result.
    pub fn crossing_result(&self) -> Option<&CrossingView> {
        self.crossing_view.as_ref()
    }
    /// The Ridge crossing form.
    pub fn crossing_form(&self) -> &Form<10> {
        &self.crossing
    }

    /// The stations as entered.
    pub fn stations(&self) -> &[StationEntry] {
        &self.stations
    }

    /// Apply one key press.
    // Not inlined: an entry point of the board's loop, whose frame would otherwise
    // gather the stack of every path below it (docs/performance.md, "Stack").
    #[inline(never)]
    pub fn handle(&mut self, key: Key) -> Effect {
        if self.notice.take().is_some() {
            return Effect::Redraw;
        }
        if key == Key::Menu {
            self.site.editing = false;
            self.stretch.editing = false;
            self.depth.editing = false;
            self.crossing.editing = false;
            for f in self
                .site
                .fields
                .iter_mut()
                .chain(&mut self.stretch.fields)
                .chain(&mut self.depth.fields)
                .chain(&mut self.crossing.fields)
            {
                f.finish();
            }
            for st in &mut self.stations {
                st.finish();
            }
            let was = self.screen;
            self.screen = Screen::Home;
            return if was == Screen::Home {
                Effect::Nothing
            } else {
                Effect::Redraw
            };
        }
        match self.screen {
            Screen::Home => match self.home.handle(key, HOME_ROWS.len()) {
                ListOutcome::Chosen(i) | ListOutcome::Previous(i) if key != Key::Left => {
                    self.screen = match i {
                        0 => Screen::SiteForm,
                        1 => Screen::ColumnMenu,
                        2 => Screen::NetworkList,
                        3 => {
                            // A stored sounding chosen in the Data task stays the current
                            // one; otherwise the demo ascent is summarised on entry (a
                            // failure is a notice over the home menu).
                            if self.sounding_from.is_some() && self.sounding_set {
                                Screen::SoundingResult(0)
                            } else {
                                self.open_demo_sounding()
                            }
                        }
                        4 => {
                            self.enter_crossing();
                            Screen::CrossingForm
                        }
                        5 => {
                            self.data_list.sel = 0;
                            Screen::DataList
                        }
                        6 => Screen::Settings,
                        _ => Screen::About(0),
                    };
                    Effect::Redraw
                }
                ListOutcome::Moved => Effect::Redraw,
                _ => Effect::Nothing,
            },
            Screen::ColumnMenu => match self.column_menu.handle(key, COLUMN_ROWS.len()) {
                ListOutcome::Chosen(i) => {
                    self.screen = if i == 0 {
                        Screen::StretchForm
                    } else {
                        Screen::DepthForm
                    };
                    Effect::Redraw
                }
                ListOutcome::Back | ListOutcome::Previous(_) => {
                    self.screen = Screen::Home;
                    Effect::Redraw
                }
                ListOutcome::Moved => Effect::Redraw,
                ListOutcome::Nothing => Effect::Nothing,
            },
            Screen::SiteForm => {
                let out = self.site.handle(key, &SITE_FIELDS, &self.settings);
                self.form_outcome(out, Task::Site)
            }
            Screen::StretchForm => {
                let out = self.stretch.handle(key, &STRETCH_FIELDS, &self.settings);
                self.form_outcome(out, Task::Stretch)
            }
            Screen::DepthForm => {
                let out = self.depth.handle(key, &DEPTH_FIELDS, &self.settings);
                self.form_outcome(out, Task::Depth)
            }
            Screen::SiteResult | Screen::StretchResult | Screen::DepthResult => match key {
                Key::Back | Key::Left | Key::Ok => {
                    self.screen = match self.screen {
                        Screen::SiteResult => Screen::SiteForm,
                        Screen::StretchResult => Screen::StretchForm,
                        _ => Screen::DepthForm,
                    };
                    Effect::Redraw
                }
                _ => Effect::Nothing,
            },
            Screen::CrossingForm => {
                let out = self.crossing.handle(key, &CROSSING_FIELDS, &self.settings);
                self.form_outcome(out, Task::Crossing)
            }
            Screen::CrossingResult(n) => match key {
                Key::Right if n + 1 < CROSSING_PAGES => {
                    self.screen = Screen::CrossingResult(n + 1);
                    Effect::Redraw
                }
                Key::Left if n > 0 => {
                    self.screen = Screen::CrossingResult(n - 1);
                    Effect::Redraw
                }
                Key::Back | Key::Ok => {
                    self.screen = Screen::CrossingForm;
                    Effect::Redraw
                }
                _ => Effect::Nothing,
            },
            Screen::NetworkList => self.station_list_key(key),
            Screen::StationEdit => self.station_key(key),
            Screen::NetworkResult(n) => self.network_result_key(key, n),
            Screen::SoundingResult(n) => match key {
                Key::Right if n + 1 < SOUNDING_PAGES => {
                    self.screen = Screen::SoundingResult(n + 1);
                    Effect::Redraw
                }
                Key::Left if n > 0 => {
                    self.screen = Screen::SoundingResult(n - 1);
                    Effect::Redraw
                }
                Key::Back | Key::Ok => {
                    self.screen = Screen::Home;
                    Effect::Redraw
                }
                _ => Effect::Nothing,
            },
            Screen::DataList
            | Screen::DataItem
            | Screen::DataView
            | Screen::DataRename
            | Screen::DataDelete
            | Screen::NetworkSave
            | Screen::NetworkLoad => self.data_key(key),
            Screen::Settings => self.settings_key(key),
            Screen::About(n) => {
                let last = (pages::ABOUT.len() - 1) as u8;
                match key {
                    Key::Right | Key::Down | Key::Ok if n < last => {
                        self.screen = Screen::About(n + 1);
                        Effect::Redraw
                    }
                    Key::Left | Key::Up if n > 0 => {
                        self.screen = Screen::About(n - 1);
                        Effect::Redraw
                    }
                    Key::Back | Key::Ok => {
                        self.screen = Screen::Home;
                        Effect::Redraw
                    }
                    _ => Effect::Nothing,
                }
            }
        }
    }

    /// Summarise the demo ascent for the Sounding task: its first page, or a notice over
    /// the home menu.
    #[inline(never)]
    fn open_demo_sounding(&mut self) -> Screen {
        match crate::sounding::demo_view_into(&mut self.sounding) {
            Ok(()) => {
                self.sounding_set = true;
                self.sounding_from = None;
                Screen::SoundingResult(0)
            }
            Err(e) => {
                self.notice = Some(Notice {
                    heading: "Cannot compute",
                    text: pages::error_words(&e),
                });
                Screen::Home
            }
        }
    }

    /// Entering the Ridge crossing form: the lid and N come from the sounding summary the
    /// first time; the wind from the newest Network result whenever there is a new one
    /// (otherwise the form keeps what the user typed).
    #[inline(never)]
    fn enter_crossing(&mut self) {
        let s = self.settings;
        if !self.crossing_seeded {
            self.crossing_seeded = true;
            // The current sounding: a stored one in use, else the demo ascent (made
            // here, where the Sounding task keeps it, if it has not been yet).
            if !self.sounding_set {
                self.sounding_from = None;
                self.sounding_set = crate::sounding::demo_view_into(&mut self.sounding).is_ok();
            }
            // A summary that cannot give a figure leaves the demo value in its field.
            let (lid, n) = match self.sounding() {
                Some(v) => (
                    v.lid.as_ref().ok().map(|l| l.height_m),
                    v.ridge_flow.as_ref().ok().map(|rf| rf.n_per_s),
                ),
                None => (None, None),
            };
            if let Some(z) = lid {
                self.crossing.fields[2] = Field::with_value(&CROSSING_FIELDS[2], z, &s);
            }
            if let Some(n) = n {
                self.crossing.fields[3] = Field::with_value(&CROSSING_FIELDS[3], n, &s);
            }
        }
        if let Some(fit) = &self.network_fit {
            if self.crossing_wind_from != self.network_serial {
                self.crossing_wind_from = self.network_serial;
                let w = &fit.wind;
                self.crossing.fields[0] =
                    Field::with_value(&CROSSING_FIELDS[0], w.speed_ms.value, &s);
                self.crossing.fields[1] =
                    Field::with_value(&CROSSING_FIELDS[1], w.dir_from_deg.value, &s);
            }
        }
    }

    fn form_outcome(&mut self, out: FormOutcome, task: Task) -> Effect {
        match out {
            FormOutcome::Nothing => Effect::Nothing,
            FormOutcome::Changed => Effect::Redraw,
            FormOutcome::Leave => {
                self.screen = match task {
                    Task::Site | Task::Crossing => Screen::Home,
                    Task::Stretch | Task::Depth => Screen::ColumnMenu,
                };
                Effect::Redraw
            }
            FormOutcome::Invalid(i, e) => {
                let s = &self.settings;
                let text = match task {
                    Task::Site => invalid_words(&SITE_FIELDS, &self.site, i, e, s),
                    Task::Stretch => invalid_words(&STRETCH_FIELDS, &self.stretch, i, e, s),
                    Task::Depth => invalid_words(&DEPTH_FIELDS, &self.depth, i, e, s),
                    Task::Crossing => invalid_words(&CROSSING_FIELDS, &self.crossing, i, e, s),
                };
                self.notice = Some(Notice {
                    heading: "Check the entry",
                    text,
                });
                Effect::Redraw
            }
            FormOutcome::Compute => {
                self.compute(task);
                Effect::Redraw
            }
        }
    }

    /// Gather the form's values, call the core, and show its answer or its error.
    #[inline(never)]
    fn compute(&mut self, task: Task) {
        let s = self.settings;
        let result = match task {
            Task::Site => self.site.values(&SITE_FIELDS, &s).ok().map(|[la]| {
                Rotation::at(la).map(|r| {
                    self.site_result = Some(r);
                    Screen::SiteResult
                })
            }),
            Task::Stretch => self.stretch.values(&STRETCH_FIELDS, &s).ok().map(|v| {
                column::stretch(v[0], v[1], v[2], v[3], v[4]).map(|r| {
                    self.stretch_result = Some(r);
                    Screen::StretchResult
                })
            }),
            Task::Depth => self.depth.values(&DEPTH_FIELDS, &s).ok().map(|v| {
                column::depth_for_vorticity(v[0], v[1], v[2], v[3], v[4]).map(|r| {
                    self.depth_result = Some(r);
                    Screen::DepthResult
                })
            }),
            Task::Crossing => self.crossing.values(&CROSSING_FIELDS, &s).ok().map(|v| {
                let mut input = crossing::input(&v);
                if let Some(t) = self.table_in_force(&v) {
                    input.ridge.profile = t.profile.clone();
                }
                crossing::compute(input).map(|r| {
                    self.crossing_view = Some(r);
                    Screen::CrossingResult(0)
                })
            }),
        };
        match result {
            Some(Ok(screen)) => self.screen = screen,
            Some(Err(e)) => {
                self.notice = Some(Notice {
                    heading: "Cannot compute",
                    text: pages::error_words(&e),
                })
            }
            // The form said every field was valid; a disagreement is shown, not hidden.
            None => {
                self.notice = Some(Notice {
                    heading: "Check the entry",
                    text: line_message("an entry is not valid"),
                })
            }
        }
    }

    #[inline(never)]
    fn station_list_key(&mut self, key: Key) -> Effect {
        let n = self.stations.len();
        match self.station_list.handle(key, n + 4) {
            ListOutcome::Chosen(i) if i < n => {
                self.station = i as u8;
                if let Some(st) = self.stations.get_mut(i) {
                    st.sel = 0;
                }
                self.screen = Screen::StationEdit;
                Effect::Redraw
            }
            ListOutcome::Chosen(i) if i == n => {
                self.name_edit = IdField::with_text(&self.set_name);
                self.screen = Screen::NetworkSave;
                Effect::Redraw
            }
            ListOutcome::Chosen(i) if i == n + 1 => {
                self.load_list.sel = 0;
                self.screen = Screen::NetworkLoad;
                Effect::Redraw
            }
            ListOutcome::Chosen(i) if i == n + 2 => {
                let s = &self.settings;
                // A new station starts at the site's position, with no height: nothing is
                // assumed that the user did not enter.
                let mut st = StationEntry::from_station(
                    &leeward_core::network::Station {
                        id: Default::default(),
                        pos: demo::SITE,
                        height_m: 0.0,
                        sigma_m: Some(leeward_core::network::DEFAULT_SIGMA_M),
                    },
                    s,
                );
                st.form.fields[2] = Field::default();
                if self.stations.push(st).is_err() {
                    self.notice = Some(Notice {
                        heading: "List full",
                        text: crate::text::message(format_args!(
                            "The list holds {MAX_STATIONS} stations. Delete one to add another."
                        )),
                    });
                } else {
                    self.station = n as u8;
                    self.station_list.sel = n as u8;
                    self.screen = Screen::StationEdit;
                }
                Effect::Redraw
            }
            ListOutcome::Chosen(_) => {
                self.compute_network();
                Effect::Redraw
            }
            ListOutcome::Back => {
                self.screen = Screen::Home;
                Effect::Redraw
            }
            ListOutcome::Moved => Effect::Redraw,
            ListOutcome::Previous(_) | ListOutcome::Nothing => Effect::Nothing,
        }
    }

    #[inline(never)]
    fn station_key(&mut self, key: Key) -> Effect {
        let i = self.station as usize;
        let s = self.settings;
        let Some(st) = self.stations.get_mut(i) else {
            self.screen = Screen::NetworkList;
            return Effect::Redraw;
        };
        match st.handle(key, &s) {
            EditorOutcome::Nothing => Effect::Nothing,
            EditorOutcome::Changed => Effect::Redraw,
            EditorOutcome::Leave => {
                self.screen = Screen::NetworkList;
                Effect::Redraw
            }
            EditorOutcome::Delete => {
                self.stations.remove(i);
                let rows = self.stations.len() + 4;
                self.station_list.sel = (i.min(rows - 1)) as u8;
                self.screen = Screen::NetworkList;
                Effect::Redraw
            }
            EditorOutcome::Invalid(f, e) => {
                let text = invalid_words(&STATION_FIELDS, &st.form, f, e, &s);
                self.notice = Some(Notice {
                    heading: "Check the entry",
                    text,
                });
                Effect::Redraw
            }
            EditorOutcome::EmptyId => {
                self.notice = Some(Notice {
                    heading: "Check the entry",
                    text: line_message(ID_RULE),
                });
                Effect::Redraw
            }
        }
    }

    #[inline(never)]
    fn network_result_key(&mut self, key: Key, n: u8) -> Effect {
        let last = NETWORK_PAGES - 1;
        let rows = self.network_used.len();
        let max_first = rows.saturating_sub(net::RESIDUAL_ROWS) as u8;
        match key {
            Key::Right if n < last => self.screen = Screen::NetworkResult(n + 1),
            Key::Left if n > 0 => self.screen = Screen::NetworkResult(n - 1),
            Key::Down if n == 2 && self.residual_first < max_first => self.residual_first += 1,
            Key::Up if n == 2 && self.residual_first > 0 => self.residual_first -= 1,
            Key::Back | Key::Ok => self.screen = Screen::NetworkList,
            _ => return Effect::Nothing,
        }
        Effect::Redraw
    }

    /// Gather the stations, call the core, and show its answer or the first problem.
    fn compute_network(&mut self) {
        let Some(network) = self.gather_stations() else {
            return;
        };
        let (heading, text) = match analyse(&network, &FitOptions::default()) {
            Ok(fit) => {
                self.network_fit = Some(fit);
                self.network_serial = self.network_serial.wrapping_add(1).max(1);
                self.network_used = network;
                self.residual_first = 0;
                self.screen = Screen::NetworkResult(0);
                return;
            }
            Err(e) => ("Cannot compute", pages::error_words(&e)),
        };
        self.notice = Some(Notice { heading, text });
    }

    /// The stations as a core network, or `None` with a notice naming the first problem
    /// (and that station selected in the list).
    fn gather_stations(&mut self) -> Option<Network> {
        let s = self.settings;
        let stations = &self.stations;
        let name = |i: usize| {
            let id = stations.get(i).map(|e| e.id.text()).unwrap_or_default();
            let gap = if id.is_empty() { "" } else { " " };
            line(format_args!("Station {}{gap}{id}", i + 1))
        };
        let (heading, text) = match net::gather(stations, &s) {
            Err(GatherError::EmptyId { station }) => {
                self.station_list.sel = station as u8;
                (
                    "Check the entry",
                    crate::text::message(format_args!("{}: {ID_RULE}", name(station))),
                )
            }
            Err(GatherError::Field {
                station,
                field,
                err,
            }) => {
                self.station_list.sel = station as u8;
                let words = match stations.get(station) {
                    Some(e) => invalid_words(&STATION_FIELDS, &e.form, field, err, &s),
                    None => line_message("an entry is not valid"),
                };
                (
                    "Check the entry",
                    crate::text::message(format_args!("{}: {words}", name(station))),
                )
            }
            Err(GatherError::Core { station, err }) => {
                self.station_list.sel = station as u8;
                (
                    "Cannot compute",
                    crate::text::message(format_args!(
                        "{}: {}",
                        name(station),
                        pages::error_words(&err)
                    )),
                )
            }
            Ok(network) => return Some(network),
        };
        self.notice = Some(Notice { heading, text });
        None
    }

    /// Keys of the Data task's screens and of the Network task's Save and Load.
    #[inline(never)]
    fn data_key(&mut self, key: Key) -> Effect {
        match self.screen {
            Screen::DataList => {
                let n = self.catalog.len();
                match self.data_list.handle(key, n) {
                    ListOutcome::Chosen(i) => match self.catalog.get(i) {
                        Some(d) => {
                            self.data_name = d.name.clone();
                            self.data_menu.sel = 0;
                            self.screen = Screen::DataItem;
                            Effect::Redraw
                        }
                        None => Effect::Nothing,
                    },
                    ListOutcome::Back => {
                        self.screen = Screen::Home;
                        Effect::Redraw
                    }
                    ListOutcome::Moved if n > 1 => Effect::Redraw,
                    _ => Effect::Nothing,
                }
            }
            Screen::DataItem => match self.data_menu.handle(key, DATA_ROWS.len()) {
                ListOutcome::Chosen(0) => {
                    self.pending = Some(StoreOp::View(self.data_name.clone()));
                    Effect::Store
                }
                ListOutcome::Chosen(1) => {
                    self.name_edit = IdField::with_text(&self.data_name);
                    self.screen = Screen::DataRename;
                    Effect::Redraw
                }
                ListOutcome::Chosen(2) => {
                    self.screen = Screen::DataDelete;
                    Effect::Redraw
                }
                ListOutcome::Chosen(_) => {
                    self.pending = Some(StoreOp::Use(self.data_name.clone()));
                    Effect::Store
                }
                ListOutcome::Back | ListOutcome::Previous(_) => {
                    self.screen = Screen::DataList;
                    Effect::Redraw
                }
                ListOutcome::Moved => Effect::Redraw,
                ListOutcome::Nothing => Effect::Nothing,
            },
            Screen::DataView => match key {
                Key::Back | Key::Ok | Key::Left => {
                    self.screen = Screen::DataItem;
                    Effect::Redraw
                }
                _ => Effect::Nothing,
            },
            Screen::DataDelete => match key {
                Key::Ok => {
                    self.pending = Some(StoreOp::Delete(self.data_name.clone()));
                    Effect::Store
                }
                Key::Back => {
                    self.screen = Screen::DataItem;
                    Effect::Redraw
                }
                _ => Effect::Nothing,
            },
            Screen::DataRename | Screen::NetworkSave => {
                let back = if self.screen == Screen::DataRename {
                    Screen::DataItem
                } else {
                    Screen::NetworkList
                };
                match key {
                    Key::Ok => {
                        self.name_edit.finish();
                        let text = self.name_edit.text();
                        let mut name = DataName::new();
                        if text.is_empty() || name.push_str(&text).is_err() {
                            self.notice = Some(Notice {
                                heading: "Check the name",
                                text: line_message(NAME_RULE),
                            });
                            return Effect::Redraw;
                        }
                        if back == Screen::DataItem {
                            self.pending = Some(StoreOp::Rename {
                                from: self.data_name.clone(),
                                to: name,
                            });
                        } else {
                            if self.gather_stations().is_none() {
                                // The notice names the station; the list shows it.
                                self.screen = Screen::NetworkList;
                                return Effect::Redraw;
                            }
                            self.pending = Some(StoreOp::SaveStations(name));
                        }
                        Effect::Store
                    }
                    Key::Back => {
                        self.screen = back;
                        Effect::Redraw
                    }
                    Key::Dot | Key::Sign | Key::Digit(10..) => Effect::Nothing,
                    k => {
                        self.name_edit.edit(k);
                        Effect::Redraw
                    }
                }
            }
            _ => {
                let sets = self.catalog.iter().filter(|d| d.kind == DataKind::Stations);
                let n = sets.clone().count();
                match self.load_list.handle(key, n) {
                    ListOutcome::Chosen(i) => match sets.clone().nth(i) {
                        Some(d) => {
                            self.pending = Some(StoreOp::LoadStations(d.name.clone()));
                            Effect::Store
                        }
                        None => Effect::Nothing,
                    },
                    ListOutcome::Back | ListOutcome::Previous(_) => {
                        self.screen = Screen::NetworkList;
                        Effect::Redraw
                    }
                    ListOutcome::Moved if n > 1 => Effect::Redraw,
                    _ => Effect::Nothing,
                }
            }
        }
    }

    #[inline(never)]
    fn settings_key(&mut self, key: Key) -> Effect {
        let (i, forward) = match self.settings_list.handle(key, 4) {
            ListOutcome::Chosen(i) => (i, true),
            ListOutcome::Previous(i) => (i, false),
            ListOutcome::Back => {
                self.screen = Screen::Home;
                return Effect::Redraw;
            }
            ListOutcome::Moved => return Effect::Redraw,
            ListOutcome::Nothing => return Effect::Nothing,
        };
        let old = self.settings;
        let mut new = old;
        // Every list of choices is short: stepping back is stepping forward n − 1 times.
        let steps = |n: usize| if forward { 1 } else { n - 1 };
        match i {
            0 => (0..steps(2)).for_each(|_| new.height = new.height.next()),
            1 => (0..steps(3)).for_each(|_| new.wind = new.wind.next()),
            2 => (0..steps(2)).for_each(|_| new.pressure = new.pressure.next()),
            _ => (0..steps(2)).for_each(|_| new.lat_entry = new.lat_entry.next()),
        }
        self.site.convert(&SITE_FIELDS, &old, &new);
        self.stretch.convert(&STRETCH_FIELDS, &old, &new);
        self.depth.convert(&DEPTH_FIELDS, &old, &new);
        self.crossing.convert(&CROSSING_FIELDS, &old, &new);
        for st in &mut self.stations {
            st.form.convert(&STATION_FIELDS, &old, &new);
        }
        self.settings = new;
        Effect::SaveSettings
    }

    /// The station list: a row per station (identifier, height), then Add and Compute;
    /// only the rows in view are formatted.
    fn draw_station_list<D, I>(&self, p: &mut Painter<'_, D, I>) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        let n = self.stations.len();
        let sel = (self.station_list.sel as usize).min(n + 3);
        let first = sel.saturating_sub(crate::ui::BODY_LINES - 1);
        let mut texts: heapless::Vec<(Line, Line), { crate::ui::BODY_LINES }> =
            heapless::Vec::new();
        for i in first..(n + 4).min(first + crate::ui::BODY_LINES) {
            let row = match self.stations.get(i) {
                Some(st) => {
                    let id = st.id.text();
                    let h = st.form.fields[2].display();
                    (
                        if id.is_empty() { hint("(no id)") } else { id },
                        line(format_args!(
                            "{} {}",
                            if h.is_empty() { "-" } else { &h },
                            STATION_FIELDS[2].unit(&self.settings)
                        )),
                    )
                }
                None if i == n => (hint("Save set"), hint("to storage")),
                None if i == n + 1 => (hint("Load set"), hint("from storage")),
                None if i == n + 2 => (hint("+ Add station"), Line::new()),
                None => (hint(crate::widgets::COMPUTE_LABEL), Line::new()),
            };
            let _ = texts.push(row);
        }
        let mut rows: heapless::Vec<(&str, &str), { crate::ui::BODY_LINES }> = heapless::Vec::new();
        for (a, b) in &texts {
            let _ = rows.push((a.as_str(), b.as_str()));
        }
        draw_list(p, &rows, sel - first)
    }

    /// Draw the current state.
    pub fn render<D: DrawTarget<Color = BinaryColor>>(&self, d: &mut D) -> Result<(), D::Error> {
        self.render_with(d, &mut ())
    }

    /// Draw the current state, reporting every piece of text to `inspect` (tests read the
    /// screen's words this way and check that nothing runs past its box).
    pub fn render_with<D, I>(&self, d: &mut D, inspect: &mut I) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        let mut p = Painter::new(d, inspect);
        let s = &self.settings;
        p.clear()?;
        let hints: Line = match self.screen {
            Screen::Home => {
                p.title("leeward", "")?;
                draw_list(&mut p, &HOME_ROWS, self.home.sel as usize)?;
                hint("UP/DOWN choose   OK open")
            }
            Screen::ColumnMenu => {
                p.title("Column", "")?;
                draw_list(&mut p, &COLUMN_ROWS, self.column_menu.sel as usize)?;
                hint("UP/DOWN choose   OK open   BACK home")
            }
            Screen::SiteForm => {
                p.title("Site", "inputs")?;
                self.site.draw(&mut p, &SITE_FIELDS, s)?;
                form_hints(&self.site, &SITE_FIELDS, s)
            }
            Screen::StretchForm => {
                p.title("Column: stretch", "inputs")?;
                self.stretch.draw(&mut p, &STRETCH_FIELDS, s)?;
                form_hints(&self.stretch, &STRETCH_FIELDS, s)
            }
            Screen::DepthForm => {
                p.title("Column: depth", "inputs")?;
                self.depth.draw(&mut p, &DEPTH_FIELDS, s)?;
                form_hints(&self.depth, &DEPTH_FIELDS, s)
            }
            Screen::SiteResult => {
                p.title("Site", "result")?;
                if let Some(r) = &self.site_result {
                    pages::site(r, s).draw(&mut p)?;
                }
                hint("BACK inputs   MENU home")
            }
            Screen::StretchResult => {
                p.title("Column: stretch", "result")?;
                if let Some(r) = &self.stretch_result {
                    pages::stretch(r, s).draw(&mut p)?;
                }
                hint("BACK inputs   MENU home")
            }
            Screen::DepthResult => {
                p.title("Column: depth", "result")?;
                if let Some(r) = &self.depth_result {
                    pages::depth(r, s).draw(&mut p)?;
                }
                hint("BACK inputs   MENU home")
            }
            Screen::NetworkList => {
                let tag = line(format_args!("{} stations", self.stations.len()));
                p.title("Network", &tag)?;
                self.draw_station_list(&mut p)?;
                hint("OK open   UP/DOWN choose   BACK home")
            }
            Screen::StationEdit => {
                let i = self.station as usize;
                let tag = line(format_args!("{}/{}", i + 1, self.stations.len()));
                p.title("Station", &tag)?;
                match self.stations.get(i) {
                    Some(st) => {
                        st.draw(&mut p, s)?;
                        station_hints(st, s)
                    }
                    None => hint("BACK list"),
                }
            }
            Screen::NetworkResult(n) => {
                let titles = [
                    "Network: wind",
                    "Network: zeta_g",
                    "Residuals",
                    "Station map",
                ];
                let i = (n as usize).min(titles.len() - 1);
                let tag = line(format_args!("{}/{}", i + 1, NETWORK_PAGES));
                p.title(titles[i], &tag)?;
                if let Some(fit) = &self.network_fit {
                    match i {
                        0 => pages::network_wind(fit, s).draw(&mut p)?,
                        1 => pages::network_vorticity(fit, s).draw(&mut p)?,
                        2 => net::draw_residuals(
                            &mut p,
                            fit,
                            &self.network_used,
                            self.residual_first as usize,
                            s,
                        )?,
                        _ => net::draw_map(&mut p, fit, &self.network_used, s)?,
                    }
                }
                if i == 2 && self.network_used.len() > net::RESIDUAL_ROWS {
                    hint("LEFT/RIGHT page  UP/DOWN scroll  BACK list")
                } else {
                    hint("LEFT/RIGHT page   BACK list   MENU home")
                }
            }
            Screen::SoundingResult(n) => {
                let titles = [
                    "Sounding: column",
                    "Sounding: ridge",
                    "Sounding: shear",
                    "Sounding: profile",
                ];
                let i = (n as usize).min(titles.len() - 1);
                let tag = line(format_args!("{}/{}", i + 1, SOUNDING_PAGES));
                p.title(titles[i], &tag)?;
                if let Some(v) = self.sounding() {
                    match i {
                        0 => pages::sounding_column(v, s).draw(&mut p)?,
                        1 => pages::sounding_froude(v, s).draw(&mut p)?,
                        2 => pages::sounding_barotropy(v, s).draw(&mut p)?,
                        _ => crate::sounding::draw_profile(&mut p, v, s)?,
                    }
                }
                hint("LEFT/RIGHT page   BACK home")
            }
            Screen::CrossingForm => {
                let tag: Line = match self.crossing.values(&CROSSING_FIELDS, s) {
                    Ok(v) if self.table_in_force(&v).is_some() => line(format_args!(
                        "ridge {}",
                        self.ridge_table.as_ref().map_or("", |t| t.name.as_str())
                    )),
                    _ if self.crossing_wind_from == 0 => line(format_args!("wind: demo")),
                    _ => line(format_args!("wind: network")),
                };
                p.title("Ridge crossing", &tag)?;
                self.crossing.draw_scrolled(&mut p, &CROSSING_FIELDS, s)?;
                form_hints(&self.crossing, &CROSSING_FIELDS, s)
            }
            Screen::CrossingResult(n) => {
                let titles = [
                    "Crossing: trough",
                    "Crossing: wave",
                    "Crossing: Froude",
                    "Crossing: plan",
                    "Crossing: section",
                ];
                let i = (n as usize).min(titles.len() - 1);
                let tag = line(format_args!("{}/{}", i + 1, CROSSING_PAGES));
                p.title(titles[i], &tag)?;
                if let Some(v) = &self.crossing_view {
                    match i {
                        0 => pages::crossing_trough(v).draw(&mut p)?,
                        1 => pages::crossing_wave(v).draw(&mut p)?,
                        2 => pages::crossing_froude(v, s).draw(&mut p)?,
                        3 => crossing::draw_plan(&mut p, v)?,
                        _ => crossing::draw_section(&mut p, v, s)?,
                    }
                }
                hint("LEFT/RIGHT page   BACK inputs   MENU home")
            }
            Screen::DataList => {
                let tag = match self.free_bytes {
                    Some(b) => line(format_args!("{b} B free")),
                    None => hint("not read"),
                };
                p.title("Data", &tag)?;
                let sel = self.data_list.sel as usize;
                data::draw_catalog(&mut p, self.catalog.iter(), sel, "(nothing stored)")?;
                if self.catalog.is_empty() {
                    hint("BACK home")
                } else {
                    hint("OK open   UP/DOWN choose   BACK home")
                }
            }
            Screen::DataItem => {
                let kind = self.catalog.iter().find(|d| d.name == self.data_name);
                p.title(&self.data_name, kind.map(|d| d.kind.word()).unwrap_or(""))?;
                draw_list(&mut p, &DATA_ROWS, self.data_menu.sel as usize)?;
                hint("UP/DOWN choose   OK open   BACK list")
            }
            Screen::DataView => {
                p.title("Data: view", &self.data_name)?;
                if let Some(v) = &self.data_summary {
                    data::summary_page(v, s).draw(&mut p)?;
                }
                hint("BACK dataset   MENU home")
            }
            Screen::DataRename => {
                p.title("Rename", &self.data_name)?;
                let was = line(format_args!("Now named {}.", self.data_name));
                data::draw_name_editor(&mut p, &self.name_edit, &was)?;
                hint("UP/DOWN letter  OK rename  BACK keep")
            }
            Screen::DataDelete => {
                p.title("Delete?", &self.data_name)?;
                let d = self.catalog.iter().find(|d| d.name == self.data_name);
                let what = match d {
                    Some(d) => line(format_args!(
                        "{} ({}, {} bytes)",
                        d.name,
                        d.kind.word(),
                        d.bytes
                    )),
                    None => line(format_args!("{}", self.data_name)),
                };
                let text = crate::text::message(format_args!(
                    "Delete {what} from storage? OK deletes it. BACK keeps it."
                ));
                p.paragraph(
                    &text,
                    0,
                    crate::ui::BODY_LINES,
                    crate::ui::MARGIN,
                    crate::ui::BODY_W,
                )?;
                hint("OK delete   BACK keep")
            }
            Screen::NetworkSave => {
                p.title("Save station set", "")?;
                let what = line(format_args!(
                    "{} stations from the list, as a new set.",
                    self.stations.len()
                ));
                data::draw_name_editor(&mut p, &self.name_edit, &what)?;
                hint("UP/DOWN letter  OK save  BACK list")
            }
            Screen::NetworkLoad => {
                p.title("Load station set", "")?;
                let sets = self.catalog.iter().filter(|d| d.kind == DataKind::Stations);
                let sel = self.load_list.sel as usize;
                data::draw_catalog(&mut p, sets, sel, "(no station sets stored)")?;
                hint("OK load (replaces the list)   BACK list")
            }
            Screen::Settings => {
                p.title("Settings", "")?;
                let rows = [
                    ("Height unit", s.height.symbol()),
                    ("Wind unit", s.wind.symbol()),
                    ("Pressure unit", s.pressure.symbol()),
                    ("Latitude entry", s.lat_entry.name()),
                ];
                draw_list(&mut p, &rows, self.settings_list.sel as usize)?;
                hint("UP/DOWN choose   OK/RIGHT change   BACK home")
            }
            Screen::About(n) => {
                let i = (n as usize).min(pages::ABOUT.len() - 1);
                let (head, body) = pages::ABOUT[i];
                let tag = line(format_args!("{}/{}", i + 1, pages::ABOUT.len()));
                p.title(head, &tag)?;
                p.paragraph(
                    body,
                    0,
                    crate::ui::BODY_LINES,
                    crate::ui::MARGIN,
                    crate::ui::BODY_W,
                )?;
                hint("LEFT/RIGHT page   BACK home")
            }
        };
        if let Some(n) = &self.notice {
            draw_notice(&mut p, n.heading, &n.text)?;
            p.footer("any key: close")?;
        } else {
            p.footer(&hints)?;
        }
        Ok(())
    }
}

/// What a dataset name may hold.
const NAME_RULE: &str = "a name needs 1 to 8 of A-Z, 0-9, - and _.";

/// What an identifier may hold.
const ID_RULE: &str = "the identifier needs 1 to 8 of A-Z, 0-9, - and _.";

/// Key hints of the station editor.
fn station_hints(st: &StationEntry, s: &Settings) -> Line {
    let i = st.sel as usize;
    if st.id_editing {
        hint("UP/DOWN letter  LEFT/RIGHT move  OK done")
    } else if st.form.editing && (1..=STATION_FIELDS.len()).contains(&i) {
        line(format_args!(
            "{}   OK done  BACK keep",
            STATION_FIELDS[i - 1].range_text(s)
        ))
    } else if i > STATION_FIELDS.len() {
        hint("OK delete this station   BACK list")
    } else {
        hint("OK edit   UP/DOWN field   BACK list")
    }
}

/// The message for field `i` of a form that failed its check.
fn invalid_words<const N: usize>(
    specs: &[FieldSpec; N],
    form: &Form<N>,
    i: usize,
    e: crate::field::FieldError,
    s: &Settings,
) -> Message {
    match (specs.get(i), form.fields.get(i)) {
        (Some(spec), Some(f)) => entry_message(spec, f, e, s),
        _ => line_message("an entry is not valid"),
    }
}

fn line_message(s: &str) -> Message {
    crate::text::message(format_args!("{s}"))
}

fn hint(s: &str) -> Line {
    line(format_args!("{s}"))
}

/// Key hints of a form; while editing, the allowed range of the field.
fn form_hints<const N: usize>(form: &Form<N>, specs: &[FieldSpec; N], s: &Settings) -> Line {
    let i = form.sel as usize;
    if form.editing && i < N {
        line(format_args!(
            "{}   OK done  BACK keep",
            specs[i].range_text(s)
        ))
    } else if i >= N {
        hint("OK compute   UP/DOWN field   BACK out")
    } else {
        hint("OK edit   UP/DOWN field   BACK out")
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Task {
    Site,
    Stretch,
    Depth,
    Crossing,
}
