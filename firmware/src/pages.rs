//! What each result screen says: core results turned into [`Page`]s in the user's units,
//! and the fixed texts of the About screens. No physics here: every figure is a field of
//! a leeward-core result.

use crate::crossing::CrossingView;
use crate::settings::{LatEntry, Settings};
use crate::sounding::SoundingView;
use crate::text::{line, message, Line, Message};
use crate::widgets::Page;
use leeward_core::column::Stretch;
use leeward_core::crossing::sense_at;
use leeward_core::network::NetworkFit;
use leeward_core::rotation::Rotation;
use leeward_core::Error;

/// Seconds in an hour.
const HOUR_S: f64 = 3600.0;

/// A latitude as the settings show it: `45.500°` or `45°30.00'`, with N/S.
pub fn latitude(lat: f64, s: &Settings) -> Line {
    let hemi = if lat < 0.0 { 'S' } else { 'N' };
    let a = if lat < 0.0 { -lat } else { lat };
    match s.lat_entry {
        LatEntry::Decimal => line(format_args!("{a:.3}° {hemi}")),
        LatEntry::DegMin => {
            let d = a as u32;
            let m = (a - d as f64) * 60.0;
            line(format_args!("{d}°{m:05.2}' {hemi}"))
        }
    }
}

/// Site: f (large), β, inertial period, latitude, and the regime's warning.
pub fn site(r: &Rotation, s: &Settings) -> Page {
    let mut p = Page {
        head: line(format_args!("Coriolis parameter f")),
        figure: line(format_args!("{:.3e}", r.f)),
        unit: line(format_args!("/s")),
        ..Page::default()
    };
    p.row(
        line(format_args!("beta")),
        line(format_args!("{:.3e} /m/s", r.beta)),
    );
    p.row(
        line(format_args!("inertial period")),
        match r.inertial_period_s {
            Some(t) => line(format_args!("{:.1} h", t / HOUR_S)),
            None => line(format_args!("none at the equator")),
        },
    );
    p.row(line(format_args!("latitude")), latitude(r.lat_deg, s));
    p.note = r.regime.warning().map(|w| message(format_args!("{w}")));
    p
}

/// Column, forward: the vorticity at the end of the journey (large) and its sense.
pub fn stretch(st: &Stretch, s: &Settings) -> Page {
    let h = s.height;
    let mut p = Page {
        head: line(format_args!("End zeta: {}", st.end.sense.word())),
        figure: line(format_args!("{:.3}", st.end.zeta / 1e-5)),
        unit: line(format_args!("e-5/s")),
        ..Page::default()
    };
    p.row(
        line(format_args!("change of zeta")),
        line(format_args!("{:+.3} e-5/s", st.zeta_change / 1e-5)),
    );
    p.row(
        line(format_args!("the change is")),
        line(format_args!("{}", st.change_sense.word())),
    );
    p.row(
        line(format_args!("zeta+f at end")),
        line(format_args!("{:.3e} /s", st.end.abs_vorticity)),
    );
    p.row(
        line(format_args!("PV (zeta+f)/H")),
        line(format_args!("{:.3e} /m/s", st.pv)),
    );
    p.row(
        line(format_args!("depth")),
        line(format_args!(
            "{:.0} to {:.0} {}",
            h.from_m(st.start.depth_m),
            h.from_m(st.end.depth_m),
            h.symbol()
        )),
    );
    p
}

/// Column, inverse: the depth that gives the asked-for vorticity (large).
pub fn depth(st: &Stretch, s: &Settings) -> Page {
    let h = s.height;
    let mut p = Page {
        head: line(format_args!("Depth at end")),
        figure: big_height(h.from_m(st.end.depth_m)),
        unit: line(format_args!("{}", h.symbol())),
        ..Page::default()
    };
    p.row(
        line(format_args!("change of depth")),
        line(format_args!(
            "{:+.0} {}",
            h.from_m(st.end.depth_m - st.start.depth_m),
            h.symbol()
        )),
    );
    p.row(
        line(format_args!("start depth")),
        line(format_args!(
            "{:.0} {}",
            h.from_m(st.start.depth_m),
            h.symbol()
        )),
    );
    p.row(
        line(format_args!("end zeta")),
        line(format_args!(
            "{:.3} e-5/s {}",
            st.end.zeta / 1e-5,
            short_sense(st.end.sense.word())
        )),
    );
    p.row(
        line(format_args!("zeta+f at end")),
        line(format_args!("{:.3e} /s", st.end.abs_vorticity)),
    );
    p.row(
        line(format_args!("PV (zeta+f)/H")),
        line(format_args!("{:.3e} /m/s", st.pv)),
    );
    p
}

/// A height for the large figure: whole units, or powers of ten past a million (a depth
/// the inverse solve can return, meaningless as a column but shown, not hidden).
fn big_height(v: f64) -> Line {
    if v.abs() < 1e6 {
        line(format_args!("{v:.0}"))
    } else {
        line(format_args!("{v:.3e}"))
    }
}

/// Abbreviation of a sense word where a row is short of room.
fn short_sense(word: &str) -> &str {
    match word {
        "cyclonic" => "cycl.",
        "anticyclonic" => "anticycl.",
        w => w,
    }
}

/// A longitude as shown: `140.500° W` (decimal) or `140°30.00' W`.
pub fn longitude(lon: f64, s: &Settings) -> Line {
    let hemi = if lon < 0.0 { 'W' } else { 'E' };
    let mut l = latitude(lon, s);
    // The same figures as a latitude; only the hemisphere letter differs.
    l.pop();
    let _ = l.push(hemi);
    l
}

/// Network, page 1: the geostrophic wind speed ± σ (large), direction, components, model.
pub fn network_wind(fit: &NetworkFit, s: &Settings) -> Page {
    let w = s.wind;
    let g = &fit.wind;
    let mut p = Page {
        head: line(format_args!("Geostrophic wind")),
        figure: line(format_args!(
            "{:.1} ±{:.1}",
            w.from_ms(g.speed_ms.value),
            w.from_ms(g.speed_ms.sigma)
        )),
        unit: line(format_args!("{}", w.symbol())),
        ..Page::default()
    };
    p.row(
        line(format_args!("from")),
        line(format_args!(
            "{:.0} ±{:.0}°",
            g.dir_from_deg.value, g.dir_from_deg.sigma
        )),
    );
    p.row(
        line(format_args!("u, v")),
        line(format_args!(
            "{:+.1}, {:+.1} {}",
            w.from_ms(g.u_ms.value),
            w.from_ms(g.v_ms.value),
            w.symbol()
        )),
    );
    p.row(line(format_args!("model")), model_line(fit));
    p.note = fit_warning(fit);
    // Two lines are left for a note; without one, where the figures hold.
    if p.note.is_none() {
        p.row(
            line(format_args!("at")),
            line(format_args!(
                "{} {}",
                latitude(fit.reference.lat_deg, s),
                longitude(fit.reference.lon_deg, s)
            )),
        );
    }
    p
}

/// The model and the stations left over: "curvature, 3 spare".
fn model_line(fit: &NetworkFit) -> Line {
    line(format_args!("{}, {} spare", fit.model.name(), fit.dof))
}

/// What the user should know before trusting the figures, if anything.
fn fit_warning(fit: &NetworkFit) -> Option<Message> {
    if let Some(w) = fit.regime.warning() {
        Some(message(format_args!("{w}")))
    } else if fit.chi2_high {
        Some(message(format_args!(
            "The reports disagree by more than their stated errors."
        )))
    } else {
        fit.suspect.map(|i| {
            message(format_args!(
                "Station {} looks wrong: see residuals.",
                i + 1
            ))
        })
    }
}

/// Network, page 2: ζ_g ± σ (large) with its sense, the β-corrected value, f0, model.
pub fn network_vorticity(fit: &NetworkFit, s: &Settings) -> Page {
    let mut p = match (fit.zeta_g, fit.sense) {
        (Some(z), sense) => Page {
            head: line(format_args!("zeta_g: {}", sense.map_or("", |x| x.word()))),
            figure: line(format_args!("{:.2} ±{:.2}", z.value / 1e-5, z.sigma / 1e-5)),
            unit: line(format_args!("e-5/s")),
            ..Page::default()
        },
        (None, _) => Page {
            head: line(format_args!("zeta_g: not with a plane")),
            figure: line(format_args!("-")),
            note: Some(message(format_args!(
                "A plane fit has no curvature. More stations allow a richer model."
            ))),
            ..Page::default()
        },
    };
    if let Some(zb) = fit.zeta_beta {
        p.row(
            line(format_args!("with beta term")),
            line(format_args!(
                "{:.2} ±{:.2} e-5/s",
                zb.value / 1e-5,
                zb.sigma / 1e-5
            )),
        );
    }
    p.row(
        line(format_args!("f at reference")),
        line(format_args!("{:.3e} /s", fit.f0)),
    );
    p.row(line(format_args!("model")), model_line(fit));
    if p.note.is_none() {
        p.note = fit_warning(fit);
    }
    // Two lines are left for a note; without one, the rms residual.
    if p.note.is_some() {
        return p;
    }
    p.row(
        line(format_args!("rms residual")),
        line(format_args!(
            "{:.1} {}",
            s.height.from_m(fit.residual_rms_m),
            s.height.symbol()
        )),
    );
    p
}

/// Sounding, page 1: the first tropopause (large), the lid, bulk N, the height check.
pub fn sounding_column(v: &SoundingView, s: &Settings) -> Page {
    let h = s.height;
    let mut p = Page {
        head: line(format_args!("First tropopause")),
        ..Page::default()
    };
    match v.tropopauses.first {
        Some(t) => {
            p.figure = big_height(h.from_m(t.height_m));
            p.unit = line(format_args!("{}", h.symbol()));
        }
        None => {
            p.figure = line(format_args!("-"));
            p.note = Some(error_words(&Error::NoTropopause));
        }
    }
    if p.note.is_none() {
        p.note = match (&v.lid, &v.bulk_n_per_s) {
            (Err(e), _) | (_, Err(e)) => Some(error_words(e)),
            _ => None,
        };
    }
    // Three lines are kept for a note (the longest core reasons); without one, bulk N,
    // the worst height and the station as well.
    let full = p.note.is_none();
    p.row(
        line(format_args!("lid")),
        match &v.lid {
            Ok(l) => line(format_args!(
                "{:.0} {}, {}",
                h.from_m(l.height_m),
                h.symbol(),
                l.source.statement()
            )),
            Err(_) => line(format_args!("none")),
        },
    );
    if let (true, Ok(n)) = (full, v.bulk_n_per_s) {
        p.row(
            line(format_args!("bulk N to lid")),
            line(format_args!("{n:.4} /s")),
        );
    }
    let tol = h.from_m(v.height_tolerance_m);
    p.row(
        line(format_args!("height check")),
        if v.heights_flagged == 0 {
            line(format_args!("all within {tol:.0} {}", h.symbol()))
        } else {
            line(format_args!(
                "{} off by > {tol:.0} {}",
                v.heights_flagged,
                h.symbol()
            ))
        },
    );
    if full {
        if let Some(d) = v.heights_worst_m {
            p.row(
                line(format_args!("worst height diff.")),
                line(format_args!("{:+.0} {}", h.from_m(d), h.symbol())),
            );
        }
        p.row(
            line(format_args!("sounding")),
            line(format_args!("{}", v.station)),
        );
    }
    p
}

/// Sounding, page 2: the Froude number against the ridge (large) and its verdict.
pub fn sounding_froude(v: &SoundingView, s: &Settings) -> Page {
    let (h, w) = (s.height, s.wind);
    let rf = match &v.ridge_flow {
        Ok(rf) => rf,
        Err(e) => {
            return Page {
                head: line(format_args!("Froude number")),
                figure: line(format_args!("-")),
                note: Some(error_words(e)),
                ..Page::default()
            }
        }
    };
    let mut p = Page {
        head: line(format_args!("Froude number U/(N h)")),
        figure: line(format_args!("{:.2}", rf.froude)),
        ..Page::default()
    };
    p.row(
        line(format_args!("cross-ridge wind")),
        line(format_args!(
            "{:.1} {}",
            w.from_ms(rf.cross_ridge_ms),
            w.symbol()
        )),
    );
    p.row(
        line(format_args!("N below the crest")),
        line(format_args!("{:.4} /s", rf.n_per_s)),
    );
    p.row(
        match rf.blocked_depth_m {
            Some(_) => line(format_args!("blocked depth")),
            None => line(format_args!("ridge height h")),
        },
        line(format_args!(
            "{:.0} {}",
            h.from_m(rf.blocked_depth_m.unwrap_or(rf.ridge_height_m)),
            h.symbol()
        )),
    );
    p.note = Some(message(format_args!("{}", rf.verdict.statement())));
    p
}

/// Sounding, page 3: thermal wind over mean wind (large), the turning, the verdict.
pub fn sounding_barotropy(v: &SoundingView, s: &Settings) -> Page {
    let (h, w) = (s.height, s.wind);
    let b = match &v.barotropy {
        Ok(b) => b,
        Err(e) => {
            return Page {
                head: line(format_args!("Barotropy")),
                figure: line(format_args!("-")),
                note: Some(error_words(e)),
                ..Page::default()
            }
        }
    };
    let mut p = Page {
        head: line(format_args!("Thermal wind / mean wind")),
        figure: line(format_args!("{:.2}", b.ratio)),
        ..Page::default()
    };
    p.row(
        line(format_args!("thermal wind")),
        line(format_args!(
            "{:.1} {}",
            w.from_ms(b.thermal_speed_ms),
            w.symbol()
        )),
    );
    p.row(
        line(format_args!("turning")),
        line(format_args!("{:+.0}° {}", b.turning_deg, b.turning.word())),
    );
    p.row(
        line(format_args!("layer")),
        line(format_args!(
            "{:.0} to {:.0} {}",
            h.from_m(b.base_m),
            h.from_m(b.top_m),
            h.symbol()
        )),
    );
    p.note = Some(message(format_args!("{}", b.verdict.statement())));
    p
}

/// Distances along and across the track are shown in km whatever the height unit.
const KM: f64 = 1000.0;

/// Ridge crossing, page 1: the lee trough's distance from the axis (large), its north
/// displacement, ζ and sense; the core's statement when there is no trough.
pub fn crossing_trough(v: &CrossingView) -> Page {
    let c = &v.ridge;
    let t = match c.trough {
        Ok(t) => t,
        Err(u) => {
            return Page {
                head: line(format_args!("Lee trough")),
                figure: line(format_args!("-")),
                note: Some(message(format_args!("{}.", u.statement()))),
                ..Page::default()
            }
        }
    };
    let mut p = Page {
        head: line(format_args!("Lee trough, past the axis")),
        figure: line(format_args!("{:.0}", t.axis_distance_m / KM)),
        unit: line(format_args!("km")),
        ..Page::default()
    };
    p.row(
        line(format_args!("north of start")),
        line(format_args!("{:+.0} km", t.displacement_north_m / KM)),
    );
    p.row(
        line(format_args!("zeta at trough")),
        line(format_args!("{:+.2} e-5/s", t.point.zeta / 1e-5)),
    );
    p.row(
        line(format_args!("sense")),
        line(format_args!("{}", sense_at(&t.point).word())),
    );
    p.row(
        line(format_args!("over the ridge")),
        line(format_args!(
            "{:+.2} e-5/s",
            c.most_anticyclonic_zeta / 1e-5
        )),
    );
    p.row(
        line(format_args!("no-ridge trough")),
        match v.flat.trough {
            Ok(f) => line(format_args!("{:.0} km", f.axis_distance_m / KM)),
            Err(_) => line(format_args!("none")),
        },
    );
    p
}

/// Ridge crossing, page 2: trough to trough (large) beside the linear 2π√(V/β).
pub fn crossing_wave(v: &CrossingView) -> Page {
    let c = &v.ridge;
    let mut p = Page {
        head: line(format_args!("Trough to trough")),
        ..Page::default()
    };
    match c.wavelength_m {
        Ok(w) => {
            p.figure = line(format_args!("{:.0}", w / KM));
            p.unit = line(format_args!("km"));
        }
        Err(u) => {
            p.figure = line(format_args!("-"));
            p.note = Some(message(format_args!("{}.", u.statement())));
        }
    }
    p.row(
        line(format_args!("linear 2pi sqrt(V/beta)")),
        match c.stationary_wavelength_m {
            Ok(w) => line(format_args!("{:.0} km", w / KM)),
            Err(_) => line(format_args!("none")),
        },
    );
    if let Ok(t) = c.second_trough {
        p.row(
            line(format_args!("2nd trough, north")),
            line(format_args!("{:+.0} km", t.displacement_north_m / KM)),
        );
    }
    p.row(
        line(format_args!("track length")),
        line(format_args!("{:.0} km", c.end.s_m / KM)),
    );
    if p.note.is_none() {
        p.note = Some(message(format_args!("The {}.", c.ended.statement())));
    }
    p
}

/// Ridge crossing, page 3: the bulk Froude number (large) and its verdict.
pub fn crossing_froude(v: &CrossingView, s: &Settings) -> Page {
    let (h, w) = (s.height, s.wind);
    let Some(fr) = v.ridge.froude else {
        return Page {
            head: line(format_args!("Froude number")),
            figure: line(format_args!("-")),
            note: Some(message(format_args!("No N was given: no Froude check."))),
            ..Page::default()
        };
    };
    let mut p = Page {
        head: line(format_args!("Froude number V/(N h)")),
        figure: line(format_args!("{:.2}", fr.number)),
        ..Page::default()
    };
    p.row(
        line(format_args!("wind speed V")),
        line(format_args!(
            "{:.1} {}",
            w.from_ms(v.input.wind_speed_ms),
            w.symbol()
        )),
    );
    if let Some(n) = v.input.brunt_vaisala {
        p.row(
            line(format_args!("N below the crest")),
            line(format_args!("{n:.4} /s")),
        );
    }
    p.row(
        line(format_args!("ridge height h")),
        line(format_args!(
            "{:.0} {}",
            h.from_m(fr.ridge_height_m),
            h.symbol()
        )),
    );
    p.note = Some(if fr.blocked {
        message(format_args!(
            "Below 1: air below the crest is blocked; the figures hold above it."
        ))
    } else {
        message(format_args!(
            "1 or more: the low-level air rises over the crest."
        ))
    });
    p
}

/// A core error in the words of its `Display` text (written for this screen).
pub fn error_words(e: &Error) -> Message {
    message(format_args!("{e}"))
}

/// Heading and text of each About screen.
pub const ABOUT: [(&str, &str); 3] = [
    (
        "About leeward",
        concat!(
            "leeward ",
            env!("CARGO_PKG_VERSION"),
            ". Field reasoning about air crossing a mountain ridge: rotation at the site, ",
            "column stretching under a lid, and the wind from station heights. ",
            "Keys: arrows and OK do everything; BACK steps back and never erases."
        ),
    ),
    (
        "Caution",
        "Mountain weather can injure and kill. These are idealised estimates for trained \
         users, not a forecast or a warning service. Decisions about people's safety, \
         flights or operations follow the official forecasts and warnings of the national \
         weather service and local rules.",
    ),
    (
        "Model",
        "Barotropic, geostrophic, frictionless. (zeta+f)/H is kept along a column between \
         ground and lid. Station heights are fitted on a local plane, errors carried to \
         every figure. No geostrophic figures within 5° of the equator, a warning below 15°.",
    ),
];
