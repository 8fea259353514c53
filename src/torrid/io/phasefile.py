"""Writing phase-curve datasets: netCDF (as run files) and CSV, both atomically."""

from __future__ import annotations

import os
from pathlib import Path

import xarray as xr

from torrid.io.atomic import atomic_path
from torrid.io.runfile import check_writable, write_atomic

#: the curve's columns in a CSV file (variables over phase)
CURVE_VARIABLES = ("flux_ratio", "brightness_temperature", "sub_observer_longitude", "time")


def write_phase_netcdf(ds: xr.Dataset, path: str | os.PathLike, overwrite: bool = False) -> Path:
    """Write a phase-curve dataset to netCDF4 (temporary name, then rename)."""
    return write_atomic(ds, path, overwrite=overwrite)


def write_phase_csv(ds: xr.Dataset, path: str | os.PathLike, overwrite: bool = False) -> Path:
    """Write a phase-curve dataset as CSV: '#' lines with the headline numbers and settings,
    then one row per phase (and sweep point) with columns named ``<variable>_<units>``.

    Headline numbers over sweep dims become columns too.
    """
    path = check_writable(path, overwrite)
    lines = [f"# {ds.attrs.get('title', 'torrid phase curve')}"]
    columns = [v for v in CURVE_VARIABLES if v in ds]
    for name, var in ds.data_vars.items():
        if var.ndim == 0:
            lines.append(f"# {name} = {float(var):.10g} {var.attrs.get('units', '')}".rstrip())
        elif name not in columns:
            columns.append(name)
    for key in ("band", "weighting", "night_temperature_K", "day_temperature_K", "inclination_deg",
                "radius_ratio", "star_temperature_K", "map_source", "source"):
        if key in ds.attrs:
            lines.append(f"# {key}: {ds.attrs[key]}")
    frame = ds[columns].to_dataframe()
    frame.columns = [f"{c}_{ds[c].attrs.get('units', '1')}".replace(" ", "") for c in columns]
    with atomic_path(path) as tmp, open(tmp, "w", encoding="utf-8", newline="") as handle:
        handle.write("\n".join(lines) + "\n")
        frame.to_csv(handle, float_format="%.10g")
    return path
