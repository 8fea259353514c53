"""Per-point overhead of a sweep (issue 14): what a point costs beyond its time loop.

Measured on equal T21 points (fixed step, no steady-state stop), medians of repeats:

* ``time loop``: the model built and integrated in this process, no file (``run_config``);
* ``run file``: the same through ``run_to_file`` (streamed snapshots, restart state, merge,
  publication): the file-writing part is the difference;
* ``sweep point``: a sweep of N such points with one local worker, wall / N: the difference to
  the run file is the dispatch (pipe, point file, status), with the worker's start spread
  over the points;
* ``worker start``: a fresh ``python`` that imports the worker's modules and runs one step
  (interpreter start, imports, numba cache load), which a long-lived worker pays once.

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
    rows = [("time loop (in process, no file)", loop), ("run file (run_to_file)", files),
            (f"sweep point (1 worker, {args.points} points, wall / points)", sweeps),
            ("worker start (python, imports, numba cache, one step)", starts)]
    print(f"T21 points of {args.days:g} days, medians of {args.repeats}")
    for name, values in rows:
        print(f"  {name:<58s} {statistics.median(values):7.3f} s")
    base = statistics.median(loop)
    print(f"  file writing per point: {statistics.median(files) - base:+.3f} s; dispatch and "
          f"worker start per point: {statistics.median(sweeps) - statistics.median(files):+.3f} s;"
          f" overhead / time loop: {statistics.median(sweeps) / base - 1:.1%}")


if __name__ == "__main__":
    main()
