"""Fitting a measured phase curve with a sweep: chi-square, confidence regions, best point."""

import re
import warnings

import numpy as np
import pytest
import xarray as xr
from scipy import stats

from torrid.io.observed import ObservedDataError, read_observed_csv, write_observed_csv
from torrid.io.observed import ObservedCurve
from torrid.meta import TorridWarning
from torrid.workflow.fit_axes import AxisCoordinate
from torrid.workflow.fit_checks import chi_square_bounds
from torrid.workflow.fit import (DELTA_CHI2, axis_transform, fit_sweep, interpolated_minimum,
                                 synthetic_observation)


def test_delta_chi_square_levels_match_scipy():
    # Avni (1976): joint regions of two parameters; quoted from memory, checked here against
    # the chi-square quantiles with 2 degrees of freedom (scipy.stats.chi2).
    assert DELTA_CHI2["68.27%"] == pytest.approx(stats.chi2.ppf(0.6827, 2), abs=0.005)
    assert DELTA_CHI2["95.45%"] == pytest.approx(stats.chi2.ppf(0.9545, 2), abs=0.005)


def _family():
    """Analytic phase curves over a log-spaced 5 x 4 grid: amplitude and offset vary smoothly."""
    tau_rad = np.logspace(-2, 2, 5)
    tau_drag = np.logspace(-1, 2, 4)
    phase = np.arange(360) / 360
    r, d = np.meshgrid(np.log10(tau_rad), np.log10(tau_drag), indexing="ij")
    amplitude = 400 / (1 + np.exp(r)) + 40 * d  # ppm
    offset = 0.02 * (r + 2) + 0.01 * d  # phase shift of the maximum before eclipse
    flux = 500 + amplitude[..., None] * np.cos(2 * np.pi * (phase - 0.5 + offset[..., None]))
    ds = xr.Dataset({"flux_ratio": (("radiative_timescale_days", "drag_timescale_days", "phase"),
                                    flux),
                     "offset_of_maximum": (("radiative_timescale_days", "drag_timescale_days"),
                                           offset * 360),
                     "amplitude": (("radiative_timescale_days", "drag_timescale_days"),
                                   2 * amplitude)},
                    coords={"radiative_timescale_days": tau_rad, "drag_timescale_days": tau_drag,
                            "phase": phase})
    return ds


@pytest.mark.parametrize("truth", [(1, 2), (3, 0), (2, 1)])
def test_fit_recovers_the_generating_grid_point(truth):
    curves = _family()
    point = curves.flux_ratio.isel(radiative_timescale_days=truth[0],
                                   drag_timescale_days=truth[1])
    # noise 10 ppm on 50 points, far below the 20-100 ppm differences between neighbours
    observed = synthetic_observation(point, 50, noise_ppm=10.0, seed=3)
    on_edge = truth[0] in (0, 4) or truth[1] in (0, 3)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        fit = fit_sweep(curves, observed)
    edge = [str(w.message) for w in caught if "edge of the grid" in str(w.message)]
    assert bool(edge) == on_edge and len(caught) == len(edge)
    assert fit.attrs["best_radiative_timescale_days"] == curves.radiative_timescale_days[truth[0]]
    assert fit.attrs["best_drag_timescale_days"] == curves.drag_timescale_days[truth[1]]
    assert bool(fit.within_68.isel(radiative_timescale_days=truth[0],
                                   drag_timescale_days=truth[1]))
    assert fit.within_95.sum() >= fit.within_68.sum() >= 1
    # the chi-square minimum is about the number of points for a correct model
    assert 20 < fit.attrs["chi_square_min"] < 90
    # the interpolated estimate stays next to the generating point (within one grid cell)
    for dim, index in zip(("radiative_timescale_days", "drag_timescale_days"), truth):
        values = np.log10(curves[dim].values)
        assert abs(np.log10(fit.attrs[f"estimate_{dim}"]) - values[index]) <= abs(
            values[1] - values[0])


def test_consistency_with_measured_offset_and_amplitude():
    curves = _family()
    fit = fit_sweep(curves, synthetic_observation(curves.flux_ratio.isel(
        radiative_timescale_days=2, drag_timescale_days=1), 30, 5.0),
        offset_deg=float(curves.offset_of_maximum[2, 1]), offset_error_deg=1.0,
        amplitude_ppm=float(curves.amplitude[2, 1]), amplitude_error_ppm=5.0)
    assert bool(fit.consistent[2, 1]) and int(fit.consistent.sum()) < fit.consistent.size


def test_interpolated_estimate_between_grid_points():
    # Curves linear in both (log) parameters: the bilinear interpolant is exact, so a noise-free
    # observation made between grid points is located to the optimiser's tolerance.
    x, y = np.linspace(-1, 1, 5), np.linspace(0, 3, 4)
    phases = (np.arange(40) + 0.5) / 40
    shape_a, shape_b = np.cos(2 * np.pi * phases), np.sin(2 * np.pi * phases)
    model = (500 + 100 * x[:, None, None] * shape_a + 80 * y[None, :, None] * shape_b)
    truth = (0.37, 1.9)
    obs = ObservedCurve(phases, 500 + 100 * truth[0] * shape_a + 80 * truth[1] * shape_b,
                        np.full(40, 5.0))
    xs, ys, zs = interpolated_minimum(model, x, y, obs)
    assert (xs, ys) == pytest.approx(truth, abs=1e-4) and zs < 1e-4
    assert axis_transform(np.logspace(-2, 2, 9))[1] and not axis_transform(np.arange(1, 5))[1]


def test_observed_csv_round_trip_and_errors(tmp_path):
    curves = _family()
    observed = synthetic_observation(curves.flux_ratio.isel(radiative_timescale_days=0,
                                                            drag_timescale_days=0), 12, 8.0)
    path = write_observed_csv(observed, tmp_path / "obs.csv")
    back = read_observed_csv(path)
    np.testing.assert_allclose(back.flux_ratio_ppm, observed.flux_ratio_ppm, rtol=1e-9)
    bad = tmp_path / "bad.csv"
    for text, fragment in [("phase,f,e\n0.1,100,5\n0.2,abc,5\n0.3,1,1\n", "line 3"),
                           ("0.1,100,5\n0.2,100,0\n0.3,1,1\n", "error = 0.0: must be > 0"),
                           ("0.1,100,5\n1.2,100,1\n0.3,1,1\n", "phase = 1.2: must be in [0, 1)"),
                           ("0.1,100\n", "2 columns, expected 3"),
                           ("0.1,100,5\n", "need at least 3")]:
        bad.write_text(text)
        with pytest.raises(ObservedDataError) as err:
            read_observed_csv(bad)
        assert fragment in str(err.value)
        assert "bad.csv" in str(err.value) and "\n" not in str(err.value)


def test_python_api_sweep_then_fit(tmp_path):
    """The Python API mirrors the CLI: torrid.sweep returns the table, torrid.fit fits it."""
    import torrid

    sweep_file = tmp_path / "api.toml"
    sweep_file.write_text("[numerics]\ntruncation = 10\n[run]\ndays = 3.0\n"
                          "stop_at_steady_state = false\n[sweep]\nname = \"api\"\n"
                          "[[sweep.axis]]\nkey = \"atmosphere.radiative_timescale_days\"\n"
                          "log_range = [0.1, 10.0, 3]\n[[sweep.axis]]\n"
                          "key = \"atmosphere.drag_timescale_days\"\nvalues = [1.0, 10.0]\n")
    table = torrid.sweep(sweep_file, workers=1, folder=tmp_path / "api", maps=True)
    assert table.sizes["radiative_timescale_days"] == 3 and "h" in table
    curves = table.torrid.phase_curve()
    observed = synthetic_observation(curves.flux_ratio.isel(radiative_timescale_days=1,
                                                            drag_timescale_days=0), 40, 5.0)
    write_observed_csv(observed, tmp_path / "obs.csv")
    fit = torrid.fit(tmp_path / "obs.csv", tmp_path / "api" / "api-table.nc")
    assert fit.attrs["best_radiative_timescale_days"] == pytest.approx(1.0)
    assert fit.attrs["best_drag_timescale_days"] == 1.0


# --- issue 11: sanity warnings and interpolation across inf ------------------------------------

def test_a_curve_given_as_a_fraction_is_warned_about():
    # Hot gas giant phase curves are tens to thousands of ppm; 1e-3 is a fraction (our limit:
    # everything below 1 ppm, see torrid.workflow.fit_checks).
    curves = _family()
    observed = synthetic_observation(curves.flux_ratio.isel(radiative_timescale_days=2,
                                                            drag_timescale_days=1), 30, 5.0)
    fraction = ObservedCurve(observed.phase, observed.flux_ratio_ppm * 1e-6,
                             observed.error_ppm * 1e-6, source="fraction.csv")
    with warnings.catch_warnings(record=True) as got:
        warnings.simplefilter("always")
        fit_sweep(curves, fraction)
    messages = [str(w.message) for w in got if issubclass(w.category, TorridWarning)]
    assert any(re.search(r"fraction.csv: .*looks like a fraction.*ppm", m) for m in messages)
    assert all("\n" not in m for m in messages)


def test_reduced_chi_square_far_from_one_is_warned_about():
    # 597 for 98 dof (the case of issue 11) lies far outside the central 99.73 % of the
    # chi-square distribution (scipy.stats.chi2): 60-148 for 98 dof.
    low, high = chi_square_bounds(98)
    assert low == pytest.approx(stats.chi2.ppf(0.00135, 98)) and 55 < low < 65
    assert high == pytest.approx(stats.chi2.ppf(0.99865, 98)) and 140 < high < 155
    curves = _family()
    point = curves.flux_ratio.isel(radiative_timescale_days=2, drag_timescale_days=1)
    observed = synthetic_observation(point, 50, noise_ppm=10.0, seed=3)
    understated = ObservedCurve(observed.phase, observed.flux_ratio_ppm, observed.error_ppm / 3)
    with warnings.catch_warnings(record=True) as got:
        warnings.simplefilter("always")
        fit_sweep(curves, understated)
    assert any(re.search(r"reduced chi-square .* outside .*99.73 %", str(w.message))
               for w in got)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        fit_sweep(curves, observed)  # honest errors: no warning


def test_no_estimate_is_said_on_screen_with_its_reason():
    curves = _family().isel(drag_timescale_days=[1])
    curves = curves.squeeze("drag_timescale_days", drop=True)
    observed = synthetic_observation(curves.flux_ratio.isel(radiative_timescale_days=2), 30, 5.0)
    with pytest.warns(TorridWarning, match="no interpolated estimate: the sweep has one swept"):
        fit = fit_sweep(curves, observed)
    assert "estimate_note" in fit.attrs
    failed = _family()
    failed["flux_ratio"][4, 3] = np.nan
    with pytest.warns(TorridWarning, match="no interpolated estimate: some grid points"):
        fit_sweep(failed, synthetic_observation(failed.flux_ratio.isel(
            radiative_timescale_days=2, drag_timescale_days=1), 30, 5.0))


def test_the_estimate_interpolates_across_inf_in_drag_rate():
    # An axis ending in inf (no drag) is interpolated in the drag rate 1/tau (inf -> 0) in its
    # last cell. Curves linear in the rate there are reproduced exactly by the bilinear
    # interpolant, so a noise-free curve made at tau = 40 d (rate 0.025 /d, a quarter of the way
    # from 1/10 to 0 ... i.e. u = 2.75) is found at 40 d.
    axis = AxisCoordinate("drag_timescale_days", [1.0, 10.0, np.inf, 0.1])
    assert list(axis.sorted_values) == [0.1, 1.0, 10.0, np.inf] and axis.log
    assert axis.value(2.75) == pytest.approx(40.0) and axis.value(1.5) == pytest.approx(
        10**0.5)
    assert axis.index(40.0) == pytest.approx(2.75) and np.isinf(axis.value(3.0))
    tau_rad = np.logspace(-1, 1, 3)
    drag = np.array([0.1, 1.0, 10.0, np.inf])
    rate_coord = np.array([0.0, 1.0, 2.0, 3.0])  # u of each drag value
    phase = np.arange(120) / 120
    r = np.log10(tau_rad)
    amp = 200 + 30 * rate_coord[None, :] + 0 * r[:, None]
    shift = 0.02 * r[:, None, None]  # the peak moves with tau_rad
    flux = 600 + amp[..., None] * np.cos(2 * np.pi * (phase - 0.5 + shift))
    curves = xr.Dataset({"flux_ratio": (("radiative_timescale_days", "drag_timescale_days",
                                         "phase"), flux)},
                        coords={"radiative_timescale_days": tau_rad,
                                "drag_timescale_days": drag, "phase": phase})
    obs_phase = (np.arange(40) + 0.5) / 40
    truth_amp = 200 + 30 * 2.75
    observed = ObservedCurve(obs_phase, 600 + truth_amp * np.cos(2 * np.pi * (obs_phase - 0.5))
                             + 0.0, np.full(40, 5.0))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", TorridWarning)  # the truth sits by the edge
        fit = fit_sweep(curves, observed)
    assert "estimate_note" not in fit.attrs
    assert fit.attrs["estimate_drag_timescale_days"] == pytest.approx(40.0, rel=0.03)
    assert fit.attrs["estimate_radiative_timescale_days"] == pytest.approx(1.0, abs=0.02)
    # (the phase-shift interpolation is not exact in the shift, so chi-square is small, not 0)
    assert fit.attrs["estimate_chi_square"] < 0.5
