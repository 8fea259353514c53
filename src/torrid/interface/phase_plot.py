"""Plot of a phase curve: flux ratio against orbital phase, eclipse and transit marked."""

from __future__ import annotations

import os

import numpy as np
import xarray as xr

from torrid.interface.plots import plt, save_figure

#: at most this many curves of a sweep are drawn in one plot
MAX_CURVES = 12


def plot_phase_curve(pc: xr.Dataset, path: str | os.PathLike | None = None,
                     overwrite: bool = False):
    """Flux ratio (ppm) against orbital phase, with transit (0, 1) and eclipse marked, the
    curve's refined maximum and where the map's hotspot offset alone would put it.

    Parameters
    ----------
    pc : xarray.Dataset
        A phase-curve dataset (:func:`torrid.workflow.phase.phase_curve`); over sweep dims
        up to ``MAX_CURVES`` curves are drawn.
    path : path, optional
        PNG to write (atomically; never replaced without ``overwrite``); the figure is
        returned if omitted.
    """
    flux = pc["flux_ratio"]
    stacked = flux.stack(point=[d for d in flux.dims if d != "phase"]) if flux.ndim > 1 else flux
    curves = [stacked] if stacked.ndim == 1 else [stacked.isel(point=i) for i in
                                                   range(min(MAX_CURVES, stacked.sizes["point"]))]
    phase = np.append(pc["phase"].values, 1.0)
    ecl = float(pc["eclipse_phase"])
    fig, ax = plt.subplots(figsize=(8, 4.5), constrained_layout=True)
    for curve in curves:
        ax.plot(phase, np.append(curve.values, curve.values[0]), lw=1.6)
    for x, label in ((0.0, "transit"), (ecl, "eclipse"), (1.0, None)):
        ax.axvline(x, color="grey", ls="--", lw=0.9)
        if label:
            ax.annotate(f" {label}", (x, 0.98), xycoords=("data", "axes fraction"),
                        ha="left", va="top", fontsize=8, color="grey")
    if flux.ndim == 1:
        peak = float(pc["phase_of_maximum"])
        timed = "phase_offset_of_maximum" in pc  # offsets in degrees of orbital phase
        peak_offset = float(pc["phase_offset_of_maximum" if timed else "offset_of_maximum"])
        ax.plot(peak, float(pc["maximum_flux_ratio"]), "v", color="tab:red", ms=8,
                label=f"curve maximum ({peak_offset:+.1f} deg{' of phase' if timed else ''})")
        offset = float(pc["map_hotspot_offset"])
        if np.isfinite(offset):
            where = (ecl - pc.attrs.get("rotation_sense", 1) * offset / 360.0) % 1.0
            ax.axvline(where, color="tab:orange", lw=1.2,
                       label=f"map hotspot offset ({offset:+.1f} deg)")
        ax.legend(loc="best", fontsize=8)
    ax.set_xlim(0, 1)
    ax.set_xlabel("orbital phase (0: mid-transit)")
    ax.set_ylabel("planet-to-star flux ratio (ppm)")
    ax.set_title(f"thermal phase curve, {pc.attrs.get('band', '')}, inclination "
                 f"{pc.attrs.get('inclination_deg', 90):g} deg", fontsize=10)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def plot_phase_curve_family(pc: xr.Dataset, path: str | os.PathLike | None = None,
                            overwrite: bool = False):
    """Phase curves of a sweep table: one panel per value of the second swept axis, one line
    per value of the first (coloured), transit and eclipse marked."""
    import numpy as np

    from torrid.interface.plots import plt, save_figure

    flux = pc["flux_ratio"]
    dims = [d for d in flux.dims if d != "phase"]
    if len(dims) == 1:
        flux = flux.expand_dims(_panel=[0])
        dims = [dims[0], "_panel"]
    first, second = dims[:2]
    rest = {d: 0 for d in dims[2:]}
    flux = flux.isel(rest)
    n = flux.sizes[second]
    fig, axes = plt.subplots(1, n, figsize=(3.2 * n, 3.4), sharey=True, squeeze=False,
                             constrained_layout=True)
    colours = plt.cm.viridis(np.linspace(0, 0.9, flux.sizes[first]))
    for k, ax in enumerate(axes[0]):
        for i, colour in enumerate(colours):
            curve = flux.isel({first: i, second: k})
            ax.plot(pc["phase"], curve, color=colour,
                    label=f"{float(flux[first][i]):g}" if first in flux.coords else str(i))
        ax.axvline(0.5, color="grey", ls="--", lw=0.8)
        title = (f"{second.replace('_', ' ')} = {float(flux[second][k]):g}"
                 if second in flux.coords and second != "_panel" else "")
        ax.set_title(title, fontsize=9)
        ax.set_xlabel("orbital phase")
    axes[0][0].set_ylabel("flux ratio (ppm)")
    axes[0][-1].legend(title=first.replace("_", " "), fontsize=7, title_fontsize=7)
    fig.suptitle(f"phase curves over the sweep ({pc.attrs.get('band', '')})", fontsize=10)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)
