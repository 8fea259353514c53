"""Run configuration: typed, validated once on construction, frozen.

A configuration is a tree of frozen dataclasses, one per section (``planet``, ``atmosphere``,
``orbit``, ``numerics``, ``run`` and, for a standard test case, ``case``). The section classes
are made from the rows of :mod:`torrid.io.settings` (types, defaults, limits), so no default or
limit is written here. ``ModelConfig.from_dict`` builds a configuration from plain data (a
parsed TOML file or JSON from a run file's attributes), reporting the first problem as a
one-line :class:`ConfigError` that names the key, the value and what is allowed, and suggests
the closest known key for a misspelt one. ``to_dict`` gives the inverse (JSON-safe).
"""

from __future__ import annotations

import dataclasses
import difflib
import math
from dataclasses import dataclass, field
from typing import Any

from torrid.io.settings import (REQUIRED, SECTIONS, ConfigError, Setting, default,
                                section_settings, short_repr)
from torrid.io.tomltext import parse_value
from torrid.physics.cases import CASES, earth
from torrid.physics.processes import CASE, PLANET, REGISTRY
from torrid.physics.units import SECONDS_PER_DAY

__all__ = ["ConfigError", "ModelConfig", "PlanetConfig", "AtmosphereConfig", "OrbitConfig",
           "NumericsConfig", "RunConfig", "CaseConfig", "SECONDS_PER_DAY", "short_repr",
           "parse_value"]

#: Keys that a standard case sets from its publication when they are unset.
_CASE_DISSIPATION = ("hyperdiffusion_days", "hyperdiffusion_order")


def _docstring(section: str, rows: tuple[Setting, ...]) -> str:
    lines = [f"Configuration section [{section}]: {SECTIONS[section]}.", "",
             "Generated from :mod:`torrid.io.settings`.", "", "Parameters", "----------"]
    for s in rows:
        kind = s.kind.__name__ + (" or None" if s.optional else "")
        lines.append(f"{s.name} : {kind}")
        unit = f" ({s.unit})" if s.unit not in ("", "1") else ""
        unset = f" Unset: {s.unset}." if s.optional else ""
        lines.append(f"    {s.description}{unit}; default {s.default_text()}.{unset}")
    return "\n".join(lines)


def _section_class(section: str, class_name: str, check=None, **members):
    """A frozen dataclass whose fields, defaults and validation are the section's rows;
    ``check(instance)`` adds a rule between keys of the section."""
    rows = section_settings(section)
    fields = []
    for s in rows:
        annotation = s.kind | None if s.optional else s.kind
        if s.default is REQUIRED:
            fields.append((s.name, annotation))
        else:
            fields.append((s.name, annotation, field(default=s.default)))

    def __post_init__(self):
        for s in rows:
            object.__setattr__(self, s.name, s.validate(getattr(self, s.name)))
        if check is not None:
            check(self)

    cls = dataclasses.make_dataclass(class_name, fields, frozen=True,
                                     namespace={"__post_init__": __post_init__, **members})
    cls.__module__ = __name__
    cls.__doc__ = _docstring(section, rows)
    return cls


def _rotation_rate_s(self) -> float:
    """Signed angular rotation rate Omega (rad s^-1) of ``rotation_period_days``."""
    return 2 * math.pi / (self.rotation_period_days * SECONDS_PER_DAY)


def _check_case(case) -> None:
    if case.alpha_rad != 0 and case.name != "williamson2":
        raise ConfigError(f"case.alpha_rad = {case.alpha_rad!r}: only williamson2 takes a tilt "
                          "angle")


PlanetConfig = _section_class("planet", "PlanetConfig",
                              rotation_rate_s=property(_rotation_rate_s))
AtmosphereConfig = _section_class("atmosphere", "AtmosphereConfig")
OrbitConfig = _section_class("orbit", "OrbitConfig")
NumericsConfig = _section_class("numerics", "NumericsConfig")
RunConfig = _section_class("run", "RunConfig")
CaseConfig = _section_class("case", "CaseConfig", check=_check_case)

SECTION_CLASSES = {"planet": PlanetConfig, "atmosphere": AtmosphereConfig, "orbit": OrbitConfig,
                   "numerics": NumericsConfig, "run": RunConfig, "case": CaseConfig}


@dataclass(frozen=True)
class ModelConfig:
    """A complete, validated run configuration (the keys: :mod:`torrid.io.settings`).

    Without a ``case`` it is a hot-planet run (forced from rest by ``atmosphere`` on ``orbit``);
    the defaults are the built-in default planet. With a ``case`` it is a standard test case of
    the shallow-water core, and ``atmosphere`` and ``orbit`` are unused; build it with
    :meth:`from_dict` (or :func:`torrid.build_case_config`), which brings the case's own
    planet, length and dissipation beneath the keys given.
    """

    planet: PlanetConfig = field(default_factory=PlanetConfig)
    atmosphere: AtmosphereConfig = field(default_factory=AtmosphereConfig)
    orbit: OrbitConfig = field(default_factory=OrbitConfig)
    numerics: NumericsConfig = field(default_factory=NumericsConfig)
    run: RunConfig = field(default_factory=RunConfig)
    case: CaseConfig | None = None

    def __post_init__(self):
        for name, cls in SECTION_CLASSES.items():
            value = getattr(self, name)
            if not isinstance(value, cls) and not (name == "case" and value is None):
                raise ConfigError(f"{name}: must be a {cls.__name__}")
        o = self.orbit
        if self.is_planet and o.rotation == "given" and o.orbital_period_days is None:
            raise ConfigError("orbit.rotation = 'given' needs orbit.orbital_period_days")
        if self.is_planet and math.isinf(self.planet.rotation_period_days) \
                and o.orbital_period_days is None:
            raise ConfigError("planet.rotation_period_days = inf needs orbit.orbital_period_days")
        kind = PLANET if self.is_planet else CASE
        for process in REGISTRY:
            if kind in process.kinds:
                problem = process.check({key: self.get(key) for key in process.settings})
                if problem:
                    raise ConfigError(problem)
        n = self.numerics
        unset = {k: default(f"numerics.{k}") for k in _CASE_DISSIPATION if getattr(n, k) is None}
        if self.is_planet and unset:  # "the case's setting" means nothing for a planet
            n = dataclasses.replace(n, **unset)
            object.__setattr__(self, "numerics", n)
        if n.time_step_s is not None and n.time_step_s > self.run.output_interval_days * SECONDS_PER_DAY:
            raise ConfigError(f"numerics.time_step_s = {n.time_step_s!r}: must not exceed "
                              f"run.output_interval_days ({self.run.output_interval_days} days)")

    @property
    def is_planet(self) -> bool:
        """True for a forced hot-planet run, False for a standard test case (the one test)."""
        return self.case is None

    def get(self, key: str):
        """The value of ``section.name`` (``None`` if unset or the section is absent)."""
        section, _, name = key.partition(".")
        values = getattr(self, section, None)
        return None if values is None else getattr(values, name)

    def to_dict(self) -> dict[str, dict[str, Any]]:
        """Plain nested dict (JSON-safe apart from inf, which json writes as Infinity).

        Keys left at ``None`` are dropped, so the dict also reads back as a TOML file.
        """
        out = {}
        for name in SECTION_CLASSES:
            section = getattr(self, name)
            if section is not None:
                out[name] = {k: v for k, v in dataclasses.asdict(section).items()
                             if v is not None}
        return out

    @classmethod
    def from_dict(cls, data: dict) -> "ModelConfig":
        """Build and validate from nested plain data; unknown keys raise ConfigError.

        With a ``case`` section, the case's own planet (the Earth of Williamson et al. 1992),
        run length, output interval and dissipation fill the keys not given, and the
        steady-state stop is off.
        """
        if not isinstance(data, dict):
            raise ConfigError(f"configuration must be a table of sections, got {type(data).__name__}")
        for name, value in data.items():
            if name == "sweep":
                raise ConfigError("[sweep] is the section of a sweep file: run it with "
                                  "torrid sweep FILE.toml (torrid run takes a planet "
                                  "configuration)")
            if name not in SECTION_CLASSES:
                raise ConfigError(unknown_message(name, list(SECTION_CLASSES), "section"))
            if not isinstance(value, dict):
                raise ConfigError(f"[{name}] must be a table of keys, got {short_repr(value)}")
        if "case" in data:
            data = _with_case_defaults(data)
        return cls(**{name: _build_section(name, values) for name, values in data.items()})

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
        if section not in SECTION_CLASSES:
            raise ConfigError(unknown_message(section, list(SECTION_CLASSES), "section"))
        return self.replace(**{section: {name.strip(): parse_value(text.strip())}})


def _with_case_defaults(data: dict) -> dict:
    """``data`` with the case's defaults beneath the keys it gives (see ``from_dict``)."""
    case = data["case"].get("name")
    if not isinstance(case, str) or case not in CASES:
        _build_section("case", data["case"])  # the one-line error about the name
    spec = CASES[case]
    defaults = {
        "planet": {"radius_m": earth.RADIUS_M, "gravity_m_s2": earth.GRAVITY_M_S2,
                   "rotation_period_days": 2 * math.pi / earth.ROTATION_RATE_S / SECONDS_PER_DAY},
        "run": {"days": spec.default_days, "output_interval_days": spec.default_output_interval_days,
                "stop_at_steady_state": False},
        "numerics": dict.fromkeys(_CASE_DISSIPATION),
    }
    merged = {name: dict(values) for name, values in data.items()}
    for section, values in defaults.items():
        merged[section] = {**values, **merged.get(section, {})}
    return merged


def _build_section(name: str, values: dict):
    rows = section_settings(name)
    known = [s.name for s in rows]
    for key in values:
        if key not in known:
            raise ConfigError(unknown_message(f"{name}.{key}", [f"{name}.{k}" for k in known],
                                              "key"))
    for s in rows:
        if s.default is REQUIRED and s.name not in values:
            raise ConfigError(f"[{name}] needs {s.key} ({s.allowed()})")
    return SECTION_CLASSES[name](**values)


def unknown_message(given: str, known: list[str], what: str) -> str:
    """'unknown key ...' with the closest known name, or the list of known names."""
    close = difflib.get_close_matches(given, known, n=1, cutoff=0.5)
    hint = f" (did you mean {close[0]!r}?)" if close else f" (known: {', '.join(known)})"
    return f"unknown {what} {given!r}{hint}"
