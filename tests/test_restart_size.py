"""Restart data no larger than needed, and runs that stream their snapshots (issue 12).

Before issue 12 a run kept one uncompressed restart file per output snapshot and never
removed them (1.9 MB against a 0.93 MB run file at T21), held every snapshot in memory until
the end, and a second run on the same output computed the whole run before being refused.
"""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

import torrid
from torrid.interface.cli import main
from torrid.io.runfile import read_run
from torrid.workflow.restart import RestartStore, RunLockedError, restart_folder


def _brief(days=3.0, **run):
    return torrid.ModelConfig().replace(
        numerics={"truncation": 21},
        run={"days": days, "output_interval_days": 0.25, "restart_interval_days": 0.5,
             "stop_at_steady_state": False, **run})


def _disk_bytes(path: Path) -> int:
    """Bytes on disk of the files under ``path``, each file (inode) counted once (du)."""
    seen, total = set(), 0
    for p in [path] if path.is_file() else path.rglob("*"):
        st = p.stat()
        if p.is_file() and (st.st_dev, st.st_ino) not in seen:
            seen.add((st.st_dev, st.st_ino))
            total += st.st_blocks * 512
    return total


def test_a_completed_run_keeps_one_state_smaller_than_one_snapshot(tmp_path):
    out = tmp_path / "r.nc"
    torrid.run(_brief(), out)
    folder = restart_folder(out)
    names = sorted(p.name for p in folder.iterdir())
    assert names == ["lock", "run-000013.nc", "state.npz"]  # one state, no per-output files
    assert os.path.samefile(folder / "run-000013.nc", out)  # the run file under a second name
    snapshot = sum(read_run(out)[name].isel(time=0).nbytes for name in
                   ("h", "u", "v", "vorticity", "divergence"))
    assert (folder / "state.npz").stat().st_size < snapshot
    everything = _disk_bytes(tmp_path)
    assert everything <= _disk_bytes(out) + _disk_bytes(folder / "state.npz") + 8192


def test_keep_restart_false_removes_the_restart_data(tmp_path):
    out = tmp_path / "r.nc"
    torrid.run(_brief(keep_restart=False), out)
    assert [p.name for p in tmp_path.iterdir()] == ["r.nc"]


def test_a_completed_run_extends_bit_for_bit(tmp_path):
    straight = torrid.run(_brief(4.0), tmp_path / "straight.nc")
    torrid.run(_brief(2.0), tmp_path / "extended.nc")
    extended = torrid.run(_brief(4.0), tmp_path / "extended.nc", overwrite=True, resume=True)
    for name in straight.data_vars:
        assert np.array_equal(straight[name].values, extended[name].values, equal_nan=True)
    assert "resumed at day 2: 2 days in" in extended.attrs["summary"]


def test_a_resumed_complete_run_does_not_report_an_absurd_speed(tmp_path):
    torrid.run(_brief(1.0), tmp_path / "r.nc")
    again = torrid.run(_brief(1.0), tmp_path / "r.nc", overwrite=True, resume=True)
    assert "nothing left to run (resumed at day 1)" in again.attrs["summary"]
    assert "simulated days/s" not in again.attrs["summary"]


def test_memory_holds_only_the_number_series(tmp_path, monkeypatch):
    """The maps go to the restart's files as they are taken: the series kept in memory hold
    numbers only (tracemalloc peaks are in benchmarks/bench_memory.py)."""
    from torrid.workflow import driver

    kept = []
    original = driver._keep

    def spy(run, values, streaming):
        original(run, values, streaming)
        kept.append({k: np.ndim(v[-1]) for k, v in run.series.items()})

    monkeypatch.setattr(driver, "_keep", spy)
    torrid.run(_brief(1.0), tmp_path / "r.nc")
    assert kept and all(max(dims.values()) == 0 for dims in kept)


def test_a_second_run_on_the_same_output_is_refused_at_start(tmp_path):
    out = tmp_path / "r.nc"
    with RestartStore(out).lock():
        started = time.perf_counter()
        with pytest.raises(RunLockedError, match="another torrid run is writing this output"):
            torrid.run(_brief(), out)
        assert time.perf_counter() - started < 5  # refused before any stepping
    assert not out.exists()


def test_sigterm_of_a_run_says_one_line_and_leaves_no_temporary(tmp_path):
    out = tmp_path / "r.nc"
    argv = [sys.executable, "-m", "torrid", "run", "-o", str(out), "-q", "--no-plot",
            "--set", "numerics.truncation=21", "--set", "run.days=200",
            "--set", "run.stop_at_steady_state=false", "--set", "run.restart_interval_days=1"]
    proc = subprocess.Popen(argv, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    state = restart_folder(out) / "state.npz"
    deadline = time.monotonic() + 120
    while not state.exists():
        assert proc.poll() is None, proc.stderr.read()
        assert time.monotonic() < deadline
        time.sleep(0.05)
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 128 + signal.SIGTERM
    assert err.strip().splitlines() == ["torrid: stopped by SIGTERM; rerun with --resume to "
                                        "continue from the latest restart"]
    assert not list(tmp_path.rglob("*.tmp")) and not out.exists()


def test_plot_names_a_file_with_renamed_dimensions(tmp_path, capsys):
    out = tmp_path / "r.nc"
    ds = torrid.run(_brief(0.5), out).load()
    renamed = tmp_path / "renamed.nc"
    ds.rename({"lon": "longitude"}).to_netcdf(renamed)
    assert main(["plot", str(renamed)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith(f"torrid: error: {renamed}: not a torrid run file") and "\n" not in err


def _peak_rss_mb(argv) -> float:
    proc = subprocess.Popen(argv, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    assert os.waitstatus_to_exitcode(status) == 0, proc.stderr.read().decode()
    return usage.ru_maxrss / 1024


@pytest.mark.slow  # three runs in fresh processes, about a minute on a loaded machine
def test_peak_memory_does_not_grow_with_the_number_of_snapshots(tmp_path):
    """T21 over 5 days with 21, 401 and 1201 snapshots: holding the maps (5 x 16 kB each,
    twice at the end) or a library cache of them (HDF5's default keeps 1000 chunks per
    variable) added about 100 MB at 401; streamed, the peak levels off (measured +16 MB at
    401, a few MB more at 1201: library buffers). benchmarks/bench_memory.py measures T42."""
    peaks = {}
    for count in (21, 401, 1201):
        argv = [sys.executable, "-m", "torrid", "run", "-o", str(tmp_path / f"m{count}.nc"),
                "-q", "--no-plot", "--set", "numerics.truncation=21", "--set", "run.days=5",
                "--set", f"run.output_interval_days={5 / (count - 1)}",
                "--set", "run.stop_at_steady_state=false"]
        peaks[count] = _peak_rss_mb(argv)
    assert peaks[401] - peaks[21] < 30, peaks
    assert peaks[1201] - peaks[401] < 12, peaks  # held maps would add 64 MB more


def test_phase_and_plot_read_only_the_snapshots_they_use(tmp_path, capsys):
    """torrid phase and torrid plot open the run file lazily: nothing is in memory until
    used, and the curve of the final map equals the one of the fully loaded file."""
    from torrid.io.runfile import read_run
    from torrid.workflow.phase import phase_curve

    out = tmp_path / "r.nc"
    torrid.run(_brief(1.0), out)
    lazy = read_run(out, lazy=True)
    assert not any(lazy[name].variable._in_memory for name in ("h", "u", "v"))
    a = phase_curve(lazy).flux_ratio.values
    assert not lazy.u.variable._in_memory  # the curve read h (its last map), not the winds
    b = phase_curve(read_run(out)).flux_ratio.values
    assert np.array_equal(a, b)
    assert main(["phase", str(out)]) == 0
