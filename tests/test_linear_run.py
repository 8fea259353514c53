"""Linear runs in the chain (issue 13): the run file of numerics.solver = "linear" is an
ordinary run file that torrid phase, plot, collect and fit take unchanged; sweeps with the
solver as an axis; the warm start of run.initial_state = "linear".

These are checks of the plumbing against the time-stepped model's own files (the physics of
the solver: test_linear_steady.py).
"""

import numpy as np
import pytest
import xarray as xr

import torrid
from torrid.interface.cli import main
from torrid.io.pointfile import FINISHED, read_point, config_identifier
from torrid.io.runfile import read_run
from torrid.workflow.driver import run_config

def load(path):
    """A netCDF file read into memory and closed (an open HDF5 handle on a file that is
    opened again by another reader can crash it)."""
    with xr.open_dataset(path) as ds:
        return ds.load()


BRIEF = {"numerics": {"truncation": 10}, "atmosphere": {"drag_timescale_days": 1.0},
         "run": {"days": 2.0, "output_interval_days": 0.5}}


def test_linear_run_file_is_an_ordinary_run_file(tmp_path, capsys):
    """The same variables, dimensions (one time) and attributes as a time-stepped run's file,
    run_status "linear", finite final diagnostics; read_point counts it as finished."""
    config = torrid.ModelConfig().replace(**BRIEF)
    stepped = torrid.run(config, tmp_path / "stepped.nc")
    out = tmp_path / "linear.nc"
    assert main(["run", "--set", "numerics.solver=linear", "--set", "numerics.truncation=10",
                 "--set", "atmosphere.drag_timescale_days=1", "-o", str(out), "-q"]) == 0
    text = capsys.readouterr().out
    assert "linear steady state" in text and "hotspot" in text
    linear = read_run(out)
    assert set(linear.data_vars) == set(stepped.data_vars)
    assert linear.sizes["time"] == 1 and float(linear.time[0]) == 0.0
    for name in stepped.data_vars:
        assert linear[name].dims == stepped[name].dims
        assert linear[name].attrs == stepped[name].attrs
    missing = set(stepped.attrs) - set(linear.attrs) - {"time_step_s"}
    assert not missing
    a = linear.attrs
    assert a["run_status"] == "linear" and a["run_status"] in FINISHED
    assert a["steady_state_reached"] == 1 and np.isnan(a["steady_state_time_days"])
    assert a["linear_residual"] < 1e-12
    for name in ("hotspot_offset", "day_night_contrast", "peak_contrast",
                 "equatorial_zonal_wind"):
        assert np.isfinite(a[f"final_{name}"])
        assert a[f"final_{name}"] == pytest.approx(float(linear[name][0]))
    same = torrid.ModelConfig().replace(numerics={"solver": "linear", "truncation": 10},
                                        atmosphere={"drag_timescale_days": 1.0})
    identifier = config_identifier(same.to_dict())
    assert read_point(out, identifier).status == "linear"


def test_phase_and_plot_take_a_linear_run_file(tmp_path):
    out = tmp_path / "linear.nc"
    torrid.run(torrid.ModelConfig().replace(**BRIEF).replace(numerics={"solver": "linear"}),
               out)
    assert main(["phase", str(out), "-o", str(tmp_path / "pc.nc")]) == 0
    pc = load(tmp_path / "pc.nc")
    assert np.isfinite(pc.flux_ratio).all() and float(pc.amplitude) > 0
    assert main(["plot", str(out)]) == 0
    assert (tmp_path / "linear.png").read_bytes()[:4] == b"\x89PNG"


SWEEP = """\
[numerics]
truncation = 10
[atmosphere]
mass_exchange_momentum = false
[run]
days = 2.0
output_interval_days = 0.5
stop_at_steady_state = false
[sweep]
name = "solvers"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.3, 3.0]
[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
values = [0.5, 5.0]
[[sweep.axis]]
key = "numerics.solver"
values = ["stepping", "linear"]
"""


def test_sweep_with_the_solver_as_an_axis(tmp_path, capsys):
    """Crossed with the timescales: the time-stepped points run in workers and get files, the
    linear ones are solved with the table (no file); collect, plot (with the solver
    comparison) and fit take the table."""
    sweep_file = tmp_path / "solvers.toml"
    sweep_file.write_text(SWEEP)
    folder = tmp_path / "solvers"
    assert main(["sweep", str(sweep_file), "--folder", str(folder), "--workers", "1", "-q",
                 "--maps"]) == 0
    assert "8 done (0 steady, 4 linear)" in capsys.readouterr().out
    assert len(list(folder.glob("point-*.nc"))) == 4  # the time-stepped points only
    table = load(folder / "solvers-table.nc")
    assert table.sizes == {"radiative_timescale_days": 2, "drag_timescale_days": 2,
                           "solver": 2, "lat": 16, "lon": 32}
    linear = table.sel(solver="linear")
    assert (linear.run_status == "linear").all() and (linear.run_file == "").all()
    assert np.isfinite(linear.hotspot_offset).all() and np.isfinite(linear.h).all()
    assert (table.sel(solver="stepping").run_status == "complete").all()
    # the table's linear values are those of a linear run file of the same configuration
    config = torrid.ModelConfig().replace(
        atmosphere={"radiative_timescale_days": 3.0, "drag_timescale_days": 0.5,
                    "mass_exchange_momentum": False},
        numerics={"solver": "linear", "truncation": 10},
        run={"days": 2.0, "output_interval_days": 0.5, "stop_at_steady_state": False})
    ds, _ = run_config(config, progress=False)
    point = linear.sel(radiative_timescale_days=3.0, drag_timescale_days=0.5)
    assert float(point.day_night_contrast) == pytest.approx(ds.attrs["final_day_night_contrast"],
                                                            rel=1e-12)
    np.testing.assert_allclose(point.h.values, ds.h.values[0], rtol=1e-12)
    # collect again (the linear points are solved again), plot with the comparison
    assert main(["collect", str(folder), "-o", str(tmp_path / "again.nc")]) == 0
    again = load(tmp_path / "again.nc")
    xr.testing.assert_allclose(again.hotspot_offset, table.hotspot_offset)
    assert main(["plot", str(folder / "solvers-table.nc")]) == 0
    out = capsys.readouterr().out
    assert "solvers-table-solvers.png" in out
    assert (folder / "solvers-table-solvers.png").read_bytes()[:4] == b"\x89PNG"
    # fit: an observation made from a linear point is found again among the linear points
    from torrid.io.observed import write_observed_csv
    from torrid.workflow.fit import synthetic_observation

    linear_table = table.sel(solver="linear", drop=True)
    linear_table.to_netcdf(tmp_path / "linear-table.nc")
    curves = linear_table.torrid.phase_curve()
    truth = curves.flux_ratio.isel(radiative_timescale_days=1, drag_timescale_days=0)
    write_observed_csv(synthetic_observation(truth, 40, 2.0, seed=1), tmp_path / "obs.csv")
    fit = torrid.fit(tmp_path / "obs.csv", tmp_path / "linear-table.nc")
    assert fit.attrs["best_radiative_timescale_days"] == pytest.approx(3.0)
    assert fit.attrs["best_drag_timescale_days"] == pytest.approx(0.5)


def test_sweep_dry_run_counts_linear_points(tmp_path, capsys):
    sweep_file = tmp_path / "solvers.toml"
    sweep_file.write_text(SWEEP)
    assert main(["sweep", str(sweep_file), "--folder", str(tmp_path / "s"), "--dry-run"]) == 0
    assert "4 to run, 4 linear (solved with the table)" in capsys.readouterr().out


def test_warm_start_begins_at_the_linear_steady_state():
    """run.initial_state = "linear": the first snapshot of the time-stepped run is the linear
    run's state (to round-off), and at small forcing the run stays near it (the nonlinear
    remainder is O(dH/H), test_linear_steady.py)."""
    base = torrid.ModelConfig().replace(
        numerics={"truncation": 21},
        atmosphere={"drag_timescale_days": 1.0, "forcing_contrast": 0.01,
                    "mass_exchange_momentum": False},
        run={"days": 1.0, "output_interval_days": 0.5, "stop_at_steady_state": False})
    linear, _ = run_config(base.replace(numerics={"solver": "linear"}), progress=False)
    warm, _ = run_config(base.replace(run={"initial_state": "linear"}), progress=False)
    mean = warm.attrs["mean_geopotential_m2_s2"] / warm.attrs["gravity_m_s2"]
    scale = np.abs(linear.h.values[0] - mean).max()
    assert np.abs(warm.h.values[0] - linear.h.values[0]).max() < 1e-10 * scale
    assert np.abs(warm.u.values[0] - linear.u.values[0]).max() < 1e-10 * np.abs(linear.u).max()
    assert np.abs(warm.h.values[-1] - linear.h.values[0]).max() < 0.01 * scale
    rest, _ = run_config(base, progress=False)
    assert np.abs(rest.h.values[-1] - linear.h.values[0]).max() > 0.1 * scale


def test_refused_linear_points_of_a_sweep_are_failed_points(tmp_path, capsys):
    """A linear point the solver refuses (here an eccentric orbit) is a failed point with the
    one-line reason; the others are solved."""
    sweep_file = tmp_path / "ecc.toml"
    sweep_file.write_text('[numerics]\ntruncation = 10\nsolver = "linear"\n[sweep]\n'
                          'name = "ecc"\n[[sweep.axis]]\nkey = "orbit.eccentricity"\n'
                          'values = [0.0, 0.2]\n')
    assert main(["sweep", str(sweep_file), "--folder", str(tmp_path / "ecc"), "-q"]) == 0
    out = capsys.readouterr().out
    assert "1 done (0 steady, 1 linear), 1 failed" in out and "circular synchronous" in out
    table = load(tmp_path / "ecc" / "ecc-table.nc")
    assert list(table.run_status.values) == ["linear", "failed"]
    assert np.isfinite(table.hotspot_offset[0]) and np.isnan(table.hotspot_offset[1])
