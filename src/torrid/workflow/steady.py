"""When has a forced run equilibrated? A criterion on the global diagnostics' time series.

Forced runs of this kind settle into a statistically steady state that still fluctuates by a
few percent (waves and eddies), so the test compares averages, not instantaneous values. At
every output time t, with a trailing window of length W:

* each monitored diagnostic's mean over [t - W, t] differs from its mean over [t - 2W, t - W]
  by at most ``tolerance`` times its scale (below);
* W is the longer of 3 rotation periods and 5 radiative timescales unless given;
* eccentric or non-synchronous orbits (a forced cycle): W is rounded up to a whole number of
  orbital periods, so the test compares orbit averages of consecutive orbits (orbit-to-orbit
  repeat of the cycle-averaged state).

Monitored diagnostics and scales: kinetic energy (scale: its recent mean), day-night contrast
(scale 1), equatorial zonal-mean wind and maximum wind speed (scale: the recent mean maximum
wind speed), and the first-harmonic hotspot offset (scale: 360 degrees; left out while it is undefined in
the last two windows, i.e. where the layer is too flat for a hotspot).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from torrid.physics.curvefeatures import unwrap_degrees

MONITORED = ("kinetic_energy", "day_night_contrast", "equatorial_zonal_wind", "max_wind_speed",
             "hotspot_offset_harmonic")


@dataclass(frozen=True)
class SteadyCriterion:
    """Parameters of the test (times in days)."""

    window_days: float
    tolerance: float

    @classmethod
    def for_run(cls, rotation_period_days: float, radiative_timescale_days: float,
                tolerance: float, window_days: float | None = None,
                cycle_days: float | None = None) -> "SteadyCriterion":
        """The default window max(3 |rotation period|, 5 tau_rad) (tau_rad = inf ignored),
        rounded up to whole cycles of ``cycle_days`` when the forcing is periodic."""
        if window_days is None:
            candidates = [3 * abs(rotation_period_days)]
            if math.isfinite(radiative_timescale_days):
                candidates.append(5 * radiative_timescale_days)
            window_days = max(c for c in candidates if math.isfinite(c))
        if cycle_days:
            window_days = math.ceil(window_days / cycle_days - 1e-9) * cycle_days
        return cls(window_days=window_days, tolerance=tolerance)


def window_means(times_days, values, start: float, end: float) -> float:
    """Time mean of ``values`` over (start, end] by the trapezoid rule on the output times."""
    t = np.asarray(times_days, float)
    v = np.asarray(values, float)
    grid = np.concatenate([[start], t[(t > start) & (t < end)], [end]])
    y = np.interp(grid, t, v)
    return float(np.sum(0.5 * (y[1:] + y[:-1]) * np.diff(grid)) / (end - start))


def is_steady(times_days: list[float], series: dict[str, list[float]],
              criterion: SteadyCriterion) -> bool:
    """True if the diagnostics up to the last output meet ``criterion`` (module docstring)."""
    t = np.asarray(times_days, float)
    now, w = t[-1], criterion.window_days
    if now < 2 * w - 1e-9 or len(t) < 5:
        return False
    means = {}
    recent = t >= now - 2 * w - 1e-9
    for name in MONITORED:
        values = np.asarray(series[name], float)
        if name.startswith("hotspot"):  # undefined (NaN) while the layer is too flat
            if not np.isfinite(values[recent]).all():
                continue  # not monitored then: the contrast is, and says the layer is flat
            values = unwrap_degrees(values)
        means[name] = (window_means(t, values, now - 2 * w, now - w),
                       window_means(t, values, now - w, now))
    scale = {"kinetic_energy": abs(means["kinetic_energy"][1]) or 1e-300,
             "day_night_contrast": 1.0, "hotspot_offset_harmonic": 360.0}
    scale["equatorial_zonal_wind"] = scale["max_wind_speed"] = abs(means["max_wind_speed"][1]) or 1e-12
    return all(abs(new - old) <= criterion.tolerance * scale[name]
               for name, (old, new) in means.items())
