"""Run-file compression and precision (issue 14): zlib with shuffle by default, the level and
the precision set by ``run.output_compression_level`` and ``run.output_precision``.

Checked against the netCDF4 library's own report of each variable's filters
(``netCDF4.Variable.filters()``, Unidata netCDF-C) and against IEEE 754 rounding to single
precision (numpy's ``astype(float32)``): a double-precision file reads back bit for bit, a
single-precision file holds the correctly rounded float32 of every map value.
"""

import netCDF4
import numpy as np
import pytest
import xarray as xr

import torrid
from torrid.io.config import ConfigError

MAPS = ("h", "u", "v", "vorticity", "divergence")


def _config(**run):
    return torrid.ModelConfig().replace(
        numerics={"truncation": 10},
        run={"days": 1.0, "output_interval_days": 0.5, "stop_at_steady_state": False, **run})


def test_default_file_is_shuffled_zlib_level_1_and_reads_back_bit_for_bit(tmp_path):
    ds = torrid.run(_config(), tmp_path / "r.nc")
    with netCDF4.Dataset(tmp_path / "r.nc") as nc:
        for name in ds.data_vars:
            filters = nc[name].filters()
            assert filters["zlib"] and filters["shuffle"] and filters["complevel"] == 1, name
            assert nc[name].dtype == np.float64
    with xr.open_dataset(tmp_path / "r.nc", decode_times=False) as back:
        for name in ds.data_vars:
            assert back[name].dtype == np.float64
            assert np.array_equal(back[name].values, ds[name].values, equal_nan=True), name


def test_level_and_single_precision(tmp_path):
    ds = torrid.run(_config(output_compression_level=6, output_precision="single"),
                    tmp_path / "s.nc")
    double = torrid.run(_config(output_compression_level=0), tmp_path / "d.nc")
    with netCDF4.Dataset(tmp_path / "s.nc") as nc:
        assert nc["h"].filters()["complevel"] == 6 and nc["h"].filters()["shuffle"]
        assert {nc[m].dtype for m in MAPS} == {np.dtype("float32")}
        assert nc["day_night_contrast"].dtype == np.float64  # time series stay double
    with netCDF4.Dataset(tmp_path / "d.nc") as nc:
        assert not nc["h"].filters()["zlib"]
    with xr.open_dataset(tmp_path / "s.nc", decode_times=False) as back:
        for name in MAPS:
            assert np.array_equal(back[name].values.astype(np.float32),
                                  ds[name].values.astype(np.float32), equal_nan=True), name


def test_bad_precision_is_one_line():
    with pytest.raises(ConfigError, match=r"run.output_precision") as err:
        torrid.ModelConfig().with_override("run.output_precision=half")
    assert "\n" not in str(err.value)
