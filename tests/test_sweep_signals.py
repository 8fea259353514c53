"""A sweep owns its workers (issue 12): SIGTERM and SIGHUP stop the workers with the sweep,
which says one line and exits with 128 + the signal; after a kill -9 of the sweep alone the
workers notice within seconds and stop, and while any of them lives the folder stays locked,
so no point runs twice.

Before issue 12 the workers of a ProcessPoolExecutor outlived a killed sweep: they finished
their points, then sat idle, and a rerun ran the same points beside them.
"""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from torrid.io.sweepfile import load_sweep
from torrid.workflow.sweep import LOCK_NAME, SweepError, _folder_lock
from torrid.workflow import worker_process
from torrid.workflow.sweep_worker import WorkerPool

pytestmark = pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="needs /proc")

SWEEP = """\
[numerics]
truncation = 21
[run]
days = 400.0
output_interval_days = 1.0
restart_interval_days = 1.0
stop_at_steady_state = false
[sweep]
name = "long"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.5, 1.0, 2.0, 4.0]
"""

#: How soon the workers must be gone after the sweep died (s): the pipe's end-of-file is
#: seen at once, the os.getppid() poll every 0.5 s; the rest is slack for a loaded machine.
GONE_WITHIN_S = 5.0


def _children(pid: int) -> list[int]:
    out = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
        except OSError:
            continue
        if int(fields[1]) == pid:
            out.append(int(stat.parent.name))
    return out


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


def _wait_gone(pids, seconds) -> list[int]:
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        left = [p for p in pids if _alive(p)]
        if not left:
            return []
        time.sleep(0.05)
    return [p for p in pids if _alive(p)]


def _start(tmp_path):
    sweep = tmp_path / "long.toml"
    sweep.write_text(SWEEP)
    folder = tmp_path / "long"
    proc = subprocess.Popen([sys.executable, "-m", "torrid", "sweep", str(sweep), "--folder",
                             str(folder), "--workers", "2", "-q"], start_new_session=True,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 120
    while len(list(folder.glob(".point-*.nc.restart/state.npz"))) < 2:  # both workers busy
        assert proc.poll() is None, proc.stderr.read()
        assert time.monotonic() < deadline, "the workers never wrote restart data"
        time.sleep(0.05)
    workers = _children(proc.pid)
    assert len(workers) == 2
    return proc, folder, sweep, workers


def _newest_change(folder: Path) -> float:
    return max(p.stat().st_mtime for p in folder.rglob("*"))


@pytest.mark.parametrize("signum", [signal.SIGTERM, signal.SIGHUP])
def test_sigterm_and_sighup_stop_the_workers_with_one_line(tmp_path, signum):
    proc, folder, _, workers = _start(tmp_path)
    try:
        os.kill(proc.pid, signum)  # the sweep alone, not its process group
        _, err = proc.communicate(timeout=30)
    finally:
        os.killpg(proc.pid, signal.SIGKILL) if proc.poll() is None else None
    assert proc.returncode == 128 + signum
    lines = err.strip().splitlines()
    assert lines == [f"torrid: stopped by {signal.Signals(signum).name}; rerun the same "
                     "command to resume (finished points are kept)"]
    assert _wait_gone(workers, GONE_WITHIN_S) == []
    assert not (folder / ".sweep.lock").exists()


def test_kill9_of_the_sweep_stops_its_workers_and_no_point_runs_twice(tmp_path):
    proc, folder, sweep, workers = _start(tmp_path)
    os.kill(proc.pid, signal.SIGKILL)  # the sweep alone: its workers are orphaned
    proc.wait()
    killed = time.time()
    assert _wait_gone(workers, GONE_WITHIN_S) == [], "workers outlived the killed sweep"
    time.sleep(1.0)
    assert _newest_change(folder) <= killed + GONE_WITHIN_S  # nothing written after they went
    # the folder is free again, and the sweep resumes (the killed points from restart data)
    with _folder_lock(folder):
        pass


@pytest.mark.parametrize("start", ["fork", "spawn"])
def test_the_folder_lock_covers_live_workers(tmp_path, start):
    """The lock belongs to the open lock file, which every worker inherits: with the sweep's
    own handle closed (as by a kill -9, which leaves the lock file), live workers hold it."""
    folder = tmp_path / "locked"
    folder.mkdir()
    import fcntl

    lock = open(folder / LOCK_NAME, "a")  # taken as _folder_lock takes it
    fcntl.flock(lock, fcntl.LOCK_EX | fcntl.LOCK_NB)
    pool = WorkerPool(1, lock_fd=lock.fileno(), start=start)
    lock.close()  # the sweep's own handle gone, as after a kill -9
    try:
        with pytest.raises(SweepError, match="another torrid sweep is running"):
            with _folder_lock(folder):
                pass
    finally:
        pool.close(kill=True)
    with _folder_lock(folder):  # the worker gone, the folder is free
        pass


@pytest.mark.parametrize("start", ["fork", "spawn"])
def test_workers_live_across_points(tmp_path, start):
    """One process per worker for the whole sweep (issue 14 builds on it): four points on
    two workers run in those two processes, forked or spawned, with the same results."""
    from torrid.io.pointfile import canonical_json
    from torrid.workflow.sweep_task import run_point

    sweep = tmp_path / "short.toml"
    sweep.write_text(SWEEP.replace("days = 400.0", "days = 0.5")
                     .replace("output_interval_days = 1.0", "output_interval_days = 0.25"))
    spec = load_sweep(sweep, folder=tmp_path / "short")
    spec.folder.mkdir()
    pool = WorkerPool(2, start=start)
    try:
        futures = [pool.submit(run_point, canonical_json(p.config.to_dict()),
                               str(spec.folder / p.file_name)) for p in spec.points()]
        results = [f.result(timeout=300) for f in futures]
    finally:
        pool.close()
    assert [r["status"] for r in results] == ["complete"] * 4
    assert {r["pid"] for r in results} <= set(pool.pids)
    assert pool.start == start
    assert worker_process._PARENT_ENDS == set()  # a closed pool leaves no pipe behind
    import xarray as xr

    with xr.open_dataset(results[-1]["path"]) as ds:
        assert ds.attrs["run_status"] == "complete" and ds.sizes["time"] == 3


def test_a_sweep_forks_only_from_a_single_thread():
    """Forking beside another thread could leave a lock held forever in the worker: the
    pool then spawns (a notebook kernel runs several threads)."""
    import threading

    stop = threading.Event()
    other = threading.Thread(target=stop.wait)
    other.start()
    try:
        assert not worker_process.can_fork()
        pool = WorkerPool(1)
        pool.close(kill=True)
        assert pool.start == "spawn"
    finally:
        stop.set()
        other.join()
