"""Features of a periodic curve sampled uniformly: refined extrema and the first harmonic.

All functions work along the last axis (samples k = 0..n-1 at phases k / n of one period) and
broadcast over any leading axes (e.g. the parameters of a sweep).
"""

from __future__ import annotations

import numpy as np


def parabolic_extremum(values, maximum: bool = True) -> tuple[np.ndarray, np.ndarray]:
    """Fractional index and value of the maximum (or minimum) of periodic samples.

    The parabola through the extreme sample f_0 and its neighbours f_-, f_+ has its vertex at
    k + (f_- - f_+) / (2 (f_- - 2 f_0 + f_+)) with value f_0 - (f_- - f_+)^2 / (8 (f_- - 2 f_0
    + f_+)); its error for a smooth curve is of order the third derivative times the sample
    spacing squared. A flat neighbourhood gives the sample itself.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Fractional index in [0, n) and the refined extreme value, of the leading shape.
    """
    f = np.asarray(values, dtype=float)
    sign = 1.0 if maximum else -1.0
    g = sign * f
    n = g.shape[-1]
    k = np.argmax(g, axis=-1)
    take = lambda idx: np.take_along_axis(g, (idx % n)[..., None], axis=-1)[..., 0]  # noqa: E731
    fm, f0, fp = take(k - 1), take(k), take(k + 1)
    curvature = fm - 2.0 * f0 + fp
    ok = curvature < 0
    safe = np.where(ok, curvature, -1.0)
    shift = np.where(ok, 0.5 * (fm - fp) / safe, 0.0)
    peak = np.where(ok, f0 - (fm - fp) ** 2 / (8.0 * safe), f0)
    return np.remainder(k + shift, n), sign * peak


def first_harmonic(values) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Mean, semi-amplitude and phase of maximum (cycles, [0, 1)) of the first harmonic.

    With c_1 = (1/n) sum_k f_k exp(-2 pi i k / n), the first harmonic is
    2 |c_1| cos(2 pi (x - x_1)) with x_1 = -arg(c_1) / (2 pi) (x the phase in cycles).
    """
    f = np.asarray(values, dtype=float)
    n = f.shape[-1]
    c1 = np.fft.rfft(f, axis=-1)[..., 1] / n
    return f.mean(axis=-1), 2 * np.abs(c1), np.remainder(-np.angle(c1) / (2 * np.pi), 1.0)


def unwrap_degrees(angle_deg) -> np.ndarray:
    """Remove 360-degree jumps from a series of angles (degrees); NaN entries (undefined
    angles) stay NaN and are skipped, so the finite neighbours around them are joined."""
    values = np.array(angle_deg, dtype=float)
    finite = np.isfinite(values)
    values[finite] = np.unwrap(values[finite], period=360.0)
    return values


def wrap_degrees(angle_deg):
    """Wrap angles (degrees) to [-180, 180) (arrays or scalars)."""
    wrapped = np.remainder(np.asarray(angle_deg, dtype=float) + 180.0, 360.0) - 180.0
    return np.where(wrapped >= 180.0, -180.0, wrapped)  # the remainder can round up to 360
