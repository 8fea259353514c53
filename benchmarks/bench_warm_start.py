"""Warm start (issue 13): simulated days to the steady-state stop from rest and from the linear
steady state (``run.initial_state = "linear"``), and whether the final diagnostics agree.

For each case the time-stepped model runs to its steady-state stop twice, once from rest and
once from the linear steady state; it prints the day of the stop of each, the days saved, the
wall times, and for every monitored diagnostic of the steady-state test the difference of the
two final values in units of the test's allowance (tolerance x scale: 1 means "just within
the steady-state tolerance"); |difference| > 1 would be hysteresis (a different final state).
The simulated days are deterministic; the wall times vary with the machine's load.

    python benchmarks/bench_warm_start.py                   # default planet, strong drag
    python benchmarks/bench_warm_start.py --cases default
"""

from __future__ import annotations

import argparse
import time
from pathlib import Path

import torrid
from torrid.workflow.driver import run_config
from torrid.workflow.steady import MONITORED

EXAMPLES = Path(__file__).parents[1] / "examples"


def cases() -> dict[str, torrid.ModelConfig]:
    return {"default": torrid.ModelConfig(),
            "strong-drag": torrid.load_config(EXAMPLES / "strong_drag.toml")}


def run(config) -> tuple[dict, float]:
    start = time.perf_counter()
    ds, _ = run_config(config, progress=False)
    return dict(ds.attrs), time.perf_counter() - start


def allowance(name: str, attrs: dict) -> float:
    """tolerance x scale of ``name`` in the steady-state test (torrid.workflow.steady)."""
    tolerance = attrs_tolerance(attrs)
    scale = {"kinetic_energy": abs(attrs["final_kinetic_energy"]), "day_night_contrast": 1.0,
             "hotspot_offset_harmonic": 360.0}.get(name, abs(attrs["final_max_wind_speed"]))
    return tolerance * scale


def attrs_tolerance(attrs: dict) -> float:
    import json

    return json.loads(attrs["configuration_json"])["run"]["steady_tolerance"]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", nargs="*", default=list(cases()))
    args = parser.parse_args()
    run(torrid.ModelConfig().replace(run={"days": 1.0}))  # warm-up: numba, imports
    for name in args.cases:
        config = cases()[name]
        rest, rest_wall = run(config)
        warm, warm_wall = run(config.replace(run={"initial_state": "linear"}))
        saved = rest["steady_state_time_days"] - warm["steady_state_time_days"]
        print(f"{name}: steady at day {rest['steady_state_time_days']:g} from rest "
              f"({rest_wall:.1f} s), day {warm['steady_state_time_days']:g} from the linear "
              f"state ({warm_wall:.1f} s): {saved:g} simulated days saved "
              f"(window {rest['steady_state_criterion']})")
        worst = 0.0
        for diag in MONITORED:
            a, b = rest[f"final_{diag}"], warm[f"final_{diag}"]
            ratio = (b - a) / allowance(diag, rest)
            worst = max(worst, abs(ratio))
            print(f"  {diag:26s} rest {a:12.5g}  warm {b:12.5g}  difference "
                  f"{ratio:+.2f} x tolerance")
        for diag in ("hotspot_offset", "peak_contrast"):
            print(f"  {diag:26s} rest {rest[f'final_{diag}']:12.5g}  warm "
                  f"{warm[f'final_{diag}']:12.5g}")
        print(f"  largest difference: {worst:.2f} x the steady-state tolerance -> "
              + ("agree" if worst <= 1 else "HYSTERESIS (different final states)"))


if __name__ == "__main__":
    main()
