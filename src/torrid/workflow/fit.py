"""Fit a measured phase curve with a sweep: chi-square over the grid, confidence regions, the
best point, an interpolated best estimate, and the simpler offset-and-amplitude comparison.

chi^2(p) = sum_k ((F_obs,k - F_model(p; phase_k)) / sigma_k)^2 with the model curve of each grid
point p (its phase curve, linearly interpolated to the observed phases, periodic in phase). The
confidence regions of two jointly estimated parameters are chi^2 - chi^2_min <= 2.30 (68.27 %)
and <= 6.18 (95.45 %) (Avni 1976; the values are the chi-square quantiles with 2 degrees of
freedom, from memory of the usual tables and checked against scipy.stats.chi2 in the tests).
The best estimate interpolates between grid points: the model curve is interpolated bilinearly
between the grid points in the fractional grid index of each axis (:mod:`torrid.workflow.fit_axes`:
log10 of the axis values where they are log-spaced, and the drag *rate* 1/tau between the
longest finite drag time and ``inf``, so an axis holding ``inf`` is interpolated too) and chi^2 of
the interpolated curve is minimised over the cells around the best grid point. The fit warns
(:mod:`torrid.workflow.fit_checks`) when the data look like a fraction rather than ppm, when the
reduced chi-square is far from 1, when the best point is on the grid's edge and when there is no
interpolated estimate.
"""

from __future__ import annotations

import math

import numpy as np
import xarray as xr

from torrid.io.observed import ObservedCurve
from torrid.io.variables import FIT_VARIABLES
from torrid.workflow import fit_checks
from torrid.workflow.fit_axes import AxisCoordinate, is_log_spaced

#: Delta chi-square of the 68.27 % and 95.45 % joint regions of two parameters (Avni 1976).
DELTA_CHI2 = {"68.27%": 2.30, "95.45%": 6.18}


class FitError(ValueError):
    """A fit that cannot be made (one line)."""


def model_at_phases(curves: xr.DataArray, phases: np.ndarray) -> xr.DataArray:
    """Periodic linear interpolation of curves (..., phase) to the observed phases."""
    grid = curves["phase"].values
    order = np.argsort(grid)
    grid = grid[order]
    values = curves.isel(phase=order).values
    ext_grid = np.concatenate([grid[-1:] - 1.0, grid, grid[:1] + 1.0])
    ext = np.concatenate([values[..., -1:], values, values[..., :1]], axis=-1)
    flat = ext.reshape(-1, ext.shape[-1])
    out = np.stack([np.interp(phases, ext_grid, row) for row in flat])
    dims = [d for d in curves.dims if d != "phase"]
    shape = [curves.sizes[d] for d in dims]
    return xr.DataArray(out.reshape(*shape, phases.size), dims=(*dims, "observation"),
                        coords={d: curves[d] for d in dims if d in curves.coords})


def chi_square(curves: xr.DataArray, observed: ObservedCurve) -> xr.DataArray:
    """chi^2 of every grid point's curve against the measured one."""
    model = model_at_phases(curves, observed.phase)
    resid = (observed.flux_ratio_ppm - model) / observed.error_ppm
    return (resid**2).sum("observation", skipna=False)  # a failed point (NaN) stays NaN


def axis_transform(values) -> tuple[np.ndarray, bool]:
    """Coordinates in which to plot: log10 for log-spaced positive axes."""
    values = np.asarray(values, float)
    log = is_log_spaced(values)
    return (np.log10(values) if log else values), log


def interpolated_minimum(model: np.ndarray, x: np.ndarray, y: np.ndarray,
                         observed: ObservedCurve) -> tuple[float, float, float]:
    """Minimise chi^2 of the bilinearly interpolated model over the cells around its best
    grid point.

    Parameters
    ----------
    model : ndarray (nx, ny, nobs)
        Model flux ratios (ppm) of each grid point at the observed phases.
    x, y : ndarray
        Axis coordinates (already log10 where the axis is log-spaced), ascending or not.
    observed : ObservedCurve
        The measurement.

    Returns
    -------
    (x*, y*, chi2*) in the given coordinates.
    """
    from scipy.interpolate import RegularGridInterpolator
    from scipy.optimize import minimize

    ox, oy = np.argsort(x), np.argsort(y)
    x, y, model = x[ox], y[oy], model[ox][:, oy]
    resid = (observed.flux_ratio_ppm - model) / observed.error_ppm
    chi2 = np.sum(resid**2, axis=-1)
    i, j = np.unravel_index(np.nanargmin(chi2), chi2.shape)
    if not np.isfinite(model).all() or len(x) < 2 or len(y) < 2:
        return float(x[i]), float(y[j]), float(chi2[i, j])
    interp = RegularGridInterpolator((x, y), model, method="linear")

    def objective(p):
        return float(np.sum(((observed.flux_ratio_ppm - interp(p)[0]) / observed.error_ppm) ** 2))

    bounds = [(x[max(i - 1, 0)], x[min(i + 1, len(x) - 1)]),
              (y[max(j - 1, 0)], y[min(j + 1, len(y) - 1)])]
    result = minimize(objective, [x[i], y[j]], method="Powell", bounds=bounds,
                      options={"xtol": 1e-6, "ftol": 1e-10})
    if result.fun <= chi2[i, j]:
        return float(result.x[0]), float(result.x[1]), float(result.fun)
    return float(x[i]), float(y[j]), float(chi2[i, j])


def fit_sweep(curves: xr.Dataset, observed: ObservedCurve, *, offset_deg: float | None = None,
              offset_error_deg: float | None = None, amplitude_ppm: float | None = None,
              amplitude_error_ppm: float | None = None) -> xr.Dataset:
    """Fit ``observed`` with the phase curves of a sweep table.

    Parameters
    ----------
    curves : xarray.Dataset
        Phase curves of a sweep table (``table.torrid.phase_curve(...)``): ``flux_ratio``
        over the swept dims and ``phase``, with ``offset_of_maximum`` and ``amplitude``.
    observed : ObservedCurve
        The measured curve.
    offset_deg, offset_error_deg, amplitude_ppm, amplitude_error_ppm : float, optional
        A measured peak offset (degrees, east positive) and peak-to-peak amplitude (ppm) with
        1-sigma errors, for the simpler comparison ``consistent`` (grid points whose curve
        reproduces both within the errors).

    Returns
    -------
    xarray.Dataset
        ``chi_square`` and ``delta_chi_square`` over the swept dims, the masks ``within_68``
        and ``within_95``, ``best_<dim>`` (grid point), ``estimate_<dim>`` (interpolated),
        ``best_flux_ratio`` (the best point's curve), the observation, and ``consistent``.
    """
    flux = curves["flux_ratio"]
    dims = [d for d in flux.dims if d != "phase"]
    fit_checks.check_units(observed.flux_ratio_ppm, observed.error_ppm, observed.source)
    if not dims:
        raise FitError("the phase curves have no swept dimensions: fit a sweep table")
    chi2 = chi_square(flux, observed)
    if not np.isfinite(chi2.values).any():
        raise FitError("no grid point has a finite phase curve (all failed or missing?)")
    chi2 = chi2.where(np.isfinite(chi2))
    delta = chi2 - chi2.min()
    best_index = dict(zip(dims, np.unravel_index(int(np.nanargmin(chi2.values)), chi2.shape)))
    rows = FIT_VARIABLES
    out = xr.Dataset({
        "chi_square": rows["chi_square"].variable(chi2, dims),
        "delta_chi_square": rows["delta_chi_square"].variable(delta, dims),
        "within_68": rows["within_68"].variable(delta <= DELTA_CHI2["68.27%"], dims),
        "within_95": rows["within_95"].variable(delta <= DELTA_CHI2["95.45%"], dims),
        "best_flux_ratio": rows["best_flux_ratio"].variable(
            flux.isel(best_index).drop_vars(dims, errors="ignore")),
        "observed_flux_ratio": rows["observed_flux_ratio"].variable(observed.flux_ratio_ppm),
        "observed_error": rows["observed_error"].variable(observed.error_ppm),
    }, coords={"observed_phase": rows["observed_phase"].variable(observed.phase)})
    for d in dims:
        out.attrs[f"best_{d}"] = float(flux[d].values[best_index[d]])
    out.attrs["chi_square_min"] = float(chi2.min())
    out.attrs["degrees_of_freedom"] = int(observed.phase.size - min(2, len(dims)))
    source = f"fit of {observed.source}"
    fit_checks.check_grid_edge(best_index, dict(flux.sizes), source)
    fit_checks.check_chi_square(out.attrs["chi_square_min"], out.attrs["degrees_of_freedom"],
                                source)
    reason = None
    if len(dims) < 2:
        reason = "the sweep has one swept dimension (the estimate needs two)"
    else:
        main = dims[:2]
        rest = {d: best_index[d] for d in dims[2:]}
        axes = [AxisCoordinate(d, flux[d].values) for d in main]
        plane = flux.isel(rest).isel({a.name: a.order for a in axes}).transpose(*main, "phase")
        model = model_at_phases(plane, observed.phase).values
        if min(a.size for a in axes) < 2:
            reason = "an axis has a single point"
        elif not np.isfinite(model).all():
            reason = ("some grid points have no phase curve (failed or missing): bilinear "
                      "interpolation needs every point")
        else:
            us, vs, zs = interpolated_minimum(model, np.arange(axes[0].size, dtype=float),
                                              np.arange(axes[1].size, dtype=float), observed)
            for axis, u in zip(axes, (us, vs)):
                out.attrs[f"estimate_{axis.name}"] = float(axis.value(u))
            out.attrs["estimate_chi_square"] = zs
            out.attrs["estimate_interpolation"] = "; ".join(a.describe() for a in axes)
    if reason is not None:
        out.attrs["estimate_note"] = f"no interpolated estimate: {reason}"
        fit_checks.warn(f"{source}: no interpolated estimate: {reason}")
    if offset_deg is not None or amplitude_ppm is not None:
        ok = xr.ones_like(chi2, dtype=bool)
        if offset_deg is not None:
            err = offset_error_deg if offset_error_deg is not None else math.inf
            diff = (curves["offset_of_maximum"] - offset_deg + 180) % 360 - 180
            ok = ok & (abs(diff) <= err)
        if amplitude_ppm is not None:
            err = amplitude_error_ppm if amplitude_error_ppm is not None else math.inf
            ok = ok & (abs(curves["amplitude"] - amplitude_ppm) <= err)
        out["consistent"] = rows["consistent"].variable(ok, dims)
    out.attrs["observation"] = observed.source
    return out


def synthetic_observation(curve: xr.DataArray, n_points: int, noise_ppm: float,
                          seed: int = 0, source: str = "invented observation") -> ObservedCurve:
    """An invented measurement: ``curve`` (over ``phase``) sampled at ``n_points`` phases
    evenly spread over the orbit (away from transit), plus Gaussian noise of ``noise_ppm``."""
    rng = np.random.default_rng(seed)
    phases = (np.arange(n_points) + 0.5) / n_points
    values = model_at_phases(curve, phases).values.reshape(-1)
    noisy = values + rng.normal(0.0, noise_ppm, size=phases.size)
    return ObservedCurve(phase=phases, flux_ratio_ppm=noisy,
                         error_ppm=np.full(phases.size, float(noise_ppm)), source=source)


def fit_table(observed_path, table_path, settings, *, output=None, overwrite: bool = False,
              **comparison) -> xr.Dataset:
    """Read a measured curve and a sweep table, fit (see :func:`fit_sweep`), optionally write.

    Errors name the file: a table without maps, a missing file, a bad CSV line.
    """
    from pathlib import Path

    from torrid.io.observed import read_observed_csv
    from torrid.io.provenance import provenance_attrs
    from torrid.io.runfile import load_netcdf, write_atomic
    from torrid.workflow.phase import phase_curve

    from torrid.io.observer import ObserverSettings

    settings = settings or ObserverSettings()
    observed = read_observed_csv(observed_path)
    table_path = Path(table_path)
    table = load_netcdf(table_path, "sweep table", FitError)
    if "h" not in table:
        raise FitError(f"{table_path}: the table has no maps; rebuild it with "
                       "'torrid collect FOLDER --maps'")
    curves = phase_curve(table, settings, source=str(table_path))
    fit = fit_sweep(curves, observed, **comparison)
    fit.attrs.update({k: v for k, v in curves.attrs.items() if isinstance(v, (str, int, float))
                      and k not in fit.attrs})
    fit.attrs["sweep_table"] = str(table_path)
    fit.attrs.update(provenance_attrs({"observer": {k: v for k, v in vars(settings).items()
                                                    if v is not None}}))
    if output is not None:
        write_atomic(fit, output, overwrite=overwrite)
    return fit
