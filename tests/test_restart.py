"""Restarts: N + N steps with a restart in between equal 2N straight steps bit for bit; a run
killed with SIGKILL leaves no half-written run file and --resume completes it."""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

import torrid
from torrid.io.config import ConfigError
from torrid.io.runfile import read_run
from torrid.workflow.restart import restart_folder

EXAMPLES = Path(__file__).parents[1] / "examples"


def assert_same_data(a, b):
    assert set(a.data_vars) == set(b.data_vars)
    for name in a.data_vars:
        assert np.array_equal(a[name].values, b[name].values, equal_nan=True), name
    assert np.array_equal(a.time.values, b.time.values)


def _brief(config, days):
    return config.replace(numerics={"truncation": 21},
                          run={"days": days, "output_interval_days": 0.5,
                               "restart_interval_days": 1.0, "stop_at_steady_state": False})


@pytest.mark.parametrize("which", ["default planet", "eccentric"])
def test_restart_equals_straight_run_bit_for_bit(which, tmp_path):
    base = (torrid.ModelConfig() if which == "default planet"
            else torrid.load_config(EXAMPLES / "eccentric.toml"))
    straight = torrid.run(_brief(base, 4.0), tmp_path / "straight.nc")
    first_half = torrid.run(_brief(base, 2.0), tmp_path / "resumed.nc")
    assert first_half.sizes["time"] == 5
    (tmp_path / "resumed.nc").unlink()  # as if the run had been interrupted at day 2
    resumed = torrid.run(_brief(base, 4.0), tmp_path / "resumed.nc", resume=True)
    assert_same_data(straight, resumed)
    assert resumed.attrs["steps"] == straight.attrs["steps"]


def test_resume_refuses_another_configuration(tmp_path):
    torrid.run(_brief(torrid.ModelConfig(), 1.0), tmp_path / "r.nc")
    other = _brief(torrid.ModelConfig(), 2.0).with_override("atmosphere.forcing_contrast=0.5")
    with pytest.raises(ConfigError, match="atmosphere.forcing_contrast differ"):
        torrid.run(other, tmp_path / "r.nc", overwrite=True, resume=True)
    with pytest.raises(ConfigError, match="no restart data"):
        torrid.run(other, tmp_path / "elsewhere.nc", resume=True)


def test_kill9_leaves_no_partial_file_and_resume_completes(tmp_path):
    out = tmp_path / "long.nc"
    sets = ["numerics.truncation=21", "run.days=30", "run.output_interval_days=0.5",
            "run.restart_interval_days=0.5", "run.stop_at_steady_state=false"]
    argv = [sys.executable, "-m", "torrid", "run", "-o", str(out), "-q", "--no-plot"]
    for s in sets:
        argv += ["--set", s]
    proc = subprocess.Popen(argv, start_new_session=True, stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL)
    state = restart_folder(out) / "state.npz"
    deadline = time.time() + 120
    while not state.exists() and time.time() < deadline and proc.poll() is None:
        time.sleep(0.05)
    time.sleep(0.3)  # somewhere in the middle of stepping and writing snapshots
    os.killpg(proc.pid, signal.SIGKILL)
    proc.wait()
    assert state.exists(), "the run never wrote a restart"
    if out.exists():  # only if it finished before the kill: then it must be complete
        assert read_run(out).attrs["run_status"] == "complete"
    assert not [p for p in tmp_path.iterdir() if p.suffix == ".tmp"]  # no orphans visible
    done = subprocess.run(argv + ["--resume", "--overwrite"], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    config = torrid.ModelConfig()
    for s in sets:
        config = config.with_override(s)
    assert_same_data(read_run(out), torrid.run(config))


def test_restart_bit_for_bit_with_a_step_that_changes_after_the_restart(tmp_path):
    """Issue 14: the automatic step follows the winds (numerics.time_step_rule = follow_winds),
    changing at output times. A run resumed at day 0.5 equals the straight run bit for bit while
    its step changes between the restart and the end (the default planet from rest at T21
    spins up: measured changes at days 0.5 and 1, the second after the restart)."""
    config = torrid.ModelConfig().replace(
        numerics={"truncation": 21},
        run={"days": 3.0, "output_interval_days": 0.5, "restart_interval_days": 0.5,
             "stop_at_steady_state": False})
    straight = torrid.run(config, tmp_path / "straight.nc")
    changes = [float(part.split(":")[0].removeprefix("day "))
               for part in straight.attrs["time_step_changes"].split("; ")]
    assert any(day > 0.5 for day in changes), straight.attrs["time_step_changes"]
    torrid.run(config.replace(run={"days": 0.5}), tmp_path / "resumed.nc")
    (tmp_path / "resumed.nc").unlink()
    resumed = torrid.run(config, tmp_path / "resumed.nc", resume=True)
    assert_same_data(straight, resumed)
    for key in ("steps", "tendency_evaluations", "time_step_changes"):
        assert resumed.attrs[key] == straight.attrs[key], key
