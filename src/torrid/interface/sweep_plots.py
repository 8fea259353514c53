"""Plots of a sweep table: the headline diagnostics over the two main swept axes, and the
thickness maps of every point as small multiples.

The two main axes are the two dimensions with the most values (the first in the file on a
tie); any other dimension is held at its middle value (named in the title). Axes, ticks,
cell values, contours and markers follow :mod:`torrid.interface.axes_style`: labels in words
with units from the settings table, log-spaced axes on a log scale with rounded ticks,
``inf`` as "none" at the end of its axis, strings as labelled categories.
"""

from __future__ import annotations

import os
import textwrap
from pathlib import Path

import numpy as np
import xarray as xr

from torrid.interface.axes_style import (Axis, colour_limits, draws_contours, figure_style,
                                        legend_below, mark_points, rounded, status_masks,
                                        value_label, write_cell_values, writes_values)
from torrid.io.pointfile import FINISHED
from torrid.interface.plots import plt, save_figure
from torrid.interface.temperature_view import (check_quantity, contrast_in_kelvin, end_points,
                                               equilibrium_range, temperature_note,
                                               to_temperature)
from torrid.io.runfile import refuse_existing
from torrid.physics.diagnostics import HOTSPOT_CONTRAST_THRESHOLD

#: (variable, label, factor, kind) of the panels of :func:`plot_sweep_diagnostics`; kind:
#: ``signed`` (diverging colours around 0) or ``contrast`` (0 to 1).
PANELS = (("hotspot_offset", "hotspot offset (degrees east)", 1.0, "signed"),
          ("day_night_contrast", "day-night contrast (hemisphere means)", 1.0, "contrast"),
          ("peak_contrast", "peak-to-peak contrast", 1.0, "contrast"),
          ("equatorial_zonal_wind", "equatorial jet (zonal-mean u, km/s)", 1e-3, "signed"))
#: The same panels drawn as temperature: the contrasts become differences in K.
TEMPERATURE_LABELS = {"day_night_contrast": "day-night temperature difference (K, hemisphere "
                                            "means)",
                      "peak_contrast": "peak-to-peak temperature difference (K)"}
#: Small multiples: at most this many panels along either axis (evenly thinned beyond).
MAX_PANELS_PER_AXIS = 8
#: Wind arrows per panel of the maps grid, along latitude and longitude.
ARROWS = (7, 12)
COLOUR_SCALES = ("panel", "shared")
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
    text = ", ".join(value_label(held[d], held[d].values) for d in others)
    return held, text


def undefined_hotspots(table: xr.Dataset) -> xr.DataArray:
    """True at the finished points whose hotspot offsets are undefined (NaN because the map
    is too flat: ``hotspot_offset_defined`` = 0)."""
    finished = table["run_status"].isin(list(FINISHED))
    if "hotspot_offset_defined" in table:
        return finished & (table["hotspot_offset_defined"] == 0)
    if "hotspot_offset" in table:
        return finished & table["hotspot_offset"].isnull()
    return xr.zeros_like(finished)


def _panel_values(held, name, factor, quantity, settings):
    values = held[name] * factor
    label = dict((p[0], p[1]) for p in PANELS)[name]
    if quantity == "temperature" and name in TEMPERATURE_LABELS:
        values = contrast_in_kelvin(name, values, settings)
        label = TEMPERATURE_LABELS[name]
    return values, label


def _limits(kind: str, finite: np.ndarray, quantity: str) -> dict:
    if finite.size == 0:
        return {}
    if kind == "contrast":
        top = 1.0 if quantity == "thickness" else float(finite.max()) or 1.0
        return {"vmin": min(0.0, float(finite.min())), "vmax": max(top, float(finite.max()))}
    limit = float(np.abs(finite).max()) or 1.0
    return {"vmin": -limit, "vmax": limit}


def plot_sweep_diagnostics(table: xr.Dataset, path: str | os.PathLike | None = None,
                           overwrite: bool = False, *, quantity: str = "thickness",
                           settings=None):
    """Hotspot offset, day-night and peak contrasts and jet speed over the two main swept
    axes (a line over one axis if only one has several values).

    Cells hold their values when the grid is small, contours appear only on large grids
    (:mod:`torrid.interface.axes_style`); markers show points that did not reach their
    steady state, failed or are missing, and hotspot offsets that are undefined (the map too
    flat, ``hotspot_offset_defined`` = 0) are left blank and marked "n/d".

    Parameters
    ----------
    table : xarray.Dataset
        A sweep table (``torrid collect``).
    path : path, optional
        PNG file to write; the figure is returned if omitted.
    overwrite : bool
        Replace an existing image.
    quantity : str
        ``thickness`` (contrasts relative to the equilibrium's) or ``temperature`` (the
        contrasts as temperature differences in K, by the phase curves' map).
    settings : ObserverSettings, optional
        The temperature map's end points (default: derived from the default star).

    Returns
    -------
    matplotlib.figure.Figure or pathlib.Path
        The figure, or the image written.
    """
    check_quantity(quantity)
    panels = [p for p in PANELS if p[0] in table]
    if not panels:
        raise ValueError("the sweep table has no planet diagnostics to plot (hotspot_offset, "
                         "day_night_contrast, equatorial_zonal_wind)")
    dims = main_dimensions(table)
    if not dims:
        raise ValueError("the sweep table has a single point: nothing to draw over its axes")
    held, fixed = _held(table, dims)
    order = dims[::-1]  # (y, x)
    xaxis = Axis(held[dims[0]])
    yaxis = Axis(held[dims[1]]) if len(dims) > 1 else None
    masks = status_masks(held, order)
    undefined = undefined_hotspots(held).transpose(*order).values
    with figure_style():
        ncols = 2 if len(panels) > 2 else len(panels)
        nrows = int(np.ceil(len(panels) / ncols))
        fig, axes = plt.subplots(nrows, ncols, figsize=(6.2 * ncols, 4.6 * nrows + 0.6),
                                 layout="constrained", squeeze=False)
        for ax in axes.ravel()[len(panels):]:
            ax.set_visible(False)
        for ax, (name, _, factor, kind) in zip(axes.ravel(), panels):
            values, label = _panel_values(held, name, factor, quantity, settings)
            values = values.transpose(*order).values
            flagged = undefined if name.startswith("hotspot") else None
            point_masks = dict(masks)
            if flagged is not None and not writes_values(flagged.shape):
                point_masks["undefined"] = flagged  # small grids say "n/d" in the cell
            if yaxis is None:
                ax.plot(xaxis.centres, values, marker="o", color="tab:blue")
                ax.set_ylabel(label)
                mark_points(ax, xaxis, None, point_masks)
            else:
                finite = values[np.isfinite(values)]
                ax.set_facecolor("0.92")
                mesh = ax.pcolormesh(xaxis.edges, yaxis.edges, np.ma.masked_invalid(values),
                                     shading="flat", cmap="magma" if kind == "contrast"
                                     else "RdBu_r", **_limits(kind, finite, quantity))
                fig.colorbar(mesh, ax=ax, label=label, shrink=0.92)
                if draws_contours(values.shape) and finite.size >= 4 and np.ptp(finite) > 0:
                    lines = ax.contour(xaxis.centres, yaxis.centres, np.ma.masked_invalid(values),
                                       levels=6, colors="black", linewidths=0.8)
                    ax.clabel(lines, fmt=lambda v: rounded(v), fontsize=8)
                if writes_values(values.shape):
                    write_cell_values(ax, xaxis, yaxis, values, mesh, undefined=flagged)
                mark_points(ax, xaxis, yaxis, point_masks)
                yaxis.apply(ax, "y")
            xaxis.apply(ax, "x")
            ax.set_title(label)
        legend_below(fig, axes)
        note = ("" if not undefined.any() else
                "\nhotspot offsets undefined (n/d, blank) where the map's longitudinal contrast "
                f"is below {HOTSPOT_CONTRAST_THRESHOLD:g}")
        fig.suptitle(f"sweep {table.attrs.get(SWEEP_ATTRIBUTE, '')}"
                     + (f" ({fixed})" if fixed else "") + note)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


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


def _map_field(held: xr.Dataset, quantity: str, settings):
    """The maps to draw (km or K), their colour label and the equilibrium's range in the
    same units (per point)."""
    low, high = equilibrium_range(held)
    if quantity == "temperature":
        night, day = end_points(settings)
        field = to_temperature(held["h"], low, high, settings)
        return field, "temperature (K)", xr.full_like(held["run_status"], day - night,
                                                      dtype=float)
    span = (xr.DataArray(high) - xr.DataArray(low)) / 1e3
    return held["h"] / 1e3, "layer thickness h (km)", span.broadcast_like(held["run_status"])


def plot_sweep_maps(table: xr.Dataset, path: str | os.PathLike | None = None,
                    overwrite: bool = False, *, quantity: str = "thickness",
                    scale: str = "panel", arrows: bool = True, settings=None):
    """Small multiples of the final maps of every point over the two main axes (at most 8
    panels along an axis), with wind arrows, the substellar point (star) and the hotspot
    (cross, at the point's final hotspot offset: the window mean that the sweep table and the
    headline report; "no hotspot" where it is undefined).

    Parameters
    ----------
    table : xarray.Dataset
        A sweep table with maps (``torrid collect --maps``).
    path : path, optional
        PNG file to write; the figure is returned if omitted.
    overwrite : bool
        Replace an existing image.
    quantity : str
        ``thickness`` (h, km) or ``temperature`` (K, by the phase curves' map).
    scale : str
        ``panel``: each panel its own colour scale (spanning at least 2 % of the equilibrium's
        range), so weak contrasts stay visible; ``shared``: one scale for all panels.
    arrows : bool
        Draw the wind arrows (one length scale for all panels, key below).
    settings : ObserverSettings, optional
        The temperature map's end points (default: derived from the default star).

    Returns
    -------
    matplotlib.figure.Figure or pathlib.Path
        The figure, or the image written.
    """
    check_quantity(quantity)
    if scale not in COLOUR_SCALES:
        raise ValueError(f"scale = {scale!r}: must be one of {', '.join(COLOUR_SCALES)}")
    if "h" not in table:
        raise ValueError("the sweep table has no maps (collect it with --maps)")
    dims = main_dimensions(table) or [d for d in table["run_status"].dims][:1]
    held, fixed = _held(table, dims)
    cols = _ascending(held[dims[0]], _thinned(held.sizes[dims[0]]))
    rows = (_ascending(held[dims[1]], _thinned(held.sizes[dims[1]])) if len(dims) > 1
            else np.array([0]))
    field, label, span = _map_field(held, quantity, settings)
    finite = field.values[np.isfinite(field.values)]
    shared = (float(finite.min()), float(finite.max())) if finite.size else (0.0, 1.0)
    speed = np.hypot(held["u"], held["v"]).values
    speed_max = float(np.nanmax(speed)) if np.isfinite(speed).any() else 0.0
    undefined = undefined_hotspots(held)
    with figure_style():
        fig, axes = plt.subplots(len(rows), len(cols),
                                 figsize=(3.5 * len(cols) + 1.0, 2.05 * len(rows) + 1.4),
                                 squeeze=False, sharex=True, sharey=True, layout="constrained")
        mesh, quiver = None, None
        for r, iy in enumerate(rows[::-1]):  # largest value of the second axis on top
            for c, ix in enumerate(cols):
                ax = axes[r][c]
                select = {dims[0]: ix, **({dims[1]: iy} if len(dims) > 1 else {})}
                cell = held.isel(select)
                status = str(cell["run_status"].values)
                if r == 0:
                    ax.set_title(value_label(held[dims[0]], held[dims[0]].values[ix]),
                                 fontsize=10)
                if c == 0 and len(dims) > 1:
                    ax.set_ylabel("\n".join(textwrap.wrap(value_label(
                        held[dims[1]], held[dims[1]].values[iy]), 18)), fontsize=9)
                if status not in FINISHED:
                    ax.text(0.5, 0.5, status, ha="center", va="center", transform=ax.transAxes,
                            color="red" if status == "failed" else "grey", fontsize=12)
                    continue
                lon, (values, u, v) = _about_star(held["lon"].values, cell, (
                    field.isel(select).values, cell["u"].values, cell["v"].values))
                limits = shared if scale == "shared" else colour_limits(
                    values, float(span.isel(select)))
                mesh = ax.pcolormesh(lon, held["lat"], values, shading="auto",
                                     cmap="inferno", vmin=limits[0], vmax=limits[1])
                if scale == "panel":
                    bar = fig.colorbar(mesh, ax=ax, pad=0.01, fraction=0.06, aspect=12)
                    bar.ax.tick_params(labelsize=8)
                    bar.locator = plt.MaxNLocator(3)
                    bar.update_ticks()
                if arrows and speed_max > 0:
                    quiver = _arrows(ax, lon, held["lat"].values, u, v, speed_max)
                _marks(ax, cell, bool(undefined.isel(select)), status)
        _map_axes(fig, axes, held)
        if mesh is not None and scale == "shared":
            fig.colorbar(mesh, ax=axes, label=label, shrink=0.8)
        if quiver is not None:
            key = float(f"{speed_max:.1g}")
            quiver.axes.quiverkey(quiver, 0.97, 0.012, key, f"arrows: wind, {key / 1e3:g} km/s",
                                  labelpos="W", coordinates="figure", color="black",
                                  fontproperties={"size": 9})
        what = "temperature" if quantity == "temperature" else "thickness"
        fig.suptitle(f"sweep {table.attrs.get(SWEEP_ATTRIBUTE, '')}: final {what} maps"
                     + (f", {label} (one scale per panel)" if scale == "panel" else "")
                     + (f" ({fixed})" if fixed else "")
                     + (f"\n{temperature_note(settings)}" if quantity == "temperature" else ""))
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def _about_star(lon: np.ndarray, cell: xr.Dataset, maps) -> tuple[np.ndarray, list]:
    """Longitudes east of the star at the map's time, in [-180, 180) and ascending, and the
    maps' columns in that order (the star moves on eccentric or asynchronous orbits; tables
    without ``map_substellar_longitude`` had it at 0)."""
    star = (float(cell["map_substellar_longitude"]) if "map_substellar_longitude" in cell
            else 0.0)
    relative = (lon - (star if np.isfinite(star) else 0.0) + 180.0) % 360.0 - 180.0
    order = np.argsort(relative)
    return relative[order], [m[..., order] for m in maps]


def _arrows(ax, lon, lat, u, v, speed_max):
    """Wind arrows on a coarse subset of the grid (one length scale for all panels)."""
    step_lat = max(1, len(lat) // ARROWS[0])
    step_lon = max(1, len(lon) // ARROWS[1])
    rows = slice(step_lat // 2, None, step_lat)
    cols = slice(step_lon // 2, None, step_lon)
    return ax.quiver(lon[cols], lat[rows], u[rows, cols], v[rows, cols], color="white",
                     scale=speed_max * 9, width=0.006, headwidth=3.5, alpha=0.9)


def _marks(ax, cell: xr.Dataset, undefined: bool, status: str) -> None:
    """Substellar point, hotspot (or "no hotspot"), and "not steady"."""
    ax.plot(0, 0, marker="*", ms=11, color="gold", mec="black", mew=0.6, ls="none",
            label="substellar point")
    offset = float(cell["hotspot_offset"]) if "hotspot_offset" in cell else np.nan
    if np.isfinite(offset):
        ax.plot(offset, 0, marker="X", ms=9, color="cyan", mec="black", mew=0.6, ls="none",
                label="hotspot (final offset)")
    elif undefined:
        contrast = (float(cell["longitudinal_contrast"]) if "longitudinal_contrast" in cell
                    else np.nan)
        ax.text(0.03, 0.05, f"no hotspot (contrast {rounded(contrast)})", fontsize=8,
                color="white", transform=ax.transAxes, va="bottom")
    if status == "complete":
        ax.text(0.03, 0.95, "not steady", fontsize=8, color="tab:orange", va="top",
                transform=ax.transAxes, fontweight="bold")


def _map_axes(fig, axes, held) -> None:
    for ax in axes.ravel():
        ax.set_xlim(-180, 180)
        ax.set_ylim(-90, 90)
        ax.set_xticks([-180, -90, 0, 90, 180])
        ax.set_yticks([-60, 0, 60])
    for ax in axes[-1]:
        ax.set_xlabel("longitude (deg east of\nthe substellar point)", fontsize=9)
    fig.supylabel("latitude (degrees north)")
    legend_below(fig, axes)


def plot_sweep_file(path: str | os.PathLike, output: str | os.PathLike | None = None,
                    overwrite: bool = False, *, quantity: str = "thickness",
                    scale: str = "panel", settings=None) -> list[Path]:
    """Draw a sweep table file: ``<stem>.png`` (diagnostics) and, if the table has maps,
    ``<stem>-maps.png``; ``output`` renames the first (the second follows it). Existing
    images are refused before anything is drawn unless ``overwrite``. ``quantity``,
    ``scale`` and ``settings`` as in :func:`plot_sweep_maps`."""
    path = Path(path)
    image = Path(output) if output else path.with_suffix(".png")
    with xr.open_dataset(path, engine="netcdf4") as ds:
        table = ds.load()
    images = [image] + ([image.with_name(f"{image.stem}-maps.png")] if "h" in table else [])
    refuse_existing(images, overwrite)
    plot_sweep_diagnostics(table, images[0], overwrite=overwrite, quantity=quantity,
                           settings=settings)
    if len(images) > 1:
        plot_sweep_maps(table, images[1], overwrite=overwrite, quantity=quantity, scale=scale,
                        settings=settings)
    return images
