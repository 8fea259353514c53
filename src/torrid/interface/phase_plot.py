"""Plot of a phase curve: flux ratio against orbital phase, eclipse and transit marked."""

from __future__ import annotations

import os

import numpy as np
import xarray as xr

from torrid.interface.axes_style import coordinate_label, figure_style, rounded, value_label
from torrid.interface.plots import plt, save_figure

#: at most this many curves of a sweep are drawn in one plot
MAX_CURVES = 12
#: tick steps (K) tried for the brightness-temperature axis, the first giving 3-8 ticks
TEMPERATURE_STEPS = (1, 2, 5, 10, 20, 25, 50, 100, 200, 250, 500, 1000)


def brightness_temperature_axis(ax, flux: np.ndarray, temperature: np.ndarray):
    """A right-hand axis of band brightness temperature (K) beside a flux-ratio axis.

    The flux ratio of a disk is (R_p/R_s)^2 B_band(T_b) / B_band(T_star), monotonic in T_b,
    so the axis puts round temperatures at the flux ratios the curve's own samples give them
    (linear interpolation between samples, within the range the curve covers).
    """
    flux = np.asarray(flux, float).ravel()
    temperature = np.asarray(temperature, float).ravel()
    keep = np.isfinite(flux) & np.isfinite(temperature)
    flux, temperature = flux[keep], temperature[keep]
    right = ax.twinx()
    right.set_ylim(ax.get_ylim())
    right.set_ylabel("band brightness temperature (K)")
    if flux.size < 2 or np.ptp(temperature) <= 0:
        right.set_yticks([])
        return right
    order = np.argsort(temperature)
    temperature, flux = temperature[order], flux[order]
    low, high = temperature[0], temperature[-1]
    step = next((s for s in TEMPERATURE_STEPS if 3 <= (high - low) / s <= 8),
                TEMPERATURE_STEPS[-1] if high - low > 8 else TEMPERATURE_STEPS[0])
    ticks = np.arange(np.ceil(low / step) * step, high + 1e-9, step)
    if ticks.size == 0:
        ticks = np.array([0.5 * (low + high)])
    right.set_yticks(np.interp(ticks, temperature, flux), [rounded(t, 4) for t in ticks])
    return right


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
    with figure_style():
        fig = _draw_phase_curve(pc, flux, curves, phase, ecl)
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)


def _draw_phase_curve(pc, flux, curves, phase, ecl):
    fig, ax = plt.subplots(figsize=(8.5, 4.6), layout="constrained")
    for curve in curves:
        ax.plot(phase, np.append(curve.values, curve.values[0]), lw=1.8,
                label=_curve_label(pc, curve) if len(curves) > 1 else None)
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
        else:
            ax.plot([], [], ls="none", label="map hotspot undefined (the map is too flat)")
    if ax.get_legend_handles_labels()[0]:
        ax.legend(loc="best", fontsize=8)
    ax.set_xlim(0, 1)
    ax.set_xlabel("orbital phase (0: mid-transit)")
    ax.set_ylabel("planet-to-star flux ratio (ppm)")
    ax.set_title(f"thermal phase curve, {pc.attrs.get('band', '')}, inclination "
                 f"{pc.attrs.get('inclination_deg', 90):g} deg", fontsize=10)
    if "brightness_temperature" in pc:
        brightness_temperature_axis(ax, pc["flux_ratio"].values,
                                    pc["brightness_temperature"].values)
    return fig


def _curve_label(pc, curve) -> str:
    """"radiative timescale 0.46 days, drag timescale 10 days" for one curve of a sweep."""
    parts = []
    for name in curve.coords:
        if name in pc.coords and name in pc["flux_ratio"].dims and name != "phase":
            parts.append(value_label(pc[name], curve[name].values))
    return ", ".join(parts)


def plot_phase_curve_family(pc: xr.Dataset, path: str | os.PathLike | None = None,
                            overwrite: bool = False):
    """Phase curves of a sweep table: one panel per value of the second swept axis, one line
    per value of the first (coloured), eclipse marked, a brightness-temperature axis on the
    right of the last panel (the flux-ratio axis is shared).

    Returns the figure, or writes the PNG ``path``.
    """
    flux = pc["flux_ratio"]
    dims = [d for d in flux.dims if d != "phase"]
    if len(dims) == 1:
        flux = flux.expand_dims(_panel=[0])
        dims = [dims[0], "_panel"]
    first, second = dims[:2]
    rest = {d: flux.sizes[d] // 2 for d in dims[2:]}
    flux = flux.isel(rest)
    n = flux.sizes[second]
    with figure_style():
        fig, axes = plt.subplots(1, n, figsize=(3.4 * n + 1.2, 3.9), sharey=True,
                                 squeeze=False, layout="constrained")
        colours = plt.cm.viridis(np.linspace(0, 0.9, flux.sizes[first]))
        for k, ax in enumerate(axes[0]):
            for i, colour in enumerate(colours):
                curve = flux.isel({first: i, second: k})
                label = (rounded(flux[first].values[i]) if first in flux.coords else str(i))
                ax.plot(pc["phase"], curve, color=colour, label=label)
            ax.axvline(0.5, color="grey", ls="--", lw=0.8)
            if second in flux.coords and second != "_panel":
                ax.set_title(value_label(pc[second], flux[second].values[k]), fontsize=10)
            ax.set_xlabel("orbital phase")
            ax.set_xlim(0, 1)
        axes[0][0].set_ylabel("planet-to-star flux ratio (ppm)")
        if "brightness_temperature" in pc:
            brightness_temperature_axis(axes[0][-1], pc["flux_ratio"].values,
                                        pc["brightness_temperature"].values)
        title = coordinate_label(pc[first]) if first in pc.coords else first
        fig.legend(*axes[0][0].get_legend_handles_labels(), loc="outside right center",
                   title=title.replace(" (", "\n("), frameon=False)
        fig.suptitle(f"phase curves over the sweep ({pc.attrs.get('band', '')}; dashed: "
                     "eclipse)")
    if path is None:
        return fig
    return save_figure(fig, path, overwrite)
