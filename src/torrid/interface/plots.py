"""Plots of run files (matplotlib, no screen needed: the Agg backend writes PNG files)."""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np
import xarray as xr

from torrid.interface.axes_style import colour_limits, figure_style, plt
from torrid.interface.headline import hotspot_phrase, window_phrase
from torrid.interface.temperature_view import (check_quantity, contrast_in_kelvin,
                                               equilibrium_range, temperature_note,
                                               to_temperature)
from torrid.io.atomic import atomic_path
from torrid.io.cf import time_days as time_days_of
from torrid.io.runfile import check_writable


def save_figure(fig, path: str | os.PathLike, overwrite: bool = False) -> Path:
    """Save ``fig`` as PNG atomically (temporary name, then rename) and close it."""
    path = check_writable(path, overwrite)
    try:
        with atomic_path(path, suffix=".tmp.png") as tmp:
            fig.savefig(tmp, dpi=120, bbox_inches="tight")
    finally:
        plt.close(fig)
    return path


def _snapshot_index(ds: xr.Dataset, time_days: float | None) -> int:
    """Index of the output nearest ``time_days`` (the last if None)."""
    if time_days is None:
        return -1
    return int(np.argmin(np.abs(time_days_of(ds) - time_days)))


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
    when = ""
    if "time" in field.dims:
        index = _snapshot_index(ds, time_days)
        field = field.isel(time=index)
        when = f", day {time_days_of(ds)[index]:g}"
    with figure_style():
        fig, ax = plt.subplots(figsize=(10, 4.8), layout="constrained")
        values = field.values
        limit = float(np.nanmax(np.abs(values)))
        diverging = float(np.nanmin(values)) < 0 < float(np.nanmax(values))
        mesh = ax.pcolormesh(ds["lon"], ds["lat"], values, shading="auto",
                             cmap="RdBu_r" if diverging else "viridis",
                             vmin=-limit if diverging else None,
                             vmax=limit if diverging else None)
        units = field.attrs.get("units", "")
        fig.colorbar(mesh, ax=ax, label=f"{field.attrs.get('long_name', variable)} ({units})")
        ax.set_title(f"{ds.attrs.get('title', 'torrid run')}{when}")
        ax.set_xlabel("longitude (degrees east)")
        ax.set_ylabel("latitude (degrees north)")
        ax.set_aspect("equal")
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def _hotspot_mark(ds: xr.Dataset, snap: xr.Dataset, time_days: float | None):
    """(offset or NaN, legend text) of the hotspot mark: the final value (window mean) that
    the headline prints, or the snapshot's own value when a day is chosen."""
    if time_days is None and "final_hotspot_offset" in ds.attrs:
        offset = float(ds.attrs["final_hotspot_offset"])
        return offset, hotspot_phrase(ds.attrs, with_harmonic=False)
    offset = float(snap["hotspot_offset"]) if "hotspot_offset" in snap else np.nan
    if np.isfinite(offset):
        return offset, f"hotspot {offset:+.1f} deg (equatorial maximum, this snapshot)"
    return offset, "hotspot undefined (this snapshot is too flat)"


def plot_planet_map(ds: xr.Dataset, path: str | os.PathLike | None = None,
                    overwrite: bool = False, time_days: float | None = None, *,
                    quantity: str = "thickness", settings=None):
    """Map of a planet run centred on the substellar point, with wind arrows.

    Arrow length scales with wind speed (key arrow in the corner); the substellar point (star)
    and the hotspot (cross) are marked; the zonal-mean zonal wind is drawn beside the map.
    The map is the last output unless ``time_days`` is given; the hotspot mark and its legend
    are then the run's final hotspot offset (the window mean, as the printed headline says),
    or the chosen snapshot's own. Where the hotspot is undefined (the map too flat) there is
    no mark and the legend says why. The colour scale spans at least 2 % of the equilibrium's
    range, so a featureless map looks featureless.

    Parameters
    ----------
    ds : xarray.Dataset
        A planet run dataset.
    path : path, optional
        PNG file to write; the figure is returned if omitted.
    overwrite : bool
        Replace an existing image.
    time_days : float, optional
        Simulated day to show (nearest output).
    quantity : str
        ``thickness`` (h, km) or ``temperature`` (K, by the phase curves' map).
    settings : ObserverSettings, optional
        The temperature map's end points (default: derived from the default star).
    """
    check_quantity(quantity)
    index = _snapshot_index(ds, time_days)
    snap = ds.isel(time=index)
    day = float(time_days_of(ds)[index])
    lon_sub = float(snap["substellar_longitude"]) if "substellar_longitude" in snap else 0.0
    # recentre on the substellar point: longitude relative to it, in [-180, 180)
    rel = (ds["lon"].values - lon_sub + 180.0) % 360.0 - 180.0
    order = np.argsort(rel)
    rel = rel[order]
    low, high = equilibrium_range(ds)
    h = snap["h"].values[:, order]
    if quantity == "temperature":
        field, label = to_temperature(h, low, high, settings), "temperature (K)"
        span = float(np.ptp(to_temperature(np.array([low, high]), low, high, settings)))
    else:
        field, label, span = h / 1e3, "layer thickness h (km)", (high - low) / 1e3
    u = snap["u"].values[:, order]
    v = snap["v"].values[:, order]
    lat = ds["lat"].values
    with figure_style():
        fig, (ax, side) = plt.subplots(1, 2, figsize=(12, 4.8), width_ratios=[4, 1],
                                       layout="constrained")
        vmin, vmax = colour_limits(field, span)
        mesh = ax.pcolormesh(rel, lat, field, shading="auto", cmap="inferno", vmin=vmin,
                             vmax=vmax)
        fig.colorbar(mesh, ax=ax, label=label, pad=0.01)
        step_lat = max(1, len(lat) // 16)
        step_lon = max(1, len(rel) // 24)
        speed_max = float(np.sqrt(u**2 + v**2).max()) or 1.0
        arrows = ax.quiver(rel[::step_lon], lat[::step_lat], u[::step_lat, ::step_lon],
                           v[::step_lat, ::step_lon], color="white", scale=speed_max * 20,
                           width=0.0025)
        key = float(f"{speed_max:.1g}")
        ax.quiverkey(arrows, 0.86, -0.11, key, f"wind {key / 1e3:g} km/s", labelpos="E",
                     color="black")
        ax.plot(0, 0, marker="*", ms=14, color="gold", mec="black", ls="none",
                label="substellar point")
        offset, text = _hotspot_mark(ds, snap, time_days)
        if np.isfinite(offset):
            ax.plot(offset, 0, marker="X", ms=10, color="cyan", mec="black", ls="none",
                    label=text)
        else:
            ax.plot([], [], ls="none", label=text)
        ax.legend(loc="lower left", fontsize=8, framealpha=0.8)
        ax.set_xlim(-180, 180)
        ax.set_ylim(-90, 90)
        ax.set_xlabel("longitude east of the substellar point (degrees)")
        ax.set_ylabel("latitude (degrees north)")
        ax.set_title(f"{ds.attrs.get('title', 'torrid run')}, day {day:g}"
                     + (f"\n{temperature_note(settings)}" if quantity == "temperature" else ""),
                     fontsize=10)
        side.plot(u.mean(axis=1) / 1e3, lat, color="tab:red")
        side.axvline(0, color="grey", lw=0.8)
        side.set_ylim(-90, 90)
        side.set_xlabel("zonal-mean u (km/s)")
        side.set_title("zonal-mean zonal wind")
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def plot_spinup(ds: xr.Dataset, path: str | os.PathLike | None = None, overwrite: bool = False,
                *, quantity: str = "thickness", settings=None):
    """Time series of a planet run's diagnostics during spin-up (energy, winds, hotspot,
    contrast; ``quantity="temperature"`` draws the contrast as a day-night temperature
    difference in K). The averaging window of the final values is shaded."""
    check_quantity(quantity)
    contrast = (("day_night_contrast", "day-night contrast", 1.0) if quantity == "thickness"
                else ("day_night_contrast", "day-night temperature difference (K)", None))
    panels = [("kinetic_energy", "kinetic energy (m3 s-2)", 1.0),
              ("equatorial_zonal_wind", "equatorial zonal-mean wind (km/s)", 1e-3),
              ("max_wind_speed", "maximum wind speed (km/s)", 1e-3),
              ("hotspot_offset_harmonic", "hotspot offset, first harmonic (deg; gaps: "
                                          "undefined)", 1.0),
              contrast]
    panels = [p for p in panels if p[0] in ds]
    if not panels:
        raise ValueError("the run file has no planet diagnostics to plot (a standard case?)")
    days = time_days_of(ds)
    length = ds.attrs.get("averaging_window_days")
    end = ds.attrs.get("averaging_end_days")
    with figure_style():
        fig, axes = plt.subplots(len(panels), 1, figsize=(7.5, 1.9 * len(panels) + 0.6),
                                 sharex=True, layout="constrained")
        for ax, (name, label, factor) in zip(np.atleast_1d(axes), panels):
            values = (ds[name].values * factor if factor is not None
                      else contrast_in_kelvin(name, ds[name].values, settings))
            ax.plot(days, values, color="tab:blue")
            ax.set_title(label, fontsize=10, loc="left")
            if ds.attrs.get("steady_state_reached"):
                ax.axvline(ds.attrs["steady_state_time_days"], color="grey", ls="--", lw=0.8)
            if length:
                ax.axvspan(end - length, end, color="tab:orange", alpha=0.15, lw=0)
        np.atleast_1d(axes)[-1].set_xlabel("simulated time (days)")
        notes = []
        if ds.attrs.get("steady_state_reached"):
            notes.append("dashed: steady state reached")
        if length:
            notes.append(f"shaded: the final values' window ({window_phrase(ds.attrs)})")
        fig.suptitle("spin-up diagnostics" + ("".join(f"\n{n}" for n in notes)), fontsize=11)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)
