"""The command line, called as a user would (through main and as a console script)."""

import subprocess
import sys

import numpy as np
import pytest
import xarray as xr

from torrid.interface.cli import main


def test_run_writes_a_run_file_and_a_summary(tmp_path, capsys):
    out = tmp_path / "w2.nc"
    assert main(["run", "--case", "williamson2", "--alpha", "0.05", "--truncation", "21",
                 "--days", "1", "-o", str(out), "--quiet"]) == 0
    line = capsys.readouterr().out.strip()
    assert "simulated days/s" in line and "mass change" in line and str(out) in line
    with xr.open_dataset(out) as ds:
        assert ds.sizes["time"] == 2 and ds.attrs["case"] == "williamson2"
        assert np.isfinite(ds.h).all()


def test_existing_output_is_kept_without_overwrite(tmp_path, capsys):
    out = tmp_path / "x.nc"
    out.write_text("precious")
    assert main(["run", "--truncation", "10", "--days", "0.1", "-o", str(out), "-q"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("torrid: error:") and "--overwrite" in err and len(err.splitlines()) == 1
    assert out.read_text() == "precious"
    assert main(["run", "--truncation", "10", "--days", "0.1", "-o", str(out), "-q",
                 "--overwrite"]) == 0


@pytest.mark.parametrize("argv, fragment", [
    (["run", "--truncation", "0"], "--truncation = 0: must be >= 1"),
    (["run", "--case", "williamson5", "--alpha", "0.1"], "--alpha = 0.1: only --case williamson2"),
    (["run", "--days", "-1"], "--days = -1.0: must be > 0"),
    (["plot", "nowhere.nc"], "nowhere.nc: no such run file"),
])
def test_bad_input_is_one_line_without_traceback(argv, fragment, capsys, tmp_path,
                                                 monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert fragment in err and "Traceback" not in err and len(err.splitlines()) == 1


def test_plot_writes_png(tmp_path, small_w6_run, capsys):
    run_file = tmp_path / "w6.nc"
    small_w6_run.to_netcdf(run_file)
    assert main(["plot", str(run_file), "--variable", "vorticity"]) == 0
    png = tmp_path / "w6-vorticity.png"
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert main(["plot", str(run_file), "--variable", "nonsense"]) == 2
    assert "variable 'nonsense' not in the run file" in capsys.readouterr().err


def test_console_script_help_reads_well():
    for argv in (["--help"], ["run", "--help"], ["plot", "--help"]):
        res = subprocess.run([sys.executable, "-m", "torrid", *argv], capture_output=True,
                             text=True, check=True)
        assert "usage: torrid" in res.stdout
    res = subprocess.run([sys.executable, "-m", "torrid", "run", "--help"], capture_output=True,
                         text=True, check=True)
    for case in ("williamson2", "williamson5", "williamson6", "galewsky", "galewsky-unperturbed"):
        assert case in res.stdout
