"""Williamson case 2: global steady-state nonlinear zonal geostrophic flow.

Williamson, Drake, Hack, Jakob & Swarztrauber (1992), J. Comput. Phys. 102, 211-224, test case 2.
Solid-body rotation about an axis tilted by alpha from the grid's pole, in exact balance with the
height field when the Coriolis parameter uses the same tilted axis; the state is steady.
"""

import numpy as np

from torrid.physics.cases._fields import CaseFields, check_lat_lon, check_planet
from torrid.physics.cases.earth import DAY_S
from torrid.physics.coriolis import coriolis_parameter

GEOPOTENTIAL_0_M2_S2 = 2.94e4
"""g h0, m^2 s^-2 (Williamson et al. 1992, case 2)."""

ROTATION_PERIOD_OF_FLOW_DAYS = 12.0
"""The flow circles the planet in 12 days: u0 = 2 pi a / (12 days) (Williamson et al. 1992)."""


def wind_speed_m_s(radius_m):
    """Maximum wind u0 = 2 pi a / (12 days), m s^-1 (Williamson et al. 1992, case 2)."""
    return 2.0 * np.pi * radius_m / (ROTATION_PERIOD_OF_FLOW_DAYS * DAY_S)


def _height(lat, lon, radius_m, rotation_rate_s, gravity_m_s2, alpha_rad):
    u0 = wind_speed_m_s(radius_m)
    # (k . r) of the tilted axis = f / (2 Omega); the same expression as the Coriolis parameter.
    k_dot_r = coriolis_parameter(lat, lon, 1.0, alpha_rad) / 2.0
    # g h = g h0 - (a Omega u0 + u0^2 / 2) (k . r)^2   (Williamson et al. 1992, case 2)
    phi = GEOPOTENTIAL_0_M2_S2 - (radius_m * rotation_rate_s * u0 + 0.5 * u0**2) * k_dot_r**2
    return phi / gravity_m_s2


def initial_fields(lat, lon, *, radius_m, rotation_rate_s, gravity_m_s2, alpha_rad=0.0):
    """Initial (and exact) state of Williamson case 2.

    u = u0 (cos(lat) cos(alpha) + cos(lon) sin(lat) sin(alpha)), v = -u0 sin(lon) sin(alpha),
    g h = g h0 - (a Omega u0 + u0^2/2) (-cos(lon) cos(lat) sin(alpha) + sin(lat) cos(alpha))^2,
    u0 = 2 pi a / (12 days), g h0 = 2.94e4 m^2 s^-2 (Williamson et al. 1992, case 2).

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
    alpha_rad : float, optional
        Tilt alpha of the flow's (and the Coriolis parameter's) axis from the grid's pole, rad.

    Returns
    -------
    CaseFields
        u, v (m s^-1), h (m), zero surface height, and ``coriolis_tilt_rad = alpha_rad``.
    """
    check_planet(radius_m, rotation_rate_s, gravity_m_s2)
    lat, lon = check_lat_lon(lat, lon)
    alpha = float(alpha_rad)
    u0 = wind_speed_m_s(radius_m)
    u = u0 * (np.cos(lat) * np.cos(alpha) + np.cos(lon) * np.sin(lat) * np.sin(alpha))
    v = -u0 * np.sin(lon) * np.sin(alpha)
    h = _height(lat, lon, radius_m, rotation_rate_s, gravity_m_s2, alpha)
    return CaseFields(u=u, v=v, h=h, surface_height=np.zeros_like(h), coriolis_tilt_rad=alpha)


def exact_height(lat, lon, t_s, *, radius_m, rotation_rate_s, gravity_m_s2, alpha_rad=0.0):
    """Exact free-surface height of Williamson case 2 at time ``t_s``: the initial height (steady).

    Parameters
    ----------
    lat, lon : array_like
        Latitude and eastward longitude, rad; broadcastable.
    t_s : float
        Time since the start, s (the solution does not depend on it).
    radius_m, rotation_rate_s, gravity_m_s2, alpha_rad : float
        As in :func:`initial_fields`.

    Returns
    -------
    numpy.ndarray
        h, m.
    """
    if not np.isfinite(t_s):
        raise ValueError(f"t_s must be finite, got {t_s!r}")
    check_planet(radius_m, rotation_rate_s, gravity_m_s2)
    lat, lon = check_lat_lon(lat, lon)
    return _height(lat, lon, radius_m, rotation_rate_s, gravity_m_s2, float(alpha_rad))
