"""The model of a parameter sweep: its axes, dimensions and points (read from a sweep file by
:mod:`torrid.io.sweepfile`).

A sweep is a base configuration (plain data) and dimensions; a dimension is one axis, or the
axes of a zip group, which advance together. Its points are every combination of the
dimensions' values (C order); each point's configuration is validated when the points are
generated, and a point whose configuration is invalid carries the error instead.
"""

from __future__ import annotations

import copy
import itertools
from dataclasses import dataclass
from pathlib import Path

from torrid.io.config import ConfigError, ModelConfig
from torrid.io.pointfile import config_identifier, point_file_name
from torrid.io.settings import SECTIONS, section_settings


def config_keys() -> dict[str, list[str]]:
    """The sections of a run configuration and the keys of each (the settings table)."""
    return {section: [s.name for s in section_settings(section)] for section in SECTIONS}


@dataclass(frozen=True)
class SweepAxis:
    """One swept configuration key and its values.

    Attributes
    ----------
    key : str
        ``section.name`` of the configuration key.
    values : tuple
        The values, in order (numbers, strings or booleans).
    spacing : str
        ``log`` (from ``log_range``), ``linear`` (from ``range``) or ``values``.
    """

    key: str
    values: tuple
    spacing: str

    @property
    def name(self) -> str:
        """The key after the dot (the dimension or coordinate name in the sweep table)."""
        return self.key.partition(".")[2]


@dataclass(frozen=True)
class SweepDimension:
    """Axes that advance together (one axis, or a zip group); named after the first."""

    axes: tuple[SweepAxis, ...]
    zip: str | None = None

    @property
    def name(self) -> str:
        """Dimension name: the first axis's key after the dot."""
        return self.axes[0].name

    @property
    def size(self) -> int:
        """Number of values along the dimension."""
        return len(self.axes[0].values)


@dataclass(frozen=True, eq=False)
class SweepPoint:
    """One point of a sweep.

    Attributes
    ----------
    index : tuple of int
        Position along each dimension of the sweep.
    parameters : dict
        Swept key (``section.name``) -> value at this point.
    data : dict
        The point's configuration as plain data (base plus the swept values).
    config : ModelConfig or None
        The validated configuration; None if it does not validate.
    error : str or None
        The validation error (one line) when ``config`` is None.
    identifier : str
        Stable identifier of the configuration (:func:`torrid.io.pointfile.config_identifier`).
    """

    index: tuple[int, ...]
    parameters: dict
    data: dict
    config: ModelConfig | None
    error: str | None
    identifier: str

    @property
    def file_name(self) -> str:
        """The point's file name in the sweep folder."""
        return point_file_name(self.identifier)


@dataclass(frozen=True)
class SweepSpec:
    """A validated sweep: base configuration, dimensions, name and folder.

    Attributes
    ----------
    name : str
        Sweep name (the table is ``<folder>/<name>-table.nc``).
    folder : Path
        Folder of the point files (relative paths are relative to the current folder).
    base : dict
        Base configuration as plain data (the run-file sections of the sweep file).
    dimensions : tuple of SweepDimension
        The dimensions, in the order of their first axis in the file.
    source : Path or None
        The sweep file.
    """

    name: str
    folder: Path
    base: dict
    dimensions: tuple[SweepDimension, ...]
    source: Path | None = None

    @property
    def shape(self) -> tuple[int, ...]:
        """Number of values along each dimension."""
        return tuple(d.size for d in self.dimensions)

    @property
    def axes(self) -> list[SweepAxis]:
        """All axes, dimension by dimension."""
        return [a for d in self.dimensions for a in d.axes]

    def points(self) -> list[SweepPoint]:
        """Every point (C order over the dimensions), each configuration validated."""
        points, seen = [], {}
        for index in itertools.product(*(range(d.size) for d in self.dimensions)):
            data = copy.deepcopy(self.base)
            parameters = {}
            for dim, i in zip(self.dimensions, index):
                for axis in dim.axes:
                    section, _, key = axis.key.partition(".")
                    data.setdefault(section, {})[key] = axis.values[i]
                    parameters[axis.key] = axis.values[i]
            try:
                config, error = ModelConfig.from_dict(data), None
                identifier = config_identifier(config.to_dict())
            except ConfigError as err:
                config, error = None, str(err)
                identifier = config_identifier(data)
            if identifier in seen:
                raise ConfigError(f"{self.source or 'sweep'}: [sweep] axes give the same "
                                  f"configuration twice ({_describe(seen[identifier])} and "
                                  f"{_describe(parameters)}): remove duplicate values")
            seen[identifier] = parameters
            points.append(SweepPoint(index, parameters, data, config, error, identifier))
        return points


def _describe(parameters: dict) -> str:
    return ", ".join(f"{k} = {v!r}" for k, v in parameters.items())
