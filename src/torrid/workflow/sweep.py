"""The sweep runner: every point of a sweep to its run file, in parallel, resumably.

:func:`run_sweep` takes a validated :class:`torrid.io.sweepspec.SweepSpec` and

1. writes the manifest (``<folder>/sweep.json``) and a record file for each point whose
   configuration does not validate (status failed, the validation error as the reason);
2. skips every point that already has a usable file (``complete``/``steady``, or ``failed``
   unless ``retry_failed``): so rerunning after an interruption, even a kill -9, runs only
   what is left; files are renamed into place when whole, so a killed point leaves none;
3. runs the rest in long-lived worker processes (``workers``, one thread each, fed points
   one after another and owned by the sweep: :mod:`torrid.workflow.sweep_worker`) or on an existing
   dask.distributed cluster (``scheduler``), with a progress bar over the points; linear
   points (``numerics.solver = "linear"``) are not sent anywhere: the table solves them in
   this process, in milliseconds each, and they get no file;
4. rebuilds the sweep table ``<folder>/<name>-table.nc`` from the folder (replacing the old
   table: it is derived from the point files, which are never replaced).

A point that blows up is a result (status failed with its reason), not a reason to stop.
An unexpected error in a point (a bug, a full disk) is reported at the end, writes nothing and
is retried by the next run. One sweep at a time may use a folder (a lock file, removed at the
end).
"""

from __future__ import annotations

import concurrent.futures as cf
from concurrent.futures.process import BrokenProcessPool
import contextlib
import math
import os
import sys
from dataclasses import dataclass, field
from pathlib import Path

from tqdm.auto import tqdm

from torrid.io.atomic import try_lock
from torrid.io.storage import storage
from torrid.io.pointfile import (FAILED, FINISHED, STATUSES, canonical_json, read_point,
                                 write_failure_record)
from torrid.io.sweepspec import SweepPoint, SweepSpec
from torrid.io.sweepmanifest import manifest_data, write_manifest
from torrid.workflow import collect
from torrid.workflow.limits import MAX_SWEEP_POINTS, check_resources
from torrid.workflow.progress import bar_options
from torrid.workflow.sanity import warn_implausible_points
from torrid.workflow.sweep_task import THREAD_VARIABLES, run_point
from torrid.workflow.sweep_worker import WorkerDied, WorkerPool

LOCK_NAME = ".sweep.lock"


class SweepError(ValueError):
    """A sweep that cannot start or finish (one-line message)."""


@dataclass
class SweepOutcome:
    """What a sweep run did.

    Attributes
    ----------
    folder : Path
        The sweep folder (absolute).
    table_path : Path or None
        The sweep table written at the end.
    counts : dict
        Points by status at the end (complete, steady, linear, failed, missing).
    ran : int
        Points run now.
    skipped : int
        Points that had a usable file already.
    failures : list of (str, str)
        (file name, reason) of every failed point.
    errors : list of str
        Points that raised an unexpected error (nothing written; retried on the next run).
    """

    folder: Path
    table_path: Path | None = None
    counts: dict = field(default_factory=dict)
    ran: int = 0
    skipped: int = 0
    failures: list = field(default_factory=list)
    errors: list = field(default_factory=list)


def default_workers() -> int:
    """All cores this process may use."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not Linux
        return os.cpu_count() or 1


@contextlib.contextmanager
def _folder_lock(folder: Path):
    """Hold ``<folder>/.sweep.lock`` (released by the OS even on kill -9, once the sweep and
    every worker that inherited it have gone); yields the open lock file. The file is removed
    when the sweep ends. A lock taken on a file that another sweep removed meanwhile is
    retried on the new file, so two sweeps never both hold one."""
    path = folder / LOCK_NAME
    while True:
        handle = try_lock(path)
        if handle is False:  # no POSIX locks: no protection against two sweeps
            yield None
            return
        if handle is None:
            raise SweepError(f"{folder}: another torrid sweep is running in this folder "
                             "(wait for it, or stop it first)")
        try:
            same = os.fstat(handle.fileno()).st_ino == os.stat(path).st_ino
        except FileNotFoundError:
            same = False
        if same:
            break
        handle.close()  # removed by a sweep that just ended: lock the current file
    try:
        yield handle
    finally:
        path.unlink(missing_ok=True)  # while still holding it (see above)
        handle.close()  # releases the lock (the workers, which shared it, have gone)


def _remove_stale_temporaries(folder: Path) -> None:
    """Temporary files of writers killed mid-write (only safe while holding the lock)."""
    for tmp in folder.glob(".*.tmp"):
        tmp.unlink(missing_ok=True)


@dataclass(frozen=True)
class Plan:
    """Which points of a sweep run now and which already have their result."""

    points: list
    to_run: list
    results: dict  # identifier -> PointResult of the points not to run
    linear: list = field(default_factory=list)  # linear points, solved by collect (issue 13)


def plan_sweep(spec: SweepSpec, folder: Path, retry_failed: bool = False,
               points: list[SweepPoint] | None = None) -> Plan:
    """Sort the points of ``spec`` into those to run and those with a usable file."""
    points = spec.points() if points is None else points
    to_run, results, linear = [], {}, []
    for point in points:
        result = read_point(folder / point.file_name, point.identifier)
        if point.config is None:  # invalid configuration: a record, nothing to run
            results[point.identifier] = result
        elif result.status in FINISHED or (result.status == FAILED and not retry_failed):
            results[point.identifier] = result
        elif point.config.numerics.solver == "linear":
            linear.append(point)  # solved when the table is collected: no worker, no file
        else:
            to_run.append(point)
    return Plan(points, to_run, results, linear)


def point_count(spec: SweepSpec) -> int:
    """Points of ``spec``, counted from its dimensions (nothing is built)."""
    return math.prod(spec.shape)


def check_size(spec: SweepSpec, yes: bool) -> None:
    """Refuse a sweep of more than :data:`~torrid.workflow.limits.MAX_SWEEP_POINTS` points
    unless ``yes`` (one line, before anything is built)."""
    count = point_count(spec)
    if count > MAX_SWEEP_POINTS and not yes:
        raise SweepError(f"sweep {spec.name}: {count} points "
                         f"({' x '.join(str(n) for n in spec.shape)}), more than "
                         f"{MAX_SWEEP_POINTS}: pass --yes to run them (--dry-run counts them)")


def run_sweep(spec: SweepSpec, *, workers: int | None = None, scheduler: str | None = None,
              retry_failed: bool = False, maps: bool = False,
              progress: bool = True, yes: bool = False) -> SweepOutcome:
    """Run every point of ``spec`` that has no usable file yet, then write the sweep table.

    Parameters
    ----------
    spec : SweepSpec
        The validated sweep (:func:`torrid.io.sweepfile.load_sweep`).
    workers : int, optional
        Local worker processes (default: all cores); ignored with ``scheduler``.
    scheduler : str, optional
        Address of a running dask.distributed scheduler (``tcp://host:8786``) to run the
        points on instead; the sweep folder must be reachable by every worker.
    retry_failed : bool
        Also rerun points recorded as failed (blown-up runs).
    maps : bool
        Put the final h, u, v maps into the sweep table.
    progress : bool
        Show the progress bar.
    yes : bool
        Run a sweep of more than :data:`~torrid.workflow.limits.MAX_SWEEP_POINTS` points.
    """
    check_size(spec, yes)
    if workers is not None and workers < 1:
        raise SweepError(f"--workers = {workers}: must be >= 1")
    if scheduler is not None:
        _import_distributed()  # a missing optional extra is refused before anything is written
    folder = spec.folder.resolve()
    with storage(folder, "nothing was run: choose another --folder"):
        folder.mkdir(parents=True, exist_ok=True)
    if not os.access(folder, os.W_OK):
        raise SweepError(f"{folder}: permission denied: the sweep folder is not writable; "
                         "choose another --folder")
    outcome = SweepOutcome(folder=folder)
    with _folder_lock(folder) as lock:
        points = spec.points()
        write_manifest(folder, manifest_data(spec, points))
        if scheduler is None:
            _remove_stale_temporaries(folder)
        for point in points:
            if point.config is None and not read_point(folder / point.file_name,
                                                       point.identifier).is_result:
                write_failure_record(folder / point.file_name, point.data,
                                     f"invalid configuration: {point.error}", overwrite=True)
        plan = plan_sweep(spec, folder, retry_failed, points)
        warn_implausible_points([p.config for p in plan.to_run], stacklevel=3)
        if plan.to_run:
            check_resources(plan.to_run[0].config, folder, points=len(plan.to_run),
                            stacklevel=3)
        outcome.skipped = len(plan.results)
        if plan.to_run:
            outcome.errors = _execute(plan, folder, workers, scheduler, progress,
                                      None if lock is None else lock.fileno())
        outcome.ran = len(plan.to_run) - len(outcome.errors) + len(plan.linear)
        table = collect.collect_sweep(folder, maps=maps, progress=progress)
        outcome.table_path = collect.write_table(table, collect.table_path(folder, spec.name),
                                                 overwrite=True)
    status = table["run_status"].values.ravel()
    outcome.counts = {s: int((status == s).sum()) for s in STATUSES}
    reasons = table["run_status_reason"].values.ravel()
    files = table["run_file"].values.ravel()
    outcome.failures = [(str(f), str(r)) for f, r, s in zip(files, reasons, status)
                        if s == FAILED]
    return outcome


@contextlib.contextmanager
def _local_executor(workers: int, lock_fd: int | None):
    """Long-lived worker processes with one thread each, holding the folder lock with the
    sweep and stopping with it (:mod:`torrid.workflow.sweep_worker`)."""
    env = dict(os.environ, **{name: "1" for name in THREAD_VARIABLES})
    pool = WorkerPool(workers, lock_fd=lock_fd, env=env)
    try:
        yield pool, workers
    except BaseException:
        pool.close(kill=True)  # an interrupted sweep does not wait for its points
        raise
    else:
        pool.close()


def _import_distributed():
    try:
        import distributed
    except ImportError:
        raise SweepError("--scheduler needs dask.distributed, an optional extra: "
                         "pip install 'torrid[dist]'") from None
    return distributed


@contextlib.contextmanager
def _dask_executor(address: str):
    """A concurrent.futures executor on the dask.distributed cluster at ``address``."""
    distributed = _import_distributed()
    try:
        client = distributed.Client(address, timeout="20s", set_as_default=False)
    except (OSError, TimeoutError, ValueError) as err:
        raise SweepError(f"--scheduler {address}: cannot reach the dask scheduler "
                         f"({type(err).__name__}: {str(err).splitlines()[0] if str(err) else ''})"
                         ) from None
    try:
        threads = sum(w.get("nthreads", 1) for w in client.scheduler_info()["workers"].values())
        if threads == 0:
            raise SweepError(f"--scheduler {address}: the cluster has no workers (start them "
                             f"with: dask worker {address} --nthreads 1)")
        executor = client.get_executor(pure=False)
        try:
            yield executor, threads
        except BaseException:
            executor.shutdown(wait=False)  # cancels what has not run
            raise
    finally:
        client.close()


def _execute(plan: Plan, folder: Path, workers: int | None, scheduler: str | None,
             progress: bool, lock_fd: int | None = None) -> list[str]:
    """Run ``plan.to_run``; return the unexpected errors (one line each)."""
    done = sum(r.status in FINISHED for r in plan.results.values())
    failed = sum(r.status == FAILED for r in plan.results.values())
    errors: list[str] = []
    if scheduler is None:
        workers = min(workers or default_workers(), len(plan.to_run))
        context = _local_executor(workers, lock_fd)
    else:
        context = _dask_executor(scheduler)
    bar = tqdm(total=len(plan.points), initial=len(plan.results), unit="point",
               disable=not progress, smoothing=0, dynamic_ncols=True, desc="sweep",
               bar_format="{desc}: {percentage:3.0f}%|{bar}| {n}/{total} points "
                          "[{elapsed}<{remaining}{postfix}]", **bar_options())
    ticking = sys.stderr.isatty()  # the bar's clock ticks each second on a terminal only
    with context as (executor, slots), bar:
        pending = {executor.submit(run_point, canonical_json(p.config.to_dict()),
                                   str(folder / p.file_name)): p for p in plan.to_run}
        while pending:
            bar.set_postfix_str(f"{done} done, {failed} failed, "
                                f"{min(slots, len(pending))} running", refresh=ticking)
            finished, _ = cf.wait(pending, timeout=1.0, return_when=cf.FIRST_COMPLETED)
            for future in finished:
                point = pending.pop(future)
                try:
                    result = future.result()
                except (BrokenProcessPool, WorkerDied):
                    raise SweepError(f"{folder}: a worker process died (out of memory? killed?) "
                                     "while running points; rerun the sweep to resume") from None
                except Exception as err:  # noqa: BLE001 - reported, retried on the next run
                    kind = getattr(err, "kind", type(err).__name__)
                    errors.append(f"{point.file_name}: {kind}: "
                                  f"{str(err).splitlines()[0] if str(err) else ''}")
                    tqdm.write(f"torrid: error: {errors[-1]} (the point is retried when the "
                               "sweep is rerun)", file=sys.stderr)  # said when it happens
                    bar.set_postfix_str(f"{done} done, {failed} failed, {len(errors)} errors, "
                                        f"{min(slots, len(pending))} running", refresh=False)
                    bar.update(1)
                    continue
                _check_visible(result, scheduler)
                if result["status"] == FAILED:
                    failed += 1
                else:
                    done += 1
                bar.set_postfix_str(f"{done} done, {failed} failed, "
                                    f"{min(slots, len(pending))} running", refresh=False)
                bar.update(1)
    return errors


def _check_visible(result: dict, scheduler: str | None) -> None:
    """A cluster worker's file must be visible here, else the folder is not shared."""
    if scheduler is not None and not Path(result["path"]).is_file():
        raise SweepError(f"{result['path']}: written by a worker on {result['host']} but not "
                         "visible here: the sweep folder must be on a file system that every "
                         "dask worker and this machine share")
