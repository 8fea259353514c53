"""Williamson case 5: zonal flow over an isolated mountain.

Williamson, Drake, Hack, Jakob & Swarztrauber (1992), J. Comput. Phys. 102, 211-224, test case 5.
The case-2 balanced zonal flow (alpha = 0) with u0 = 20 m/s and h0 = 5960 m, suddenly given a
conical mountain; there is no analytic solution.
"""

import numpy as np

from torrid.physics.cases._fields import CaseFields, check_lat_lon, check_planet

WIND_SPEED_M_S = 20.0
"""u0, m s^-1 (Williamson et al. 1992, case 5)."""
HEIGHT_0_M = 5960.0
"""h0, m (Williamson et al. 1992, case 5)."""
MOUNTAIN_HEIGHT_M = 2000.0
"""Mountain peak h_s0, m (Williamson et al. 1992, case 5)."""
MOUNTAIN_RADIUS_RAD = np.pi / 9.0
"""Mountain radius R, rad, measured in the (lon, lat) plane (Williamson et al. 1992, case 5)."""
MOUNTAIN_LON_RAD = 1.5 * np.pi
"""Mountain centre longitude 3 pi / 2 (same as -pi/2), rad (Williamson et al. 1992, case 5)."""
MOUNTAIN_LAT_RAD = np.pi / 6.0
"""Mountain centre latitude pi / 6, rad (Williamson et al. 1992, case 5)."""


def surface_height(lat, lon):
    """Conical mountain h_s = h_s0 (1 - r / R), r^2 = min(R^2, (lon - lon_c)^2 + (lat - lat_c)^2).

    Williamson et al. (1992), case 5. The longitude difference is wrapped into [-pi, pi), so any
    longitude range gives the same mountain.

    Parameters
    ----------
    lat, lon : array_like
        Latitude and eastward longitude, rad; broadcastable.

    Returns
    -------
    numpy.ndarray
        h_s, m.
    """
    lat, lon = check_lat_lon(lat, lon)
    dlon = np.mod(lon - MOUNTAIN_LON_RAD + np.pi, 2.0 * np.pi) - np.pi
    r = np.sqrt(np.minimum(MOUNTAIN_RADIUS_RAD**2, dlon**2 + (lat - MOUNTAIN_LAT_RAD) ** 2))
    return MOUNTAIN_HEIGHT_M * (1.0 - r / MOUNTAIN_RADIUS_RAD)


def initial_fields(lat, lon, *, radius_m, rotation_rate_s, gravity_m_s2):
    """Initial state of Williamson case 5.

    u = u0 cos(lat), v = 0, g h = g h0 - (a Omega u0 + u0^2/2) sin^2(lat) with u0 = 20 m s^-1,
    h0 = 5960 m, and the mountain of :func:`surface_height` (Williamson et al. 1992, case 5).

    Parameters
    ----------
    lat, lon : array_like
        Latitude in [-pi/2, pi/2] and eastward longitude (any range), rad; broadcastable.
    radius_m : float
        Planetary radius a, m.
    rotation_rate_s : float
        Rotation rate Omega, s^-1.
    gravity_m_s2 : float
        Gravity g, m s^-2.

    Returns
    -------
    CaseFields
        u, v (m s^-1), free-surface height h (m; NOT the thickness, which is h - h_s), the
        mountain h_s (m), and ``coriolis_tilt_rad = 0``.
    """
    check_planet(radius_m, rotation_rate_s, gravity_m_s2)
    lat, lon = check_lat_lon(lat, lon)
    u0 = WIND_SPEED_M_S
    u = u0 * np.cos(lat)
    geopotential = gravity_m_s2 * HEIGHT_0_M - (
        radius_m * rotation_rate_s * u0 + 0.5 * u0**2
    ) * np.sin(lat) ** 2
    return CaseFields(
        u=u,
        v=np.zeros_like(u),
        h=geopotential / gravity_m_s2,
        surface_height=surface_height(lat, lon),
        coriolis_tilt_rad=0.0,
    )
