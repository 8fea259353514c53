"""Plots of a sweep table: the headline diagnostics over the two main swept axes, and the
thickness maps of every point as small multiples.

The two main axes are the two dimensions with the most values (the first in the file on a
tie); any other dimension is held at its middle value (named in the title). An axis whose
values are log-spaced is drawn on a log scale; one with ``inf`` or strings as values is drawn
as evenly spaced labelled categories. Failed points are crossed out, missing ones circled.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np
import xarray as xr

from torrid.io.pointfile import FINISHED
from torrid.io.runfile import refuse_existing
from torrid.interface.plots import plt, save_figure

#: (variable, label, factor) of the panels of :func:`plot_sweep_diagnostics`.
PANELS = (("hotspot_offset", "hotspot offset (degrees east)", 1.0),
          ("day_night_contrast", "day-night contrast (hemisphere means)", 1.0),
          ("peak_contrast", "peak-to-peak contrast", 1.0),
          ("equatorial_zonal_wind", "equatorial jet (zonal-mean u, km/s)", 1e-3))
#: Small multiples: at most this many panels along either axis (evenly thinned beyond).
MAX_PANELS_PER_AXIS = 8
SWEEP_ATTRIBUTE = "torrid_sweep"


def is_sweep_table(path: str | os.PathLike) -> bool:
    """True if ``path`` is a readable netCDF file written as a sweep table."""
    try:
        with xr.open_dataset(path, engine="netcdf4") as ds:
            return SWEEP_ATTRIBUTE in ds.attrs
    except Exception:  # noqa: BLE001 - not a readable netCDF file: not a sweep table
        return False


def main_dimensions(table: xr.Dataset) -> list[str]:
    """The (up to) two swept dimensions with the most values, in file order on ties."""
    dims = [d for d in table["run_status"].dims if table.sizes[d] > 1]
    return sorted(dims, key=lambda d: -table.sizes[d])[:2]


def _held(table: xr.Dataset, keep: list[str]) -> tuple[xr.Dataset, str]:
    """Hold every other dimension at its middle value; return the slice and a description."""
    others = {d: table.sizes[d] // 2 for d in table["run_status"].dims if d not in keep}
    held = table.isel(others)
    text = ", ".join(f"{d} = {_label(held[d].values)}" for d in others)
    return held, text


def _label(value) -> str:
    value = value.item() if hasattr(value, "item") else value
    return f"{value:g}" if isinstance(value, float) else str(value)


def _positions(coord: xr.DataArray) -> tuple[np.ndarray, np.ndarray, str]:
    """Plot positions (centres, cell edges) and scale of one swept coordinate."""
    values = coord.values
    numeric = np.issubdtype(values.dtype, np.number) and np.isfinite(values).all()
    if not numeric or values.size < 2:
        centres = np.arange(values.size, dtype=float)
        return centres, np.arange(values.size + 1) - 0.5, "categories"
    order_ok = np.all(np.diff(values) > 0) or np.all(np.diff(values) < 0)
    log = coord.attrs.get("spacing") == "log" or (
        (values > 0).all() and order_ok and values.size > 2
        and np.allclose(np.diff(np.log(values)), np.log(values[1] / values[0]), rtol=1e-6))
    if not order_ok:
        centres = np.arange(values.size, dtype=float)
        return centres, np.arange(values.size + 1) - 0.5, "categories"
    x = np.log(values) if log else values.astype(float)
    inner = 0.5 * (x[1:] + x[:-1])
    edges = np.concatenate([[x[0] - (inner[0] - x[0])], inner, [x[-1] + (x[-1] - inner[-1])]])
    if log:
        return values.astype(float), np.exp(edges), "log"
    return values.astype(float), edges, "linear"


def _set_axis(ax, which: str, coord: xr.DataArray, centres, scale: str) -> None:
    set_scale, set_ticks, set_labels, set_label = (
        (ax.set_xscale, ax.set_xticks, ax.set_xticklabels, ax.set_xlabel) if which == "x"
        else (ax.set_yscale, ax.set_yticks, ax.set_yticklabels, ax.set_ylabel))
    if scale == "log":
        set_scale("log")
    set_ticks(centres)
    set_labels([_label(v) for v in coord.values])
    units = coord.attrs.get("units")
    key = coord.attrs.get("config_key", coord.name)
    set_label(f"{key} ({units})" if units and units != "1" else key)


def _mark_points(ax, status: np.ndarray, xs, ys) -> None:
    """Cross out failed points and circle missing ones (status[y, x])."""
    for kind, marker, colour in (("failed", "x", "red"), ("missing", "o", "grey")):
        iy, ix = np.nonzero(status == kind)
        if iy.size:
            ax.plot(np.asarray(xs)[ix], np.asarray(ys)[iy], ls="none", marker=marker, ms=9,
                    mfc="none", mec=colour, mew=1.5, label=kind)


def plot_sweep_diagnostics(table: xr.Dataset, path: str | os.PathLike | None = None,
                           overwrite: bool = False):
    """Hotspot offset, day-night contrast and jet speed over the two main swept axes.

    Parameters
    ----------
    table : xarray.Dataset
        A sweep table (``torrid collect``).
    path : path, optional
        PNG file to write; the figure is returned if omitted.
    overwrite : bool
        Replace an existing image.
    """
    panels = [p for p in PANELS if p[0] in table]
    if not panels:
        raise ValueError("the sweep table has no planet diagnostics to plot (hotspot_offset, "
                         "day_night_contrast, equatorial_zonal_wind)")
    dims = main_dimensions(table)
    if not dims:
        raise ValueError("the sweep table has a single point: nothing to draw over its axes")
    held, fixed = _held(table, dims)
    fig, axes = plt.subplots(1, len(panels), figsize=(5.2 * len(panels), 4.2),
                             constrained_layout=True, squeeze=False)
    xc, xe, xscale = _positions(held[dims[0]])
    for ax, (name, label, factor) in zip(axes[0], panels):
        if len(dims) == 1:
            values = held[name].transpose(dims[0]).values * factor
            ax.plot(xc, values, marker="o", color="tab:blue")
            status = held["run_status"].values
            for kind, colour in (("failed", "red"), ("missing", "grey")):
                for x in np.asarray(xc)[status == kind]:
                    ax.axvline(x, color=colour, ls="--", lw=1, label=kind)
            ax.set_ylabel(label)
        else:
            yc, ye, yscale = _positions(held[dims[1]])
            values = held[name].transpose(dims[1], dims[0]).values * factor
            finite = values[np.isfinite(values)]
            mesh = ax.pcolormesh(xe, ye, np.ma.masked_invalid(values), shading="flat",
                                 cmap="magma" if name.endswith("contrast") else "RdBu_r",
                                 **_limits(name, finite))
            fig.colorbar(mesh, ax=ax, label=label, shrink=0.9)
            if min(values.shape) >= 2 and finite.size >= 4 and np.ptp(finite) > 0:
                lines = ax.contour(xc, yc, np.ma.masked_invalid(values), levels=6,
                                   colors="black", linewidths=0.8)
                ax.clabel(lines, fmt="%.3g", fontsize=7)
            _mark_points(ax, held["run_status"].transpose(dims[1], dims[0]).values, xc, yc)
            _set_axis(ax, "y", held[dims[1]], yc, yscale)
        _set_axis(ax, "x", held[dims[0]], xc, xscale)
        ax.set_title(label, fontsize=10)
        if ax is axes[0][0] and ax.get_legend_handles_labels()[0]:
            ax.legend(loc="best", fontsize=7, framealpha=0.8)
    fig.suptitle(f"sweep {table.attrs.get(SWEEP_ATTRIBUTE, '')}"
                 + (f" ({fixed})" if fixed else ""))
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def _limits(name: str, finite: np.ndarray) -> dict:
    if finite.size == 0:
        return {}
    if name.endswith("contrast"):
        return {"vmin": min(0.0, float(finite.min())), "vmax": max(1.0, float(finite.max()))}
    limit = float(np.abs(finite).max()) or 1.0
    return {"vmin": -limit, "vmax": limit}


def _thinned(size: int) -> np.ndarray:
    if size <= MAX_PANELS_PER_AXIS:
        return np.arange(size)
    return np.unique(np.linspace(0, size - 1, MAX_PANELS_PER_AXIS).round().astype(int))


def _ascending(coord: xr.DataArray, indices: np.ndarray) -> np.ndarray:
    """``indices`` ordered by ascending coordinate value (file order if not numeric)."""
    values = coord.values[indices]
    if np.issubdtype(values.dtype, np.number):
        return indices[np.argsort(values, kind="stable")]
    return indices


def plot_sweep_maps(table: xr.Dataset, path: str | os.PathLike | None = None,
                    overwrite: bool = False):
    """Small multiples of the final thickness map h of every point over the two main axes
    (one shared colour scale; at most 8 panels along an axis)."""
    if "h" not in table:
        raise ValueError("the sweep table has no maps (collect it with --maps)")
    dims = main_dimensions(table) or [d for d in table["run_status"].dims][:1]
    held, fixed = _held(table, dims)
    cols = _ascending(held[dims[0]], _thinned(held.sizes[dims[0]]))
    rows = (_ascending(held[dims[1]], _thinned(held.sizes[dims[1]])) if len(dims) > 1
            else np.array([0]))
    h = held["h"] / 1e3
    finite = h.values[np.isfinite(h.values)]
    vmin, vmax = (float(finite.min()), float(finite.max())) if finite.size else (0.0, 1.0)
    fig, axes = plt.subplots(len(rows), len(cols), figsize=(2.4 * len(cols) + 1.2,
                                                             1.4 * len(rows) + 0.8),
                             squeeze=False, sharex=True, sharey=True, constrained_layout=True)
    mesh = None
    for r, iy in enumerate(rows[::-1]):  # largest value of the second axis on top
        for c, ix in enumerate(cols):
            ax = axes[r][c]
            select = {dims[0]: ix, **({dims[1]: iy} if len(dims) > 1 else {})}
            cell = held.isel(select)
            status = str(cell["run_status"].values)
            if status in FINISHED:
                mesh = ax.pcolormesh(held["lon"], held["lat"], h.isel(select).values,
                                     shading="auto", cmap="inferno", vmin=vmin, vmax=vmax)
            else:
                ax.text(0.5, 0.5, status, ha="center", va="center", transform=ax.transAxes,
                        color="red" if status == "failed" else "grey")
            title = f"{dims[0]}={_label(held[dims[0]].values[ix])}"
            if len(dims) > 1:
                title += f"\n{dims[1]}={_label(held[dims[1]].values[iy])}"
            ax.set_title(title, fontsize=6)
            ax.tick_params(labelsize=6)
    if mesh is not None:
        fig.colorbar(mesh, ax=axes, label="layer thickness h (km)", shrink=0.8)
    fig.supxlabel("longitude east of the substellar meridian (degrees)", fontsize=8)
    fig.supylabel("latitude (degrees north)", fontsize=8)
    fig.suptitle(f"sweep {table.attrs.get(SWEEP_ATTRIBUTE, '')}: final thickness maps"
                 + (f" ({fixed})" if fixed else ""), fontsize=9)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def plot_sweep_file(path: str | os.PathLike, output: str | os.PathLike | None = None,
                    overwrite: bool = False) -> list[Path]:
    """Draw a sweep table file: ``<stem>.png`` (diagnostics) and, if the table has maps,
    ``<stem>-maps.png``; ``output`` renames the first (the second follows it). Existing
    images are refused before anything is drawn unless ``overwrite``."""
    path = Path(path)
    image = Path(output) if output else path.with_suffix(".png")
    with xr.open_dataset(path, engine="netcdf4") as ds:
        table = ds.load()
    images = [image] + ([image.with_name(f"{image.stem}-maps.png")] if "h" in table else [])
    refuse_existing(images, overwrite)
    plot_sweep_diagnostics(table, images[0], overwrite=overwrite)
    if len(images) > 1:
        plot_sweep_maps(table, images[1], overwrite=overwrite)
    return images
