//! Column stretching (`column`) and Rossby-wave figures (`rossby`) against FIELD-NOTES §4–5,
//! with the arithmetic of each hand-worked value written beside it ("computed", constants
//! of FIELD-NOTES §1: Ω = 7.292115e-5 s⁻¹, a = 6 371 008.8 m).

use leeward_core::column::{column_depth, depth_for_vorticity, potential_vorticity, stretch};
use leeward_core::rossby::{rossby, stationary_wavelength};
use leeward_core::rotation::Sense;
use leeward_core::Error;
use std::f64::consts::PI;

const OMEGA: f64 = 7.292115e-5;
const A: f64 = 6_371_008.8;

fn f_at(lat: f64) -> f64 {
    2.0 * OMEGA * lat.to_radians().sin()
}

fn beta_at(lat: f64) -> f64 {
    2.0 * OMEGA * lat.to_radians().cos() / A
}

fn close(got: f64, want: f64, rel: f64) -> bool {
    (got - want).abs() <= rel * want.abs()
}

#[test]
fn stretching_solve_and_its_inverse_round_trip() {
    // FIELD-NOTES §4: ζ2 = (ζ1 + f1)H2/H1 − f2 and H2 = H1(ζ2 + f2)/(ζ1 + f1) invert each
    // other exactly; only rounding (~1e-16 relative) separates them.
    let cases = [
        (45.5, 1.2e-5, 9000.0, 43.0, 10_500.0),
        (45.0, 0.0, 10_000.0, 45.0, 7_500.0),
        (60.0, -3e-5, 8000.0, 50.0, 8000.0),
        (-38.0, 2e-5, 9500.0, -41.0, 7200.0),
        (-70.0, -1e-5, 11_000.0, -65.0, 12_000.0),
        (20.0, 5e-6, 12_000.0, 25.0, 9000.0),
    ];
    for (lat1, z1, h1, lat2, h2) in cases {
        let s = stretch(lat1, z1, h1, lat2, h2).unwrap();
        let inv = depth_for_vorticity(lat1, z1, h1, lat2, s.end.zeta).unwrap();
        assert!(close(inv.end.depth_m, h2, 1e-12), "{inv:?}");
        assert!(close(inv.pv, s.pv, 1e-15));
        // And from the inverse back to ζ.
        let again = stretch(lat1, z1, h1, lat2, inv.end.depth_m).unwrap();
        assert!((again.end.zeta - s.end.zeta).abs() < 1e-18);
        // q is the same at both ends (computed from the returned states).
        let q1 = (s.start.zeta + f_at(lat1)) / h1;
        let q2 = (s.end.zeta + f_at(lat2)) / h2;
        assert!(close(q2, q1, 1e-12) && close(s.pv, q1, 1e-12));
        assert!((s.zeta_change - (s.end.zeta - z1)).abs() < 1e-20);
    }
}

#[test]
fn fixed_depth_conserves_absolute_vorticity() {
    // FIELD-NOTES §4: with H fixed, ζ + f is conserved.
    for (lat1, z1, lat2) in [
        (50.0, 2e-5, 40.0),
        (30.0, -1e-5, 55.0),
        (-45.0, 3e-5, -60.0),
    ] {
        let s = stretch(lat1, z1, 8000.0, lat2, 8000.0).unwrap();
        let want = z1 + f_at(lat1) - f_at(lat2);
        assert!(
            (s.end.zeta - want).abs() < 1e-18,
            "{} vs {want}",
            s.end.zeta
        );
        assert!((s.end.abs_vorticity - s.start.abs_vorticity).abs() < 1e-18);
    }
}

#[test]
fn hand_worked_examples() {
    // 1. Computed: a column at rest (ζ1 = 0) at 45° moves to 40° at fixed depth.
    //    f(45°) = 2 · 7.292115e-5 · 0.7071068 = 1.031261e-4 s⁻¹;
    //    f(40°) = 2 · 7.292115e-5 · 0.6427876 = 9.374562e-5 s⁻¹;
    //    ζ2 = f(45°) − f(40°) = 9.3805e-6 s⁻¹, cyclonic (equatorward drift spins it up).
    let s = stretch(45.0, 0.0, 8000.0, 40.0, 8000.0).unwrap();
    assert!(close(s.start.f, 1.031261e-4, 1e-6));
    assert!(close(s.end.f, 9.374562e-5, 1e-6));
    assert!(close(s.end.zeta, 9.3805e-6, 1e-4), "{}", s.end.zeta);
    assert_eq!(s.end.sense, Sense::Cyclonic);
    assert_eq!(s.change_sense, Sense::Cyclonic);

    // 2. Computed: squashed from 10 km to 8 km at 45° with ζ1 = 1e-5 s⁻¹:
    //    ζ2 = (1e-5 + 1.031261e-4) · 0.8 − 1.031261e-4 = 9.050086e-5 − 1.031261e-4
    //       = −1.26252e-5 s⁻¹: anticyclonic, a change of −2.26252e-5 s⁻¹.
    let s = stretch(45.0, 1e-5, 10_000.0, 45.0, 8000.0).unwrap();
    assert!(close(s.end.zeta, -1.26252e-5, 1e-5), "{}", s.end.zeta);
    assert!(close(s.zeta_change, -2.26252e-5, 1e-5));
    assert_eq!(s.end.sense, Sense::Anticyclonic);
    assert_eq!(s.change_sense, Sense::Anticyclonic);

    // 3. Computed: the depth at 40° that keeps a 10 km column from 45° (ζ1 = 0) at ζ2 = 0:
    //    H2 = 10 000 · f(40°)/f(45°) = 10 000 · 0.6427876/0.7071068 = 9090.39 m.
    let s = depth_for_vorticity(45.0, 0.0, 10_000.0, 40.0, 0.0).unwrap();
    assert!((s.end.depth_m - 9090.39).abs() < 0.01, "{}", s.end.depth_m);

    // 4. Computed, Southern Hemisphere: squashed by 10 % at 45°S from rest:
    //    ζ2 = f(−45°)(0.9 − 1) = −1.031261e-4 · (−0.1) = +1.031261e-5 s⁻¹. Positive, yet
    //    anticyclonic, because f < 0 there (FIELD-NOTES §2).
    let s = stretch(-45.0, 0.0, 10_000.0, -45.0, 9000.0).unwrap();
    assert!(close(s.end.zeta, 1.031261e-5, 1e-5), "{}", s.end.zeta);
    assert_eq!(s.end.sense, Sense::Anticyclonic);

    // 5. Computed: q = (ζ + f)/H = (2e-5 + 1.031261e-4)/9000 = 1.368068e-8 m⁻¹ s⁻¹ at 45°.
    let q = potential_vorticity(2e-5, f_at(45.0), 9000.0).unwrap();
    assert!(close(q, 1.368068e-8, 1e-6), "{q}");

    // 6. Computed: the Tessel Col column, lid 10 800 m over ground at 1850 m: 8950 m.
    assert_eq!(column_depth(1850.0, 10_800.0).unwrap(), 8950.0);
}

#[test]
fn column_refusals() {
    // A start with ζ + f against f is inertially unstable (docs/methods.md).
    assert!(matches!(
        stretch(45.0, -1.1e-4, 9000.0, 45.0, 9000.0),
        Err(Error::InertiallyUnstable { .. })
    ));
    assert!(matches!(
        stretch(-45.0, 1.1e-4, 9000.0, -45.0, 9000.0),
        Err(Error::InertiallyUnstable { .. })
    ));
    // |ζ| above 1.5e-3 s⁻¹ and depths below 1 m are refused (choices, docs/methods.md).
    assert!(matches!(
        stretch(45.0, 2e-3, 9000.0, 45.0, 9000.0),
        Err(Error::OutOfRange { .. })
    ));
    assert!(matches!(
        stretch(45.0, 0.0, 0.5, 45.0, 9000.0),
        Err(Error::DepthNotPositive { .. })
    ));
    assert!(matches!(
        stretch(45.0, 0.0, 9000.0, 45.0, f64::INFINITY),
        Err(Error::NotFinite { .. })
    ));
    assert!(matches!(
        stretch(45.0, 0.0, 9000.0, 91.0, 9000.0),
        Err(Error::OutOfRange { .. })
    ));
    // The inverse: a wanted ζ2 + f2 against f2 has no positive depth.
    assert_eq!(
        depth_for_vorticity(45.0, 0.0, 9000.0, 45.0, -1.2e-4),
        Err(Error::NoDepthForVorticity)
    );
    assert!(matches!(
        potential_vorticity(f64::NAN, 1e-4, 9000.0),
        Err(Error::NotFinite { .. })
    ));
    assert!(column_depth(3000.0, 2999.5).is_err());
}

#[test]
fn stationary_wavelength_at_15_ms_and_45_degrees() {
    // FIELD-NOTES §5, computed: β(45°) = 2 · 7.292115e-5 · 0.7071068 / 6 371 008.8
    // = 1.618677e-11 m⁻¹ s⁻¹; L_s = 2π √(15 / 1.618677e-11) = 2π · 962 643 = 6 048 467 m,
    // "about 6050 km".
    assert!(close(beta_at(45.0), 1.618677e-11, 1e-6));
    let l = stationary_wavelength(45.0, 15.0).unwrap();
    assert!((l - 6_048_467.0).abs() < 10.0, "{l}");
    assert!((l / 6_050_000.0 - 1.0).abs() < 0.001);
    let w = rossby(45.0, 15.0, None).unwrap();
    assert_eq!(w.stationary_wavelength_m, Some(l));
    assert!(close(w.beta, 1.618677e-11, 1e-6));
    assert_eq!(w.phase_speed_ms, None);
    // L_s grows as √U (computed from the formula): four times the wind, twice the length.
    let l4 = stationary_wavelength(45.0, 60.0).unwrap();
    assert!(close(l4, 2.0 * l, 1e-12));
    // No stationary wave in easterly or calm flow.
    assert_eq!(stationary_wavelength(45.0, -10.0), None);
    assert_eq!(stationary_wavelength(45.0, 0.0), None);
    assert_eq!(
        rossby(45.0, -10.0, None).unwrap().stationary_wavelength_m,
        None
    );
}

#[test]
fn rossby_haurwitz_phase_speed() {
    // FIELD-NOTES §5: c = U − β/K², stationary at K_s = √(β/U).
    for (lat, u) in [(45.0, 15.0), (30.0, 25.0), (-50.0, 10.0), (60.0, 40.0)] {
        let b = beta_at(lat);
        let ks = (b / u).sqrt();
        let ls = 2.0 * PI / ks;
        let c = rossby(lat, u, Some(ls)).unwrap().phase_speed_ms.unwrap();
        assert!(c.abs() < 1e-9 * u, "lat {lat} U {u}: c = {c}");
        // Computed: at twice L_s, K = K_s/2, c = U − 4β/K_s² = U − 4U = −3U (retrogression);
        // at half L_s, K = 2K_s, c = U − U/4 = 0.75 U.
        let c2 = rossby(lat, u, Some(2.0 * ls))
            .unwrap()
            .phase_speed_ms
            .unwrap();
        assert!((c2 + 3.0 * u).abs() < 1e-9 * u, "{c2}");
        let ch = rossby(lat, u, Some(0.5 * ls))
            .unwrap()
            .phase_speed_ms
            .unwrap();
        assert!((ch - 0.75 * u).abs() < 1e-9 * u, "{ch}");
    }
    // Computed at 45° and 15 m/s for a 4000 km wave: β L²/(4π²) = 1.618677e-11 · 1.6e13 /
    // 39.478 = 6.560 m/s, c = 15 − 6.560 = 8.440 m/s.
    let c = rossby(45.0, 15.0, Some(4.0e6))
        .unwrap()
        .phase_speed_ms
        .unwrap();
    assert!((c - 8.440).abs() < 1e-3, "{c}");
    // Refusals: near the equator, a wind out of range, a wavelength out of range.
    assert!(matches!(
        rossby(3.0, 10.0, None),
        Err(Error::NearEquator { .. })
    ));
    assert!(rossby(45.0, 200.0, None).is_err());
    assert!(rossby(45.0, 10.0, Some(1.0)).is_err());
    assert!(rossby(45.0, f64::NAN, None).is_err());
}
