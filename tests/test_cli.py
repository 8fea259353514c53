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
    assert main(["run", "--truncation", "10", "--days", "0.1", "--output-interval", "0.05", "-o", str(out), "-q",
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


def test_planet_run_from_toml_with_overrides_and_plots(tmp_path, capsys):
    toml = tmp_path / "hot.toml"
    toml.write_text("[atmosphere]\nradiative_timescale_days = 0.5\n[numerics]\ntruncation = 21\n"
                    "[run]\ndays = 1.0\noutput_interval_days = 0.25\n")
    out = tmp_path / "hot.nc"
    assert main(["run", str(toml), "--set", "atmosphere.drag_timescale_days=5", "-o", str(out),
                 "-q"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[0].startswith("planet:") and "hotspot" in lines[1] and "map:" in lines[2]
    ds = xr.open_dataset(out)
    import json

    config = json.loads(ds.attrs["configuration_json"])
    assert config["atmosphere"]["drag_timescale_days"] == 5.0
    assert config["atmosphere"]["radiative_timescale_days"] == 0.5
    for name in ("hotspot_offset", "day_night_contrast", "limb_wind_east", "kinetic_energy"):
        assert ds[name].dims == ("time",) and f"final_{name}" in ds.attrs
    ds.close()
    assert main(["plot", str(out), "--overwrite"]) == 0
    assert (tmp_path / "hot-spinup.png").read_bytes()[:4] == b"\x89PNG"
    assert main(["plot", str(out)]) == 2  # images exist now: refused without --overwrite
    assert "--overwrite" in capsys.readouterr().err


@pytest.mark.parametrize("toml, fragment", [
    ("[numerics]\ntruncaton = 21\n", "unknown key 'numerics.truncaton' (did you mean "
                                     "'numerics.truncation'?)"),
    ("[orbit]\neccentricity = 1.2\n", "orbit.eccentricity = 1.2: must be < 1"),
    ("[atmosphere]\nforcing_contrast = 'big'\n", "atmosphere.forcing_contrast = 'big': must be a number"),
    ("[run\n", "invalid TOML"),
])
def test_bad_config_files_name_the_file_and_key(toml, fragment, tmp_path, capsys):
    path = tmp_path / "bad.toml"
    path.write_text(toml)
    assert main(["run", str(path), "-q"]) == 2
    err = capsys.readouterr().err
    assert "bad.toml" in err and fragment in err and len(err.splitlines()) == 1


def test_bad_override_is_one_line(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["run", "--set", "atmosphere.radiative_timescale_days=-1", "-q"]) == 2
    assert "atmosphere.radiative_timescale_days = -1: must be > 0" in capsys.readouterr().err
    assert main(["run", "--set", "nonsense", "-q"]) == 2
    assert "must look like section.key=value" in capsys.readouterr().err
