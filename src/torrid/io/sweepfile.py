"""Sweep files (TOML): a base run configuration plus the axes of a parameter sweep.

A sweep file has the sections of a run file (``[planet]``, ``[atmosphere]``, ``[orbit]``,
``[numerics]``, ``[run]``) as the base configuration of every point, and a ``[sweep]``
section::

    [numerics]
    truncation = 21

    [sweep]
    name = "tau-grid"            # optional; default: the file's stem
    folder = "runs/tau-grid"     # optional; default: runs/<name>, relative to the current folder

    [[sweep.axis]]
    key = "atmosphere.radiative_timescale_days"
    log_range = [0.1, 10.0, 5]   # 5 log-spaced values, both ends included

    [[sweep.axis]]
    key = "atmosphere.drag_timescale_days"
    values = [inf, 10.0, 1.0]    # or range = [start, stop, count]: linear, both ends included

Each axis has ``key`` and exactly one of ``values``, ``log_range`` and ``range``. Axes are
crossed (every combination is a point); axes with the same ``zip = "group"`` advance together
instead (equal lengths) and form one dimension of the sweep, named after the first key of the
group. Generated values are rounded to 12 significant digits, so the same file gives the same
points (and file names) with any numpy.

:func:`load_sweep` refuses a malformed file with a one-line :class:`ConfigError` that names the
file and the key. The configuration of every point is validated when the points are generated
(:meth:`torrid.io.sweepspec.SweepSpec.points`); a point whose configuration is invalid is not an error of the file:
it carries its validation error and is recorded as failed by the runner.
"""

from __future__ import annotations

import difflib
import math
import os
import re
from pathlib import Path

import numpy as np

from torrid.io.config import ConfigError, ModelConfig, short_repr
from torrid.io.settings import setting
from torrid.io.sweepspec import SweepAxis, SweepDimension, SweepSpec, config_keys
from torrid.io.tomlfile import read_toml

SWEEP_KEYS = ("name", "folder", "axis")
AXIS_KEYS = ("key", "values", "log_range", "range", "zip")
GENERATORS = ("values", "log_range", "range")
#: The default folder of a sweep is DEFAULT_PARENT / <name>.
DEFAULT_PARENT = Path("runs")
SIGNIFICANT_DIGITS = 12
_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]*$")


def _suggest(given: str, known: list[str], what: str) -> str:
    close = difflib.get_close_matches(given, known, n=1, cutoff=0.5)
    hint = f" (did you mean {close[0]!r}?)" if close else f" (known: {', '.join(known)})"
    return f"unknown {what} {given!r}{hint}"


def _round(value: float) -> float:
    return float(f"{value:.{SIGNIFICANT_DIGITS}g}")


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _kind(value) -> str | None:
    if isinstance(value, bool):
        return "boolean"
    if _is_number(value):
        return "number"
    if isinstance(value, str):
        return "string"
    return None


#: Most values one axis may generate (1e8 built 3.5 GB of values before anything ran).
MAX_AXIS_VALUES = 100_000


def _generated(where: str, name: str, spec, log: bool) -> tuple:
    """Values of ``log_range``/``range = [start, stop, count]``."""
    shown = f"{where}: {name} = {short_repr(spec)}"
    if not isinstance(spec, list) or len(spec) != 3:
        raise ConfigError(f"{shown}: must be [start, stop, count]")
    start, stop, count = spec
    if not (_is_number(start) and _is_number(stop)) or not all(map(math.isfinite,
                                                                    (start, stop))):
        raise ConfigError(f"{shown}: start and stop must be finite numbers")
    if log and not (start > 0 and stop > 0):
        raise ConfigError(f"{shown}: start and stop must be > 0 (log-spaced)")
    if not (isinstance(count, int) and not isinstance(count, bool)) or count < 2:
        raise ConfigError(f"{shown}: count must be an integer >= 2 (one value: values = [x])")
    if count > MAX_AXIS_VALUES:
        raise ConfigError(f"{shown}: count must be at most {MAX_AXIS_VALUES}")
    if start == stop:
        raise ConfigError(f"{shown}: start and stop must differ")
    if log:
        return tuple(_round(v) for v in np.geomspace(start, stop, count))
    step = (stop - start) / (count - 1)
    if isinstance(start, int) and isinstance(stop, int) and float(step).is_integer():
        return tuple(int(start + i * int(step)) for i in range(count))
    return tuple(_round(v) for v in np.linspace(start, stop, count))


def _axis(where: str, table, keys: dict[str, list[str]]) -> tuple[SweepAxis, str | None]:
    if not isinstance(table, dict):
        raise ConfigError(f"{where}: must be a table ([[sweep.axis]]), got {short_repr(table)}")
    for key in table:
        if key not in AXIS_KEYS:
            raise ConfigError(f"{where}: {_suggest(key, list(AXIS_KEYS), 'key')}")
    key = table.get("key")
    if not isinstance(key, str):
        raise ConfigError(f"{where}: needs key = \"section.name\" (a configuration key), "
                          f"got {short_repr(key)}")
    section, dot, name = key.partition(".")
    if not dot or section not in keys:
        raise ConfigError(f"{where}: key = {key!r}: "
                          + _suggest(section if dot else key, list(keys), "section"))
    if name not in keys[section]:
        raise ConfigError(f"{where}: key = {key!r}: "
                          + _suggest(key, [f"{section}.{k}" for k in keys[section]], "key"))
    if not setting(key).sweepable:
        raise ConfigError(f"{where}: key = {key!r}: cannot be swept (it does not change the "
                          "result; set it in the base configuration)")
    where = f"{where} ({key})"
    given = [g for g in GENERATORS if g in table]
    if len(given) != 1:
        raise ConfigError(f"{where}: needs exactly one of values, log_range, range"
                          + (f" (got {', '.join(given)})" if given else ""))
    generator = given[0]
    if generator == "values":
        values = table["values"]
        if not isinstance(values, list) or not values:
            raise ConfigError(f"{where}: values = {short_repr(values)}: must be a non-empty list")
        kinds = {_kind(v) for v in values}
        if None in kinds or len(kinds) > 1:
            raise ConfigError(f"{where}: values = {short_repr(values)}: must be all numbers, all "
                              "strings or all booleans")
        if any(isinstance(v, float) and math.isnan(v) for v in values):
            raise ConfigError(f"{where}: values = {short_repr(values)}: nan is not a value")
        if len(set(values)) != len(values):
            raise ConfigError(f"{where}: values = {short_repr(values)}: has duplicates")
        axis = SweepAxis(key, tuple(values), "values")
    else:
        axis = SweepAxis(key, _generated(where, generator, table[generator],
                                         log=generator == "log_range"),
                         "log" if generator == "log_range" else "linear")
    group = table.get("zip")
    if group is not None and (not isinstance(group, str) or not group):
        raise ConfigError(f"{where}: zip = {short_repr(group)}: must be a non-empty group name")
    return axis, group


def _dimensions(path, axes_tables, keys) -> tuple[SweepDimension, ...]:
    if not isinstance(axes_tables, list) or not axes_tables:
        raise ConfigError(f"{path}: [sweep] needs at least one [[sweep.axis]] table "
                          "(key = \"section.name\" and values, log_range or range)")
    groups: dict[str | None, list] = {}
    order: list = []
    for number, table in enumerate(axes_tables, start=1):
        axis, group = _axis(f"{path}: [[sweep.axis]] number {number}", table, keys)
        if any(a.key == axis.key for items in groups.values() for a, _ in items):
            raise ConfigError(f"{path}: [[sweep.axis]] number {number}: key {axis.key!r} is "
                              "swept twice")
        label = group if group is not None else ("", number)
        if label not in groups:
            groups[label] = []
            order.append(label)
        groups[label].append((axis, number))
    dims = []
    for label in order:
        items = groups[label]
        sizes = {len(a.values) for a, _ in items}
        if len(sizes) > 1:
            listed = ", ".join(f"{a.key} ({len(a.values)})" for a, _ in items)
            raise ConfigError(f"{path}: zip group {label!r}: axes must have equal lengths, "
                              f"got {listed}")
        dims.append(SweepDimension(tuple(a for a, _ in items),
                                   label if isinstance(label, str) else None))
    names = [d.name for d in dims] + [a.name for d in dims for a in d.axes[1:]]
    for name in names:
        if names.count(name) > 1:
            raise ConfigError(f"{path}: [sweep] two axes would share the table name {name!r}")
    return tuple(dims)


def _check_base(path, base: dict, keys: dict[str, list[str]], swept: list[str]) -> None:
    """Unknown sections/keys and non-scalar values are errors of the file; so is an invalid
    base configuration unless the problem involves a swept key (then the points report it)."""
    for section, table in base.items():
        if section not in keys:
            raise ConfigError(f"{path}: " + _suggest(section, [*keys, "sweep"], "section"))
        if not isinstance(table, dict):
            raise ConfigError(f"{path}: [{section}] must be a table of keys, got {short_repr(table)}")
        for key, value in table.items():
            if key not in keys[section]:
                raise ConfigError(f"{path}: " + _suggest(f"{section}.{key}",
                                                         [f"{section}.{k}" for k in keys[section]],
                                                         "key"))
            if _kind(value) is None:
                raise ConfigError(f"{path}: {section}.{key} = {short_repr(value)}: must be a "
                                  "number, string or boolean")
    try:
        ModelConfig.from_dict(base)
    except ConfigError as err:
        if not any(key in str(err) for key in swept):
            raise ConfigError(f"{path}: {err}") from None


def parse_sweep(data: dict, source: str | os.PathLike, folder: str | os.PathLike | None = None
                ) -> SweepSpec:
    """Validate parsed sweep-file data (see the module docstring); ``source`` names the file
    in errors and gives the default name; ``folder`` overrides ``[sweep] folder``."""
    path = Path(source)
    keys = config_keys()
    data = dict(data)
    sweep = data.pop("sweep", None)
    if sweep is None:
        raise ConfigError(f"{path}: no [sweep] section (a sweep file needs [sweep] with at "
                          "least one [[sweep.axis]])")
    if not isinstance(sweep, dict):
        raise ConfigError(f"{path}: [sweep] must be a table, got {short_repr(sweep)}")
    for key in sweep:
        if key not in SWEEP_KEYS:
            raise ConfigError(f"{path}: " + _suggest(f"sweep.{key}",
                                                     [f"sweep.{k}" for k in SWEEP_KEYS], "key"))
    name = sweep.get("name", path.stem)
    if not isinstance(name, str) or not _NAME.match(name):
        raise ConfigError(f"{path}: sweep.name = {short_repr(name)}: must be a name of letters, "
                          "digits, '.', '_' and '-' (it names files)")
    if folder is None:
        folder = sweep.get("folder", str(DEFAULT_PARENT / name))
        if not isinstance(folder, str) or not folder.strip():
            raise ConfigError(f"{path}: sweep.folder = {short_repr(folder)}: must be a folder name")
    dims = _dimensions(path, sweep.get("axis"), keys)
    _check_base(path, data, keys, [a.key for d in dims for a in d.axes])
    return SweepSpec(name=name, folder=Path(folder), base=data, dimensions=dims, source=path)


def load_sweep(path: str | os.PathLike, folder: str | os.PathLike | None = None) -> SweepSpec:
    """Read and validate a sweep file (see the module docstring).

    Parameters
    ----------
    path : path
        The sweep file (TOML).
    folder : path, optional
        Use this folder instead of the file's ``[sweep] folder``.

    Raises
    ------
    ConfigError
        One line naming the file and the key, if the file is malformed.
    """
    spec = parse_sweep(read_toml(path), path, folder)
    spec.points()  # duplicates are an error of the file
    return spec
