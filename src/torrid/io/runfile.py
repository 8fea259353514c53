"""Run files: one netCDF4 file per run, CF-1.10 metadata from :mod:`torrid.io.variables`.

Files are written atomically: to a temporary name in the destination folder, then renamed, so a
reader never sees a half-written file under the final name. Nothing is replaced unless asked.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np
import xarray as xr

from torrid.io.atomic import atomic_path, signals_held
from torrid.io.cf import DAYS_COORDINATE, cf_dataset, netcdf_encoding
from torrid.io.variables import COORDINATES, VARIABLES


class OutputExistsError(FileExistsError):
    """The output file exists and overwriting was not asked for."""


def check_writable(path: str | os.PathLike, overwrite: bool) -> Path:
    """Refuse an existing ``path`` unless ``overwrite``; make its folder. Returns the Path."""
    path = Path(path)
    if path.exists() and not overwrite:
        raise OutputExistsError(f"{path} exists: choose another name or pass --overwrite")
    path.parent.mkdir(parents=True, exist_ok=True)
    return path


def refuse_existing(paths, overwrite: bool) -> None:
    """Check, before any work, that none of ``paths`` (None entries skipped) exists unless
    ``overwrite``; make their folders."""
    for path in paths:
        if path is not None:
            check_writable(path, overwrite)


def build_dataset(times_days, latitude_deg, longitude_deg, series: dict[str, list],
                  static: dict[str, np.ndarray], attrs: dict) -> xr.Dataset:
    """Assemble a run dataset; every variable gets its attributes from the table.

    Parameters
    ----------
    times_days : sequence of float
        Output times (days since start).
    latitude_deg, longitude_deg : ndarray
        Ascending latitudes (degrees_north) and longitudes in [-180, 180) (degrees_east).
    series : dict
        Variable name -> list over time of arrays (maps (lat, lon) or scalars).
    static : dict
        Variable name -> time-independent array (lat, lon).
    attrs : dict
        Global attributes.
    """
    times_days = np.asarray(times_days, float)
    coords = {"time": times_days, DAYS_COORDINATE: ("time", times_days), "lat": latitude_deg,
              "lon": longitude_deg}
    data = {}
    for name, values in {**{k: np.stack(v) for k, v in series.items()}, **static}.items():
        var = VARIABLES[name]
        data[name] = xr.Variable(var.dims, np.asarray(values, dtype=np.float64), var.attrs())
    ds = xr.Dataset(data, coords=coords, attrs={"Conventions": "CF-1.10", **attrs})
    for name, var in COORDINATES.items():
        ds[name].attrs.update(var.attrs())
    ds["time"].attrs["axis"] = "T"
    return ds


def file_options(config) -> dict:
    """A run file's compression level and precision (the ``run.output_*`` keys of a
    ``ModelConfig``), as keyword arguments of :func:`write_atomic` and the record files."""
    return {"compression_level": config.run.output_compression_level,
            "single_precision": config.run.output_precision == "single"}


def write_atomic(ds: xr.Dataset, path: str | os.PathLike, overwrite: bool = False, *,
                 compression_level: int = 1, single_precision: bool = False) -> Path:
    """Write ``ds`` to netCDF4 at ``path`` via a temporary file in the same folder, by the CF
    rules of :mod:`torrid.io.cf` (``compression_level``, ``single_precision``: see
    :func:`torrid.io.cf.netcdf_encoding`)."""
    path = check_writable(path, overwrite)
    with atomic_path(path) as tmp, signals_held():
        cf_dataset(ds).to_netcdf(tmp, engine="netcdf4", format="NETCDF4",
                                 encoding=netcdf_encoding(ds, compression_level,
                                                          single_precision))
    return path


class RunFileError(ValueError):
    """A file given as a run file is missing, unreadable or not a torrid run file."""


def load_netcdf(path: str | os.PathLike, what: str, error: type[Exception]) -> xr.Dataset:
    """Open a netCDF file fully into memory; a missing or unreadable file raises ``error``
    with one line naming the file and ``what`` it should have been."""
    path = Path(path)
    if not path.is_file():
        raise error(f"{path}: no such {what}")
    try:
        with xr.open_dataset(path, engine="netcdf4", decode_times=False) as ds:
            return ds.load()
    except Exception as err:  # noqa: BLE001 - any reader failure means the same to the user
        raise error(f"{path}: not a readable netCDF {what} ({type(err).__name__})") from None


def open_run(path: str | os.PathLike) -> xr.Dataset:
    """Open a run file lazily (times in days, as :func:`read_run`): variables are read when
    used, so a reader of the last snapshot does not load the series."""
    return xr.open_dataset(path, engine="netcdf4", decode_times=False)


def is_planet_run(ds: xr.Dataset) -> bool:
    """True for the run file of a forced hot-planet run (``case = "planet"``, written from
    :attr:`torrid.io.config.ModelConfig.is_planet`), False for a standard case."""
    return ds.attrs.get("case") == "planet"


def read_run(path: str | os.PathLike, lazy: bool = False) -> xr.Dataset:
    """Open a run file fully into memory (the file is closed afterwards), or ``lazy``: open
    it so that only the variables and snapshots used are read (``torrid phase`` and
    ``torrid plot`` read the final map, not the series).

    Raises
    ------
    RunFileError
        One line naming the file if it is missing, unreadable, lacks the run variables or
        has them on other dimensions than (time, lat, lon).
    """
    if lazy:
        path = Path(path)
        if not path.is_file():
            raise RunFileError(f"{path}: no such run file")
        try:
            ds = open_run(path)
        except Exception as err:  # noqa: BLE001 - any reader failure means the same
            raise RunFileError(f"{path}: not a readable netCDF run file "
                               f"({type(err).__name__})") from None
    else:
        ds = load_netcdf(path, "run file", RunFileError)
    missing = [name for name in ("h", "u", "v") if name not in ds]
    if missing:
        raise RunFileError(f"{path}: not a torrid run file (missing {', '.join(missing)})")
    for name in ("h", "u", "v"):
        if ds[name].dims != VARIABLES[name].dims:
            raise RunFileError(f"{path}: not a torrid run file ({name} is on "
                               f"({', '.join(ds[name].dims)}), not "
                               f"({', '.join(VARIABLES[name].dims)}): were dimensions "
                               "renamed?)")
    return ds
