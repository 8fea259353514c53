"""Per-point overhead of a sweep (issue 14): what a point costs beyond its time loop.

Measured on equal T21 points (fixed step, no steady-state stop), medians of repeats:

* ``time loop``: the model built and integrated in this process, no file (``run_config``);
* ``run file``: the same through ``run_to_file`` (streamed snapshots, restart state, merge,
  publication): the file-writing part is the difference;
* ``sweep point``: a sweep of N such points with one local worker, wall / N: the difference to
  the run file is the dispatch (pipe, point file, status), with the worker's start spread
  over the points;
* ``worker start``: what a worker pays once before its first point, both ways a sweep starts
  one (:mod:`torrid.workflow.worker_process`): spawned, a fresh ``python`` that imports the
  worker's modules and runs one step (interpreter start, imports, numba cache load); forked,
  the first point's latency beyond its own run time on a pool forked from this (warm)
  process, and the warm-up a sweep process pays once before it forks (measured in a fresh
  interpreter that has imported the sweep, as ``torrid sweep`` has).

    python benchmarks/bench_point_overhead.py
    python benchmarks/bench_point_overhead.py --days 10 --points 6 --repeats 3
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from torrid.io.config import ModelConfig
from torrid.io.sweepfile import parse_sweep
from torrid.workflow.driver import run_config, run_to_file
from torrid.workflow.sweep import run_sweep

NUMERICS = {"truncation": 21, "time_step_s": 1800.0}


def point_config(days: float) -> ModelConfig:
    return ModelConfig.from_dict({"numerics": NUMERICS, "run": {
        "days": days, "stop_at_steady_state": False, "output_interval_days": 1.0}})


def timed(function) -> float:
    start = time.perf_counter()
    function()
    return time.perf_counter() - start


def sweep_wall(days: float, points: int) -> float:
    with tempfile.TemporaryDirectory(prefix="bench-overhead-") as tmp:
        spec = parse_sweep({
            "numerics": NUMERICS,
            "run": {"days": days, "stop_at_steady_state": False, "output_interval_days": 1.0},
            "sweep": {"name": "overhead", "axis": [
                {"key": "atmosphere.radiative_timescale_days",
                 "log_range": [0.5, 2.0, points]}]}}, "overhead.toml", folder=Path(tmp) / "s")
        return timed(lambda: run_sweep(spec, workers=1, progress=False))


WORKER_START = ("import torrid.workflow.sweep_worker, torrid.workflow.sweep_task;"
                "from torrid.io.config import ModelConfig;"
                "from torrid.workflow.driver import run_config;"
                "run_config(ModelConfig.from_dict({'numerics': {'truncation': 21, "
                "'time_step_s': 1800.0}, 'run': {'days': 0.0625, 'output_interval_days': "
                "0.0625, 'stop_at_steady_state': False}}), progress=False)")


WARM_UP = ("import time, torrid.workflow.sweep;"
           "from torrid.workflow.worker_process import warm_up;"
           "t = time.perf_counter(); warm_up(); print(time.perf_counter() - t)")


def first_point_latency(start: str, days: float) -> float:
    """Wall time from starting a one-worker pool to its first point's result, less the
    point's own run time (s)."""
    from torrid.io.pointfile import canonical_json
    from torrid.workflow.sweep_task import run_point
    from torrid.workflow.sweep_worker import WorkerPool

    with tempfile.TemporaryDirectory(prefix="bench-overhead-") as tmp:
        begin = time.perf_counter()
        pool = WorkerPool(1, start=start)
        try:
            result = pool.submit(run_point, canonical_json(point_config(days).to_dict()),
                                 str(Path(tmp) / "p.nc")).result()
        finally:
            pool.close()
        return time.perf_counter() - begin - result["wall_s"]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--days", type=float, default=10.0)
    parser.add_argument("--points", type=int, default=6)
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    config = point_config(args.days)
    run_config(config, progress=False)  # warm: numba cache, ducc0 plans
    loop = [timed(lambda: run_config(config, progress=False)) for _ in range(args.repeats)]
    files = []
    for _ in range(args.repeats):
        with tempfile.TemporaryDirectory(prefix="bench-overhead-") as tmp:
            files.append(timed(lambda: run_to_file(config, Path(tmp) / "p.nc")))
    sweeps = [sweep_wall(args.days, args.points) / args.points for _ in range(args.repeats)]
    starts = [timed(lambda: subprocess.run([sys.executable, "-c", WORKER_START], check=True))
              for _ in range(args.repeats)]
    warm_ups = [float(subprocess.run([sys.executable, "-c", WARM_UP], check=True,
                                     capture_output=True, text=True).stdout)
                for _ in range(args.repeats)]
    forks = [first_point_latency("fork", args.days) for _ in range(args.repeats)]
    spawns = [first_point_latency("spawn", args.days) for _ in range(args.repeats)]
    rows = [("time loop (in process, no file)", loop), ("run file (run_to_file)", files),
            (f"sweep point (1 worker, {args.points} points, wall / points)", sweeps),
            ("worker start, spawned (python, imports, numba cache, one step)", starts),
            ("first point's latency beyond its run, spawned worker", spawns),
            ("first point's latency beyond its run, forked worker", forks),
            ("warm-up of a fresh sweep process before it forks (once)", warm_ups)]
    print(f"T21 points of {args.days:g} days, medians of {args.repeats}")
    for name, values in rows:
        print(f"  {name:<58s} {statistics.median(values):7.3f} s")
    base = statistics.median(loop)
    print(f"  file writing per point: {statistics.median(files) - base:+.3f} s; dispatch and "
          f"worker start per point: {statistics.median(sweeps) - statistics.median(files):+.3f} s;"
          f" overhead / time loop: {statistics.median(sweeps) / base - 1:.1%}")


if __name__ == "__main__":
    main()
