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
//! vectors (position p and heading t), which needs no trigonometry per stage and has no
//! trouble at any longitude.

use crate::constants::{EARTH_RADIUS, OMEGA};
use crate::error::{in_range, Error, Result};
use crate::geo::{wrap_deg, LatLon, Vec3};
use crate::rotation::{beta, coriolis, Sense, GEOSTROPHIC_MIN_LAT_DEG};
use core::f64::consts::PI;
use libm::{asin, atan2, cos, sin, sqrt, tan};

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

/// Run a ridge crossing, handing every point to `sink`.
pub fn run(input: &CrossingInput, sink: &mut impl TrackSink) -> Result<Crossing> {
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
        profile,
        lid,
        pv,
        v,
        n,
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
    let mut state = (p0, t0);
    let mut s = 0.0;
    let mut steps = 0u32;
    let start = field.point(s, state.0, state.1, side);
    sink.point(&start);
    let mut last = start;
    let mut drift = field.drift(&start);
    let mut min_depth = start.depth_m;
    let mut most_anti = start.zeta;
    let mut finder = ExtremeFinder::new(start.zeta * hemi, start);
    let mut troughs: [Option<TrackPoint>; 2] = [None, None];
    let ended = loop {
        if s >= max_len - 1e-6 {
            break TrackEnd::MaxLength;
        }
        let h = step.min(max_len - s);
        state = field.rk4(state, h);
        s += h;
        steps += 1;
        let pt = field.point(s, state.0, state.1, side);
        if pt.pos.lat_deg.abs() >= 89.5 {
            break TrackEnd::ReachedPole;
        }
        if pt.f * hemi <= 0.0 {
            break TrackEnd::ReachedEquator;
        }
        sink.point(&pt);
        last = pt;
        drift = drift.max(field.drift(&pt));
        min_depth = min_depth.min(pt.depth_m);
        if pt.zeta * hemi < most_anti * hemi {
            most_anti = pt.zeta;
        }
        if let Some(max_pt) = finder.push(pt.zeta * hemi, pt) {
            if max_pt.axis_distance_m > 0.0 {
                if troughs[0].is_none() {
                    troughs[0] = Some(max_pt);
                } else if troughs[1].is_none() {
                    troughs[1] = Some(max_pt);
                    if input.stop_after_second_trough && !easterly {
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

/// The fields the column feels.
struct Field<'a> {
    profile: &'a Profile,
    lid: f64,
    pv: f64,
    v: f64,
    n: Vec3,
}

impl Field<'_> {
    /// ζ at unit position p: qH − f.
    fn zeta(&self, p: Vec3) -> f64 {
        let h = self.lid - self.profile.height(axis_distance(p, self.n));
        self.pv * h - 2.0 * OMEGA * p.z
    }

    /// d(p, t)/ds on the sphere: dp/ds = t/a, dt/ds = −p/a + K (p × t), K = ζ/V.
    fn deriv(&self, p: Vec3, t: Vec3) -> (Vec3, Vec3) {
        let k = self.zeta(p) / self.v;
        (
            t.scale(1.0 / EARTH_RADIUS),
            p.scale(-1.0 / EARTH_RADIUS).plus(p.cross(t).scale(k)),
        )
    }

    fn rk4(&self, (p, t): (Vec3, Vec3), h: f64) -> (Vec3, Vec3) {
        let (k1p, k1t) = self.deriv(p, t);
        let (k2p, k2t) = self.deriv(p.plus(k1p.scale(h / 2.0)), t.plus(k1t.scale(h / 2.0)));
        let (k3p, k3t) = self.deriv(p.plus(k2p.scale(h / 2.0)), t.plus(k2t.scale(h / 2.0)));
        let (k4p, k4t) = self.deriv(p.plus(k3p.scale(h)), t.plus(k3t.scale(h)));
        let p1 = p
            .plus(
                k1p.plus(k2p.scale(2.0))
                    .plus(k3p.scale(2.0))
                    .plus(k4p)
                    .scale(h / 6.0),
            )
            .unit();
        let t1 = t.plus(
            k1t.plus(k2t.scale(2.0))
                .plus(k3t.scale(2.0))
                .plus(k4t)
                .scale(h / 6.0),
        );
        // Keep the heading tangent to the sphere and of unit length.
        let t1 = t1.minus(p1.scale(t1.dot(p1))).unit();
        (p1, t1)
    }

    fn point(&self, s: f64, p: Vec3, t: Vec3, side: f64) -> TrackPoint {
        let pos = LatLon::from_unit(p);
        let (e, nn) = pos.east_north();
        let heading = wrap_deg(atan2(t.dot(e), t.dot(nn)).to_degrees());
        let d = axis_distance(p, self.n);
        let terrain = self.profile.height(d);
        TrackPoint {
            s_m: s,
            pos,
            heading_deg: heading,
            axis_distance_m: d * side,
            terrain_m: terrain,
            depth_m: self.lid - terrain,
            f: 2.0 * OMEGA * p.z,
            zeta: self.zeta(p),
        }
    }

    /// |(ζ + f)/H / q − 1| with f and H recomputed from the stored latitude and distance.
    fn drift(&self, p: &TrackPoint) -> f64 {
        let f = coriolis(p.pos.lat_deg);
        ((p.zeta + f) / p.depth_m / self.pv - 1.0).abs()
    }
}

/// Finds local maxima of a sequence with a small hysteresis, so rounding noise on a flat
/// stretch makes none.
struct ExtremeFinder {
    rising: Option<bool>,
    best: (f64, TrackPoint),
}

impl ExtremeFinder {
    fn new(z: f64, p: TrackPoint) -> Self {
        ExtremeFinder {
            rising: None,
            best: (z, p),
        }
    }

    /// Feed one value; returns the point of a maximum once the sequence has fallen clearly
    /// below it.
    fn push(&mut self, z: f64, p: TrackPoint) -> Option<TrackPoint> {
        match self.rising {
            None => {
                if z > self.best.0 + EXTREME_HYSTERESIS {
                    self.rising = Some(true);
                    self.best = (z, p);
                } else if z < self.best.0 - EXTREME_HYSTERESIS {
                    self.rising = Some(false);
                    self.best = (z, p);
                }
                None
            }
            Some(true) => {
                if z >= self.best.0 {
                    self.best = (z, p);
                    None
                } else if z < self.best.0 - EXTREME_HYSTERESIS {
                    let found = self.best.1;
                    self.rising = Some(false);
                    self.best = (z, p);
                    Some(found)
                } else {
                    None
                }
            }
            Some(false) => {
                if z <= self.best.0 {
                    self.best = (z, p);
                } else if z > self.best.0 + EXTREME_HYSTERESIS {
                    self.rising = Some(true);
                    self.best = (z, p);
                }
                None
            }
        }
    }
}
