"""Joint fits of several measured curves (issue 15): temperature end points fixed, profiled or
replaced by offset and amplitude; the posterior between grid points; the observation file and
``torrid fit OBSERVATION.toml``.

The sweep tables are invented analytic families (tests/fit_family.py), so that curves can be
made at off-grid parameters for injection and recovery.
"""

import warnings

import numpy as np
import pytest
import xarray as xr
from scipy import stats

from fit_family import family_table
from torrid.io.observation import (MeasuredCurve, Observation, ObservationError,
                                   SamplerSettings, read_observation)
from torrid.io.observed import ObservedCurve, write_observed_csv
from torrid.io.observer import ObserverSettings
from torrid.meta import TorridWarning
from torrid.physics.planck import tophat_band
from torrid.workflow.fit import DELTA_CHI2
from torrid.workflow.fit_model import curve_models
from torrid.workflow.joint_fit import joint_fit, smooth_model
from torrid.workflow.phase import phase_curve
from torrid.workflow.posterior import sample

DIMS = ["radiative_timescale_days", "drag_timescale_days"]
TAU_RAD = np.logspace(-1, 1, 6)
TAU_DRAG = np.logspace(-1, 2, 6)
ASSUMED = ObserverSettings(night_temperature=1000.0, day_temperature=2000.0, band=(3.0, 4.0))
BANDS = ((3.0, 4.0), (4.0, 5.0))
NOISE_PPM = 30.0
POINTS = 60


@pytest.fixture(scope="module")
def table():
    return family_table(TAU_RAD, TAU_DRAG)


def model_curve(tau_rad, tau_drag, band, t_night, t_day, phases):
    """The family's curve at off-grid parameters (a one-point table) in ``band``."""
    truth = family_table([tau_rad], [tau_drag])
    settings = ASSUMED.replace(band=band)
    dummy = ObservedCurve(phases, np.zeros(phases.size), np.ones(phases.size))
    models, _ = curve_models(truth, DIMS, [(dummy, settings, 0.0, "truth")], settings)
    return models[0].flux(0, t_night, t_day)


def injected(truth, seed, noise=NOISE_PPM):
    """An observation of two bands made at ``truth`` = (tau_rad, tau_drag, T_night, T_day)."""
    rng = np.random.default_rng(seed)
    phases = (np.arange(POINTS) + 0.5) / POINTS
    curves = []
    for band in BANDS:
        flux = model_curve(truth[0], truth[1], band, truth[2], truth[3], phases)
        observed = ObservedCurve(phases, flux + rng.normal(0, noise, POINTS),
                                 np.full(POINTS, noise), source=f"invented {band[0]:g} micron")
        curves.append(MeasuredCurve(observed, ASSUMED.replace(band=band)))
    return Observation(curves=tuple(curves), settings=ASSUMED,
                       night_temperature_bounds=(500.0, 1600.0),
                       day_temperature_bounds=(1200.0, 3200.0),
                       sampler=SamplerSettings(walkers=24, burn_in=0.3, seed=seed))


def quiet(function, *args, **kwargs):
    """Call with torrid's warnings recorded (returned) instead of raised."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", TorridWarning)
        out = function(*args, **kwargs)
    return out, [str(w.message) for w in caught if issubclass(w.category, TorridWarning)]


def test_node_kernels_reproduce_the_direct_phase_curve_and_a_uniform_planet(table):
    # The piecewise-linear band radiance on 64 nodes against torrid's direct phase curve (itself
    # checked against scipy quadrature and astropy's Planck law in test_phase_curve.py).
    direct = phase_curve(table, ASSUMED, phases=60)
    phases = np.arange(60) / 60
    dummy = ObservedCurve(phases, np.zeros(60), np.ones(60))
    models, _ = curve_models(table, DIMS, [(dummy, ASSUMED, 0.0, "x")], ASSUMED)
    flux = models[0].flux(slice(None), 1000.0, 2000.0).reshape(6, 6, 60)
    np.testing.assert_allclose(flux, direct.flux_ratio.values, rtol=1e-3)
    # Cowan & Agol (2008): a uniform planet shows a flat curve (Rp/Rs)^2 B(T) / B(T_star).
    uniform = table.copy()
    uniform["h"] = xr.full_like(table["h"], 4.0e5 * (1 + 0.5 * 0.4))  # s = 0.4 everywhere
    models, _ = curve_models(uniform, DIMS, [(dummy, ASSUMED, 0.0, "x")], ASSUMED)
    band = tophat_band(3e-6, 4e-6)
    expected = 0.1**2 * band.radiance(1000 + 0.4 * 1000) / band.radiance(6000.0) * 1e6
    np.testing.assert_allclose(models[0].flux(slice(None), 1000.0, 2000.0), expected, rtol=2e-4)


def test_regions_keep_avni_thresholds_and_nuisance_parameters_count_in_dof(table):
    # Avni (1976): with q = 2 parameters of interest and the others minimised over (profiled),
    # the joint regions are delta chi-square <= chi2.ppf(level, q) (scipy.stats.chi2).
    assert DELTA_CHI2["68.27%"] == pytest.approx(stats.chi2.ppf(0.6827, 2), abs=0.005)
    assert DELTA_CHI2["95.45%"] == pytest.approx(stats.chi2.ppf(0.9545, 2), abs=0.005)
    observation = injected((0.7, 3.0, 900.0, 2100.0), seed=5)
    n = 2 * POINTS
    for mode, nuisance in (("fixed", 0), ("free", 2), ("shape", 4)):
        (fit, _), _ = quiet(joint_fit, table, observation, mode)
        assert fit.attrs["region_parameters"] == 2
        assert fit.attrs["nuisance_parameters"] == nuisance
        assert fit.attrs["degrees_of_freedom"] == n - 2 - nuisance
        delta = fit["delta_chi_square"]
        assert bool((fit.within_68 == (delta <= stats.chi2.ppf(0.6827, 2) + 0.005)).all())
        assert bool((fit.within_95 == (delta <= stats.chi2.ppf(0.9545, 2) + 0.005)).all())


def test_free_end_points_are_fitted_per_point_and_recover_the_injected_ones(table):
    truth = (0.7, 3.0, 900.0, 2200.0)
    (fit, context), _ = quiet(joint_fit, table, injected(truth, seed=11), "free")
    assert fit["night_temperature_fit"].dims == tuple(DIMS)
    assert fit["night_temperature_fit"].attrs["units"] == "K"
    assert "chi_square_fixed_temperatures" in fit
    # the profiled end points fit better than the fixed (wrong) ones everywhere
    assert bool((fit.chi_square <= fit.chi_square_fixed_temperatures + 1e-6).all())
    model = smooth_model(table, context)
    start = np.array([model.axes[0].index(fit.attrs["estimate_radiative_timescale_days"]),
                      model.axes[1].index(fit.attrs["estimate_drag_timescale_days"]),
                      fit.attrs["estimate_night_temperature_K"],
                      fit.attrs["estimate_day_temperature_K"]])
    posterior, _ = quiet(sample, model, start, 300, SamplerSettings(walkers=24, seed=3),
                         progress=False)
    q = dict(zip(posterior.names, posterior.quantiles.T))
    # injection and recovery (common practice): the injected end points lie within the 95 %
    # intervals, and the profiled best values within 3 x the 68 % half-width
    for name, value in (("night_temperature", truth[2]), ("day_temperature", truth[3])):
        assert q[name][0] <= value <= q[name][4], (name, q[name])
        half = (q[name][3] - q[name][1]) / 2
        assert abs(fit.attrs[f"best_{name}_K"] - value) < 3 * half + 50


def test_shape_only_mode_is_not_biased_by_wrong_end_points(table, capsys):
    # The true end points are 20 % hotter than the assumed ones. The fixed fit must explain the
    # larger amplitude with other parameters and is biased; the shape-only fit (each curve's
    # offset and amplitude free; common practice for normalised curves) sees only the shape
    # (the peak offset) and recovers tau_rad. Both are shown.
    truth = (0.7, 3.0, 1200.0, 2400.0)
    observation = injected(truth, seed=4, noise=10.0)
    (fixed, _), _ = quiet(joint_fit, table, observation, "fixed")
    (shape, _), _ = quiet(joint_fit, table, observation, "shape")
    key = "estimate_radiative_timescale_days"
    err_fixed = abs(np.log10(fixed.attrs[key] / truth[0]))
    err_shape = abs(np.log10(shape.attrs[key] / truth[0]))
    print(f"\ntau_rad: truth {truth[0]}, fixed end points {fixed.attrs[key]:.3g} (chi-square "
          f"{fixed.attrs['chi_square_min']:.0f}), shape only {shape.attrs[key]:.3g} (chi-square "
          f"{shape.attrs['chi_square_min']:.0f}) for {fixed.attrs['degrees_of_freedom']} dof")
    assert err_shape < 0.2  # within half a grid step (0.4 dex)
    assert err_fixed > 2 * err_shape
    assert shape.attrs["chi_square_min"] < fixed.attrs["chi_square_min"]
    low, high = stats.chi2.interval(0.9973, shape.attrs["degrees_of_freedom"])
    assert low < shape.attrs["chi_square_min"] < high


def coverage(table, trials: int, steps: int, seed0: int = 100):
    """(hits per parameter, trials): the injected value inside the posterior's 68 % interval.

    The truths are drawn from the prior (uniform in the fractional grid index, i.e.
    log-uniform in tau over the grid; uniform end points within their bounds, T_day >= T_night):
    then a calibrated posterior's 68 % intervals hold the truth in 68 % of trials (Cook, Gelman
    & Rubin 2006). Truths drawn from a narrower range would be covered more often.
    """
    from torrid.workflow.fit_axes import AxisCoordinate

    rng = np.random.default_rng(seed0)
    axes = [AxisCoordinate(d, table[d].values) for d in DIMS]
    hits = np.zeros(4, int)
    for trial in range(trials):
        while True:
            t_night, t_day = rng.uniform(500, 1600), rng.uniform(1200, 3200)
            if t_day >= t_night:
                break
        truth = (float(axes[0].value(rng.uniform(0, 5))), float(axes[1].value(rng.uniform(0, 5))),
                 t_night, t_day)
        observation = injected(truth, seed=seed0 + trial)
        (fit, context), _ = quiet(joint_fit, table, observation, "free")
        model = smooth_model(table, context)
        start = np.array([model.axes[0].index(fit.attrs["estimate_radiative_timescale_days"]),
                          model.axes[1].index(fit.attrs["estimate_drag_timescale_days"]),
                          fit.attrs["estimate_night_temperature_K"],
                          fit.attrs["estimate_day_temperature_K"]])
        posterior, _ = quiet(sample, model, start, steps, observation.sampler, progress=False)
        q = posterior.quantiles
        hits += (q[1] <= np.array(truth)) & (np.array(truth) <= q[3])
    return hits, trials


def _binomial_bound(trials):
    # the number of hits of an honest 68.27 % interval is binomial(n, 0.6827); its central 99 %
    return stats.binom.interval(0.99, trials, 0.6827)


@pytest.mark.slow
def test_injection_and_recovery_coverage_of_the_68_percent_intervals(table):
    # Injection and recovery (common practice): 40 trials at random off-grid parameters and end
    # points drawn from the prior, two bands, 30 ppm noise; each parameter's 68 % interval holds
    # the truth in a number of trials inside the central 99 % of binomial(40, 0.6827): 19-34.
    hits, trials = coverage(table, 40, 600)
    low, high = _binomial_bound(trials)
    print(f"\nhits of the 68 % intervals in {trials} trials: {dict(zip(['tau_rad', 'tau_drag', 'T_night', 'T_day'], hits))} (99 % binomial range {low:.0f}-{high:.0f})")
    assert np.all((hits >= low) & (hits <= high))


def test_injection_and_recovery_brief(table):
    # The brief version of the coverage test (12 trials): 99 % binomial range 4-12.
    hits, trials = coverage(table, 12, 400)
    low, high = _binomial_bound(trials)
    assert np.all((hits >= low) & (hits <= high)), hits


def test_a_short_chain_is_said_not_to_have_converged(table):
    observation = injected((0.7, 3.0, 900.0, 2100.0), seed=2)
    (fit, context), _ = quiet(joint_fit, table, observation, "free")
    model = smooth_model(table, context)
    start = np.array([2.0, 2.0, 950.0, 2050.0])
    posterior, messages = quiet(sample, model, start, 40, SamplerSettings(walkers=12),
                                progress=False)
    assert any("has not converged" in m and "autocorrelation" in m for m in messages)
    assert posterior.samples.shape[1] == 4


def write_observation(folder, table, truth=(0.7, 3.0, 900.0, 2200.0), extra=""):
    observation = injected(truth, seed=8)
    for k, curve in enumerate(observation.curves):
        write_observed_csv(curve.observed, folder / f"band{k}.csv")
    text = ("[observer]\nnight_temperature = 1000.0\nday_temperature = 2000.0\n"
            "[fit]\nnight_temperature_bounds = [500.0, 1600.0]\n"
            "day_temperature_bounds = [1200.0, 3200.0]\n"
            "[posterior]\nwalkers = 16\nburn_in = 0.3\nseed = 4\n" + extra +
            "[[curve]]\nfile = \"band0.csv\"\nband = \"3.0-4.0\"\n"
            "[[curve]]\nfile = \"band1.csv\"\nband = \"4.0-5.0\"\nradius_ratio = 0.1\n"
            "phase_shift = 0.0\n")
    (folder / "obs.toml").write_text(text)
    table.to_netcdf(folder / "table.nc")
    return folder / "obs.toml", folder / "table.nc"


def test_observation_file_and_the_command_line(table, tmp_path, capsys):
    from torrid.interface.cli import main

    toml, table_path = write_observation(tmp_path, table)
    observation = read_observation(toml)
    assert len(observation.curves) == 2 and observation.sampler.walkers == 16
    assert observation.curves[1].settings.band == (4.0, 5.0)
    with warnings.catch_warnings():
        warnings.simplefilter("default", TorridWarning)  # shown as one line, not raised
        status = main(["fit", str(toml), str(table_path), "--temperatures", "free",
                       "--posterior", "60", "--no-progress", "-o", str(tmp_path / "fit.nc")])
    out = capsys.readouterr()
    assert status == 0, out.err
    assert "posterior: radiative_timescale_days = " in out.out
    assert "fitted end points" in out.out
    with xr.open_dataset(tmp_path / "fit.nc") as fit:
        for name in ("radiative_timescale_days", "drag_timescale_days", "night_temperature",
                     "day_temperature"):
            for kind in ("median", "low68", "high68"):
                assert f"posterior_{kind}_{name}" in fit.attrs
        assert "best_night_temperature_K" in fit.attrs and "day_temperature_fit" in fit
    assert (tmp_path / "fit.png").exists() and (tmp_path / "fit-posterior.png").exists()
    assert "torrid: warning: posterior of" in out.err  # a 60-step chain has not converged


@pytest.mark.parametrize("extra, fragment", [
    ("[fitt]\n", "unknown key 'fitt' (did you mean 'fit'?)"),
    ("[posterior.x]\n", "[posterior] unknown key 'x'"),
])
def test_bad_observation_files_give_one_line(table, tmp_path, extra, fragment):
    toml, _ = write_observation(tmp_path, table)
    toml.write_text(toml.read_text().replace("[posterior]\n", extra + "[posterior]\n", 1)
                    if "posterior" not in extra else toml.read_text() + "")
    if "posterior" in extra:
        toml.write_text(toml.read_text().replace("seed = 4\n", "seed = 4\nx = 1\n"))
    with pytest.raises(ObservationError) as err:
        read_observation(toml)
    assert fragment in str(err.value) and "\n" not in str(err.value)
    toml.write_text("[[curve]]\nfile = \"band0.csv\"\n")
    with pytest.raises(ObservationError, match="curve 1: give band"):
        read_observation(toml)


def test_the_python_api_fits_an_observation_file_and_a_csv(table, tmp_path):
    import torrid

    toml, table_path = write_observation(tmp_path, table)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", TorridWarning)
        shape = torrid.fit(toml, table_path, temperatures="shape")
        single = torrid.fit(tmp_path / "band0.csv", table_path, ASSUMED, temperatures="free")
    assert shape.attrs["temperatures"] == "shape" and shape.sizes["curve"] == 2
    assert shape["shape_amplitude"].dims == ("curve", *DIMS)
    assert single.sizes["curve"] == 1 and "best_night_temperature_K" in single.attrs


def test_shape_only_posterior_samples_the_swept_parameters_only(table):
    # shape mode: the offsets and amplitudes are profiled inside the likelihood, so the
    # sampled parameters are the two swept ones; the fixed-temperature chi-square at grid
    # points equals the smooth model's there (cubic splines interpolate: Press et al. 2007).
    observation = injected((0.7, 3.0, 900.0, 2100.0), seed=6)
    (fit, context), _ = quiet(joint_fit, table, observation, "shape")
    model = smooth_model(table, context)
    assert model.names == DIMS
    i, j = (int(np.flatnonzero(a.order == context["best_index"][a.name])[0])
            for a in model.axes)
    assert model.chi_square(np.array([[i, j]], float))[0] == pytest.approx(
        fit.attrs["chi_square_min"], rel=1e-9)
    posterior, _ = quiet(sample, model, np.array([i, j], float), 40,
                         SamplerSettings(walkers=8), progress=False)
    assert posterior.samples.shape[1] == 2 and 0 <= posterior.acceptance <= 1
