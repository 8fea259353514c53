"""The fit figures: delta chi-square over the two main swept axes (with the end points fitted
and, beside it, fixed, for a fit with free end points), and the measured curves with the best
grid point's model curves; the posterior's corner plot (marginals on the diagonal, pairwise
densities below it, 68 and 95 % intervals marked)."""

from __future__ import annotations

import os

import numpy as np
import xarray as xr
from matplotlib.colors import LogNorm

from torrid.interface.axes_style import coordinate_label, figure_style
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
    marked; with free or shape-only end points also the map with the end points fixed) beside
    the measured points with the best-fit curves."""
    with figure_style():
        return _plot_fit(fit, path, overwrite)


def _chi_map(fig, ax, fit, delta, title, marks: bool = True):
    dims = list(delta.dims)
    if len(dims) >= 2:
        plane = delta.isel({d: int(np.argmin(np.abs(delta[d].values - fit.attrs[f"best_{d}"])))
                            for d in dims[2:]}).transpose(dims[1], dims[0])
        (xv, xlog, xlabels), (yv, ylog, ylabels) = (_axis(plane[d].values) for d in dims[:2])
        mesh = ax.pcolormesh(xv, yv, 1 + plane.values, shading="nearest", cmap="viridis_r",
                             norm=LogNorm(vmin=1, vmax=max(10.0, float(np.nanmax(plane)) + 1)))
        fig.colorbar(mesh, ax=ax, label="1 + delta chi-square (log scale)")
        levels = sorted(DELTA_CHI2.values())
        if np.isfinite(plane.values).sum() >= 4 and min(plane.shape) >= 2:
            lines = ax.contour(xv, yv, plane.values, levels=levels, colors=["white", "orange"])
            ax.clabel(lines, fmt={levels[0]: "68 %", levels[1]: "95 %"}, fontsize=8)
        best = np.unravel_index(int(np.nanargmin(plane.values)), plane.shape)
        ax.plot(xv[best[1]], yv[best[0]], "r*", ms=14, label="best grid point")
        marks = marks and xlabels is None and ylabels is None
        if f"estimate_{dims[0]}" in fit.attrs and marks:
            ax.plot(fit.attrs[f"estimate_{dims[0]}"], fit.attrs[f"estimate_{dims[1]}"], "wx",
                    ms=10, mew=2, label="interpolated estimate")
        if f"posterior_median_{dims[0]}" in fit.attrs and marks:
            ax.errorbar(fit.attrs[f"posterior_median_{dims[0]}"],
                        fit.attrs[f"posterior_median_{dims[1]}"],
                        xerr=[[fit.attrs[f"posterior_median_{dims[0]}"]
                               - fit.attrs[f"posterior_low68_{dims[0]}"]],
                              [fit.attrs[f"posterior_high68_{dims[0]}"]
                               - fit.attrs[f"posterior_median_{dims[0]}"]]],
                        yerr=[[fit.attrs[f"posterior_median_{dims[1]}"]
                               - fit.attrs[f"posterior_low68_{dims[1]}"]],
                              [fit.attrs[f"posterior_high68_{dims[1]}"]
                               - fit.attrs[f"posterior_median_{dims[1]}"]]],
                        fmt="o", color="tab:red", mfc="white", ms=6, capsize=3,
                        label="posterior median, 68 %")
        ax.set_xscale("log" if xlog else "linear")
        ax.set_yscale("log" if ylog else "linear")
        if xlabels is not None:
            ax.set_xticks(xv, xlabels)
        if ylabels is not None:
            ax.set_yticks(yv, ylabels)
        ax.set_xlabel(coordinate_label(delta[dims[0]]))
        ax.set_ylabel(coordinate_label(delta[dims[1]]))
        ax.legend(loc="lower right", fontsize=8)
    else:
        ax.plot(delta[dims[0]], delta, "o-")
        ax.set_xlabel(dims[0].replace("_", " "))
        ax.set_ylabel("delta chi-square")
    ax.set_title(title, fontsize=9)


def _plot_fit(fit, path, overwrite):
    delta = fit["delta_chi_square"]
    fixed = "chi_square_fixed_temperatures" in fit
    fig, axes = plt.subplots(1, 3 if fixed else 2, figsize=(18 if fixed else 12, 4.8),
                             constrained_layout=True)
    mode = fit.attrs.get("temperatures", "fixed")
    what = {"fixed": "end points fixed", "free": "end points fitted",
            "shape": "shape only (offset, amplitude fitted)"}[mode]
    _chi_map(fig, axes[0], fit, delta,
             f"{what}: chi-square against {os.path.basename(fit.attrs.get('observation', ''))} "
             f"(min {fit.attrs['chi_square_min']:.1f}, {fit.attrs['degrees_of_freedom']} dof)")
    if fixed:
        chi = fit["chi_square_fixed_temperatures"]
        _chi_map(fig, axes[1], fit, chi - chi.min(),
                 f"end points fixed at {fit.attrs['assumed_night_temperature_K']:.0f} K, "
                 f"{fit.attrs['assumed_day_temperature_K']:.0f} K (min {float(chi.min()):.1f})",
                 marks=False)
    right = axes[-1]
    if "best_curve_flux_ratio" in fit:
        names = fit.attrs.get("curves", "").split("; ")
        for c in range(fit.sizes["curve"]):
            mask = fit["observed_curve"].values == c
            colour = f"C{c}"
            label = names[c].split(": ", 1)[-1] if c < len(names) else f"curve {c}"
            right.errorbar(fit["observed_phase"].values[mask],
                           fit["observed_flux_ratio"].values[mask],
                           fit["observed_error"].values[mask], fmt="o", ms=3, color=colour,
                           alpha=0.7, label=f"measured {label}")
            right.plot(fit["phase"], fit["best_curve_flux_ratio"].isel(curve=c), color=colour,
                       lw=2)
    else:
        right.errorbar(fit["observed_phase"], fit["observed_flux_ratio"], fit["observed_error"],
                       fmt="o", ms=3, color="black", label="measured")
        best = fit["best_flux_ratio"]
        right.plot(best["phase"], best, color="tab:red", label="best grid point")
    right.axvline(0.5, color="grey", ls="--", lw=0.8)
    right.set_xlabel("orbital phase (0: mid-transit, 0.5: mid-eclipse)")
    right.set_ylabel("planet-to-star flux ratio (ppm)")
    right.legend(fontsize=8)
    right.set_title("measured curves and the best grid point's model", fontsize=9)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def plot_posterior(posterior, path: str | os.PathLike | None = None, overwrite: bool = False):
    """Corner plot of a :class:`torrid.workflow.posterior.Posterior`: histograms of each
    parameter (median and 68 % interval marked) and 2-D histograms of each pair."""
    with figure_style():
        names, samples = posterior.names, posterior.samples
        n = len(names)
        fig, axes = plt.subplots(n, n, figsize=(2.6 * n + 1, 2.6 * n + 1), squeeze=False,
                                 constrained_layout=True)
        log = [bool(np.all(samples[:, k] > 0)) and k < 2 and
               np.ptp(np.log10(samples[:, k])) > 1 for k in range(n)]
        values = [np.log10(samples[:, k]) if log[k] else samples[:, k] for k in range(n)]
        labels = [(f"log10 {name}" if log[k] else name).replace("_", " ") +
                  ("" if k < 2 else " (K)") for k, name in enumerate(names)]
        for i in range(n):
            for j in range(n):
                ax = axes[i, j]
                if j > i:
                    ax.set_visible(False)
                    continue
                if i == j:
                    ax.hist(values[i], bins=40, color="tab:blue", histtype="stepfilled",
                            alpha=0.6)
                    q = posterior.quantiles[:, i]
                    for v, style in ((q[2], "-"), (q[1], "--"), (q[3], "--")):
                        ax.axvline(np.log10(v) if log[i] else v, color="black", ls=style, lw=1)
                    ax.set_yticks([])
                    ax.set_title(f"{names[i].replace('_', ' ')} = {q[2]:.3g}", fontsize=9)
                else:
                    ax.hist2d(values[j], values[i], bins=40, cmap="Blues")
                if i == n - 1:
                    ax.set_xlabel(labels[j])
                if j == 0 and i > 0:
                    ax.set_ylabel(labels[i])
        fig.suptitle(f"posterior: {posterior.walkers} walkers x {posterior.steps} steps, "
                     f"acceptance {posterior.acceptance:.2f}")
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)
