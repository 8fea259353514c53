"""Default planet: wall time from rest to the steady-state stop, and simulated days per second.

One transform thread. Each measurement is repeated (``--repeats``) and the median quoted; the
run to steady state is the built-in default planet at T42 (``torrid run`` without arguments).

    python benchmarks/bench_planet.py
    python benchmarks/bench_planet.py --repeats 5 --days 20
"""

from __future__ import annotations

import argparse
import statistics
import time

import torrid
from torrid.workflow.driver import integrate
from torrid.workflow.setup import build_model


def timed(config) -> tuple[float, object]:
    model = build_model(config)
    start = time.perf_counter()
    ds, summary = integrate(model, progress=False)
    return time.perf_counter() - start, ds


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--days", type=float, default=10.0,
                        help="simulated days of the fixed-length speed runs")
    args = parser.parse_args()
    planet = torrid.ModelConfig()
    timed(planet.replace(run={"days": 1.0}))  # warm-up: numba compile, imports, caches

    walls, steady_days = [], []
    for _ in range(args.repeats):
        wall, ds = timed(planet)
        walls.append(wall)
        steady_days.append(ds.attrs["steady_state_time_days"])
    print(f"default planet T42, rest -> steady state: median {statistics.median(walls):.1f} s "
          f"wall (runs: {', '.join(f'{w:.1f}' for w in walls)}), steady at day "
          f"{steady_days[0]:g}")

    for truncation in (42, 85):
        config = planet.replace(numerics={"truncation": truncation},
                                run={"days": args.days, "stop_at_steady_state": False})
        rates = [args.days / timed(config)[0] for _ in range(args.repeats)]
        print(f"T{truncation}: median {statistics.median(rates):.2f} simulated days per wall "
              f"second (runs: {', '.join(f'{r:.2f}' for r in rates)})")


if __name__ == "__main__":
    main()
