"""Galewsky, Scott & Polvani (2004) barotropically unstable mid-latitude jet.

Galewsky, Scott & Polvani (2004), Tellus 56A, 429-440. A zonal jet in gradient balance with the
height field (global-mean depth 10 km); a small localized height bump, if added, makes the jet
break up into vortices within about 6 days. Longitude 0 of the paper is longitude 0 of the grid.
"""

import numpy as np

from torrid.physics.cases._fields import CaseFields, check_lat_lon, check_planet

JET_MAX_M_S = 80.0
"""u_max, m s^-1 (Galewsky et al. 2004)."""
JET_SOUTH_RAD = np.pi / 7.0
"""phi0, southern edge of the jet, rad (Galewsky et al. 2004)."""
JET_NORTH_RAD = np.pi / 2.0 - JET_SOUTH_RAD
"""phi1, northern edge of the jet, rad (Galewsky et al. 2004)."""
MEAN_DEPTH_M = 10000.0
"""Global mean of the balanced (unperturbed) height, m (Galewsky et al. 2004)."""
BUMP_HEIGHT_M = 120.0
"""h_hat, amplitude of the perturbation, m (Galewsky et al. 2004)."""
BUMP_LON_WIDTH = 1.0 / 3.0
"""alpha, longitudinal width of the perturbation, rad (Galewsky et al. 2004)."""
BUMP_LAT_WIDTH = 1.0 / 15.0
"""beta, latitudinal width of the perturbation, rad (Galewsky et al. 2004)."""
BUMP_LAT_RAD = np.pi / 4.0
"""phi2, latitude of the perturbation, rad (Galewsky et al. 2004)."""

_E_N = np.exp(-4.0 / (JET_NORTH_RAD - JET_SOUTH_RAD) ** 2)
_QUAD_EPSREL = 1e-13


def jet_zonal_wind(lat):
    """Jet profile u = u_max / e_n exp(1 / ((lat - phi0)(lat - phi1))) on phi0 < lat < phi1, else 0.

    e_n = exp(-4 / (phi1 - phi0)^2), so that u = u_max at the jet centre (Galewsky et al. 2004).

    Parameters
    ----------
    lat : array_like
        Latitude, rad.

    Returns
    -------
    numpy.ndarray
        Eastward wind, m s^-1.
    """
    lat = np.asarray(lat, dtype=float)
    inside = (lat > JET_SOUTH_RAD) & (lat < JET_NORTH_RAD)
    safe = np.where(inside, lat, 0.5 * (JET_SOUTH_RAD + JET_NORTH_RAD))
    u = JET_MAX_M_S / _E_N * np.exp(1.0 / ((safe - JET_SOUTH_RAD) * (safe - JET_NORTH_RAD)))
    return np.where(inside, u, 0.0)


def _balance_integrand(lat, radius_m, rotation_rate_s):
    """u (a f + u tan(lat)), m^2 s^-2 rad^-1: minus g dh/dlat of gradient balance."""
    u = float(jet_zonal_wind(lat))
    return u * (2.0 * radius_m * rotation_rate_s * np.sin(lat) + u * np.tan(lat))


def balanced_height(lat, *, radius_m, rotation_rate_s, gravity_m_s2):
    """Height in gradient balance with :func:`jet_zonal_wind`, global mean 10 km.

    g dh/dlat = -a u (f + u tan(lat) / a), f = 2 Omega sin(lat) (Galewsky et al. 2004), integrated
    from the south pole with adaptive quadrature (scipy ``quad``) between consecutive sorted
    latitudes. The constant makes the global mean (1/2) int h cos(lat) dlat equal 10 km; by parts,
    mean(h) - h(south pole) = -1/(2g) int u (a f + u tan) (1 - sin(lat)) dlat, one quadrature.

    Parameters
    ----------
    lat : array_like
        Latitude, rad.
    radius_m, rotation_rate_s, gravity_m_s2 : float
        Planetary radius (m), rotation rate (s^-1) and gravity (m s^-2).

    Returns
    -------
    numpy.ndarray
        h, m, of the shape of ``lat``.
    """
    from scipy.integrate import quad  # here: 0.3 s of imports only this case needs

    check_planet(radius_m, rotation_rate_s, gravity_m_s2)
    lat = check_lat_lon(lat, 0.0)[0]

    def integrand(p):
        return _balance_integrand(p, radius_m, rotation_rate_s)

    scale = JET_MAX_M_S * (2.0 * radius_m * abs(rotation_rate_s) + JET_MAX_M_S)
    opts = dict(epsabs=1e-15 * scale, epsrel=_QUAD_EPSREL, limit=200)
    # Integral from phi0 to each (clipped) latitude, accumulated over sorted unique values.
    nodes, index = np.unique(np.clip(lat, JET_SOUTH_RAD, JET_NORTH_RAD), return_inverse=True)
    edges = np.concatenate(([JET_SOUTH_RAD], nodes))
    pieces = [quad(integrand, lo, hi, **opts)[0] for lo, hi in zip(edges[:-1], edges[1:])]
    integral = np.cumsum(pieces)[np.reshape(index, lat.shape)]
    weighted = quad(lambda p: integrand(p) * (1.0 - np.sin(p)), JET_SOUTH_RAD, JET_NORTH_RAD,
                    **opts)[0]
    h_south = MEAN_DEPTH_M + weighted / (2.0 * gravity_m_s2)  # mean - h_south = -weighted / 2g
    return h_south - integral / gravity_m_s2


def height_perturbation(lat, lon):
    """h' = h_hat cos(lat) exp(-(lon / alpha)^2) exp(-((phi2 - lat) / beta)^2), m.

    Galewsky et al. (2004), with lon wrapped into (-pi, pi], h_hat = 120 m, alpha = 1/3,
    beta = 1/15, phi2 = pi/4.

    Parameters
    ----------
    lat, lon : array_like
        Latitude and eastward longitude (any range), rad; broadcastable.

    Returns
    -------
    numpy.ndarray
        h', m.
    """
    lat, lon = check_lat_lon(lat, lon)
    lon_w = np.pi - np.mod(np.pi - lon, 2.0 * np.pi)  # into (-pi, pi]
    return (BUMP_HEIGHT_M * np.cos(lat) * np.exp(-((lon_w / BUMP_LON_WIDTH) ** 2))
            * np.exp(-(((BUMP_LAT_RAD - lat) / BUMP_LAT_WIDTH) ** 2)))


def initial_fields(lat, lon, *, radius_m, rotation_rate_s, gravity_m_s2, perturbed=True):
    """Initial state of the Galewsky et al. (2004) jet.

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
    perturbed : bool, optional
        Add :func:`height_perturbation` to the balanced height (default True). The balance
        constant is fixed by the unperturbed height (mean 10 km), so the perturbed mean is a
        little larger.

    Returns
    -------
    CaseFields
        u (m s^-1), v = 0, h (m), zero surface height, ``coriolis_tilt_rad = 0``.
    """
    if not isinstance(perturbed, (bool, np.bool_)):
        raise TypeError(f"perturbed must be a bool, got {perturbed!r}")
    check_planet(radius_m, rotation_rate_s, gravity_m_s2)
    lat, lon = check_lat_lon(lat, lon)
    h = balanced_height(lat, radius_m=radius_m, rotation_rate_s=rotation_rate_s,
                        gravity_m_s2=gravity_m_s2)
    if perturbed:
        h = h + height_perturbation(lat, lon)
    u = jet_zonal_wind(lat)
    return CaseFields(u=u, v=np.zeros_like(u), h=h, surface_height=np.zeros_like(u),
                      coriolis_tilt_rad=0.0)
