#!/usr/bin/env python3
"""Make leeward's MetPy reference vectors.

Usage: generate_metpy.py OUTPUT_DIR

Writes six CSV files into OUTPUT_DIR:

  metpy_coriolis.csv             f and beta over a spread of latitudes
  metpy_geostrophic_cases.csv    MetPy's geostrophic wind, vorticity and Laplacian at the
                                 centre of analytic height fields on 5 x 5 lat/lon grids
  metpy_geostrophic_stations.csv the 25 grid points of each case, as leeward stations
  metpy_thermo.csv               theta, saturation vapour pressure, mixing ratio, virtual
                                 temperature and relative humidity on a (p, T, Td) grid
  metpy_profiles.csv             three invented soundings, level by level, with heights
                                 from MetPy's hydrostatic thickness
  metpy_profile_results.csv      MetPy's thickness (virtual and dry) between level pairs,
                                 its Brunt-Vaisala frequency at interior levels, and the
                                 bulk N^2 of level pairs from its potential temperature

Numbers are written with 17 significant digits so that a rerun on the same versions gives
the same text, and a rerun elsewhere differs only by floating-point rounding.

The analytic height fields are defined on "map coordinates" about each case's centre
(lat0, lon0), with a = metpy.constants.earth_avg_radius:

  x = a * cos(lat0) * (lon - lon0)   [lon, lat in radians]
  y = a * (lat - lat0)

tests/tests/metpy_reference.rs restates the same fields to check the station heights and to
work out the exact spherical values at each centre; keep the two in step.
tests/tests/metpy_sounding.rs reads the three sounding files; its comments say what each
MetPy function computes (read from the MetPy 1.7.1 source) and how that differs from
leeward.
"""

import math
import os
import sys

import metpy
import metpy.calc as mpcalc
import metpy.constants as mpconst
import numpy as np
from metpy.units import units
from pyproj import CRS, Geod

# --------------------------------------------------------------------------------------
# Coriolis parameter and beta
# --------------------------------------------------------------------------------------

LATITUDES_DEG = [-89.5, -60.0, -45.5, -30.0, -15.0, -5.0, 0.0, 5.0, 15.0, 30.0, 45.0,
                 45.5, 60.0, 75.0, 89.5]

# Half-step of the central difference used for beta, degrees. MetPy has no beta function:
# beta = df/dy is taken here as [f(lat + h) - f(lat - h)] / (a * 2h), with f from
# metpy.calc.coriolis_parameter and a = metpy.constants.earth_avg_radius. For
# f = 2 Omega sin(lat) this difference equals beta * sin(h)/h exactly, a relative
# truncation of h^2/6 = 5e-9 for h = 0.01 degree (h in radians); rounding adds about 1e-12.
BETA_HALF_STEP_DEG = 0.01


def coriolis_rows():
    rows = []
    a = mpconst.earth_avg_radius
    h = units.Quantity(BETA_HALF_STEP_DEG, 'degree')
    for lat_deg in LATITUDES_DEG:
        lat = units.Quantity(lat_deg, 'degree')
        f = mpcalc.coriolis_parameter(lat).m_as('1/s')
        f_hi = mpcalc.coriolis_parameter(lat + h)
        f_lo = mpcalc.coriolis_parameter(lat - h)
        arc = a * (2.0 * h).to('radian') / units.radian
        beta = ((f_hi - f_lo) / arc).m_as('1/(m*s)')
        rows.append((lat_deg, f, beta))
    return rows


# --------------------------------------------------------------------------------------
# Geostrophic cases
# --------------------------------------------------------------------------------------

GRID_HALF = 2          # 5 x 5 points
SPACING_DEG = 1.0


def trough(x, y):
    # Westerly flow with a sinusoidal trough on the centre's meridian: wavelength 3000 km,
    # amplitude 60 m, minimum at x = 0.
    k = 2.0 * math.pi / 3.0e6
    return 5500.0 - 8.0e-5 * y - 60.0 * np.cos(k * x)


# (case, lat0, lon0, Z(x, y) in gpm). Gradients are of order 1e-4 (100 m per 1000 km,
# about 10 m/s at mid latitudes); curvatures give vorticities of order 1e-5 to 1e-4 1/s.
CASES = [
    # Zonal flow: uniform meridional gradient, heights falling northward (westerly wind).
    ('zonal45', 45.0, 10.0, lambda x, y: 5640.0 - 1.0e-4 * y),
    # Sinusoidal trough in westerly flow.
    ('trough52', 52.0, -20.0, trough),
    # Cyclonic bowl Z0 + c (x^2 + y^2) with a small tilt so that the wind is not zero.
    ('bowl40', 40.0, 100.0,
     lambda x, y: 5400.0 + 5.0e-5 * x - 3.0e-5 * y + 2.4e-10 * (x * x + y * y)),
    # Southern Hemisphere: westerlies (heights rising northward) and a full quadratic.
    ('south35', -35.0, 150.0,
     lambda x, y: 5600.0 + 1.2e-4 * y + 1.5e-10 * x * x + 0.8e-10 * x * y
     + 0.5e-10 * y * y),
    # North-east Pacific, 45.5 N 140 W: a ridge (anticyclonic) in south-westerly flow.
    ('pac45', 45.5, -140.0,
     lambda x, y: 5580.0 + 2.0e-5 * x - 9.0e-5 * y - 1.5e-10 * (x * x + 0.6 * y * y)),
]


def case_grid(lat0, lon0):
    """1-D latitude (south to north) and longitude (west to east) of the grid, degrees."""
    offs = np.arange(-GRID_HALF, GRID_HALF + 1) * SPACING_DEG
    return lat0 + offs, lon0 + offs


def heights(field, lat0, lon0, lats, lons):
    """Z on the grid, shape (lat, lon) = (y, x), as a plain array of gpm."""
    a = mpconst.earth_avg_radius.m_as('m')
    lon2, lat2 = np.meshgrid(lons, lats)
    x = a * math.cos(math.radians(lat0)) * np.radians(lon2 - lon0)
    y = a * np.radians(lat2 - lat0)
    return field(x, y)


def geostrophic_case(name, lat0, lon0, field):
    lats, lons = case_grid(lat0, lon0)
    z = heights(field, lat0, lon0, lats, lons)
    # Geopotential heights: MetPy's geostrophic_wind multiplies a height by
    # metpy.constants.g (9.80665 m s^-2, the value that defines the geopotential metre).
    height = units.Quantity(z, 'm')
    lat_q = units.Quantity(lats, 'degree')
    lon_q = units.Quantity(lons, 'degree')
    # leeward works on a sphere: give MetPy the sphere of its own mean radius, for the
    # distances (pyproj's default 'sphere' has a = 6370997 m, its lat/lon CRS WGS 84).
    radius = mpconst.earth_avg_radius.m_as('m')
    geod = Geod(a=radius, b=radius)
    crs = CRS.from_proj4(f'+proj=longlat +R={radius!r} +no_defs')

    # Geostrophic wind: true distances between grid points from lat_lon_grid_deltas, f from
    # the latitude of each row (a column array broadcasts along x).
    dx, dy = mpcalc.lat_lon_grid_deltas(lon_q, lat_q, geod=geod)
    lat_col = lat_q[:, np.newaxis]
    u, v = mpcalc.geostrophic_wind(height, dx=dx, dy=dy, latitude=lat_col)

    # The same wind the projection-correct way (nominal spacing and the lat/lon map
    # factors): the two must agree closely, or the grid is not what we think it is.
    u2, v2 = mpcalc.geostrophic_wind(height, latitude=lat_col, longitude=lon_q, crs=crs)
    scale = float(np.hypot(u[GRID_HALF, GRID_HALF], v[GRID_HALF, GRID_HALF]).m_as('m/s'))
    for p, q in ((u, u2), (v, v2)):
        diff = abs(float((p - q)[GRID_HALF, GRID_HALF].m_as('m/s')))
        if diff > 1e-4 * scale + 1e-9:
            raise SystemExit(f'{name}: the two MetPy winds differ by {diff} m/s')

    # Vorticity with the map factors of the lat/lon grid (MetPy docs: give longitude,
    # latitude and crs for a projection-correct result); this includes u tan(lat)/a.
    zeta = mpcalc.vorticity(u, v, latitude=lat_col, longitude=lon_q, crs=crs)
    # Projection-correct Laplacian (divergence of the gradient), where MetPy has one.
    lap = ''
    if hasattr(mpcalc, 'geospatial_laplacian'):
        lap_q = mpcalc.geospatial_laplacian(height, latitude=lat_col, longitude=lon_q,
                                            crs=crs)
        lap = float(lap_q[GRID_HALF, GRID_HALF].m_as('1/m'))

    f0 = float(mpcalc.coriolis_parameter(units.Quantity(lat0, 'degree')).m_as('1/s'))
    c = (GRID_HALF, GRID_HALF)
    case_row = (name, lat0, lon0, f0, float(u[c].m_as('m/s')), float(v[c].m_as('m/s')),
                float(zeta[c].m_as('1/s')), lap, SPACING_DEG)

    stations = []
    for i, lat in enumerate(lats):
        for j, lon in enumerate(lons):
            stations.append((name, station_id(name, i, j), float(lat), float(lon),
                             float(z[i, j])))
    return case_row, stations


def station_id(name, i, j):
    """C<case number>R<row><col>: e.g. C1R00 is the south-west corner of case 1."""
    k = [c[0] for c in CASES].index(name) + 1
    sid = f'C{k}R{i}{j}'
    assert len(sid) <= 8 and sid.isascii() and sid.isalnum()
    return sid


# --------------------------------------------------------------------------------------
# Thermodynamics of one level on a grid
# --------------------------------------------------------------------------------------

THERMO_PRESSURES_HPA = [1000.0, 850.0, 700.0, 500.0, 300.0, 200.0, 100.0]
THERMO_TEMPERATURES_C = [-60.0, -50.0, -40.0, -30.0, -20.0, -10.0, 0.0, 10.0, 20.0, 30.0,
                         40.0]
THERMO_DEPRESSIONS_K = [0.0, 2.0, 5.0, 10.0, 20.0, 30.0]

# Kelvin from Celsius as the Rust test does it (t + 273.15 in binary64), so that both sides
# start from the same number.
ZERO_C_K = 273.15


def kelvin(t_c):
    return units.Quantity(t_c + ZERO_C_K, 'K')


def thermo_rows():
    """One row per (p, T, Td): MetPy's functions, all over liquid water (phase='liquid',
    the default)."""
    rows = []
    for p_hpa in THERMO_PRESSURES_HPA:
        p = units.Quantity(p_hpa, 'hPa')
        for t_c in THERMO_TEMPERATURES_C:
            for dep in THERMO_DEPRESSIONS_K:
                td_c = t_c - dep
                t, td = kelvin(t_c), kelvin(td_c)
                theta = mpcalc.potential_temperature(p, t)
                es_t = mpcalc.saturation_vapor_pressure(t)
                e = mpcalc.saturation_vapor_pressure(td)
                r = mpcalc.mixing_ratio(e, p)
                tv = mpcalc.virtual_temperature(t, r)
                rh = mpcalc.relative_humidity_from_dewpoint(t, td)
                rows.append((p_hpa, t_c, td_c, theta.m_as('K'), es_t.m_as('Pa'),
                             e.m_as('Pa'), r.m_as(''), tv.m_as('K'), rh.m_as('')))
    return rows


# --------------------------------------------------------------------------------------
# Soundings
# --------------------------------------------------------------------------------------

# Three soundings invented for the test (not observations): (name, surface height m,
# levels as (p hPa, T degC, Td degC)), ground up.
PROFILES = [
    # Moist tropical-like column: a shallow superadiabatic layer at the ground (1008 to
    # 1000 hPa), moist to 500 hPa, a cold tropopause near 100 hPa.
    ('tropical', 12.0, [
        (1008.0, 29.4, 25.0), (1000.0, 27.9, 24.6), (950.0, 24.0, 21.5),
        (900.0, 21.0, 18.8), (850.0, 18.2, 15.5), (800.0, 15.6, 12.0),
        (750.0, 12.8, 8.5), (700.0, 10.0, 4.5), (650.0, 6.8, 0.0),
        (600.0, 3.3, -5.0), (550.0, -0.4, -8.0), (500.0, -4.6, -12.0),
        (450.0, -9.2, -18.0), (400.0, -14.9, -24.0), (350.0, -21.6, -32.0),
        (300.0, -30.0, -40.0), (250.0, -40.3, -50.0), (200.0, -53.0, -62.0),
        (150.0, -67.5, -77.0), (125.0, -74.8, -83.0), (100.0, -79.0, -88.0)]),
    # Dry polar winter column: a 13 K surface-based inversion to 950 hPa, a low
    # tropopause near 300 hPa, dew-point depressions up to 28 K.
    ('polar', 30.0, [
        (1018.0, -32.0, -35.5), (1000.0, -24.5, -29.0), (975.0, -19.8, -27.0),
        (950.0, -18.6, -30.0), (925.0, -19.5, -33.0), (900.0, -21.0, -36.0),
        (850.0, -24.2, -40.0), (800.0, -27.5, -44.0), (700.0, -34.6, -50.0),
        (600.0, -41.8, -56.0), (500.0, -49.5, -62.0), (400.0, -56.0, -70.0),
        (300.0, -58.5, -78.0), (250.0, -57.8, -80.0), (200.0, -57.0, -82.0),
        (150.0, -57.5, -84.0), (100.0, -58.0, -86.0)]),
    # Mid-latitude column close to the US Standard Atmosphere: about 6.5 K/km to a
    # tropopause at 226 hPa (near 11 km), isothermal -56.5 degC above.
    ('midlat', 150.0, [
        (1013.0, 15.0, 10.0), (1000.0, 14.2, 9.8), (950.0, 11.0, 7.5),
        (900.0, 7.6, 3.0), (850.0, 4.8, -0.5), (800.0, 1.6, -3.5),
        (750.0, -1.8, -8.0), (700.0, -4.9, -12.0), (600.0, -11.8, -20.0),
        (500.0, -21.0, -30.0), (400.0, -31.8, -42.0), (300.0, -44.6, -55.0),
        (250.0, -52.4, -62.0), (226.0, -56.5, -66.0), (200.0, -56.5, -70.0),
        (175.0, -56.5, -72.0), (150.0, -56.5, -74.0), (125.0, -56.5, -76.0),
        (100.0, -56.5, -78.0)]),
]

# Level pairs, by pressure (hPa), of the thickness rows and of the bulk N^2 rows.
THICKNESS_PAIRS = {
    'tropical': [(1008, 100), (1008, 1000), (1000, 500), (850, 700), (700, 500),
                 (500, 300), (300, 100)],
    'polar': [(1018, 100), (1018, 950), (1000, 500), (850, 700), (500, 300), (300, 100)],
    'midlat': [(1013, 100), (1000, 500), (850, 700), (500, 300), (300, 226), (226, 100)],
}
BULK_PAIRS = {
    'tropical': [(1008, 1000), (1000, 850), (850, 500), (500, 200), (200, 100),
                 (1008, 100)],
    'polar': [(1018, 950), (950, 500), (500, 300), (300, 100), (1018, 100)],
    'midlat': [(1013, 850), (850, 500), (500, 226), (226, 100), (1013, 100)],
}


def profile_arrays(levels):
    p = units.Quantity(np.array([lv[0] for lv in levels]), 'hPa')
    t = units.Quantity(np.array([lv[1] for lv in levels]) + ZERO_C_K, 'K')
    td = units.Quantity(np.array([lv[2] for lv in levels]) + ZERO_C_K, 'K')
    # Mixing ratio from the vapour pressure at the dew point (over liquid water).
    r = mpcalc.mixing_ratio(mpcalc.saturation_vapor_pressure(td), p)
    return p, t, td, r


def thickness(p, t, r, lo, hi):
    """metpy.calc.thickness_hydrostatic over levels lo..hi (inclusive), m: with the mixing
    ratio (virtual temperature) when r is given, dry otherwise. MetPy integrates
    Tv d(ln p) by numpy's trapezoid over the levels it is given."""
    s = slice(lo, hi + 1)
    if r is None:
        return float(mpcalc.thickness_hydrostatic(p[s], t[s]).m_as('m'))
    return float(mpcalc.thickness_hydrostatic(p[s], t[s], mixing_ratio=r[s]).m_as('m'))


def profile_heights(z0, p, t, r):
    """Height of every level: the surface height plus MetPy's virtual thickness from the
    lowest level to it."""
    return [z0] + [z0 + thickness(p, t, r, 0, i) for i in range(1, len(p))]


def check_stencil(name, z, theta, n2):
    """MetPy's first_derivative at an interior level of a non-uniform grid is the
    weighted mean of the two one-sided differences, each weighted by the other side's
    spacing (metpy/calc/tools.py, 'center'). The Rust test relies on this: check it."""
    g = mpconst.g.m_as('m/s^2')
    for i in range(1, len(z) - 1):
        d0, d1 = z[i] - z[i - 1], z[i + 1] - z[i]
        slope = (d1 * (theta[i] - theta[i - 1]) / d0
                 + d0 * (theta[i + 1] - theta[i]) / d1) / (d0 + d1)
        mine = g / theta[i] * slope
        if abs(mine - n2[i]) > 1e-9 * abs(n2[i]) + 1e-15:
            raise SystemExit(f'{name} level {i}: MetPy N^2 {n2[i]} is not the stencil '
                             f'value {mine}')


def sounding_rows():
    level_rows, result_rows = [], []
    g = mpconst.g.m_as('m/s^2')
    for name, z0, levels in PROFILES:
        p, t, td, r = profile_arrays(levels)
        z = profile_heights(z0, p, t, r)
        for i, (lv, zi) in enumerate(zip(levels, z)):
            level_rows.append((name, i, lv[0], lv[1], lv[2], zi))
        index = {lv[0]: i for i, lv in enumerate(levels)}

        for lo_hpa, hi_hpa in THICKNESS_PAIRS[name]:
            lo, hi = index[lo_hpa], index[hi_hpa]
            result_rows.append((name, 'thickness_virtual_m', lo, hi,
                                thickness(p, t, r, lo, hi)))
            result_rows.append((name, 'thickness_dry_m', lo, hi,
                                thickness(p, t, None, lo, hi)))

        # Brunt-Vaisala frequency on the height grid: MetPy takes dtheta/dz by
        # first_derivative (three-point, second order), one-sided at the two ends. Only
        # the interior levels are written: there the stencil spans the two layers around
        # the level and can be rebuilt from leeward's per-layer N^2.
        zq = units.Quantity(np.array(z), 'm')
        theta = mpcalc.potential_temperature(p, t)
        n2 = mpcalc.brunt_vaisala_frequency_squared(zq, theta).m_as('1/s^2')
        n = mpcalc.brunt_vaisala_frequency(zq, theta).m_as('1/s')
        check_stencil(name, z, theta.m_as('K'), n2)
        for i in range(1, len(z) - 1):
            result_rows.append((name, 'bv_n2_per_s2', i, i, float(n2[i])))
            # MetPy's N is NaN where N^2 < 0: written as an empty field.
            result_rows.append((name, 'bv_n_per_s', i, i,
                                '' if math.isnan(n[i]) else float(n[i])))

        # MetPy has no bulk N over a layer: this is the layer form g ln(theta2/theta1) /
        # (z2 - z1) with MetPy's potential_temperature at the two levels, metpy.constants.g
        # and the heights above.
        th = theta.m_as('K')
        for lo_hpa, hi_hpa in BULK_PAIRS[name]:
            lo, hi = index[lo_hpa], index[hi_hpa]
            bulk = g * math.log(th[hi] / th[lo]) / (z[hi] - z[lo])
            result_rows.append((name, 'bulk_n2_per_s2', lo, hi, bulk))
    return level_rows, result_rows


# --------------------------------------------------------------------------------------
# Output
# --------------------------------------------------------------------------------------

def fmt(v):
    if v == '':
        return ''
    if isinstance(v, str):
        return v
    if v == 0.0:
        v = 0.0  # no "-0"
    return '%.17g' % v


def write_csv(path, header, rows):
    with open(path, 'w', newline='\n', encoding='ascii') as fh:
        fh.write(','.join(header) + '\n')
        for r in rows:
            fh.write(','.join(fmt(v) for v in r) + '\n')


def main(argv):
    if len(argv) != 2:
        print(__doc__.strip().splitlines()[2], file=sys.stderr)
        return 2
    out = argv[1]
    os.makedirs(out, exist_ok=True)

    write_csv(os.path.join(out, 'metpy_coriolis.csv'),
              ['lat_deg', 'f_per_s', 'beta_per_m_s'], coriolis_rows())

    cases, stations = [], []
    for name, lat0, lon0, field in CASES:
        c, s = geostrophic_case(name, lat0, lon0, field)
        cases.append(c)
        stations.extend(s)
    write_csv(os.path.join(out, 'metpy_geostrophic_cases.csv'),
              ['case', 'center_lat', 'center_lon', 'f0_per_s', 'u_g_ms', 'v_g_ms',
               'vorticity_per_s', 'laplacian_z_per_m', 'spacing_deg'], cases)
    write_csv(os.path.join(out, 'metpy_geostrophic_stations.csv'),
              ['case', 'id', 'lat_deg', 'lon_deg', 'height_m'], stations)

    thermo = thermo_rows()
    write_csv(os.path.join(out, 'metpy_thermo.csv'),
              ['pressure_hpa', 'temperature_c', 'dewpoint_c', 'theta_k', 'es_t_pa', 'e_pa',
               'mixing_ratio', 'virtual_temperature_k', 'relative_humidity'], thermo)
    levels, results = sounding_rows()
    write_csv(os.path.join(out, 'metpy_profiles.csv'),
              ['profile', 'level', 'pressure_hpa', 'temperature_c', 'dewpoint_c',
               'height_m'], levels)
    write_csv(os.path.join(out, 'metpy_profile_results.csv'),
              ['profile', 'quantity', 'level_low', 'level_high', 'value'], results)
    print(f'MetPy {metpy.__version__}: wrote {len(cases)} cases, {len(stations)} stations '
          f'and {len(LATITUDES_DEG)} latitudes to {out}')
    print(f'MetPy {metpy.__version__}: wrote {len(thermo)} thermodynamic points, '
          f'{len(PROFILES)} profiles ({len(levels)} levels) and {len(results)} profile '
          f'results to {out}')
    return 0


if __name__ == '__main__':
    sys.exit(main(sys.argv))
