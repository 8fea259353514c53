"""Parameter sweeps: the sweep file, the runner (local processes and a dask cluster), resuming
after kill -9, failed points, the sweep table and its plots.

The physics check is the trend of Perez-Becker & Showman (2013, ApJ 776, 134): the fractional
day-night contrast rises toward 1 as the radiative timescale shortens, and strong drag raises
it too. All runs are T21 (a few seconds each); the whole module takes about a minute and a half
on two cores.
"""

import hashlib
import json
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest
import xarray as xr

import torrid  # noqa: F401 (registers the xarray accessor ds.torrid)
from torrid.interface.cli import main
from torrid.io.config import ConfigError
from torrid.io.pointfile import FINISHED, read_point
from torrid.io.sweepfile import load_sweep, parse_sweep
from torrid.io.sweepmanifest import manifest_data, write_manifest
from torrid.workflow.collect import collect_sweep
from torrid.workflow.sweep import SweepError, _folder_lock, run_sweep

#: tau_rad x tau_drag, 3 x 2, each point to its steady state (19-38 days at T21).
PBS_SWEEP = """\
[numerics]
truncation = 21
[run]
days = 100.0
[sweep]
name = "pbs"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
log_range = [0.1, 2.5, 3]
[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
values = [10.0, 0.1]
"""


def _write(path: Path, text: str) -> Path:
    path.write_text(text)
    return path


def _comparable(path: Path) -> xr.Dataset:
    """A table as a plain xarray user opens it, without its creation date and history."""
    with xr.open_dataset(path) as ds:
        ds = ds.load()
    ds.attrs.pop("date_created")
    ds.attrs.pop("history")
    return ds


@pytest.fixture(scope="module")
def pbs_file(tmp_path_factory) -> Path:
    return _write(tmp_path_factory.mktemp("sweepfile") / "pbs.toml", PBS_SWEEP)


@pytest.fixture(scope="module")
def local_sweep(pbs_file, tmp_path_factory):
    """The PBS sweep run uninterrupted by the local runner with 2 worker processes."""
    folder = tmp_path_factory.mktemp("local") / "pbs"
    outcome = run_sweep(load_sweep(pbs_file, folder=folder), workers=2, progress=False)
    return outcome


# ---------------------------------------------------------------------------- sweep files


def test_axes_generate_the_points(tmp_path):
    spec = parse_sweep({
        "run": {"days": 3.0},
        "sweep": {"axis": [
            {"key": "atmosphere.radiative_timescale_days", "log_range": [0.01, 10.0, 4]},
            {"key": "atmosphere.drag_timescale_days", "range": [1.0, 2.0, 3], "zip": "g"},
            {"key": "atmosphere.forcing_contrast", "values": [0.1, 0.2, 0.3], "zip": "g"},
            {"key": "numerics.truncation", "range": [10, 20, 3]},
        ]}}, tmp_path / "grid.toml")
    assert spec.name == "grid" and spec.folder == Path("runs/grid")
    assert [d.name for d in spec.dimensions] == ["radiative_timescale_days",
                                                 "drag_timescale_days", "truncation"]
    assert spec.shape == (4, 3, 3)
    # log_range: log-spaced with both ends included; range: linear, integers stay integers
    assert spec.dimensions[0].axes[0].values == (0.01, 0.1, 1.0, 10.0)
    assert spec.dimensions[1].axes[0].values == (1.0, 1.5, 2.0)
    assert spec.dimensions[2].axes[0].values == (10, 15, 20)
    points = spec.points()
    assert len(points) == 36 and all(p.error is None for p in points)
    zipped = {(p.parameters["atmosphere.drag_timescale_days"],
               p.parameters["atmosphere.forcing_contrast"]) for p in points}
    assert zipped == {(1.0, 0.1), (1.5, 0.2), (2.0, 0.3)}  # zipped, not crossed
    assert len({p.file_name for p in points}) == 36


def test_point_names_are_stable_hashes_of_the_configuration(tmp_path, pbs_file):
    first, again = load_sweep(pbs_file).points(), load_sweep(pbs_file).points()
    assert [p.file_name for p in first] == [p.file_name for p in again]
    for point in first:  # the documented rule, recomputed independently
        text = json.dumps(point.config.to_dict(), sort_keys=True, separators=(",", ":"))
        assert point.file_name == f"point-{hashlib.sha256(text.encode()).hexdigest()[:12]}.nc"
    # the same configuration reached from another sweep file has the same name
    other = _write(tmp_path / "other.toml", PBS_SWEEP.replace('name = "pbs"', 'name = "x"')
                   .replace("log_range = [0.1, 2.5, 3]", "values = [2.5, 0.1]"))
    assert {p.file_name for p in load_sweep(other).points()} < {p.file_name for p in first}


@pytest.mark.parametrize("change, fragment", [
    (("log_range = [0.1, 2.5, 3]", "lag_range = [0.1, 2.5, 3]"),
     "unknown key 'lag_range' (did you mean 'log_range'?)"),
    (('key = "atmosphere.drag_timescale_days"', 'key = "atmosphere.drag_timescale"'),
     "did you mean 'atmosphere.drag_timescale_days'?"),
    (('name = "pbs"', 'nmae = "pbs"'), "unknown key 'sweep.nmae' (did you mean 'sweep.name'?)"),
    (("truncation = 21", "truncaton = 21"),
     "unknown key 'numerics.truncaton' (did you mean 'numerics.truncation'?)"),
    (("log_range = [0.1, 2.5, 3]", "log_range = [-0.1, 2.5, 3]"), "must be > 0 (log-spaced)"),
    (("log_range = [0.1, 2.5, 3]", "log_range = [0.1, 2.5]"), "must be [start, stop, count]"),
    (("values = [10.0, 0.1]", "values = [10.0, 10.0]"), "has duplicates"),
    (("values = [10.0, 0.1]", 'values = [10.0, "x"]'), "must be all numbers, all strings"),
    ([("values = [10.0, 0.1]", 'values = [10.0, 0.1]\nzip = "a"'),
      ("log_range = [0.1, 2.5, 3]", 'log_range = [0.1, 2.5, 3]\nzip = "a"')],
     "zip group 'a': axes must have equal lengths"),
    (("truncation = 21", "truncation = 0"), "numerics.truncation = 0: must be >= 1"),
    (("[sweep]", "[sweeep]"), "unknown section 'sweeep' (did you mean 'sweep'?)"),
    ((PBS_SWEEP[PBS_SWEEP.index("[sweep]"):], ""), "no [sweep] section"),
])
def test_malformed_sweep_files_are_refused_in_one_line(tmp_path, change, fragment):
    text = PBS_SWEEP
    for old, new in change if isinstance(change, list) else [change]:
        text = text.replace(old, new)
    path = _write(tmp_path / "bad.toml", text)
    with pytest.raises(ConfigError) as err:
        load_sweep(path)
    message = str(err.value)
    assert message.startswith(str(path)) and fragment in message and "\n" not in message


def test_cli_refuses_a_malformed_sweep_file_with_exit_status_2(tmp_path, capsys):
    path = _write(tmp_path / "bad.toml", PBS_SWEEP.replace("values", "valuse"))
    assert main(["sweep", str(path), "-q"]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"torrid: error: {path}: [[sweep.axis]] number 2") and \
        "did you mean 'values'?" in err and len(err.splitlines()) == 1
    assert not (tmp_path / "runs").exists()  # refused before anything was written


def test_an_invalid_point_is_not_an_error_of_the_file(tmp_path):
    path = _write(tmp_path / "neg.toml", PBS_SWEEP.replace("[10.0, 0.1]", "[10.0, -1.0]"))
    points = load_sweep(path).points()
    invalid = [p for p in points if p.config is None]
    assert len(invalid) == 3 and all("drag_timescale_days = -1.0: must be > 0" in p.error
                                     for p in invalid)


def test_the_readme_sweep_file_is_valid(tmp_path):
    readme = (Path(__file__).parents[1] / "README.md").read_text()
    section = readme[readme.index("### Sweeps"):readme.index("### The standard cases")]
    text = section.split("```toml\n")[1].split("```")[0]
    spec = load_sweep(_write(tmp_path / "tau-grid.toml", text))
    assert spec.name == "tau-grid" and spec.shape == (5, 4)
    assert spec.dimensions[1].axes[0].values[0] == float("inf")
    assert all(p.config is not None for p in spec.points())


# ----------------------------------------------------------------------- running sweeps


def test_local_and_dask_sweeps_give_identical_tables(local_sweep, pbs_file, tmp_path):
    distributed = pytest.importorskip("distributed")
    assert local_sweep.counts["steady"] == 6 and local_sweep.ran == 6
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=":0") as cluster:
        outcome = run_sweep(load_sweep(pbs_file, folder=tmp_path / "dask"),
                            scheduler=cluster.scheduler_address, progress=False)
    assert outcome.ran == 6
    xr.testing.assert_identical(_comparable(outcome.table_path),
                                _comparable(local_sweep.table_path))


def _finished_files(folder: Path) -> list[Path]:
    files = []
    for path in folder.glob("point-*.nc"):
        if read_point(path, path.stem[len("point-"):]).status in FINISHED:
            files.append(path)
    return files


def _unfinished_restarts(folder: Path) -> list[Path]:
    """Restart states of points without a run file (a point killed mid-run resumes there)."""
    return [p for p in folder.glob(".point-*.nc.restart/state.npz")
            if not (folder / p.parent.name[1:-len(".restart")]).exists()]


def test_a_killed_sweep_resumes_without_rerunning_finished_points(local_sweep, pbs_file,
                                                                  tmp_path):
    """kill -9 of the whole sweep; the rerun skips the finished points (their files are not
    touched), continues the point killed mid-run from its restart data, and ends with the
    table of the uninterrupted sweep, bit for bit."""
    folder = tmp_path / "killed"
    command = [sys.executable, "-m", "torrid.interface.cli", "sweep", str(pbs_file),
               "--folder", str(folder), "--workers", "1", "-q"]
    proc = subprocess.Popen(command, start_new_session=True, stdout=subprocess.DEVNULL,
                            stderr=subprocess.PIPE)
    try:  # kill once two points are done and a third has written restart data mid-run
        deadline = time.monotonic() + 120
        while len(_finished_files(folder) if folder.is_dir() else []) < 2 \
                or not _unfinished_restarts(folder):
            assert proc.poll() is None, proc.stderr.read().decode()
            assert time.monotonic() < deadline, "no two points finished in 120 s"
            time.sleep(0.05)
    finally:
        os.killpg(proc.pid, signal.SIGKILL)  # the whole process group: runner and workers
        proc.wait()
    done = {p: p.stat().st_mtime_ns for p in _finished_files(folder)}
    assert 2 <= len(done) < 6, "the sweep must be killed part-way"
    assert _unfinished_restarts(folder) and not (folder / "pbs-table.nc").exists()

    outcome = run_sweep(load_sweep(pbs_file, folder=folder), workers=2, progress=False)
    assert outcome.skipped == len(done) and outcome.ran == 6 - len(done)
    assert {p: p.stat().st_mtime_ns for p in done} == done  # finished points not rerun
    assert not list(folder.glob(".*.tmp")) and not list(folder.glob(".*.restart"))
    xr.testing.assert_identical(_comparable(outcome.table_path),
                                _comparable(local_sweep.table_path))


def test_failed_points_are_recorded_and_do_not_stop_the_others(tmp_path, capsys):
    # 20000 s at T21 is far beyond the advective limit (the automatic step is about 1000 s);
    # a negative radiative timescale does not validate
    sweep = _write(tmp_path / "fail.toml", """\
[numerics]
truncation = 21
[run]
days = 3.0
output_interval_days = 1.0
stop_at_steady_state = false
[sweep]
[[sweep.axis]]
key = "numerics.time_step_s"
values = [900.0, 20000.0]
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [1.0, -1.0]
""")
    folder = tmp_path / "runs" / "fail"
    assert main(["sweep", str(sweep), "--folder", str(folder), "-j", "2", "-q"]) == 0
    out = capsys.readouterr().out
    assert "1 done" in out and "3 failed" in out and "Courant" in out
    with xr.open_dataset(folder / "fail-table.nc") as table:
        status = table.run_status.values
        reason = table.run_status_reason.values
        contrast = table.day_night_contrast.values
        files = table.run_file.values
    assert status[0, 0] == "complete" and np.isfinite(contrast[0, 0])
    assert status[1, 0] == "failed" and "Courant number" in reason[1, 0]
    assert (status[:, 1] == "failed").all()
    assert all("invalid configuration: atmosphere.radiative_timescale_days = -1.0: must be > 0"
               in r for r in reason[:, 1])
    assert np.isnan(contrast[1:, :]).all() and np.isnan(contrast[0, 1])
    with xr.open_dataset(folder / files[1, 0]) as blown_up:  # written by torrid.run
        assert blown_up.attrs["run_status"] == "failed" and "h" in blown_up
    # a failed point is a result: not rerun, unless asked
    mtime = (folder / files[1, 0]).stat().st_mtime_ns
    run_sweep(load_sweep(sweep, folder=folder), workers=1, progress=False)
    assert (folder / files[1, 0]).stat().st_mtime_ns == mtime
    outcome = run_sweep(load_sweep(sweep, folder=folder), workers=1, retry_failed=True,
                        progress=False)
    assert outcome.ran == 1 and (folder / files[1, 0]).stat().st_mtime_ns != mtime


def test_contrast_trend_of_perez_becker_and_showman_2013(local_sweep):
    """Perez-Becker & Showman (2013): the fractional day-night contrast A rises toward 1 as
    tau_rad shortens (at both drags) and strong drag (0.1 day) raises it against weak drag
    (10 days) at every tau_rad. Tolerances: strict ordering only, plus A > 0.85 at the
    shortest tau_rad with strong drag (the no-redistribution limit is 1)."""
    with xr.open_dataset(local_sweep.table_path) as table:
        assert (table.steady_state_reached == 1).all()
        a = table.day_night_contrast.transpose("radiative_timescale_days",
                                               "drag_timescale_days")
        tau = table.radiative_timescale_days.values
        drag = list(table.drag_timescale_days.values)
        a = a.values
    assert np.all(np.diff(tau) > 0)
    assert np.all(np.diff(a, axis=0) < 0), a  # longer tau_rad: smaller contrast
    assert np.all(a[:, drag.index(0.1)] > a[:, drag.index(10.0)]), a  # drag raises it
    assert 0.85 < a[0, drag.index(0.1)] <= 1.0


# ------------------------------------------------------------------- table, collect, plots


def test_the_table_is_plain_netcdf_with_named_dimensions(local_sweep):
    with xr.open_dataset(local_sweep.table_path) as table:
        assert table.attrs["torrid_sweep"] == "pbs"
        assert dict(table.sizes) == {"radiative_timescale_days": 3, "drag_timescale_days": 2}
        assert list(table.radiative_timescale_days.values) == [0.1, 0.5, 2.5]
        assert table.radiative_timescale_days.attrs["units"] == "days"
        assert table.radiative_timescale_days.attrs["spacing"] == "log"
        assert table.hotspot_offset.attrs["units"] == "degree"
        point = table.sel(radiative_timescale_days=0.5, drag_timescale_days=10.0)
        run_file = local_sweep.folder / str(point.run_file.values)
        with xr.open_dataset(run_file) as run:
            assert float(point.day_night_contrast) == run.attrs["final_day_night_contrast"]
            assert float(point.steady_state_time_days) == run.attrs["steady_state_time_days"]
            assert str(point.run_status.values) == run.attrs["run_status"] == "steady"


def test_collect_marks_missing_points_and_refuses_to_overwrite(local_sweep, tmp_path, capsys):
    folder = tmp_path / "copy"
    shutil.copytree(local_sweep.folder, folder)
    with xr.open_dataset(local_sweep.table_path) as table:
        gone = folder / str(table.run_file.values[1, 0])
    gone.unlink()
    assert main(["collect", str(folder)]) == 2  # the sweep wrote its table already
    assert "pbs-table.nc exists" in capsys.readouterr().err
    assert main(["collect", str(folder), "--overwrite", "--maps"]) == 0
    assert "5 done, 0 failed, 1 missing" in capsys.readouterr().out
    with xr.open_dataset(folder / "pbs-table.nc") as table:
        assert table.run_status.values[1, 0] == "missing"
        assert np.isnan(table.day_night_contrast.values[1, 0])
        assert table.h.dims == ("radiative_timescale_days", "drag_timescale_days", "lat", "lon")
        assert np.isnan(table.h.values[1, 0]).all() and np.isfinite(table.h.values[0, 0]).all()
        # the accessor turns the table into phase curves (of its finished column here)
        curves = table.isel(drag_timescale_days=[1]).torrid.phase_curve()
        assert curves.flux_ratio.dims == ("radiative_timescale_days", "drag_timescale_days",
                                          "phase")
        assert np.isfinite(curves.eclipse_depth.values).all()
    assert main(["plot", str(folder / "pbs-table.nc")]) == 0
    assert (folder / "pbs-table.png").stat().st_size > 10_000
    assert (folder / "pbs-table-maps.png").stat().st_size > 10_000
    assert main(["plot", str(folder / "pbs-table.nc")]) == 2  # images exist: refused


def test_zipped_axes_share_one_dimension(tmp_path):
    spec = parse_sweep({"sweep": {"axis": [
        {"key": "atmosphere.radiative_timescale_days", "values": [0.5, 1.0, 2.0], "zip": "z"},
        {"key": "atmosphere.drag_timescale_days", "values": [1.0, 3.0, 9.0], "zip": "z"},
        {"key": "orbit.rotation", "values": ["synchronous", "pseudo-synchronous"]},
    ]}}, tmp_path / "zip.toml", folder=tmp_path / "zip")
    write_manifest(spec.folder, manifest_data(spec, spec.points()))
    table = collect_sweep(spec.folder)  # nothing has run: every point is missing
    assert dict(table.sizes) == {"radiative_timescale_days": 3, "rotation": 2}
    assert table.drag_timescale_days.dims == ("radiative_timescale_days",)
    assert list(table.drag_timescale_days.values) == [1.0, 3.0, 9.0]
    assert list(table.rotation.values) == ["synchronous", "pseudo-synchronous"]
    assert (table.run_status == "missing").all()


def test_a_worker_sets_its_thread_limits_before_numba_loads():
    # a dask worker imports the task's module when it unpickles the task: that must not load
    # numba (whose thread count is fixed at import), so run_point can still set it
    code = ("import sys, torrid.workflow.sweep_task as t; print('numba' in sys.modules); "
            "t.limit_threads(); import numba; print(numba.config.NUMBA_NUM_THREADS)")
    env = {k: v for k, v in os.environ.items() if k != "NUMBA_NUM_THREADS"}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         env=env, check=True).stdout.split()
    assert out == ["False", "1"]


def test_one_sweep_at_a_time_per_folder(pbs_file, tmp_path):
    folder = tmp_path / "locked"
    folder.mkdir()
    with _folder_lock(folder):
        with pytest.raises(SweepError, match="another torrid sweep is running"):
            run_sweep(load_sweep(pbs_file, folder=folder), workers=1, progress=False)


def test_a_missing_dask_is_a_clear_error(pbs_file, tmp_path, monkeypatch, capsys):
    monkeypatch.setitem(sys.modules, "distributed", None)  # import distributed fails
    path = _write(tmp_path / "one.toml", PBS_SWEEP.replace("[10.0, 0.1]", "[10.0]")
                  .replace("days = 100.0", "days = 1.0"))
    assert main(["sweep", str(path), "--folder", str(tmp_path / "d"), "--scheduler",
                 "tcp://127.0.0.1:1", "-q"]) == 2
    err = capsys.readouterr().err
    assert "needs dask.distributed" in err and "torrid[dist]" in err
