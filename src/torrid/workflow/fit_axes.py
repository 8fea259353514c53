"""The coordinate a fit interpolates a swept axis in: the fractional grid index u.

A swept axis of n values (sorted ascending, ``inf`` last) is mapped to u = 0 ... n - 1, grid
point i at u = i. Between two grid points the value follows

* a geometric (log-linear) law when the axis is log-spaced (so interpolating in u is
  interpolating in log10 of the value, and a prior uniform in u is log-uniform);
* a linear law otherwise (uniform in u = uniform in the value within each cell);
* in the cell between the largest finite value and ``inf`` (no drag): linear in the *rate*
  1 / value, which goes from 1 / value_max to 0 (a drag timescale of ``inf`` is a drag rate of
  0, and the drag term of the equations is linear in the rate, so the model's response is
  smooth there).

This lets a fit interpolate across ``inf`` and lets a posterior sampler move into the last
cell. The value at u is monotonic in u, so quantiles of u map to quantiles of the value.
"""

from __future__ import annotations

import numpy as np


def is_log_spaced(values) -> bool:
    """True for three or more positive, finite, geometrically (not also linearly) spaced values."""
    values = np.asarray(values, float)
    if values.size < 3 or np.any(values <= 0) or not np.all(np.isfinite(values)):
        return False
    steps = np.diff(np.log10(values))
    return bool(np.allclose(steps, steps[0], rtol=1e-6)) and not np.allclose(
        np.diff(values), np.diff(values)[0], rtol=1e-6)


class AxisCoordinate:
    """One swept axis and its interpolation coordinate u (fractional grid index).

    Parameters
    ----------
    name : str
        The dimension's name (e.g. ``drag_timescale_days``).
    values : array_like
        The axis values in the table's order; may end in ``inf``.

    Attributes
    ----------
    order : ndarray of int
        Indices that sort the table's axis ascending (``inf`` last).
    sorted_values : ndarray
        The values in that order.
    log : bool
        True when the finite values are log-spaced (or a positive pair before ``inf``).
    """

    def __init__(self, name: str, values):
        values = np.asarray(values, float)
        if values.ndim != 1 or values.size < 1 or np.isnan(values).any():
            raise ValueError(f"{name}: an axis needs numeric values without NaN")
        self.name = name
        self.order = np.argsort(values, kind="stable")
        self.sorted_values = values[self.order]
        finite = self.sorted_values[np.isfinite(self.sorted_values)]
        if np.isinf(self.sorted_values[:-1]).any() or np.isneginf(self.sorted_values).any():
            raise ValueError(f"{name}: only the largest value may be inf")
        self.has_inf = bool(np.isposinf(self.sorted_values[-1]))
        self.log = is_log_spaced(finite) or (finite.size <= 2 and np.all(finite > 0)
                                              and self.has_inf)

    @property
    def size(self) -> int:
        return self.sorted_values.size

    def value(self, u) -> np.ndarray:
        """The axis value at fractional index ``u`` (clipped to 0 ... n - 1)."""
        u = np.clip(np.asarray(u, float), 0, self.size - 1)
        if self.size == 1:
            return np.full(u.shape, self.sorted_values[0])
        i = np.minimum(np.floor(u).astype(int), self.size - 2)
        f = u - i
        lo, hi = self.sorted_values[i], self.sorted_values[i + 1]
        with np.errstate(divide="ignore", invalid="ignore"):
            if self.log:
                out = np.where(np.isinf(hi), 0.0, lo * (np.abs(hi / lo)) ** f)
            else:
                out = np.where(np.isinf(hi), 0.0, lo + (hi - lo) * f)
            rate = (1 - f) / lo  # last cell: linear in the rate 1 / value, inf -> 0
            out = np.where(np.isinf(hi), np.where(f >= 1, np.inf, 1 / rate), out)
        return out

    def index(self, value) -> np.ndarray:
        """The fractional index of ``value`` (inverse of :meth:`value`; clipped to the axis)."""
        v = np.asarray(value, float)
        knots = np.arange(self.size, dtype=float)
        finite = self.sorted_values[np.isfinite(self.sorted_values)]
        nf = finite.size
        with np.errstate(divide="ignore", invalid="ignore"):
            coord = np.log10(finite) if self.log else finite
            x = np.log10(v) if self.log else v
            inside = np.interp(x, coord, knots[:nf]) if nf > 1 else np.zeros(v.shape)
            if self.has_inf and nf >= 1:
                last = 1.0 - finite[-1] / v  # rate from 1 / value_max (f = 0) to 0 (f = 1)
                inside = np.where(v > finite[-1], nf - 1 + np.clip(last, 0, 1), inside)
        return np.asarray(inside, float)

    def describe(self) -> str:
        """How the axis is interpolated, for file attributes."""
        law = "log-linear" if self.log else "linear"
        text = f"{self.name}: {law} between grid points"
        if self.has_inf:
            text += "; linear in the rate 1/value between the largest finite value and inf"
        return text
