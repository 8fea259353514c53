"""Every variable of the phase-curve files, fit files and sweep tables torrid writes takes its
metadata from the one table, torrid.io.variables (run files: tests/test_runfile.py).

The rule checked is the CF conventions' (Eaton et al., NetCDF Climate and Forecast Metadata
Conventions 1.10, 2022, sections 3.1-3.3): a variable of a dimensional quantity carries
``units``, and a ``long_name`` describes it; only string and flag (boolean) variables go without
units. The files are the ones the commands write, read back with xarray.
"""

import warnings

import numpy as np
import pytest
import xarray as xr

import torrid
from torrid.io.observed import write_observed_csv
from torrid.io.phasefile import write_phase_netcdf
from torrid.io.settings import setting
from torrid.io.variables import PARAMETERS, TABLES
from torrid.workflow.fit import fit_table, synthetic_observation
from torrid.workflow.joint_fit import fit_observation
from torrid.workflow.phase import phase_curve

SWEEP = """\
[numerics]
truncation = 10
[run]
days = 2.0
stop_at_steady_state = false
[sweep]
name = "meta"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
log_range = [0.1, 10.0, 3]
[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
values = [1.0, 10.0]
"""


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    """{kind: [paths]} of files written by torrid: a sweep table with maps, the phase curves
    of the table, of one point's run file and of a short eccentric run (time-dependent), and
    a fit with the offset-and-amplitude comparison."""
    folder = tmp_path_factory.mktemp("metadata")
    (folder / "meta.toml").write_text(SWEEP)
    table = torrid.sweep(folder / "meta.toml", workers=1, folder=folder / "meta", maps=True)
    table_path = folder / "meta" / "meta-table.nc"
    point = folder / "meta" / table["run_file"].values.flat[0]
    eccentric = torrid.ModelConfig().replace(
        numerics={"truncation": 10}, planet={"rotation_period_days": 1.0},
        orbit={"eccentricity": 0.2},
        run={"days": 1.2, "output_interval_days": 0.04, "stop_at_steady_state": False})
    phases = []
    for name, ds in (("table", table), ("point", xr.open_dataset(point).load()),
                     ("eccentric", torrid.run(eccentric))):
        phases.append(write_phase_netcdf(phase_curve(ds, phases=60), folder / f"{name}-phase.nc"))
    curves = table.torrid.phase_curve(phases=60)
    observed = synthetic_observation(curves.flux_ratio.isel(radiative_timescale_days=1,
                                                            drag_timescale_days=0), 30, 5.0)
    write_observed_csv(observed, folder / "observed.csv")
    fit_path = folder / "meta-fit.nc"
    fit_table(folder / "observed.csv", table_path, None, output=fit_path, offset_deg=0.0,
              offset_error_deg=90.0, amplitude_ppm=100.0, amplitude_error_ppm=1e3)
    (folder / "obs.toml").write_text("[[curve]]\nfile = \"observed.csv\"\nband = \"4.0-5.0\"\n")
    joint = []
    for mode in ("free", "shape"):  # the joint fit's files (issue 15)
        joint.append(folder / f"meta-fit-{mode}.nc")
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", torrid.TorridWarning)
            fit_observation(folder / "obs.toml", table_path, temperatures=mode,
                            output=joint[-1])
    return {"sweep": [table_path], "phase": phases, "fit": [fit_path, *joint]}


def _opened(path):
    with xr.open_dataset(path, engine="netcdf4") as ds:
        return ds.load()


@pytest.mark.parametrize("kind", ["sweep", "phase", "fit"])
def test_every_variable_has_units_and_long_name_from_the_table(files, kind):
    table = TABLES[kind]
    seen = set()
    for path in files[kind]:
        ds = _opened(path)
        swept = tuple(d for d in ds.dims if "config_key" in ds.coords.get(d, xr.DataArray()).attrs)
        for name, var in ds.variables.items():
            attrs = {k: var.attrs[k] for k in ("units", "long_name", "standard_name")
                     if k in var.attrs}
            flag_or_text = var.dtype == bool or var.dtype.kind in "OSU"
            assert "long_name" in attrs, f"{path.name}: {name}"
            assert "units" in attrs or flag_or_text, f"{path.name}: {name} has no units"
            if "config_key" in var.attrs:  # a swept coordinate: its row of the settings table
                row = setting(var.attrs["config_key"])
                assert attrs == {"long_name": row.label, "units": row.unit}, f"{name}"
                continue
            row = table[name]
            assert attrs == row.attrs(), f"{path.name}: {name}"
            assert var.dims == row.dims_over(swept), f"{path.name}: {name}"
            seen.add(name)
    # and the table has no row that these files do not use
    assert seen == set(table)


def test_the_placeholder_stands_for_the_swept_dims():
    row = TABLES["phase"]["flux_ratio"]
    assert row.dims == (PARAMETERS, "phase")
    assert row.dims_over(("a", "b")) == ("a", "b", "phase")
    assert row.dims_over(()) == ("phase",)
    made = row.variable(np.zeros((2, 3, 4)), ("a", "b"))
    assert made.dims == ("a", "b", "phase") and made.attrs == row.attrs()
    with pytest.raises(ValueError, match="the table says"):
        row.variable(xr.DataArray(np.zeros((4, 2)), dims=("phase", "a")), ("a",))


WINDOWS = """\
[numerics]
truncation = 10
[run]
days = 16.0
output_interval_days = 1.0
stop_at_steady_state = false
[sweep]
name = "windows"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.1, 3.0]
"""


def test_each_points_averaging_window_is_a_variable(tmp_path):
    """The final values are means over each point's own window (issue 11): the longer of 3
    rotation periods (3 days: 9 days) and 5 tau_rad (15 days for tau_rad = 3), so the two
    points differ, and the table says so per point instead of one attribute."""
    (tmp_path / "w.toml").write_text(WINDOWS)
    table = torrid.sweep(tmp_path / "w.toml", workers=1, folder=tmp_path / "w")
    np.testing.assert_allclose(table.averaging_window_days.values, [9.0, 15.0])
    np.testing.assert_allclose(table.averaging_end_days.values, [16.0, 16.0])
    assert table.averaging_window_days.attrs == TABLES["sweep"]["averaging_window_days"].attrs()
    assert "last 7.5 days" not in table.attrs["final_values"]
    assert "averaging_window_days" in table.attrs["final_values"]
    run = xr.open_dataset(tmp_path / "w" / table.run_file.values[1]).attrs
    assert run["averaging_window_days"] == 15.0
    assert run["final_values"].startswith("time means over days 1-16")
