//! The Ridge crossing task: its input form, the two tracks the core computes (over the
//! ridge and over flat ground), kept thinned out in fixed buffers for the plots, and the
//! two plots: the tracks in plan view with the ridge axis, and a cross-section of
//! terrain, lid and ζ along the track.
//!
//! All figures come from `leeward_core::crossing` (its f32 track on the device, f64 on a
//! host: see `compute`); this module only keeps points and
//! maps them to pixels (plain longitude and latitude, no projection physics).

use crate::field::{FieldSpec, Kind};
use crate::plot::{dashed_row, inside, polyline, scale_rows, Axis};
use crate::settings::Settings;
use crate::text::line;
use crate::ui::{Inspect, Painter, BODY_TOP, BODY_W, LINE_H, MARGIN};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;
use leeward_core::crossing::{
    self, Crossing, CrossingInput, Profile, Ridge, TrackPoint, TrackSink,
};
use leeward_core::geo::{destination, LatLon};
use leeward_core::Result;

/// Points a kept track holds. When the buffer fills, every other point is dropped and the
/// spacing doubles, so a track of any length fits: at least half the buffer is in use.
pub const TRACK_POINTS: usize = 128;
/// Spacing of kept points along the track at the start, m.
pub const FIRST_SPACING_M: f64 = 25_000.0;
/// A point is also kept where the terrain has changed this much since the last kept one,
/// m, so the cross-section shows the ridge however far apart the other points are.
pub const TERRAIN_STEP_M: f64 = 250.0;

/// The form: wind, lid and N, then the ridge.
pub const CROSSING_FIELDS: [FieldSpec; 10] = [
    FieldSpec {
        label: "Wind speed",
        kind: Kind::Speed,
        min: 0.5,
        max: 150.0,
    },
    FieldSpec {
        label: "Wind from",
        kind: Kind::Bearing,
        min: 0.0,
        max: 360.0,
    },
    FieldSpec {
        label: "Lid height",
        kind: Kind::Height,
        min: 500.0,
        max: 30_000.0,
    },
    FieldSpec {
        label: "N below crest",
        kind: Kind::Frequency,
        min: 1e-4,
        max: 0.1,
    },
    FieldSpec {
        label: "Crest height",
        kind: Kind::Height,
        min: -500.0,
        max: 9000.0,
    },
    FieldSpec {
        label: "Plain height",
        kind: Kind::Height,
        min: -500.0,
        max: 9000.0,
    },
    FieldSpec {
        label: "Half-width",
        kind: Kind::Height,
        min: 1_000.0,
        max: 2_000_000.0,
    },
    FieldSpec {
        label: "Ridge axis",
        kind: Kind::Bearing,
        min: 0.0,
        max: 360.0,
    },
    FieldSpec {
        label: "Axis point lat",
        kind: Kind::Latitude,
        min: -90.0,
        max: 90.0,
    },
    FieldSpec {
        label: "Axis point lon",
        kind: Kind::Longitude,
        min: -180.0,
        max: 180.0,
    },
];

/// The core's input for the form's SI values (in the order of [`CROSSING_FIELDS`]).
pub fn input(v: &[f64; 10]) -> CrossingInput {
    let ridge = Ridge {
        profile: Profile::Bell {
            crest_m: v[4],
            base_m: v[5],
            half_width_m: v[6],
        },
        axis_deg: v[7],
        anchor: LatLon {
            lat_deg: v[8],
            lon_deg: v[9],
        },
    };
    let mut c = CrossingInput::new(ridge, v[0], v[1], v[2]);
    c.brunt_vaisala = Some(v[3]);
    c
}

/// One kept point of a track, in single precision (enough for pixels).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Kept {
    /// Path length from the start, km.
    pub s_km: f32,
    /// Longitude, degrees, continued past ±180 so the track has no jump.
    pub lon_deg: f32,
    /// Latitude, degrees.
    pub lat_deg: f32,
    /// Terrain under the column, m.
    pub terrain_m: f32,
    /// Relative vorticity, s⁻¹.
    pub zeta: f32,
}

/// A [`TrackSink`] that keeps a thinned-out track in a fixed buffer (no heap).
#[derive(Debug, Clone, PartialEq)]
pub struct Track {
    /// The kept points, in order along the track.
    pub points: heapless::Vec<Kept, TRACK_POINTS>,
    spacing_m: f64,
    next_s_m: f64,
    last_lon: f64,
    last_s_m: f64,
    last_terrain_m: f64,
}

impl Default for Track {
    fn default() -> Self {
        Track {
            points: heapless::Vec::new(),
            spacing_m: FIRST_SPACING_M,
            next_s_m: 0.0,
            last_lon: 0.0,
            last_s_m: -1.0,
            last_terrain_m: 0.0,
        }
    }
}

impl Track {
    /// Spacing of the kept points now, m.
    pub fn spacing_m(&self) -> f64 {
        self.spacing_m
    }

    fn keep(&mut self, p: &TrackPoint) {
        let mut lon = p.pos.lon_deg;
        if !self.points.is_empty() {
            // Continue the longitude across the date line.
            while lon - self.last_lon > 180.0 {
                lon -= 360.0;
            }
            while lon - self.last_lon < -180.0 {
                lon += 360.0;
            }
        }
        let k = Kept {
            s_km: (p.s_m / 1000.0) as f32,
            lon_deg: lon as f32,
            lat_deg: p.pos.lat_deg as f32,
            terrain_m: p.terrain_m as f32,
            zeta: p.zeta as f32,
        };
        if self.points.is_full() {
            // Keep points 0, 2, 4…: half the buffer, twice the spacing.
            let n = self.points.len();
            for i in 0..n.div_ceil(2) {
                self.points[i] = self.points[2 * i];
            }
            self.points.truncate(n.div_ceil(2));
            self.spacing_m *= 2.0;
        }
        let _ = self.points.push(k);
        self.last_lon = lon;
        self.last_s_m = p.s_m;
        self.last_terrain_m = p.terrain_m;
    }

    /// Make sure the last point of the track is kept.
    pub fn finish(&mut self, end: &TrackPoint) {
        if end.s_m > self.last_s_m {
            self.keep(end);
        }
    }
}

impl TrackSink for Track {
    fn point(&mut self, p: &TrackPoint) {
        let climb = (p.terrain_m - self.last_terrain_m).abs() >= TERRAIN_STEP_M;
        if p.s_m >= self.next_s_m || self.points.is_empty() || climb {
            self.keep(p);
            self.next_s_m = p.s_m + self.spacing_m;
        }
    }
}

/// What the result pages show: the core's two answers and the kept tracks.
#[derive(Debug, Clone, PartialEq)]
pub struct CrossingView {
    /// The inputs as computed.
    pub input: CrossingInput,
    /// Over the ridge.
    pub ridge: Crossing,
    /// Over flat ground at the plain's height.
    pub flat: Crossing,
    /// The track over the ridge.
    pub track: Track,
    /// The track over flat ground.
    pub flat_track: Track,
}

/// The core's track as the device runs it, on the device and in the simulator alike: the
/// f32 track (`crossing::run_f32`). The handheld's FPU does single precision in hardware
/// and f64 in software, where the track takes about 18 times more instructions
/// (docs/performance.md, "f32 against f64"); its figures agree with the f64 reference
/// (`crossing::run`, the command line's) to within a step of the integration
/// (tests/tests/crossing_f32.rs). The simulator shows what the device would.
use crossing::run_f32 as run_track;

/// Run both crossings (see `run_track` for the precision).
pub fn compute(input: CrossingInput) -> Result<CrossingView> {
    let mut track = Track::default();
    let ridge = run_track(&input, &mut track)?;
    track.finish(&ridge.end);
    let mut flat_track = Track::default();
    let flat = run_track(&input.without_ridge(), &mut flat_track)?;
    flat_track.finish(&flat.end);
    Ok(CrossingView {
        input,
        ridge,
        flat,
        track,
        flat_track,
    })
}

/// The plan-view plot's box.
pub const PLAN_BOX: Rectangle = Rectangle::new(
    Point::new(MARGIN, BODY_TOP + 2 * LINE_H + 2),
    Size::new(BODY_W, 6 * LINE_H as u32 - 4),
);
/// The cross-section plot's box.
pub const SECTION_BOX: Rectangle = Rectangle::new(
    Point::new(MARGIN, BODY_TOP + 3 * LINE_H + 2),
    Size::new(BODY_W, 5 * LINE_H as u32 - 4),
);

/// Ranges of longitude and latitude covering both tracks, padded; latitude at least 1°.
fn plan_ranges(v: &CrossingView) -> ((f64, f64), (f64, f64)) {
    let mut lon = (f64::INFINITY, f64::NEG_INFINITY);
    let mut lat = (f64::INFINITY, f64::NEG_INFINITY);
    // The ridge track sets the extent; the no-ridge track (often longer: it has no
    // trough to stop at) is cut at the box.
    for k in &v.track.points {
        lon = (lon.0.min(k.lon_deg as f64), lon.1.max(k.lon_deg as f64));
        lat = (lat.0.min(k.lat_deg as f64), lat.1.max(k.lat_deg as f64));
    }
    for k in &v.flat_track.points {
        if (lon.0..=lon.1).contains(&(k.lon_deg as f64)) {
            lat = (lat.0.min(k.lat_deg as f64), lat.1.max(k.lat_deg as f64));
        }
    }
    if !lon.0.is_finite() {
        let a = v.input.ridge.anchor;
        lon = (a.lon_deg - 1.0, a.lon_deg + 1.0);
        lat = (a.lat_deg - 1.0, a.lat_deg + 1.0);
    }
    let span = (lat.1 - lat.0).max(1.0);
    let mid = (lat.0 + lat.1) / 2.0;
    let lat = (mid - span * 0.55, mid + span * 0.55);
    let pad = ((lon.1 - lon.0) * 0.03).max(0.5);
    ((lon.0 - pad, lon.1 + pad), lat)
}

fn lon_words(lon: f64) -> crate::text::Line {
    let mut l = lon;
    while l > 180.0 {
        l -= 360.0;
    }
    while l < -180.0 {
        l += 360.0;
    }
    let h = if l < 0.0 { 'W' } else { 'E' };
    line(format_args!("{:.1}°{h}", l.abs()))
}

fn lat_words(lat: f64) -> crate::text::Line {
    let h = if lat < 0.0 { 'S' } else { 'N' };
    line(format_args!("{:.1}°{h}", lat.abs()))
}

/// The plan-view plot alone, inside `area`: the no-ridge track thin and dashed, the
/// ridge track thick, the ridge axis dotted. Nothing is inked outside `area`.
pub fn plot_plan<D, I>(
    p: &mut Painter<'_, D, I>,
    v: &CrossingView,
    area: Rectangle,
) -> core::result::Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    p.frame(area, 1)?;
    let inner = inside(area);
    let ((lo0, lo1), (la0, la1)) = plan_ranges(v);
    let x = Axis {
        lo: lo0,
        hi: lo1,
        p0: inner.top_left.x + 2,
        p1: inner.top_left.x + inner.size.width as i32 - 3,
    };
    let y = Axis {
        lo: la0,
        hi: la1,
        p0: inner.top_left.y + inner.size.height as i32 - 3,
        p1: inner.top_left.y + 2,
    };
    let at = |lon: f64, lat: f64| Point::new(x.at(lon), y.at(lat));
    // The ridge axis: points along its great circle either side of the anchor.
    let a = v.input.ridge.anchor;
    let axis = v.input.ridge.axis_deg;
    let mut prev: Option<Point> = None;
    for i in -12i32..=12 {
        let q = destination(a, axis, i as f64 * 250_000.0);
        let mut lon = q.lon_deg;
        while lon - a.lon_deg > 180.0 {
            lon -= 360.0;
        }
        while lon - a.lon_deg < -180.0 {
            lon += 360.0;
        }
        let pt = at(lon, q.lat_deg);
        if let Some(b) = prev {
            // Dots: a short stroke every 6 px along the segment.
            let (dx, dy) = (pt.x - b.x, pt.y - b.y);
            let n = ((dx.abs().max(dy.abs())) / 6).clamp(1, 200);
            for k in 0..n {
                let c = Point::new(b.x + dx * k / n, b.y + dy * k / n);
                p.line_in(inner, c, c + Point::new(0, 1), 2)?;
            }
        }
        prev = Some(pt);
    }
    let flat = v
        .flat_track
        .points
        .iter()
        .map(|k| at(k.lon_deg as f64, k.lat_deg as f64));
    polyline(p, inner, flat, 1, true)?;
    let over = v
        .track
        .points
        .iter()
        .map(|k| at(k.lon_deg as f64, k.lat_deg as f64));
    polyline(p, inner, over, 3, false)
}

/// The plan view with its scales: longitude and latitude of the box edges and what each
/// line is.
pub fn draw_plan<D, I>(
    p: &mut Painter<'_, D, I>,
    v: &CrossingView,
) -> core::result::Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let ((lo0, lo1), (la0, la1)) = plan_ranges(v);
    let t0 = line(format_args!(
        "{} to {}, {} to {}",
        lon_words(lo0),
        lon_words(lo1),
        lat_words(la0),
        lat_words(la1)
    ));
    scale_rows(p, &[&t0, "thick ridge, dashed none, dots axis"])?;
    plot_plan(p, v, PLAN_BOX)
}

/// The scales of the cross-section: height at the top of the box, ζ at the top (the
/// bottom is the same magnitude, anticyclonic side in the northern sense of the sign).
fn section_scales(v: &CrossingView) -> (f64, f64, f64) {
    let top_m = v.input.lid_m * 1.1;
    let z = v
        .track
        .points
        .iter()
        .map(|k| (k.zeta as f64).abs())
        .fold(1e-6, f64::max)
        // The core's extremes, which thinning out may have dropped.
        .max(v.ridge.most_anticyclonic_zeta.abs())
        .max(v.ridge.trough.map_or(0.0, |t| t.point.zeta.abs()));
    let len_km = v
        .track
        .points
        .last()
        .map_or(1.0, |k| k.s_km as f64)
        .max(1.0);
    (top_m, z * 1.1, len_km)
}

/// The cross-section alone, inside `area`: terrain filled from the bottom, the lid as a
/// line, ζ thick about a dashed zero line. Nothing is inked outside `area`.
pub fn plot_section<D, I>(
    p: &mut Painter<'_, D, I>,
    v: &CrossingView,
    area: Rectangle,
) -> core::result::Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    p.frame(area, 1)?;
    let inner = inside(area);
    let (top_m, zmax, len_km) = section_scales(v);
    let left = inner.top_left.x + 1;
    let right = inner.top_left.x + inner.size.width as i32 - 2;
    let bottom = inner.top_left.y + inner.size.height as i32 - 1;
    let upper = inner.top_left.y + 1;
    let x = Axis {
        lo: 0.0,
        hi: len_km,
        p0: left,
        p1: right,
    };
    let h = Axis {
        lo: 0.0,
        hi: top_m,
        p0: bottom,
        p1: upper,
    };
    let z = Axis {
        lo: -zmax,
        hi: zmax,
        p0: bottom,
        p1: upper,
    };
    // Terrain: a vertical stroke per pixel column, height linear between kept points.
    let pts = &v.track.points;
    for w in pts.windows(2) {
        let (a, b) = (w[0], w[1]);
        let (xa, xb) = (x.at(a.s_km as f64), x.at(b.s_km as f64));
        for col in xa..=xb.max(xa) {
            let t = if xb > xa {
                (col - xa) as f64 / (xb - xa) as f64
            } else {
                0.0
            };
            let m = a.terrain_m as f64 + t * (b.terrain_m as f64 - a.terrain_m as f64);
            let ytop = h.at(m.max(0.0));
            if ytop < bottom {
                p.line_in(inner, Point::new(col, bottom), Point::new(col, ytop), 1)?;
            }
        }
    }
    // The lid.
    let yl = h.at(v.input.lid_m);
    p.line_in(inner, Point::new(left, yl), Point::new(right, yl), 1)?;
    // ζ = 0, dashed.
    dashed_row(p, inner, z.at(0.0))?;
    let zeta = pts
        .iter()
        .map(|k| Point::new(x.at(k.s_km as f64), z.at(k.zeta as f64)));
    polyline(p, inner, zeta, 3, false)
}

/// The cross-section with its scales.
pub fn draw_section<D, I>(
    p: &mut Painter<'_, D, I>,
    v: &CrossingView,
    s: &Settings,
) -> core::result::Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let hu = s.height;
    let (top_m, zmax, len_km) = section_scales(v);
    let rows = [
        line(format_args!("0 to {len_km:.0} km along the track")),
        line(format_args!(
            "fill terrain, line lid; top {:.0} {}",
            hu.from_m(top_m),
            hu.symbol()
        )),
        line(format_args!(
            "thick zeta, top/bottom ±{:.2} e-5/s",
            zmax / 1e-5
        )),
    ];
    scale_rows(p, &[&rows[0], &rows[1], &rows[2]])?;
    plot_section(p, v, SECTION_BOX)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::testing::Ink;
    use leeward_core::demo;

    fn view(speed: f64, dir: f64) -> CrossingView {
        compute(demo::crossing(speed, dir)).unwrap()
    }

    #[test]
    fn plots_ink_nothing_outside_their_boxes() {
        for (speed, dir) in [(20.0, 270.0), (40.0, 240.0), (5.0, 300.0), (20.0, 90.0)] {
            let v = view(speed, dir);
            for (area, plan) in [
                (PLAN_BOX, true),
                (SECTION_BOX, false),
                (Rectangle::new(Point::new(30, 40), Size::new(60, 30)), true),
                (Rectangle::new(Point::new(30, 40), Size::new(60, 30)), false),
            ] {
                let mut d = Ink::new(area);
                let mut no = ();
                let mut p = Painter::new(&mut d, &mut no);
                if plan {
                    plot_plan(&mut p, &v, area).unwrap();
                } else {
                    plot_section(&mut p, &v, area).unwrap();
                }
                assert_eq!(d.outside, 0, "{speed} from {dir}: ink outside {area:?}");
                assert!(d.inside > 100, "{speed} from {dir}: little drawn");
            }
        }
    }

    #[test]
    fn a_long_track_fits_the_buffer_and_keeps_its_ends() {
        let v = view(20.0, 270.0);
        let pts = &v.track.points;
        assert!(pts.len() >= TRACK_POINTS / 2, "{}", pts.len());
        assert_eq!(pts[0].s_km, 0.0);
        let end = (v.ridge.end.s_m / 1000.0) as f32;
        assert_eq!(pts.last().unwrap().s_km, end);
        // Far from the ridge, evenly spaced.
        let d = pts[1].s_km - pts[0].s_km;
        assert!((d as f64 - v.track.spacing_m() / 1000.0).abs() < 6.0, "{d}");
        // Over the ridge, enough points to show the crest within a few hundred metres
        // (the core's terrain under the crossing's highest point).
        let top = pts.iter().map(|k| k.terrain_m).fold(0.0, f32::max) as f64;
        let crest = demo::ridge().profile.max_height();
        assert!(top > crest - 2.0 * TERRAIN_STEP_M && top <= crest, "{top}");
    }
}
