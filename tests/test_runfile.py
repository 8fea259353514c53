"""Run files: CF-1.10 metadata from the variable table, provenance, atomic and protected writes."""

import json

import numpy as np
import pytest
import xarray as xr

import torrid
from torrid.io.runfile import OutputExistsError, RunFileError, read_run, write_atomic
from torrid.io.variables import VARIABLES


def test_every_variable_carries_its_table_attributes(small_w6_run):
    ds = small_w6_run
    case_variables = {"h", "u", "v", "vorticity", "divergence", "surface_height",
                      "mean_thickness", "total_energy", "potential_enstrophy"}
    assert case_variables <= set(ds.data_vars) <= set(VARIABLES)
    for name in ds.data_vars:
        var = VARIABLES[name]
        assert ds[name].dims == var.dims
        assert ds[name].attrs["units"] == var.units
        assert ds[name].attrs["long_name"] == var.long_name
        assert ds[name].attrs.get("standard_name") == var.standard_name
    # CF standard names (CF standard name table): the winds.
    assert ds.u.attrs["standard_name"] == "eastward_wind"
    assert ds.v.attrs["standard_name"] == "northward_wind"
    assert ds.attrs["Conventions"] == "CF-1.10"


def test_coordinates_and_schedule(small_w6_run):
    ds = small_w6_run
    np.testing.assert_allclose(ds.time.values, [0.0, 0.5, 1.0])  # initial state at time 0
    assert ds.lat.attrs["units"] == "degrees_north" and np.all(np.diff(ds.lat) > 0)
    assert ds.lon.attrs["units"] == "degrees_east"
    assert ds.lon.min() >= -180 and ds.lon.max() < 180 and np.all(np.diff(ds.lon) > 0)


def test_provenance(small_w6_run):
    attrs = small_w6_run.attrs
    assert attrs["torrid_version"] == torrid.__version__
    config = json.loads(attrs["configuration_json"])
    assert config["numerics"]["truncation"] == 21 and config["case"]["name"] == "williamson6"
    assert torrid.io.config.ModelConfig.from_dict(config).numerics.truncation == 21
    for key in ("date_created", "truncation", "grid", "time_step_s"):
        assert key in attrs
    assert attrs["truncation"] == "T21"


def test_write_read_round_trip_and_overwrite_protection(small_w6_run, tmp_path):
    path = tmp_path / "w6.nc"
    write_atomic(small_w6_run, path)
    back = read_run(path)
    xr.testing.assert_identical(back.drop_attrs(), small_w6_run.drop_attrs())
    with pytest.raises(OutputExistsError, match="--overwrite"):
        write_atomic(small_w6_run, path)
    write_atomic(small_w6_run, path, overwrite=True)
    assert [p.name for p in tmp_path.iterdir()] == ["w6.nc"]  # no temporary left behind


def test_bad_run_files_are_named(tmp_path):
    with pytest.raises(RunFileError, match="no such run file"):
        read_run(tmp_path / "missing.nc")
    junk = tmp_path / "junk.nc"
    junk.write_bytes(b"not a netCDF file")
    with pytest.raises(RunFileError, match="junk.nc: not a readable netCDF run file"):
        read_run(junk)
    other = tmp_path / "other.nc"
    xr.Dataset({"x": ("a", [1.0])}).to_netcdf(other)
    with pytest.raises(RunFileError, match="missing h, u, v"):
        read_run(other)
