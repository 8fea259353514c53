"""Linear against nonlinear over a sweep: the hotspot offset and contrasts of the direct linear
steady solver (``numerics.solver = "linear"``) beside those of the time-stepped model, over the
two main swept axes of a sweep table whose solver is a crossed (or zipped) axis (issue 13).

One row per diagnostic: the time-stepped model's map, the linear solver's map (same colour
scale), and the linear value against the nonlinear one at every grid point (the diagonal is
"the linear theory explains it all").
"""

from __future__ import annotations

import os

import numpy as np
import xarray as xr

from torrid.interface.axes_style import Axis, coordinate_label, figure_style, rounded
from torrid.interface.plots import plt, save_figure
from torrid.interface.sweep_plots import SWEEP_ATTRIBUTE, _limits

SOLVER_KEY = "numerics.solver"
#: (variable, label) of the rows.
ROWS = (("hotspot_offset", "hotspot offset (degrees east)"),
        ("day_night_contrast", "day-night contrast (hemisphere means)"),
        ("peak_contrast", "peak-to-peak contrast"))


def solver_dimension(table: xr.Dataset) -> str | None:
    """The dimension along which ``numerics.solver`` varies in a sweep table (None if it is not
    swept, or not with both solvers)."""
    for coord in table.coords.values():
        if coord.attrs.get("config_key") == SOLVER_KEY and coord.ndim == 1:
            values = set(map(str, coord.values))
            if {"stepping", "linear"} <= values:
                return coord.dims[0]
    return None


def _by_solver(table: xr.Dataset, dim: str) -> tuple[xr.Dataset, xr.Dataset]:
    coord = next(c for c in table.coords.values() if c.attrs.get("config_key") == SOLVER_KEY)
    values = [str(v) for v in coord.values]
    return (table.isel({dim: values.index("stepping")}),
            table.isel({dim: values.index("linear")}))


def plot_solver_comparison(table: xr.Dataset, path: str | os.PathLike | None = None,
                           overwrite: bool = False):
    """Hotspot offset and contrasts of both solvers over the two main other axes.

    Parameters
    ----------
    table : xarray.Dataset
        A sweep table (``torrid collect``) with ``numerics.solver`` swept over both values.
    path : path, optional
        PNG file to write; the figure is returned if omitted.
    overwrite : bool
        Replace an existing image.
    """
    dim = solver_dimension(table)
    if dim is None:
        raise ValueError("the sweep table does not sweep numerics.solver over 'stepping' and "
                         "'linear': nothing to compare")
    stepping, linear = _by_solver(table, dim)
    others = [d for d in stepping["run_status"].dims if stepping.sizes[d] > 1]
    axes_dims = sorted(others, key=lambda d: -stepping.sizes[d])[:2]
    if len(axes_dims) < 2:
        raise ValueError("the solver comparison needs two swept axes besides numerics.solver")
    held = {d: stepping.sizes[d] // 2 for d in stepping["run_status"].dims if d not in axes_dims}
    stepping, linear = stepping.isel(held), linear.isel(held)
    rows = [r for r in ROWS if r[0] in table]
    xdim, ydim = axes_dims
    xaxis, yaxis = Axis(stepping[xdim]), Axis(stepping[ydim])
    with figure_style():
        fig, axes = plt.subplots(len(rows), 3, figsize=(16, 4.2 * len(rows)),
                                 layout="constrained", squeeze=False)
        for (name, label), row in zip(rows, axes):
            nonlinear_values = stepping[name].transpose(ydim, xdim).values
            linear_values = linear[name].transpose(ydim, xdim).values
            both = np.concatenate([nonlinear_values.ravel(), linear_values.ravel()])
            kind = "contrast" if name.endswith("contrast") else "offset"
            limits = _limits(kind, both[np.isfinite(both)], "thickness")
            cmap = "magma" if kind == "contrast" else "RdBu_r"
            for ax, values, which in ((row[0], nonlinear_values, "time-stepped (nonlinear)"),
                                      (row[1], linear_values, "linear steady solver")):
                mesh = ax.pcolormesh(xaxis.edges, yaxis.edges, np.ma.masked_invalid(values),
                                     shading="flat", cmap=cmap, **limits)
                xaxis.apply(ax, "x")
                yaxis.apply(ax, "y")
                ax.set_title(f"{label}: {which}", fontsize=10)
            fig.colorbar(mesh, ax=row[:2], label=label, shrink=0.9)
            _scatter(row[2], stepping, linear, name, label, xdim, ydim)
        fixed = ", ".join(f"{coordinate_label(stepping[d], with_unit=False)} = "
                          f"{rounded(stepping[d].values.item())}" for d in held if d != dim)
        fig.suptitle(f"sweep {table.attrs.get(SWEEP_ATTRIBUTE, '')}: linear against nonlinear"
                     + (f" ({fixed})" if fixed else ""))
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def _scatter(ax, stepping: xr.Dataset, linear: xr.Dataset, name: str, label: str,
             xdim: str, ydim: str) -> None:
    """Linear value against the nonlinear one, one marker per grid point, coloured by the
    second axis (log of it if positive), with the diagonal."""
    x = stepping[name].transpose(ydim, xdim).values
    y = linear[name].transpose(ydim, xdim).values
    colour = np.broadcast_to(np.arange(x.shape[0])[:, None], x.shape)
    ax.scatter(x.ravel(), y.ravel(), c=colour.ravel(), cmap="viridis", s=25,
               edgecolors="black", linewidths=0.3)
    finite = np.concatenate([x[np.isfinite(x)], y[np.isfinite(y)]])
    if finite.size:
        lo, hi = float(finite.min()), float(finite.max())
        ax.plot([lo, hi], [lo, hi], color="grey", lw=0.8, ls="--", label="linear = nonlinear")
        ax.legend(loc="best", fontsize=7)
    ax.set_xlabel(f"time-stepped (nonlinear) {label}")
    ax.set_ylabel(f"linear {label}")
    values = ", ".join(rounded(v) for v in stepping[ydim].values.tolist())
    ax.set_title(f"colour: {coordinate_label(stepping[ydim])} ({values}, dark to light)",
                 fontsize=9)
