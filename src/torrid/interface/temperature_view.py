"""Plots drawn as temperature: the thickness -> temperature map of the phase curves.

The same affine map as :func:`torrid.workflow.phase.phase_curve` (``temperature_map``
attribute of a phase-curve file): the equilibrium's smallest thickness h_min (the nightside H)
has T_night, its largest h_max (substellar) T_day, with both end points given or derived from
the star (Cowan & Agol 2011) by :class:`torrid.io.observer.ObserverSettings`.

Contrasts measured relative to the equilibrium's (``day_night_contrast``,
``peak_contrast``) are the same in temperature, since the map is affine; as temperatures they
become differences in kelvin: peak-to-peak, P (T_day - T_night); day minus night hemisphere
means, A (T_day - T_night) / 2, because the equilibrium's hemisphere-mean day-night difference
is half its range for both profiles (the area mean of cos(angle from the substellar point)
over a hemisphere is 1/2: H dH/H / 2 for the dayside profile, whose range is H dH/H, and
H dH/H for the global cosine, whose range is 2 H dH/H; continuum values, within about 1 % of
the grid's).
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from torrid.io.observer import ObserverSettings
from torrid.physics.temperature import thickness_to_temperature
from torrid.workflow.phase import end_temperatures

#: The two drawable quantities of the map plots.
QUANTITIES = ("thickness", "temperature")


def check_quantity(quantity: str) -> None:
    if quantity not in QUANTITIES:
        raise ValueError(f"quantity = {quantity!r}: must be one of {', '.join(QUANTITIES)}")


def end_points(settings: ObserverSettings | None) -> tuple[float, float]:
    """(T_night, T_day) in K of ``settings`` (default observer: derived from the star)."""
    night, day, _ = end_temperatures(settings or ObserverSettings())
    return night, day


def equilibrium_range(ds: xr.Dataset) -> tuple[xr.DataArray | float, xr.DataArray | float]:
    """The equilibrium's smallest and largest thickness (m) of a run dataset (attributes) or
    a sweep table (variables or swept coordinates)."""
    def get(name):
        if name in ds.data_vars or name in ds.coords:
            return ds[name]
        if name in ds.attrs:
            return float(ds.attrs[name])
        raise ValueError(f"no {name!r} (variable or attribute): temperature maps need a "
                         "hot-planet run or sweep table")
    low = get("nightside_thickness_m")
    try:
        high = get("substellar_thickness_m")
    except ValueError:
        high = low * (1 + get("forcing_contrast"))
    return low, high


def to_temperature(h, low, high, settings: ObserverSettings | None = None):
    """Temperature (K) of thickness ``h`` (m) by the phase curves' map; ``low``/``high``
    broadcast against ``h`` (xarray objects align by name)."""
    night, day = end_points(settings)
    if isinstance(h, xr.DataArray):
        return xr.apply_ufunc(lambda a, b, c: thickness_to_temperature(a, b, c / b - 1, night,
                                                                       day),
                              h, low, high)
    low, high = np.asarray(low, float), np.asarray(high, float)
    return thickness_to_temperature(h, low, high / low - 1, night, day)


def contrast_in_kelvin(name: str, values, settings: ObserverSettings | None = None):
    """The temperature difference (K) a relative contrast stands for (module docstring)."""
    night, day = end_points(settings)
    factor = {"day_night_contrast": 0.5, "peak_contrast": 1.0}[name]
    return values * factor * (day - night)


def temperature_note(settings: ObserverSettings | None = None) -> str:
    """One line naming the map's end points, for captions."""
    night, day = end_points(settings)
    return (f"temperature by the phase curves' map: {night:.0f} K at the nightside "
            f"equilibrium, {day:.0f} K at the substellar one")
