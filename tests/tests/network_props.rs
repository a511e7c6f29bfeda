//! Property tests of the station-network fit: invariances that follow from the fit being a
//! linear weighted least squares on a rotation- and mirror-invariant model space
//! (FIELD-NOTES §3, docs/methods.md), and that no input makes it panic.

use leeward_core::geo::{LatLon, TangentPlane};
use leeward_core::network::{
    analyse, FitOptions, Model, ModelChoice, Network, NetworkFit, Reference, Station,
};
use proptest::prelude::*;

/// One generated case: reference point, plane positions (m) and heights (m).
#[derive(Debug, Clone)]
struct Case {
    lat: f64,
    lon: f64,
    xy: Vec<(f64, f64)>,
    z: Vec<f64>,
    model: Model,
}

/// Stations spread round the reference point (evenly in angle with jitter, 150–600 km
/// out: a radiosonde-like network, so the geometry is well conditioned), heights from a
/// quadratic synoptic field plus ±20 m of report error.
fn case() -> impl Strategy<Value = Case> {
    (
        20.0..70.0f64,
        -170.0..170.0f64,
        6usize..=12,
        prop::array::uniform6(-1.0..1.0f64),
        prop::collection::vec((-0.3..0.3f64, 150_000.0..600_000.0f64, -20.0..20.0f64), 12),
        0usize..3,
    )
        .prop_map(|(lat, lon, n, c, st, m)| {
            let mut xy = Vec::new();
            let mut z = Vec::new();
            for (i, &(jit, r, err)) in st.iter().take(n).enumerate() {
                let t = (i as f64 + jit) * 2.0 * std::f64::consts::PI / n as f64;
                let (x, y) = (r * t.cos(), r * t.sin());
                xy.push((x, y));
                // Gradient up to 1.5e-4 (~15 m/s), curvature up to 1.5e-10 m/m².
                z.push(
                    5600.0
                        + 1.5e-4 * (c[0] * x + c[1] * y)
                        + 1.5e-10 * (c[2] * x * x + c[3] * x * y + c[4] * y * y)
                        + err,
                );
            }
            let model = [Model::Plane, Model::Curvature, Model::Quadratic][m];
            Case {
                lat,
                lon,
                xy,
                z,
                model,
            }
        })
}

fn build(origin: LatLon, xy: &[(f64, f64)], z: &[f64]) -> Network {
    let plane = TangentPlane::new(origin);
    let mut net = Network::new();
    for (i, (&(x, y), &h)) in xy.iter().zip(z).enumerate() {
        let p = plane.to_latlon(x, y);
        net.push(Station::new(&format!("P{i}"), p.lat_deg, p.lon_deg, h, Some(12.0)).unwrap())
            .unwrap();
    }
    net
}

fn fit(c: &Case, origin: LatLon, net: &Network) -> Result<NetworkFit, leeward_core::Error> {
    analyse(
        net,
        &FitOptions {
            model: ModelChoice::Force(c.model),
            reference: Reference::Point(origin),
        },
    )
}

/// Wind tolerance, m/s: rounding of the solve (~1e-9 m/s, see network_analytic.rs) plus
/// the lat/lon round trip of rotated or mirrored positions (~1e-8 m of position).
const WIND_TOL: f64 = 1e-6;
/// ζ tolerance, s⁻¹ (likewise: 1e-7 of a synoptic ζ).
const ZETA_TOL: f64 = 1e-12;

fn zeta(f: &NetworkFit) -> f64 {
    f.zeta_g.map_or(0.0, |e| e.value)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn adding_a_constant_changes_no_wind_or_vorticity(c in case(), k in -800.0..800.0f64) {
        let o = LatLon::new(c.lat, c.lon).unwrap();
        let a = fit(&c, o, &build(o, &c.xy, &c.z));
        prop_assume!(a.is_ok());
        let a = a.unwrap();
        let z2: Vec<f64> = c.z.iter().map(|h| h + k).collect();
        let b = fit(&c, o, &build(o, &c.xy, &z2)).unwrap();
        prop_assert!((a.wind.u_ms.value - b.wind.u_ms.value).abs() < WIND_TOL);
        prop_assert!((a.wind.v_ms.value - b.wind.v_ms.value).abs() < WIND_TOL);
        prop_assert!((zeta(&a) - zeta(&b)).abs() < ZETA_TOL);
        // The stated errors depend on the geometry only.
        prop_assert_eq!(a.wind.u_ms.sigma, b.wind.u_ms.sigma);
        prop_assert!((b.height_m.value - a.height_m.value - k).abs() < 1e-6);
    }

    #[test]
    fn scaling_heights_scales_wind_and_vorticity(c in case(), k in 0.2..4.0f64) {
        // Linear in the heights: Z → kZ gives u → ku, ζ → kζ (FIELD-NOTES §3).
        let o = LatLon::new(c.lat, c.lon).unwrap();
        let a = fit(&c, o, &build(o, &c.xy, &c.z));
        prop_assume!(a.is_ok());
        let a = a.unwrap();
        let z2: Vec<f64> = c.z.iter().map(|h| h * k).collect();
        let b = fit(&c, o, &build(o, &c.xy, &z2)).unwrap();
        prop_assert!((b.wind.u_ms.value - k * a.wind.u_ms.value).abs() < k * WIND_TOL);
        prop_assert!((b.wind.v_ms.value - k * a.wind.v_ms.value).abs() < k * WIND_TOL);
        prop_assert!((b.wind.speed_ms.value - k * a.wind.speed_ms.value).abs() < k * WIND_TOL);
        prop_assert!((zeta(&b) - k * zeta(&a)).abs() < k * ZETA_TOL);
    }

    #[test]
    fn southern_hemisphere_mirror(c in case()) {
        // Stations mirrored to −φ with the same heights: Z'(x, y) = Z(x, −y), f' = −f, so
        // u' = −(g0/f')∂Z'/∂y = u, v' = (g0/f')∂Z'/∂x = −v, ζ' = (g0/f')∇²Z' = −ζ
        // (computed from FIELD-NOTES §3); ζ'/f' = ζ/f keeps the word.
        let o = LatLon::new(c.lat, c.lon).unwrap();
        let net = build(o, &c.xy, &c.z);
        let a = fit(&c, o, &net);
        prop_assume!(a.is_ok());
        let a = a.unwrap();
        let mut mir = Network::new();
        for s in &net.stations {
            let mut m = s.clone();
            m.pos.lat_deg = -s.pos.lat_deg;
            mir.push(m).unwrap();
        }
        let om = LatLon::new(-c.lat, c.lon).unwrap();
        let b = fit(&c, om, &mir).unwrap();
        prop_assert!((a.f0 + b.f0).abs() < 1e-18 && a.f0 > 0.0);
        prop_assert!((a.beta0 - b.beta0).abs() < 1e-24);
        prop_assert!((a.wind.u_ms.value - b.wind.u_ms.value).abs() < WIND_TOL);
        prop_assert!((a.wind.v_ms.value + b.wind.v_ms.value).abs() < WIND_TOL);
        prop_assert!((zeta(&a) + zeta(&b)).abs() < ZETA_TOL);
        prop_assert_eq!(a.sense, b.sense);
        prop_assert_eq!(a.model, b.model);
        // Also with the centroid as reference.
        let ac = analyse(&net, &FitOptions { model: ModelChoice::Force(c.model), ..FitOptions::default() });
        let bc = analyse(&mir, &FitOptions { model: ModelChoice::Force(c.model), ..FitOptions::default() });
        if let (Ok(ac), Ok(bc)) = (ac, bc) {
            prop_assert!((ac.reference.lat_deg + bc.reference.lat_deg).abs() < 1e-9);
            prop_assert!((ac.wind.u_ms.value - bc.wind.u_ms.value).abs() < WIND_TOL);
            prop_assert!((zeta(&ac) + zeta(&bc)).abs() < ZETA_TOL);
            prop_assert_eq!(ac.sense, bc.sense);
        }
    }

    #[test]
    fn rotating_the_layout_keeps_vorticity_and_speed(c in case(), turn in 0.0..360.0f64) {
        // Each station keeps its height while the layout turns about the reference point:
        // the fitted field turns with it. ∇²Z and |∇Z| are rotation invariants, and the
        // model spaces are closed under rotation (computed), so ζ_g and speed are unchanged.
        let o = LatLon::new(c.lat, c.lon).unwrap();
        let a = fit(&c, o, &build(o, &c.xy, &c.z));
        prop_assume!(a.is_ok());
        let a = a.unwrap();
        let (s, co) = turn.to_radians().sin_cos();
        let rxy: Vec<(f64, f64)> = c.xy.iter().map(|&(x, y)| (co * x - s * y, s * x + co * y)).collect();
        let b = fit(&c, o, &build(o, &rxy, &c.z)).unwrap();
        prop_assert!((a.wind.speed_ms.value - b.wind.speed_ms.value).abs() < WIND_TOL,
            "speed {} vs {}", a.wind.speed_ms.value, b.wind.speed_ms.value);
        prop_assert!((zeta(&a) - zeta(&b)).abs() < ZETA_TOL, "ζ {} vs {}", zeta(&a), zeta(&b));
        if let (Some(za), Some(zb)) = (a.zeta_g, b.zeta_g) {
            prop_assert!((za.sigma - zb.sigma).abs() < 1e-9 * za.sigma);
        }
        // The wind turns with the layout: its direction (clockwise) falls by `turn`
        // (counter-clockwise), when the wind is strong enough to have one.
        if a.wind.speed_ms.value > 1.0 {
            let d = (b.wind.dir_from_deg.value - (a.wind.dir_from_deg.value - turn) + 540.0)
                .rem_euclid(360.0) - 180.0;
            prop_assert!(d.abs() < 1e-6, "dir {} vs {} − {turn}", b.wind.dir_from_deg.value,
                a.wind.dir_from_deg.value);
        }
    }
}

/// Any f64, weighted towards the awkward ones.
fn awkward() -> impl Strategy<Value = f64> {
    prop_oneof![
        Just(f64::NAN),
        Just(f64::INFINITY),
        Just(f64::NEG_INFINITY),
        Just(1e300),
        Just(-1e300),
        Just(0.0),
        Just(f64::MIN_POSITIVE),
        any::<f64>(),
        -100.0..100.0f64,
        5000.0..6000.0f64,
    ]
}

fn all_finite(f: &NetworkFit) -> bool {
    let mut v = vec![
        f.f0,
        f.height_m.value,
        f.height_m.sigma,
        f.wind.u_ms.value,
        f.wind.u_ms.sigma,
        f.wind.v_ms.value,
        f.wind.v_ms.sigma,
        f.wind.speed_ms.value,
        f.wind.dir_from_deg.value,
        f.residual_rms_m,
    ];
    if let Some(z) = f.zeta_g {
        v.extend([z.value, z.sigma]);
    }
    v.iter().all(|x| x.is_finite())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn station_reports_never_panic(
        lat in awkward(), lon in awkward(), h in awkward(), s in awkward(),
    ) {
        // Every input gives a value: a station or an error (DEVELOPERS.md: no panics).
        let _ = Station::new("AB1", lat, lon, h, Some(s));
        let _ = Station::new("", lat, lon, h, None);
        let _ = Station::new("TOOLONGID", lat, lon, h, None);
    }

    #[test]
    fn checked_networks_never_panic_and_give_finite_figures(
        pts in prop::collection::vec((awkward(), awkward(), awkward(), awkward()), 0..34),
        dup in 0usize..34,
        rlat in awkward(), rlon in awkward(),
        m in 0usize..4,
    ) {
        // Stations through Station::new (rejected ones dropped), some repeated; any
        // reference point; any model. An Ok answer must hold finite figures.
        let mut net = Network::new();
        for (i, &(la, lo, h, s)) in pts.iter().enumerate() {
            if let Ok(st) = Station::new(&format!("Q{i}"), la, lo, h, Some(s)) {
                let _ = net.push(st);
            }
        }
        if let Some(s) = net.stations.get(dup % net.len().max(1)).cloned() {
            let _ = net.push(s);
        }
        let model = [ModelChoice::Auto, ModelChoice::Force(Model::Plane),
            ModelChoice::Force(Model::Curvature), ModelChoice::Force(Model::Quadratic)][m];
        for reference in [Reference::Centroid, Reference::Point(LatLon { lat_deg: rlat, lon_deg: rlon })] {
            if let Ok(f) = analyse(&net, &FitOptions { model, reference }) {
                prop_assert!(all_finite(&f), "{f:?}");
            }
        }
    }

    #[test]
    fn raw_station_values_never_panic(
        pts in prop::collection::vec((awkward(), awkward(), awkward(), prop::option::of(awkward())), 0..33),
        m in 0usize..4,
    ) {
        // Station's fields are public: a caller can bypass Station::new. The fit must still
        // answer with a value (DEVELOPERS.md: the core never panics).
        let mut net = Network::new();
        for (i, &(la, lo, h, s)) in pts.iter().enumerate() {
            let mut st = Station::new(&format!("R{i}"), 45.0, 10.0 + 0.1 * i as f64, 5600.0, None).unwrap();
            st.pos = LatLon { lat_deg: la, lon_deg: lo };
            st.height_m = h;
            st.sigma_m = s;
            let _ = net.push(st);
        }
        let model = [ModelChoice::Auto, ModelChoice::Force(Model::Plane),
            ModelChoice::Force(Model::Curvature), ModelChoice::Force(Model::Quadratic)][m];
        let _ = analyse(&net, &FitOptions { model, ..FitOptions::default() });
    }
}

#[test]
fn duplicate_points_are_an_error_not_a_panic() {
    let o = LatLon::new(45.0, 0.0).unwrap();
    let mut net = Network::new();
    for i in 0..6 {
        net.push(Station::new(&format!("D{i}"), o.lat_deg, o.lon_deg, 5600.0, None).unwrap())
            .unwrap();
    }
    assert!(matches!(
        analyse(&net, &FitOptions::default()),
        Err(leeward_core::Error::DuplicateStation { index: 1, other: 0 })
    ));
}
