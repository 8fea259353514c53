"""Run configuration: typed, validated once on construction, frozen.

A configuration is a tree of frozen dataclasses, one per section (``planet``, ``numerics``,
``run``, ``case``). ``ModelConfig.from_dict`` builds one from plain data (a parsed TOML file or
JSON from a run file's attributes), reporting the first problem as a one-line
:class:`ConfigError` that names the key, the value and what is allowed, and suggests the
closest known key for a misspelt one. ``to_dict`` gives the inverse (JSON-safe).
"""

from __future__ import annotations

import dataclasses
import difflib
import math
from dataclasses import dataclass, field
from typing import Any

from torrid.io.tomltext import parse_value
from torrid.physics.cases import earth

SECONDS_PER_DAY = 86400.0


class ConfigError(ValueError):
    """A configuration value or key that is not allowed (the message is one line)."""


def short_repr(value) -> str:
    """repr of a value, shortened so an error message stays one readable line."""
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def _number(section: str, key: str, value, *, minimum=None, maximum=None, strict_min=False,
            allow_inf=False, integer=False):
    """Check one numeric value; return it as float/int or raise ConfigError."""
    where = f"{section}.{key}"
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        kind = "an integer" if integer else "a number"
        raise ConfigError(f"{where} = {short_repr(value)}: must be {kind}")
    try:
        as_float = float(value)
    except OverflowError:
        raise ConfigError(f"{where} = {short_repr(value)}: too large") from None
    if integer and not (isinstance(value, int) or as_float.is_integer()):
        raise ConfigError(f"{where} = {short_repr(value)}: must be an integer")
    if math.isnan(as_float) or (math.isinf(as_float) and not allow_inf):
        raise ConfigError(f"{where} = {short_repr(value)}: must be a finite number")
    if minimum is not None and (value <= minimum if strict_min else value < minimum):
        op = ">" if strict_min else ">="
        raise ConfigError(f"{where} = {short_repr(value)}: must be {op} {minimum}")
    if maximum is not None and value > maximum:
        raise ConfigError(f"{where} = {short_repr(value)}: must be <= {maximum}")
    return int(value) if integer else float(value)


@dataclass(frozen=True)
class PlanetConfig:
    """The rotating sphere.

    Parameters
    ----------
    radius_m : float
        Planet radius a (m).
    rotation_period_days : float
        Sidereal rotation period (days of 86400 s); negative for retrograde spin
        (the rotation vector points to the grid's south pole); ``inf`` for no rotation.
    gravity_m_s2 : float
        (Reduced) gravity g (m s^-2); converts geopotential to thickness.
    """

    radius_m: float = earth.RADIUS_M
    rotation_period_days: float = 2 * math.pi / earth.ROTATION_RATE_S / SECONDS_PER_DAY
    gravity_m_s2: float = earth.GRAVITY_M_S2

    def __post_init__(self):
        s = "planet"
        object.__setattr__(self, "radius_m", _number(s, "radius_m", self.radius_m, minimum=0,
                                                     strict_min=True))
        p = _number(s, "rotation_period_days", self.rotation_period_days, allow_inf=True)
        if p == 0:
            raise ConfigError("planet.rotation_period_days = 0: must be non-zero (inf: no rotation)")
        object.__setattr__(self, "rotation_period_days", p)
        object.__setattr__(self, "gravity_m_s2", _number(s, "gravity_m_s2", self.gravity_m_s2,
                                                         minimum=0, strict_min=True))

    @property
    def rotation_rate_s(self) -> float:
        """Signed angular rotation rate Omega (rad s^-1)."""
        return 2 * math.pi / (self.rotation_period_days * SECONDS_PER_DAY)


@dataclass(frozen=True)
class NumericsConfig:
    """Resolution, dissipation and time step.

    Parameters
    ----------
    truncation : int
        Triangular truncation N (T42, T85, ...); the grid is the alias-free Gauss grid.
    hyperdiffusion_days : float or None
        E-folding time (days) of the del^(2p) hyperdiffusion at wavenumber N; ``inf`` is off;
        ``None`` takes the case's documented default.
    hyperdiffusion_order : int or None
        p in del^(2p) (>= 1; 4 means del^8); ``None`` takes the case's default.
    time_step_s : float or None
        Time step (s), shortened if needed to divide the output interval; ``None`` chooses it
        from ``courant_number``.
    courant_number : float
        Advective Courant number |v|_max dt sqrt(N (N + 1)) / a for the automatic step.
    threads : int
        Transform threads (1 is fastest below T170 on two cores).
    """

    truncation: int = 42
    hyperdiffusion_days: float | None = None
    hyperdiffusion_order: int | None = None
    time_step_s: float | None = None
    courant_number: float = 1.0
    threads: int = 1

    def __post_init__(self):
        s, set_ = "numerics", object.__setattr__
        set_(self, "truncation", _number(s, "truncation", self.truncation, minimum=1,
                                         maximum=1000, integer=True))
        if self.hyperdiffusion_days is not None:
            set_(self, "hyperdiffusion_days", _number(s, "hyperdiffusion_days",
                                                      self.hyperdiffusion_days, minimum=0,
                                                      strict_min=True, allow_inf=True))
        if self.hyperdiffusion_order is not None:
            set_(self, "hyperdiffusion_order", _number(s, "hyperdiffusion_order",
                                                       self.hyperdiffusion_order, minimum=1,
                                                       maximum=8, integer=True))
        if self.time_step_s is not None:
            set_(self, "time_step_s", _number(s, "time_step_s", self.time_step_s, minimum=0,
                                              strict_min=True))
        set_(self, "courant_number", _number(s, "courant_number", self.courant_number,
                                             minimum=0, strict_min=True, maximum=1.5))
        set_(self, "threads", _number(s, "threads", self.threads, minimum=1, maximum=256,
                                      integer=True))


@dataclass(frozen=True)
class RunConfig:
    """Length and output schedule (simulated time).

    Parameters
    ----------
    days : float
        Simulated days to run (the upper bound when stopping at steady state).
    output_interval_days : float
        Interval between written snapshots (days); the initial state is written at 0.
    stop_at_steady_state : bool
        Planet runs: stop once the run has equilibrated (criterion in
        :mod:`torrid.workflow.steady`). Ignored by the standard cases.
    steady_tolerance : float
        Relative change of the global diagnostics allowed over the trailing window.
    steady_window_days : float or None
        Trailing window (days); ``None``: the longer of 3 rotation periods and 5 tau_rad.
    restart_interval_days : float
        Simulated days between restart files (rounded to whole output intervals); runs that
        write a run file also write restart data at the end.
    initial_fields : str or None
        A netCDF file with h, u, v on a lon-lat grid (a run file will do) to start from instead
        of rest (planets) or the case's initial state; fitted onto the model's harmonics.
    """

    days: float = 200.0
    output_interval_days: float = 1.0
    stop_at_steady_state: bool = True
    steady_tolerance: float = 1e-2
    steady_window_days: float | None = None
    restart_interval_days: float = 10.0
    initial_fields: str | None = None

    def __post_init__(self):
        s, set_ = "run", object.__setattr__
        set_(self, "days", _number(s, "days", self.days, minimum=0, strict_min=True,
                                   maximum=1e6))
        set_(self, "output_interval_days", _number(s, "output_interval_days",
                                                   self.output_interval_days, minimum=0,
                                                   strict_min=True))
        if not isinstance(self.stop_at_steady_state, bool):
            raise ConfigError(f"run.stop_at_steady_state = {self.stop_at_steady_state!r}: "
                              "must be true or false")
        set_(self, "steady_tolerance", _number(s, "steady_tolerance", self.steady_tolerance,
                                               minimum=0, strict_min=True, maximum=0.5))
        if self.steady_window_days is not None:
            set_(self, "steady_window_days", _number(s, "steady_window_days",
                                                     self.steady_window_days, minimum=0,
                                                     strict_min=True))
        set_(self, "restart_interval_days", _number(s, "restart_interval_days",
                                                    self.restart_interval_days, minimum=0,
                                                    strict_min=True))
        if self.initial_fields is not None and (not isinstance(self.initial_fields, str)
                                                or not self.initial_fields.strip()):
            raise ConfigError(f"run.initial_fields = {short_repr(self.initial_fields)}: must be a "
                              "file name")


@dataclass(frozen=True)
class CaseConfig:
    """Which built-in initial state (a standard test case) to start from.

    Parameters
    ----------
    name : str
        One of :data:`torrid.physics.cases.CASES`.
    alpha_rad : float
        Williamson case 2 only: angle (rad) between the flow's axis and the grid's pole.
    """

    name: str = "williamson6"
    alpha_rad: float = 0.0

    def __post_init__(self):
        from torrid.physics.cases import CASES

        if not isinstance(self.name, str) or self.name not in CASES:
            raise ConfigError(f"case.name = {short_repr(self.name)}: must be one of {', '.join(CASES)}")
        a = _number("case", "alpha_rad", self.alpha_rad, minimum=-math.pi, maximum=math.pi)
        if a != 0 and self.name != "williamson2":
            raise ConfigError(f"case.alpha_rad = {a!r}: only williamson2 takes a tilt angle")
        object.__setattr__(self, "alpha_rad", a)


@dataclass(frozen=True)
class AtmosphereConfig:
    """The forced layer of a hot-planet run (Showman & Polvani 2011 form).

    Parameters
    ----------
    mean_geopotential_m2_s2 : float
        g H, the nightside equilibrium geopotential; sqrt(g H) is the gravity-wave speed.
    forcing_contrast : float
        dH / H: the substellar equilibrium thickness is H (1 + dH/H).
    radiative_timescale_days : float
        tau_rad (days); ``inf``: no forcing.
    drag_timescale_days : float
        tau_drag (days); ``inf``: no drag.
    """

    mean_geopotential_m2_s2: float = 4.0e6
    forcing_contrast: float = 1.0
    radiative_timescale_days: float = 1.0
    drag_timescale_days: float = math.inf

    def __post_init__(self):
        s, set_ = "atmosphere", object.__setattr__
        set_(self, "mean_geopotential_m2_s2", _number(s, "mean_geopotential_m2_s2",
                                                      self.mean_geopotential_m2_s2, minimum=0,
                                                      strict_min=True))
        set_(self, "forcing_contrast", _number(s, "forcing_contrast", self.forcing_contrast,
                                               minimum=0, maximum=10))
        for key in ("radiative_timescale_days", "drag_timescale_days"):
            set_(self, key, _number(s, key, getattr(self, key), minimum=0, strict_min=True,
                                    allow_inf=True))


ROTATION_CHOICES = ("synchronous", "pseudo-synchronous", "given")


@dataclass(frozen=True)
class OrbitConfig:
    """The orbit and how the planet spins on it.

    Parameters
    ----------
    eccentricity : float
        0 <= e < 1.
    rotation : str
        ``synchronous`` (spin period = orbital period, sign from planet.rotation_period_days),
        ``pseudo-synchronous`` (Hut 1981 rate for the eccentricity) or ``given``
        (planet.rotation_period_days as is; needs orbital_period_days).
    orbital_period_days : float or None
        Orbital period (days); ``None``: |planet.rotation_period_days|.
    distance_exponent : float
        k in forcing contrast x (a / r)^k on an eccentric orbit.
    initial_mean_anomaly_deg : float
        Mean anomaly at the start (degrees; 0 = periastron).
    """

    eccentricity: float = 0.0
    rotation: str = "synchronous"
    orbital_period_days: float | None = None
    distance_exponent: float = 2.0
    initial_mean_anomaly_deg: float = 0.0

    def __post_init__(self):
        s, set_ = "orbit", object.__setattr__
        e = _number(s, "eccentricity", self.eccentricity, minimum=0)
        if e >= 1:
            raise ConfigError(f"orbit.eccentricity = {e!r}: must be in [0, 1) (a bound orbit)")
        set_(self, "eccentricity", e)
        if not isinstance(self.rotation, str) or self.rotation not in ROTATION_CHOICES:
            raise ConfigError(f"orbit.rotation = {short_repr(self.rotation)}: must be one of "
                              f"{', '.join(ROTATION_CHOICES)}")
        if self.orbital_period_days is not None:
            set_(self, "orbital_period_days", _number(s, "orbital_period_days",
                                                      self.orbital_period_days, minimum=0,
                                                      strict_min=True))
        set_(self, "distance_exponent", _number(s, "distance_exponent", self.distance_exponent,
                                                minimum=0, maximum=10))
        set_(self, "initial_mean_anomaly_deg", _number(s, "initial_mean_anomaly_deg",
                                                       self.initial_mean_anomaly_deg,
                                                       minimum=-360, maximum=360))


#: The built-in default planet: an invented hot gas giant with typical hot-Jupiter values
#: (gravity-wave speed sqrt(gH) = 2 km/s, rotation period 3 days, radius 1.2 Jupiter radii).
DEFAULT_PLANET = dict(radius_m=1.2 * 7.1492e7, rotation_period_days=3.0, gravity_m_s2=10.0)

_SECTIONS = {"planet": PlanetConfig, "atmosphere": AtmosphereConfig, "orbit": OrbitConfig,
             "numerics": NumericsConfig, "run": RunConfig, "case": CaseConfig}


@dataclass(frozen=True)
class ModelConfig:
    """A complete, validated run configuration (see the section classes for the keys).

    Without a ``case`` it is a hot-planet run (forced from rest by ``atmosphere`` on ``orbit``);
    the defaults are the built-in default planet. With a ``case`` it is a standard test case of
    the shallow-water core, and ``atmosphere`` and ``orbit`` are unused.
    """

    planet: PlanetConfig = field(default_factory=lambda: PlanetConfig(**DEFAULT_PLANET))
    atmosphere: AtmosphereConfig = field(default_factory=AtmosphereConfig)
    orbit: OrbitConfig = field(default_factory=OrbitConfig)
    numerics: NumericsConfig = field(default_factory=NumericsConfig)
    run: RunConfig = field(default_factory=RunConfig)
    case: CaseConfig | None = None

    def __post_init__(self):
        for name, cls in _SECTIONS.items():
            value = getattr(self, name)
            if not isinstance(value, cls) and not (name == "case" and value is None):
                raise ConfigError(f"{name}: must be a {cls.__name__}")
        o = self.orbit
        if self.case is None and o.rotation == "given" and o.orbital_period_days is None:
            raise ConfigError("orbit.rotation = 'given' needs orbit.orbital_period_days")
        if self.case is None and math.isinf(self.planet.rotation_period_days) \
                and o.orbital_period_days is None:
            raise ConfigError("planet.rotation_period_days = inf needs orbit.orbital_period_days")
        n = self.numerics
        if n.time_step_s is not None and n.time_step_s > self.run.output_interval_days * SECONDS_PER_DAY:
            raise ConfigError(f"numerics.time_step_s = {n.time_step_s!r}: must not exceed "
                              f"run.output_interval_days ({self.run.output_interval_days} days)")

    @property
    def is_planet(self) -> bool:
        """True for a forced hot-planet run, False for a standard test case."""
        return self.case is None

    def to_dict(self) -> dict[str, dict[str, Any]]:
        """Plain nested dict (JSON-safe apart from inf, which json writes as Infinity).

        Keys left at ``None`` are dropped, so the dict also reads back as a TOML file.
        """
        out = {}
        for name in _SECTIONS:
            section = getattr(self, name)
            if section is not None:
                out[name] = {k: v for k, v in dataclasses.asdict(section).items()
                             if v is not None}
        return out

    @classmethod
    def from_dict(cls, data: dict) -> "ModelConfig":
        """Build and validate from nested plain data; unknown keys raise ConfigError."""
        if not isinstance(data, dict):
            raise ConfigError(f"configuration must be a table of sections, got {type(data).__name__}")
        sections = {}
        for name, value in data.items():
            if name not in _SECTIONS:
                raise ConfigError(_unknown(name, list(_SECTIONS), "section"))
            if not isinstance(value, dict):
                raise ConfigError(f"[{name}] must be a table of keys, got {value!r}")
            sections[name] = _build_section(name, _SECTIONS[name], value)
        return cls(**sections)

    def replace(self, **changes: dict[str, Any]) -> "ModelConfig":
        """A copy with some keys changed, e.g. ``replace(numerics={"truncation": 85})``."""
        merged = self.to_dict()
        for section, keys in changes.items():
            merged.setdefault(section, {}).update(keys)
        return ModelConfig.from_dict(merged)

    def with_override(self, assignment: str) -> "ModelConfig":
        """A copy with one ``section.key=value`` override (value in TOML syntax, or a bare
        word taken as a string), e.g. ``"atmosphere.drag_timescale_days=inf"``."""
        key, sep, text = assignment.partition("=")
        section, dot, name = key.strip().partition(".")
        if not sep or not dot or not name:
            raise ConfigError(f"--set {assignment!r}: must look like section.key=value")
        if section not in _SECTIONS:
            raise ConfigError(_unknown(section, list(_SECTIONS), "section"))
        return self.replace(**{section: {name.strip(): parse_value(text.strip())}})


def _build_section(name: str, cls, values: dict):
    known = [f.name for f in dataclasses.fields(cls)]
    for key in values:
        if key not in known:
            raise ConfigError(_unknown(f"{name}.{key}", [f"{name}.{k}" for k in known], "key"))
    return cls(**values)


def _unknown(given: str, known: list[str], what: str) -> str:
    close = difflib.get_close_matches(given, known, n=1, cutoff=0.5)
    hint = f" (did you mean {close[0]!r}?)" if close else f" (known: {', '.join(known)})"
    return f"unknown {what} {given!r}{hint}"
