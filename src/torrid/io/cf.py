"""The CF-1.10 rules every netCDF file torrid writes follows (run files, phase curves, sweep
tables, fit files): one place, called by :func:`torrid.io.runfile.write_atomic`.

Rules (Eaton et al., NetCDF Climate and Forecast Metadata Conventions 1.10, 2022):

* coordinate variables carry no ``_FillValue`` (section 2.5.1: they must not have missing
  values); data variables are compressed (zlib level 1);
* a global ``history`` attribute (section 2.6.2) records when and by which torrid version the
  file was written (appended to any history the dataset already has);
* the time coordinate has units with an epoch (section 4.4).

The epoch. A run has no calendar date, only simulated days since its start. CF needs
``<unit> since <epoch>``, so day 0 (the start of the run) is placed at the nominal epoch
:data:`EPOCH`, 2000-01-01 00:00:00, in the ``proleptic_gregorian`` calendar. That pair is
what numpy's ``datetime64`` uses, so ``xarray.open_dataset`` decodes ``time`` to plain
datetimes on any xarray version (no cftime objects, no out-of-range dates), and
``time - time[0]`` is the simulated time. Beside it every run file has the numeric
coordinate ``time_days`` (simulated days since the start, along ``time``), so days stay a
number whichever way the file is opened: ``ds.time_days``, or ``ds.swap_dims(time="time_days")``
to select by day. torrid's own readers open files with ``decode_times=False``, so ``time``
holds days there as in the dataset :func:`torrid.run` returns.
"""

from __future__ import annotations

import datetime as _dt

import numpy as np
import xarray as xr

from torrid.meta import __version__

#: The nominal date of day 0 of every run and its calendar (see the module docstring).
EPOCH = "2000-01-01 00:00:00"
CALENDAR = "proleptic_gregorian"
TIME_UNITS = f"days since {EPOCH}"
#: The numeric coordinate of simulated days beside ``time``.
DAYS_COORDINATE = "time_days"
#: Compression of data variables: zlib after the shuffle filter (byte-wise transposition,
#: which groups the slowly varying exponent bytes of neighbouring values), level 1.
COMPRESSION = {"zlib": True, "shuffle": True, "complevel": 1}


def netcdf_encoding(ds: xr.Dataset, compression_level: int = 1,
                    single_precision: bool = False) -> dict[str, dict]:
    """The ``encoding`` argument of ``to_netcdf`` for ``ds``: no ``_FillValue`` on any
    coordinate, compression of data variables (zlib level ``compression_level`` with shuffle;
    0: none) and, if ``single_precision``, float32 storage of the double-precision maps (the
    data variables on a latitude-longitude grid)."""
    out: dict[str, dict] = {name: {"_FillValue": None} for name in ds.coords}
    for name, var in ds.data_vars.items():
        encoding = (dict(COMPRESSION, complevel=int(compression_level)) if compression_level
                    else {"zlib": False})
        if single_precision and var.dtype == np.float64 and {"lat", "lon"} <= set(var.dims):
            encoding["dtype"] = "float32"
        out[name] = encoding
    return out


def history_line(ds: xr.Dataset) -> str:
    """One ``history`` entry: UTC time, the torrid version and the file's title."""
    now = _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat()
    title = ds.attrs.get("title", "file")
    return f"{now}: {title}, written by torrid {__version__}"


def cf_dataset(ds: xr.Dataset) -> xr.Dataset:
    """A shallow copy of ``ds`` with the global attributes CF asks for: ``Conventions`` and
    a ``history`` entry appended for this write."""
    out = ds.copy(deep=False)
    attrs = dict(ds.attrs)
    attrs.setdefault("Conventions", "CF-1.10")
    previous = str(attrs.get("history", "")).strip()
    attrs["history"] = (previous + "\n" if previous else "") + history_line(ds)
    out.attrs = attrs
    return out


def time_days(ds: xr.Dataset | xr.DataArray) -> np.ndarray:
    """Simulated days since the start of the run, of a run dataset's ``time`` axis however
    it was opened: :data:`DAYS_COORDINATE` if present, else ``time`` itself (numbers in days,
    or datetimes counted from :data:`EPOCH`)."""
    if DAYS_COORDINATE in ds.coords:
        return np.asarray(ds[DAYS_COORDINATE].values, dtype=float)
    values = np.asarray(ds["time"].values)
    if np.issubdtype(values.dtype, np.datetime64):
        return (values - np.datetime64(EPOCH.replace(" ", "T"))) / np.timedelta64(1, "D")
    return values.astype(float)
