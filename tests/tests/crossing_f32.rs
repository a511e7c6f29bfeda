//! The f32 track (`crossing::run_f32`, what the device computes) against the f64 one
//! (`crossing::run`, the reference): a differential test over latitudes, winds, ridge
//! heights and widths, and the measurement behind the decision in docs/performance.md
//! ("f32 against f64"). Run with `--nocapture` to see the worst differences found.
//!
//! Tolerances, and why they are enough: the inputs the device takes (a wind to 0.1 m/s,
//! a lid from a sounding good to tens of metres, a ridge described by three numbers)
//! move the lee trough by kilometres to tens of kilometres, and the track is integrated
//! in 5 km steps, so a trough is known to a step at best; where ζ's maximum is flat
//! (long waves, strong winds) f32's rounding can pick a neighbouring step. So:
//! - a trough within two steps (10 km) or 0.1 % of the linear stationary wavelength,
//!   whichever is larger, with ζ there within 0.1 % of the track's signal (the largest
//!   |ζ − ζ_start|): the same flat top, not another trough; a wavelength within twice that;
//! - every point of the track within 0.1 % of its path length, and the trough's
//!   displacement north within 0.1 % of the trough's path length beyond the trough's
//!   own shift along the track;
//! - ζ everywhere, and the most anticyclonic ζ, within 1 % of the track's signal;
//! - where f64's lee trough is a bump of ζ shallower than f32's hysteresis for extremes
//!   (`EXTREME_HYSTERESIS_F32`, 1e-9 /s, a ten-thousandth of f), f32 passes over it and
//!   calls the next maximum the trough (or finds none): a matter of what counts as a
//!   trough, not of rounding, so only the tracks are compared then;
//! - the same outcome: troughs found or not, and the same end (except for a trough
//!   within 2 % of the wavelength of the track's end: f32's larger hysteresis confirms a
//!   maximum a little later, so one precision may find it and the other run out of track).
//!
//! On a track so sensitive that f32's differences exceed these (a tall, wide ridge at
//! high latitude, where the track runs far towards the pole), they must still be smaller
//! than those that half a unit of the wind's last digit on the form (0.05 m/s) makes in
//! the f64 track: f32 then adds less doubt than the input already holds.
//!
//! Measured by the sweep below (525 tracks, run to the second trough, up to 16 000 km;
//! docs/performance.md): worst trough shift 9.9 km (a strong wind: a flat maximum),
//! wavelength 10.0 km, points 5.9e-4 of the path, ζ 1.7e-3 of the signal, ζ at the
//! trough 4.6e-5 of it.

use leeward_core::crossing::{
    run, run_f32, Crossing, CrossingInput, Profile, Ridge, TrackPoint, EXTREME_HYSTERESIS_F32,
};
use leeward_core::geo::{distance_m, LatLon};
use proptest::prelude::*;

/// Trough shift allowed: two 5 km steps, m …
const TROUGH_STEPS_M: f64 = 10_000.0;
/// … or this fraction of the linear stationary wavelength, whichever is larger.
const TROUGH_TOL_REL: f64 = 1e-3;
/// Distance allowed between the two tracks' points, as a fraction of the path length.
const POINT_TOL_REL: f64 = 1e-3;
/// Largest difference of ζ, as a fraction of the track's largest |ζ − ζ_start|.
const ZETA_TOL_REL: f64 = 0.01;
/// A trough within this fraction of the stationary wavelength of the track's end may be
/// found by one precision only (see `diff`).
const END_TOL_REL: f64 = 0.02;
/// Largest difference of ζ at the trough, the same way.
const TROUGH_ZETA_TOL_REL: f64 = 1e-3;

fn input(lat: f64, speed: f64, dir: f64, crest: f64, half_width: f64) -> CrossingInput {
    let ridge = Ridge {
        profile: Profile::Bell {
            base_m: 300.0,
            crest_m: crest,
            half_width_m: half_width,
        },
        axis_deg: 0.0,
        anchor: LatLon::new(lat, -140.0).unwrap(),
    };
    let lid = (crest + 2000.0).max(10_800.0);
    CrossingInput::new(ridge, speed, dir, lid)
}

/// A crossing's result and every point of its track.
type Run = (Crossing, Vec<TrackPoint>);

/// The f64 and the f32 run of one input (`None` when the core refuses it).
fn both(c: &CrossingInput) -> Option<(Run, Run)> {
    let mut p64 = Vec::new();
    let r64 = run(c, &mut |p: &TrackPoint| p64.push(*p)).ok()?;
    let mut p32 = Vec::new();
    let r32 = run_f32(c, &mut |p: &TrackPoint| p32.push(*p)).unwrap();
    Some(((r64, p64), (r32, p32)))
}

/// The differences of one case.
#[derive(Default, Debug, Clone, Copy)]
struct Diff {
    trough_m: f64,
    displacement_m: f64,
    trough_zeta_rel: f64,
    wavelength_m: f64,
    second_trough_m: f64,
    point_m: f64,
    point_rel: f64,
    zeta_rel: f64,
    heading_deg: f64,
    anti_zeta_rel: f64,
    same_outcome: bool,
    /// The trough shift allowed for this track, m.
    trough_tol_m: f64,
    /// The displacement difference over the trough's path length.
    displacement_rel: f64,
    /// f64's lee trough is a bump of ζ shallower than f32's hysteresis (see `diff`).
    shallow: bool,
}

fn diff(c: &CrossingInput) -> Option<Diff> {
    let ((a, pa), (b, pb)) = both(c)?;
    Some(compare((&a, &pa), (&b, &pb)))
}

/// The differences between the f64 track and the f64 track with the wind 0.05 m/s
/// stronger: what half the resolution of the wind the form takes (0.1 m/s) does.
fn perturbed(c: &CrossingInput) -> Diff {
    let mut pa = Vec::new();
    let a = run(c, &mut |p: &TrackPoint| pa.push(*p)).unwrap();
    let mut c2 = c.clone();
    c2.wind_speed_ms += 0.05;
    let mut pb = Vec::new();
    let b = run(&c2, &mut |p: &TrackPoint| pb.push(*p)).unwrap();
    compare((&a, &pa), (&b, &pb))
}

/// f32's differences are within the tolerances, or, on a track so sensitive that they
/// are not, smaller than those of half a unit of the wind's last digit.
fn acceptable(c: &CrossingInput, d: &Diff) -> bool {
    if within(d) {
        return true;
    }
    let p = perturbed(c);
    d.same_outcome
        && d.point_rel <= p.point_rel
        && d.zeta_rel <= p.zeta_rel.max(ZETA_TOL_REL)
        && (d.shallow
            || (d.trough_m <= p.trough_m.max(d.trough_tol_m)
                && d.second_trough_m <= p.second_trough_m.max(d.trough_tol_m)
                && d.wavelength_m <= p.wavelength_m.max(2.0 * d.trough_tol_m)
                && d.displacement_rel <= p.displacement_rel.max(POINT_TOL_REL)
                && d.trough_zeta_rel <= p.trough_zeta_rel.max(TROUGH_ZETA_TOL_REL)))
}

/// The differences of track `b` from track `a` (results and every point).
fn compare((a, pa): (&Crossing, &[TrackPoint]), (b, pb): (&Crossing, &[TrackPoint])) -> Diff {
    let z0 = a.start.zeta;
    let signal = pa
        .iter()
        .map(|p| (p.zeta - z0).abs())
        .fold(0.0f64, f64::max)
        .max(1e-12);
    // A trough is confirmed once ζ has fallen by the hysteresis past it, which f32's
    // larger hysteresis takes further to reach: a trough this close to the end of the
    // track may be found by one precision only (then the tracks end differently too).
    let near_end = a.stationary_wavelength_m.map_or(0.0, |l| END_TOL_REL * l);
    let s_end = a.end.s_m.max(b.end.s_m);
    // And f32 passes over a maximum that stands less than its hysteresis above what
    // follows it: f64 may find such a trough where f32 finds none (see below).
    let hemi = a.start.f.signum();
    let shallow_at = |s: f64| {
        let Some(top) = pa.iter().find(|p| p.s_m == s).map(|p| p.zeta * hemi) else {
            return false;
        };
        let mut low = top;
        for p in pa.iter().filter(|p| p.s_m > s) {
            let z = p.zeta * hemi;
            if z > top {
                break;
            }
            low = low.min(z);
        }
        top - low < 2.0 * EXTREME_HYSTERESIS_F32
    };
    let alike = |x: Result<f64, _>, y: Result<f64, _>| match (x, y) {
        (Ok(_), Ok(_)) | (Err(_), Err(_)) => true,
        (Ok(s), Err(_)) => s_end - s <= near_end || shallow_at(s),
        (Err(_), Ok(s)) => s_end - s <= near_end,
    };
    let s_of = |t: Result<leeward_core::crossing::Trough, _>| t.map(|t| t.point.s_m);
    let second_alike = alike(s_of(a.second_trough), s_of(b.second_trough));
    let mut d = Diff {
        same_outcome: alike(s_of(a.trough), s_of(b.trough))
            && second_alike
            && (a.ended == b.ended || a.second_trough.is_ok() != b.second_trough.is_ok()),
        // (Over tracks of the same length: a longer one may reach a stronger one.)
        anti_zeta_rel: if a.steps == b.steps {
            (a.most_anticyclonic_zeta - b.most_anticyclonic_zeta).abs() / signal
        } else {
            0.0
        },
        trough_tol_m: a
            .stationary_wavelength_m
            .map_or(TROUGH_STEPS_M, |l| (TROUGH_TOL_REL * l).max(TROUGH_STEPS_M)),
        ..Diff::default()
    };
    // f32's larger hysteresis passes over a maximum of ζ that stands less than it above
    // the following minimum; f64 may call such a bump the lee trough. Then the troughs
    // differ by definition, not by rounding: say so, and compare the tracks only.
    if let (Ok(x), Ok(y)) = (a.trough, b.trough) {
        let (s1, s2) = (x.point.s_m.min(y.point.s_m), x.point.s_m.max(y.point.s_m));
        let top = x.point.zeta * hemi;
        let low = pa
            .iter()
            .filter(|p| p.s_m > s1 && p.s_m < s2)
            .map(|p| p.zeta * hemi)
            .fold(top, f64::min);
        if y.point.s_m > x.point.s_m && top - low < EXTREME_HYSTERESIS_F32 {
            d.shallow = true;
            compare_points(&mut d, pa, pb, signal);
            return d;
        }
    }
    if let (Ok(x), Ok(y)) = (a.trough, b.trough) {
        d.trough_m = (x.axis_distance_m - y.axis_distance_m).abs();
        d.displacement_m = (x.displacement_north_m - y.displacement_north_m).abs();
        // Beyond what the trough's own shift along the track accounts for.
        d.displacement_rel = (d.displacement_m - d.trough_m).max(0.0) / x.point.s_m.max(1.0);
        d.trough_zeta_rel = (x.point.zeta - y.point.zeta).abs() / signal;
    }
    if let (Ok(x), Ok(y)) = (a.second_trough, b.second_trough) {
        d.second_trough_m = (x.axis_distance_m - y.axis_distance_m).abs();
    }
    if let (Ok(x), Ok(y)) = (a.wavelength_m, b.wavelength_m) {
        d.wavelength_m = (x - y).abs();
    }
    compare_points(&mut d, pa, pb, signal);
    for (p, q) in pa.iter().zip(pb) {
        let dh = (p.heading_deg - q.heading_deg).abs();
        d.heading_deg = d.heading_deg.max(dh.min(360.0 - dh));
    }
    d
}

/// The worst distance apart of the tracks' points (absolute and per path length) and of
/// their ζ (per the track's signal), step by step.
fn compare_points(d: &mut Diff, pa: &[TrackPoint], pb: &[TrackPoint], signal: f64) {
    for (p, q) in pa.iter().zip(pb) {
        let apart = distance_m(p.pos, q.pos);
        d.point_m = d.point_m.max(apart);
        if p.s_m > 0.0 {
            d.point_rel = d.point_rel.max(apart / p.s_m);
        }
        d.zeta_rel = d.zeta_rel.max((p.zeta - q.zeta).abs() / signal);
    }
}

fn within(d: &Diff) -> bool {
    let tracks = d.point_rel <= POINT_TOL_REL && d.zeta_rel <= ZETA_TOL_REL;
    if d.shallow {
        return tracks;
    }
    tracks
        && d.same_outcome
        && d.trough_m <= d.trough_tol_m
        && d.second_trough_m <= d.trough_tol_m
        && d.wavelength_m <= 2.0 * d.trough_tol_m
        && d.displacement_rel <= POINT_TOL_REL
        && d.trough_zeta_rel <= TROUGH_ZETA_TOL_REL
        && d.anti_zeta_rel <= ZETA_TOL_REL
}

#[test]
fn f32_track_agrees_with_f64_across_latitudes_winds_and_ridges() {
    let mut worst = Diff {
        same_outcome: true,
        ..Diff::default()
    };
    let mut cases = 0;
    let mut shallow = 0;
    let mut failed = Vec::new();
    for lat in [-60.0, -45.5, 20.0, 30.0, 45.5, 55.0, 65.0] {
        for speed in [5.0, 10.0, 20.0, 40.0, 80.0] {
            for dir in [240.0, 270.0, 300.0] {
                for (crest, half_width) in [
                    (800.0, 60_000.0),
                    (2600.0, 60_000.0),
                    (2600.0, 20_000.0),
                    (2600.0, 200_000.0),
                    (5000.0, 100_000.0),
                ] {
                    let c = input(lat, speed, dir, crest, half_width);
                    let Some(d) = diff(&c) else { continue };
                    cases += 1;
                    shallow += d.shallow as u32;
                    if !acceptable(&c, &d) {
                        failed.push((lat, speed, dir, crest, half_width, d));
                    }
                    worst.trough_m = worst.trough_m.max(d.trough_m);
                    worst.displacement_m = worst.displacement_m.max(d.displacement_m);
                    worst.displacement_rel = worst.displacement_rel.max(d.displacement_rel);
                    worst.trough_zeta_rel = worst.trough_zeta_rel.max(d.trough_zeta_rel);
                    worst.wavelength_m = worst.wavelength_m.max(d.wavelength_m);
                    worst.second_trough_m = worst.second_trough_m.max(d.second_trough_m);
                    worst.point_m = worst.point_m.max(d.point_m);
                    worst.point_rel = worst.point_rel.max(d.point_rel);
                    worst.zeta_rel = worst.zeta_rel.max(d.zeta_rel);
                    worst.heading_deg = worst.heading_deg.max(d.heading_deg);
                    worst.anti_zeta_rel = worst.anti_zeta_rel.max(d.anti_zeta_rel);
                    worst.same_outcome &= d.same_outcome;
                }
            }
        }
    }
    println!(
        "f32 against f64, {cases} tracks to the second trough ({shallow} with a lee trough shallower than f32's hysteresis): worst {worst:?}"
    );
    for f in &failed {
        println!("outside the tolerances: {f:?}");
    }
    assert!(cases > 400, "{cases} cases ran");
    assert!(
        failed.is_empty(),
        "{} cases outside the tolerances",
        failed.len()
    );
}

#[test]
fn f32_track_without_a_ridge_keeps_its_vorticity() {
    // With no ridge, a westerly and the upstream ζ of a uniform wind, the exact track
    // keeps its latitude and its ζ (docs/methods.md); f32 rounding makes ζ wander a
    // little. That wander must stay well below the f32 track's hysteresis for extremes,
    // or a flat track would show troughs that are only rounding. (An easterly is left
    // out: its track leaves its latitude exponentially, in either precision, and no
    // trough is reported for it.)
    let mut worst = 0.0f64;
    for lat in [-70.0, -45.5, -20.0, 15.0, 30.0, 45.5, 60.0, 75.0] {
        for speed in [2.0, 10.0, 30.0, 80.0, 150.0] {
            {
                let c = input(lat, speed, 270.0, 2600.0, 60_000.0).without_ridge();
                let mut z = (f64::INFINITY, f64::NEG_INFINITY);
                let r = run_f32(&c, &mut |p: &TrackPoint| {
                    z = (z.0.min(p.zeta), z.1.max(p.zeta));
                })
                .unwrap();
                worst = worst.max(z.1 - z.0);
                assert!(r.trough.is_err(), "{lat} {speed}: {:?}", r.trough);
            }
        }
    }
    println!("f32, no ridge: largest swing of zeta along a track {worst:e} /s");
    assert!(worst < EXTREME_HYSTERESIS_F32 / 3.0, "{worst:e}");
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn f32_track_agrees_with_f64_on_random_inputs(
        lat in prop_oneof![-70.0f64..-15.0, 15.0f64..70.0],
        speed in 3.0f64..100.0,
        dir in 200.0f64..340.0,
        crest in 400.0f64..6000.0,
        half_width in 10_000.0f64..300_000.0,
    ) {
        let c = input(lat, speed, dir, crest, half_width);
        if let Some(d) = diff(&c) {
            prop_assert!(acceptable(&c, &d), "{:?}", d);
        }
    }
}
