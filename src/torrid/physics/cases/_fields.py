"""The container returned by every test case, and input checks shared by the cases."""

from dataclasses import dataclass

import numpy as np

_LAT_SLACK_RAD = 1e-12  # round-off allowed beyond +-pi/2 (e.g. a pole computed as arcsin(1))


@dataclass(frozen=True, eq=False)
class CaseFields:
    """Initial state of a test case on the points it was evaluated at (read-only float arrays).

    Attributes
    ----------
    u : numpy.ndarray
        Eastward wind, m s^-1.
    v : numpy.ndarray
        Northward wind, m s^-1.
    h : numpy.ndarray
        Free-surface height above the reference, m (the fluid thickness is ``h - surface_height``).
    surface_height : numpy.ndarray
        Bottom-topography height h_s, m (zeros except for Williamson case 5).
    coriolis_tilt_rad : float
        Angle alpha between the rotation axis of the Coriolis parameter and the grid's pole, rad;
        see :func:`torrid.physics.coriolis.coriolis_parameter`.
    """

    u: np.ndarray
    v: np.ndarray
    h: np.ndarray
    surface_height: np.ndarray
    coriolis_tilt_rad: float = 0.0

    def __post_init__(self):
        shape = np.broadcast_shapes(*(np.shape(getattr(self, k)) for k in _ARRAYS))
        for name in _ARRAYS:
            arr = np.array(np.broadcast_to(getattr(self, name), shape), dtype=float)
            arr.flags.writeable = False
            object.__setattr__(self, name, arr)
        object.__setattr__(self, "coriolis_tilt_rad", float(self.coriolis_tilt_rad))


_ARRAYS = ("u", "v", "h", "surface_height")


def check_lat_lon(lat, lon):
    """Return ``lat``, ``lon`` as broadcast float arrays, rad, after checking them.

    Raises
    ------
    ValueError
        If a value is not finite or a latitude lies outside [-pi/2, pi/2].
    """
    lat, lon = np.broadcast_arrays(np.asarray(lat, dtype=float), np.asarray(lon, dtype=float))
    if not (np.all(np.isfinite(lat)) and np.all(np.isfinite(lon))):
        raise ValueError("latitude and longitude must be finite (radians)")
    if np.any(np.abs(lat) > np.pi / 2 + _LAT_SLACK_RAD):
        raise ValueError("latitude must lie in [-pi/2, pi/2] radians")
    return np.clip(lat, -np.pi / 2, np.pi / 2), lon


def check_planet(radius_m, rotation_rate_s, gravity_m_s2):
    """Check the planetary constants (positive radius and gravity, finite rotation rate)."""
    if not (np.isfinite(radius_m) and radius_m > 0):
        raise ValueError(f"radius_m must be positive and finite, got {radius_m!r}")
    if not (np.isfinite(gravity_m_s2) and gravity_m_s2 > 0):
        raise ValueError(f"gravity_m_s2 must be positive and finite, got {gravity_m_s2!r}")
    if not np.isfinite(rotation_rate_s):
        raise ValueError(f"rotation_rate_s must be finite, got {rotation_rate_s!r}")
