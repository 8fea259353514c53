"""Rayleigh drag -r v, uniform or day-night varying, on both wind components or the zonal one.

Showman & Polvani (2011) use a uniform drag -v / tau_drag on both components. Two published
variants are settings here:

* a drag rate that differs between dayside and nightside (a stand-in for the
  temperature-dependent magnetic drag of hot daysides, e.g. Perna, Menou & Rauscher 2010, cited
  from memory): r(x) = r_night + (r_day - r_night) s(x), joined smoothly through the local
  equilibrium forcing s = (h_eq - min h_eq) / (max h_eq - min h_eq) in [0, 1] (the equilibrium
  profile's shape: max(0, cos psi) for the dayside profile, (1 + cos psi) / 2 for the global
  one, psi the angle from the substellar point, which moves on eccentric orbits). r_day =
  1 / ``drag_timescale_days``, r_night = 1 / ``drag_timescale_nightside_days``. Linear in the
  rate, so an infinite nightside timescale (no drag there) is allowed;
* drag on the zonal wind only (``drag_components = "zonal"``): -r u e_east.

The split between implicit and explicit parts: the uniform part r0 = min over the sphere of the
rates of both components is implicit (diagonal in spectral space, any size), the spatially
varying rest F = -(r_u - r0) u e_east - (r_v - r0) v e_north is an explicit momentum forcing.
A uniform drag on both components is therefore all implicit, as before. The explicit rest is
stable while (max rate - r0) dt <= EXPLICIT_DAMPING_LIMIT
(:mod:`torrid.physics.timestepping`), which :meth:`RayleighDrag.max_time_step_s` imposes on the
model's step (so drag timescales down to 0.01 day stay stable at the automatic step).
"""

from __future__ import annotations

import math

import numpy as np

from torrid.physics.processes.base import ImplicitRates, Process
from torrid.physics.timestepping import EXPLICIT_DAMPING_LIMIT
from torrid.physics.units import SECONDS_PER_DAY

COMPONENTS = ("both", "zonal")


def drag_rate_field(cos_substellar_angle: np.ndarray, day_rate_s: float, night_rate_s: float,
                    profile: str = "dayside") -> np.ndarray:
    """The drag rate r (s^-1) of each point, joined through the equilibrium's shape.

    Parameters
    ----------
    cos_substellar_angle : ndarray
        cos psi = cos(lat) cos(lon - lon_sub) of each point.
    day_rate_s, night_rate_s : float
        r at the substellar point and on the nightside (antistellar point) (s^-1).
    profile : str
        The equilibrium profile, ``dayside`` (s = max(0, cos psi)) or ``global``
        (s = (1 + cos psi) / 2).
    """
    shape = (np.maximum(cos_substellar_angle, 0.0) if profile == "dayside"
             else 0.5 * (1.0 + cos_substellar_angle))
    return night_rate_s + (day_rate_s - night_rate_s) * shape


def _rate(days: float) -> float:
    return 0.0 if math.isinf(days) else 1.0 / (days * SECONDS_PER_DAY)


class RayleighDrag(Process):
    """Rayleigh drag with the timescales ``atmosphere.drag_timescale_days`` (dayside; the whole
    planet unless the nightside one is set) and ``atmosphere.drag_timescale_nightside_days``,
    on ``atmosphere.drag_components``."""

    name = "rayleigh_drag"
    settings = ("atmosphere.drag_timescale_days", "atmosphere.drag_timescale_nightside_days",
                "atmosphere.drag_components", "atmosphere.equilibrium_profile")
    reference = "Showman & Polvani (2011)"

    def __init__(self, context, day_rate_s: float, night_rate_s: float, components: str,
                 profile: str):
        self.day_rate_s, self.night_rate_s = float(day_rate_s), float(night_rate_s)
        self.components, self.profile = components, profile
        self.orbit = context.orbit
        zonal_only = components == "zonal"
        self.uniform_rate_s = 0.0 if zonal_only else min(self.day_rate_s, self.night_rate_s)
        self.excess_rate_s = max(self.day_rate_s, self.night_rate_s) - self.uniform_rate_s
        self._explicit = self.excess_rate_s > 0.0
        lat, lon = context.transforms.grid.mesh()
        self._coslat_coslon = np.cos(lat) * np.cos(lon)  # cos(lat) cos(lon - s) expands
        self._coslat_sinlon = np.cos(lat) * np.sin(lon)  # into these two for any s
        shape = lat.shape
        self._east = np.zeros(shape)
        self._north = np.zeros(shape)
        self._cached_time = None
        self._excess = None

    @classmethod
    def build(cls, settings, context):
        day = settings["atmosphere.drag_timescale_days"]
        night = settings["atmosphere.drag_timescale_nightside_days"]
        night = day if night is None else night
        if math.isinf(day) and math.isinf(night):
            return None
        return cls(context, _rate(day), _rate(night), settings["atmosphere.drag_components"],
                   settings["atmosphere.equilibrium_profile"])

    # --- the rate field ----------------------------------------------------------------------
    def rate_field(self, time_s: float) -> np.ndarray:
        """The drag rate r (s^-1) on the grid at ``time_s``."""
        lon_sub = 0.0 if self.orbit.is_steady else float(self.orbit.substellar_longitude(time_s))
        cosine = (self._coslat_coslon * math.cos(lon_sub)
                  + self._coslat_sinlon * math.sin(lon_sub))
        return drag_rate_field(cosine, self.day_rate_s, self.night_rate_s, self.profile)

    def _excess_field(self, time_s: float) -> np.ndarray:
        """r - r0 on the grid (the explicit part's rate), cached per time (all times alike on a
        steady orbit)."""
        key = 0.0 if self.orbit.is_steady else time_s
        if self._cached_time != key:
            self._excess = self.rate_field(time_s) - self.uniform_rate_s
            self._cached_time = key
        return self._excess

    # --- the process interface ---------------------------------------------------------------
    def implicit_rates(self) -> ImplicitRates | None:
        if self.uniform_rate_s == 0.0:
            return None
        return ImplicitRates(vorticity=self.uniform_rate_s, divergence=self.uniform_rate_s)

    def momentum_forcing(self, time_s, fields):
        """-(r - r0) u on the eastward wind and, for both components, -(r - r0) v on the
        northward wind (m s^-2); None for a uniform drag on both components."""
        if not self._explicit:
            return None
        excess = self._excess_field(time_s)
        np.multiply(excess, -fields.winds[1], out=self._east)  # winds = (-v, u)
        if self.components == "zonal":
            return self._east, self._north  # northward stays zero
        np.multiply(excess, fields.winds[0], out=self._north)
        return self._east, self._north

    def max_time_step_s(self) -> float | None:
        if not self._explicit:
            return None
        return EXPLICIT_DAMPING_LIMIT / self.excess_rate_s
