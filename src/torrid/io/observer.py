"""Observer settings of a phase curve (star, orbit geometry, band): typed, validated, frozen.

The same keys come from Python (:class:`ObserverSettings`), from the ``[observer]`` section of
a TOML file (:func:`read_observer_toml`; unknown keys are refused with the closest suggestion)
and from the options of ``torrid phase`` (``--star-temperature`` for ``star_temperature``).
Tabulated band responses are read by :func:`read_response` (two-column CSV).
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import os
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from torrid.io.csvtable import numeric_rows

#: nominal solar radius (m; IAU 2015 Resolution B3) and astronomical unit (m; IAU 2012 B2)
SOLAR_RADIUS_M = 6.957e8
ASTRONOMICAL_UNIT_M = 1.495978707e11
#: the top-hat band used when neither a band nor a response is given (micron)
DEFAULT_BAND_UM = (4.0, 5.0)
WEIGHTINGS = ("photon", "energy")


class ObserverError(ValueError):
    """An observer setting, settings file or response file that is not allowed (one line)."""


def _number(key: str, value, *, low=None, high=None, strict_low=False, integer=False):
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ObserverError(f"{key} = {value!r}: must be {'an integer' if integer else 'a number'}")
    if integer and not float(value).is_integer():
        raise ObserverError(f"{key} = {value!r}: must be an integer")
    if not math.isfinite(value):
        raise ObserverError(f"{key} = {value!r}: must be a finite number")
    if low is not None and (value <= low if strict_low else value < low):
        raise ObserverError(f"{key} = {value!r}: must be {'>' if strict_low else '>='} {low}")
    if high is not None and value > high:
        raise ObserverError(f"{key} = {value!r}: must be <= {high}")
    return int(value) if integer else float(value)


_NUMBER = r"(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"


def parse_band(text) -> tuple[float, float]:
    """A band 'LO-HI' (micron), or a pair of numbers; 0 < LO < HI."""
    if isinstance(text, str):
        match = re.fullmatch(rf"\s*({_NUMBER})\s*-\s*({_NUMBER})\s*", text)
        if not match:
            raise ObserverError(f"band = {text!r}: must be LO-HI in micron, e.g. 4.0-5.0")
        pair = (float(match[1]), float(match[2]))
    elif isinstance(text, (tuple, list)) and len(text) == 2:
        pair = tuple(_number("band", v) for v in text)
    else:
        raise ObserverError(f"band = {text!r}: must be LO-HI in micron, e.g. 4.0-5.0")
    if not 0 < pair[0] < pair[1]:
        raise ObserverError(f"band = {text!r}: must be LO-HI in micron with 0 < LO < HI")
    check_wavelengths("band", pair)
    return pair


#: Wavelengths (micron) where a star's spectrum is taken as a blackbody: from the near
#: ultraviolet to the far infrared. Outside, stellar spectra depart far from a Planck curve
#: (line blanketing and the Balmer jump shortward, chromospheres longward): common practice,
#: the limits are a rounded choice of ours.
BLACKBODY_RANGE_UM = (0.2, 1000.0)


def check_wavelengths(what: str, wavelengths) -> None:
    """Refuse wavelengths outside :data:`BLACKBODY_RANGE_UM` (one-line ObserverError)."""
    lo, hi = float(min(wavelengths)), float(max(wavelengths))
    low, high = BLACKBODY_RANGE_UM
    if lo < low or hi > high:
        raise ObserverError(f"{what} = {lo:g}-{hi:g} micron: must lie within {low:g}-{high:g} "
                            "micron, where the star is treated as a blackbody")


@dataclass(frozen=True)
class ObserverSettings:
    """What the telescope sees and how the map is turned into emission.

    Parameters
    ----------
    star_temperature : float
        Effective temperature of the star (K); it radiates as a blackbody.
    star_radius : float
        Stellar radius (solar radii, 6.957e8 m).
    radius_ratio : float
        Planet over star radius R_p / R_s.
    semi_major_axis : float
        Orbital semi-major axis (AU); only enters derived temperatures.
    inclination : float
        Orbital inclination (degrees from the grid's north pole; 90 = edge-on); the observer
        sits at latitude 90 - inclination.
    band : (float, float) or None
        Top-hat band (micron); ``None`` with no ``response``: 4.0-5.0 micron.
    response : str or None
        Two-column CSV of the band response (wavelength in micron, response), instead of
        ``band``.
    night_temperature, day_temperature : float or None
        Temperatures (K) of the nightside (h = H) and substellar (h = H (1 + dH/H))
        equilibrium thickness; ``None``: derived from the star (Cowan & Agol 2011).
    albedo : float
        Bond albedo A_B (0 <= A_B < 1) of the derived temperatures.
    redistribution : float
        Heat redistribution efficiency epsilon (0-1) of the derived temperatures (see
        :mod:`torrid.physics.temperature`; 0 gives T_night = 0, which is refused).
    weighting : str
        ``photon`` (photon-counting detector, weight lambda / (h c)) or ``energy``.
    argument_of_periastron : float
        omega (degrees); mid-transit is at true anomaly 90 - omega. Eccentric orbits only.
    phases : int
        Number of orbital phases sampled uniformly in [0, 1).
    """

    star_temperature: float = 6000.0
    star_radius: float = 1.1
    radius_ratio: float = 0.1
    semi_major_axis: float = 0.04
    inclination: float = 90.0
    band: tuple[float, float] | None = None
    response: str | None = None
    night_temperature: float | None = None
    day_temperature: float | None = None
    albedo: float = 0.0
    redistribution: float = 0.2
    weighting: str = "photon"
    argument_of_periastron: float = 90.0
    phases: int = 360

    def __post_init__(self):
        set_ = object.__setattr__
        for key in ("star_temperature", "star_radius", "radius_ratio", "semi_major_axis"):
            set_(self, key, _number(key, getattr(self, key), low=0, strict_low=True))
        set_(self, "inclination", _number("inclination", self.inclination, low=0, high=180))
        if self.band is not None:
            set_(self, "band", parse_band(self.band))
        if self.response is not None:
            if not isinstance(self.response, (str, os.PathLike)) or not str(self.response):
                raise ObserverError(f"response = {self.response!r}: must be a CSV file name")
            set_(self, "response", str(self.response))
            if self.band is not None:
                raise ObserverError(f"response = {self.response!r} and band = "
                                    f"{self.band[0]:g}-{self.band[1]:g}: give one or the other")
        for key in ("night_temperature", "day_temperature"):
            if getattr(self, key) is not None:
                set_(self, key, _number(key, getattr(self, key), low=0, strict_low=True))
        if (self.night_temperature is None) != (self.day_temperature is None):
            given = "night_temperature" if self.night_temperature is not None else "day_temperature"
            missing = "day_temperature" if given == "night_temperature" else "night_temperature"
            raise ObserverError(f"{given} = {getattr(self, given)!r}: give {missing} too "
                                "(or neither, to derive both from the star)")
        if self.night_temperature is not None and self.day_temperature < self.night_temperature:
            raise ObserverError(f"day_temperature = {self.day_temperature!r}: must be >= "
                                f"night_temperature ({self.night_temperature!r})")
        set_(self, "albedo", _number("albedo", self.albedo, low=0, high=1))
        if self.albedo == 1:
            raise ObserverError("albedo = 1.0: must be < 1 (the planet must absorb some light)")
        set_(self, "redistribution", _number("redistribution", self.redistribution, low=0, high=1))
        if self.weighting not in WEIGHTINGS:
            raise ObserverError(f"weighting = {self.weighting!r}: must be one of "
                                f"{', '.join(WEIGHTINGS)}")
        set_(self, "argument_of_periastron", _number(
            "argument_of_periastron", self.argument_of_periastron, low=-360, high=360))
        set_(self, "phases", _number("phases", self.phases, low=8, high=100000, integer=True))

    @property
    def band_um(self) -> tuple[float, float] | None:
        """The top-hat band (micron), or None when a response file is used."""
        if self.response is not None:
            return None
        return self.band or DEFAULT_BAND_UM

    @property
    def temperatures_given(self) -> bool:
        """True if night and day temperatures are given, False if they are derived."""
        return self.night_temperature is not None

    def replace(self, **changes) -> "ObserverSettings":
        """A validated copy with some keys changed (unknown keys raise ObserverError)."""
        _check_keys(changes, "key")
        return dataclasses.replace(self, **changes)

    def to_dict(self) -> dict:
        """Plain dict of the settings (None for unset keys; band as a list)."""
        out = dataclasses.asdict(self)
        out["band"] = list(self.band) if self.band else None
        return out


KEYS = tuple(f.name for f in dataclasses.fields(ObserverSettings))


def _check_keys(data: dict, what: str, prefix: str = "") -> None:
    for key in data:
        if key not in KEYS:
            close = difflib.get_close_matches(key, KEYS, n=1, cutoff=0.5)
            hint = f" (did you mean {close[0]!r}?)" if close else f" (known: {', '.join(KEYS)})"
            raise ObserverError(f"{prefix}unknown {what} {key!r}{hint}")


def read_observer_toml(path: str | os.PathLike) -> dict:
    """The ``[observer]`` section of a TOML file as a validated dict of settings.

    Other sections are ignored (a planet configuration file may carry one); a relative
    ``response`` is taken relative to the TOML file's folder. Errors name the file.
    """
    from torrid.io.config import ConfigError
    from torrid.io.tomlfile import read_toml

    path = Path(path)
    try:
        data = read_toml(path)
    except ConfigError as err:
        raise ObserverError(str(err)) from None
    section = data.get("observer")
    if not isinstance(section, dict):
        raise ObserverError(f"{path}: no [observer] section (the phase-curve settings)")
    _check_keys(section, "key", prefix=f"{path}: [observer] ")
    section = dict(section)
    if isinstance(section.get("response"), str) and not Path(section["response"]).is_absolute():
        section["response"] = str(path.parent / section["response"])
    try:
        ObserverSettings(**section)
    except ObserverError as err:
        raise ObserverError(f"{path}: [observer] {err}") from None
    return section


def read_response(path: str | os.PathLike) -> tuple[np.ndarray, np.ndarray]:
    """A band response from a two-column CSV file: wavelength (micron), response.

    An optional header line (non-numeric) may come first; empty lines and lines starting with
    '#' are skipped. Wavelengths must increase strictly and be positive, responses be
    non-negative and not all zero, with at least 2 rows. Errors name the file and line.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Wavelengths (micron) and responses.
    """
    path = Path(path)
    rows = []
    for where, (lam, resp) in numeric_rows(path, 2, ObserverError, "response file",
                                           "wavelength in micron, response"):
        if lam <= 0:
            raise ObserverError(f"{where}: wavelength {lam:g} micron must be > 0")
        if resp < 0:
            raise ObserverError(f"{where}: response {resp:g} must be >= 0")
        if rows and lam <= rows[-1][0]:
            raise ObserverError(f"{where}: wavelength {lam:g} micron must be greater than the "
                                f"previous row's {rows[-1][0]:g}")
        rows.append((lam, resp))
    if len(rows) < 2:
        raise ObserverError(f"{path}: a response needs at least 2 rows, found {len(rows)}")
    table = np.array(rows)
    if not table[:, 1].max() > 0:
        raise ObserverError(f"{path}: the response is zero everywhere")
    try:
        check_wavelengths("response", table[:, 0])
    except ObserverError as err:
        raise ObserverError(f"{path}: {err}") from None
    return table[:, 0], table[:, 1]
