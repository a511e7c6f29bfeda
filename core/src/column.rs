//! Barotropic potential vorticity of a fluid column, q = (ζ + f)/H, and what its
//! conservation says when the column is stretched or squashed.
//!
//! For a barotropic, incompressible layer between the ground and a lid, q is conserved
//! following the column (FIELD-NOTES §4). The downstream vorticity after a change of depth
//! and latitude is ζ2 = (ζ1 + f1) H2/H1 − f2; the inverse gives the depth that would
//! produce a stated vorticity.

use crate::error::{finite, in_range, Error, Result};
use crate::rotation::{coriolis, Sense};

/// Thinnest column accepted, m. Below it the layer is not a layer (leeward's choice).
pub const MIN_DEPTH_M: f64 = 1.0;
/// Deepest column accepted, m (30 km: above any tropopause; our choice).
pub const MAX_DEPTH_M: f64 = 30_000.0;

/// Largest relative vorticity accepted as input, s⁻¹: ten times the largest f, far beyond
/// any synoptic or mesoscale value (leeward's choice).
pub const MAX_ABS_ZETA: f64 = 1.5e-3;

/// Depth of a column from the ground to a lid, m.
pub fn column_depth(ground_m: f64, lid_m: f64) -> Result<f64> {
    let g = in_range("ground height", ground_m, -500.0, 9000.0)?;
    let t = in_range("lid height", lid_m, -500.0, 30_000.0)?;
    let h = t - g;
    if h < MIN_DEPTH_M {
        return Err(Error::DepthNotPositive {
            what: "column depth (lid minus ground)",
            depth_m: h,
        });
    }
    Ok(h)
}

/// Barotropic potential vorticity q = (ζ + f)/H, m⁻¹ s⁻¹.
pub fn potential_vorticity(zeta: f64, f: f64, depth_m: f64) -> Result<f64> {
    finite("vorticity", zeta)?;
    finite("Coriolis parameter", f)?;
    check_depth("depth", depth_m)?;
    Ok((zeta + f) / depth_m)
}

fn check_depth(what: &'static str, d: f64) -> Result<f64> {
    finite(what, d)?;
    if d < MIN_DEPTH_M {
        return Err(Error::DepthNotPositive { what, depth_m: d });
    }
    in_range(what, d, MIN_DEPTH_M, MAX_DEPTH_M)
}

/// One end of a column's journey: where it is and how deep it is.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ColumnState {
    /// Latitude, degrees.
    pub lat_deg: f64,
    /// Relative vorticity ζ, s⁻¹.
    pub zeta: f64,
    /// Column depth H, m.
    pub depth_m: f64,
    /// Coriolis parameter at the latitude, s⁻¹.
    pub f: f64,
    /// Absolute vorticity ζ + f, s⁻¹.
    pub abs_vorticity: f64,
    /// Sense of ζ.
    pub sense: Sense,
}

impl ColumnState {
    fn new(lat_deg: f64, zeta: f64, depth_m: f64) -> Self {
        let f = coriolis(lat_deg);
        ColumnState {
            lat_deg,
            zeta,
            depth_m,
            f,
            abs_vorticity: zeta + f,
            sense: Sense::of(zeta, f),
        }
    }
}

/// Result of a stretching solve.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Stretch {
    /// Where the column starts.
    pub start: ColumnState,
    /// Where it ends.
    pub end: ColumnState,
    /// The conserved potential vorticity q, m⁻¹ s⁻¹.
    pub pv: f64,
    /// Change of relative vorticity ζ2 − ζ1, s⁻¹.
    pub zeta_change: f64,
    /// Sense of that change (its sign relative to f at the end).
    pub change_sense: Sense,
}

fn checked_start(lat1_deg: f64, zeta1: f64, depth1_m: f64) -> Result<ColumnState> {
    in_range("start latitude", lat1_deg, -90.0, 90.0)?;
    in_range("start vorticity", zeta1, -MAX_ABS_ZETA, MAX_ABS_ZETA)?;
    check_depth("start depth", depth1_m)?;
    let s = ColumnState::new(lat1_deg, zeta1, depth1_m);
    // q and f of opposite sign: inertially unstable, the reasoning does not apply.
    if s.abs_vorticity * s.f < 0.0 {
        return Err(Error::InertiallyUnstable {
            abs_vorticity: s.abs_vorticity,
        });
    }
    Ok(s)
}

/// The vorticity a column gains when it moves from (lat1, depth1) with vorticity ζ1 to
/// (lat2, depth2), conserving (ζ + f)/H.
pub fn stretch(
    lat1_deg: f64,
    zeta1: f64,
    depth1_m: f64,
    lat2_deg: f64,
    depth2_m: f64,
) -> Result<Stretch> {
    let start = checked_start(lat1_deg, zeta1, depth1_m)?;
    in_range("end latitude", lat2_deg, -90.0, 90.0)?;
    check_depth("end depth", depth2_m)?;
    let pv = start.abs_vorticity / depth1_m;
    let f2 = coriolis(lat2_deg);
    let zeta2 = pv * depth2_m - f2;
    let end = ColumnState::new(lat2_deg, zeta2, depth2_m);
    let dz = zeta2 - zeta1;
    Ok(Stretch {
        start,
        end,
        pv,
        zeta_change: dz,
        change_sense: Sense::of(dz, f2),
    })
}

/// The depth at (lat2) that would give the column vorticity ζ2, conserving (ζ + f)/H from
/// (lat1, ζ1, depth1).
pub fn depth_for_vorticity(
    lat1_deg: f64,
    zeta1: f64,
    depth1_m: f64,
    lat2_deg: f64,
    zeta2: f64,
) -> Result<Stretch> {
    let start = checked_start(lat1_deg, zeta1, depth1_m)?;
    in_range("end latitude", lat2_deg, -90.0, 90.0)?;
    in_range("end vorticity", zeta2, -MAX_ABS_ZETA, MAX_ABS_ZETA)?;
    let pv = start.abs_vorticity / depth1_m;
    let f2 = coriolis(lat2_deg);
    if pv == 0.0 {
        return Err(Error::NoDepthForVorticity);
    }
    let depth2 = (zeta2 + f2) / pv;
    if !depth2.is_finite() || depth2 < MIN_DEPTH_M {
        return Err(Error::NoDepthForVorticity);
    }
    let end = ColumnState::new(lat2_deg, zeta2, depth2);
    let dz = zeta2 - zeta1;
    Ok(Stretch {
        start,
        end,
        pv,
        zeta_change: dz,
        change_sense: Sense::of(dz, f2),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn fixed_depth_conserves_absolute_vorticity() {
        // FIELD-NOTES §4: with H fixed, ζ + f is conserved.
        let s = stretch(50.0, 2e-5, 8000.0, 40.0, 8000.0).unwrap();
        assert_relative_eq!(
            s.end.abs_vorticity,
            s.start.abs_vorticity,
            max_relative = 1e-14
        );
        // Moving south at fixed depth, f falls, so ζ rises: cyclonic gain.
        assert_eq!(s.change_sense, Sense::Cyclonic);
    }

    #[test]
    fn squashing_makes_anticyclonic_vorticity() {
        // Common practice: a column squashed over a ridge at fixed latitude spins
        // anticyclonically. ζ2 = f (H2/H1 − 1) for ζ1 = 0.
        let f = coriolis(45.0);
        let s = stretch(45.0, 0.0, 10_000.0, 45.0, 7_500.0).unwrap();
        assert_relative_eq!(s.end.zeta, f * (0.75 - 1.0), max_relative = 1e-12);
        assert_eq!(s.end.sense, Sense::Anticyclonic);
    }

    #[test]
    fn inverse_recovers_depth() {
        let s = stretch(45.5, 1.2e-5, 9000.0, 43.0, 10_500.0).unwrap();
        let inv = depth_for_vorticity(45.5, 1.2e-5, 9000.0, 43.0, s.end.zeta).unwrap();
        assert_relative_eq!(inv.end.depth_m, 10_500.0, max_relative = 1e-12);
    }

    #[test]
    fn southern_hemisphere_words() {
        let s = stretch(-45.0, 0.0, 10_000.0, -45.0, 7_500.0).unwrap();
        assert!(s.end.zeta > 0.0);
        assert_eq!(s.end.sense, Sense::Anticyclonic);
    }

    #[test]
    fn bad_inputs() {
        assert!(matches!(
            stretch(45.0, 0.0, 0.0, 45.0, 10.0),
            Err(Error::DepthNotPositive { .. })
        ));
        assert!(matches!(
            stretch(45.0, 0.0, 1000.0, 45.0, -3.0),
            Err(Error::DepthNotPositive { .. })
        ));
        assert!(matches!(
            stretch(45.0, -2e-4, 1000.0, 45.0, 1000.0),
            Err(Error::InertiallyUnstable { .. })
        ));
        assert!(matches!(
            stretch(f64::NAN, 0.0, 1000.0, 45.0, 1000.0),
            Err(Error::NotFinite { .. })
        ));
        // Asking for absolute vorticity of the wrong sign has no positive depth.
        assert_eq!(
            depth_for_vorticity(45.0, 0.0, 1000.0, 45.0, -2e-4),
            Err(Error::NoDepthForVorticity)
        );
        assert!(column_depth(2000.0, 1500.0).is_err());
        assert_relative_eq!(column_depth(1850.0, 10_800.0).unwrap(), 8950.0);
    }
}
