//! Positions on the sphere: great-circle distance and bearing, a local tangent plane
//! about a reference point, and the unit-vector form the track integrator uses.
//!
//! The Earth is a sphere of radius [`EARTH_RADIUS`] (IUGG R1). Over a station network a
//! few hundred kilometres across, the ellipsoid would change distances by a few tenths
//! of a percent, well inside the error of the height reports.

use crate::constants::EARTH_RADIUS;
use crate::error::{in_range, Result};
use libm::{asin, atan2, cos, sin, sincos, sqrt};

/// A validated latitude/longitude pair, degrees.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LatLon {
    /// Latitude, degrees north (−90 to 90).
    pub lat_deg: f64,
    /// Longitude, degrees east (−180 to 360 accepted, kept as given).
    pub lon_deg: f64,
}

impl LatLon {
    /// A position, checking both coordinates.
    pub fn new(lat_deg: f64, lon_deg: f64) -> Result<Self> {
        Ok(LatLon {
            lat_deg: in_range("latitude", lat_deg, -90.0, 90.0)?,
            lon_deg: in_range("longitude", lon_deg, -180.0, 360.0)?,
        })
    }

    /// The unit vector from the Earth's centre (x to 0°E on the equator, z to the north pole).
    pub fn to_unit(self) -> Vec3 {
        let (sp, cp) = (
            sin(self.lat_deg.to_radians()),
            cos(self.lat_deg.to_radians()),
        );
        let (sl, cl) = (
            sin(self.lon_deg.to_radians()),
            cos(self.lon_deg.to_radians()),
        );
        Vec3::new(cp * cl, cp * sl, sp)
    }

    /// The position of a unit vector (longitude in −180..180).
    pub fn from_unit(v: Vec3) -> Self {
        let lat = atan2(v.z, sqrt(v.x * v.x + v.y * v.y)).to_degrees();
        let lon = atan2(v.y, v.x).to_degrees();
        LatLon {
            lat_deg: lat,
            lon_deg: lon,
        }
    }

    /// Local east and north unit vectors at this position.
    pub fn east_north(self) -> (Vec3, Vec3) {
        let (sp, cp) = (
            sin(self.lat_deg.to_radians()),
            cos(self.lat_deg.to_radians()),
        );
        let (sl, cl) = (
            sin(self.lon_deg.to_radians()),
            cos(self.lon_deg.to_radians()),
        );
        (Vec3::new(-sl, cl, 0.0), Vec3::new(-sp * cl, -sp * sl, cp))
    }
}

/// Great-circle distance between two positions, m (haversine form: accurate at short range).
pub fn distance_m(a: LatLon, b: LatLon) -> f64 {
    let p1 = a.lat_deg.to_radians();
    let p2 = b.lat_deg.to_radians();
    let dp = p2 - p1;
    let dl = (b.lon_deg - a.lon_deg).to_radians();
    let h = sin(dp / 2.0) * sin(dp / 2.0) + cos(p1) * cos(p2) * sin(dl / 2.0) * sin(dl / 2.0);
    2.0 * EARTH_RADIUS * asin(sqrt(h.clamp(0.0, 1.0)))
}

/// Initial great-circle bearing from `a` towards `b`, degrees clockwise from north (0–360).
pub fn bearing_deg(a: LatLon, b: LatLon) -> f64 {
    let p1 = a.lat_deg.to_radians();
    let p2 = b.lat_deg.to_radians();
    let dl = (b.lon_deg - a.lon_deg).to_radians();
    let y = sin(dl) * cos(p2);
    let x = cos(p1) * sin(p2) - sin(p1) * cos(p2) * cos(dl);
    wrap_deg(atan2(y, x).to_degrees())
}

/// The position reached from `a` along the great circle of initial bearing
/// `bearing_deg` after `dist_m` metres.
pub fn destination(a: LatLon, bearing_deg: f64, dist_m: f64) -> LatLon {
    let (e, n) = a.east_north();
    let t = n
        .scale(cos(bearing_deg.to_radians()))
        .plus(e.scale(sin(bearing_deg.to_radians())));
    let d = dist_m / EARTH_RADIUS;
    LatLon::from_unit(a.to_unit().scale(cos(d)).plus(t.scale(sin(d))))
}

/// Wrap an angle into 0..360 degrees.
pub fn wrap_deg(x: f64) -> f64 {
    let r = x % 360.0;
    if r < 0.0 {
        r + 360.0
    } else {
        r
    }
}

/// A local tangent plane about a reference point: x east, y north, metres.
///
/// The projection is azimuthal equidistant: a station's distance and bearing from the
/// reference point are kept exactly, and the scale error at 500 km is under 0.1 %
/// (factor (d/a)/sin(d/a)), far below the error of the height reports.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TangentPlane {
    /// The reference point (origin of the plane).
    pub origin: LatLon,
    /// sin and cos of the origin's latitude, kept for [`TangentPlane::to_xy`].
    sin_cos_lat: (f64, f64),
}

impl TangentPlane {
    /// The plane about `origin`.
    pub fn new(origin: LatLon) -> Self {
        TangentPlane {
            origin,
            sin_cos_lat: sincos(origin.lat_deg.to_radians()),
        }
    }

    /// Plane coordinates (x east, y north), m, of `p`.
    ///
    /// The great-circle distance c and the initial bearing come from the spherical
    /// triangle's components: sin c · (sin θ, cos θ) = (cos φ2 sin Δλ, cos φ1 sin φ2 −
    /// sin φ1 cos φ2 cos Δλ) and cos c = sin φ1 sin φ2 + cos φ1 cos φ2 cos Δλ, so that
    /// c = atan2(sin c, cos c), accurate at any range (the "Vincenty" form of the
    /// sphere's distance). Two sine–cosine pairs and one arctangent a station, where the
    /// haversine distance and the bearing took eleven functions: the saving matters on
    /// the device's software f64 (docs/performance.md).
    pub fn to_xy(&self, p: LatLon) -> (f64, f64) {
        let (s1, c1) = self.sin_cos_lat;
        let (s2, c2) = sincos(p.lat_deg.to_radians());
        let (sdl, cdl) = sincos((p.lon_deg - self.origin.lon_deg).to_radians());
        let east = c2 * sdl;
        let north = c1 * s2 - s1 * c2 * cdl;
        let sin_c = sqrt(east * east + north * north);
        let cos_c = s1 * s2 + c1 * c2 * cdl;
        let d = EARTH_RADIUS * atan2(sin_c, cos_c);
        if sin_c == 0.0 {
            // The origin itself, or its antipode (no bearing: put it due south, at its
            // distance, so that a distance check still sees it).
            return (0.0, if d > 0.0 { -d } else { 0.0 });
        }
        (d * east / sin_c, d * north / sin_c)
    }

    /// The position at plane coordinates (x, y), m.
    pub fn to_latlon(&self, x: f64, y: f64) -> LatLon {
        let d = sqrt(x * x + y * y);
        if d == 0.0 {
            return self.origin;
        }
        destination(self.origin, atan2(x, y).to_degrees(), d)
    }
}

/// The centroid of a set of positions (normalised mean of their unit vectors), or `None`
/// when the set is empty or the mean vanishes (points spread round the globe).
pub fn centroid(points: impl Iterator<Item = LatLon>) -> Option<LatLon> {
    let mut s = Vec3::new(0.0, 0.0, 0.0);
    let mut n = 0usize;
    for p in points {
        s = s.plus(p.to_unit());
        n += 1;
    }
    if n == 0 || s.norm() < 1e-9 * n as f64 {
        return None;
    }
    Some(LatLon::from_unit(s))
}

/// Rhumb-line (constant-bearing) displacement from `a` to `b`: (distance m, bearing deg).
/// Used to measure distances "along a wind direction" the way a map user would.
pub fn rhumb(a: LatLon, b: LatLon) -> (f64, f64) {
    let p1 = a.lat_deg.to_radians();
    let p2 = b.lat_deg.to_radians();
    let dp = p2 - p1;
    let mut dl = (b.lon_deg - a.lon_deg).to_radians();
    let pi = core::f64::consts::PI;
    if dl > pi {
        dl -= 2.0 * pi;
    } else if dl < -pi {
        dl += 2.0 * pi;
    }
    let quarter = pi / 4.0;
    let dpsi = libm::log(libm::tan(quarter + p2 / 2.0) / libm::tan(quarter + p1 / 2.0));
    // Along a parallel the stretched-latitude difference vanishes: use cos φ instead.
    let q = if dpsi.abs() > 1e-12 {
        dp / dpsi
    } else {
        cos(p1)
    };
    let dist = sqrt(dp * dp + q * q * dl * dl) * EARTH_RADIUS;
    let brg = wrap_deg(atan2(dl, dpsi).to_degrees());
    (dist, brg)
}

/// A small 3-vector for positions and directions on the unit sphere.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Vec3 {
    /// x component.
    pub x: f64,
    /// y component.
    pub y: f64,
    /// z component.
    pub z: f64,
}

impl Vec3 {
    /// A vector from components.
    pub const fn new(x: f64, y: f64, z: f64) -> Self {
        Vec3 { x, y, z }
    }
    /// Sum.
    pub fn plus(self, o: Vec3) -> Vec3 {
        Vec3::new(self.x + o.x, self.y + o.y, self.z + o.z)
    }
    /// Difference.
    pub fn minus(self, o: Vec3) -> Vec3 {
        Vec3::new(self.x - o.x, self.y - o.y, self.z - o.z)
    }
    /// Multiple.
    pub fn scale(self, k: f64) -> Vec3 {
        Vec3::new(self.x * k, self.y * k, self.z * k)
    }
    /// Dot product.
    pub fn dot(self, o: Vec3) -> f64 {
        self.x * o.x + self.y * o.y + self.z * o.z
    }
    /// Cross product.
    pub fn cross(self, o: Vec3) -> Vec3 {
        Vec3::new(
            self.y * o.z - self.z * o.y,
            self.z * o.x - self.x * o.z,
            self.x * o.y - self.y * o.x,
        )
    }
    /// Length.
    pub fn norm(self) -> f64 {
        sqrt(self.dot(self))
    }
    /// Unit vector in the same direction (the zero vector stays zero).
    pub fn unit(self) -> Vec3 {
        let n = self.norm();
        if n > 0.0 {
            self.scale(1.0 / n)
        } else {
            self
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn one_degree_of_latitude() {
        // Sphere of radius a: one degree of arc is a·π/180 = 111 195.1 m (computed).
        let d = distance_m(
            LatLon::new(45.0, 10.0).unwrap(),
            LatLon::new(46.0, 10.0).unwrap(),
        );
        assert_relative_eq!(d, 111_195.08, max_relative = 1e-6);
    }

    #[test]
    fn bearings_of_cardinal_points() {
        let o = LatLon::new(45.0, 0.0).unwrap();
        assert_relative_eq!(
            bearing_deg(o, LatLon::new(46.0, 0.0).unwrap()),
            0.0,
            epsilon = 1e-9
        );
        assert_relative_eq!(
            bearing_deg(o, LatLon::new(44.0, 0.0).unwrap()),
            180.0,
            epsilon = 1e-9
        );
        let east = bearing_deg(o, LatLon::new(45.0, 1.0).unwrap());
        // A great circle leaving eastward from 45°N bends south of the parallel: the
        // initial bearing to a point one degree east is just under 90°.
        assert!(east > 89.0 && east < 90.0, "{east}");
    }

    #[test]
    fn destination_inverts_distance_and_bearing() {
        let o = LatLon::new(-33.0, 151.0).unwrap();
        let p = destination(o, 123.0, 456_000.0);
        assert_relative_eq!(distance_m(o, p), 456_000.0, max_relative = 1e-9);
        assert_relative_eq!(bearing_deg(o, p), 123.0, epsilon = 1e-7);
    }

    #[test]
    fn tangent_plane_round_trip() {
        let plane = TangentPlane::new(LatLon::new(45.5, -140.0).unwrap());
        let p = LatLon::new(47.2, -136.1).unwrap();
        let (x, y) = plane.to_xy(p);
        assert!(x > 0.0 && y > 0.0);
        let q = plane.to_latlon(x, y);
        assert_relative_eq!(q.lat_deg, p.lat_deg, epsilon = 1e-9);
        assert_relative_eq!(q.lon_deg, p.lon_deg, epsilon = 1e-9);
    }

    #[test]
    fn tangent_plane_keeps_distance_and_bearing() {
        // The plane is azimuthal equidistant: |(x, y)| is the haversine distance and
        // atan2(x, y) the initial great-circle bearing (formulas above), for points near
        // and far, in both hemispheres and across the date line.
        for (o_lat, o_lon) in [(45.5, -140.0), (-33.0, 179.5), (5.0, 0.0), (80.0, 20.0)] {
            let o = LatLon::new(o_lat, o_lon).unwrap();
            let plane = TangentPlane::new(o);
            for (dlat, dlon) in [
                (0.003, 0.0),
                (0.0, -0.004),
                (1.2, 3.4),
                (-4.0, 1.0),
                (7.5, -12.0),
                (-15.0, -20.0),
            ] {
                let p = LatLon::new((o_lat + dlat).clamp(-89.0, 89.0), o_lon + dlon).unwrap();
                let (x, y) = plane.to_xy(p);
                let d = distance_m(o, p);
                assert_relative_eq!((x * x + y * y).sqrt(), d, max_relative = 1e-10);
                let b = wrap_deg(atan2(x, y).to_degrees());
                let want = bearing_deg(o, p);
                let db = (b - want).abs();
                assert!(db.min(360.0 - db) < 1e-7, "{b} {want}");
            }
            assert_eq!(plane.to_xy(o), (0.0, 0.0));
        }
        // The antipode keeps its distance (half the circumference), so a distance check
        // still refuses it.
        let plane = TangentPlane::new(LatLon::new(10.0, 20.0).unwrap());
        let (x, y) = plane.to_xy(LatLon::new(-10.0, -160.0).unwrap());
        assert_relative_eq!(
            (x * x + y * y).sqrt(),
            core::f64::consts::PI * EARTH_RADIUS,
            max_relative = 1e-6
        );
    }

    #[test]
    fn rhumb_along_a_parallel() {
        // Along a parallel: Δλ · a cos φ (computed).
        let (d, b) = rhumb(
            LatLon::new(45.0, 0.0).unwrap(),
            LatLon::new(45.0, 10.0).unwrap(),
        );
        assert_relative_eq!(
            d,
            10f64.to_radians() * EARTH_RADIUS * 45f64.to_radians().cos(),
            max_relative = 1e-9
        );
        assert_relative_eq!(b, 90.0, epsilon = 1e-9);
    }

    #[test]
    fn centroid_of_symmetric_points() {
        let pts = [
            (44.0, -141.0),
            (44.0, -139.0),
            (46.0, -141.0),
            (46.0, -139.0),
        ];
        let c = centroid(pts.iter().map(|&(a, b)| LatLon::new(a, b).unwrap())).unwrap();
        assert_relative_eq!(c.lon_deg, -140.0, epsilon = 1e-9);
        assert!((c.lat_deg - 45.0).abs() < 0.02);
        assert!(centroid(core::iter::empty()).is_none());
    }
}
