//! Ridge crossing: the track of an air column that conserves its barotropic potential
//! vorticity (ζ + f)/H while it crosses a long ridge under a lid, and the lee trough and
//! wave train that follow.
//!
//! Model (docs/methods.md, FIELD-NOTES §4–5):
//! - constant speed V; the column's vorticity is all curvature vorticity (shear neglected),
//!   so the track's curvature relative to a great circle is K = ζ/V;
//! - ζ = qH − f, with f from the track's own latitude and H = lid − terrain under the
//!   column; q is fixed at the start, 1000 km upwind of the ridge axis unless set;
//! - the upstream ζ defaults to that of a uniform wind on the sphere, u tan φ / a, so that a
//!   zonal track with no ridge keeps its latitude;
//! - the ridge is an infinitely long line (a great circle through an anchor point, at any
//!   azimuth) with a bell ("witch of Agnesi") or a tabulated cross profile.
//!
//! The track is integrated with the classical fourth-order Runge–Kutta scheme in 3-D unit
//! vectors (position p and heading t), which needs no trigonometry per stage (one arcsine
//! for the distance from the axis) and has no trouble at any longitude.
//!
//! Two precisions, one method: [`run`] integrates in f64 (the reference: the command
//! line, the reference tests), [`run_f32`] in f32, which the device's FPU does in
//! hardware (the same inputs, checks and results; set-up and results in f64). Their
//! agreement is measured in docs/performance.md ("f32 against f64") and held by the
//! differential tests in tests/tests/crossing_f32.rs.

use crate::constants::{EARTH_RADIUS, OMEGA};
use crate::error::{in_range, Error, Result};
use crate::geo::{wrap_deg, LatLon, Vec3};
use crate::real::Real;
use crate::rotation::{beta, coriolis, Sense, GEOSTROPHIC_MIN_LAT_DEG};
use core::f64::consts::PI;
use libm::{asin, cos, sin, sqrt, tan};

/// Most points of a tabulated ridge cross-profile.
pub const MAX_PROFILE_POINTS: usize = 32;
/// Largest integration step, m (FIELD-NOTES §5: step ≤ 5 km).
pub const MAX_STEP_M: f64 = 5_000.0;
/// Default distance of the start upwind of the ridge axis, m.
pub const DEFAULT_UPWIND_M: f64 = 1_000_000.0;
/// Default longest track, m.
pub const DEFAULT_MAX_LENGTH_M: f64 = 16_000_000.0;
/// Thinnest column under the lid over the crest, m (leeward's choice).
pub const MIN_CLEARANCE_M: f64 = 100.0;
/// Smallest angle between the wind and the ridge axis, degrees.
pub const MIN_CROSSING_ANGLE_DEG: f64 = 10.0;
/// Bulk Froude number below which the low-level flow is taken as blocked (common practice).
pub const FROUDE_BLOCKED: f64 = 1.0;
/// Hysteresis on ζ when finding extremes, s⁻¹: far below any real signal, far above
/// rounding noise, so a flat track shows no spurious troughs.
const EXTREME_HYSTERESIS: f64 = 1e-11;
/// The same for the f32 track ([`run_f32`]), s⁻¹. Its rounding moves the column by
/// decimetres a step, and the track's ζ wanders with it (β times the wander); the
/// largest swing of ζ measured on tracks that should keep ζ constant (no ridge, every
/// latitude and wind of tests/tests/crossing_f32.rs) sets it, with a margin
/// (docs/performance.md, "f32 against f64"). Still a thousand times below the ζ of the
/// lowest ridge worth computing.
pub const EXTREME_HYSTERESIS_F32: f64 = 1e-9;

/// One point of a tabulated cross-profile.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ProfilePoint {
    /// Signed distance from the axis, m, positive to the right of the axis azimuth
    /// (east of a north–south ridge).
    pub distance_m: f64,
    /// Terrain height above sea level, m.
    pub height_m: f64,
}

/// The ridge's cross-section.
// No heap to box the table into: the size difference is the price of a fixed capacity.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Profile {
    /// h(d) = base + (crest − base)/(1 + (d/w)²): the bell-shaped ridge (witch of Agnesi)
    /// usual in mountain-flow studies.
    Bell {
        /// Height of the plain on either side, m above sea level.
        base_m: f64,
        /// Crest height, m above sea level.
        crest_m: f64,
        /// Half-width w: distance from the axis where the ridge stands at half its
        /// height above the base, m.
        half_width_m: f64,
    },
    /// Piecewise-linear profile; outside the table the end heights continue flat.
    Table(heapless::Vec<ProfilePoint, MAX_PROFILE_POINTS>),
    /// No ridge: flat ground at one height (the reference track).
    Flat {
        /// Ground height, m above sea level.
        height_m: f64,
    },
}

impl Profile {
    /// Terrain height at signed distance `d_m` from the axis, m.
    pub fn height(&self, d_m: f64) -> f64 {
        match self {
            Profile::Bell {
                base_m,
                crest_m,
                half_width_m,
            } => {
                let r = d_m / half_width_m;
                base_m + (crest_m - base_m) / (1.0 + r * r)
            }
            Profile::Flat { height_m } => *height_m,
            Profile::Table(pts) => {
                let (Some(first), Some(last)) = (pts.first(), pts.last()) else {
                    return 0.0;
                };
                if d_m <= first.distance_m {
                    return first.height_m;
                }
                if d_m >= last.distance_m {
                    return last.height_m;
                }
                for w in pts.windows(2) {
                    let (a, b) = (w[0], w[1]);
                    if d_m <= b.distance_m {
                        let t = (d_m - a.distance_m) / (b.distance_m - a.distance_m);
                        return a.height_m + t * (b.height_m - a.height_m);
                    }
                }
                last.height_m
            }
        }
    }

    /// Highest terrain of the profile, m.
    pub fn max_height(&self) -> f64 {
        match self {
            Profile::Bell {
                base_m, crest_m, ..
            } => base_m.max(*crest_m),
            Profile::Flat { height_m } => *height_m,
            Profile::Table(pts) => pts
                .iter()
                .map(|p| p.height_m)
                .fold(f64::NEG_INFINITY, f64::max),
        }
    }

    /// Finest terrain detail, m: the step must resolve it.
    fn detail_m(&self) -> f64 {
        match self {
            Profile::Bell { half_width_m, .. } => half_width_m / 8.0,
            Profile::Flat { .. } => MAX_STEP_M,
            Profile::Table(pts) => pts
                .windows(2)
                .map(|w| (w[1].distance_m - w[0].distance_m) / 2.0)
                .fold(MAX_STEP_M, f64::min),
        }
    }

    /// Check every height and distance for physical possibility (the crossing solver
    /// does this too; stored ridge profiles are checked again when read back).
    pub fn validate(&self) -> Result<()> {
        match self {
            Profile::Bell {
                base_m,
                crest_m,
                half_width_m,
            } => {
                in_range("base height", *base_m, -500.0, 9000.0)?;
                in_range("crest height", *crest_m, -500.0, 9000.0)?;
                in_range("half-width", *half_width_m, 1_000.0, 2_000_000.0)?;
            }
            Profile::Flat { height_m } => {
                in_range("ground height", *height_m, -500.0, 9000.0)?;
            }
            Profile::Table(pts) => {
                if pts.len() < 2 {
                    return Err(Error::BadProfile {
                        index: pts.len() as u8,
                    });
                }
                for (i, p) in pts.iter().enumerate() {
                    let ok = p.distance_m.is_finite()
                        && p.height_m.is_finite()
                        && (-500.0..=9000.0).contains(&p.height_m)
                        && p.distance_m.abs() <= 5_000_000.0
                        && (i == 0 || p.distance_m >= pts[i - 1].distance_m + 100.0);
                    if !ok {
                        return Err(Error::BadProfile { index: i as u8 });
                    }
                }
            }
        }
        Ok(())
    }
}

/// A ridge: its cross-section, its axis and where the axis lies.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Ridge {
    /// Cross-section.
    pub profile: Profile,
    /// Azimuth of the axis, degrees clockwise from north (0 = north–south ridge).
    pub axis_deg: f64,
    /// A point on the axis, where the undisturbed flow meets it.
    pub anchor: LatLon,
}

/// Everything a ridge crossing needs.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CrossingInput {
    /// The ridge.
    pub ridge: Ridge,
    /// Wind speed V, m s⁻¹ (constant along the track).
    pub wind_speed_ms: f64,
    /// Upstream wind direction (where it blows from), degrees.
    pub wind_dir_from_deg: f64,
    /// Height of the lid (tropopause or top of a stable layer), m above sea level.
    pub lid_m: f64,
    /// Upstream relative vorticity, s⁻¹; `None` for that of a uniform wind, u tan φ / a.
    pub upstream_zeta: Option<f64>,
    /// Distance of the start upwind of the axis along the wind direction, m.
    pub upwind_m: f64,
    /// Longest track, m.
    pub max_length_m: f64,
    /// Integration step, m (at most 5 km; made finer for narrow terrain).
    pub step_m: f64,
    /// Stop once the second trough is found.
    pub stop_after_second_trough: bool,
    /// Brunt–Väisälä frequency N of the low-level flow, s⁻¹, for the Froude check.
    pub brunt_vaisala: Option<f64>,
}

impl CrossingInput {
    /// Inputs with the defaults: start 1000 km upwind, upstream ζ of a uniform wind,
    /// 5 km steps, stop after the second trough.
    pub fn new(ridge: Ridge, wind_speed_ms: f64, wind_dir_from_deg: f64, lid_m: f64) -> Self {
        CrossingInput {
            ridge,
            wind_speed_ms,
            wind_dir_from_deg,
            lid_m,
            upstream_zeta: None,
            upwind_m: DEFAULT_UPWIND_M,
            max_length_m: DEFAULT_MAX_LENGTH_M,
            step_m: MAX_STEP_M,
            stop_after_second_trough: true,
            brunt_vaisala: None,
        }
    }

    /// The same inputs over flat ground at the upstream height: the reference track.
    pub fn without_ridge(&self) -> Self {
        let mut c = self.clone();
        let ground = match &self.ridge.profile {
            Profile::Bell { base_m, .. } => *base_m,
            Profile::Flat { height_m } => *height_m,
            // Upstream end of the table: the side the wind comes from.
            Profile::Table(_) => {
                let side = upstream_side(self).unwrap_or(-1.0);
                self.ridge.profile.height(side * 1e9)
            }
        };
        c.ridge.profile = Profile::Flat { height_m: ground };
        c
    }
}

/// One point of a track.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct TrackPoint {
    /// Path length from the start, m.
    pub s_m: f64,
    /// Position.
    pub pos: LatLon,
    /// Heading (where the column is going), degrees clockwise from north.
    pub heading_deg: f64,
    /// Signed distance from the ridge axis, m, positive downstream.
    pub axis_distance_m: f64,
    /// Terrain height under the column, m.
    pub terrain_m: f64,
    /// Column depth H, m.
    pub depth_m: f64,
    /// Coriolis parameter, s⁻¹.
    pub f: f64,
    /// Relative vorticity ζ, s⁻¹.
    pub zeta: f64,
}

/// Receives the points of a track as they are computed (every step).
pub trait TrackSink {
    /// One more point.
    fn point(&mut self, p: &TrackPoint);
}

impl<F: FnMut(&TrackPoint)> TrackSink for F {
    fn point(&mut self, p: &TrackPoint) {
        self(p)
    }
}

/// A sink that keeps nothing.
pub struct Discard;

impl TrackSink for Discard {
    fn point(&mut self, _p: &TrackPoint) {}
}

/// Why a track stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum TrackEnd {
    /// The longest track was reached.
    MaxLength,
    /// The second trough was found.
    SecondTrough,
    /// The track reached the equator, where f changes sign and the argument ends.
    ReachedEquator,
    /// The track reached a pole.
    ReachedPole,
}

impl TrackEnd {
    /// Plain statement for the user.
    pub fn statement(self) -> &'static str {
        match self {
            TrackEnd::MaxLength => "track reached its full length",
            TrackEnd::SecondTrough => "track stopped after the second trough",
            TrackEnd::ReachedEquator => "track reached the equator: the column argument ends there",
            TrackEnd::ReachedPole => "track reached a pole: the column argument ends there",
        }
    }
}

/// Why a figure cannot be given.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Unavailable {
    /// Easterly (or purely meridional) flow holds no stationary Rossby wave: the track
    /// curves away.
    EasterlyFlow,
    /// The track ended (equator or pole) before the feature.
    TrackEnded(TrackEnd),
    /// No trough within the track's length.
    NoTrough,
    /// No second trough within the track's length.
    NoSecondTrough,
}

impl Unavailable {
    /// Plain statement for the user.
    pub fn statement(self) -> &'static str {
        match self {
            Unavailable::EasterlyFlow => {
                "easterly or north-south flow: no stationary wave train, the track curves away from its latitude"
            }
            Unavailable::TrackEnded(e) => e.statement(),
            Unavailable::NoTrough => "no lee trough within the track's length",
            Unavailable::NoSecondTrough => "no second trough within the track's length",
        }
    }
}

/// A trough: a local maximum of cyclonic vorticity along the track.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Trough {
    /// The track point.
    pub point: TrackPoint,
    /// Distance downstream of the ridge axis, m.
    pub axis_distance_m: f64,
    /// Displacement north of the start (south negative), m.
    pub displacement_north_m: f64,
}

/// Froude check of whether the low-level air goes over the ridge.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Froude {
    /// Bulk Froude number U/(N h).
    pub number: f64,
    /// Ridge height above the upstream ground, m.
    pub ridge_height_m: f64,
    /// Fr < 1: low-level flow blocked or deflected; the column argument holds only above.
    pub blocked: bool,
}

/// What a ridge crossing yields.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Crossing {
    /// First point of the track.
    pub start: TrackPoint,
    /// Last point of the track.
    pub end: TrackPoint,
    /// Conserved potential vorticity q, m⁻¹ s⁻¹.
    pub pv: f64,
    /// Thinnest column on the track, m.
    pub min_depth_m: f64,
    /// Most anticyclonic vorticity on the track (over the ridge), s⁻¹.
    pub most_anticyclonic_zeta: f64,
    /// The lee trough: first maximum of cyclonic ζ downstream of the axis.
    pub trough: core::result::Result<Trough, Unavailable>,
    /// The next trough.
    pub second_trough: core::result::Result<Trough, Unavailable>,
    /// Distance between the two troughs along the initial wind direction, m.
    pub wavelength_m: core::result::Result<f64, Unavailable>,
    /// Linear stationary wavelength 2π√(V/β) at the start, m.
    pub stationary_wavelength_m: core::result::Result<f64, Unavailable>,
    /// Largest relative departure of (ζ + f)/H from q, recomputed from each stored point.
    pub pv_drift_rel: f64,
    /// Froude check, when N was given.
    pub froude: Option<Froude>,
    /// Why the track stopped.
    pub ended: TrackEnd,
    /// Steps taken.
    pub steps: u32,
    /// Step used, m.
    pub step_m: f64,
}

/// Run a ridge crossing, handing every point to `sink`: the track integrated in f64.
pub fn run(input: &CrossingInput, sink: &mut impl TrackSink) -> Result<Crossing> {
    run_in::<f64>(input, sink, EXTREME_HYSTERESIS)
}

/// [`run`] with the track integrated in f32 (inputs checked, set up and results given in
/// f64), for the device, whose FPU has single precision only: 18 times fewer
/// instructions there (3000 km: 1.9 M against 34.4 M, docs/performance.md). Its figures agree with [`run`]'s to well within what the
/// inputs support (docs/performance.md, "f32 against f64", and the differential tests
/// in tests/tests/crossing_f32.rs); its PV drift is of f32's order (1e-7), not f64's.
///
/// f32's rounding needs a larger hysteresis to tell a maximum of ζ from noise
/// ([`EXTREME_HYSTERESIS_F32`]), so a trough is confirmed a few steps later; a track that
/// stops at its second trough still ends where f64's finder would have stopped it, and
/// the sink may have been given those few points past the end.
pub fn run_f32(input: &CrossingInput, sink: &mut impl TrackSink) -> Result<Crossing> {
    run_in::<f32>(input, sink, EXTREME_HYSTERESIS_F32)
}

/// The crossing with the track integrated in `T`, extremes found with `hysteresis`.
fn run_in<T: Real>(
    input: &CrossingInput,
    sink: &mut impl TrackSink,
    hysteresis: f64,
) -> Result<Crossing> {
    let v = in_range("wind speed", input.wind_speed_ms, 0.5, 150.0)?;
    let dir = in_range("wind direction", input.wind_dir_from_deg, 0.0, 360.0)?;
    let lid = in_range("lid height", input.lid_m, 500.0, 30_000.0)?;
    let upwind = in_range("upwind distance", input.upwind_m, 10_000.0, 5_000_000.0)?;
    let max_len = in_range("track length", input.max_length_m, 50_000.0, 40_000_000.0)?;
    let step_req = in_range("step", input.step_m, 100.0, MAX_STEP_M)?;
    in_range("ridge axis", input.ridge.axis_deg, -360.0, 360.0)?;
    let anchor = LatLon::new(input.ridge.anchor.lat_deg, input.ridge.anchor.lon_deg)?;
    if let Some(z) = input.upstream_zeta {
        in_range(
            "upstream vorticity",
            z,
            -crate::column::MAX_ABS_ZETA,
            crate::column::MAX_ABS_ZETA,
        )?;
    }
    if let Some(n) = input.brunt_vaisala {
        in_range("Brunt-Vaisala frequency", n, 1e-4, 0.1)?;
    }
    let profile = &input.ridge.profile;
    profile.validate()?;
    let top = profile.max_height();
    if lid - top < MIN_CLEARANCE_M {
        return Err(Error::LidBelowTerrain {
            lid_m: lid,
            terrain_m: top,
        });
    }
    let side = upstream_side(input)?;
    let step = step_req.min(profile.detail_m()).max(100.0);

    // Geometry: axis normal n (right of the axis azimuth), start upwind along the rhumb
    // line of the wind direction, heading downwind.
    let heading0 = wrap_deg(dir + 180.0);
    let start_pos = rhumb_destination(anchor, dir, upwind).ok_or(Error::OutOfRange {
        what: "upwind distance",
        value: upwind,
        min: 10_000.0,
        max: 5_000_000.0,
    })?;
    if start_pos.lat_deg.abs() < GEOSTROPHIC_MIN_LAT_DEG {
        return Err(Error::NearEquator {
            lat_deg: start_pos.lat_deg,
            min_deg: GEOSTROPHIC_MIN_LAT_DEG,
        });
    }
    let n = axis_normal(anchor, input.ridge.axis_deg);
    let p0 = start_pos.to_unit();
    let (e0, n0) = start_pos.east_north();
    let t0 = n0
        .scale(cos(heading0.to_radians()))
        .plus(e0.scale(sin(heading0.to_radians())));

    let f0 = coriolis(start_pos.lat_deg);
    let u0 = v * sin(heading0.to_radians());
    let zeta0 = input
        .upstream_zeta
        .unwrap_or(u0 * tan(start_pos.lat_deg.to_radians()) / EARTH_RADIUS);
    let d_start = axis_distance(p0, n);
    let depth0 = lid - profile.height(d_start);
    let pv = (zeta0 + f0) / depth0;
    if pv * f0 <= 0.0 {
        return Err(Error::InertiallyUnstable {
            abs_vorticity: zeta0 + f0,
        });
    }
    let field = Field {
        terrain: Terrain::of(profile),
        lid: T::of(lid),
        pv: T::of(pv),
        v: T::of(v),
        n: V::of(n),
    };

    // A purely meridional wind has no westerly part; rounding of sin(180°) must not
    // decide that, so a westerly part below 1e-9 of the speed counts as none.
    let easterly = u0 <= 1e-9 * v;
    let stationary = if easterly {
        Err(Unavailable::EasterlyFlow)
    } else {
        Ok(2.0 * PI * sqrt(v / beta(start_pos.lat_deg)))
    };

    let hemi = f0.signum();
    let mut state = (V::of(p0), V::of(t0));
    let mut s = 0.0;
    let mut steps = 0u32;
    let (start, mut drift) = field.point(s, state.0, state.1, side);
    sink.point(&start);
    let mut last = start;
    let mut min_depth = start.depth_m;
    let mut most_anti = start.zeta;
    let mut finder = ExtremeFinder::new(start.zeta * hemi, start, hysteresis);
    let mut troughs: [Option<TrackPoint>; 2] = [None, None];
    let h_full = T::of(step);
    let ended = loop {
        if s >= max_len - 1e-6 {
            break TrackEnd::MaxLength;
        }
        let h = step.min(max_len - s);
        state = field.rk4(state, if h == step { h_full } else { T::of(h) });
        s += h;
        steps += 1;
        let (pt, pt_drift) = field.point(s, state.0, state.1, side);
        if pt.pos.lat_deg.abs() >= 89.5 {
            break TrackEnd::ReachedPole;
        }
        if pt.f * hemi <= 0.0 {
            break TrackEnd::ReachedEquator;
        }
        sink.point(&pt);
        last = pt;
        drift = drift.max(pt_drift);
        min_depth = min_depth.min(pt.depth_m);
        if pt.zeta * hemi < most_anti * hemi {
            most_anti = pt.zeta;
        }
        if let Some((max_pt, end_pt, end_step)) = finder.push(pt.zeta * hemi, pt, steps) {
            if max_pt.axis_distance_m > 0.0 {
                if troughs[0].is_none() {
                    troughs[0] = Some(max_pt);
                } else if troughs[1].is_none() {
                    troughs[1] = Some(max_pt);
                    if input.stop_after_second_trough && !easterly {
                        // Where f64's hysteresis would have stopped (this point, in
                        // f64): the track's length does not depend on the precision.
                        last = end_pt;
                        steps = end_step;
                        break TrackEnd::SecondTrough;
                    }
                }
            }
        }
    };

    let missing = |none: Unavailable| match ended {
        TrackEnd::ReachedEquator | TrackEnd::ReachedPole => Unavailable::TrackEnded(ended),
        _ => none,
    };
    let as_trough = |p: TrackPoint| Trough {
        point: p,
        axis_distance_m: p.axis_distance_m,
        displacement_north_m: (p.pos.lat_deg - start_pos.lat_deg).to_radians() * EARTH_RADIUS,
    };
    let (trough, second, wavelength) = if easterly {
        (
            Err(Unavailable::EasterlyFlow),
            Err(Unavailable::EasterlyFlow),
            Err(Unavailable::EasterlyFlow),
        )
    } else {
        let t1 = troughs[0]
            .map(as_trough)
            .ok_or(missing(Unavailable::NoTrough));
        let t2 = troughs[1]
            .map(as_trough)
            .ok_or(missing(Unavailable::NoSecondTrough));
        let wl = match (t1, t2) {
            (Ok(a), Ok(b)) => {
                let (d, brg) = crate::geo::rhumb(a.point.pos, b.point.pos);
                Ok(d * cos((brg - heading0).to_radians()))
            }
            (Err(e), _) | (_, Err(e)) => Err(e),
        };
        (t1, t2, wl)
    };
    let froude = input.brunt_vaisala.map(|nbv| {
        let h = (top - profile.height(d_start)).max(0.0);
        let number = if h > 0.0 {
            v / (nbv * h)
        } else {
            f64::INFINITY
        };
        Froude {
            number,
            ridge_height_m: h,
            blocked: number < FROUDE_BLOCKED,
        }
    });

    Ok(Crossing {
        start,
        end: last,
        pv,
        min_depth_m: min_depth,
        most_anticyclonic_zeta: most_anti,
        trough,
        second_trough: second,
        wavelength_m: wavelength,
        stationary_wavelength_m: stationary,
        pv_drift_rel: drift,
        froude,
        ended,
        steps,
        step_m: step,
    })
}

/// Sense of a crossing's vorticity at a point, in words.
pub fn sense_at(p: &TrackPoint) -> Sense {
    Sense::of(p.zeta, p.f)
}

/// +1 when the wind blows towards the right of the axis azimuth, −1 when towards the left;
/// the error when it runs along the axis.
fn upstream_side(input: &CrossingInput) -> Result<f64> {
    // Angle between the downwind heading and the axis azimuth, folded to 0..90.
    let heading = input.wind_dir_from_deg + 180.0;
    let rel = wrap_deg(heading - input.ridge.axis_deg);
    let cross = sin(rel.to_radians());
    let angle = asin(cross.abs().min(1.0)).to_degrees();
    if angle < MIN_CROSSING_ANGLE_DEG {
        return Err(Error::WindAlongRidge {
            angle_deg: MIN_CROSSING_ANGLE_DEG,
        });
    }
    Ok(cross.signum())
}

/// Unit normal of the axis great circle, pointing to the right of its azimuth.
fn axis_normal(anchor: LatLon, axis_deg: f64) -> Vec3 {
    let (e, n) = anchor.east_north();
    let a = axis_deg.to_radians();
    let along = n.scale(cos(a)).plus(e.scale(sin(a)));
    along.cross(anchor.to_unit()).unit()
}

/// Signed great-circle distance of unit position `p` from the axis with normal `n`, m.
fn axis_distance(p: Vec3, n: Vec3) -> f64 {
    EARTH_RADIUS * asin(p.dot(n).clamp(-1.0, 1.0))
}

/// The point reached along the rhumb line of bearing `bearing_deg` after `dist_m`.
fn rhumb_destination(a: LatLon, bearing_deg: f64, dist_m: f64) -> Option<LatLon> {
    let d = dist_m / EARTH_RADIUS;
    let th = bearing_deg.to_radians();
    let p1 = a.lat_deg.to_radians();
    let dp = d * cos(th);
    let p2 = p1 + dp;
    if p2.abs() >= PI / 2.0 - 1e-6 {
        return None;
    }
    let q4 = PI / 4.0;
    let dpsi = libm::log(tan(q4 + p2 / 2.0) / tan(q4 + p1 / 2.0));
    let q = if dpsi.abs() > 1e-12 {
        dp / dpsi
    } else {
        cos(p1)
    };
    let dl = d * sin(th) / q;
    let mut lon = a.lon_deg + dl.to_degrees();
    if lon > 180.0 {
        lon -= 360.0;
    } else if lon < -180.0 {
        lon += 360.0;
    }
    Some(LatLon {
        lat_deg: p2.to_degrees(),
        lon_deg: lon,
    })
}

/// A 3-vector in the track's precision.
#[derive(Clone, Copy)]
struct V<T> {
    x: T,
    y: T,
    z: T,
}

impl<T: Real> V<T> {
    fn of(v: Vec3) -> Self {
        V {
            x: T::of(v.x),
            y: T::of(v.y),
            z: T::of(v.z),
        }
    }
    fn plus(self, o: Self) -> Self {
        V {
            x: self.x + o.x,
            y: self.y + o.y,
            z: self.z + o.z,
        }
    }
    fn minus(self, o: Self) -> Self {
        V {
            x: self.x - o.x,
            y: self.y - o.y,
            z: self.z - o.z,
        }
    }
    fn scale(self, k: T) -> Self {
        V {
            x: self.x * k,
            y: self.y * k,
            z: self.z * k,
        }
    }
    fn dot(self, o: Self) -> T {
        self.x * o.x + self.y * o.y + self.z * o.z
    }
    fn cross(self, o: Self) -> Self {
        V {
            x: self.y * o.z - self.z * o.y,
            y: self.z * o.x - self.x * o.z,
            z: self.x * o.y - self.y * o.x,
        }
    }
    /// Unit vector in the same direction (the zero vector stays zero).
    fn unit(self) -> Self {
        let n = self.dot(self).sqrt();
        if n > T::of(0.0) {
            self.scale(T::of(1.0) / n)
        } else {
            self
        }
    }
}

/// The cross-profile in the track's precision (the table copied once, not converted at
/// every stage).
enum Terrain<T> {
    Bell {
        base: T,
        rise: T,
        half_width: T,
    },
    Flat(T),
    Table {
        pts: [(T, T); MAX_PROFILE_POINTS],
        len: usize,
    },
}

impl<T: Real> Terrain<T> {
    fn of(p: &Profile) -> Self {
        match p {
            Profile::Bell {
                base_m,
                crest_m,
                half_width_m,
            } => Terrain::Bell {
                base: T::of(*base_m),
                rise: T::of(crest_m - base_m),
                half_width: T::of(*half_width_m),
            },
            Profile::Flat { height_m } => Terrain::Flat(T::of(*height_m)),
            Profile::Table(v) => {
                let mut pts = [(T::of(0.0), T::of(0.0)); MAX_PROFILE_POINTS];
                for (dst, src) in pts.iter_mut().zip(v.iter()) {
                    *dst = (T::of(src.distance_m), T::of(src.height_m));
                }
                Terrain::Table { pts, len: v.len() }
            }
        }
    }

    /// Terrain height at signed distance `d` from the axis, as [`Profile::height`].
    fn height(&self, d: T) -> T {
        match self {
            Terrain::Bell {
                base,
                rise,
                half_width,
            } => {
                let r = d / *half_width;
                *base + *rise / (T::of(1.0) + r * r)
            }
            Terrain::Flat(h) => *h,
            Terrain::Table { pts, len } => {
                let pts = &pts[..*len];
                let (Some(first), Some(last)) = (pts.first(), pts.last()) else {
                    return T::of(0.0);
                };
                if d <= first.0 {
                    return first.1;
                }
                if d >= last.0 {
                    return last.1;
                }
                for w in pts.windows(2) {
                    let (a, b) = (w[0], w[1]);
                    if d <= b.0 {
                        let t = (d - a.0) / (b.0 - a.0);
                        return a.1 + t * (b.1 - a.1);
                    }
                }
                last.1
            }
        }
    }
}

/// The fields the column feels, in the track's precision `T`.
struct Field<T> {
    terrain: Terrain<T>,
    lid: T,
    pv: T,
    v: T,
    n: V<T>,
}

impl<T: Real> Field<T> {
    /// Signed great-circle distance of unit position `p` from the axis, m.
    fn axis_distance(&self, p: V<T>) -> T {
        let x = p.dot(self.n).max(T::of(-1.0)).min(T::of(1.0));
        T::of(EARTH_RADIUS) * x.asin()
    }

    /// ζ at unit position p: qH − f.
    fn zeta(&self, p: V<T>) -> T {
        let h = self.lid - self.terrain.height(self.axis_distance(p));
        self.pv * h - T::of(2.0 * OMEGA) * p.z
    }

    /// d(p, t)/ds on the sphere: dp/ds = t/a, dt/ds = −p/a + K (p × t), K = ζ/V.
    fn deriv(&self, p: V<T>, t: V<T>) -> (V<T>, V<T>) {
        let k = self.zeta(p) / self.v;
        let inv_a = T::of(1.0 / EARTH_RADIUS);
        (t.scale(inv_a), p.scale(-inv_a).plus(p.cross(t).scale(k)))
    }

    fn rk4(&self, (p, t): (V<T>, V<T>), h: T) -> (V<T>, V<T>) {
        let half = h * T::of(0.5);
        let two = T::of(2.0);
        let (k1p, k1t) = self.deriv(p, t);
        let (k2p, k2t) = self.deriv(p.plus(k1p.scale(half)), t.plus(k1t.scale(half)));
        let (k3p, k3t) = self.deriv(p.plus(k2p.scale(half)), t.plus(k2t.scale(half)));
        let (k4p, k4t) = self.deriv(p.plus(k3p.scale(h)), t.plus(k3t.scale(h)));
        let sixth = h / T::of(6.0);
        let p1 = p
            .plus(
                k1p.plus(k2p.scale(two))
                    .plus(k3p.scale(two))
                    .plus(k4p)
                    .scale(sixth),
            )
            .unit();
        let t1 = t.plus(
            k1t.plus(k2t.scale(two))
                .plus(k3t.scale(two))
                .plus(k4t)
                .scale(sixth),
        );
        // Keep the heading tangent to the sphere and of unit length.
        let t1 = t1.minus(p1.scale(t1.dot(p1))).unit();
        (p1, t1)
    }

    /// The track point at unit position p with unit heading t (results in f64), and its
    /// PV drift |(ζ + f)/H / q − 1| with f recomputed from the point's latitude: a check
    /// that the stored latitude, depth and ζ agree (computed from the values in `T`,
    /// which are exactly the stored ones).
    fn point(&self, s: f64, p: V<T>, t: V<T>, side: f64) -> (TrackPoint, f64) {
        let deg = T::of(180.0 / PI);
        let rho2 = p.x * p.x + p.y * p.y;
        let rho = rho2.sqrt();
        let lat = p.z.atan2(rho) * deg;
        let lon = p.y.atan2(p.x) * deg;
        // The heading's east and north components, both times cos φ: east is
        // (−y, x, 0)/cos φ, north (−z x, −z y, cos² φ)/cos φ (no trigonometry). atan2
        // gives −180..180°; a negative heading is wrapped (as `wrap_deg` would).
        let east = t.y * p.x - t.x * p.y;
        let north = t.z * rho2 - p.z * (t.x * p.x + t.y * p.y);
        let heading = (east.atan2(north) * deg).to_f64();
        let heading = if heading < 0.0 {
            heading + 360.0
        } else {
            heading
        };
        let d = self.axis_distance(p);
        let terrain = self.terrain.height(d);
        let depth = self.lid - terrain;
        let zeta = self.pv * depth - T::of(2.0 * OMEGA) * p.z;
        let f_lat = T::of(2.0 * OMEGA) * (lat * T::of(PI / 180.0)).sin_lat();
        let drift = ((zeta + f_lat) / depth / self.pv - T::of(1.0)).abs();
        let pt = TrackPoint {
            s_m: s,
            pos: LatLon {
                lat_deg: lat.to_f64(),
                lon_deg: lon.to_f64(),
            },
            heading_deg: heading,
            axis_distance_m: d.to_f64() * side,
            terrain_m: terrain.to_f64(),
            depth_m: depth.to_f64(),
            f: (T::of(2.0 * OMEGA) * p.z).to_f64(),
            zeta: zeta.to_f64(),
        };
        (pt, drift.to_f64())
    }
}

/// Finds local maxima of a sequence with a small hysteresis, so rounding noise on a flat
/// stretch makes none.
struct ExtremeFinder {
    rising: Option<bool>,
    best: (f64, TrackPoint),
    hysteresis: f64,
    /// Since the best maximum so far: the first point, with its step, that lies
    /// [`EXTREME_HYSTERESIS`] below it, where f64's finder would have confirmed it.
    fall: Option<(TrackPoint, u32)>,
}

impl ExtremeFinder {
    fn new(z: f64, p: TrackPoint, hysteresis: f64) -> Self {
        ExtremeFinder {
            rising: None,
            best: (z, p),
            hysteresis,
            fall: None,
        }
    }

    /// Feed one value (of step `step`); returns the point of a maximum once the sequence
    /// has fallen clearly below it, with the point and step where it first fell
    /// [`EXTREME_HYSTERESIS`] below it (the same point unless the hysteresis is larger:
    /// the f32 track then stops where the f64 one would).
    fn push(&mut self, z: f64, p: TrackPoint, step: u32) -> Option<(TrackPoint, TrackPoint, u32)> {
        match self.rising {
            None => {
                if z > self.best.0 + self.hysteresis {
                    self.rising = Some(true);
                    self.best = (z, p);
                    self.fall = None;
                } else if z < self.best.0 - self.hysteresis {
                    self.rising = Some(false);
                    self.best = (z, p);
                }
                None
            }
            Some(true) => {
                if z >= self.best.0 {
                    self.best = (z, p);
                    self.fall = None;
                    return None;
                }
                if self.fall.is_none() && z < self.best.0 - EXTREME_HYSTERESIS {
                    self.fall = Some((p, step));
                }
                if z < self.best.0 - self.hysteresis {
                    let found = self.best.1;
                    let (end, end_step) = self.fall.unwrap_or((p, step));
                    self.rising = Some(false);
                    self.best = (z, p);
                    Some((found, end, end_step))
                } else {
                    None
                }
            }
            Some(false) => {
                if z <= self.best.0 {
                    self.best = (z, p);
                } else if z > self.best.0 + self.hysteresis {
                    self.rising = Some(true);
                    self.best = (z, p);
                }
                None
            }
        }
    }
}
