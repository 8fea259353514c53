"""Warnings where a fit's answer is not to be trusted (one line each, ``torrid.TorridWarning``).

* A measured curve whose values look like a fraction rather than ppm: every |flux ratio| and
  every error below :data:`FRACTION_LIMIT_PPM` (1 ppm). Thermal phase curves of hot gas giants
  are tens to thousands of ppm; a curve entirely below 1 ppm is far more likely a fraction
  (1e-3 for 1000 ppm) than a real signal (our choice of limit).
* A reduced chi-square far from 1: chi-square outside the central 99.73 % ("3 sigma") range of
  the chi-square distribution with the fit's degrees of freedom (scipy.stats.chi2), i.e. the
  errors are misstated or the model cannot describe the data. For 98 degrees of freedom the
  range is chi-square 60-148 (reduced 0.62-1.51).
* The best grid point on the edge of the grid: the minimum may lie outside the swept range.
* No interpolated estimate (with the reason).
* A sampler chain shorter than 50 autocorrelation times (emcee's documentation recommends
  50 tau: common practice).
"""

from __future__ import annotations

import warnings

import numpy as np

from torrid.meta import TorridWarning

FRACTION_LIMIT_PPM = 1.0
#: Two-sided probability outside which the chi-square is "far" from its expectation.
CHI_SQUARE_TAIL = 0.0027
#: A chain is taken as converged when it is longer than this many autocorrelation times.
AUTOCORRELATION_LENGTHS = 50


def warn(message: str) -> None:
    """Issue one torrid warning line."""
    warnings.warn(message, TorridWarning, stacklevel=3)


def check_units(flux_ratio_ppm, error_ppm, source: str) -> None:
    """Warn when a measured curve looks like a fraction rather than ppm."""
    flux, error = np.abs(np.asarray(flux_ratio_ppm, float)), np.asarray(error_ppm, float)
    if np.nanmax(flux) < FRACTION_LIMIT_PPM and np.nanmax(error) < FRACTION_LIMIT_PPM:
        warn(f"{source}: every flux ratio is below {FRACTION_LIMIT_PPM:g} ppm (largest "
             f"{np.nanmax(flux):.3g}): it looks like a fraction; give the flux ratio in ppm "
             "(fraction x 1e6)")


def chi_square_bounds(dof: int) -> tuple[float, float]:
    """The central 99.73 % range of chi-square for ``dof`` degrees of freedom."""
    from scipy import stats

    return (float(stats.chi2.ppf(CHI_SQUARE_TAIL / 2, dof)),
            float(stats.chi2.ppf(1 - CHI_SQUARE_TAIL / 2, dof)))


def check_chi_square(chi2: float, dof: int, source: str) -> None:
    """Warn when the best chi-square lies outside :func:`chi_square_bounds`."""
    if dof < 1 or not np.isfinite(chi2):
        return
    low, high = chi_square_bounds(dof)
    if not low <= chi2 <= high:
        why = "errors too small or model wrong" if chi2 > high else "errors too large"
        warn(f"{source}: reduced chi-square {chi2 / dof:.3g} (chi-square {chi2:.4g} for {dof} "
             f"dof) outside {low / dof:.2f}-{high / dof:.2f}, the 99.73 % range: {why}")


def check_grid_edge(best_index: dict, sizes: dict, source: str) -> None:
    """Warn when the best grid point sits on the edge of an axis with three or more points."""
    edges = [f"{d} (point {i + 1} of {sizes[d]})" for d, i in best_index.items()
             if sizes[d] >= 3 and i in (0, sizes[d] - 1)]
    if edges:
        warn(f"{source}: the best grid point is on the edge of the grid along "
             f"{', '.join(edges)}: the minimum may lie outside the swept range")


def check_convergence(steps: int, autocorrelation_steps: float, source: str) -> None:
    """Warn when a chain is shorter than :data:`AUTOCORRELATION_LENGTHS` autocorrelation times."""
    if not np.isfinite(autocorrelation_steps) or steps < AUTOCORRELATION_LENGTHS * \
            autocorrelation_steps:
        warn(f"{source}: the chain has not converged: {steps} steps after burn-in, fewer than "
             f"{AUTOCORRELATION_LENGTHS} autocorrelation times ({autocorrelation_steps:.3g} steps "
             "each); run more steps")
