"""From layer thickness to temperature: the affine map, and equilibrium temperatures of the star.

The shallow-water layer has no temperature; its thickness h stands in for it (a thicker layer
is a warmer column). To compare with telescopes we map h affinely onto temperature,

    T(h) = T_night + (T_day - T_night) (h - H) / (H dH/H),

so that the nightside equilibrium thickness h = H gives T_night and the substellar equilibrium
thickness h = H (1 + dH/H) gives T_day. The map is a convention of this toy model, not physics:
it assumes temperature linear in thickness, takes the two equilibrium end points as known,
and extrapolates linearly wherever the model's h leaves [H, H (1 + dH/H)] (a map that then
goes to T <= 0 is refused). Only the relative pattern of h is model output; the absolute
temperatures are the end points you choose.

End points from the star and orbit (Cowan & Agol 2011, ApJ 729, 54, eqs. 4-5, quoted from
memory): with the irradiation temperature T0 = T_star sqrt(R_star / a), the Bond albedo A_B and
the heat redistribution efficiency epsilon (0: none, 1: uniform),

    T_day   = T0 (1 - A_B)^(1/4) (2/3 - 5 epsilon / 12)^(1/4)
    T_night = T0 (1 - A_B)^(1/4) (epsilon / 4)^(1/4).

These are hemisphere-mean (effective) temperatures. We use T_day as the *substellar*
equilibrium temperature of the map: it is below the local no-redistribution substellar value
T0 (1 - A_B)^(1/4) by (2/3 - 5 epsilon/12)^(1/4) (0.90 at epsilon = 0), so the derived maps
underestimate the peak dayside temperature, and epsilon sets the end points while the model's
own winds redistribute heat once more on top (keep epsilon small for a map whose contrast is the
model's). epsilon = 0 makes T_night = 0, which the map refuses.
"""

from __future__ import annotations

import numpy as np


class TemperatureMapError(ValueError):
    """A thickness-to-temperature map that is undefined or not positive everywhere."""


def irradiation_temperature(star_temperature_k: float, star_radius_m: float,
                            semi_major_axis_m: float) -> float:
    """T0 = T_star sqrt(R_star / a) (K): the substellar temperature of a zero-albedo planet
    without redistribution (Cowan & Agol 2011).

    Parameters
    ----------
    star_temperature_k : float
        Effective temperature of the star (K).
    star_radius_m, semi_major_axis_m : float
        Stellar radius and orbital semi-major axis (m).
    """
    return float(star_temperature_k * np.sqrt(star_radius_m / semi_major_axis_m))


def cowan_agol_temperatures(irradiation_temperature_k: float, albedo: float,
                            redistribution: float) -> tuple[float, float]:
    """Dayside and nightside effective temperatures (K) of Cowan & Agol (2011).

    Parameters
    ----------
    irradiation_temperature_k : float
        T0 = T_star sqrt(R_star / a) (K).
    albedo : float
        Bond albedo A_B, 0 <= A_B < 1.
    redistribution : float
        Heat redistribution efficiency epsilon, 0 (dayside re-radiates) to 1 (uniform).

    Returns
    -------
    (float, float)
        T_day and T_night (K).
    """
    if not 0 <= albedo < 1:
        raise TemperatureMapError(f"albedo = {albedo!r}: must be in [0, 1)")
    if not 0 <= redistribution <= 1:
        raise TemperatureMapError(f"redistribution = {redistribution!r}: must be in [0, 1]")
    base = irradiation_temperature_k * (1 - albedo) ** 0.25
    return (float(base * (2 / 3 - 5 * redistribution / 12) ** 0.25),
            float(base * (redistribution / 4) ** 0.25))


def thickness_to_temperature(thickness_m, nightside_thickness_m, forcing_contrast,
                             night_temperature_k: float, day_temperature_k: float):
    """Temperature map (K) of a layer thickness map, by the affine map of the module docstring.

    Parameters
    ----------
    thickness_m : array_like
        Layer thickness h (m), any shape.
    nightside_thickness_m : float or array_like
        H, the nightside equilibrium thickness (m); broadcast against ``thickness_m``.
    forcing_contrast : float or array_like
        dH / H (> 0): the substellar equilibrium thickness is H (1 + dH/H).
    night_temperature_k : float
        Temperature (K) at h = H; > 0.
    day_temperature_k : float or array_like
        Temperature (K) at h = H (1 + dH/H), >= T_night; broadcast against ``thickness_m``
        (a time series on an eccentric orbit).

    Raises
    ------
    TemperatureMapError
        If the map is undefined (dH/H <= 0, T_night <= 0 or T_day < T_night) or gives T <= 0
        anywhere (the message names the coldest value). NaN thickness (a failed sweep point)
        stays NaN.
    """
    h = np.asarray(thickness_m, dtype=float)
    big_h = np.asarray(nightside_thickness_m, dtype=float)
    c = np.asarray(forcing_contrast, dtype=float)
    if not np.all((c > 0) | np.isnan(c)):
        raise TemperatureMapError(f"forcing_contrast = {float(np.nanmin(c))!r}: the temperature "
                                  "map needs a day-night thickness contrast dH/H > 0")
    if not np.all((big_h > 0) | np.isnan(big_h)):
        raise TemperatureMapError(
            f"nightside_thickness_m = {float(np.nanmin(big_h))!r}: must be > 0")
    if not night_temperature_k > 0:
        raise TemperatureMapError(f"night_temperature = {night_temperature_k!r} K: must be > 0 "
                                  "(a derived one is 0 for redistribution = 0)")
    if not np.all(np.asarray(day_temperature_k) >= night_temperature_k):
        raise TemperatureMapError(f"day_temperature = {np.min(day_temperature_k)!r} K: must be "
                                  f">= night_temperature ({night_temperature_k!r} K)")
    t = night_temperature_k + (day_temperature_k - night_temperature_k) * (h - big_h) / (big_h * c)
    finite = np.isfinite(t)
    coldest = float(np.min(t[finite])) if finite.any() else 1.0
    if not coldest > 0:
        where = np.flatnonzero(finite.ravel())[np.argmin(t[finite])]
        raise TemperatureMapError(
            f"temperature map goes down to {coldest:.4g} K (thickness "
            f"{float(np.broadcast_to(h, t.shape).flat[where]):.4g} m): raise night_temperature or "
            f"lower day_temperature (T_night = {night_temperature_k:g} K, T_day = "
            f"{day_temperature_k:g} K)")
    return t
