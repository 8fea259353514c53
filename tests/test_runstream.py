"""The run file merged from restart segments (io/runstream.py, issue 14): copying the first
segment byte for byte and giving it the run's attributes gives the same file as the
record-by-record copy it replaces: the same variables, types, compression, chunks,
attributes and values, bit for bit (netCDF4 read back without masking)."""

import numpy as np
import netCDF4
import pytest

from torrid.io import runstream
from torrid.io.config import ModelConfig
from torrid.workflow.driver import run_to_file

#: Global attributes that differ between two runs of one configuration (clock and date).
CLOCK = {"history", "date_created", "wall_time_s", "summary"}


def _describe(path):
    with netCDF4.Dataset(path) as ds:
        ds.set_auto_mask(False)
        ds.set_auto_scale(False)
        attrs = {k: (type(ds.getncattr(k)).__name__, str(ds.getncattr(k)))
                 for k in ds.ncattrs() if k not in CLOCK}
        variables = {name: (var.dtype, var.dimensions, var.filters(), var.chunking(),
                            {k: str(var.getncattr(k)) for k in var.ncattrs()}, var[:])
                     for name, var in ds.variables.items()}
        unlimited = [d.name for d in ds.dimensions.values() if d.isunlimited()]
    return attrs, variables, unlimited


@pytest.mark.parametrize("restart_interval_days", [10.0, 1.5])  # one segment, several
def test_the_copied_first_segment_equals_the_record_copy(tmp_path, monkeypatch,
                                                         restart_interval_days):
    config = ModelConfig.from_dict({
        "numerics": {"truncation": 10, "time_step_s": 3600.0},
        "run": {"days": 3.0, "output_interval_days": 0.5, "stop_at_steady_state": False,
                "restart_interval_days": restart_interval_days}})
    copies = []
    copyfile = runstream.shutil.copyfile
    monkeypatch.setattr(runstream.shutil, "copyfile",
                        lambda *a: copies.append(a) or copyfile(*a))
    run_to_file(config, tmp_path / "copied.nc")
    assert len(copies) == 1  # the fast path was taken
    monkeypatch.setattr(runstream, "record_count", lambda path: -1)  # forces the record copy
    run_to_file(config, tmp_path / "recorded.nc")
    assert len(copies) == 1
    copied, recorded = _describe(tmp_path / "copied.nc"), _describe(tmp_path / "recorded.nc")
    assert copied[0] == recorded[0]
    assert copied[2] == recorded[2] == ["time"]
    assert copied[1].keys() == recorded[1].keys()
    for name, (dtype, dims, filters, chunks, attrs, values) in copied[1].items():
        other = recorded[1][name]
        assert (dtype, dims, filters, chunks, attrs) == other[:5], name
        assert np.array_equal(values, other[5], equal_nan=True), name
    assert copied[1]["time"][5].size == 7
