"""Plots of run files (matplotlib, no screen needed: the Agg backend writes PNG files)."""

from __future__ import annotations

import os
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import xarray as xr  # noqa: E402

from torrid.io.runfile import check_writable  # noqa: E402


def save_figure(fig, path: str | os.PathLike, overwrite: bool = False) -> Path:
    """Save ``fig`` as PNG atomically (temporary name, then rename) and close it."""
    path = check_writable(path, overwrite)
    tmp = path.with_name(f".{path.name}.tmp.png")
    try:
        fig.savefig(tmp, dpi=120, bbox_inches="tight")
        os.replace(tmp, path)
    finally:
        tmp.unlink(missing_ok=True)
        plt.close(fig)
    return path


def plot_map(ds: xr.Dataset, variable: str, time_days: float | None = None,
             path: str | os.PathLike | None = None, overwrite: bool = False):
    """Lon-lat map of one variable of a run dataset at the output time nearest ``time_days``.

    Parameters
    ----------
    ds : xarray.Dataset
        A run dataset (``torrid.run`` or ``xarray.open_dataset`` of a run file).
    variable : str
        A (time, lat, lon) variable, e.g. ``"vorticity"`` or ``"h"``.
    time_days : float, optional
        Simulated day to show; the last output if omitted.
    path : path, optional
        PNG file to write; the figure is returned if omitted.
    """
    if variable not in ds:
        raise ValueError(f"variable {variable!r} not in the run file; "
                         f"available: {', '.join(n for n in ds.data_vars if 'lat' in ds[n].dims)}")
    field = ds[variable]
    if "time" in field.dims:
        field = field.isel(time=-1) if time_days is None else field.sel(time=time_days,
                                                                         method="nearest")
    fig, ax = plt.subplots(figsize=(10, 4.8))
    values = field.values
    limit = float(np.nanmax(np.abs(values)))
    diverging = float(np.nanmin(values)) < 0 < float(np.nanmax(values))
    mesh = ax.pcolormesh(ds["lon"], ds["lat"], values, shading="auto",
                         cmap="RdBu_r" if diverging else "viridis",
                         vmin=-limit if diverging else None, vmax=limit if diverging else None)
    units = field.attrs.get("units", "")
    fig.colorbar(mesh, ax=ax, label=f"{field.attrs.get('long_name', variable)} ({units})")
    when = f", day {float(field['time']):g}" if "time" in field.coords else ""
    ax.set_title(f"{ds.attrs.get('title', 'torrid run')}{when}")
    ax.set_xlabel("longitude (degrees east)")
    ax.set_ylabel("latitude (degrees north)")
    ax.set_aspect("equal")
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)
