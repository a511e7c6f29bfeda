//! The floating-point precision of a calculation: f64 (the reference) or f32 (what the
//! device's Cortex-M4F does in hardware; it does f64 in software, tens to hundreds of
//! times slower: docs/performance.md, "f32 against f64").
//!
//! A calculation written once, generic over [`Real`], runs in either. Inputs and results
//! stay f64; only the inner loop changes precision. Where f32 is used, and why it is
//! safe there, is decided by measurement (docs/performance.md).

use core::ops::{Add, Div, Mul, Neg, Sub};

/// The arithmetic and the functions (libm's, in the type's own precision) that a
/// generic calculation needs.
pub trait Real:
    Copy
    + PartialOrd
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
{
    /// The value of an f64 (rounded to nearest).
    fn of(x: f64) -> Self;
    /// Back to f64 (exact).
    fn to_f64(self) -> f64;
    /// Square root.
    fn sqrt(self) -> Self;
    /// Sine, radians.
    fn sin(self) -> Self;
    /// Sine of a latitude, radians (|x| ≤ π/2; see [`sin_lat_f32`] for f32).
    fn sin_lat(self) -> Self;
    /// Arcsine, radians (see [`asin_f32`] for f32).
    fn asin(self) -> Self;
    /// Four-quadrant arctangent of self/x, radians.
    fn atan2(self, x: Self) -> Self;
    /// The larger of two values.
    fn max(self, o: Self) -> Self {
        if o > self {
            o
        } else {
            self
        }
    }
    /// The smaller of two values.
    fn min(self, o: Self) -> Self {
        if o < self {
            o
        } else {
            self
        }
    }
    /// Absolute value.
    fn abs(self) -> Self {
        if self < Self::of(0.0) {
            -self
        } else {
            self
        }
    }
}

impl Real for f64 {
    fn of(x: f64) -> Self {
        x
    }
    fn to_f64(self) -> f64 {
        self
    }
    fn sqrt(self) -> Self {
        libm::sqrt(self)
    }
    fn sin(self) -> Self {
        libm::sin(self)
    }
    fn sin_lat(self) -> Self {
        libm::sin(self)
    }
    fn asin(self) -> Self {
        libm::asin(self)
    }
    fn atan2(self, x: Self) -> Self {
        libm::atan2(self, x)
    }
    fn max(self, o: Self) -> Self {
        f64::max(self, o)
    }
    fn min(self, o: Self) -> Self {
        f64::min(self, o)
    }
    fn abs(self) -> Self {
        f64::abs(self)
    }
}

impl Real for f32 {
    fn of(x: f64) -> Self {
        x as f32
    }
    fn to_f64(self) -> f64 {
        self as f64
    }
    fn sqrt(self) -> Self {
        libm::sqrtf(self)
    }
    fn sin(self) -> Self {
        libm::sinf(self)
    }
    fn sin_lat(self) -> Self {
        sin_lat_f32(self)
    }
    fn asin(self) -> Self {
        asin_f32(self)
    }
    fn atan2(self, x: Self) -> Self {
        libm::atan2f(self, x)
    }
    fn max(self, o: Self) -> Self {
        f32::max(self, o)
    }
    fn min(self, o: Self) -> Self {
        f32::min(self, o)
    }
    fn abs(self) -> Self {
        f32::abs(self)
    }
}

/// Bound on the error of [`sin_lat_f32`] against libm's f64 sine on −π/2…π/2, held by
/// its unit test over every 1e-5 rad of that range: measured 1.1e-7 (two units in the
/// last place of a value near 1; libm's `sinf` there: 3.0e-8).
pub const SIN_LAT_F32_MAX_ERROR: f64 = 1.2e-7;

/// sin x for |x| ≤ π/2 in single precision: the Taylor polynomial to x¹³, whose
/// truncation error there is below (π/2)¹⁵/15! = 6.7e-10, far under f32's rounding (its
/// measured error is [`SIN_LAT_F32_MAX_ERROR`]). Outside ±π/2 it is not a sine: callers
/// pass latitudes only. About 15 instructions on the device, where libm's `sinf`, which
/// reduces its argument and evaluates in f64, takes about 1 300 (docs/performance.md).
pub fn sin_lat_f32(x: f32) -> f32 {
    let x2 = x * x;
    // x plus a correction of at most a third of x: its rounding is the smaller.
    let p = -1.0 / 6.0
        + x2 * (1.0 / 120.0
            + x2 * (-1.0 / 5_040.0
                + x2 * (1.0 / 362_880.0
                    + x2 * (-1.0 / 39_916_800.0 + x2 * (1.0 / 6_227_020_800.0)))));
    x + x * x2 * p
}

/// Bound on the error of [`asin_f32`] against libm's f64 arcsine on −1…1, rad, held by
/// its unit test over every 1e-5 of that range: measured 1.1e-7 (one unit in the last
/// place of a value near π/2).
pub const ASIN_F32_MAX_ERROR: f64 = 1.2e-7;

/// asin x in single precision throughout: libm's `asinf` for |x| < 0.5 (single
/// precision there), and atan2(x, √((1 − x)(1 + x))) beyond, where `asinf` takes an f64
/// square root (software on the device: about 800 instructions a call against 180).
/// (1 − x) is exact for |x| ≥ 0.5 (Sterbenz), so the root loses nothing near ±1.
pub fn asin_f32(x: f32) -> f32 {
    if x.abs() < 0.5 {
        libm::asinf(x)
    } else {
        libm::atan2f(x, libm::sqrtf((1.0 - x) * (1.0 + x)))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn asin_f32_against_libm() {
        // Reference: libm's f64 arcsine at the same f32 argument.
        extern crate std;
        let mut worst = 0.0f64;
        let mut x = -1.0f64;
        while x <= 1.0 {
            let xf = x as f32;
            worst = worst.max((asin_f32(xf) as f64 - libm::asin(xf as f64)).abs());
            x += 1e-5;
        }
        for xf in [-1.0f32, -0.5, 0.5, 1.0] {
            worst = worst.max((asin_f32(xf) as f64 - libm::asin(xf as f64)).abs());
        }
        std::println!("asin_f32: worst error {worst:e} rad on -1..1");
        assert!(worst <= ASIN_F32_MAX_ERROR, "{worst:e}");
    }

    #[test]
    fn sin_lat_f32_against_libm_over_every_latitude() {
        // Reference: libm's f64 sine (a port of FreeBSD's msun, correctly rounded to
        // within 1 ulp) at the same f32 argument.
        let half_pi = core::f64::consts::FRAC_PI_2;
        let mut worst = 0.0f64;
        let mut x = -half_pi;
        while x <= half_pi {
            let xf = x as f32;
            let e = (sin_lat_f32(xf) as f64 - libm::sin(xf as f64)).abs();
            worst = worst.max(e);
            x += 1e-5;
        }
        for xf in [
            -core::f32::consts::FRAC_PI_2,
            0.0,
            core::f32::consts::FRAC_PI_2,
        ] {
            let e = (sin_lat_f32(xf) as f64 - libm::sin(xf as f64)).abs();
            worst = worst.max(e);
        }
        extern crate std;
        std::println!("sin_lat_f32: worst error {worst:e} on -pi/2..pi/2");
        assert!(worst <= SIN_LAT_F32_MAX_ERROR, "{worst:e}");
        // And no worse than libm's own f32 sine by more than one unit in the last place.
        let mut worst_libm = 0.0f64;
        let mut x = -half_pi;
        while x <= half_pi {
            let xf = x as f32;
            let e = (libm::sinf(xf) as f64 - libm::sin(xf as f64)).abs();
            worst_libm = worst_libm.max(e);
            x += 1e-5;
        }
        std::println!("libm sinf: worst error {worst_libm:e}");
        assert!(
            worst <= worst_libm + f32::EPSILON as f64,
            "{worst:e} {worst_libm:e}"
        );
    }

    #[test]
    fn sin_lat_f32_keeps_sign_and_bounds() {
        assert_eq!(sin_lat_f32(0.0), 0.0);
        let mut x = 0.0f32;
        while x <= core::f32::consts::FRAC_PI_2 {
            let s = sin_lat_f32(x);
            assert!((0.0..=1.0 + f32::EPSILON).contains(&s), "{x} {s}");
            assert_eq!(sin_lat_f32(-x), -s);
            x += 1e-3;
        }
    }
}
