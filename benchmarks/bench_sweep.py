"""Sweep throughput: points per hour with 1 and 2 local workers, parallel efficiency, and the
overhead of running the same sweep on a dask LocalCluster (2 worker processes, 1 thread each).

Every point costs the same: T42, a fixed number of days with a fixed time step and no
steady-state stop; the points differ in tau_rad. Each sweep starts in a fresh folder and its
wall time includes starting the local worker processes (what a user waits for). Dask is timed
twice, after the local sweeps (a cluster's threads in this process would make them spawn
their workers): on a cluster started once and kept (its workers stay warm, like a user's
running cluster), and as a fresh cluster plus one sweep (cold, start-up included). Efficiency =
rate(2) / (2 rate(1)), from the medians and from the fastest runs (the least disturbed on a
shared machine).

The local sweeps run in this process, which stays warm between them: its workers are forked
(:mod:`torrid.workflow.worker_process`), and the one-off warm-up is paid by the warm-up sweep.
``--cold`` also times ``torrid sweep`` in a fresh interpreter each time, its imports and
warm-up included: what a user of the command line waits for.

The machine's own scaling is measured beside them: the points' time loops alone (no files, no
sweep code) in one process, and split over two processes that run at once, each timed from a
common start after its warm-up. On a shared virtual machine two processes at once may not get
two full cores; this bare-loop efficiency is what the sweep's efficiency is to be read against
(the two are measured minutes apart, so on a noisy machine either may come out ahead).

    python benchmarks/bench_sweep.py
    python benchmarks/bench_sweep.py --points 8 --days 20 --repeats 3
    python benchmarks/bench_sweep.py --truncation 21 --days 10 --no-dask --cold
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from torrid.io.settings import toml_value
from torrid.io.sweepfile import parse_sweep
from torrid.workflow.sweep import run_sweep


def sweep_data(args) -> dict:
    """The benchmark's sweep: a tau_rad axis of ``args.points`` equal-cost points."""
    return {
        "numerics": {"truncation": args.truncation, "time_step_s": 500.0},
        "run": {"days": args.days, "stop_at_steady_state": False, "output_interval_days": 1.0},
        "sweep": {"name": "bench", "axis": [
            {"key": "atmosphere.radiative_timescale_days",
             "log_range": [0.1, 10.0, args.points]}]},
    }


def sweep_toml(data: dict) -> str:
    """``data`` (tables of values, lists of tables) as the text of a sweep file."""
    lines = []
    for section, table in data.items():
        lines.append(f"[{section}]")
        nested = {key: rows for key, rows in table.items()
                  if isinstance(rows, list) and rows and isinstance(rows[0], dict)}
        lines += [f"{key} = {toml_value(value)}" for key, value in table.items()
                  if key not in nested]
        for key, rows in nested.items():
            for row in rows:
                lines.append(f"[[{section}.{key}]]")
                lines += [f"{k} = {toml_value(v)}" for k, v in row.items()]
    return "\n".join(lines) + "\n"


def timed_sweep(args, **where) -> float:
    with tempfile.TemporaryDirectory(prefix="bench-sweep-") as tmp:
        spec = parse_sweep(sweep_data(args), "bench.toml", folder=Path(tmp) / "bench")
        start = time.perf_counter()
        outcome = run_sweep(spec, progress=False, **where)
        wall = time.perf_counter() - start
    if outcome.counts["complete"] != args.points:
        raise RuntimeError(f"benchmark sweep did not complete: {outcome.counts}")
    return wall


LOOPS = """
import sys
from torrid.io.config import ModelConfig
from torrid.workflow.driver import run_config
config = ModelConfig.from_dict(__import__("json").loads(sys.argv[1]))
run_config(config, progress=False)
print("ready", flush=True)
sys.stdin.readline()
for _ in range(int(sys.argv[2])):
    run_config(config, progress=False)
"""


def loops_wall(args, processes: int) -> float:
    """Wall time (s) of the points' time loops split over ``processes`` processes that start
    together once each is warm (one thread each)."""
    config = {k: v for k, v in sweep_data(args).items() if k != "sweep"}
    env = dict(os.environ, NUMBA_NUM_THREADS="1", OMP_NUM_THREADS="1",
               OPENBLAS_NUM_THREADS="1")
    children = [subprocess.Popen([sys.executable, "-c", LOOPS, json.dumps(config),
                                  str(args.points // processes)], stdin=subprocess.PIPE,
                                 stdout=subprocess.PIPE, env=env) for _ in range(processes)]
    for child in children:
        child.stdout.readline()
    start = time.perf_counter()
    for child in children:
        child.stdin.write(b"go\n")
        child.stdin.flush()
    for child in children:
        child.wait()
    return time.perf_counter() - start


def cold_sweep(args, workers: int) -> float:
    """``torrid sweep`` of the same points in a fresh interpreter (wall time, s)."""
    with tempfile.TemporaryDirectory(prefix="bench-sweep-") as tmp:
        sweep = Path(tmp) / "bench.toml"
        sweep.write_text(sweep_toml(sweep_data(args)))
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "torrid", "sweep", str(sweep), "--folder",
                        str(Path(tmp) / "bench"), "--workers", str(workers), "-q"], check=True)
        return time.perf_counter() - start


def load() -> str:
    return "load average " + ", ".join(f"{x:.2f}" for x in os.getloadavg())


def cold_dask_sweep(args) -> float:
    """A fresh LocalCluster (2 processes, 1 thread each) and one sweep on it, timed together."""
    import distributed

    start = time.perf_counter()
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=":0") as cluster:
        timed_sweep(args, scheduler=cluster.scheduler_address)
    return time.perf_counter() - start


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--points", type=int, default=4)
    parser.add_argument("--days", type=float, default=20.0)
    parser.add_argument("--truncation", type=int, default=42)
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--no-dask", action="store_true", help="skip the dask measurements")
    parser.add_argument("--cold", action="store_true",
                        help="also time `torrid sweep` in a fresh interpreter")
    args = parser.parse_args()
    print(f"sweep of {args.points} points, T{args.truncation}, {args.days:g} days each, "
          f"{args.repeats} repeats; {os.cpu_count()} cores; {load()}")
    timed_sweep(args, workers=1)  # warm-up: numba cache, imports, file-system caches

    walls = {"local, 1 worker": [], "local, 2 workers": [], "dask, 2 warm workers": [],
             "dask, cold cluster": [], "command, 1 worker": [], "command, 2 workers": [],
             "time loops, 1 process": [], "time loops, 2 processes": []}
    for _ in range(args.repeats):  # interleaved, so load changes hit every variant
        walls["local, 1 worker"].append(timed_sweep(args, workers=1))
        walls["local, 2 workers"].append(timed_sweep(args, workers=2))
        if args.cold:
            walls["command, 1 worker"].append(cold_sweep(args, 1))
            walls["command, 2 workers"].append(cold_sweep(args, 2))
        walls["time loops, 1 process"].append(loops_wall(args, 1))
        walls["time loops, 2 processes"].append(loops_wall(args, 2))
    if not args.no_dask:  # last: a cluster's threads in this process make local sweeps spawn
        import distributed

        with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                      dashboard_address=":0") as cluster:
            timed_sweep(args, scheduler=cluster.scheduler_address)  # warm the workers
            for _ in range(args.repeats):
                walls["dask, 2 warm workers"].append(
                    timed_sweep(args, scheduler=cluster.scheduler_address))
                walls["dask, cold cluster"].append(cold_dask_sweep(args))
    median = {k: statistics.median(v) for k, v in walls.items() if v}
    best = {k: min(v) for k, v in walls.items() if v}
    for name, wall in median.items():
        runs = ", ".join(f"{w:.1f}" for w in walls[name])
        print(f"{name:21s}: median {wall:6.1f} s wall, {3600 * args.points / wall:6.0f} "
              f"points/hour (runs: {runs} s)")
    for label, t in (("medians", median), ("fastest runs", best)):
        efficiency = t["local, 1 worker"] / (2 * t["local, 2 workers"])
        line = f"{label:12s}: parallel efficiency on 2 workers {efficiency:.2f}"
        bare = t["time loops, 1 process"] / (2 * t["time loops, 2 processes"])
        line += f"; bare time loops {bare:.2f}"
        if "command, 1 worker" in t:
            line += (f"; command line, fresh interpreter: "
                     f"{t['command, 1 worker'] / (2 * t['command, 2 workers']):.2f}")
        if "dask, 2 warm workers" in t:
            warm = t["dask, 2 warm workers"] / t["local, 2 workers"] - 1
            cold = t["dask, cold cluster"] / t["local, 2 workers"] - 1
            line += (f"; dask against the local runner (2 workers): warm workers "
                     f"{100 * warm:+.0f} %, cold cluster incl. its start-up {100 * cold:+.0f} %")
        print(line)
    print(f"after: {load()}")


if __name__ == "__main__":
    main()
