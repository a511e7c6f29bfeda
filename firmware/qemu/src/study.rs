//! f32 against f64 on the Cortex-M4F, whose FPU does single precision only (f64 runs in
//! software). Each kernel below is written once, generic over [`Real`], and run in both
//! precisions: the counts say what f32 saves, the errors (against the check values and
//! against the f64 run of the same kernel) say whether it is safe. The kernels are
//! compact versions of the core's methods (same formulas, fewer checks), written for this
//! study only. (The core's own track has since an f32 path, `crossing::run_f32`, counted
//! and checked in calc.rs; the rest of the core is f64.)

use core::hint::black_box;
use core::ops::{Add, Div, Mul, Neg, Sub};

use cortex_m_semihosting::hprintln;

use leeward_core::crossing::{CrossingInput, Discard};

use crate::calc::{self, A, G0, OMEGA, RD};
use crate::meter::measure;
use crate::report::{rel, Report};

/// The arithmetic the kernels need, in f32 or f64 (libm for the functions).
pub trait Real:
    Copy
    + PartialOrd
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
{
    /// From an f64 constant or input.
    fn of(x: f64) -> Self;
    /// Back to f64 for comparison.
    fn f64(self) -> f64;
    /// Sine (radians).
    fn sin(self) -> Self;
    /// Cosine (radians).
    fn cos(self) -> Self;
    /// Natural logarithm.
    fn ln(self) -> Self;
    /// Square root.
    fn sqrt(self) -> Self;
}

impl Real for f32 {
    fn of(x: f64) -> Self {
        x as f32
    }
    fn f64(self) -> f64 {
        self as f64
    }
    fn sin(self) -> Self {
        libm::sinf(self)
    }
    fn cos(self) -> Self {
        libm::cosf(self)
    }
    fn ln(self) -> Self {
        libm::logf(self)
    }
    fn sqrt(self) -> Self {
        libm::sqrtf(self)
    }
}

impl Real for f64 {
    fn of(x: f64) -> Self {
        x
    }
    fn f64(self) -> f64 {
        self
    }
    fn sin(self) -> Self {
        libm::sin(self)
    }
    fn cos(self) -> Self {
        libm::cos(self)
    }
    fn ln(self) -> Self {
        libm::log(self)
    }
    fn sqrt(self) -> Self {
        libm::sqrt(self)
    }
}

/// f32 with a sine and cosine of its own, evaluated in single precision (libm's `sinf`
/// and `cosf` evaluate their polynomials in f64, which the M4F does in software).
#[derive(Clone, Copy, PartialEq, PartialOrd)]
pub struct Fast32(pub f32);

macro_rules! fast32_op {
    ($tr:ident, $f:ident, $op:tt) => {
        impl $tr for Fast32 {
            type Output = Fast32;
            fn $f(self, o: Fast32) -> Fast32 {
                Fast32(self.0 $op o.0)
            }
        }
    };
}
fast32_op!(Add, add, +);
fast32_op!(Sub, sub, -);
fast32_op!(Mul, mul, *);
fast32_op!(Div, div, /);

impl Neg for Fast32 {
    type Output = Fast32;
    fn neg(self) -> Fast32 {
        Fast32(-self.0)
    }
}

/// sin and cos of x (radians, |x| up to a few hundred) in f32: x = kπ/2 + r with π/2 in
/// two parts (Cody and Waite's reduction), then Taylor polynomials on |r| ≤ π/4 (their
/// truncation errors are below 2e-9 there).
pub fn sin_cos_f32(x: f32) -> (f32, f32) {
    const PIO2_HI: f32 = 1.570_796_4; // π/2 rounded to f32
    const PIO2_LO: f32 = -4.371_139e-8; // π/2 − PIO2_HI
    let k = (x * core::f32::consts::FRAC_2_PI + libm::copysignf(0.5, x)) as i32;
    let kf = k as f32;
    let r = (x - kf * PIO2_HI) - kf * PIO2_LO;
    let r2 = r * r;
    let s = r
        * (1.0
            + r2 * (-1.0 / 6.0
                + r2 * (1.0 / 120.0 + r2 * (-1.0 / 5040.0 + r2 * (1.0 / 362_880.0)))));
    let c = 1.0
        + r2 * (-0.5
            + r2 * (1.0 / 24.0
                + r2 * (-1.0 / 720.0 + r2 * (1.0 / 40_320.0 + r2 * (-1.0 / 3_628_800.0)))));
    match k & 3 {
        0 => (s, c),
        1 => (c, -s),
        2 => (-s, -c),
        _ => (-c, s),
    }
}

impl Real for Fast32 {
    fn of(x: f64) -> Self {
        Fast32(x as f32)
    }
    fn f64(self) -> f64 {
        self.0 as f64
    }
    fn sin(self) -> Self {
        Fast32(sin_cos_f32(self.0).0)
    }
    fn cos(self) -> Self {
        Fast32(sin_cos_f32(self.0).1)
    }
    fn ln(self) -> Self {
        Fast32(libm::logf(self.0))
    }
    fn sqrt(self) -> Self {
        Fast32(libm::sqrtf(self.0))
    }
}

fn radians<T: Real>(deg: T) -> T {
    deg * T::of(core::f64::consts::PI / 180.0)
}

/// f = 2Ω sin φ and β = 2Ω cos φ / a (FIELD-NOTES §2).
pub fn rotation<T: Real>(lat_deg: T) -> (T, T) {
    let p = radians(lat_deg);
    let two_omega = T::of(2.0 * OMEGA);
    (two_omega * p.sin(), two_omega * p.cos() / T::of(A))
}

/// ζ2 = (ζ1 + f1) H2/H1 − f2 (FIELD-NOTES §4).
pub fn stretch<T: Real>(l1: T, z1: T, h1: T, l2: T, h2: T) -> T {
    let (f1, _) = rotation(l1);
    let (f2, _) = rotation(l2);
    (z1 + f1) * h2 / h1 - f2
}

/// Heights by the hypsometric equation, layer by layer with the mean temperature of the
/// layer (FIELD-NOTES §6), from 0 m at the first level.
pub fn hypsometric<T: Real, const N: usize>(p: &[T; N], t: &[T; N]) -> [T; N] {
    let mut z = [T::of(0.0); N];
    let r_over_g = T::of(RD / G0);
    for k in 1..N {
        let mean_t = (t[k - 1] + t[k]) * T::of(0.5);
        z[k] = z[k - 1] + r_over_g * mean_t * (p[k - 1] / p[k]).ln();
    }
    z
}

/// Weighted least squares of Z = c0 + c1 x + c2 y + c3 x² + c4 xy + c5 y² by Householder
/// QR, in units of 100 km (FIELD-NOTES §3); returns (u_g, v_g, ζ_g) at the origin.
/// `offset_m` is subtracted from every height first (0 for the plain fit).
pub fn quadratic_fit<T: Real>(
    xy_m: &[(T, T)],
    z_m: &[T],
    sigma_m: T,
    f0: T,
    offset_m: T,
) -> (T, T, T) {
    const P: usize = 6;
    const MAX: usize = 32;
    let n = xy_m.len().min(z_m.len()).min(MAX);
    let zero = T::of(0.0);
    let mut a = [[zero; P]; MAX];
    let mut b = [zero; MAX];
    let scale = T::of(1e-5); // m → 100 km
    let w = T::of(1.0) / sigma_m;
    for i in 0..n {
        let (x, y) = (xy_m[i].0 * scale, xy_m[i].1 * scale);
        a[i] = [w, w * x, w * y, w * x * x, w * x * y, w * y * y];
        b[i] = w * (z_m[i] - offset_m);
    }
    // Householder reflections, column by column.
    for j in 0..P {
        let mut norm = zero;
        for row in a.iter().take(n).skip(j) {
            norm = norm + row[j] * row[j];
        }
        let mut norm = norm.sqrt();
        if a[j][j] > zero {
            norm = -norm;
        }
        let v0 = a[j][j] - norm;
        let mut vv = v0 * v0;
        for row in a.iter().take(n).skip(j + 1) {
            vv = vv + row[j] * row[j];
        }
        if vv == zero {
            continue;
        }
        a[j][j] = v0;
        for k in j + 1..P {
            let mut s = zero;
            for row in a.iter().take(n).skip(j) {
                s = s + row[j] * row[k];
            }
            let s = T::of(2.0) * s / vv;
            for row in a.iter_mut().take(n).skip(j) {
                row[k] = row[k] - s * row[j];
            }
        }
        let mut s = zero;
        for i in j..n {
            s = s + a[i][j] * b[i];
        }
        let s = T::of(2.0) * s / vv;
        for i in j..n {
            b[i] = b[i] - s * a[i][j];
        }
        a[j][j] = norm;
    }
    // Back substitution R c = Qᵀb.
    let mut c = [zero; P];
    for j in (0..P).rev() {
        let mut s = b[j];
        for k in j + 1..P {
            s = s - a[j][k] * c[k];
        }
        c[j] = s / a[j][j];
    }
    // Back to metres: gradient per m, curvature per m².
    let g_over_f = T::of(G0) / f0;
    let (dzdx, dzdy) = (c[1] * scale, c[2] * scale);
    let lap = T::of(2.0) * (c[3] + c[5]) * scale * scale;
    (-g_over_f * dzdy, g_over_f * dzdx, g_over_f * lap)
}

/// What the track kernel reports: where it ends and where its lee trough is.
#[derive(Clone, Copy)]
pub struct Track {
    /// End latitude and longitude, degrees.
    pub end: (f64, f64),
    /// Lee trough (largest cyclonic ζ past the crest): distance past the axis, m.
    pub trough_m: f64,
}

/// A constant-PV track over a north–south bell ridge (FIELD-NOTES §5): speed V, heading χ
/// clockwise from north, dχ/ds = −ζ/V (cyclonic turns left), ζ = qH − f, fourth-order
/// Runge–Kutta in (φ, λ, χ), steps of `step_m`, `steps` of them, starting `upwind_m` west
/// of the axis on the anchor's parallel with the ζ of a uniform westerly taken as 0.
pub fn track<T: Real>(lat0_deg: f64, v_ms: f64, lid_m: f64, step_m: f64, steps: u32) -> Track {
    let (base, crest, half) = (T::of(300.0), T::of(2600.0), T::of(60_000.0));
    let a = T::of(A);
    let lat0 = radians(T::of(lat0_deg));
    let cos0 = lat0.cos();
    let lid = T::of(lid_m);
    let v = T::of(v_ms);
    let axis_lon = T::of(0.0);
    let depth = |lon: T| {
        let d = (lon - axis_lon) * a * cos0 / half;
        lid - (base + (crest - base) / (T::of(1.0) + d * d))
    };
    let f = |lat: T| T::of(2.0 * OMEGA) * lat.sin();
    let q = f(lat0) / depth(T::of(0.0) - T::of(1_000_000.0) / (a * cos0));
    let rate = |s: [T; 3]| {
        let [lat, lon, chi] = s;
        let zeta = q * depth(lon) - f(lat);
        [chi.cos() / a, chi.sin() / (a * lat.cos()), -zeta / v]
    };
    let mut s = [
        lat0,
        T::of(0.0) - T::of(1_000_000.0) / (a * cos0),
        T::of(core::f64::consts::FRAC_PI_2),
    ];
    let h = T::of(step_m);
    let half_h = h * T::of(0.5);
    let mut best = (T::of(0.0), T::of(0.0));
    for _ in 0..steps {
        let add = |s: [T; 3], k: [T; 3], w: T| [s[0] + k[0] * w, s[1] + k[1] * w, s[2] + k[2] * w];
        let k1 = rate(s);
        let k2 = rate(add(s, k1, half_h));
        let k3 = rate(add(s, k2, half_h));
        let k4 = rate(add(s, k3, h));
        let sixth = h / T::of(6.0);
        for i in 0..3 {
            s[i] = s[i] + sixth * (k1[i] + T::of(2.0) * (k2[i] + k3[i]) + k4[i]);
        }
        let hh = depth(s[1]);
        let zeta = q * hh - f(s[0]);
        let d = (s[1] - axis_lon) * a * cos0;
        // Past the crest's shoulder, the most cyclonic point (NH: largest ζ).
        if d > half + half && zeta > best.0 {
            best = (zeta, d);
        }
    }
    Track {
        end: (s[0].f64().to_degrees(), s[1].f64().to_degrees()),
        trough_m: best.1.f64(),
    }
}

/// One study line: the f64 and f32 counts, then the errors.
fn line(name: &str, n64: u64, n32: u64, what: core::fmt::Arguments) {
    hprintln!("study {:>9} {:>9} {}: {}", n64, n32, name, what);
}

/// Instructions per call of `op`, over 1000 calls on changing arguments (the tick is 40
/// instructions; the loop's own few instructions per turn are included).
fn per_call<T: Copy>(x0: T, op: impl Fn(T, u32) -> T) -> u64 {
    let (m, _) = measure(|| {
        let mut x = x0;
        for i in 0..1000u32 {
            x = black_box(op(black_box(x), i));
        }
        x
    });
    m.instructions / 1000
}

/// Cost of single operations in either precision (software f64, hardware f32).
fn unit_costs() {
    let c = [
        (
            "add (and a u32 conversion)",
            per_call(1.1f64, |x, i| x + i as f64),
            per_call(1.1f32, |x, i| x + i as f32),
        ),
        (
            "mul",
            per_call(1.1f64, |x, _| x * 1.000_001),
            per_call(1.1f32, |x, _| x * 1.000_001),
        ),
        (
            "div",
            per_call(1.1f64, |x, _| 1.5 / x),
            per_call(1.1f32, |x, _| 1.5 / x),
        ),
        (
            "sqrt",
            per_call(1.1f64, |x, i| libm::sqrt(x + i as f64)),
            per_call(1.1f32, |x, i| libm::sqrtf(x + i as f32)),
        ),
        (
            "sin",
            per_call(0.7f64, |x, _| libm::sin(x) + 0.1),
            per_call(0.7f32, |x, _| libm::sinf(x) + 0.1),
        ),
        (
            "log",
            per_call(2.0f64, |x, _| libm::log(x) + 2.0),
            per_call(2.0f32, |x, _| libm::logf(x) + 2.0),
        ),
        (
            "atan2",
            per_call(0.5f64, |x, _| libm::atan2(x, 0.3) + 0.1),
            per_call(0.5f32, |x, _| libm::atan2f(x, 0.3) + 0.1),
        ),
    ];
    let own = per_call(0.7f32, |x, _| sin_cos_f32(x).0 + 0.1);
    let mut worst = 0.0f64;
    for i in -4000..=4000 {
        let x = i as f32 * 1e-3; // −4 … 4 rad
        let (s, c) = sin_cos_f32(x);
        let (x64, s64, c64) = (x as f64, s as f64, c as f64);
        worst = worst.max(libm::fabs(s64 - libm::sin(x64)).max(libm::fabs(c64 - libm::cos(x64))));
    }
    hprintln!(
        "study {:>9} {:>9} one sin in f32 of our own (sin_cos_f32), per call; its worst error on -4..4 rad: {:.1e}",
        "-",
        own,
        worst
    );
    for (name, n64, n32) in c {
        hprintln!(
            "study {:>9} {:>9} one {}, per call (libm for the functions)",
            n64,
            n32,
            name
        );
    }
}

/// Run every kernel in both precisions, print the counts and the errors, and check that
/// the f64 kernels reproduce the check values (so the comparison is of working code).
pub fn run(r: &mut Report) {
    unit_costs();
    // f and β at 45°.
    let (m64, (f64v, b64)) = measure(|| rotation(black_box(45.0f64)));
    let (m32, (f32v, b32)) = measure(|| rotation(black_box(45.0f32)));
    line("f and beta", m64.instructions, m32.instructions, format_args!(
        "f rel err f64 {:.1e} f32 {:.1e}; beta rel err f64 {:.1e} f32 {:.1e} (vs 2 Omega sin, cos / a in f64)",
        rel(f64v, calc::f_at(45.0)), rel(f32v.f64(), calc::f_at(45.0)),
        rel(b64, calc::beta_at(45.0)), rel(b32.f64(), calc::beta_at(45.0))));

    // The stretching solve.
    let (l1, z1, h1, l2, h2) = calc::STRETCH;
    let want = calc::stretch_expected();
    let (m64, s64) = measure(|| stretch(black_box(l1), z1, h1, l2, h2));
    let (m32, s32) = measure(|| {
        stretch(
            black_box(l1 as f32),
            z1 as f32,
            h1 as f32,
            l2 as f32,
            h2 as f32,
        )
    });
    line(
        "stretching solve",
        m64.instructions,
        m32.instructions,
        format_args!(
            "zeta2 rel err f64 {:.1e} f32 {:.1e} (abs {:.1e} /s)",
            rel(s64, want),
            rel(s32.f64(), want),
            libm::fabs(s32.f64() - want)
        ),
    );

    // Hypsometric heights of the 100-level standard atmosphere.
    let p = calc::pressures_100();
    let t = p.map(calc::ussa_t);
    let (p32, t32) = (p.map(|x| x as f32), t.map(|x| x as f32));
    let (m64, z64) = measure(|| hypsometric(black_box(&p), black_box(&t)));
    let (m32, z32) = measure(|| hypsometric(black_box(&p32), black_box(&t32)));
    let (mut e64, mut e32) = (0.0f64, 0.0f64);
    for k in 0..p.len() {
        let exact = calc::ussa_z(p[k]);
        e64 = e64.max(libm::fabs(z64[k] - exact));
        e32 = e32.max(libm::fabs(z32[k].f64() - exact));
    }
    line(
        "hypsometric heights, 100 levels",
        m64.instructions,
        m32.instructions,
        format_args!(
            "worst error vs the standard's formulas f64 {:.3} m, f32 {:.3} m",
            e64, e32
        ),
    );
    r.check(
        "study: f64 hypsometric kernel",
        e64 <= 2.0,
        format_args!("{:.3} m (within 2 m)", e64),
    );

    // The quadratic network fit on the analytic field, 8 and 32 stations.
    for n in [8usize, 32] {
        let mut xy64 = [(0.0f64, 0.0f64); 32];
        let mut z64 = [0.0f64; 32];
        for i in 0..n {
            xy64[i] = calc::spiral_xy(i, n);
            z64[i] = calc::field(xy64[i].0, xy64[i].1);
        }
        let xy32 = xy64.map(|(x, y)| (x as f32, y as f32));
        let z32 = z64.map(|z| z as f32);
        let f0 = calc::f_at(calc::NET_LAT);
        let k = G0 / f0;
        let (u, v, zeta) = (k * 1e-4, k * 3e-5, k * 3e-10);
        let (m64, w64) = measure(|| quadratic_fit(black_box(&xy64[..n]), &z64[..n], 10.0, f0, 0.0));
        let (m32, w32) =
            measure(|| quadratic_fit(black_box(&xy32[..n]), &z32[..n], 10.0f32, f0 as f32, 0.0));
        let (mc, wc) =
            measure(|| quadratic_fit(black_box(&xy32[..n]), &z32[..n], 10.0f32, f0 as f32, z32[0]));
        let err = |w: (f64, f64, f64)| {
            (
                libm::fabs(w.0 - u).max(libm::fabs(w.1 - v)),
                libm::fabs(w.2 - zeta),
            )
        };
        let e64 = err(w64);
        let e32 = err((w32.0.f64(), w32.1.f64(), w32.2.f64()));
        let ec = err((wc.0.f64(), wc.1.f64(), wc.2.f64()));
        let name = if n == 8 {
            "network quadratic fit, 8 stations"
        } else {
            "network quadratic fit, 32 stations"
        };
        line(name, m64.instructions, m32.instructions, format_args!(
            "wind err f64 {:.1e} f32 {:.1e} f32-centred {:.1e} m/s; zeta_g err f64 {:.1e} f32 {:.1e} f32-centred {:.1e} /s (zeta_g {:.2e}); centred f32 {} instructions",
            e64.0, e32.0, ec.0, e64.1, e32.1, ec.1, zeta, mc.instructions));
        r.check(
            "study: f64 fit kernel",
            e64.0 < 1e-6 && e64.1 < 1e-12,
            format_args!("{} stations, analytic field", n),
        );
    }

    // The ridge-crossing kernel: 3000 km at 5 km.
    let (m64, t64) = measure(|| track::<f64>(black_box(45.5), 20.0, 10_800.0, 5_000.0, 600));
    let (m32, t32) = measure(|| track::<f32>(black_box(45.5), 20.0, 10_800.0, 5_000.0, 600));
    let (mf, tf) = measure(|| track::<Fast32>(black_box(45.5), 20.0, 10_800.0, 5_000.0, 600));
    let km = |a: (f64, f64), b: (f64, f64)| {
        let dy = (a.0 - b.0).to_radians() * A;
        let dx = (a.1 - b.1).to_radians() * A * libm::cos(a.0.to_radians());
        libm::sqrt(dx * dx + dy * dy)
    };
    line(
        "ridge-crossing kernel, 600 RK4 steps, f32 (libm)",
        m64.instructions,
        m32.instructions,
        format_args!(
            "end point {:.1} m from the f64 one; lee trough f64 {:.0} km, f32 {:.0} km past the axis",
            km(t64.end, t32.end),
            t64.trough_m / 1000.0,
            t32.trough_m / 1000.0
        ),
    );
    line(
        "ridge-crossing kernel, 600 RK4 steps, f32 (sin_cos_f32)",
        m64.instructions,
        mf.instructions,
        format_args!(
            "end point {:.1} m from the f64 one; lee trough {:.0} km past the axis",
            km(t64.end, tf.end),
            tf.trough_m / 1000.0
        ),
    );
    // The kernel is a compact model of the core's track (uniform upstream flow taken as
    // ζ = 0, shear neglected as in the core): its lee trough must lie where the core's does.
    let mut input = CrossingInput::new(leeward_core::demo::ridge(), 20.0, 270.0, 10_800.0);
    input.max_length_m = 3_000_000.0;
    input.stop_after_second_trough = false;
    let core_trough = leeward_core::crossing::run(&input, &mut Discard)
        .ok()
        .and_then(|c| c.trough.ok())
        .map_or(f64::NAN, |t| t.axis_distance_m);
    r.check(
        "study: the f64 track kernel's lee trough is the core's",
        rel(t64.trough_m, core_trough) < 0.03,
        format_args!(
            "{:.0} km against the core's {:.0} km (within 3 %)",
            t64.trough_m / 1000.0,
            core_trough / 1000.0
        ),
    );
}
