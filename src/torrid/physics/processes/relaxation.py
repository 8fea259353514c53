"""Newtonian relaxation toward the day-night radiative equilibrium, both halves in one place.

Showman & Polvani (2011); Perez-Becker & Showman (2013). In geopotential units
(Phi = g h, Phi_eq = g h_eq):

    d Phi / dt = ... + (Phi_eq - Phi) / tau_rad

with h_eq = H (1 + c max(0, cos(lat) cos(lon - lon_sub))), c = dH/H the forcing contrast
(``atmosphere.equilibrium_profile = "dayside"``: a dayside cosine over a flat nightside, as in
Showman & Polvani 2011 and Perez-Becker & Showman 2013), or h_eq = H (1 + c cos(lat)
cos(lon - lon_sub)) (``"global"``: the global cosine of linear Matsuno-Gill studies, Matsuno
1966, Gill 1980, with H the global mean and H (1 - c) at the antistellar point). The
linear part -phi' / tau_rad is implicit (an implicit thickness rate 1 / tau_rad); the source
(Phi_eq - Phi_mean) / tau_rad is explicit. On an eccentric orbit the contrast follows the star's
distance, c(t) = c (a / r)^k, and the substellar point moves (:class:`torrid.physics.orbit.Orbit`).

The relaxation defines the day-night geometry, so it also adds the forced-planet diagnostics
(hotspot, day-night contrast, jets, energies, limb winds: :mod:`torrid.physics.diagnostics`)
and the substellar longitude, star distance and mean mass source to the run file.
"""

from __future__ import annotations

import math

import numpy as np

from torrid.physics.diagnostic_metadata import Diagnostic
from torrid.physics.diagnostics import (ANGLE_DIAGNOSTICS, DIAGNOSTIC_VARIABLES,
                                        HOTSPOT_DIAGNOSTICS, hotspot_defined, hotspot_reason,
                                        planet_diagnostics)
from torrid.physics.processes.base import ImplicitRates, Process
from torrid.physics.state import GEOPOTENTIAL
from torrid.physics.units import SECONDS_PER_DAY


PROFILES = ("dayside", "global")


def equilibrium_thickness(lat: np.ndarray, lon: np.ndarray, *, mean_thickness_m: float,
                          contrast: float, substellar_longitude_rad: float,
                          profile: str = "dayside") -> np.ndarray:
    """Radiative-equilibrium layer thickness h_eq (m) of a tidally locked planet.

    ``dayside``: h_eq = H (1 + contrast max(0, cos(lat) cos(lon - lon_sub))), i.e.
    H + dH cos(lon - lon_sub) cos(lat) on the dayside and H on the nightside (Showman & Polvani
    2011; Perez-Becker & Showman 2013). ``global``: h_eq = H (1 + contrast cos(lat)
    cos(lon - lon_sub)) everywhere (Matsuno 1966; Gill 1980). contrast = dH / H.

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
    profile : str
        ``dayside`` or ``global``.

    Returns
    -------
    numpy.ndarray
        h_eq (m), of the broadcast shape of ``lat`` and ``lon``.
    """
    lat = np.asarray(lat, dtype=float)
    lon = np.asarray(lon, dtype=float)
    cos_angle = np.cos(lat) * np.cos(lon - substellar_longitude_rad)
    if profile == "dayside":
        cos_angle = np.maximum(0.0, cos_angle)
    return mean_thickness_m * (1.0 + contrast * cos_angle)


def equilibrium_extremes(mean_thickness_m: float, contrast: float,
                         profile: str = "dayside") -> tuple[float, float]:
    """The smallest and largest equilibrium thickness (m): the nightside (antistellar) and the
    substellar value, H and H (1 + c) for ``dayside``, H (1 - c) and H (1 + c) for ``global``."""
    low = mean_thickness_m * (1 - contrast) if profile == "global" else mean_thickness_m
    return low, mean_thickness_m * (1 + contrast)


class NewtonianRelaxation(Process):
    """Relaxation of the thickness toward the day-night equilibrium (present in every planet
    run; with tau_rad = inf it forces nothing but still defines the diagnostics)."""

    name = "newtonian_relaxation"
    settings = ("atmosphere.mean_geopotential_m2_s2", "atmosphere.forcing_contrast",
                "atmosphere.radiative_timescale_days", "atmosphere.equilibrium_profile",
                "orbit.distance_exponent")
    reference = "Showman & Polvani (2011); Perez-Becker & Showman (2013)"
    diagnostic_variables = {
        **{name: Diagnostic(units, long_name, angle=name in ANGLE_DIAGNOSTICS)
           for name, (units, long_name) in DIAGNOSTIC_VARIABLES.items()},
        "substellar_longitude": Diagnostic("degree", "longitude (east positive) of the "
                                                     "substellar point", final=False),
        "star_distance_ratio": Diagnostic("1", "star-planet distance over the semi-major axis",
                                          final=False),
        "mean_mass_source": Diagnostic(
            "m s-1", "global mean of the thickness source Q = (h_eq - h) / tau_rad", final=False),
    }

    def __init__(self, context, mean_geopotential: float, contrast: float,
                 radiative_timescale_s: float, distance_exponent: float,
                 profile: str = "dayside"):
        self.transforms, self.orbit = context.transforms, context.orbit
        self.gravity_m_s2 = context.gravity_m_s2
        self.rotation_rate_s = context.rotation_rate_s
        self.mean_geopotential, self.contrast = float(mean_geopotential), float(contrast)
        self.rate = 0.0 if math.isinf(radiative_timescale_s) else 1.0 / radiative_timescale_s
        self.distance_exponent = float(distance_exponent)
        self.profile = profile
        lat, lon = self.transforms.grid.mesh()
        self._coslat_coslon = np.cos(lat) * np.cos(lon)  # cos(lat) cos(lon - s) expands
        self._coslat_sinlon = np.cos(lat) * np.sin(lon)  # into these two for any s
        self._cached_time = None
        self._phi_eq = None
        self._source = None
        self._steady = self.orbit.is_steady

    @classmethod
    def check(cls, settings):
        contrast = settings["atmosphere.forcing_contrast"]
        if settings["atmosphere.equilibrium_profile"] == "global" and contrast >= 1:
            return (f"atmosphere.forcing_contrast = {contrast!r}: must be < 1 with "
                    "atmosphere.equilibrium_profile = 'global' (the antistellar equilibrium "
                    "thickness H (1 - dH/H) must stay positive)")
        return None

    @classmethod
    def build(cls, settings, context):
        return cls(context, settings["atmosphere.mean_geopotential_m2_s2"],
                   settings["atmosphere.forcing_contrast"],
                   settings["atmosphere.radiative_timescale_days"] * SECONDS_PER_DAY,
                   settings["orbit.distance_exponent"],
                   settings["atmosphere.equilibrium_profile"])

    # --- the forcing in time ---------------------------------------------------------------
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
            if self.profile == "dayside":
                cosine = np.maximum(cosine, 0.0)
            self._phi_eq = self.mean_geopotential * (1 + contrast * cosine)
            self._source = self.transforms.to_spectral(
                (self._phi_eq - self.mean_geopotential) * self.rate)
            self._cached_time = key
        return self._phi_eq

    def attrs(self) -> dict:
        """The equilibrium's smallest and largest thickness at the mean star distance (the end
        points of the phase curves' temperature map) and its contrast."""
        low, high = equilibrium_extremes(self.mean_geopotential / self.gravity_m_s2,
                                         self.contrast, self.profile)
        return {"nightside_thickness_m": low, "substellar_thickness_m": high,
                "forcing_contrast": self.contrast, "equilibrium_profile": self.profile}

    def heating(self, time_s: float, geopotential: np.ndarray) -> np.ndarray:
        """Q in geopotential units, (Phi_eq - Phi) / tau_rad on the grid (m^2 s^-3).

        ``geopotential`` is the deviation phi' = Phi - Phi_mean.
        """
        return (self.equilibrium(time_s) - self.mean_geopotential - geopotential) * self.rate

    # --- the process interface -------------------------------------------------------------
    def implicit_rates(self) -> ImplicitRates | None:
        return ImplicitRates(thickness=self.rate) if self.rate else None

    def spectral_tendency(self, time_s, fields, out) -> None:
        """The explicit source (Phi_eq - Phi_mean) / tau_rad (m^2 s^-3)."""
        if self.rate:
            self.equilibrium(time_s)
            out[GEOPOTENTIAL] += self._source

    def final_attrs(self, finals) -> dict:
        """The hotspot rule on the final values: defined where the final (window-mean)
        longitudinal contrast reaches the threshold, else NaN offsets, flag 0 and the reason
        (``hotspot_offset_reason``)."""
        contrast = finals.get("longitudinal_contrast", math.nan)
        defined = hotspot_defined(contrast)
        out = {"final_hotspot_offset_defined": float(defined),
               "hotspot_offset_reason": hotspot_reason(contrast)}
        if not defined:
            out.update({f"final_{name}": math.nan for name in HOTSPOT_DIAGNOSTICS})
        return out

    def diagnostics(self, snapshot) -> dict[str, float]:
        time_s = snapshot.time_s
        lon_sub, _ = self.state_at(time_s)
        g = self.gravity_m_s2
        out = planet_diagnostics(self.transforms, snapshot.state,
                                 mean_geopotential=self.mean_geopotential, gravity_m_s2=g,
                                 rotation_rate_s=self.rotation_rate_s,
                                 substellar_longitude_rad=lon_sub,
                                 equilibrium_thickness_m=self.equilibrium(time_s) / g)
        source = self.heating(time_s, snapshot.geopotential)
        out["mean_mass_source"] = self.transforms.grid.global_mean(source) / g
        out["substellar_longitude"] = float(np.degrees(lon_sub))
        out["star_distance_ratio"] = float(self.orbit.distance_ratio(time_s))
        return out
