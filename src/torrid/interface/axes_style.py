"""The look of torrid's plots, shared by every figure: readable fonts, axis labels in words
with units from the settings table, rounded tick labels on log axes, ``inf`` drawn as "none"
at the end of its axis, values written into the cells of small grids, contours only on grids
large enough for them, and the markers of non-steady, failed, missing and undefined points.

Rules (our choices, stated so that a reader of a figure knows them):

* values are written into the cells when a grid has at most :data:`MAX_CELLS_WITH_VALUES`
  cells (beyond that the numbers no longer fit a readable font) and is too small for
  contours;
* contours are drawn only when both axes have at least :data:`MIN_POINTS_FOR_CONTOURS`
  points: a contour through a k x k grid is a piecewise-linear interpolation between the cell
  centres, and with fewer than about six points per axis its lines show the interpolation,
  not the field (common practice, not a published rule);
* ``inf`` (no drag, no forcing) is placed one grid step beyond the largest finite value of a
  log-spaced axis (or one mean step on a linear one), labelled "none", behind a dotted line.
"""

from __future__ import annotations

import contextlib
import math

import matplotlib

matplotlib.use("Agg")  # no screen needed: figures are written as PNG or returned
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import xarray as xr  # noqa: E402

#: A grid with at most this many cells gets its values written in.
MAX_CELLS_WITH_VALUES = 36
#: Contours need at least this many points along both axes.
MIN_POINTS_FOR_CONTOURS = 6
#: Colour scales of maps span at least this fraction of the equilibrium's range, so that a
#: featureless map (0.1 km of structure on a 400 km layer) does not look structured.
MIN_COLOUR_RANGE_FRACTION = 0.02
#: Font sizes (points) of the figures: readable on a slide and in a two-column paper.
FONTS = {"font.size": 11, "axes.titlesize": 11, "axes.labelsize": 11, "xtick.labelsize": 10,
         "ytick.labelsize": 10, "legend.fontsize": 9, "figure.titlesize": 13}
#: What the point markers mean, with their matplotlib style.
MARKERS = {
    "not steady": dict(marker="^", ms=7, mfc="none", mec="tab:orange", mew=1.6),
    "failed": dict(marker="x", ms=9, mfc="none", mec="red", mew=2.0),
    "missing": dict(marker="o", ms=8, mfc="none", mec="grey", mew=1.5),
    "undefined": dict(marker="s", ms=7, mfc="none", mec="tab:cyan", mew=1.6),
}


@contextlib.contextmanager
def figure_style():
    """The fonts and line widths of torrid's figures (a matplotlib rc context)."""
    with plt.rc_context({**FONTS, "axes.linewidth": 0.9, "lines.linewidth": 1.8,
                         "axes.spines.top": True, "axes.spines.right": True}):
        yield


def rounded(value, digits: int = 2) -> str:
    """A tick label: ``digits`` significant figures, no trailing zeros, ``inf`` as "none"
    (0.464159 -> 0.46, 2.15443 -> 2.2, 100 -> 100, 0.1 -> 0.1)."""
    value = value.item() if hasattr(value, "item") else value
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value
    value = float(value)
    if math.isinf(value):
        return "none" if value > 0 else "-inf"
    if value == 0:
        return "0"
    magnitude = math.floor(math.log10(abs(value)))
    if magnitude >= digits - 1:
        return f"{round(value):d}"
    return f"{round(value, digits - 1 - magnitude):.{max(0, digits - 1 - magnitude)}f}".rstrip(
        "0").rstrip(".")


def coordinate_label(coord: xr.DataArray, with_unit: bool = True) -> str:
    """Words and units of a swept coordinate, from the settings table row of its
    ``config_key`` (e.g. "radiative timescale (days)"); its long_name otherwise."""
    key = coord.attrs.get("config_key")
    if key:
        from torrid.io.settings import setting

        try:
            row = setting(key)
        except (KeyError, ValueError):
            row = None
        if row is not None:
            return row.axis_label() if with_unit else row.label
    name = coord.attrs.get("long_name", str(coord.name).replace("_", " "))
    units = coord.attrs.get("units")
    return f"{name} ({units})" if with_unit and units and units != "1" else name


def value_label(coord: xr.DataArray, value) -> str:
    """"radiative timescale 0.46 days" for one value of a swept coordinate."""
    word = coordinate_label(coord, with_unit=False)
    units = coord.attrs.get("units", "")
    text = rounded(value)
    return f"{word} {text}" + (f" {units}" if units not in ("", "1") and text != "none" else "")


class Axis:
    """Where the values of one swept coordinate go on a plot axis.

    Attributes
    ----------
    centres, edges : numpy.ndarray
        Cell centres (n) and edges (n + 1) in data units of the plot axis.
    scale : str
        ``log``, ``linear`` or ``categories`` (evenly spaced, labelled).
    labels : list of str
        Tick label of every value (rounded; ``inf`` as "none").
    break_at : float or None
        Edge between the last finite value and ``inf`` (a dotted line is drawn there).
    """

    def __init__(self, coord: xr.DataArray):
        self.coord = coord
        values = np.asarray(coord.values)
        self.labels = [rounded(v) for v in values]
        self.break_at = None
        numeric = np.issubdtype(values.dtype, np.number) and values.dtype != bool
        finite = np.isfinite(values.astype(float)) if numeric else np.zeros(values.shape, bool)
        order_ok = numeric and finite.sum() >= 2 and (
            np.all(np.diff(values[finite]) > 0) or np.all(np.diff(values[finite]) < 0))
        if not numeric or values.size < 2 or not order_ok or not self._inf_only_at_end(values,
                                                                                        finite):
            self.centres = np.arange(values.size, dtype=float)
            self.edges = np.arange(values.size + 1) - 0.5
            self.scale = "categories"
            return
        x = values[finite].astype(float)
        log = coord.attrs.get("spacing") == "log" or (
            (x > 0).all() and x.size > 2
            and np.allclose(np.diff(np.log(x)), np.log(x[1] / x[0]), rtol=1e-3))
        log = bool(log and (x > 0).all())
        t = np.log(x) if log else x
        step = float(np.mean(np.diff(t)))
        if finite[-1] and finite[0]:
            positions = t
        elif not finite[-1]:  # inf last: one step beyond the last (the largest) finite value
            positions = np.append(t, t[-1] + step)
        else:  # inf first, before the largest finite value
            positions = np.insert(t, 0, t[0] - step)
        inner = 0.5 * (positions[1:] + positions[:-1])
        edges = np.concatenate([[positions[0] - (inner[0] - positions[0])], inner,
                                [positions[-1] + (positions[-1] - inner[-1])]])
        back = np.exp if log else (lambda a: a)
        self.centres, self.edges = back(positions), back(edges)
        if not finite.all():
            self.break_at = float(back(inner[-1] if not finite[-1] else inner[0]))
        self.scale = "log" if log else "linear"

    @staticmethod
    def _inf_only_at_end(values, finite) -> bool:
        """At most one non-finite value, +inf, next to the largest finite value."""
        missing = np.flatnonzero(~finite)
        if missing.size == 0:
            return True
        if missing.size > 1 or not np.isposinf(values[missing[0]]):
            return False
        x = values[finite].astype(float)
        return (missing[0] == values.size - 1 and x[-1] == x.max()) or (
            missing[0] == 0 and x[0] == x.max())

    def inset(self, index: int, fraction: float) -> float:
        """A position ``fraction`` of the way across cell ``index`` (in the axis's scale)."""
        lo, hi = self.edges[index], self.edges[index + 1]
        if self.scale == "log":
            return float(np.exp(np.log(lo) + fraction * (np.log(hi) - np.log(lo))))
        return float(lo + fraction * (hi - lo))

    def apply(self, ax, which: str) -> None:
        """Scale, ticks, labels and the inf break on the ``x`` or ``y`` axis of ``ax``."""
        get = (lambda name: getattr(ax, f"set_{which}{name}"))
        if self.scale == "log":
            get("scale")("log")
        get("ticks")(self.centres)
        get("ticklabels")(self.labels)
        axis = ax.xaxis if which == "x" else ax.yaxis
        axis.set_minor_locator(plt.NullLocator())
        get("lim")(min(self.edges[0], self.edges[-1]), max(self.edges[0], self.edges[-1]))
        get("label")(coordinate_label(self.coord))
        if self.break_at is not None:
            line = ax.axvline if which == "x" else ax.axhline
            line(self.break_at, color="0.3", ls=":", lw=1.2)


def colour_limits(values: np.ndarray, equilibrium_span: float) -> tuple[float, float]:
    """The range of ``values``, widened about its middle to at least
    :data:`MIN_COLOUR_RANGE_FRACTION` of ``equilibrium_span`` (same units)."""
    low, high = float(np.nanmin(values)), float(np.nanmax(values))
    floor = MIN_COLOUR_RANGE_FRACTION * equilibrium_span
    if np.isfinite(floor) and high - low < floor:
        middle = 0.5 * (low + high)
        low, high = middle - floor / 2, middle + floor / 2
    return low, high


def draws_contours(shape) -> bool:
    """True if a grid of this shape (ny, nx) is large enough for contours (module docstring)."""
    return min(shape) >= MIN_POINTS_FOR_CONTOURS


def writes_values(shape) -> bool:
    """True if a grid of this shape is small enough to write its values into the cells (and
    too small for contours, which replace them)."""
    return int(np.prod(shape)) <= MAX_CELLS_WITH_VALUES and not draws_contours(shape)


def cell_decimals(values: np.ndarray) -> int:
    """Decimals of the numbers written into the cells of one panel: two significant figures
    of its largest magnitude, at least one decimal below 100 (0.92 -> 2, 33 -> 1, 1.3 -> 1)."""
    finite = np.abs(values[np.isfinite(values)])
    largest = float(finite.max()) if finite.size else 1.0
    if largest == 0 or largest >= 100:
        return 0
    return max(1, 1 - math.floor(math.log10(largest)))


def write_cell_values(ax, xaxis: Axis, yaxis: Axis, values: np.ndarray, mesh,
                      undefined: np.ndarray | None = None) -> None:
    """Write each cell's value at its centre (the panel's decimals, :func:`cell_decimals`),
    black or white against its colour; cells in ``undefined`` get "n/d" (not defined), other
    NaN cells nothing."""
    decimals = cell_decimals(values)
    for iy, y in enumerate(yaxis.centres):
        for ix, x in enumerate(xaxis.centres):
            value = values[iy, ix]
            if undefined is not None and undefined[iy, ix]:
                ax.text(x, y, "n/d", ha="center", va="center", color="0.25", fontsize=11,
                        style="italic")
                continue
            if not np.isfinite(value):
                continue
            rgba = mesh.cmap(mesh.norm(value))
            light = 0.299 * rgba[0] + 0.587 * rgba[1] + 0.114 * rgba[2]
            text = f"{value:.{decimals}f}"
            if text.lstrip("-").strip("0.") == "":
                text = text.lstrip("-")  # no "-0.0"
            ax.text(x, y, text, ha="center", va="center", fontsize=11,
                    color="black" if light > 0.5 else "white")


def mark_points(ax, xaxis: Axis, yaxis: Axis | None, masks: dict[str, np.ndarray]) -> None:
    """Markers in the upper-left corner of the cells of each kind in ``masks`` (kind ->
    boolean array (ny, nx), kinds of :data:`MARKERS`), one legend entry per kind present."""
    for kind, mask in masks.items():
        mask = np.asarray(mask, bool)
        if not mask.any():
            continue
        if yaxis is None:
            ix = np.flatnonzero(mask)
            xs = [xaxis.centres[i] for i in ix]
            ax.plot(xs, np.zeros(len(xs)), ls="none", transform=ax.get_xaxis_transform(),
                    label=kind, clip_on=False, **{**MARKERS[kind], "ms": 8})
            continue
        iy, ix = np.nonzero(mask)
        slot = list(MARKERS).index(kind)
        xs = [xaxis.inset(i, 0.16 + 0.2 * (slot % 2)) for i in ix]
        ys = [yaxis.inset(j, 0.84 - 0.2 * (slot // 2)) for j in iy]
        ax.plot(xs, ys, ls="none", label=kind, **MARKERS[kind])


def status_masks(table: xr.Dataset, dims: list[str]) -> dict[str, np.ndarray]:
    """Masks (over ``dims``, in that order) of the points that did not reach their steady
    state, failed, or have no file yet."""
    status = table["run_status"].transpose(*dims).values.astype(str)
    masks = {"not steady": status == "complete", "failed": status == "failed",
             "missing": status == "missing"}
    return masks


def legend_below(fig, axes, title: str | None = None) -> None:
    """One legend for the markers of all panels, below them (nothing if there are none)."""
    handles, labels = {}, []
    for ax in np.ravel(axes):
        for handle, label in zip(*ax.get_legend_handles_labels()):
            if label not in handles:
                handles[label] = handle
                labels.append(label)
    if handles:
        fig.legend([handles[label] for label in labels], labels, loc="outside lower center",
                   ncol=min(4, len(labels)), frameon=False, title=title)
