//! The Sounding task: the summary of the current sounding (for now the demo ascent from
//! Tessel Col, checked against the demo ridge), kept as the few core results the result
//! pages show, and a thinned copy of the temperature profile for the profile plot. The
//! profile ([`DEVICE_LEVELS`] levels) and the core's full summary (with a height per
//! level) live on the stack only while the summary is made, each built once in place
//! (`sounding_into`, `summarise_into`) rather than moved through `Result`s: moved, they
//! took over 100 KB of stack.

use crate::plot::{dashed_row, inside, polyline, scale_rows, Axis};
use crate::records::RecordError;
use crate::settings::Settings;
use crate::storage::{DataKind, DataReader, Storage, StoreError};
use crate::text::line;
use crate::ui::{Align, Font, Inspect, Painter, BODY_TOP, BODY_W, LINE_H, MARGIN};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;
use leeward_core::demo;
use leeward_core::sounding::barotropy::Barotropy;
use leeward_core::sounding::lid::Lid;
use leeward_core::sounding::ridge_flow::{RidgeCheck, RidgeFlow};
use leeward_core::sounding::stability::Tropopauses;
use leeward_core::sounding::summary::{summarise_into, Summary, SummaryOptions};
use leeward_core::sounding::{Level, Profile, StationInfo};
use leeward_core::{Error, Result};

/// What the Sounding pages show, each part as the core returned it.
#[derive(Debug, Clone, PartialEq)]
pub struct SoundingView {
    /// Station identifier of the sounding.
    pub station: heapless::String<8>,
    /// Tropopauses.
    pub tropopauses: Tropopauses,
    /// The column lid, or why there is none.
    pub lid: Result<Lid>,
    /// Bulk N from the ground to the lid, s⁻¹.
    pub bulk_n_per_s: Result<f64>,
    /// The Froude check against the ridge.
    pub ridge_flow: Result<RidgeFlow>,
    /// The barotropy check.
    pub barotropy: Result<Barotropy>,
    /// Levels whose reported height disagrees with the hypsometric one.
    pub heights_flagged: u16,
    /// The worst disagreement, m.
    pub heights_worst_m: Option<f64>,
    /// Tolerance of the height check, m.
    pub height_tolerance_m: f64,
    /// The temperature profile, thinned for the plot.
    pub plot: PlotProfile,
}

/// The most levels of a sounding on the device: a TEMP Part A+B report or a thinned
/// ascent fits. The profile is 88 bytes a level and lives on the stack while the summary
/// is made, so this sets the deepest stack of the Sounding task.
pub const DEVICE_LEVELS: usize = 128;

/// A sounding as the device holds it.
pub type DeviceProfile = Profile<DEVICE_LEVELS>;

/// Levels kept for the profile plot: more than a 100-pixel-high plot can show apart.
pub const PLOT_LEVELS: usize = 64;
/// Stable layers marked on the profile plot.
pub const PLOT_LAYERS: usize = 4;

/// One plotted level (f32: a pixel is tens of metres and tenths of a kelvin).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlotLevel {
    /// Height, m above sea level.
    pub height_m: f32,
    /// Temperature, °C.
    pub temperature_c: f32,
    /// Dew point, °C.
    pub dewpoint_c: Option<f32>,
}

/// The profile plot's data: levels ground up and the stable layers (base, top), m.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PlotProfile {
    /// Levels with a height and a temperature, ground up; beyond [`PLOT_LEVELS`] evenly
    /// thinned, the lowest and highest always kept.
    pub levels: heapless::Vec<PlotLevel, PLOT_LEVELS>,
    /// The first stable layers below the tropopause, (base, top) in m.
    pub stable_m: heapless::Vec<(f32, f32), PLOT_LAYERS>,
}

impl PlotProfile {
    /// The plottable levels of `profile` with the summary's best heights.
    pub fn of<const N: usize>(profile: &Profile<N>, s: &Summary<N>) -> Self {
        let mut out = PlotProfile::default();
        out.fill(profile, s);
        out
    }

    /// [`PlotProfile::of`] written over `self`.
    pub fn fill<const N: usize>(&mut self, profile: &Profile<N>, s: &Summary<N>) {
        self.levels.clear();
        self.stable_m.clear();
        let out = self;
        let mut all = 0usize;
        let usable = |i: usize| -> Option<PlotLevel> {
            let lv = profile.levels().get(i)?;
            let z = s.heights.best_m(i)?;
            let t = lv.temperature_k?;
            (z.is_finite() && t.is_finite()).then_some(PlotLevel {
                height_m: z as f32,
                temperature_c: (t - 273.15) as f32,
                dewpoint_c: lv.dewpoint_k.map(|d| (d - 273.15) as f32),
            })
        };
        for i in 0..profile.levels().len() {
            if usable(i).is_some() {
                all += 1;
            }
        }
        // The k-th kept level is usable level k (all − 1)/(PLOT_LEVELS − 1), rounded
        // down: every level when they fit, else evenly spread with both ends kept.
        let keep = all.min(PLOT_LEVELS);
        let mut k = 0usize;
        let mut n = 0usize;
        for i in 0..profile.levels().len() {
            let Some(l) = usable(i) else { continue };
            let next = if keep > 1 {
                k * (all - 1) / (keep - 1)
            } else {
                0
            };
            if k < keep && n == next {
                let _ = out.levels.push(l);
                k += 1;
            }
            n += 1;
        }
        for r in s.stability.stable_layers.iter().take(PLOT_LAYERS) {
            let _ = out.stable_m.push((r.base_m as f32, r.top_m as f32));
        }
    }
}

impl SoundingView {
    /// The parts of a core summary the pages show.
    pub fn of<const N: usize>(profile: &Profile<N>, s: &Summary<N>) -> Self {
        let mut v = SoundingView::blank();
        v.fill(profile, s);
        v
    }

    /// A view of nothing, to be filled ([`SoundingView::fill`]).
    pub fn blank() -> Self {
        const NONE: Error = Error::NoData { what: "a summary" };
        SoundingView {
            station: heapless::String::new(),
            tropopauses: Tropopauses {
                first: None,
                second: None,
            },
            lid: Err(NONE),
            bulk_n_per_s: Err(NONE),
            ridge_flow: Err(NONE),
            barotropy: Err(NONE),
            heights_flagged: 0,
            heights_worst_m: None,
            height_tolerance_m: 0.0,
            plot: PlotProfile::default(),
        }
    }

    /// [`SoundingView::of`] written over `self`, part by part (on the handheld the view
    /// is kilobytes, and is made where it is kept).
    pub fn fill<const N: usize>(&mut self, profile: &Profile<N>, s: &Summary<N>) {
        self.station.clear();
        let _ = self.station.push_str(&profile.station.id);
        self.tropopauses = s.tropopauses;
        self.lid = s.lid;
        self.bulk_n_per_s = s.bulk_n_per_s;
        self.ridge_flow = s.ridge_flow.unwrap_or(Err(Error::NoData {
            what: "a ridge for the Froude check",
        }));
        self.barotropy = s.barotropy.clone();
        self.heights_flagged = s.heights.flagged;
        self.heights_worst_m = s.heights.worst.map(|(_, d)| d);
        self.height_tolerance_m = s.heights.tolerance_m;
        self.plot.fill(profile, s);
    }
}

/// The ridge the demo sounding is checked against: the Tessel Range from its upstream
/// plain, axis north–south.
pub fn demo_ridge() -> RidgeCheck {
    RidgeCheck {
        ground_m: demo::PLAIN_M,
        crest_m: demo::CREST_M,
        axis_deg: Some(0.0),
    }
}

/// The summary options the device uses: the core's defaults with the demo ridge.
pub fn demo_options() -> SummaryOptions {
    SummaryOptions {
        ridge: Some(demo_ridge()),
        ..SummaryOptions::default()
    }
}

/// Summarise the demo sounding.
pub fn demo_view() -> Result<SoundingView> {
    let mut v = SoundingView::blank();
    demo_view_into(&mut v)?;
    Ok(v)
}

/// Summarise the demo sounding into `out` (left as it was on an error). The device's
/// path: the view is made where it is kept, not moved through a `Result`.
#[inline(never)]
pub fn demo_view_into(out: &mut SoundingView) -> Result<()> {
    let mut profile = DeviceProfile::empty(StationInfo::default());
    demo::sounding_into(&mut profile)?;
    view_in_place(&profile, out)
}

/// The view of `profile` into `out`, its summary made in place against the demo ridge;
/// on an error `out` is left as it was. Not inlined, so that the summary's stack is
/// not added to the caller's frame, which holds the profile.
#[inline(never)]
fn view_in_place(profile: &DeviceProfile, out: &mut SoundingView) -> Result<()> {
    let mut summary = Summary::empty();
    summarise_into(profile, &demo_options(), &mut summary)?;
    out.fill(profile, &summary);
    Ok(())
}

/// Why a stored sounding could not be read into the device's profile.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LoadError {
    /// The bytes are not a sounding record this firmware reads.
    Record(RecordError),
    /// More levels than the device holds.
    TooManyLevels {
        /// Levels in the stored sounding.
        levels: u32,
        /// Levels the device holds ([`DEVICE_LEVELS`]).
        capacity: u16,
    },
    /// The store could not give the dataset (or its CRC-32 did not match).
    Store(StoreError),
}

impl core::fmt::Display for LoadError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match *self {
            LoadError::Record(e) => write!(f, "{e}"),
            LoadError::TooManyLevels { levels, capacity } => write!(
                f,
                "the sounding has {levels} levels; the device holds {capacity}: thin it on the laptop"
            ),
            LoadError::Store(e) => write!(f, "{e}"),
        }
    }
}

impl From<RecordError> for LoadError {
    fn from(e: RecordError) -> Self {
        LoadError::Record(e)
    }
}

impl From<StoreError> for LoadError {
    fn from(e: StoreError) -> Self {
        LoadError::Store(e)
    }
}

/// Most bytes of one level in a sounding record (postcard, every field present:
/// pressure 8, three optional values 9 each, an optional wind 17, the kind 1).
pub const MAX_LEVEL_BYTES: usize = 53;
/// Most bytes of the record's head: tag and version 2, the station (identifier 9,
/// three optional values 9 each, an optional time 4) and the level count 5.
const MAX_HEAD_BYTES: usize = 2 + 9 + 3 * 9 + 4 + 5;
/// The window a stored sounding is read through: a few levels at a time.
pub const READ_WINDOW: usize = 512;

/// Where a sounding record's values come from, one at a time.
trait Values {
    /// The unread bytes, at least `want` of them unless the record ends first.
    fn peek(&mut self, want: usize) -> core::result::Result<&[u8], LoadError>;
    /// Mark `n` bytes read.
    fn consume(&mut self, n: usize);
    /// Decode the next value, which takes at most `max` bytes.
    fn take<T: serde::de::DeserializeOwned>(
        &mut self,
        max: usize,
    ) -> core::result::Result<T, LoadError> {
        let bytes = self.peek(max)?;
        let (v, rest) =
            postcard::take_from_bytes::<T>(bytes).map_err(|_| RecordError::Malformed)?;
        let used = bytes.len() - rest.len();
        self.consume(used);
        Ok(v)
    }
}

impl Values for &[u8] {
    fn peek(&mut self, _want: usize) -> core::result::Result<&[u8], LoadError> {
        Ok(self)
    }
    fn consume(&mut self, n: usize) {
        *self = self.get(n..).unwrap_or(&[]);
    }
}

/// A dataset in a store, read through a [`DataReader`].
struct Stored<'a, 'w, S> {
    store: &'a mut S,
    name: &'a str,
    reader: DataReader<'w>,
}

impl<S: Storage> Values for Stored<'_, '_, S> {
    fn peek(&mut self, want: usize) -> core::result::Result<&[u8], LoadError> {
        Ok(self.reader.peek(self.store, self.name, want)?)
    }
    fn consume(&mut self, n: usize) {
        self.reader.consume(n)
    }
}

/// Read a sounding record from `src` into `out`, level by level, each checked as when
/// typed in (`Profile::push`), with no second copy of the profile on the stack. Bytes
/// after the record (a later firmware's additions) are left alone. On an error `out`
/// holds no levels.
fn load_from<const N: usize>(
    src: &mut impl Values,
    out: &mut Profile<N>,
) -> core::result::Result<(), LoadError> {
    out.reset(StationInfo::default());
    let head = src.peek(MAX_HEAD_BYTES)?;
    let body = crate::records::open_profile(head)?;
    let prefix = head.len() - body.len();
    src.consume(prefix);
    let station = src.take::<StationInfo>(MAX_HEAD_BYTES)?;
    let count = src.take::<u32>(5)?;
    if count as usize > N {
        return Err(LoadError::TooManyLevels {
            levels: count,
            capacity: N.min(u16::MAX as usize) as u16,
        });
    }
    out.reset(station);
    for _ in 0..count {
        let next = src
            .take::<Level>(MAX_LEVEL_BYTES)
            .and_then(|level| out.push(level).map_err(|_| RecordError::Invalid.into()));
        if let Err(e) = next {
            out.reset(StationInfo::default());
            return Err(e);
        }
    }
    Ok(())
}

/// Read the sounding record at the start of `bytes` (a stored Sounding dataset) into
/// `out`: see [`load_stored`], which reads it from the store.
pub fn load_profile<const N: usize>(
    mut bytes: &[u8],
    out: &mut Profile<N>,
) -> core::result::Result<(), LoadError> {
    load_from(&mut bytes, out)
}

/// Read stored Sounding dataset `name` into `out` through a [`READ_WINDOW`]-byte window,
/// so that the record is never whole in RAM: level by level, each checked as when typed
/// in, then the rest of the dataset (a pushed report's text) read past and the CRC-32 of
/// the whole checked. On an error `out` holds no levels.
#[inline(never)]
pub fn load_stored<S: Storage, const N: usize>(
    store: &mut S,
    name: &str,
    out: &mut Profile<N>,
) -> core::result::Result<(), LoadError> {
    out.reset(StationInfo::default());
    let mut window = [0u8; READ_WINDOW];
    let reader = DataReader::open(store, name, &mut window)?;
    if reader.head().kind != DataKind::Sounding {
        return Err(LoadError::Store(StoreError::NotFound));
    }
    let mut src = Stored {
        store,
        name,
        reader,
    };
    load_from(&mut src, out)?;
    let Stored { store, reader, .. } = src;
    if let Err(e) = reader.finish(store, name) {
        out.reset(StationInfo::default());
        return Err(e.into());
    }
    Ok(())
}

/// Summarise stored sounding `name` against the demo ridge into `out` (left as it was
/// on an error).
#[inline(never)]
pub fn stored_view_into<S: Storage>(
    store: &mut S,
    name: &str,
    out: &mut SoundingView,
) -> core::result::Result<(), StoredError> {
    let mut profile = DeviceProfile::empty(StationInfo::default());
    load_stored(store, name, &mut profile).map_err(StoredError::Load)?;
    view_in_place(&profile, out).map_err(StoredError::Core)
}

/// Why a stored sounding gave no summary.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StoredError {
    /// It could not be read.
    Load(LoadError),
    /// The core could not summarise it.
    Core(Error),
}

/// The profile plot's box, below two lines of scales.
pub const PROFILE_BOX: Rectangle = Rectangle::new(
    Point::new(MARGIN, BODY_TOP + 2 * LINE_H + 2),
    Size::new(BODY_W, 6 * LINE_H as u32 - 4),
);

/// Plot ranges: (height bottom, top) in m and (temperature low, high) in °C. The height
/// runs from the lowest level to 3 km above the tropopause (or the lid), within the
/// profile; temperatures are rounded out to 10 °C.
fn profile_ranges(v: &SoundingView) -> ((f64, f64), (f64, f64)) {
    let lv = &v.plot.levels;
    let bottom = lv.first().map_or(0.0, |l| l.height_m as f64);
    let highest = lv.last().map_or(bottom + 1.0, |l| l.height_m as f64);
    let mark = v
        .tropopauses
        .first
        .map(|t| t.height_m)
        .or(v.lid.as_ref().ok().map(|l| l.height_m));
    let top = mark.map_or(highest, |m| (m + 3000.0).min(highest));
    let top = if top > bottom + 500.0 {
        top
    } else {
        bottom + 500.0
    };
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for l in lv.iter().filter(|l| (l.height_m as f64) <= top) {
        for t in [Some(l.temperature_c), l.dewpoint_c].into_iter().flatten() {
            lo = lo.min(t as f64);
            hi = hi.max(t as f64);
        }
    }
    if !(lo.is_finite() && hi.is_finite()) {
        (lo, hi) = (-60.0, 20.0);
    }
    // At least 2 °C of room either side, so the curves stay clear of the frame.
    let lo = libm::floor((lo - 2.0) / 10.0) * 10.0;
    let hi = libm::ceil((hi + 2.0) / 10.0) * 10.0;
    let hi = if hi > lo { hi } else { lo + 10.0 };
    ((bottom, top), (lo, hi))
}

/// The profile plot alone, inside `area`: temperature thick, dew point thin,
/// the tropopause and the lid as dashed lines with their names, and the stable
/// layers as bars at the right edge. Nothing is inked outside `area`.
pub fn plot_profile<D, I>(
    p: &mut Painter<'_, D, I>,
    v: &SoundingView,
    area: Rectangle,
) -> core::result::Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    p.frame(area, 1)?;
    let inner = inside(area);
    let ((z0, z1), (t0, t1)) = profile_ranges(v);
    let left = inner.top_left.x + 2;
    let right = inner.top_left.x + inner.size.width as i32 - 3;
    let z = Axis {
        lo: z0,
        hi: z1,
        p0: inner.top_left.y + inner.size.height as i32 - 2,
        p1: inner.top_left.y + 1,
    };
    // Room at the right for the stable-layer bars, at the left for the marks.
    let t = Axis {
        lo: t0,
        hi: t1,
        p0: left + 12,
        p1: right - 8,
    };
    // 0 °C, dotted, where it is in range.
    if t0 < 0.0 && t1 > 0.0 {
        let x0 = t.at(0.0);
        let mut y = inner.top_left.y;
        while y < z.p0 {
            p.line_in(inner, Point::new(x0, y), Point::new(x0, y), 1)?;
            y += 4;
        }
    }
    // The tropopause and the lid, each a dashed line with its word above it;
    // one word for both when the lid is the tropopause.
    let trop = v.tropopauses.first.map(|t| t.height_m);
    let lid = v.lid.as_ref().ok().map(|l| l.height_m);
    let same = matches!((trop, lid), (Some(a), Some(b)) if (a - b).abs() < 1.0);
    // The words sit at the right, on the warm side, clear of the cold upper curves.
    let marks = [
        (trop, if same { "trop = lid" } else { "trop" }, 12),
        (if same { None } else { lid }, "lid", 60),
    ];
    for (h, word, from_right) in marks {
        if let Some(h) = h.filter(|h| (z0..=z1).contains(h)) {
            let y = z.at(h);
            dashed_row(p, inner, y)?;
            let size = Font::Small.measure(word);
            let x = right - from_right - size.width as i32;
            let r = Rectangle::new(Point::new(x, y - 14), size);
            if inner.contains(r.top_left) {
                p.text(r, word, Font::Small, Align::Left, false)?;
            }
        }
    }
    for &(b, top) in &v.plot.stable_m {
        let (yb, yt) = (z.at(b as f64), z.at(top as f64));
        p.line_in(
            inner,
            Point::new(right - 2, yb),
            Point::new(right - 2, yt),
            4,
        )?;
    }
    let lv = &v.plot.levels;
    let dew = lv.iter().filter_map(|l| {
        l.dewpoint_c
            .map(|d| Point::new(t.at(d as f64), z.at(l.height_m as f64)))
    });
    polyline(p, inner, dew, 1, false)?;
    let temp = lv
        .iter()
        .map(|l| Point::new(t.at(l.temperature_c as f64), z.at(l.height_m as f64)));
    polyline(p, inner, temp, 3, false)
}

/// The profile page: the scales in two lines, then the plot.
pub fn draw_profile<D, I>(
    p: &mut Painter<'_, D, I>,
    v: &SoundingView,
    s: &Settings,
) -> core::result::Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let hu = s.height;
    let ((z0, z1), (t0, t1)) = profile_ranges(v);
    let rows = [
        line(format_args!(
            "{:.0} to {:.0} {}; {t0:.0} to {t1:.0} °C",
            hu.from_m(z0),
            hu.from_m(z1),
            hu.symbol()
        )),
        line(format_args!("thick temp, thin dew pt, bar stable")),
    ];
    scale_rows(p, &[&rows[0], &rows[1]])?;
    plot_profile(p, v, PROFILE_BOX)
}

#[cfg(test)]
mod tests {
    use super::*;
    use leeward_core::sounding::summary::summarise;

    /// A 256-level ascent: 6.5 K/km (the standard atmosphere's lapse rate, US Standard
    /// Atmosphere 1976) below 11 km, isothermal above, pressure with an 8 km scale height.
    fn long_profile() -> Profile {
        let mut p = Profile::new(StationInfo::default());
        for i in 0..256 {
            let z = i as f64 * 60.0;
            let t = 288.15 - 0.0065 * z.min(11_000.0);
            let _ = p.push(Level {
                height_m: Some(z),
                temperature_k: Some(t),
                dewpoint_k: (i % 3 != 0).then_some(t - 5.0),
                ..Level::at_pressure(101_325.0 * libm::exp(-z / 8000.0))
            });
        }
        p
    }

    #[test]
    fn a_long_profile_is_thinned_evenly_keeping_both_ends() {
        let p = long_profile();
        assert_eq!(p.len(), 256);
        let s = summarise(&p, &SummaryOptions::default()).unwrap();
        let plot = PlotProfile::of(&p, &s);
        let lv = &plot.levels;
        assert_eq!(lv.len(), PLOT_LEVELS);
        assert_eq!(lv[0].height_m, 0.0);
        assert_eq!(lv.last().unwrap().height_m, 255.0 * 60.0);
        for w in lv.windows(2) {
            assert!(w[1].height_m > w[0].height_m);
            // Evenly: 255 steps over 63 gaps, so 4 or 5 levels (240 or 300 m) apart.
            let d = w[1].height_m - w[0].height_m;
            assert!(d == 240.0 || d == 300.0, "{d}");
        }
        // Every kept level is a level of the profile, with its temperature and dew point.
        for l in lv.iter() {
            let i = (l.height_m / 60.0).round() as usize;
            let src = &p.levels()[i];
            let t = src.temperature_k.unwrap() - 273.15;
            assert!((l.temperature_c as f64 - t).abs() < 1e-4);
            assert_eq!(l.dewpoint_c.is_some(), src.dewpoint_k.is_some());
        }
    }

    #[test]
    fn the_view_built_in_place_equals_the_core_summary_of_the_full_profile() {
        // Differential: the device's 128-level profile and in-place summary against the
        // core's own path (256 levels, values moved).
        let p = demo::sounding().unwrap();
        let s = summarise(&p, &demo_options()).unwrap();
        assert_eq!(demo_view().unwrap(), SoundingView::of(&p, &s));
    }

    #[test]
    fn a_stored_sounding_is_read_in_place_whole_or_not_at_all() {
        use crate::records::Record;
        let p = demo::sounding().unwrap();
        let mut buf = [0u8; 4096];
        let n = p.encode(&mut buf).unwrap();
        let mut out = DeviceProfile::empty(StationInfo::default());
        load_profile(&buf[..n], &mut out).unwrap();
        assert_eq!(out.station, p.station);
        assert_eq!(out.levels(), p.levels());
        // A TEMP push keeps its text after the record: the device reads past it.
        let src = crate::records::SourceText {
            format: crate::records::SourceFormat::Temp,
            text: "TTAA 64121 08888 99799 09060 26233 =",
        };
        let mut with_text = [0u8; 4096];
        let m = crate::records::encode_sounding(&p, Some(&src), &mut with_text).unwrap();
        assert!(m > n);
        load_profile(&with_text[..m], &mut out).unwrap();
        assert_eq!(out.levels(), p.levels());
        // Bytes after the record (what a later firmware may add) are left alone.
        buf[n..n + 5].copy_from_slice(&[7, 1, 2, 3, 4]);
        load_profile(&buf[..n + 5], &mut out).unwrap();
        assert_eq!(out.levels(), p.levels());
        // Cut short anywhere: an error, and no levels left behind.
        for cut in [0, 1, 2, 10, n / 2, n - 1] {
            assert!(load_profile(&buf[..cut], &mut out).is_err(), "cut at {cut}");
            assert!(out.is_empty(), "cut at {cut}");
        }
        // Another kind of record is refused by its tag.
        let mut wrong = buf;
        wrong[0] ^= 0x7F;
        assert!(matches!(
            load_profile(&wrong[..n], &mut out),
            Err(LoadError::Record(RecordError::WrongType { .. }))
        ));
        // The summary of the stored record is the demo's.
        let mut store = crate::storage::MemStorage::new();
        store.put(DataKind::Sounding, "DEMO", &buf[..n]).unwrap();
        let mut v = SoundingView::blank();
        stored_view_into(&mut store, "DEMO", &mut v).unwrap();
        assert_eq!(v, demo_view().unwrap());
    }

    #[test]
    fn a_stored_sounding_is_read_through_the_window_and_its_crc_checked() {
        use crate::flash::{sim::SimFlash, FlashStore};
        use crate::records::Record;
        use crate::storage::MemStorage;
        let p = demo::sounding().unwrap();
        let mut buf = [0u8; 8192];
        // With a TEMP text after the record, so that the dataset spans several flash
        // chunks and windows.
        let mut text = heapless::String::<4096>::new();
        for _ in 0..60 {
            text.push_str("TTAA 64121 08888 99799 09060 26233 = ")
                .unwrap();
        }
        let src = crate::records::SourceText {
            format: crate::records::SourceFormat::Temp,
            text: &text,
        };
        let n = crate::records::encode_sounding(&p, Some(&src), &mut buf).unwrap();
        assert!(n > 2 * crate::flash::CHUNK_BYTES, "{n}");
        const PAGE: usize = 16 * 1024;
        let flash: SimFlash<[u8; 4 * PAGE], 4, PAGE> = SimFlash::new([0xFF; 4 * PAGE], 1);
        let page = PAGE as u32;
        let mut fs = FlashStore::open(flash, 0..3 * page, 3 * page..4 * page).unwrap();
        fs.put(DataKind::Sounding, "LONG", &buf[..n]).unwrap();
        let mut out = DeviceProfile::empty(StationInfo::default());
        load_stored(&mut fs, "LONG", &mut out).unwrap();
        assert_eq!(out.station, p.station);
        assert_eq!(out.levels(), p.levels());
        // One byte of the text damaged in flash after boot: the levels still decode, but
        // the dataset does not read whole, and nothing is kept.
        let at = fs
            .flash()
            .bytes()
            .windows(10)
            .rposition(|w| w == b"TTAA 64121")
            .unwrap();
        fs._flash_mut().bytes_mut()[at + 3] ^= 0x04;
        assert_eq!(
            load_stored(&mut fs, "LONG", &mut out),
            Err(LoadError::Store(StoreError::Damaged))
        );
        assert!(out.is_empty());
        let short = p.encode(&mut buf).unwrap();
        let mut mem = MemStorage::new();
        // Not a sounding; no such dataset.
        mem.put(DataKind::Ridge, "R", &buf[..short]).unwrap();
        assert_eq!(
            load_stored(&mut mem, "R", &mut out),
            Err(LoadError::Store(StoreError::NotFound))
        );
        assert_eq!(
            load_stored(&mut mem, "NONE", &mut out),
            Err(LoadError::Store(StoreError::NotFound))
        );
    }

    #[test]
    fn the_largest_values_fit_the_bounds_the_reader_refills_by() {
        use leeward_core::sounding::{LevelKind, ObsTime, Wind};
        let level = Level {
            pressure_pa: -1.0e300,
            height_m: Some(1.0e300),
            temperature_k: Some(1.0e300),
            dewpoint_k: Some(1.0e300),
            wind: Some(Wind {
                dir_from_deg: 359.0,
                speed_ms: 1.0e300,
            }),
            kind: LevelKind(u8::MAX),
        };
        let mut buf = [0u8; 128];
        assert_eq!(
            postcard::to_slice(&level, &mut buf).unwrap().len(),
            MAX_LEVEL_BYTES
        );
        let station = StationInfo {
            id: "ABCDEFGH".try_into().unwrap(),
            lat_deg: Some(-90.0),
            lon_deg: Some(180.0),
            elevation_m: Some(8848.0),
            time: Some(ObsTime {
                day: 31,
                hour: 23,
                minute: 59,
            }),
        };
        let head = 2 + postcard::to_slice(&station, &mut buf).unwrap().len() + 5;
        assert!(head <= MAX_HEAD_BYTES, "{head}");
    }

    #[test]
    fn the_demo_ascent_is_plotted_whole() {
        let p = demo::sounding().unwrap();
        let s = summarise(&p, &demo_options()).unwrap();
        let v = SoundingView::of(&p, &s);
        let usable = p
            .levels()
            .iter()
            .filter(|l| l.temperature_k.is_some())
            .count();
        assert_eq!(v.plot.levels.len(), usable);
        // The stable layer capped near 3.5 km that the demo was made with.
        assert!(
            v.plot
                .stable_m
                .iter()
                .any(|&(_, top)| (top as f64 - 3500.0).abs() < 100.0),
            "{:?}",
            v.plot.stable_m
        );
    }

    #[test]
    fn the_profile_plot_inks_nothing_outside_its_box() {
        use crate::plot::testing::Ink;
        let demo_p = demo::sounding().unwrap();
        let long = long_profile();
        let views = [
            SoundingView::of(&demo_p, &summarise(&demo_p, &demo_options()).unwrap()),
            SoundingView::of(
                &long,
                &summarise(&long, &SummaryOptions::default()).unwrap(),
            ),
        ];
        let small = Rectangle::new(Point::new(30, 40), Size::new(60, 30));
        for v in &views {
            for area in [PROFILE_BOX, small] {
                let mut d = Ink::new(area);
                let mut no = ();
                let mut p = Painter::new(&mut d, &mut no);
                plot_profile(&mut p, v, area).unwrap();
                assert_eq!(d.outside, 0, "ink outside {area:?}");
                assert!(d.inside > 100, "little drawn in {area:?}");
            }
        }
        // An empty profile draws its frame and nothing else, without a panic.
        let mut empty = views[0].clone();
        empty.plot = PlotProfile::default();
        empty.tropopauses.first = None;
        empty.lid = Err(leeward_core::Error::NoTropopause);
        let mut d = Ink::new(PROFILE_BOX);
        let mut no = ();
        plot_profile(&mut Painter::new(&mut d, &mut no), &empty, PROFILE_BOX).unwrap();
        assert_eq!(d.outside, 0);
    }
}
