//! Height-field analysis of an upper-air station network: a weighted least-squares fit of
//! Z(x, y) on a local tangent plane, and from it the geostrophic wind and vorticity with
//! 1-σ uncertainties propagated from the stated height errors.
//!
//! Method (docs/methods.md; FIELD-NOTES §3): stations are projected onto the plane about
//! the reference point (x east, y north), coordinates scaled to units of 100 km, and one of
//! three models is fitted by Householder QR with weights 1/σ²:
//!
//! | model | terms | ∇²Z |
//! |---|---|---|
//! | plane | c0 + c1x + c2y | none |
//! | curvature | + c3(x² + y²) | 4c3 |
//! | quadratic | + c3x² + c4xy + c5y² | 2(c3 + c5) |
//!
//! u_g = −(g0/f0) ∂Z/∂y, v_g = (g0/f0) ∂Z/∂x, ζ_g = (g0/f0)∇²Z, and with the variation of f
//! kept, ζ = ζ_g + (β/f0) u_g. The covariance (AᵀWA)⁻¹ carries the height errors to every
//! figure; the reduced χ² says whether the reports agree with their stated errors.

use crate::constants::G0;
use crate::error::{finite, in_range, Error, Result};
use crate::geo::{centroid, distance_m, LatLon, TangentPlane};
use crate::linalg::{LeastSquares, Solution, MAX_COLS};
use crate::rotation::{beta, coriolis, geostrophic_regime, Regime, Sense};
use core::f64::consts::PI;
use libm::{atan2, sqrt};

/// Most stations a network holds.
pub const MAX_STATIONS: usize = 32;

/// Height error assumed when a report states none, m.
///
/// Common practice: radiosonde geopotential height at 500 hPa is good to about 10–20 m
/// (from memory, FIELD-NOTES §3); leeward takes the optimistic end and says so.
pub const DEFAULT_SIGMA_M: f64 = 10.0;

/// Largest distance of a station from the reference point, km. Beyond it the local plane
/// and a single quadratic no longer describe a synoptic height field (leeward's choice).
pub const MAX_STATION_DISTANCE_KM: f64 = 2500.0;

/// Two stations closer than this are taken as the same place, m.
pub const MIN_STATION_SEPARATION_M: f64 = 500.0;

/// Condition number above which a forced fit is refused (leeward's choice, documented).
pub const MAX_CONDITION: f64 = 1e4;

/// Smallest 1 − leverage for which a station gets a leave-one-out residual: below it the
/// residual would be amplified more than [`MAX_CONDITION`] times (our choice, matching the
/// condition limit).
pub const MIN_LOO_FREEDOM: f64 = 1.0 / MAX_CONDITION;

/// Condition number above which an automatic choice falls back to a simpler model.
pub const AUTO_CONDITION: f64 = 300.0;

/// Smallest ratio of the width of the station spread to its length (principal axes)
/// before the stations count as lying on one line (leeward's choice: 1 to 10).
pub const MIN_SPREAD_RATIO: f64 = 0.1;

/// Leave-one-out score beyond which a station is marked suspect (common practice: 3σ).
pub const SUSPECT_SCORE: f64 = 3.0;

/// Scale of the plane coordinates inside the solve, m (keeps the columns comparable).
const SCALE_M: f64 = 100_000.0;

/// A station identifier: 1 to 8 ASCII letters, digits, `-` or `_`.
pub type StationId = heapless::String<8>;

/// One upper-air report: where, and the geopotential height of the analysed surface.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Station {
    /// Identifier.
    pub id: StationId,
    /// Position.
    pub pos: LatLon,
    /// Geopotential height, gpm.
    pub height_m: f64,
    /// Stated 1-σ height error, m; `None` means [`DEFAULT_SIGMA_M`].
    pub sigma_m: Option<f64>,
}

impl Station {
    /// A checked station report.
    pub fn new(
        id: &str,
        lat_deg: f64,
        lon_deg: f64,
        height_m: f64,
        sigma_m: Option<f64>,
    ) -> Result<Self> {
        let ok = !id.is_empty()
            && id.len() <= 8
            && id
                .bytes()
                .all(|b| b.is_ascii_alphanumeric() || b == b'-' || b == b'_');
        if !ok {
            return Err(Error::BadStationId {
                len: id.len().min(255) as u8,
            });
        }
        let mut sid = StationId::new();
        sid.push_str(id).map_err(|_| Error::BadStationId {
            len: id.len().min(255) as u8,
        })?;
        let pos = LatLon::new(lat_deg, lon_deg)?;
        let height_m = in_range("height", height_m, -1000.0, 40_000.0)?;
        if let Some(s) = sigma_m {
            in_range("height error", s, 0.01, 1000.0)?;
        }
        Ok(Station {
            id: sid,
            pos,
            height_m,
            sigma_m,
        })
    }

    /// The height error used in the fit, m.
    pub fn sigma(&self) -> f64 {
        self.sigma_m.unwrap_or(DEFAULT_SIGMA_M)
    }
}

/// A set of stations reporting the same surface at the same time.
#[derive(Debug, Clone, Default, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Network {
    /// The stations, in entry order.
    pub stations: heapless::Vec<Station, MAX_STATIONS>,
}

impl Network {
    /// An empty network.
    pub fn new() -> Self {
        Network {
            stations: heapless::Vec::new(),
        }
    }

    /// Add a station; a full network hands it back.
    pub fn push(&mut self, s: Station) -> core::result::Result<(), Station> {
        self.stations.push(s)
    }

    /// Number of stations.
    pub fn len(&self) -> usize {
        self.stations.len()
    }

    /// True when there are no stations.
    pub fn is_empty(&self) -> bool {
        self.stations.is_empty()
    }
}

/// The height-field model.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Model {
    /// c0 + c1x + c2y: gradient only.
    Plane,
    /// Plane + c3(x² + y²): gradient and ∇²Z.
    Curvature,
    /// Full quadratic: gradient, ∇²Z and deformation.
    Quadratic,
}

impl Model {
    /// Number of fitted parameters.
    pub fn params(self) -> usize {
        match self {
            Model::Plane => 3,
            Model::Curvature => 4,
            Model::Quadratic => 6,
        }
    }

    /// Lower-case name, as in the command line.
    pub fn name(self) -> &'static str {
        match self {
            Model::Plane => "plane",
            Model::Curvature => "curvature",
            Model::Quadratic => "quadratic",
        }
    }

    /// The model of a lower-case name.
    pub fn from_name(s: &str) -> Option<Self> {
        match s {
            "plane" => Some(Model::Plane),
            "curvature" => Some(Model::Curvature),
            "quadratic" => Some(Model::Quadratic),
            _ => None,
        }
    }

    /// Design-matrix row at scaled coordinates (X, Y).
    fn row(self, x: f64, y: f64) -> ([f64; MAX_COLS], usize) {
        match self {
            Model::Plane => ([1.0, x, y, 0.0, 0.0, 0.0], 3),
            Model::Curvature => ([1.0, x, y, x * x + y * y, 0.0, 0.0], 4),
            Model::Quadratic => ([1.0, x, y, x * x, x * y, y * y], 6),
        }
    }

    /// Coefficients of ∇²Z (per scaled unit²) in the parameters.
    fn laplacian(self) -> [f64; MAX_COLS] {
        match self {
            Model::Plane => [0.0; MAX_COLS],
            Model::Curvature => [0.0, 0.0, 0.0, 4.0, 0.0, 0.0],
            Model::Quadratic => [0.0, 0.0, 0.0, 2.0, 0.0, 2.0],
        }
    }
}

/// How the model is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum ModelChoice {
    /// The richest model that leaves at least two redundant stations and whose geometry
    /// is well conditioned; the plane otherwise.
    #[default]
    Auto,
    /// This model, if the stations allow it at all.
    Force(Model),
}

/// Where the fit is evaluated.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Reference {
    /// The centroid of the stations.
    #[default]
    Centroid,
    /// A given point, e.g. the field site.
    Point(LatLon),
}

/// Options of a network analysis.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FitOptions {
    /// Model choice.
    pub model: ModelChoice,
    /// Reference point.
    pub reference: Reference,
}

/// A value with its 1-σ uncertainty.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Estimate {
    /// Best estimate.
    pub value: f64,
    /// 1-σ uncertainty propagated from the height errors.
    pub sigma: f64,
}

/// The geostrophic wind at the reference point.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GeostrophicWind {
    /// Eastward component u_g, m s⁻¹.
    pub u_ms: Estimate,
    /// Northward component v_g, m s⁻¹.
    pub v_ms: Estimate,
    /// Speed, m s⁻¹ (σ linearised).
    pub speed_ms: Estimate,
    /// Meteorological direction (where the wind blows from), degrees clockwise from north
    /// (σ linearised; large when the speed is small).
    pub dir_from_deg: Estimate,
}

/// Deformation of the geostrophic wind (full quadratic only).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Deformation {
    /// Stretching deformation ∂u/∂x − ∂v/∂y, s⁻¹.
    pub stretching: Estimate,
    /// Shearing deformation ∂v/∂x + ∂u/∂y, s⁻¹.
    pub shearing: Estimate,
    /// Total deformation √(stretching² + shearing²), s⁻¹.
    pub total: f64,
    /// Bearing of the axis of dilatation, degrees clockwise from north (0–180).
    pub dilatation_axis_deg: f64,
}

/// How one station sits in the fit.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct StationFit {
    /// Position on the plane, m east of the reference point.
    pub x_m: f64,
    /// Position on the plane, m north of the reference point.
    pub y_m: f64,
    /// Reported minus fitted height, m.
    pub residual_m: f64,
    /// Reported minus the height predicted by the other stations, m (`None` when the
    /// others cannot support the model).
    pub loo_residual_m: Option<f64>,
    /// That difference over its expected 1-σ spread.
    pub loo_score: Option<f64>,
}

/// Everything a network analysis yields.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct NetworkFit {
    /// Model fitted.
    pub model: Model,
    /// Reference point where the figures hold.
    pub reference: LatLon,
    /// Latitude regime at the reference point (low latitude carries a warning).
    pub regime: Regime,
    /// Coriolis parameter at the reference point, s⁻¹.
    pub f0: f64,
    /// β at the reference point, m⁻¹ s⁻¹.
    pub beta0: f64,
    /// Fitted height at the reference point, gpm.
    pub height_m: Estimate,
    /// ∂Z/∂x, m per m.
    pub dz_dx: Estimate,
    /// ∂Z/∂y, m per m.
    pub dz_dy: Estimate,
    /// Geostrophic wind.
    pub wind: GeostrophicWind,
    /// ∇²Z, m⁻¹ (`None` for the plane).
    pub laplacian: Option<Estimate>,
    /// Quasi-geostrophic vorticity ζ_g = (g0/f0)∇²Z, s⁻¹.
    pub zeta_g: Option<Estimate>,
    /// Vorticity with the variation of f kept, ζ_g + (β/f0)u_g, s⁻¹.
    pub zeta_beta: Option<Estimate>,
    /// Sense of ζ_g.
    pub sense: Option<Sense>,
    /// Deformation (quadratic only).
    pub deformation: Option<Deformation>,
    /// Per-station figures, in network order.
    pub stations: heapless::Vec<StationFit, MAX_STATIONS>,
    /// Root-mean-square residual, m.
    pub residual_rms_m: f64,
    /// Degrees of freedom left, stations − parameters.
    pub dof: u8,
    /// Reduced χ² of the residuals against the stated errors (`None` with no freedom left).
    pub reduced_chi2: Option<f64>,
    /// True when χ²_ν lies more than 3 standard deviations above 1: the reports disagree
    /// with each other by more than their stated errors allow.
    pub chi2_high: bool,
    /// Index of the station the others contradict (leave-one-out score beyond 3σ).
    pub suspect: Option<u8>,
    /// Condition number of the scaled design matrix.
    pub condition: f64,
}

/// Analyse a station network.
pub fn analyse(net: &Network, opts: &FitOptions) -> Result<NetworkFit> {
    let n = net.len();
    if n < Model::Plane.params() {
        return Err(Error::TooFewStations {
            need: 3,
            got: n as u8,
        });
    }
    let reference = match opts.reference {
        Reference::Point(p) => LatLon::new(p.lat_deg, p.lon_deg)?,
        Reference::Centroid => {
            centroid(net.stations.iter().map(|s| s.pos)).ok_or(Error::StationTooFar {
                index: 0,
                distance_km: f64::INFINITY,
                max_km: MAX_STATION_DISTANCE_KM,
            })?
        }
    };
    let regime = geostrophic_regime(reference.lat_deg)?;
    let plane = TangentPlane::new(reference);
    let mut xy = [(0.0, 0.0); MAX_STATIONS];
    for (i, s) in net.stations.iter().enumerate() {
        // The plane is azimuthal equidistant: the distance from the reference is the
        // length of the station's plane vector (one great-circle solve, not two).
        xy[i] = plane.to_xy(s.pos);
        let d_km = sqrt(xy[i].0 * xy[i].0 + xy[i].1 * xy[i].1) / 1000.0;
        if d_km > MAX_STATION_DISTANCE_KM {
            return Err(Error::StationTooFar {
                index: i as u8,
                distance_km: d_km,
                max_km: MAX_STATION_DISTANCE_KM,
            });
        }
    }
    let xy = &xy[..n];
    check_distinct(net, xy)?;
    let aspect = spread_aspect(xy);
    if aspect > 1.0 / MIN_SPREAD_RATIO {
        return Err(Error::StationsCollinear { aspect });
    }

    let (model, sol) = match opts.model {
        ModelChoice::Force(m) => {
            if n < m.params() {
                return Err(Error::TooFewStations {
                    need: m.params() as u8,
                    got: n as u8,
                });
            }
            (m, fit_checked(net, xy, m, None, MAX_CONDITION)?)
        }
        ModelChoice::Auto => choose(net, xy)?,
    };

    let f0 = coriolis(reference.lat_deg);
    let beta0 = beta(reference.lat_deg);
    let p = model.params();
    let k = G0 / f0;
    let l = SCALE_M;
    let est = |g: &[f64; MAX_COLS]| Estimate {
        value: sol.combine(&g[..p]),
        sigma: sqrt(sol.variance(&g[..p])),
    };
    let basis = |i: usize, v: f64| {
        let mut g = [0.0; MAX_COLS];
        g[i] = v;
        g
    };
    let g_u = basis(2, -k / l);
    let g_v = basis(1, k / l);
    let u = est(&g_u);
    let v = est(&g_v);
    let speed = sqrt(u.value * u.value + v.value * v.value);
    let (g_speed, g_dir) = if speed > 0.0 {
        let mut gs = [0.0; MAX_COLS];
        let mut gd = [0.0; MAX_COLS];
        for i in 0..MAX_COLS {
            gs[i] = (u.value * g_u[i] + v.value * g_v[i]) / speed;
            gd[i] = (v.value * g_u[i] - u.value * g_v[i]) / (speed * speed) * 180.0 / PI;
        }
        (gs, gd)
    } else {
        ([0.0; MAX_COLS], [0.0; MAX_COLS])
    };
    let dir = crate::geo::wrap_deg(atan2(-u.value, -v.value).to_degrees());
    let wind = GeostrophicWind {
        u_ms: u,
        v_ms: v,
        speed_ms: Estimate {
            value: speed,
            sigma: sqrt(sol.variance(&g_speed[..p])),
        },
        dir_from_deg: Estimate {
            value: dir,
            // An undefined direction has no meaningful error: report half a circle.
            sigma: if speed > 0.0 {
                sqrt(sol.variance(&g_dir[..p])).min(180.0)
            } else {
                180.0
            },
        },
    };

    let (laplacian, zeta_g, zeta_beta, sense) = if model == Model::Plane {
        (None, None, None, None)
    } else {
        let mut g_lap = model.laplacian();
        for c in g_lap.iter_mut() {
            *c /= l * l;
        }
        let mut g_zg = [0.0; MAX_COLS];
        let mut g_zb = [0.0; MAX_COLS];
        for i in 0..MAX_COLS {
            g_zg[i] = k * g_lap[i];
            g_zb[i] = g_zg[i] + beta0 / f0 * g_u[i];
        }
        let zg = est(&g_zg);
        (
            Some(est(&g_lap)),
            Some(zg),
            Some(est(&g_zb)),
            Some(Sense::of(zg.value, f0)),
        )
    };

    let deformation = if model == Model::Quadratic {
        let g_st = basis(4, -2.0 * k / (l * l));
        let mut g_sh = [0.0; MAX_COLS];
        g_sh[3] = 2.0 * k / (l * l);
        g_sh[5] = -2.0 * k / (l * l);
        let st = est(&g_st);
        let sh = est(&g_sh);
        let total = sqrt(st.value * st.value + sh.value * sh.value);
        // Axis angle counter-clockwise from east is ½ atan2(shearing, stretching).
        let axis_math = 0.5 * atan2(sh.value, st.value).to_degrees();
        let axis = crate::geo::wrap_deg(90.0 - axis_math) % 180.0;
        Some(Deformation {
            stretching: st,
            shearing: sh,
            total,
            dilatation_axis_deg: axis,
        })
    } else {
        None
    };

    // Residuals and leave-one-out.
    let mut stations = heapless::Vec::new();
    let mut sum_r2 = 0.0;
    let mut chi2 = 0.0;
    let mut worst: Option<(u8, f64)> = None;
    for (i, s) in net.stations.iter().enumerate() {
        let (x, y) = (xy[i].0 / l, xy[i].1 / l);
        let (row, _) = model.row(x, y);
        let r = s.height_m - sol.combine(&row[..p]);
        sum_r2 += r * r;
        chi2 += (r / s.sigma()) * (r / s.sigma());
        // Leave-one-out from the one fit (Cook and Weisberg 1982, "Residuals and Influence
        // in Regression", §2.2): with the station's leverage h = w aᵀ C a, the refit
        // without it predicts it with the residual r/(1 − h) and the variance
        // aᵀ C a/(1 − h) (Sherman–Morrison). Exact for the same model, and one solve
        // instead of n + 1 on the device. A leverage near 1 means the others cannot pin
        // the fit without this station: no leave-one-out, as for an ill-conditioned refit.
        let var_full = sol.variance(&row[..p]);
        let free = 1.0 - var_full / (s.sigma() * s.sigma());
        let (loo_residual_m, loo_score) = if n > p && free > MIN_LOO_FREEDOM {
            let rr = r / free;
            let var = var_full / free;
            let score = rr / sqrt(s.sigma() * s.sigma() + var);
            if score.abs() > SUSPECT_SCORE && worst.is_none_or(|(_, w)| score.abs() > w) {
                worst = Some((i as u8, score.abs()));
            }
            (Some(rr), Some(score))
        } else {
            (None, None)
        };
        // Capacity equals MAX_STATIONS, the network's own: this cannot fail, but a
        // failure would be an error value, not a panic.
        stations
            .push(StationFit {
                x_m: xy[i].0,
                y_m: xy[i].1,
                residual_m: r,
                loo_residual_m,
                loo_score,
            })
            .map_err(|_| Error::CapacityExceeded {
                what: "stations",
                capacity: MAX_STATIONS as u16,
            })?;
    }
    let dof = n - p;
    let reduced_chi2 = (dof > 0).then(|| chi2 / dof as f64);
    let chi2_high = reduced_chi2.is_some_and(|c| c > 1.0 + 3.0 * sqrt(2.0 / dof as f64));

    Ok(NetworkFit {
        model,
        reference,
        regime,
        f0,
        beta0,
        height_m: est(&basis(0, 1.0)),
        dz_dx: est(&basis(1, 1.0 / l)),
        dz_dy: est(&basis(2, 1.0 / l)),
        wind,
        laplacian,
        zeta_g,
        zeta_beta,
        sense,
        deformation,
        stations,
        residual_rms_m: sqrt(sum_r2 / n as f64),
        dof: dof as u8,
        reduced_chi2,
        chi2_high,
        suspect: worst.map(|(i, _)| i),
        condition: sol.condition,
    })
}

/// Refuse a station given twice (same identifier, or within [`MIN_STATION_SEPARATION_M`]
/// of another); `xy` are the stations' plane coordinates about the reference.
fn check_distinct(net: &Network, xy: &[(f64, f64)]) -> Result<()> {
    let mut r = [0.0; MAX_STATIONS];
    for (ri, p) in r.iter_mut().zip(xy) {
        *ri = sqrt(p.0 * p.0 + p.1 * p.1);
    }
    for (i, a) in net.stations.iter().enumerate() {
        finite("height", a.height_m)?;
        for (j, b) in net.stations.iter().enumerate().take(i) {
            // Two lower bounds of the great-circle distance tell most pairs apart
            // without its trigonometry (about 20 000 instructions a pair on the device's
            // soft f64): the meridional separation, and the difference of the two
            // distances from the reference (the triangle inequality; the plane is
            // azimuthal equidistant).
            let dlat_m =
                (a.pos.lat_deg - b.pos.lat_deg).abs().to_radians() * crate::constants::EARTH_RADIUS;
            let dr_m = (r[i] - r[j]).abs();
            let close = dlat_m < MIN_STATION_SEPARATION_M
                && dr_m < MIN_STATION_SEPARATION_M
                && distance_m(a.pos, b.pos) < MIN_STATION_SEPARATION_M;
            if a.id == b.id || close {
                return Err(Error::DuplicateStation {
                    index: i as u8,
                    other: j as u8,
                });
            }
        }
    }
    Ok(())
}

/// Fit `model`, leaving out station `skip` if given.
fn fit(net: &Network, xy: &[(f64, f64)], model: Model, skip: Option<usize>) -> Option<Solution> {
    let mut ls = LeastSquares::new(model.params())?;
    for (i, s) in net.stations.iter().enumerate() {
        if Some(i) == skip {
            continue;
        }
        let (row, p) = model.row(xy[i].0 / SCALE_M, xy[i].1 / SCALE_M);
        let sg = s.sigma();
        ls.push(&row[..p], s.height_m, 1.0 / (sg * sg))?;
    }
    ls.solve()
}

/// Fit and refuse a poorly conditioned geometry with the error a user can act on.
fn fit_checked(
    net: &Network,
    xy: &[(f64, f64)],
    model: Model,
    skip: Option<usize>,
    limit: f64,
) -> Result<Solution> {
    let sol = fit(net, xy, model, skip);
    let condition = sol.map_or(f64::INFINITY, |s| s.condition);
    match sol {
        Some(s) if condition <= limit => Ok(s),
        _ => {
            let aspect = spread_aspect(xy);
            if model == Model::Plane || aspect > 1.0 / MIN_SPREAD_RATIO {
                Err(Error::StationsCollinear { aspect })
            } else {
                Err(Error::PoorGeometry {
                    params: model.params() as u8,
                    condition,
                    limit,
                })
            }
        }
    }
}

/// Length over width of the station spread: the square root of the ratio of the principal
/// second moments of the plane positions (infinite for stations on an exact line).
fn spread_aspect(xy: &[(f64, f64)]) -> f64 {
    let n = xy.len() as f64;
    if n < 2.0 {
        return f64::INFINITY;
    }
    let mx = xy.iter().map(|p| p.0).sum::<f64>() / n;
    let my = xy.iter().map(|p| p.1).sum::<f64>() / n;
    let (mut sxx, mut syy, mut sxy) = (0.0, 0.0, 0.0);
    for &(x, y) in xy {
        let (dx, dy) = (x - mx, y - my);
        sxx += dx * dx;
        syy += dy * dy;
        sxy += dx * dy;
    }
    let mean = 0.5 * (sxx + syy);
    let rad = sqrt(0.25 * (sxx - syy) * (sxx - syy) + sxy * sxy);
    let (l1, l2) = (mean + rad, (mean - rad).max(0.0));
    if l2 <= l1 * 1e-24 {
        f64::INFINITY
    } else {
        sqrt(l1 / l2)
    }
}

/// The automatic model choice.
fn choose(net: &Network, xy: &[(f64, f64)]) -> Result<(Model, Solution)> {
    let n = net.len();
    for m in [Model::Quadratic, Model::Curvature] {
        if n >= m.params() + 2 {
            if let Ok(s) = fit_checked(net, xy, m, None, AUTO_CONDITION) {
                return Ok((m, s));
            }
        }
    }
    Ok((
        Model::Plane,
        fit_checked(net, xy, Model::Plane, None, MAX_CONDITION)?,
    ))
}
