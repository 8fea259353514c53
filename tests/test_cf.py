"""Every file kind torrid writes passes a general CF checker (issue 11).

The checker is the IOOS compliance-checker (``compliance-checker --test=cf:1.10``, in the test
extra), an implementation of the CF conventions 1.10 (Eaton et al. 2022) independent of
torrid. Checked: run files, phase-curve files (of a circular run, and of an eccentric one with
its time variable), sweep tables with maps, and fit files; there must be no error and no
warning. The encoding rules (torrid.io.cf) are checked directly too: no _FillValue on
coordinates, time units with an epoch, a history attribute, and days that stay numbers.
"""

import json
import warnings

import netCDF4
import numpy as np
import pytest
import xarray as xr

import torrid
from torrid.io.cf import CALENDAR, EPOCH, TIME_UNITS, time_days
from torrid.io.observed import write_observed_csv
from torrid.io.phasefile import write_phase_netcdf
from torrid.io.runfile import read_run
from torrid.workflow.fit import fit_table, synthetic_observation
from torrid.workflow.joint_fit import fit_observation

SWEEP = """\
[numerics]
truncation = 10
[run]
days = 1.0
output_interval_days = 0.5
stop_at_steady_state = false
[sweep]
name = "cf"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.3, 1.0]
[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
values = [1.0, inf]
"""


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    """{kind: path} of one file of every kind."""
    folder = tmp_path_factory.mktemp("cf")
    brief = {"numerics": {"truncation": 10},
             "run": {"days": 1.0, "output_interval_days": 0.5, "stop_at_steady_state": False}}
    run_path = folder / "run.nc"
    ds = torrid.run(torrid.ModelConfig().replace(**brief), output=run_path)
    out = {"run": run_path,
           "phase": write_phase_netcdf(ds.torrid.phase_curve(phases=36), folder / "phase.nc")}
    eccentric = torrid.run(torrid.ModelConfig().replace(
        numerics={"truncation": 10}, planet={"rotation_period_days": 1.0},
        orbit={"eccentricity": 0.2},
        run={"days": 1.2, "output_interval_days": 0.04, "stop_at_steady_state": False}))
    out["phase_eccentric"] = write_phase_netcdf(eccentric.torrid.phase_curve(phases=36),
                                                folder / "phase-eccentric.nc")
    (folder / "cf.toml").write_text(SWEEP)
    table = torrid.sweep(folder / "cf.toml", workers=1, folder=folder / "cf", maps=True)
    out["sweep"] = folder / "cf" / "cf-table.nc"
    curve = table.torrid.phase_curve(phases=36).flux_ratio.isel(
        radiative_timescale_days=0, drag_timescale_days=0)
    write_observed_csv(synthetic_observation(curve, 20, 5.0), folder / "observed.csv")
    out["fit"] = folder / "fit.nc"
    fit_table(folder / "observed.csv", out["sweep"], None, output=out["fit"])
    # the joint fit's file (issue 15): two bands, free end points, a brief posterior
    (folder / "obs.toml").write_text(
        "[posterior]\nwalkers = 12\n[[curve]]\nfile = \"observed.csv\"\nband = \"4.0-5.0\"\n"
        "[[curve]]\nfile = \"observed.csv\"\nband = \"4.0-5.0\"\nphase_shift = 0.0\n")
    out["fit_joint"] = folder / "fit-joint.nc"
    with warnings.catch_warnings():  # a brief chain on a 2 x 2 grid: not converged
        warnings.simplefilter("ignore", torrid.TorridWarning)
        fit_observation(folder / "obs.toml", out["sweep"], temperatures="free",
                        posterior_steps=20, output=out["fit_joint"], progress=False)
    return out


def checker_messages(path, tmp_path) -> dict[str, list[str]]:
    """The compliance checker's messages on ``path`` by priority (high: errors, medium:
    warnings, low: information)."""
    runner = pytest.importorskip("compliance_checker.runner")
    runner.CheckSuite.load_all_available_checkers()
    report = tmp_path / f"{path.stem}.json"
    runner.ComplianceChecker.run_checker(str(path), ["cf:1.10"], 0, "normal",
                                         output_filename=str(report), output_format="json")
    result = json.loads(report.read_text())["cf:1.10"]
    return {level: [f"{check['name']}: {msg}" for check in result[f"{level}_priorities"]
                    for msg in check["msgs"]]
            for level in ("high", "medium", "low")}


@pytest.mark.parametrize("kind", ["run", "phase", "phase_eccentric", "sweep", "fit",
                                  "fit_joint"])
def test_the_cf_checker_finds_no_error_and_no_warning(files, kind, tmp_path):
    messages = checker_messages(files[kind], tmp_path)
    print(f"\n{kind}: {json.dumps(messages, indent=1)}")
    assert messages["high"] == [], f"{kind}: CF errors"
    assert messages["medium"] == [], f"{kind}: CF warnings"


@pytest.mark.parametrize("kind", ["run", "phase", "sweep", "fit", "fit_joint"])
def test_coordinates_have_no_fill_value_and_files_a_history(files, kind):
    with netCDF4.Dataset(files[kind]) as nc:
        for name, var in nc.variables.items():
            if name in nc.dimensions or name == "time_days":
                assert "_FillValue" not in var.ncattrs(), f"{kind}: {name}"
        assert "written by torrid" in nc.history


def test_time_has_an_epoch_and_days_stay_numbers(files):
    with netCDF4.Dataset(files["run"]) as nc:
        assert nc["time"].units == TIME_UNITS == f"days since {EPOCH}"
        assert nc["time"].calendar == CALENDAR
    with xr.open_dataset(files["run"]) as ds:  # as a user opens it: time decoded to dates
        assert np.issubdtype(ds.time.dtype, np.datetime64)
        assert ds.time_days.dtype == float and ds.time_days.attrs["units"] == "days"
        np.testing.assert_allclose(ds.time_days.values, [0.0, 0.5, 1.0])
        np.testing.assert_allclose(time_days(ds), [0.0, 0.5, 1.0])
        elapsed = (ds.time - ds.time[0]) / np.timedelta64(1, "D")
        np.testing.assert_allclose(elapsed.values, [0.0, 0.5, 1.0])
        assert float(ds.swap_dims(time="time_days").h.sel(time_days=0.5).mean()) > 0
    ds = read_run(files["run"])  # torrid's readers keep days
    np.testing.assert_allclose(ds.time.values, [0.0, 0.5, 1.0])
