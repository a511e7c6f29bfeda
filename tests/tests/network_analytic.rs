//! The station-network fit against analytic height fields.
//!
//! Stations are placed on the core's own tangent plane (azimuthal equidistant, about the
//! reference point) with `TangentPlane::to_latlon`, and their heights taken from a field
//! defined on that plane. The fit projects them back with `to_xy`, so a plane, bowl or
//! quadratic field stays exactly a plane, bowl or quadratic in the fit's coordinates; the
//! only errors left are rounding (see `WIND_TOL_MS` and `ZETA_TOL`). One test defines a field
//! in latitude instead and bounds the projection's effect.
//!
//! Expected values are worked from FIELD-NOTES §3 with the constants of FIELD-NOTES §1,
//! typed in here independently of the core.

use leeward_core::geo::{LatLon, TangentPlane};
use leeward_core::network::{
    analyse, FitOptions, Model, ModelChoice, Network, NetworkFit, Reference, Station,
};
use leeward_core::rotation::{Regime, Sense};
use leeward_core::Error;

/// Ω, rad/s (IERS Conventions 2010, FIELD-NOTES §1).
const OMEGA: f64 = 7.292115e-5;
/// g0, m/s² (3rd CGPM 1901, FIELD-NOTES §1).
const G0: f64 = 9.80665;
/// Earth radius a, m (IUGG R1, FIELD-NOTES §1).
const A: f64 = 6_371_008.8;

/// Tolerance on wind components for error-free heights, m/s.
///
/// Computed bound: the scaled design matrix has a condition number below 300 (the auto
/// limit), heights are ~5600 m, so the coefficients carry rounding of about
/// 300 · 2.2e-16 · 5600 ≈ 4e-10 m per 100 km, i.e. 4e-15 m/m in the gradient and
/// 4e-15 · g0/f ≈ 4e-10 m/s in the wind. Station positions survive the lat/lon round trip to
/// ~1e-8 m, which moves a height by |∇Z| · 1e-8 ≈ 1e-12 m. 1e-6 m/s leaves a wide margin and
/// is still 1e-7 of the signal.
const WIND_TOL_MS: f64 = 1e-6;
/// Tolerance on ζ_g and deformation, s⁻¹: the same rounding over (100 km)² gives ~4e-15 s⁻¹;
/// 1e-12 s⁻¹ is 1e-7 of a synoptic ζ of 1e-5.
const ZETA_TOL: f64 = 1e-12;

fn f_at(lat_deg: f64) -> f64 {
    // FIELD-NOTES §2: f = 2Ω sin φ.
    2.0 * OMEGA * lat_deg.to_radians().sin()
}

/// An irregular layout of 8 stations, km east and north of the reference point, 20 to
/// 370 km out (radiosonde spacing; common practice).
const LAYOUT_8: [(f64, f64); 8] = [
    (10.0, 20.0),
    (310.0, 40.0),
    (180.0, 330.0),
    (-150.0, 290.0),
    (-340.0, 60.0),
    (-260.0, -250.0),
    (30.0, -360.0),
    (290.0, -220.0),
];

/// Stations at plane positions `xy_km` about `origin`, heights from `z(x_m, y_m)`.
fn network_on_plane(
    origin: LatLon,
    xy_km: &[(f64, f64)],
    z: impl Fn(f64, f64) -> f64,
    sigma_m: f64,
) -> Network {
    let plane = TangentPlane::new(origin);
    let mut net = Network::new();
    for (i, &(xk, yk)) in xy_km.iter().enumerate() {
        let (x, y) = (xk * 1000.0, yk * 1000.0);
        let p = plane.to_latlon(x, y);
        let s = Station::new(
            &format!("S{i}"),
            p.lat_deg,
            p.lon_deg,
            z(x, y),
            Some(sigma_m),
        )
        .unwrap();
        net.push(s).unwrap();
    }
    net
}

fn at_point(origin: LatLon, model: ModelChoice) -> FitOptions {
    FitOptions {
        model,
        reference: Reference::Point(origin),
    }
}

/// A general quadratic Z = z0 + a x + b y + cxx x² + cxy xy + cyy y² (x, y in m).
#[derive(Clone, Copy)]
struct Quad {
    z0: f64,
    a: f64,
    b: f64,
    cxx: f64,
    cxy: f64,
    cyy: f64,
}

impl Quad {
    fn eval(self, x: f64, y: f64) -> f64 {
        self.z0 + self.a * x + self.b * y + self.cxx * x * x + self.cxy * x * y + self.cyy * y * y
    }
}

/// Check every figure of a fit against the exact values of the quadratic `q`
/// (FIELD-NOTES §3, computed: u = −(g0/f)Z_y, v = (g0/f)Z_x at the origin, where
/// Z_x = a, Z_y = b; ∇²Z = 2(cxx + cyy); stretching = −2(g0/f)cxy;
/// shearing = (g0/f)(2cxx − 2cyy)).
fn check_against(fit: &NetworkFit, q: Quad, lat_deg: f64) {
    let k = G0 / f_at(lat_deg);
    let u = -k * q.b;
    let v = k * q.a;
    assert!((fit.f0 - f_at(lat_deg)).abs() < 1e-15, "f0 {}", fit.f0);
    assert!((fit.dz_dx.value - q.a).abs() < 1e-13, "{:?}", fit.dz_dx);
    assert!((fit.dz_dy.value - q.b).abs() < 1e-13, "{:?}", fit.dz_dy);
    assert!(
        (fit.height_m.value - q.z0).abs() < 1e-6,
        "{:?}",
        fit.height_m
    );
    assert!(
        (fit.wind.u_ms.value - u).abs() < WIND_TOL_MS,
        "u {:?} vs {u}",
        fit.wind.u_ms
    );
    assert!(
        (fit.wind.v_ms.value - v).abs() < WIND_TOL_MS,
        "v {:?} vs {v}",
        fit.wind.v_ms
    );
    let speed = u.hypot(v);
    assert!((fit.wind.speed_ms.value - speed).abs() < WIND_TOL_MS);
    // Meteorological direction (FIELD-NOTES §3): atan2(−u, −v) in degrees, mod 360.
    let dir = (-u).atan2(-v).to_degrees().rem_euclid(360.0);
    let ddir = (fit.wind.dir_from_deg.value - dir + 540.0).rem_euclid(360.0) - 180.0;
    assert!(
        ddir.abs() < 1e-6,
        "dir {} vs {dir}",
        fit.wind.dir_from_deg.value
    );
    if fit.model != Model::Plane {
        let lap = 2.0 * (q.cxx + q.cyy);
        let zg = fit.zeta_g.unwrap();
        assert!((fit.laplacian.unwrap().value - lap).abs() < 1e-20);
        assert!(
            (zg.value - k * lap).abs() < ZETA_TOL,
            "ζ {:?} vs {}",
            zg,
            k * lap
        );
        // ζ with the variation of f kept: ζ_g + (β/f0) u_g (FIELD-NOTES §3).
        let beta = 2.0 * OMEGA * lat_deg.to_radians().cos() / A;
        let zb = k * lap + beta / f_at(lat_deg) * u;
        assert!((fit.zeta_beta.unwrap().value - zb).abs() < ZETA_TOL);
    }
    if fit.model == Model::Quadratic {
        let d = fit.deformation.unwrap();
        let st = -2.0 * k * q.cxy;
        let sh = k * (2.0 * q.cxx - 2.0 * q.cyy);
        assert!((d.stretching.value - st).abs() < ZETA_TOL, "{d:?} vs {st}");
        assert!((d.shearing.value - sh).abs() < ZETA_TOL, "{d:?} vs {sh}");
        assert!((d.total - st.hypot(sh)).abs() < ZETA_TOL);
    }
    // Error-free heights: residuals vanish (to the rounding of 5600 m heights).
    assert!(fit.residual_rms_m < 1e-6, "rms {}", fit.residual_rms_m);
    assert_eq!(fit.suspect, None);
    assert!(!fit.chi2_high);
}

/// Latitudes of the checks: mid and high latitude, the subtropics, the Southern Hemisphere.
const LATITUDES: [f64; 6] = [45.5, 62.0, 22.0, -45.5, -33.0, -70.0];

#[test]
fn plane_field_gives_geostrophic_wind() {
    // 100 m per 1000 km falling northward and 40 m per 1000 km rising eastward.
    let q = Quad {
        z0: 5600.0,
        a: 4e-5,
        b: -1e-4,
        cxx: 0.0,
        cxy: 0.0,
        cyy: 0.0,
    };
    for lat in LATITUDES {
        let o = LatLon::new(lat, -140.0).unwrap();
        let net = network_on_plane(o, &LAYOUT_8, |x, y| q.eval(x, y), 10.0);
        for m in [Model::Plane, Model::Curvature, Model::Quadratic] {
            let fit = analyse(&net, &at_point(o, ModelChoice::Force(m))).unwrap();
            assert_eq!(fit.model, m);
            check_against(&fit, q, lat);
            if m != Model::Plane {
                // A plane has no curvature: ζ_g is zero and "neutral".
                assert_eq!(fit.sense, Some(Sense::Neutral));
            }
        }
    }
}

#[test]
fn westerly_of_100_m_per_1000_km_at_45_degrees() {
    // FIELD-NOTES §3 typical magnitude: 100 m per 1000 km gives about 9.5 m/s at 45°.
    // Computed: g0/f · 1e-4 = 9.80665 / 1.031261e-4 · 1e-4 = 9.5094 m/s.
    let o = LatLon::new(45.0, 10.0).unwrap();
    let net = network_on_plane(o, &LAYOUT_8, |_, y| 5600.0 - 1e-4 * y, 10.0);
    let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
    assert!(
        (fit.wind.speed_ms.value - 9.5094).abs() < 1e-3,
        "{:?}",
        fit.wind
    );
    // Height falling northward in the NH: a westerly, blowing from 270°.
    assert!((fit.wind.dir_from_deg.value - 270.0).abs() < 1e-6);
    assert!(fit.wind.v_ms.value.abs() < WIND_TOL_MS);
    // The same gradient in the SH (f < 0) gives an easterly, from 90°.
    let o = LatLon::new(-45.0, 10.0).unwrap();
    let net = network_on_plane(o, &LAYOUT_8, |_, y| 5600.0 - 1e-4 * y, 10.0);
    let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
    assert!((fit.wind.speed_ms.value - 9.5094).abs() < 1e-3);
    assert!((fit.wind.dir_from_deg.value - 90.0).abs() < 1e-6);
}

#[test]
fn isotropic_bowl_gives_vorticity_and_its_sense() {
    // Z = z0 + c r², a closed low for c > 0: ∇²Z = 4c (computed). c = 1.3e-10 m/m² makes
    // the bowl 21 m deep at 400 km: ζ_g ≈ 5e-5 s⁻¹ at 45°, a synoptic value.
    for lat in LATITUDES {
        for c in [1.3e-10, -0.7e-10] {
            let q = Quad {
                z0: 5550.0,
                a: 2e-5,
                b: -6e-5,
                cxx: c,
                cxy: 0.0,
                cyy: c,
            };
            let o = LatLon::new(lat, 25.0).unwrap();
            // Six stations: the automatic choice is the curvature model (two spare).
            let net = network_on_plane(o, &LAYOUT_8[..6], |x, y| q.eval(x, y), 10.0);
            let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
            assert_eq!(fit.model, Model::Curvature);
            check_against(&fit, q, lat);
            // A low (c > 0) is cyclonic in both hemispheres, a high anticyclonic
            // (FIELD-NOTES §2: cyclonic means ζ/f > 0).
            let want = if c > 0.0 {
                Sense::Cyclonic
            } else {
                Sense::Anticyclonic
            };
            assert_eq!(fit.sense, Some(want), "lat {lat} c {c}");
            // And the sign of ζ_g follows f: positive for a NH low, negative for a SH low.
            let zg = fit.zeta_g.unwrap().value;
            assert_eq!(zg > 0.0, (c > 0.0) == (lat > 0.0), "lat {lat} c {c} ζ {zg}");
            // Eight stations: the full quadratic, with zero deformation for a round bowl.
            let net = network_on_plane(o, &LAYOUT_8, |x, y| q.eval(x, y), 10.0);
            let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
            assert_eq!(fit.model, Model::Quadratic);
            check_against(&fit, q, lat);
            assert!(fit.deformation.unwrap().total < ZETA_TOL);
        }
    }
}

#[test]
fn full_quadratic_gives_vorticity_and_deformation() {
    let q = Quad {
        z0: 5580.0,
        a: -3e-5,
        b: -9e-5,
        cxx: 1.1e-10,
        cxy: -0.8e-10,
        cyy: 0.4e-10,
    };
    for lat in LATITUDES {
        let o = LatLon::new(lat, 170.0).unwrap();
        let net = network_on_plane(o, &LAYOUT_8, |x, y| q.eval(x, y), 12.0);
        let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
        assert_eq!(fit.model, Model::Quadratic);
        check_against(&fit, q, lat);
    }
}

#[test]
fn dilatation_axis_of_pure_deformation_fields() {
    // Computed from u = −(g0/f)Z_y, v = (g0/f)Z_x (FIELD-NOTES §3), at 45°N (f > 0):
    // - Z = c·xy, c > 0: u = −k c x, v = k c y: inflow along x, outflow along y, so the
    //   axis of dilatation is north–south (0°).
    // - Z = −c·xy: the reverse, east–west (90°).
    // - Z = c(x² − y²): u = 2kc y, v = 2kc x: outflow along the line y = x, so the axis
    //   points north-east (45°).
    // - Z = −c(x² − y²): outflow along y = −x: 135°.
    let c = 1e-10;
    let cases: [(Quad, f64); 4] = [
        (quad_def(0.0, c, 0.0), 0.0),
        (quad_def(0.0, -c, 0.0), 90.0),
        (quad_def(c, 0.0, -c), 45.0),
        (quad_def(-c, 0.0, c), 135.0),
    ];
    let o = LatLon::new(45.0, 0.0).unwrap();
    for (q, want) in cases {
        let net = network_on_plane(o, &LAYOUT_8, |x, y| q.eval(x, y), 10.0);
        let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
        check_against(&fit, q, 45.0);
        let axis = fit.deformation.unwrap().dilatation_axis_deg;
        // The axis is a line: 0° and 180° are the same.
        let diff = (axis - want + 90.0).rem_euclid(180.0) - 90.0;
        assert!(diff.abs() < 1e-6, "axis {axis} want {want}");
    }
}

fn quad_def(cxx: f64, cxy: f64, cyy: f64) -> Quad {
    Quad {
        z0: 5600.0,
        a: 0.0,
        b: -8e-5,
        cxx,
        cxy,
        cyy,
    }
}

#[test]
fn regular_cross_formula_of_field_notes() {
    // FIELD-NOTES §3: on a regular cross of four stations at distance d around a centre,
    // the isotropic-curvature fit gives ∇²Z = (Z_N + Z_S + Z_E + Z_W − 4 Z_0)/d².
    // Computed from the normal equations: c1 and c2 take the odd parts of the E–W and
    // N–S pairs; c0 and c3 are fitted to two independent data, Z_0 and the mean of the
    // four arms, so c0 = Z_0 and c3 = (mean − Z_0)/d², exactly, whatever the heights.
    // The heights below are deliberately not a quadratic (the fit then cannot be exact
    // at the stations, but the formula still holds).
    let d_km = 350.0;
    let cross = [
        (0.0, 0.0),
        (0.0, d_km),
        (0.0, -d_km),
        (d_km, 0.0),
        (-d_km, 0.0),
    ];
    for (lat, heights) in [
        (45.5, [5580.0, 5521.0, 5650.0, 5570.0, 5612.0]),
        (-38.0, [5700.0, 5760.0, 5655.0, 5710.0, 5694.0]),
        (60.0, [5400.0, 5398.0, 5403.0, 5417.0, 5390.0]),
    ] {
        let o = LatLon::new(lat, -60.0).unwrap();
        let plane = TangentPlane::new(o);
        let mut net = Network::new();
        for (i, &(x, y)) in cross.iter().enumerate() {
            let p = plane.to_latlon(x * 1000.0, y * 1000.0);
            net.push(
                Station::new(&format!("X{i}"), p.lat_deg, p.lon_deg, heights[i], None).unwrap(),
            )
            .unwrap();
        }
        let fit = analyse(&net, &at_point(o, ModelChoice::Force(Model::Curvature))).unwrap();
        let [z0, zn, zs, ze, zw] = heights;
        let d = d_km * 1000.0;
        let lap = (zn + zs + ze + zw - 4.0 * z0) / (d * d);
        let got = fit.laplacian.unwrap().value;
        assert!(
            (got - lap).abs() < 1e-9 * lap.abs() + 1e-22,
            "{got} vs {lap}"
        );
        let zg = fit.zeta_g.unwrap().value;
        assert!((zg - G0 / f_at(lat) * lap).abs() < ZETA_TOL);
        // The gradient is the centred difference of the arms (computed likewise).
        assert!((fit.dz_dx.value - (ze - zw) / (2.0 * d)).abs() < 1e-14);
        assert!((fit.dz_dy.value - (zn - zs) / (2.0 * d)).abs() < 1e-14);
        // σ(∇²Z): the four arms enter with weight 1/d², the centre with −4/d², so
        // σ = σ_Z √(4 + 16)/d² with σ_Z the default 10 m (computed; FIELD-NOTES §3 quotes
        // the rougher 4σ/d²).
        let s = fit.laplacian.unwrap().sigma;
        let want = 10.0 * 20f64.sqrt() / (d * d);
        assert!((s / want - 1.0).abs() < 1e-9, "{s} vs {want}");
    }
}

#[test]
fn zonal_field_defined_in_latitude() {
    // A field defined on the sphere rather than on the plane: Z = z0 − G·a·(φ − φ0), a
    // uniform westerly u = (g0/f0)G along the parallels. The azimuthal-equidistant plane
    // bends the parallels: a point at x east lies at y ≈ x² tan φ0 /(2a) on the parallel
    // (computed, to second order in x/a), so on the plane Z ≈ z0 − G(y − x² tan φ0/(2a))
    // and the fit sees Z_xx = G tan φ0 / a: ζ_g = u tan φ0 / a, the vorticity of a uniform
    // zonal wind on the sphere (docs/methods.md's metric term, about 2e-6 s⁻¹ here). The
    // neglected terms are of higher order in r/a ≈ 0.06 (stations 400 km out) times powers
    // of tan φ0: bounds of 1 % on u and 15 % on ζ_g.
    let g = 1e-4;
    for lat in [45.5, 60.0, -45.5] {
        let o = LatLon::new(lat, 0.0).unwrap();
        let plane = TangentPlane::new(o);
        let mut net = Network::new();
        for (i, &(xk, yk)) in LAYOUT_8.iter().enumerate() {
            let p = plane.to_latlon(xk * 1000.0, yk * 1000.0);
            let z = 5600.0 - g * A * (p.lat_deg - lat).to_radians();
            net.push(Station::new(&format!("L{i}"), p.lat_deg, p.lon_deg, z, None).unwrap())
                .unwrap();
        }
        let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
        let u = G0 / f_at(lat) * g;
        assert!(
            (fit.wind.u_ms.value / u - 1.0).abs() < 0.01,
            "{:?}",
            fit.wind
        );
        assert!(fit.wind.v_ms.value.abs() < 0.01 * u.abs());
        let want = u * lat.to_radians().tan() / A;
        let zg = fit.zeta_g.unwrap().value;
        assert!((zg / want - 1.0).abs() < 0.15, "ζ_g {zg} vs {want}");
    }
}

#[test]
fn too_few_stations() {
    let o = LatLon::new(45.0, 0.0).unwrap();
    let net = network_on_plane(o, &LAYOUT_8[..2], |_, _| 5600.0, 10.0);
    assert_eq!(
        analyse(&net, &FitOptions::default()),
        Err(Error::TooFewStations { need: 3, got: 2 })
    );
    let net = network_on_plane(o, &LAYOUT_8[..0], |_, _| 5600.0, 10.0);
    assert_eq!(
        analyse(&net, &FitOptions::default()),
        Err(Error::TooFewStations { need: 3, got: 0 })
    );
    // A forced model needs its own minimum (docs/methods.md table).
    let net = network_on_plane(o, &LAYOUT_8[..5], |_, _| 5600.0, 10.0);
    assert_eq!(
        analyse(&net, &at_point(o, ModelChoice::Force(Model::Quadratic))),
        Err(Error::TooFewStations { need: 6, got: 5 })
    );
    let net = network_on_plane(o, &LAYOUT_8[..3], |_, _| 5600.0, 10.0);
    assert_eq!(
        analyse(&net, &at_point(o, ModelChoice::Force(Model::Curvature))),
        Err(Error::TooFewStations { need: 4, got: 3 })
    );
    // Three stations are enough for the plane, and the automatic choice takes it.
    let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
    assert_eq!(fit.model, Model::Plane);
    assert_eq!(fit.dof, 0);
    assert_eq!(fit.reduced_chi2, None);
}

#[test]
fn duplicate_stations() {
    let o = LatLon::new(45.0, 0.0).unwrap();
    let mut net = network_on_plane(o, &LAYOUT_8[..5], |_, _| 5600.0, 10.0);
    // Same id as station 2 (index 1), elsewhere.
    let p = TangentPlane::new(o).to_latlon(-100_000.0, -80_000.0);
    net.push(Station::new("S1", p.lat_deg, p.lon_deg, 5600.0, None).unwrap())
        .unwrap();
    assert_eq!(
        analyse(&net, &FitOptions::default()),
        Err(Error::DuplicateStation { index: 5, other: 1 })
    );
    // Another id 300 m from station 4 (index 3): within 500 m counts as the same place.
    let mut net = network_on_plane(o, &LAYOUT_8[..5], |_, _| 5600.0, 10.0);
    let p = TangentPlane::new(o).to_latlon(-150_000.0 + 300.0, 290_000.0);
    net.push(Station::new("NEAR", p.lat_deg, p.lon_deg, 5600.0, None).unwrap())
        .unwrap();
    assert_eq!(
        analyse(&net, &FitOptions::default()),
        Err(Error::DuplicateStation { index: 5, other: 3 })
    );
    // 700 m apart is two places (and the geometry is otherwise fine).
    let mut net = network_on_plane(o, &LAYOUT_8[..5], |_, _| 5600.0, 10.0);
    let p = TangentPlane::new(o).to_latlon(-150_000.0 + 700.0, 290_000.0);
    net.push(Station::new("NEAR", p.lat_deg, p.lon_deg, 5600.0, None).unwrap())
        .unwrap();
    assert!(analyse(&net, &FitOptions::default()).is_ok());
}

#[test]
fn collinear_stations() {
    let o = LatLon::new(50.0, 5.0).unwrap();
    // Five stations on a north–south line: the east–west gradient is undetermined.
    let line: Vec<(f64, f64)> = (0..5).map(|i| (0.0, -400.0 + 200.0 * i as f64)).collect();
    let net = network_on_plane(o, &line, |_, y| 5600.0 - 1e-4 * y, 10.0);
    assert!(matches!(
        analyse(&net, &FitOptions::default()),
        Err(Error::StationsCollinear { .. })
    ));
    // Along a diagonal, offset from the reference point.
    let diag: Vec<(f64, f64)> = (0..6)
        .map(|i| (-300.0 + 120.0 * i as f64, -250.0 + 100.0 * i as f64))
        .collect();
    let net = network_on_plane(o, &diag, |_, y| 5600.0 - 1e-4 * y, 10.0);
    assert!(matches!(
        analyse(&net, &at_point(o, ModelChoice::Force(Model::Plane))),
        Err(Error::StationsCollinear { .. })
    ));
    // Nearly on a line: 800 km long, ±25 km wide. The principal-axis aspect is
    // √(Σx²/Σy²) = √((4·400² + ... )/(...)) — computed for the five points below:
    // x = −400, −200, 0, 200, 400 (Σx² = 400 000); y = 25, −25, 25, −25, 25, mean 5,
    // Σ(y − 5)² = 3·400 + 2·900 = 3000 and Σ(x)(y − 5) = 0: aspect √(400000/3000) ≈ 11.5,
    // beyond the limit of 10 (docs/methods.md).
    let thin = [
        (-400.0, 25.0),
        (-200.0, -25.0),
        (0.0, 25.0),
        (200.0, -25.0),
        (400.0, 25.0),
    ];
    let net = network_on_plane(o, &thin, |_, y| 5600.0 - 1e-4 * y, 10.0);
    match analyse(&net, &FitOptions::default()) {
        Err(Error::StationsCollinear { aspect }) => {
            assert!((aspect - 11.5).abs() < 0.2, "aspect {aspect}")
        }
        other => panic!("expected collinear, got {other:?}"),
    }
    // Twice as wide (±50 km): aspect ≈ 5.8 (computed likewise): accepted.
    let wide = thin.map(|(x, y)| (x, 2.0 * y));
    let net = network_on_plane(o, &wide, |_, y| 5600.0 - 1e-4 * y, 10.0);
    assert!(analyse(&net, &FitOptions::default()).is_ok());
}

#[test]
fn station_too_far() {
    let o = LatLon::new(45.0, 0.0).unwrap();
    let mut xy = LAYOUT_8.to_vec();
    // The plane is azimuthal equidistant: 2600 km on it is 2600 km on the sphere.
    xy[6] = (0.0, -2600.0);
    let net = network_on_plane(o, &xy, |_, _| 5600.0, 10.0);
    match analyse(&net, &at_point(o, ModelChoice::Auto)) {
        Err(Error::StationTooFar {
            index,
            distance_km,
            max_km,
        }) => {
            assert_eq!(index, 6);
            assert!((distance_km - 2600.0).abs() < 1e-3, "{distance_km}");
            assert_eq!(max_km, 2500.0);
        }
        other => panic!("expected too far, got {other:?}"),
    }
    xy[6] = (0.0, -2400.0);
    let net = network_on_plane(o, &xy, |_, _| 5600.0, 10.0);
    assert!(analyse(&net, &at_point(o, ModelChoice::Auto)).is_ok());
}

#[test]
fn poor_geometry() {
    // Stations on a circle: x² + y² is the same for all, so the quadratic's x² + y² part
    // cannot be told from the constant (computed: the columns 1, x², y² are dependent).
    let o = LatLon::new(45.0, 0.0).unwrap();
    let ring: Vec<(f64, f64)> = (0..8)
        .map(|i| {
            let t = (i as f64 * 45.0 + 10.0).to_radians();
            (300.0 * t.cos(), 300.0 * t.sin())
        })
        .collect();
    let net = network_on_plane(o, &ring, |_, y| 5600.0 - 1e-4 * y, 10.0);
    for m in [Model::Quadratic, Model::Curvature] {
        match analyse(&net, &at_point(o, ModelChoice::Force(m))) {
            Err(Error::PoorGeometry { params, limit, .. }) => {
                assert_eq!(params as usize, m.params());
                assert_eq!(limit, 1e4);
            }
            other => panic!("expected poor geometry for {m:?}, got {other:?}"),
        }
    }
    // The automatic choice falls back to the plane, which the ring determines well.
    let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
    assert_eq!(fit.model, Model::Plane);
    assert!(fit.zeta_g.is_none());
}

#[test]
fn near_the_equator() {
    let q = |_: f64, y: f64| 5850.0 - 2e-5 * y;
    for lat in [3.0, -4.9, 0.0] {
        let o = LatLon::new(lat, 30.0).unwrap();
        let net = network_on_plane(o, &LAYOUT_8, q, 10.0);
        match analyse(&net, &at_point(o, ModelChoice::Auto)) {
            Err(Error::NearEquator { min_deg, .. }) => assert_eq!(min_deg, 5.0),
            other => panic!("lat {lat}: expected a refusal, got {other:?}"),
        }
    }
    // Between 5° and 15°: figures with the low-latitude flag (docs/methods.md).
    for lat in [5.5, 10.0, -14.0] {
        let o = LatLon::new(lat, 30.0).unwrap();
        let net = network_on_plane(o, &LAYOUT_8, q, 10.0);
        let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
        assert_eq!(fit.regime, Regime::LowLatitude, "lat {lat}");
        assert!(fit.regime.warning().is_some());
    }
    for lat in [15.5, -20.0] {
        let o = LatLon::new(lat, 30.0).unwrap();
        let net = network_on_plane(o, &LAYOUT_8, q, 10.0);
        let fit = analyse(&net, &at_point(o, ModelChoice::Auto)).unwrap();
        assert_eq!(fit.regime, Regime::Balanced, "lat {lat}");
    }
    // The centroid reference is judged too: a network centred on 2°N is refused.
    let o = LatLon::new(2.0, 30.0).unwrap();
    let net = network_on_plane(o, &LAYOUT_8, q, 10.0);
    assert!(matches!(
        analyse(&net, &FitOptions::default()),
        Err(Error::NearEquator { .. })
    ));
}

/// Rows of a model at plane coordinates in units of 100 km (docs/methods.md table).
fn model_row(m: Model, x: f64, y: f64) -> Vec<f64> {
    match m {
        Model::Plane => vec![1.0, x, y],
        Model::Curvature => vec![1.0, x, y, x * x + y * y],
        Model::Quadratic => vec![1.0, x, y, x * x, x * y, y * y],
    }
}

/// Independent weighted least squares by the normal equations and Gauss–Jordan
/// elimination (common practice; adequate for these well-conditioned 3- to 6-term fits):
/// returns the coefficients and the inverse of AᵀWA.
fn normal_fit(rows: &[Vec<f64>], z: &[f64], w: &[f64]) -> (Vec<f64>, Vec<Vec<f64>>) {
    let p = rows[0].len();
    // Augmented [AᵀWA | AᵀWz | I].
    let mut m = vec![vec![0.0; 2 * p + 1]; p];
    for ((r, &zi), &wi) in rows.iter().zip(z).zip(w) {
        for i in 0..p {
            for j in 0..p {
                m[i][j] += wi * r[i] * r[j];
            }
            m[i][p] += wi * r[i] * zi;
        }
    }
    for (i, row) in m.iter_mut().enumerate() {
        row[p + 1 + i] = 1.0;
    }
    for c in 0..p {
        let piv = (c..p)
            .max_by(|&a, &b| m[a][c].abs().total_cmp(&m[b][c].abs()))
            .unwrap();
        m.swap(c, piv);
        let d = m[c][c];
        for v in m[c].iter_mut() {
            *v /= d;
        }
        for r in 0..p {
            if r != c {
                let f = m[r][c];
                let src = m[c].clone();
                for (v, s) in m[r].iter_mut().zip(&src) {
                    *v -= f * s;
                }
            }
        }
    }
    let coef = m.iter().map(|r| r[p]).collect();
    let inv = m.iter().map(|r| r[p + 1..].to_vec()).collect();
    (coef, inv)
}

/// Leave-one-out scores of every station, computed independently of the core:
/// (z_i − prediction of the others) / √(σ_i² + var(prediction)) (docs/methods.md).
fn independent_loo_scores(net: &Network, origin: LatLon, m: Model) -> Vec<f64> {
    let plane = TangentPlane::new(origin);
    let xy: Vec<(f64, f64)> = net
        .stations
        .iter()
        .map(|s| {
            let (x, y) = plane.to_xy(s.pos);
            (x / 1e5, y / 1e5)
        })
        .collect();
    (0..net.len())
        .map(|i| {
            let idx: Vec<usize> = (0..net.len()).filter(|&j| j != i).collect();
            let rows: Vec<Vec<f64>> = idx
                .iter()
                .map(|&j| model_row(m, xy[j].0, xy[j].1))
                .collect();
            let z: Vec<f64> = idx.iter().map(|&j| net.stations[j].height_m).collect();
            let w: Vec<f64> = idx
                .iter()
                .map(|&j| net.stations[j].sigma().powi(-2))
                .collect();
            let (c, cov) = normal_fit(&rows, &z, &w);
            let g = model_row(m, xy[i].0, xy[i].1);
            let pred: f64 = g.iter().zip(&c).map(|(a, b)| a * b).sum();
            let mut var = 0.0;
            for a in 0..g.len() {
                for b in 0..g.len() {
                    var += g[a] * cov[a][b] * g[b];
                }
            }
            let s = net.stations[i].sigma();
            (net.stations[i].height_m - pred) / (s * s + var).sqrt()
        })
        .collect()
}

#[test]
fn leave_one_out_names_the_bad_report() {
    // Common practice (FIELD-NOTES §3): a leave-one-out residual beyond ~3σ marks a bad
    // report. Eight stations, σ 10 m, one report 60 m too high: 6σ. Each model is given a
    // field it represents exactly, so the other seven predict the bad station's true height
    // and its leave-one-out residual is the 60 m itself.
    let o = LatLon::new(45.5, -140.0).unwrap();
    let plane = Quad {
        z0: 5600.0,
        a: 3e-5,
        b: -1e-4,
        cxx: 0.0,
        cxy: 0.0,
        cyy: 0.0,
    };
    let bowl = Quad {
        cxx: 0.8e-10,
        cyy: 0.8e-10,
        ..plane
    };
    let quad = Quad {
        cxx: 0.6e-10,
        cxy: 0.2e-10,
        cyy: 0.9e-10,
        ..plane
    };
    let mut flagged = [0usize; 3];
    for (k, (m, q)) in [
        (Model::Plane, plane),
        (Model::Curvature, bowl),
        (Model::Quadratic, quad),
    ]
    .into_iter()
    .enumerate()
    {
        for bad in 0..8 {
            let mut net = network_on_plane(o, &LAYOUT_8, |x, y| q.eval(x, y), 10.0);
            net.stations[bad].height_m += 60.0;
            let fit = analyse(&net, &at_point(o, ModelChoice::Force(m))).unwrap();
            let r = fit.stations[bad].loo_residual_m.unwrap();
            assert!((r - 60.0).abs() < 1e-6, "{m:?} bad {bad}: loo residual {r}");
            // Every station's score against the independent computation.
            let want = independent_loo_scores(&net, o, m);
            for (j, (st, w)) in fit.stations.iter().zip(&want).enumerate() {
                let got = st.loo_score.unwrap();
                assert!(
                    (got - w).abs() < 1e-6 * w.abs().max(1.0),
                    "{m:?} bad {bad} station {j}: {got} vs {w}"
                );
            }
            // The suspect is the worst score beyond 3 (docs/methods.md).
            let (worst, ws) = want
                .iter()
                .enumerate()
                .max_by(|a, b| a.1.abs().total_cmp(&b.1.abs()))
                .unwrap();
            let expect = (ws.abs() > 3.0).then_some(worst as u8);
            assert_eq!(fit.suspect, expect, "{m:?} bad {bad}: {want:?}");
            if fit.suspect == Some(bad as u8) {
                flagged[k] += 1;
            }
        }
    }
    // The plane, with five spare stations, names every bad report. The curvature model
    // (four spare) and the quadratic (two spare) cannot check the stations that carry
    // the curvature alone, such as station 0 at the centre, whose prediction by the others
    // is itself uncertain by tens of metres: the 60 m error is then honestly not
    // significant. They still name most.
    assert_eq!(flagged[0], 8, "{flagged:?}");
    assert!(flagged[1] >= 6, "{flagged:?}");
    assert!(flagged[2] >= 4, "{flagged:?}");
}

#[test]
fn no_suspect_without_a_bad_report() {
    let o = LatLon::new(45.5, -140.0).unwrap();
    let net = network_on_plane(o, &LAYOUT_8, |_, y| 5600.0 - 1e-4 * y, 10.0);
    for m in [Model::Plane, Model::Curvature, Model::Quadratic] {
        let fit = analyse(&net, &at_point(o, ModelChoice::Force(m))).unwrap();
        assert_eq!(fit.suspect, None);
        for s in &fit.stations {
            assert!(s.loo_score.unwrap().abs() < 1e-6);
        }
    }
}

/// xorshift64* (Vigna 2016, from memory), with Box–Muller for Gaussian deviates.
struct Rng(u64);

impl Rng {
    fn next_u64(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    /// Uniform in (0, 1].
    fn uniform(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 1.0) / (1u64 << 53) as f64
    }
    fn gauss(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}

fn mean_std(x: &[f64]) -> (f64, f64) {
    let n = x.len() as f64;
    let m = x.iter().sum::<f64>() / n;
    let v = x.iter().map(|a| (a - m) * (a - m)).sum::<f64>() / (n - 1.0);
    (m, v.sqrt())
}

#[test]
fn rng_is_a_standard_normal() {
    // The Monte Carlo below rests on it. With 100 000 draws the mean has a standard error
    // of 0.0032 and the standard deviation one of 1/√(2·10⁵) ≈ 0.0022 (common practice).
    let mut r = Rng(0x9E37_79B9_7F4A_7C15);
    let x: Vec<f64> = (0..100_000).map(|_| r.gauss()).collect();
    let (m, s) = mean_std(&x);
    assert!(m.abs() < 0.016, "mean {m}");
    assert!((s - 1.0).abs() < 0.011, "std {s}");
}

#[test]
fn reported_sigmas_match_monte_carlo_scatter() {
    // The fit is linear in the heights, so with Gaussian height errors of the stated σ
    // each figure is Gaussian with the σ propagated from (AᵀWA)⁻¹ (FIELD-NOTES §3).
    //
    // Sampling error (common practice): the sample standard deviation of N Gaussian values
    // has a relative standard error of 1/√(2(N − 1)). With N = 5000 that is 1.0 %, so the
    // 10 % bound sits 10 standard errors out: a chance failure has a probability below
    // 1e-20. The mean has a standard error of σ/√N = 1.4 % of σ; we allow 6 of them.
    const N: usize = 5000;
    let q = Quad {
        z0: 5600.0,
        a: 3e-5,
        b: -1e-4,
        cxx: 0.6e-10,
        cxy: 0.2e-10,
        cyy: 0.9e-10,
    };
    let k_lat = 45.5;
    let o = LatLon::new(k_lat, -140.0).unwrap();
    let mut rng = Rng(0x2545_F491_4F6C_DD1D);
    // The quadratic on 8 stations (σ 10 m) and the curvature model on 6 (σ 15 m).
    for (layout, model, sigma) in [
        (&LAYOUT_8[..], Model::Quadratic, 10.0),
        (&LAYOUT_8[..6], Model::Curvature, 15.0),
    ] {
        let clean = network_on_plane(o, layout, |x, y| q.eval(x, y), sigma);
        let opts = at_point(o, ModelChoice::Force(model));
        let exact = analyse(&clean, &opts).unwrap();
        let (mut us, mut vs, mut zs) = (Vec::new(), Vec::new(), Vec::new());
        let mut net = clean.clone();
        for _ in 0..N {
            for (s, c) in net.stations.iter_mut().zip(&clean.stations) {
                s.height_m = c.height_m + sigma * rng.gauss();
            }
            let fit = analyse(&net, &opts).unwrap();
            // The stated σ depends on geometry only: the same in every trial.
            assert_eq!(fit.wind.u_ms.sigma, exact.wind.u_ms.sigma);
            us.push(fit.wind.u_ms.value);
            vs.push(fit.wind.v_ms.value);
            zs.push(fit.zeta_g.unwrap().value);
        }
        let checks = [
            ("u", &us, exact.wind.u_ms),
            ("v", &vs, exact.wind.v_ms),
            ("zeta_g", &zs, exact.zeta_g.unwrap()),
        ];
        for (name, xs, e) in checks {
            let (m, s) = mean_std(xs);
            assert!(
                (s / e.sigma - 1.0).abs() < 0.10,
                "{model:?} {name}: sample std {s:e}, reported {:e}",
                e.sigma
            );
            let se = e.sigma / (N as f64).sqrt();
            assert!(
                (m - e.value).abs() < 6.0 * se,
                "{model:?} {name}: mean {m:e} vs {:e} (se {se:e})",
                e.value
            );
        }
        // Scale: a few m/s and several 1e-5 s⁻¹ for ~300 km spacing (FIELD-NOTES §3).
        assert!(exact.wind.u_ms.sigma > 0.5 && exact.wind.u_ms.sigma < 20.0);
        let sz = exact.zeta_g.unwrap().sigma;
        assert!(sz > 3e-6 && sz < 3e-4, "σ(ζ_g) {sz:e}");
    }
}

/// A smooth wave on the plane, Z = z0 + A cos(kx + α) cos(ly + γ), and its exact
/// gradient and Laplacian at the origin.
struct Wave {
    a: f64,
    k: f64,
    l: f64,
    alpha: f64,
    gamma: f64,
}

impl Wave {
    fn z(&self, x: f64, y: f64) -> f64 {
        5600.0 + self.a * (self.k * x + self.alpha).cos() * (self.l * y + self.gamma).cos()
    }
    fn zx(&self) -> f64 {
        -self.a * self.k * self.alpha.sin() * self.gamma.cos()
    }
    fn laplacian(&self) -> f64 {
        -(self.k * self.k + self.l * self.l) * self.a * self.alpha.cos() * self.gamma.cos()
    }
}

/// Errors of the fitted ∂Z/∂x and ∇²Z for the layout scaled by `scale`.
fn wave_errors(w: &Wave, layout: &[(f64, f64)], scale: f64, model: Model) -> (f64, f64) {
    let origin = LatLon::new(45.0, 10.0).unwrap();
    let xy: Vec<(f64, f64)> = layout
        .iter()
        .map(|&(x, y)| (x * scale, y * scale))
        .collect();
    let net = network_on_plane(origin, &xy, |x, y| w.z(x, y), 10.0);
    let fit = analyse(&net, &at_point(origin, ModelChoice::Force(model))).unwrap();
    (
        (fit.dz_dx.value - w.zx()).abs(),
        (fit.laplacian.unwrap().value - w.laplacian()).abs(),
    )
}

#[test]
fn smooth_wave_errors_shrink_at_the_expected_order() {
    // Taylor series of the wave about the origin (computed): a quadratic fit absorbs terms
    // to second order, so what is left are the cubic terms, of size |∇³Z| d³ for a layout
    // of size d. They leak into the fitted gradient as O(d²) and into the fitted second
    // derivatives as O(d); on a centrally symmetric layout the odd (cubic) terms cancel in
    // the second derivatives, leaving the quartic ones: O(d²). Halving d therefore divides
    // the gradient error by about 4 and the Laplacian error by about 2 (irregular layout)
    // or about 4 (symmetric layout). Wavelength 3000 km, amplitude 60 m (a synoptic wave).
    let w = Wave {
        a: 60.0,
        k: 2.0 * std::f64::consts::PI / 3.0e6,
        l: 2.0 * std::f64::consts::PI / 3.6e6,
        alpha: 0.7,
        gamma: 0.4,
    };
    let ratio = |layout: &[(f64, f64)], model: Model| {
        let (g1, l1) = wave_errors(&w, layout, 0.25, model);
        let (g2, l2) = wave_errors(&w, layout, 0.125, model);
        (g1 / g2, l1 / l2)
    };
    let (g, l) = ratio(&LAYOUT_8, Model::Quadratic);
    assert!((3.0..=5.5).contains(&g), "gradient order: error ratio {g}");
    assert!(
        (1.6..=2.6).contains(&l),
        "Laplacian order, irregular layout: ratio {l}"
    );
    // A 3×3 grid (centrally symmetric).
    let grid: Vec<(f64, f64)> = (-1..=1)
        .flat_map(|i| (-1..=1).map(move |j| (300.0 * i as f64, 300.0 * j as f64)))
        .collect();
    let (g, l) = ratio(&grid, Model::Quadratic);
    assert!(
        (3.0..=5.5).contains(&g),
        "gradient order on the grid: ratio {g}"
    );
    assert!(
        (3.0..=5.5).contains(&l),
        "Laplacian order on the grid: ratio {l}"
    );
    // And the errors are small against the signal at ~40 km scales.
    let (_, l_small) = wave_errors(&w, &LAYOUT_8, 0.125, Model::Quadratic);
    assert!(l_small < 0.02 * w.laplacian().abs());
}
