"""Run files written one snapshot (record) at a time, so a run's memory does not grow with
its number of outputs.

A file is started from a one-record template dataset (:func:`torrid.io.runfile.build_dataset`)
written by xarray with the CF rules of :mod:`torrid.io.cf` (:func:`cf_dataset`,
:func:`netcdf_encoding`) and an unlimited ``time`` dimension; later records are appended with
netCDF4 into the same variables, so they get the same encoding (compression, types).
:func:`merge_records` copies the records of several such files into one, record by record.
"""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import numpy as np
import xarray as xr

from torrid.io.atomic import signals_held
from torrid.io.cf import DAYS_COORDINATE, cf_dataset, netcdf_encoding


#: HDF5 chunk cache of each variable of a file written or read record by record (bytes and
#: slots). The library's default (64 MB and 1000 slots per variable) keeps every written
#: one-record chunk of a map: memory then grew with the number of snapshots (+64 MB per
#: map variable at T42 with 401 snapshots). One record at a time needs one chunk.
CHUNK_CACHE_BYTES = 2**21
CHUNK_CACHE_SLOTS = 61
#: Records per chunk of a number series (time, diagnostics); maps have one record a chunk.
SERIES_CHUNK = 512


def _open(path: str | os.PathLike, mode: str = "r"):
    """A netCDF4.Dataset with the small chunk cache of record-by-record access."""
    import netCDF4

    handle = netCDF4.Dataset(path, mode)
    for variable in handle.variables.values():
        variable.set_var_chunk_cache(size=CHUNK_CACHE_BYTES, nelems=CHUNK_CACHE_SLOTS,
                                     preemption=1.0)
    return handle


def start_record_file(path: str | os.PathLike, template: xr.Dataset, **options):
    """Write ``template`` (its records, usually one) to ``path`` with an unlimited time
    dimension; return the file opened for appending (a ``netCDF4.Dataset``). ``options``:
    ``compression_level`` and ``single_precision`` of :func:`netcdf_encoding`."""
    encoding = netcdf_encoding(template, **options)
    for name, variable in template.variables.items():  # number series: chunks of many records
        if variable.dims == ("time",):
            encoding.setdefault(name, {})["chunksizes"] = (SERIES_CHUNK,)
    with signals_held():
        cf_dataset(template).to_netcdf(path, engine="netcdf4", format="NETCDF4",
                                       encoding=encoding, unlimited_dims=["time"])
    return _open(path, "a")


def append_record(handle, index: int, time_days: float, values: dict) -> None:
    """Write record ``index`` (0 is the first) of an open record file: the time and every
    time-dependent variable in ``values`` (name -> map or number)."""
    handle.variables["time"][index] = time_days
    handle.variables[DAYS_COORDINATE][index] = time_days
    for name, value in values.items():
        variable = handle.variables.get(name)
        if variable is not None and variable.dimensions[:1] == ("time",):
            variable[index] = value


def record_count(path: str | os.PathLike) -> int:
    """Number of records (snapshots) in a record file."""
    with _open(path) as handle:
        return len(handle.dimensions["time"])


def read_scalar_series(path: str | os.PathLike, count: int | None = None
                       ) -> tuple[list[float], dict[str, list[float]]]:
    """Times (days) and every time series of numbers (not maps) of the first ``count``
    records (all if None)."""
    with _open(path) as handle:
        handle.set_auto_mask(False)
        end = len(handle.dimensions["time"]) if count is None else count
        times = [float(t) for t in handle.variables[DAYS_COORDINATE][:end]]
        series = {name: [float(v) for v in var[:end]]
                  for name, var in handle.variables.items()
                  if var.dimensions == ("time",) and name not in ("time", DAYS_COORDINATE)}
    return times, series


#: Encoding options the record files of a run's restart data are written with (those of
#: :func:`start_record_file` without options).
RECORD_FILE_OPTIONS = {"compression_level": 1, "single_precision": False}


def merge_records(sources: list[tuple[Path, int]], path: str | os.PathLike,
                  attrs: dict, **options) -> None:
    """Copy the first ``n`` records of each ``(file, n)`` in ``sources``, in order, into a new
    record file at ``path`` with global attributes ``attrs``; memory holds one record.
    ``options`` as in :func:`start_record_file` (the new file's compression and precision).

    When the first file has exactly its ``n`` records and ``options`` are
    :data:`RECORD_FILE_OPTIONS` (what the restart's files have), it is copied byte for byte
    and given ``attrs`` (with :func:`~torrid.io.cf.cf_dataset`'s Conventions and history):
    the same data as a record-by-record copy, without re-encoding them (a run with one
    restart segment, as a short sweep point has, is then copied, not rewritten).
    """
    first, count = sources[0]
    if dict(RECORD_FILE_OPTIONS, **options) == RECORD_FILE_OPTIONS \
            and record_count(first) == count:
        shutil.copyfile(first, path)
        with signals_held(), _open(path, "a") as out:
            for name in out.ncattrs():
                out.delncattr(name)
            for name, value in cf_dataset(xr.Dataset(attrs=attrs)).attrs.items():
                out.setncattr(name, value)
            _copy_records(sources[1:], out, count)
        return
    with xr.open_dataset(first, engine="netcdf4", decode_times=False,
                         mask_and_scale=False) as ds:
        template = ds.isel(time=[0]).load()
    for name in template.variables:
        template[name].encoding = {}
    template.attrs = {key: value for key, value in attrs.items()}
    with start_record_file(path, template, **options) as out:
        _copy_records(sources, out, 0)


def _copy_records(sources: list[tuple[Path, int]], out, index: int) -> None:
    """Append the first ``n`` records of each ``(file, n)`` to the open record file ``out``
    from its record ``index`` on: number series at once, maps one record at a time."""
    for source, count in sources:
        with _open(source) as handle:
            handle.set_auto_mask(False)
            series = [name for name, var in handle.variables.items()
                      if var.dimensions == ("time",)]
            maps = [name for name, var in handle.variables.items()
                    if var.dimensions[:1] == ("time",) and name not in series]
            for name in series:
                out.variables[name][index:index + count] = handle.variables[name][:count]
            for record in range(count):
                for name in maps:
                    out.variables[name][index + record] = handle.variables[name][record]
            index += count


def is_time_dependent(template: xr.Dataset, name: str) -> bool:
    """True if variable ``name`` of a run dataset has a time dimension."""
    return "time" in template[name].dims


def as_number(value) -> float | np.ndarray:
    """A 0-d array as a float, anything else unchanged."""
    return float(value) if np.ndim(value) == 0 else value
