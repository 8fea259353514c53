"""Observation files: several measured phase curves for one joint fit (TOML, torrid's layout).

::

    [observer]                      # optional: the shared settings, as for torrid phase
    star_temperature = 5400.0
    radius_ratio = 0.11

    [fit]                           # optional: bounds of the fitted end points (K)
    night_temperature_bounds = [400.0, 1800.0]
    day_temperature_bounds = [900.0, 3500.0]

    [posterior]                     # optional: the sampler's settings (torrid fit --posterior)
    walkers = 32                    # emcee walkers (>= 2 x parameters)
    burn_in = 0.25                  # fraction of the steps discarded before the summary
    seed = 1

    [[curve]]                       # one table per measured curve
    file = "band-3.6.csv"           # the CSV (phase, flux ratio ppm, error ppm), relative to here
    band = "3.1-4.0"                # top-hat band in micron, or response = "FILE.csv"
    radius_ratio = 0.11             # optional, per curve
    phase_shift = 0.0               # optional: added to the measured phases (orbital phase)

Without bounds the end points may move from 0.5 to 1.5 times the assumed ones (the [observer]
temperatures, or those derived from the star). Errors name the file and the key (one line).
"""

from __future__ import annotations

import difflib
import math
import os
from dataclasses import dataclass, field
from pathlib import Path

from torrid.io.observed import ObservedCurve, ObservedDataError, read_observed_csv
from torrid.io.observer import KEYS, ObserverError, ObserverSettings

CURVE_KEYS = ("file", "band", "response", "radius_ratio", "phase_shift")
FIT_KEYS = ("night_temperature_bounds", "day_temperature_bounds")
POSTERIOR_KEYS = ("walkers", "burn_in", "seed")
SECTIONS = ("observer", "fit", "posterior", "curve")
#: Default bounds of the fitted end points, as factors of the assumed ones.
DEFAULT_BOUND_FACTORS = (0.5, 1.5)


class ObservationError(ValueError):
    """An observation file that cannot be used (one line naming the file and key)."""


@dataclass(frozen=True)
class SamplerSettings:
    """emcee settings: ``walkers`` (even, >= 2 x parameters), ``burn_in`` (fraction of the
    steps discarded, 0-0.9), ``seed`` (random seed)."""

    walkers: int = 32
    burn_in: float = 0.25
    seed: int = 0


@dataclass(frozen=True)
class MeasuredCurve:
    """One measured curve with the settings of its band (shared ones filled in)."""

    observed: ObservedCurve
    settings: ObserverSettings
    phase_shift: float = 0.0

    @property
    def description(self) -> str:
        band = (f"response {self.settings.response}" if self.settings.response else
                "{:g}-{:g} micron".format(*self.settings.band_um))
        return f"{Path(self.observed.source).name} ({band})"


@dataclass(frozen=True)
class Observation:
    """The curves of a joint fit, the shared observer settings and the fit settings."""

    curves: tuple[MeasuredCurve, ...]
    settings: ObserverSettings
    night_temperature_bounds: tuple[float, float] | None = None
    day_temperature_bounds: tuple[float, float] | None = None
    sampler: SamplerSettings = field(default_factory=SamplerSettings)
    source: str = "observation"


def _unknown(keys, known, where: str) -> None:
    for key in keys:
        if key not in known:
            close = difflib.get_close_matches(key, known, n=1, cutoff=0.5)
            hint = f" (did you mean {close[0]!r}?)" if close else f" (known: {', '.join(known)})"
            raise ObservationError(f"{where}unknown key {key!r}{hint}")


def _bounds(value, where: str) -> tuple[float, float]:
    ok = (isinstance(value, list) and len(value) == 2
          and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in value))
    if not ok or not (0 < value[0] < value[1] and math.isfinite(value[1])):
        raise ObservationError(f"{where} = {value!r}: must be [LOW, HIGH] in K with "
                               "0 < LOW < HIGH")
    return float(value[0]), float(value[1])


def _sampler(section: dict, where: str) -> SamplerSettings:
    _unknown(section, POSTERIOR_KEYS, f"{where}[posterior] ")
    walkers = section.get("walkers", 32)
    if isinstance(walkers, bool) or not isinstance(walkers, int) or walkers < 4 or walkers % 2:
        raise ObservationError(f"{where}[posterior] walkers = {walkers!r}: must be an even "
                               "integer >= 4")
    burn = section.get("burn_in", 0.25)
    if isinstance(burn, bool) or not isinstance(burn, (int, float)) or not 0 <= burn <= 0.9:
        raise ObservationError(f"{where}[posterior] burn_in = {burn!r}: must be a fraction "
                               "0-0.9 of the steps")
    seed = section.get("seed", 0)
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise ObservationError(f"{where}[posterior] seed = {seed!r}: must be an integer >= 0")
    return SamplerSettings(walkers=walkers, burn_in=float(burn), seed=seed)


def read_observation(path: str | os.PathLike) -> Observation:
    """Read and validate an observation file (layout in the module docstring)."""
    from torrid.io.config import ConfigError
    from torrid.io.tomlfile import read_toml

    path = Path(path)
    where = f"{path}: "
    try:
        data = read_toml(path)
    except ConfigError as err:
        raise ObservationError(str(err)) from None
    _unknown(data, SECTIONS, where)
    shared = dict(data.get("observer", {}))
    _unknown(shared, KEYS, f"{where}[observer] ")
    for key in ("response",):
        if isinstance(shared.get(key), str) and not Path(shared[key]).is_absolute():
            shared[key] = str(path.parent / shared[key])
    try:
        settings = ObserverSettings(**shared)
    except ObserverError as err:
        raise ObservationError(f"{where}[observer] {err}") from None
    fit = data.get("fit", {})
    _unknown(fit, FIT_KEYS, f"{where}[fit] ")
    bounds = {key: _bounds(fit[key], f"{where}[fit] {key}") for key in FIT_KEYS if key in fit}
    tables = data.get("curve")
    if not isinstance(tables, list) or not tables:
        raise ObservationError(f"{where}no [[curve]] table: list each measured curve as "
                               "[[curve]] with file = \"CURVE.csv\" and band = \"LO-HI\"")
    curves = []
    for number, table in enumerate(tables, start=1):
        here = f"{where}curve {number}: "
        _unknown(table, CURVE_KEYS, here)
        if not isinstance(table.get("file"), str):
            raise ObservationError(f"{here}file = {table.get('file')!r}: give the CSV of the "
                                   "curve (relative to the observation file)")
        if "band" not in table and "response" not in table:
            raise ObservationError(f"{here}give band = \"LO-HI\" (micron) or response = "
                                   "\"FILE.csv\"")
        changes = {"band": None, "response": None}
        changes.update({k: table[k] for k in ("band", "response", "radius_ratio") if k in table})
        if isinstance(changes.get("response"), str) and not Path(changes["response"]).is_absolute():
            changes["response"] = str(path.parent / changes["response"])
        try:
            curve_settings = settings.replace(**changes)
        except ObserverError as err:
            raise ObservationError(f"{here}{err}") from None
        shift = table.get("phase_shift", 0.0)
        if isinstance(shift, bool) or not isinstance(shift, (int, float)) or not abs(shift) < 1:
            raise ObservationError(f"{here}phase_shift = {shift!r}: must be a number with "
                                   "|phase_shift| < 1 (orbital phase)")
        csv = Path(table["file"])
        csv = csv if csv.is_absolute() else path.parent / csv
        try:
            observed = read_observed_csv(csv)
        except (ObservedDataError, OSError) as err:
            raise ObservationError(f"{here}{err}") from None
        curves.append(MeasuredCurve(observed, curve_settings, float(shift)))
    return Observation(curves=tuple(curves), settings=settings,
                       night_temperature_bounds=bounds.get("night_temperature_bounds"),
                       day_temperature_bounds=bounds.get("day_temperature_bounds"),
                       sampler=_sampler(data.get("posterior", {}), where), source=str(path))
