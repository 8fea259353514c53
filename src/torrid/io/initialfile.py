"""Initial fields from a file: h, u, v (and optionally surface_height) on a lon-lat grid.

Any netCDF file with variables ``h`` (m), ``u``, ``v`` (m s-1) on dimensions (lat, lon), or
(time, lat, lon) of which the last time is used, and 1-D coordinates ``lat`` (degrees_north)
and ``lon`` (degrees_east) will do, on any regular or irregular grid: a torrid run file (to
continue on another resolution), or fields made elsewhere. The model fits them onto its own
spherical harmonics (:func:`torrid.physics.regrid.fit_state`).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from torrid.io.config import ConfigError
from torrid.io.runfile import load_netcdf


@dataclass(frozen=True, eq=False)
class InitialFields:
    """Fields on the file's grid (degrees, metres, m s^-1)."""

    lat_deg: np.ndarray
    lon_deg: np.ndarray
    h_m: np.ndarray
    u: np.ndarray
    v: np.ndarray
    surface_height_m: np.ndarray | None


def read_initial_fields(path: str | os.PathLike) -> InitialFields:
    """Read initial fields (format in the module docstring); one-line ConfigError naming the
    file if it is missing, unreadable or lacks what is needed."""
    path = Path(path)
    ds = load_netcdf(path, "file of initial fields (run.initial_fields)", ConfigError)
    missing = [n for n in ("h", "u", "v", "lat", "lon") if n not in ds.variables]
    if missing:
        raise ConfigError(f"{path}: initial fields need h, u, v on lat, lon (missing "
                          f"{', '.join(missing)})")
    fields = {}
    for name in ("h", "u", "v", "surface_height"):
        if name not in ds:
            continue
        var = ds[name]
        if "time" in var.dims:
            var = var.isel(time=-1)
        if set(var.dims) != {"lat", "lon"}:
            raise ConfigError(f"{path}: {name} has dimensions {var.dims}: must be (lat, lon) "
                              "or (time, lat, lon)")
        fields[name] = np.asarray(var.transpose("lat", "lon").values, dtype=float)
    return InitialFields(lat_deg=np.asarray(ds["lat"].values, float),
                         lon_deg=np.asarray(ds["lon"].values, float), h_m=fields["h"],
                         u=fields["u"], v=fields["v"],
                         surface_height_m=fields.get("surface_height"))
