"""A joint fit of several measured curves with a sweep table, with the temperature end points
fixed, fitted (profiled) or replaced by a free offset and amplitude per curve.

chi^2(p) = sum over curves c and their points k of ((F_obs,ck - F_c(p; T_night, T_day))
/ sigma_ck)^2, with each curve's model in its own band, radius ratio and phase shift
(:mod:`torrid.workflow.fit_model`). The end points (our choice: T_night and T_day themselves,
not a scale and an offset, so that their bounds read as temperatures) are

* ``fixed``: the assumed ones ([observer] temperatures, or derived from the star);
* ``free``: fitted at every grid point to minimise chi^2 within their bounds (scipy's bounded
  L-BFGS-B with the analytic gradient, started from the best of a 3 x 3 scan of the bounds),
  i.e. profiled as nuisance parameters;
* ``shape``: each curve normalised (zero mean, unit peak-to-peak) and fitted with its own offset
  and amplitude (weighted linear least squares): only the shape of the curves counts.

Regions: the joint 68.27 % and 95.45 % regions of the two swept parameters are
delta chi^2 <= 2.30 and 6.18 (Avni 1976: q = 2 parameters of interest; the nuisance
parameters are minimised over, which is what profiling does, so they do not raise q). The
nuisance parameters do count against the degrees of freedom:
N - (swept parameters) - (nuisance parameters), which the reduced chi-square uses.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from torrid.io.observation import DEFAULT_BOUND_FACTORS, Observation
from torrid.io.variables import FIT_VARIABLES
from torrid.workflow import fit_checks
from torrid.workflow.fit import DELTA_CHI2, FitError
from torrid.workflow.fit_axes import AxisCoordinate
from torrid.workflow.fit_model import curve_models, single_thread

MODES = ("fixed", "free", "shape")


def temperature_bounds(observation: Observation, assumed) -> tuple[tuple, tuple]:
    """Bounds (K) of T_night and T_day: the file's, or 0.5-1.5 x the assumed end points."""
    low, high = DEFAULT_BOUND_FACTORS
    night = observation.night_temperature_bounds or (low * assumed[0], high * assumed[0])
    day = observation.day_temperature_bounds or (low * assumed[1], high * assumed[1])
    return night, day


def _chi2(models, point, t_night, t_day) -> float:
    total = 0.0
    for m in models:
        resid = (m.observed.flux_ratio_ppm - m.flux(point, t_night, t_day)) / m.observed.error_ppm
        total += float(resid @ resid)
    return total


def profile_point(models, point: int, bounds, start) -> tuple[float, float, float]:
    """(chi2, T_night, T_day) minimising chi2 of grid point ``point`` within ``bounds``."""
    from scipy.optimize import minimize

    def objective(x):
        chi2, grad = 0.0, np.zeros(2)
        for m in models:
            obs = m.observed
            resid = (obs.flux_ratio_ppm - m.flux(point, x[0], x[1])) / obs.error_ppm
            d_night, d_day = m.node_derivatives(x[0], x[1])
            k = m.kernels[point]
            chi2 += resid @ resid
            grad[0] -= 2 * resid @ (m.scale * (k @ d_night) / obs.error_ppm)
            grad[1] -= 2 * resid @ (m.scale * (k @ d_day) / obs.error_ppm)
        return chi2, grad

    scan = [(tn, td) for tn in np.linspace(*bounds[0], 3) for td in np.linspace(*bounds[1], 3)]
    best = min([tuple(start)] + scan, key=lambda x: objective(np.array(x))[0])
    result = minimize(objective, np.array(best, float), jac=True, method="L-BFGS-B",
                      bounds=bounds, options={"ftol": 1e-12, "gtol": 1e-8})
    return float(result.fun), float(result.x[0]), float(result.x[1])


def joint_fit(table: xr.Dataset, observation: Observation, temperatures: str = "fixed", *,
              source: str = "sweep table"):
    """Fit every curve of ``observation`` jointly with the maps of a sweep table.

    Returns
    -------
    (xarray.Dataset, dict)
        The fit (variables of :data:`torrid.io.variables.FIT_VARIABLES`, attributes
        ``best_<dim>``, ``chi_square_min``, ``degrees_of_freedom``, ``best_night_temperature_K``
        and ``best_day_temperature_K`` with free end points, ``estimate_<dim>``) and the
        context a posterior needs (``models``, ``axes``, ``plane``, ``bounds``, ``assumed``).
    """
    with single_thread():
        return _joint_fit(table, observation, temperatures, source)


def _joint_fit(table, observation, temperatures, source):
    from torrid.workflow.phase import end_temperatures

    if temperatures not in MODES:
        raise FitError(f"--temperatures {temperatures!r}: must be one of {', '.join(MODES)}")
    if "h" not in table:
        raise FitError(f"{source}: the table has no maps; rebuild it with "
                       "'torrid collect FOLDER --maps'")
    dims = [d for d in table["h"].dims if d not in ("lat", "lon", "time")]
    if not dims:
        raise FitError(f"{source}: the table has no swept dimensions")
    for curve in observation.curves:
        fit_checks.check_units(curve.observed.flux_ratio_ppm, curve.observed.error_ppm,
                               curve.observed.source)
    shape = tuple(table.sizes[d] for d in dims)
    npoint = int(np.prod(shape))
    models, dense_phases = curve_models(
        table, dims, [(c.observed, c.settings, c.phase_shift, c.description)
                      for c in observation.curves], observation.settings)
    assumed = end_temperatures(observation.settings)[:2]
    bounds = temperature_bounds(observation, assumed)
    chi_fixed = np.array([_chi2(models, p, *assumed) for p in range(npoint)])
    t_night = np.full(npoint, np.nan)
    t_day = np.full(npoint, np.nan)
    offsets = np.full((len(models), npoint), np.nan)
    amplitudes = np.full((len(models), npoint), np.nan)
    if temperatures == "fixed":
        chi = chi_fixed
    elif temperatures == "free":
        chi = np.full(npoint, np.nan)
        start = np.clip(assumed, [bounds[0][0], bounds[1][0]], [bounds[0][1], bounds[1][1]])
        for p in range(npoint):
            if np.isfinite(chi_fixed[p]):
                chi[p], t_night[p], t_day[p] = profile_point(models, p, bounds, start)
    else:
        from torrid.workflow.smooth_model import shape_profile

        chi = np.zeros(npoint)
        for c, m in enumerate(models):
            flux = m.flux(slice(None), *assumed)
            part, offsets[c], amplitudes[c] = shape_profile(
                m.observed.flux_ratio_ppm, 1 / m.observed.error_ppm**2, flux)
            chi = chi + np.where(np.isfinite(flux).all(-1), part, np.nan)
    if not np.isfinite(chi).any():
        raise FitError(f"{source}: no grid point has finite maps (all failed or missing?)")
    best = int(np.nanargmin(chi))
    best_index = dict(zip(dims, np.unravel_index(best, shape)))
    nuisance = {"fixed": 0, "free": 2, "shape": 2 * len(models)}[temperatures]
    nobs = sum(m.observed.phase.size for m in models)
    dof = nobs - min(2, len(dims)) - nuisance
    out = _assemble(table, dims, shape, models, dense_phases, chi, chi_fixed, temperatures,
                    t_night, t_day, offsets, amplitudes, best, assumed)
    out.attrs.update({f"best_{d}": float(table[d].values[i]) for d, i in best_index.items()})
    out.attrs.update(chi_square_min=float(chi[best]), degrees_of_freedom=int(dof),
                     temperatures=temperatures, nuisance_parameters=nuisance,
                     region_parameters=min(2, len(dims)),
                     assumed_night_temperature_K=float(assumed[0]),
                     assumed_day_temperature_K=float(assumed[1]),
                     night_temperature_bounds_K=list(bounds[0]),
                     day_temperature_bounds_K=list(bounds[1]),
                     observation=observation.source)
    if temperatures == "free":
        out.attrs["best_night_temperature_K"] = float(t_night[best])
        out.attrs["best_day_temperature_K"] = float(t_day[best])
    what = f"fit of {observation.source}"
    fit_checks.check_grid_edge(best_index, dict(zip(dims, shape)), what)
    fit_checks.check_chi_square(float(chi[best]), dof, what)
    context = dict(models=models, dims=dims, bounds=bounds, assumed=assumed, mode=temperatures,
                   best_index=best_index, t_best=(t_night[best], t_day[best]))
    _estimate(out, table, dims, shape, context, what)
    return out, context


def _plane(table, dims, shape, best_index):
    """The two main axes and the flat indices of their plane (sorted), others at the best."""
    axes = [AxisCoordinate(d, table[d].values) for d in dims[:2]]
    index = np.arange(int(np.prod(shape))).reshape(shape)
    index = index[tuple(slice(None) if k < 2 else best_index[d] for k, d in enumerate(dims))]
    return axes, index[np.ix_(axes[0].order, axes[1].order)]


def smooth_model(table, context):
    """The :class:`SmoothModel` of a fit's context (needs two swept axes)."""
    from torrid.workflow.smooth_model import SmoothModel

    dims = context["dims"]
    shape = tuple(table.sizes[d] for d in dims)
    axes, plane = _plane(table, dims, shape, context["best_index"])
    return SmoothModel(context["models"], axes, plane, context["mode"], context["assumed"],
                       context["bounds"])


def start_vector(model, context) -> np.ndarray:
    """The best grid point (and its end points) as a parameter vector of ``model``."""
    u = [float(np.flatnonzero(a.order == context["best_index"][a.name])[0]) for a in model.axes]
    if context["mode"] == "free":
        u += list(context["t_best"])
    return np.array(u)


def _estimate(out, table, dims, shape, context, what) -> None:
    reason = None
    if len(dims) < 2:
        reason = "the sweep has one swept dimension (the estimate needs two)"
    elif min(table.sizes[d] for d in dims[:2]) < 2:
        reason = "an axis has a single point"
    else:
        try:
            model = smooth_model(table, context)
        except ValueError as err:
            reason = str(err)
    if reason is not None:
        out.attrs["estimate_note"] = f"no interpolated estimate: {reason}"
        fit_checks.warn(f"{what}: no interpolated estimate: {reason}")
        return
    theta, chi2 = model.minimum(start_vector(model, context))
    for axis, u in zip(model.axes, theta[:2]):
        out.attrs[f"estimate_{axis.name}"] = float(axis.value(u))
    if context["mode"] == "free":
        out.attrs["estimate_night_temperature_K"] = float(theta[2])
        out.attrs["estimate_day_temperature_K"] = float(theta[3])
    out.attrs["estimate_chi_square"] = chi2
    out.attrs["estimate_interpolation"] = ("cubic splines in " + "; ".join(
        a.describe() for a in model.axes))


def _assemble(table, dims, shape, models, dense_phases, chi, chi_fixed, mode, t_night, t_day,
              offsets, amplitudes, best, assumed) -> xr.Dataset:
    rows = FIT_VARIABLES
    coords = {d: table[d] for d in dims}
    grid = lambda values: xr.DataArray(values.reshape(shape), dims=dims, coords=coords)  # noqa
    chi2 = grid(chi)
    delta = chi2 - chi2.min()
    data = {
        "chi_square": rows["chi_square"].variable(chi2, dims),
        "delta_chi_square": rows["delta_chi_square"].variable(delta, dims),
        "within_68": rows["within_68"].variable(delta <= DELTA_CHI2["68.27%"], dims),
        "within_95": rows["within_95"].variable(delta <= DELTA_CHI2["95.45%"], dims),
    }
    if mode != "fixed":
        data["chi_square_fixed_temperatures"] = rows["chi_square_fixed_temperatures"].variable(
            grid(chi_fixed), dims)
    if mode == "free":
        data["night_temperature_fit"] = rows["night_temperature_fit"].variable(grid(t_night),
                                                                              dims)
        data["day_temperature_fit"] = rows["day_temperature_fit"].variable(grid(t_day), dims)
    if mode == "shape":
        for name, values in (("shape_offset", offsets), ("shape_amplitude", amplitudes)):
            data[name] = rows[name].variable(xr.DataArray(
                values.reshape(len(models), *shape), dims=("curve", *dims), coords=coords), dims)
    curves = []
    for c, m in enumerate(models):
        tn, td = (t_night[best], t_day[best]) if mode == "free" else assumed
        dense = m.flux(best, tn, td, dense=True)
        if mode == "shape":
            at_obs = m.flux(best, tn, td)
            span = np.ptp(at_obs)
            dense = offsets[c, best] + amplitudes[c, best] * (dense - at_obs.mean()) / (
                span if span > 0 else 1.0)
        curves.append(dense)
    data["best_curve_flux_ratio"] = rows["best_curve_flux_ratio"].variable(np.stack(curves))
    obs = [m.observed for m in models]
    data["observed_flux_ratio"] = rows["observed_flux_ratio"].variable(
        np.concatenate([o.flux_ratio_ppm for o in obs]))
    data["observed_error"] = rows["observed_error"].variable(
        np.concatenate([o.error_ppm for o in obs]))
    data["observed_curve"] = rows["observed_curve"].variable(
        np.concatenate([np.full(o.phase.size, c, dtype=np.int32) for c, o in enumerate(obs)]))
    out = xr.Dataset(data, coords={
        "observed_phase": rows["observed_phase"].variable(np.concatenate([o.phase for o in obs])),
        "phase": rows["phase"].variable(dense_phases)})
    out.attrs["title"] = "torrid joint fit of measured phase curves with a sweep table"
    out.attrs["Conventions"] = "CF-1.10"
    out.attrs["curves"] = "; ".join(f"{c}: {m.description}" for c, m in enumerate(models))
    return out


def fit_observation(observation, table_path, *, temperatures: str = "fixed",
                    posterior_steps: int | None = None, output=None, overwrite: bool = False,
                    progress: bool = True):
    """Read a sweep table, fit an observation (file or :class:`Observation`) jointly, and
    optionally sample the posterior and write the fit file.

    Returns
    -------
    (xarray.Dataset, Posterior or None)
    """
    from pathlib import Path

    from torrid.io.observation import read_observation
    from torrid.io.provenance import provenance_attrs
    from torrid.io.runfile import load_netcdf, write_atomic
    from torrid.workflow.posterior import sample

    if not isinstance(observation, Observation):
        observation = read_observation(observation)
    if posterior_steps is not None and (isinstance(posterior_steps, bool)
                                        or not int(posterior_steps) == posterior_steps
                                        or posterior_steps < 10):
        raise FitError(f"--posterior {posterior_steps!r}: must be an integer >= 10 (steps)")
    table_path = Path(table_path)
    table = load_netcdf(table_path, "sweep table", FitError)
    fit, context = joint_fit(table, observation, temperatures, source=str(table_path))
    posterior = None
    if posterior_steps is not None:
        if "estimate_note" in fit.attrs:
            raise FitError(f"--posterior {posterior_steps}: {fit.attrs['estimate_note']}")
        model = smooth_model(table, context)
        start = [a.index(fit.attrs[f"estimate_{a.name}"]) for a in model.axes]
        if temperatures == "free":
            start += [fit.attrs["estimate_night_temperature_K"],
                      fit.attrs["estimate_day_temperature_K"]]
        posterior = sample(model, np.array(start, float), int(posterior_steps),
                           observation.sampler, progress=progress,
                           source=f"posterior of {observation.source}")
        fit.attrs.update(posterior.attrs())
    fit.attrs["sweep_table"] = str(table_path)
    fit.attrs.update(provenance_attrs({"observer": {
        k: v for k, v in observation.settings.to_dict().items() if v is not None}}))
    if output is not None:
        write_atomic(fit, output, overwrite=overwrite)
    return fit, posterior
