"""Coriolis parameter for a rotation axis that may be tilted away from the grid's pole."""

import numpy as np


def coriolis_parameter(lat, lon, rotation_rate_s, tilt_rad=0.0):
    """Coriolis parameter f = 2 Omega (k . r) for a rotation axis tilted by ``tilt_rad``.

    f = 2 Omega (-cos(lon) cos(lat) sin(alpha) + sin(lat) cos(alpha))
    (Williamson, Drake, Hack, Jakob & Swarztrauber 1992, test case 2). The rotation axis lies in
    the plane of longitudes 0 and pi, tilted from the grid's north pole towards longitude pi.

    Parameters
    ----------
    lat, lon : array_like
        Latitude and eastward longitude, rad (broadcastable).
    rotation_rate_s : float
        Planetary rotation rate Omega, s^-1 (negative for retrograde spin).
    tilt_rad : float, optional
        Angle alpha between the rotation axis and the grid's pole, rad. Default 0.

    Returns
    -------
    numpy.ndarray
        f, s^-1, of the broadcast shape of ``lat`` and ``lon``.
    """
    lat, lon = np.broadcast_arrays(np.asarray(lat, dtype=float), np.asarray(lon, dtype=float))
    return 2.0 * rotation_rate_s * (
        -np.cos(lon) * np.cos(lat) * np.sin(tilt_rad) + np.sin(lat) * np.cos(tilt_rad)
    )
