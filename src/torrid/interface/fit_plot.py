"""The fit figure: delta chi-square over the two main swept axes, and the measured curve with the
best grid point's model curve."""

from __future__ import annotations

import os

import numpy as np
import xarray as xr
from matplotlib.colors import LogNorm

from torrid.interface.plots import plt, save_figure
from torrid.workflow.fit import DELTA_CHI2, axis_transform


def _axis(values: np.ndarray):
    """Plot positions of a swept axis: its values (log scale if log-spaced), or the point
    indices with the values as labels when some are not finite (e.g. inf for no drag)."""
    values = np.asarray(values, float)
    if np.isfinite(values).all():
        return values, axis_transform(values)[1], None
    return np.arange(values.size, dtype=float), False, [f"{v:g}" for v in values]


def _where(values: np.ndarray, positions: np.ndarray, value: float) -> float:
    """Plot position of the grid value ``value`` of an axis."""
    match = np.flatnonzero(np.asarray(values, float) == value)
    return float(positions[match[0]]) if match.size else float(value)


def plot_fit(fit: xr.Dataset, path: str | os.PathLike | None = None, overwrite: bool = False):
    """Delta chi-square map (contours at the 68.27 and 95.45 % levels, best point and estimate
    marked) beside the measured points with the best-fit curve."""
    delta = fit["delta_chi_square"]
    dims = list(delta.dims)
    fig, (ax, right) = plt.subplots(1, 2, figsize=(12, 4.8), constrained_layout=True)
    if len(dims) >= 2:
        plane = delta.isel({d: int(np.argmin(np.abs(delta[d].values - fit.attrs[f"best_{d}"])))
                            for d in dims[2:]}).transpose(dims[1], dims[0])
        (xv, xlog, xlabels), (yv, ylog, ylabels) = (_axis(plane[d].values) for d in dims[:2])
        mesh = ax.pcolormesh(xv, yv, 1 + plane.values, shading="nearest", cmap="viridis_r",
                             norm=LogNorm(vmin=1, vmax=max(10.0, float(np.nanmax(plane)) + 1)))
        fig.colorbar(mesh, ax=ax, label="1 + delta chi-square (log scale)")
        levels = sorted(DELTA_CHI2.values())
        if np.isfinite(plane.values).sum() >= 4:
            lines = ax.contour(xv, yv, plane.values, levels=levels, colors=["white", "orange"])
            ax.clabel(lines, fmt={levels[0]: "68 %", levels[1]: "95 %"}, fontsize=8)
        ax.plot(*(_where(plane[d].values, pos, fit.attrs[f"best_{d}"])
                  for d, pos in zip(dims[:2], (xv, yv))), "r*", ms=14, label="best grid point")
        if f"estimate_{dims[0]}" in fit.attrs:
            ax.plot(fit.attrs[f"estimate_{dims[0]}"], fit.attrs[f"estimate_{dims[1]}"], "wx",
                    ms=10, mew=2, label="interpolated estimate")
        ax.set_xscale("log" if xlog else "linear")
        ax.set_yscale("log" if ylog else "linear")
        if xlabels is not None:
            ax.set_xticks(xv, xlabels)
        if ylabels is not None:
            ax.set_yticks(yv, ylabels)
        ax.set_xlabel(dims[0].replace("_", " "))
        ax.set_ylabel(dims[1].replace("_", " "))
        ax.legend(loc="lower right", fontsize=8)
    else:
        ax.plot(delta[dims[0]], delta, "o-")
        ax.set_xlabel(dims[0].replace("_", " "))
        ax.set_ylabel("delta chi-square")
    ax.set_title(f"chi-square against {os.path.basename(fit.attrs.get('observation', ''))} "
                 f"(min {fit.attrs['chi_square_min']:.1f}, {fit.attrs['degrees_of_freedom']} dof)",
                 fontsize=9)
    right.errorbar(fit["observed_phase"], fit["observed_flux_ratio"], fit["observed_error"],
                   fmt="o", ms=3, color="black", label="measured")
    best = fit["best_flux_ratio"]
    right.plot(best["phase"], best, color="tab:red", label="best grid point")
    right.axvline(0.5, color="grey", ls="--", lw=0.8)
    right.set_xlabel("orbital phase (0: mid-transit, 0.5: mid-eclipse)")
    right.set_ylabel("planet-to-star flux ratio (ppm)")
    right.legend(fontsize=8)
    right.set_title("measured curve and best-fit model", fontsize=9)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)
