"""Williamson case 6: Rossby-Haurwitz wave of wavenumber R = 4.

Williamson, Drake, Hack, Jakob & Swarztrauber (1992), J. Comput. Phys. 102, 211-224, test case 6
(eqs. 141-147 as cited in the task brief; the equation numbers are not checked here). The flow is an
exact travelling solution of the nondivergent barotropic vorticity equation (Haurwitz 1940); in the
shallow-water equations it is only approximately steady in a frame drifting eastward.
"""

import numpy as np

from torrid.physics.cases._fields import CaseFields, check_lat_lon, check_planet

ANGULAR_RATE_S = 7.848e-6
"""omega = K, s^-1 (Williamson et al. 1992, case 6)."""
WAVENUMBER = 4
"""Zonal wavenumber R (Williamson et al. 1992, case 6)."""
HEIGHT_0_M = 8000.0
"""h0, m (Williamson et al. 1992, case 6)."""


def rossby_haurwitz_angular_speed(rotation_rate_s, omega=ANGULAR_RATE_S, R=WAVENUMBER):
    """Angular phase speed of the nondivergent Rossby-Haurwitz wave, rad s^-1, eastward positive.

    nu = (R (3 + R) omega - 2 Omega) / ((1 + R)(2 + R))  (Williamson et al. 1992, eq. 147).
    The pattern of the nondivergent barotropic wave moves at exactly this speed; the shallow-water
    wave of case 6 drifts at roughly this speed (a little slower, because of its divergence).

    Parameters
    ----------
    rotation_rate_s : float
        Planetary rotation rate Omega, s^-1.
    omega : float, optional
        Angular rate of the solid-body part of the flow, s^-1.
    R : int, optional
        Zonal wavenumber.

    Returns
    -------
    float
        nu, rad s^-1.
    """
    return (R * (3 + R) * omega - 2.0 * rotation_rate_s) / ((1 + R) * (2 + R))


def initial_fields(lat, lon, *, radius_m, rotation_rate_s, gravity_m_s2):
    """Initial state of Williamson case 6 (omega = K = 7.848e-6 s^-1, R = 4, h0 = 8000 m).

    Williamson et al. (1992), case 6:
    u = a omega cos(lat) + a K cos^(R-1)(lat) (R sin^2(lat) - cos^2(lat)) cos(R lon),
    v = -a K R cos^(R-1)(lat) sin(lat) sin(R lon),
    g h = g h0 + a^2 A(lat) + a^2 B(lat) cos(R lon) + a^2 C(lat) cos(2 R lon), with
    A = omega/2 (2 Omega + omega) cos^2
        + K^2/4 cos^(2R) ((R+1) cos^2 + (2R^2 - R - 2) - 2R^2 cos^-2),
    B = 2 (Omega + omega) K / ((R+1)(R+2)) cos^R ((R^2 + 2R + 2) - (R+1)^2 cos^2),
    C = K^2/4 cos^(2R) ((R+1) cos^2 - (R+2)),   cos = cos(lat).

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
        u, v (m s^-1), h (m), zero surface height, ``coriolis_tilt_rad = 0``.
    """
    check_planet(radius_m, rotation_rate_s, gravity_m_s2)
    lat, lon = check_lat_lon(lat, lon)
    a, big_omega = radius_m, rotation_rate_s
    w = k = ANGULAR_RATE_S
    r = WAVENUMBER
    c, s = np.cos(lat), np.sin(lat)
    c_rm1 = c ** (r - 1)
    c_r = c_rm1 * c
    u = a * w * c + a * k * c_rm1 * (r * s**2 - c**2) * np.cos(r * lon)
    v = -a * k * r * c_rm1 * s * np.sin(r * lon)
    # cos^(2R) * (-2 R^2 cos^-2) written as -2 R^2 cos^(2R-2): finite at the poles.
    big_a = 0.5 * w * (2 * big_omega + w) * c**2 + 0.25 * k**2 * (
        c_r**2 * ((r + 1) * c**2 + (2 * r**2 - r - 2)) - 2 * r**2 * c_rm1**2
    )
    big_b = 2 * (big_omega + w) * k / ((r + 1) * (r + 2)) * c_r * (
        (r**2 + 2 * r + 2) - (r + 1) ** 2 * c**2
    )
    big_c = 0.25 * k**2 * c_r**2 * ((r + 1) * c**2 - (r + 2))
    geopotential = gravity_m_s2 * HEIGHT_0_M + a**2 * (
        big_a + big_b * np.cos(r * lon) + big_c * np.cos(2 * r * lon)
    )
    return CaseFields(
        u=u, v=v, h=geopotential / gravity_m_s2, surface_height=np.zeros_like(u),
        coriolis_tilt_rad=0.0,
    )
