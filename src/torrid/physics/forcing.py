"""Day-night forcing of a tidally locked planet: Newtonian relaxation, mass exchange, drag.

Showman & Polvani (2011); Perez-Becker & Showman (2013). In geopotential units
(Phi = g h, Phi_eq = g h_eq):

    d Phi / dt = ... + (Phi_eq - Phi) / tau_rad                 (Newtonian relaxation)
    d v / dt   = ... - v / tau_drag + R,   R = -v Q / h  if Q > 0 else 0,
    Q = (h_eq - h) / tau_rad                                    (mass exchange)

with h_eq = H (1 + c max(0, cos(lat) cos(lon - lon_sub))), c = dH/H the forcing contrast. On
an eccentric orbit the contrast follows the star's distance, c(t) = c (a / r)^k (k = 2 by
default: the instellation falls as r^-2). The linear parts (-Phi/tau_rad, -v/tau_drag) are
implicit (:mod:`torrid.physics.linear`); this module provides the explicit rest: the source
Phi_eq / tau_rad relative to the reference Phi_mean, and R.
"""

from __future__ import annotations

import math

import numpy as np

from torrid.physics.orbit import Orbit
from torrid.physics.transforms import Transforms


def equilibrium_thickness(lat: np.ndarray, lon: np.ndarray, *, mean_thickness_m: float,
                          contrast: float, substellar_longitude_rad: float) -> np.ndarray:
    """Radiative-equilibrium layer thickness h_eq (m) of a tidally locked planet.

    h_eq = H (1 + contrast max(0, cos(lat) cos(lon - lon_sub))): H + dH cos(lon - lon_sub) cos(lat)
    on the dayside and H on the nightside (Showman & Polvani 2011; Perez-Becker & Showman 2013),
    with contrast = dH / H.

    Parameters
    ----------
    lat, lon : array_like
        Latitude and longitude (rad); broadcast against each other (e.g. ``grid.mesh()``).
    mean_thickness_m : float
        H, the nightside (and reference) thickness (m).
    contrast : float
        dH / H, the fractional substellar thickness excess (dimensionless).
    substellar_longitude_rad : float
        Substellar longitude lon_sub (rad, east positive).

    Returns
    -------
    numpy.ndarray
        h_eq (m), of the broadcast shape of ``lat`` and ``lon``.
    """
    lat = np.asarray(lat, dtype=float)
    lon = np.asarray(lon, dtype=float)
    cos_angle = np.cos(lat) * np.cos(lon - substellar_longitude_rad)
    return mean_thickness_m * (1.0 + contrast * np.maximum(0.0, cos_angle))


class DayNightForcing:
    """Explicit forcing terms for :class:`torrid.physics.tendencies.Dynamics`.

    Parameters
    ----------
    transforms : Transforms
        Grid and transforms.
    orbit : Orbit
        Substellar longitude and distance in time.
    mean_geopotential : float
        g H, the nightside equilibrium geopotential and the model's reference (m^2 s^-2).
    contrast : float
        dH / H at the mean distance.
    radiative_timescale_s : float
        tau_rad (s); ``inf`` switches the relaxation (and mass exchange) off.
    distance_exponent : float
        k in c(t) = c (a / r)^k.
    """

    def __init__(self, transforms: Transforms, orbit: Orbit, mean_geopotential: float,
                 contrast: float, radiative_timescale_s: float, distance_exponent: float = 2.0):
        self.transforms, self.orbit = transforms, orbit
        self.mean_geopotential, self.contrast = float(mean_geopotential), float(contrast)
        self.rate = 0.0 if math.isinf(radiative_timescale_s) else 1.0 / radiative_timescale_s
        self.distance_exponent = float(distance_exponent)
        lat, lon = transforms.grid.mesh()
        self._coslat_coslon = np.cos(lat) * np.cos(lon)  # cos(lat) cos(lon - s) expands
        self._coslat_sinlon = np.cos(lat) * np.sin(lon)  # into these two for any s
        self._cached_time = None
        self._phi_eq = None
        self._source = None
        self._steady = orbit.is_steady

    def state_at(self, time_s: float) -> tuple[float, float]:
        """Substellar longitude (rad) and current contrast at ``time_s``."""
        if self._steady:
            return 0.0, self.contrast
        lon_sub = float(self.orbit.substellar_longitude(time_s))
        ratio = float(self.orbit.distance_ratio(time_s))
        return lon_sub, self.contrast * ratio ** (-self.distance_exponent)

    def equilibrium(self, time_s: float) -> np.ndarray:
        """Phi_eq on the model grid at ``time_s`` (m^2 s^-2); cached per time."""
        key = 0.0 if self._steady else time_s
        if self._cached_time != key:
            lon_sub, contrast = self.state_at(time_s)
            cosine = (self._coslat_coslon * math.cos(lon_sub)
                      + self._coslat_sinlon * math.sin(lon_sub))
            self._phi_eq = self.mean_geopotential * (1 + contrast * np.maximum(cosine, 0.0))
            self._source = self.transforms.to_spectral(
                (self._phi_eq - self.mean_geopotential) * self.rate)
            self._cached_time = key
        return self._phi_eq

    def thickness_source(self, time_s: float, geopotential: np.ndarray) -> np.ndarray:
        """(Phi_eq - Phi_mean) / tau_rad as spectral coefficients (m^2 s^-3)."""
        self.equilibrium(time_s)
        return self._source

    def heating(self, time_s: float, geopotential: np.ndarray) -> np.ndarray:
        """Q in geopotential units, (Phi_eq - Phi) / tau_rad on the grid (m^2 s^-3).

        ``geopotential`` is the deviation phi' = Phi - Phi_mean.
        """
        return (self.equilibrium(time_s) - self.mean_geopotential - geopotential) * self.rate

    def momentum(self, time_s: float, geopotential: np.ndarray, winds: np.ndarray,
                 out_east: np.ndarray, out_north: np.ndarray) -> None:
        """Mass-exchange term R = -v Q / h where Q > 0 (m s^-2), written into the outputs."""
        if self.rate == 0.0:
            out_east[...] = 0.0
            out_north[...] = 0.0
            return
        q = self.heating(time_s, geopotential)
        factor = np.maximum(q, 0.0) / (geopotential + self.mean_geopotential)  # Q / h (s^-1)
        np.multiply(-winds[1], factor, out=out_east)
        np.multiply(winds[0], factor, out=out_north)  # -v = winds[0]
