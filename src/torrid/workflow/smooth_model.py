"""A smooth model between grid points, for an interpolated best estimate and a posterior sampler.

The node kernels D_k of :mod:`torrid.workflow.fit_model` are interpolated over the plane of
the two main swept axes by a tensor product of cubic splines (scipy's not-a-knot
``CubicSpline``, twice continuously differentiable) in the fractional grid index u of each axis
(:mod:`torrid.workflow.fit_axes`: log10 tau where an axis is log-spaced, the drag rate between
the longest finite drag time and ``inf``). The parameters are (u_1, u_2) and, with free end
points, (T_night, T_day); in shape-only mode each curve's offset and amplitude are profiled
analytically (weighted linear least squares) inside the chi-square.

Priors (posterior): uniform in u over the grid's range (log-uniform in tau for log-spaced axes;
uniform in the drag rate in the cell next to ``inf``), uniform in T_night and T_day within
their bounds, with T_day >= T_night.
"""

from __future__ import annotations

import numpy as np

from torrid.workflow.fit_axes import AxisCoordinate


class CardinalSplines:
    """The cardinal cubic splines of ``size`` grid points: weights (len(u), size) of the
    interpolant through the grid values at fractional indices u."""

    def __init__(self, size: int):
        from scipy.interpolate import CubicSpline

        self.size = size
        self._spline = (CubicSpline(np.arange(size, dtype=float), np.eye(size), axis=0)
                        if size > 1 else None)

    def __call__(self, u) -> np.ndarray:
        u = np.atleast_1d(np.asarray(u, float))
        if self._spline is None:
            return np.ones((u.size, 1))
        return self._spline(u)


def cardinal_weights(size: int, u) -> np.ndarray:
    """Weights (len(u), size) of the cubic-spline interpolant through the grid values at u."""
    return CardinalSplines(size)(u)


def _contract(values: np.ndarray, c1: np.ndarray, c2: np.ndarray) -> np.ndarray:
    """sum_xy values[r, x, y, o] c1[r, x] c2[r, y] -> (r, o)."""
    partial = np.einsum("rxyo,rx->ryo", values, c1)
    return np.einsum("ryo,ry->ro", partial, c2)


def shape_profile(y, w, model):
    """Best offset a and amplitude b of a + b m_hat (weighted least squares), m_hat the model
    normalised to zero mean and unit peak-to-peak range over the measured phases.

    ``model`` is (..., nobs); returns (chi2, a, b) of shape (...)."""
    mean = model.mean(axis=-1, keepdims=True)
    span = np.ptp(model, axis=-1, keepdims=True)
    m_hat = np.where(span > 0, (model - mean) / np.where(span > 0, span, 1), 0.0)
    s0, s1, s2 = w.sum(), (w * m_hat).sum(-1), (w * m_hat**2).sum(-1)
    t0, t1 = (w * y).sum(), (w * y * m_hat).sum(-1)
    det = s0 * s2 - s1**2
    with np.errstate(divide="ignore", invalid="ignore"):
        b = np.where(det > 0, (s0 * t1 - s1 * t0) / det, 0.0)
    a = (t0 - b * s1) / s0
    chi2 = (w * (y - a[..., None] - b[..., None] * m_hat) ** 2).sum(-1)
    return chi2, a, b


class SmoothModel:
    """chi-square of the interpolated model at parameter vectors (vectorised over rows).

    Parameters
    ----------
    models : list of CurveModel
    axes : list of two AxisCoordinate
    plane : ndarray of int (n1, n2)
        Flat grid-point indices of the plane, in the axes' sorted order.
    mode : str
        ``fixed``, ``free`` or ``shape``.
    fixed : (float, float)
        The assumed end points (K), used by ``fixed`` and ``shape``.
    bounds : ((float, float), (float, float))
        Bounds of T_night and T_day (K) for ``free``.
    """

    def __init__(self, models, axes: list[AxisCoordinate], plane: np.ndarray, mode: str,
                 fixed, bounds):
        self.models, self.axes, self.mode = models, axes, mode
        self.fixed, self.bounds = tuple(fixed), tuple(bounds)
        self.names = [a.name for a in axes] + (["night_temperature", "day_temperature"]
                                               if mode == "free" else [])
        self._kernels = [m.kernels[plane] for m in models]  # (n1, n2, nobs, K)
        if any(not np.isfinite(k).all() for k in self._kernels):
            raise ValueError("some grid points of the plane have no maps (failed or missing): "
                             "the smooth model needs every point")
        self._fixed_flux = [m.scale * (k @ m.node_radiance(*self.fixed))
                            for m, k in zip(models, self._kernels)]  # (n1, n2, nobs)
        self._splines = [CardinalSplines(a.size) for a in axes]

    @property
    def lower(self) -> np.ndarray:
        low = [0.0, 0.0] + ([self.bounds[0][0], self.bounds[1][0]] if self.mode == "free" else [])
        return np.array(low)

    @property
    def upper(self) -> np.ndarray:
        high = [a.size - 1.0 for a in self.axes]
        if self.mode == "free":
            high += [self.bounds[0][1], self.bounds[1][1]]
        return np.array(high)

    def inside(self, theta: np.ndarray) -> np.ndarray:
        """True where ``theta`` (rows) lies within the prior's support."""
        theta = np.atleast_2d(theta)
        ok = np.all((theta >= self.lower) & (theta <= self.upper), axis=1)
        if self.mode == "free":
            ok &= theta[:, 3] >= theta[:, 2]
        return ok

    def curves(self, theta: np.ndarray) -> list[np.ndarray]:
        """Model flux (rows, nobs) of each curve at ``theta`` (before shape profiling)."""
        theta = np.atleast_2d(np.asarray(theta, float))
        c1, c2 = self._splines[0](theta[:, 0]), self._splines[1](theta[:, 1])
        out = []
        for model, kernels, fixed_flux in zip(self.models, self._kernels, self._fixed_flux):
            if self.mode == "free":
                radiance = model.node_radiance(theta[:, 2], theta[:, 3])  # (rows, K)
                n1, n2, nobs, nk = kernels.shape
                flux = model.scale * (radiance @ kernels.reshape(-1, nk).T)  # (rows, n1 n2 nobs)
                out.append(_contract(flux.reshape(-1, n1, n2, nobs), c1, c2))
            else:
                out.append((c1 @ fixed_flux.reshape(n1 := fixed_flux.shape[0], -1)).reshape(
                    -1, fixed_flux.shape[1], fixed_flux.shape[2]).__mul__(c2[:, :, None]).sum(1))
        return out

    def chi_square(self, theta: np.ndarray) -> np.ndarray:
        """chi-square at each row of ``theta`` (shape-only: offsets and amplitudes profiled)."""
        total = 0.0
        for model, flux in zip(self.models, self.curves(theta)):
            obs = model.observed
            w = 1 / obs.error_ppm**2
            if self.mode == "shape":
                total = total + shape_profile(obs.flux_ratio_ppm, w, flux)[0]
            else:
                total = total + (w * (obs.flux_ratio_ppm - flux) ** 2).sum(-1)
        return np.asarray(total)

    def log_probability(self, theta: np.ndarray) -> np.ndarray:
        """log posterior (up to a constant): -chi2 / 2 inside the prior, -inf outside."""
        theta = np.atleast_2d(theta)
        out = np.full(theta.shape[0], -np.inf)
        ok = self.inside(theta)
        if ok.any():
            out[ok] = -0.5 * self.chi_square(theta[ok])
        return out

    def minimum(self, start: np.ndarray) -> tuple[np.ndarray, float]:
        """Minimise chi-square from ``start`` within the bounds (scipy Powell)."""
        from scipy.optimize import minimize

        def objective(x):
            if self.mode == "free" and x[3] < x[2]:
                return 1e30
            return float(self.chi_square(x[None])[0])

        start = np.clip(np.asarray(start, float), self.lower, self.upper)
        result = minimize(objective, start, method="Powell",
                          bounds=list(zip(self.lower, self.upper)),
                          options={"xtol": 1e-5, "ftol": 1e-10, "maxfev": 20000})
        if result.fun <= objective(start):
            return np.asarray(result.x), float(result.fun)
        return start, objective(start)
