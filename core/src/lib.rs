//! # leeward-core
//!
//! The physics of leeward, a field tool for reasoning about flow over a mountain ridge:
//! `no_std`, no allocation, no panics on any input. Every calculation takes plain inputs
//! and returns a result struct or an [`Error`] whose message a field user understands.
//!
//! | module | what it computes |
//! |---|---|
//! | [`constants`] | Ω, g0, a, Rd, cp, κ, ε with their sources |
//! | [`rotation`] | f, β, inertial period; where geostrophy holds; cyclonic or anticyclonic |
//! | [`geo`] | great-circle distance and bearing, local tangent plane, centroid |
//! | [`network`] | station-height fit → geostrophic wind, ζ_g, deformation, residuals, σ |
//! | [`column`] | barotropic PV (ζ + f)/H, the stretching solve and its inverse |
//! | [`crossing`] | PV-conserving track over a ridge: lee trough, wave train, Froude check |
//! | [`demo`] | the invented Tessel Range scenario, with its analytic height field |
//! | [`rossby`] | stationary wavelength, Rossby–Haurwitz phase speed |
//! | [`sounding`] | a radiosonde profile: θ, humidity, heights, stability, tropopause, lid, Froude, barotropy |
//! | [`temp_code`] | decoder of WMO FM 35 TEMP reports (Parts A and B) into a profile |
//! | [`linalg`] | the small Householder least-squares solver behind the fit |
//! | [`real`] | f64 or f32: the precision a generic calculation runs in |
//!
//! Units are SI throughout (m, s, K, Pa-derived hPa only at the edges); latitude and
//! longitude in degrees. Conversions for display belong to the user interfaces.
//!
//! ```
//! use leeward_core::rotation::Rotation;
//! let r = Rotation::at(45.5).unwrap();
//! assert!(r.f > 1.0e-4 && r.beta > 1.5e-11);
//! ```
//!
//! These are idealised estimates (barotropic, geostrophic, frictionless) for trained
//! users, not a forecast: decisions about safety follow the official forecasts and
//! warnings of the national meteorological service.
#![no_std]
#![forbid(unsafe_code)]
#![warn(missing_docs)]
#![cfg_attr(
    not(test),
    deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)
)]

pub mod column;
pub mod constants;
pub mod crossing;
pub mod demo;
pub mod error;
pub mod geo;
pub mod linalg;
pub mod network;
pub mod real;
pub mod rossby;
pub mod rotation;
pub mod sounding;
pub mod temp_code;

pub use error::{Error, Result};
