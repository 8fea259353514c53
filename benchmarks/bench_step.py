"""Time per step of Williamson case 6 against the transform floor, one thread.

The floor is the time of the spherical-harmonic transforms one step needs (per explicit stage:
scalar syntheses of vorticity and thickness, the spin-1 synthesis of the winds, the spin-1
analysis of the momentum products, the divergence-only analysis of the thickness flux and the
scalar analysis of the kinetic energy; four stages per step), measured in the same process,
interleaved with the steps so that both see the same machine load. Prints medians and ratios,
and the peak resident memory of a fresh process per truncation.

    python benchmarks/bench_step.py                 # T42, T85, T170
    python benchmarks/bench_step.py -T 85 --steps 200
    python benchmarks/bench_step.py --planet        # the default planet's forced step instead
"""

from __future__ import annotations

import argparse
import json
import resource
import statistics
import subprocess
import sys
import time

import numpy as np

STAGES = 4  # explicit evaluations per ARS(4,4,3) step


def measure(truncation: int, steps: int, planet: bool = False) -> dict:
    import torrid
    from torrid.physics.kernels import KERNEL_BACKEND
    from torrid.workflow.setup import build_model

    if planet:  # the default planet: relaxation, mass exchange, hyperdiffusion
        config = torrid.ModelConfig().replace(numerics={"truncation": truncation})
    else:
        config = torrid.build_case_config("williamson6", truncation=truncation)
    model = build_model(config)
    tr, state = model.transforms, model.initial_state.copy()
    grid = model.grid
    scalar = np.zeros(grid.shape)
    vector = np.zeros((2, *grid.shape))

    def floor_once():
        for _ in range(STAGES):
            tr.to_grid(state[0], out=scalar)
            tr.to_grid(state[2], out=scalar)
            tr.winds(state[0], state[1], out=vector)
            tr.divergence_curl_weighted(vector)
            tr.divergence_weighted(vector)
            tr.to_spectral_weighted(scalar)

    t = 0.0
    for _ in range(5):  # warm-up (numba compile, caches)
        state = model.stepper.step(state, t)
        floor_once()
    step_times, floor_times = [], []
    for _ in range(steps):
        t0 = time.perf_counter()
        state = model.stepper.step(state, t)
        t1 = time.perf_counter()
        floor_once()
        t2 = time.perf_counter()
        step_times.append(t1 - t0)
        floor_times.append(t2 - t1)
    step_ms = statistics.median(step_times) * 1e3
    floor_ms = statistics.median(floor_times) * 1e3
    return {
        "case": "planet" if planet else "williamson6",
        "truncation": truncation, "grid": f"{grid.nlat}x{grid.nlon}", "kernel": KERNEL_BACKEND,
        "step_ms": step_ms, "floor_ms": floor_ms, "ratio": step_ms / floor_ms,
        "peak_rss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
        "steps_timed": steps,
    }


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("-T", "--truncations", type=int, nargs="+", default=[42, 85, 170])
    parser.add_argument("--steps", type=int, default=0,
                        help="steps timed per truncation (default: 400 / 200 / 60)")
    parser.add_argument("--planet", action="store_true",
                        help="time the default planet (forced) instead of Williamson case 6")
    parser.add_argument("--child", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        print(json.dumps(measure(args.truncations[0], args.steps, args.planet)))
        return
    print(f"{'case':>11} {'trunc':>5} {'grid':>8} {'kernel':>6} {'step ms':>8} {'floor ms':>9} {'ratio':>6} "
          f"{'peak MB':>8}")
    for n in args.truncations:
        steps = args.steps or {42: 400, 85: 200}.get(n, 60)
        out = subprocess.run([sys.executable, __file__, "--child", "-T", str(n), "--steps",
                              str(steps), *(["--planet"] if args.planet else [])],
                             capture_output=True, text=True, check=True)
        r = json.loads(out.stdout.strip().splitlines()[-1])
        print(f"{r['case']:>11} T{r['truncation']:>4} {r['grid']:>8} {r['kernel']:>6} {r['step_ms']:8.3f} "
              f"{r['floor_ms']:9.3f} {r['ratio']:6.2f} {r['peak_rss_mb']:8.0f}")


if __name__ == "__main__":
    main()
