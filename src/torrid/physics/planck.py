"""Planck's law integrated over an instrument band, and its inverse (brightness temperature).

A band is a set of quadrature nodes (wavelengths, m) and weights such that the band radiance of a
blackbody of temperature T is

    B_band(T) = sum_q weight_q B_lambda(lambda_q, T)
              ~= int R(lambda) w(lambda) B_lambda(lambda, T) dlambda

with B_lambda = 2 h c^2 / lambda^5 / (exp(h c / (lambda k T)) - 1) (W m^-3 sr^-1), R the
response (a top-hat, or a tabulated curve interpolated linearly between its rows) and w = 1
(energy weighting; B_band in W m^-2 sr^-1) or w = lambda / (h c) (photon counting; B_band in
photons s^-1 m^-2 sr^-1). Only ratios of band radiances (planet over star) and their inverse
enter the phase curves, so the response needs no normalisation.

Quadrature: composite Gauss-Legendre, ``order`` nodes on each panel; the panels subdivide the
band geometrically (top-hat; equal steps in log wavelength suit the Planck function over wide
bands) or each interval of the tabulated response linearly, so the piecewise-linear response
times the smooth Planck function is integrated to near round-off (the convergence with the
number of nodes is checked in the tests).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import constants

H_PLANCK = constants.h  # J s
C_LIGHT = constants.c  # m s^-1
K_BOLTZMANN = constants.k  # J K^-1

#: default Gauss-Legendre nodes per panel, and the least number of panels across a band
DEFAULT_ORDER = 8
DEFAULT_MIN_PANELS = 4
#: temperatures per block when evaluating big arrays (bounds the (n, nodes) work array)
_BLOCK = 1 << 16


def planck_wavelength(wavelength_m, temperature_k):
    """Spectral radiance B_lambda(lambda, T) of a blackbody (W m^-3 sr^-1).

    Parameters
    ----------
    wavelength_m, temperature_k : array_like
        Wavelength (m) and temperature (K), broadcast against each other; T <= 0 gives 0,
        NaN gives NaN.
    """
    lam = np.asarray(wavelength_m, dtype=float)
    t = np.asarray(temperature_k, dtype=float)
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        x = H_PLANCK * C_LIGHT / (lam * K_BOLTZMANN * t)
        out = 2 * H_PLANCK * C_LIGHT**2 / lam**5 / np.expm1(x)
    return np.where(t > 0, out, np.where(np.isnan(t), np.nan, 0.0))


@dataclass(frozen=True, eq=False)
class Band:
    """Quadrature of a band-integrated Planck function.

    Parameters
    ----------
    wavelength_m : numpy.ndarray
        Quadrature nodes (m), ascending.
    weight : numpy.ndarray
        Quadrature weights (m for energy weighting, m J^-1 for photon counting), including
        the response and, for photon counting, lambda / (h c).
    photon : bool
        True for photon counting, False for energy weighting.
    description : str
        Human-readable band (recorded in output attributes).
    """

    wavelength_m: np.ndarray
    weight: np.ndarray
    photon: bool
    description: str

    @property
    def units(self) -> str:
        """Units of :meth:`radiance`."""
        return "s-1 m-2 sr-1" if self.photon else "W m-2 sr-1"

    def radiance(self, temperature_k) -> np.ndarray:
        """Band radiance B_band(T) of blackbodies at ``temperature_k`` (any shape; K)."""
        t = np.asarray(temperature_k, dtype=float)
        flat = t.reshape(-1)
        out = np.empty(flat.shape)
        for start in range(0, flat.size, _BLOCK):
            block = flat[start:start + _BLOCK, None]
            out[start:start + _BLOCK] = planck_wavelength(self.wavelength_m, block) @ self.weight
        return out.reshape(t.shape)

    def radiance_derivative(self, temperature_k) -> np.ndarray:
        """d B_band / d T (units of :meth:`radiance` per K) at ``temperature_k`` (> 0)."""
        t = np.asarray(temperature_k, dtype=float)[..., None]
        x = H_PLANCK * C_LIGHT / (self.wavelength_m * K_BOLTZMANN * t)
        with np.errstate(over="ignore", invalid="ignore"):
            factor = np.where(x < 700, x * np.exp(np.minimum(x, 700)) / np.expm1(x), x)
        return (planck_wavelength(self.wavelength_m, t) * factor / t) @ self.weight

    def brightness_temperature(self, radiance, tol: float = 1e-12,
                               max_iter: int = 60) -> np.ndarray:
        """Temperature (K) of the blackbody whose band radiance is ``radiance`` (any shape).

        Newton's iteration on log B_band(T), started from the monochromatic inversion at the
        band's weight-averaged wavelength; non-positive or non-finite radiances give NaN.
        """
        r = np.asarray(radiance, dtype=float)
        good = np.isfinite(r) & (r > 0)
        target = np.where(good, r, 1.0)
        lam = float(self.weight @ self.wavelength_m / self.weight.sum())
        # starting value: B_band(T) ~ B_lambda(lam, T) sum(weight), inverted at lam
        mean_spectral = target / float(self.weight.sum())
        t = H_PLANCK * C_LIGHT / (lam * K_BOLTZMANN
                                  * np.log1p(2 * H_PLANCK * C_LIGHT**2 / lam**5 / mean_spectral))
        for _ in range(max_iter):
            value = self.radiance(t)
            step = (np.log(value) - np.log(target)) * value / self.radiance_derivative(t)
            step = np.clip(step, -0.5 * t, 0.5 * t)  # keep T positive on wild starts
            t = t - step
            if np.all(np.abs(step) <= tol * t):
                break
        return np.where(good, t, np.nan)


def _panel_nodes(edges_m: np.ndarray, order: int) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre nodes and weights on consecutive panels [edges[i], edges[i+1]]."""
    x, w = np.polynomial.legendre.leggauss(order)
    lo, hi = edges_m[:-1, None], edges_m[1:, None]
    half = 0.5 * (hi - lo)
    return (lo + half * (x + 1)).ravel(), (half * w).ravel()


def _photon_factor(wavelength_m: np.ndarray, photon: bool) -> np.ndarray:
    return wavelength_m / (H_PLANCK * C_LIGHT) if photon else np.ones_like(wavelength_m)


def tophat_band(low_m: float, high_m: float, *, photon: bool = True, order: int = DEFAULT_ORDER,
                panels: int = DEFAULT_MIN_PANELS) -> Band:
    """A top-hat band (response 1 between ``low_m`` and ``high_m``, m; 0 < low < high)."""
    if not (0 < low_m < high_m and np.isfinite(high_m)):
        raise ValueError(f"band {low_m!r}-{high_m!r} m: need 0 < low < high")
    lam, w = _panel_nodes(np.geomspace(low_m, high_m, panels + 1), order)
    return Band(lam, w * _photon_factor(lam, photon), photon,
                f"top-hat {low_m * 1e6:g}-{high_m * 1e6:g} micron")


def tabulated_band(wavelength_m, response, *, photon: bool = True, order: int = DEFAULT_ORDER,
                   min_panels: int = 4 * DEFAULT_MIN_PANELS,
                   description: str = "tabulated") -> Band:
    """A band with a tabulated response, interpolated linearly between its rows.

    Parameters
    ----------
    wavelength_m : array_like
        Strictly increasing wavelengths (m), at least 2.
    response : array_like
        Non-negative response at those wavelengths (any scale), not all zero.
    photon : bool
        Photon counting (True) or energy weighting (False).
    order : int
        Gauss-Legendre nodes per panel.
    min_panels : int
        Each table interval is split into panels so the band has at least this many.
    """
    lam = np.asarray(wavelength_m, dtype=float)
    resp = np.asarray(response, dtype=float)
    if lam.ndim != 1 or lam.shape != resp.shape or lam.size < 2:
        raise ValueError("a tabulated band needs matching 1-D wavelength and response arrays "
                         "of at least 2 values")
    if not (np.all(np.diff(lam) > 0) and lam[0] > 0 and np.all(resp >= 0) and resp.max() > 0):
        raise ValueError("a tabulated band needs increasing positive wavelengths and a "
                         "non-negative response that is not all zero")
    split = max(1, -(-min_panels // (lam.size - 1)))
    edges = np.concatenate([np.linspace(a, b, split + 1)[:-1] for a, b in zip(lam[:-1], lam[1:])]
                           + [lam[-1:]])
    nodes, w = _panel_nodes(edges, order)
    weight = w * np.interp(nodes, lam, resp) * _photon_factor(nodes, photon)
    return Band(nodes, weight, photon, description)
