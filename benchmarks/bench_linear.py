"""The linear steady solver (issue 13): one solve at T42, a 50 x 50 tau_rad x tau_drag sweep
with its table, and the ratio against a time-stepped point, on one core.

The process pins itself to one core (``os.sched_setaffinity``) and sets one thread for BLAS,
OpenMP and numba before numpy loads; the transforms use one thread (the default). Each timing
is repeated and the median quoted with the runs beside it. Other processes on the machine
disturb the wall times (compare the ratios; the load average is printed).

    python benchmarks/bench_linear.py                    # everything (about 5 minutes)
    python benchmarks/bench_linear.py --size 20 --repeats 2 --no-stepping
"""

from __future__ import annotations

import os

for _name in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS", "NUMBA_NUM_THREADS"):
    os.environ[_name] = "1"

import argparse  # noqa: E402
import statistics  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import torrid  # noqa: E402
from torrid.io.sweepfile import load_sweep  # noqa: E402
from torrid.workflow.driver import run_config  # noqa: E402
from torrid.workflow.linear_run import model_solution, run_linear  # noqa: E402
from torrid.workflow.setup import build_model  # noqa: E402
from torrid.workflow.sweep import run_sweep  # noqa: E402

SWEEP = """\
[numerics]
solver = "linear"
[sweep]
name = "linear-{size}"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
log_range = [0.01, 100.0, {size}]
[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
log_range = [0.01, 100.0, {size}]
"""


def median_text(values: list[float], unit: str = "s", scale: float = 1.0) -> str:
    runs = ", ".join(f"{v * scale:.3g}" for v in values)
    return f"median {statistics.median(values) * scale:.3g} {unit} (runs: {runs})"


def timed(function, repeats: int) -> list[float]:
    """Wall times (s) of ``repeats`` calls; the CPU times go to CPU_TIMES (what the call costs
    on an idle core: other processes slow the wall time, not this process's CPU time)."""
    out, CPU_TIMES[:] = [], []
    for _ in range(repeats):
        start, cpu = time.perf_counter(), time.process_time()
        function()
        out.append(time.perf_counter() - start)
        CPU_TIMES.append(time.process_time() - cpu)
    return out


CPU_TIMES: list[float] = []


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--solves", type=int, default=20, help="repeats of the single solve")
    parser.add_argument("--size", type=int, default=50, help="values per sweep axis")
    parser.add_argument("--no-stepping", action="store_true",
                        help="skip the time-stepped point (the longest part)")
    args = parser.parse_args()
    if hasattr(os, "sched_setaffinity"):
        os.sched_setaffinity(0, {sorted(os.sched_getaffinity(0))[0]})
    print(f"one core; load average {os.getloadavg()[0]:.2f} on {os.cpu_count()} cores "
          "(other processes disturb the timings)")

    config = torrid.ModelConfig().replace(numerics={"solver": "linear"})  # default planet, T42
    run_linear(config)  # warm-up: numba's cached kernel, imports
    model = build_model(config)
    solution = model_solution(model)
    solve = timed(lambda: solution.problem.solve(solution.forcing), args.solves)
    print(f"T42 default planet: banded solve of the 43 blocks {median_text(solve, 'ms', 1e3)}; "
          f"CPU {median_text(CPU_TIMES, 'ms', 1e3)}")
    problem = timed(lambda: model_solution(model), args.solves)
    print(f"  forcing + operator + solve on a built model: {median_text(problem, 'ms', 1e3)}; "
          f"CPU {median_text(CPU_TIMES, 'ms', 1e3)}")
    whole = timed(lambda: run_linear(config), args.solves)
    whole_cpu = statistics.median(CPU_TIMES)
    print(f"  whole linear run (configuration -> model -> solve -> diagnostics -> dataset): "
          f"{median_text(whole, 'ms', 1e3)}; CPU {median_text(CPU_TIMES, 'ms', 1e3)}")

    sweeps, sweep_cpu, table = [], [], None
    for _ in range(args.repeats):
        with tempfile.TemporaryDirectory() as folder:
            path = Path(folder) / "sweep.toml"
            path.write_text(SWEEP.format(size=args.size))
            start, cpu = time.perf_counter(), time.process_time()
            outcome = run_sweep(load_sweep(path, folder=Path(folder) / "s"), workers=1,
                                progress=False)
            sweeps.append(time.perf_counter() - start)
            sweep_cpu.append(time.process_time() - cpu)
            import xarray as xr

            with xr.open_dataset(outcome.table_path) as ds:
                table = ds.load()
    n = args.size * args.size
    print(f"{args.size} x {args.size} tau_rad x tau_drag sweep of the linear solver at T42, "
          f"table included (torrid sweep, 1 worker): {median_text(sweeps)}; CPU "
          f"{median_text(sweep_cpu)}; {1e3 * statistics.median(sweeps) / n:.1f} ms per point; "
          f"counts {outcome.counts}")
    pick = dict(radiative_timescale_days=[0, args.size // 2, args.size - 1],
                drag_timescale_days=[0, args.size // 2, args.size - 1])
    print(table[["hotspot_offset", "day_night_contrast"]].isel(pick).to_dataframe()
          .to_string(float_format=lambda v: f"{v:.3g}"))

    if args.no_stepping:
        return
    stepping = torrid.ModelConfig()
    steps = timed(lambda: run_config(stepping, progress=False), args.repeats)
    steps_cpu = statistics.median(CPU_TIMES)
    print(f"time-stepped default planet T42, rest -> steady state: {median_text(steps)}; CPU "
          f"{median_text(CPU_TIMES)}")
    print(f"ratio time-stepped point / one whole linear run: wall "
          f"{statistics.median(steps) / statistics.median(whole):.0f}x, CPU "
          f"{steps_cpu / whole_cpu:.0f}x; / the sweep's cost per point: wall "
          f"{statistics.median(steps) / (statistics.median(sweeps) / n):.0f}x, CPU "
          f"{steps_cpu / (statistics.median(sweep_cpu) / n):.0f}x")


if __name__ == "__main__":
    main()
