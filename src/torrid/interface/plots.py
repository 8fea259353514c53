"""Plots of run files (matplotlib, no screen needed: the Agg backend writes PNG files)."""

from __future__ import annotations

import os
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import xarray as xr  # noqa: E402

from torrid.io.atomic import atomic_path  # noqa: E402
from torrid.io.runfile import check_writable  # noqa: E402


def save_figure(fig, path: str | os.PathLike, overwrite: bool = False) -> Path:
    """Save ``fig`` as PNG atomically (temporary name, then rename) and close it."""
    path = check_writable(path, overwrite)
    try:
        with atomic_path(path, suffix=".tmp.png") as tmp:
            fig.savefig(tmp, dpi=120, bbox_inches="tight")
    finally:
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


def plot_planet_map(ds: xr.Dataset, path: str | os.PathLike | None = None,
                    overwrite: bool = False, time_days: float | None = None):
    """Thickness map of a planet run centred on the substellar point, with wind arrows.

    Arrow length scales with wind speed (key arrow in the corner); the substellar point (star)
    and the equatorial hotspot (cross) are marked; the zonal-mean zonal wind is drawn beside
    the map. Uses the last output unless ``time_days`` is given.
    """
    snap = ds.isel(time=-1) if time_days is None else ds.sel(time=time_days, method="nearest")
    lon_sub = float(snap["substellar_longitude"]) if "substellar_longitude" in snap else 0.0
    # recentre on the substellar point: longitude relative to it, in [-180, 180)
    rel = (ds["lon"].values - lon_sub + 180.0) % 360.0 - 180.0
    order = np.argsort(rel)
    rel = rel[order]
    h = snap["h"].values[:, order] / 1e3
    u = snap["u"].values[:, order]
    v = snap["v"].values[:, order]
    lat = ds["lat"].values
    fig, (ax, side) = plt.subplots(1, 2, figsize=(12, 4.8), width_ratios=[4, 1],
                                   constrained_layout=True)
    mesh = ax.pcolormesh(rel, lat, h, shading="auto", cmap="inferno")
    fig.colorbar(mesh, ax=ax, label="layer thickness h (km)", pad=0.01)
    step_lat = max(1, len(lat) // 16)
    step_lon = max(1, len(rel) // 24)
    speed_max = float(np.sqrt(u**2 + v**2).max()) or 1.0
    arrows = ax.quiver(rel[::step_lon], lat[::step_lat], u[::step_lat, ::step_lon],
                       v[::step_lat, ::step_lon], color="white", scale=speed_max * 20,
                       width=0.0025)
    key = float(f"{speed_max:.1g}")
    ax.quiverkey(arrows, 0.88, 1.04, key, f"{key / 1e3:g} km/s", labelpos="E", color="black")
    ax.plot(0, 0, marker="*", ms=14, color="gold", mec="black", ls="none",
            label="substellar point")
    if np.isfinite(float(snap["hotspot_offset"])):
        ax.plot(float(snap["hotspot_offset"]), 0, marker="X", ms=10, color="cyan",
                mec="black", ls="none", label=f"hotspot ({float(snap['hotspot_offset']):+.0f} deg)")
    ax.legend(loc="lower left", fontsize=8, framealpha=0.8)
    ax.set_xlim(-180, 180)
    ax.set_ylim(-90, 90)
    ax.set_xlabel("longitude east of the substellar point (degrees)")
    ax.set_ylabel("latitude (degrees north)")
    ax.set_title(f"{ds.attrs.get('title', 'torrid run')}, day {float(snap['time']):g}")
    side.plot(u.mean(axis=1) / 1e3, lat, color="tab:red")
    side.axvline(0, color="grey", lw=0.8)
    side.set_ylim(-90, 90)
    side.set_xlabel("zonal-mean u (km/s)")
    side.set_title("zonal-mean zonal wind")
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def plot_spinup(ds: xr.Dataset, path: str | os.PathLike | None = None, overwrite: bool = False):
    """Time series of a planet run's diagnostics during spin-up (energy, winds, hotspot)."""
    panels = [("kinetic_energy", "kinetic energy (m3 s-2)", 1.0),
              ("equatorial_zonal_wind", "equatorial zonal-mean wind (km/s)", 1e-3),
              ("max_wind_speed", "maximum wind speed (km/s)", 1e-3),
              ("hotspot_offset_harmonic", "hotspot offset, first harmonic (deg)", 1.0),
              ("day_night_contrast", "day-night contrast", 1.0)]
    panels = [p for p in panels if p[0] in ds]
    if not panels:
        raise ValueError("the run file has no planet diagnostics to plot (a standard case?)")
    fig, axes = plt.subplots(len(panels), 1, figsize=(7, 1.8 * len(panels)), sharex=True,
                             constrained_layout=True)
    for ax, (name, label, factor) in zip(np.atleast_1d(axes), panels):
        ax.plot(ds["time"], ds[name] * factor, color="tab:blue")
        ax.set_title(label, fontsize=9, loc="left")
        if ds.attrs.get("steady_state_reached"):
            ax.axvline(ds.attrs["steady_state_time_days"], color="grey", ls="--", lw=0.8)
    np.atleast_1d(axes)[-1].set_xlabel("simulated time (days)")
    fig.suptitle("spin-up diagnostics" + (" (dashed: steady state reached)"
                                          if ds.attrs.get("steady_state_reached") else ""))
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)
