"""Every example (scripts and configuration files) runs briefly and produces what it promises."""

import math
import runpy
import sys
from pathlib import Path

import warnings

import numpy as np
import pytest

import torrid
from torrid.interface.cli import main
from torrid.meta import TorridWarning

EXAMPLES = Path(__file__).parents[1] / "examples"
BRIEF = ("numerics.truncation=21", "run.days=2", "run.output_interval_days=0.5")


def test_every_example_is_covered():
    assert sorted(p.name for p in EXAMPLES.glob("*.py")) == sorted(BRIEF_ARGS)
    assert sorted(p.name for p in EXAMPLES.glob("*.toml")) == sorted(TOML_EXAMPLES)


TOML_EXAMPLES = ["default_planet.toml", "eccentric.toml", "strong_drag.toml", "tau_sweep.toml",
                 "linear_vs_nonlinear.toml"]
SWEEP_EXAMPLES = ("tau_sweep.toml", "linear_vs_nonlinear.toml")
RUN_EXAMPLES = [name for name in TOML_EXAMPLES if name not in SWEEP_EXAMPLES]


def test_default_planet_example_is_the_built_in_default():
    assert torrid.load_config(EXAMPLES / "default_planet.toml") == torrid.ModelConfig()


@pytest.mark.parametrize("name", RUN_EXAMPLES)
def test_toml_example_runs(name, tmp_path, capsys):
    out = tmp_path / name.replace(".toml", ".nc")
    argv = ["run", str(EXAMPLES / name), "-o", str(out), "-q"]
    for assignment in BRIEF:
        argv += ["--set", assignment]
    assert main(argv) == 0
    text = capsys.readouterr().out
    assert "hotspot" in text and "day-night contrast" in text
    ds = torrid.io.runfile.read_run(out)
    assert np.isfinite(ds.h).all() and ds.attrs["case"] == "planet"
    assert math.isclose(float(ds.time[-1]), 2.0) or ds.attrs["steady_state_reached"]
    assert out.with_suffix(".png").read_bytes()[:4] == b"\x89PNG"


BRIEF_ARGS = {
    "galewsky_vorticity.py": ["-T", "21", "--days", "0.5"],
    # runs linear_vs_nonlinear.toml briefly (2 x 2 timescales x both solvers at T10)
    "linear_vs_nonlinear.py": ["-T", "10", "--days", "2", "--values", "2", "--workers", "1"],
}


@pytest.mark.parametrize("name", sorted(BRIEF_ARGS))
def test_example_runs(name, tmp_path, monkeypatch):
    monkeypatch.setattr(sys, "argv", [name, *BRIEF_ARGS[name], "--folder", str(tmp_path)])
    runpy.run_path(str(EXAMPLES / name), run_name="__main__")
    pngs = list(tmp_path.glob("*.png"))
    assert pngs and all(p.read_bytes()[:4] == b"\x89PNG" for p in pngs)
    assert list(tmp_path.glob("*.nc"))


SMALL_DEMO = """\
[numerics]
truncation = 10
[run]
days = 6.0
output_interval_days = 1.0
stop_at_steady_state = false
[sweep]
name = "demo"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
log_range = [0.1, 10.0, 3]
[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
log_range = [0.1, 10.0, 3]
"""


def test_demo_runs_the_whole_chain_briefly(tmp_path, capsys):
    from torrid.interface.demo import run_demo

    with warnings.catch_warnings():  # a brief chain: its convergence warning is expected
        warnings.filterwarnings("ignore", "posterior.*has not converged", TorridWarning)
        files = run_demo(tmp_path / "demo", workers=1, sweep_text=SMALL_DEMO, progress=False,
                         posterior_steps=150)
    out = capsys.readouterr().out
    assert "INVENTED observation in two invented bands" in out and "[5/5]" in out
    assert "posterior: night_temperature = " in out and "autocorrelation" in out
    for key in ("phase_nc", "phase_png", "observation_toml", "observation_3_4_csv",
                "observation_4_5_csv", "fit_nc", "fit_png", "fit_posterior_png", "table"):
        assert files[key].exists(), key
    assert files["recovered"]  # 15 ppm noise on 60 phases singles out the generating point
    with pytest.raises(FileExistsError, match="--overwrite"):
        run_demo(tmp_path / "demo", workers=1, sweep_text=SMALL_DEMO, progress=False)


def test_sweep_example_is_valid_and_runs_briefly(tmp_path, capsys):
    from torrid.io.sweepfile import load_sweep

    spec = load_sweep(EXAMPLES / "tau_sweep.toml", folder=tmp_path / "s")
    assert spec.shape == (5, 4) and len(spec.points()) == 20
    text = (EXAMPLES / "tau_sweep.toml").read_text()
    brief = text.replace("truncation = 21", "truncation = 10").replace(
        "days = 200.0", "days = 2.0").replace("log_range = [0.03, 30.0, 5]",
                                              "values = [0.1, 1.0]").replace(
        "values = [inf, 10.0, 1.0, 0.1]", "values = [inf, 1.0]")
    small = tmp_path / "small.toml"
    small.write_text(brief)
    assert main(["sweep", str(small), "--folder", str(tmp_path / "s"), "--workers", "1",
                 "-q"]) == 0
    assert "4 done" in capsys.readouterr().out


def test_linear_vs_nonlinear_sweep_example_is_valid(tmp_path):
    """The sweep behind the README's linear-against-nonlinear image: 5 x 4 timescales with the
    solver crossed, every point valid (the linear solver takes finite drag only here)."""
    from torrid.io.sweepfile import load_sweep

    spec = load_sweep(EXAMPLES / "linear_vs_nonlinear.toml", folder=tmp_path / "s")
    assert spec.shape == (5, 4, 2)
    points = spec.points()
    assert all(p.config is not None for p in points)
    assert sum(p.config.numerics.solver == "linear" for p in points) == 20
