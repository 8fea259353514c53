"""Time to an answer: today's settings against the new defaults, default planet, rest -> steady.

Runs in one process (after a warm-up that compiles and loads caches), on one transform thread:

* ``before``: ``numerics.time_scheme = "ars443"``, ``numerics.time_step_rule = "fixed_start"``
  (the step set at the start from an assumed wind of twice the gravity-wave speed, only ever
  shortened) and ``numerics.courant_number = 1.0``: the settings before issue 14;
* ``after``: the defaults (IMEX(3,3,2), the step following the winds);
* ``reference``: the defaults at half the step (``numerics.courant_number`` halved), the
  accuracy reference of both.

Each is run from rest to the steady-state stop ``--repeats`` times (the wall time quoted is the
median; evaluations and results are deterministic). Printed: tendency evaluations, wall time,
simulated days, steps and the final diagnostics; then the ratios and the differences from the
reference against the targets of issue 14 (>= 2.5x fewer evaluations, >= 2x less wall; within
0.5 deg harmonic hotspot offset, 0.01 day-night contrast, 1 % equatorial jet speed).

    python benchmarks/bench_time_to_answer.py               # T42, the default planet
    python benchmarks/bench_time_to_answer.py --truncation 21 --repeats 3
"""

from __future__ import annotations

import argparse
import statistics
import time

import torrid
from torrid.physics.timestepping import SCHEMES
from torrid.workflow.driver import integrate
from torrid.workflow.setup import build_model

DIAGNOSTICS = ("final_hotspot_offset_harmonic", "final_day_night_contrast",
               "final_longitudinal_contrast", "final_equatorial_zonal_wind",
               "final_max_wind_speed")
TARGETS = {"final_hotspot_offset_harmonic": ("deg", 0.5, "absolute"),
           "final_day_night_contrast": ("", 0.01, "absolute"),
           "final_equatorial_zonal_wind": ("m/s", 0.01, "relative")}


def settings(truncation: int) -> dict[str, torrid.ModelConfig]:
    planet = torrid.ModelConfig().replace(numerics={"truncation": truncation})
    half = SCHEMES[planet.numerics.time_scheme].courant_number / 2
    return {
        "before": planet.replace(numerics={"time_scheme": "ars443",
                                           "time_step_rule": "fixed_start",
                                           "courant_number": 1.0}),
        "after": planet,
        "reference": planet.replace(numerics={"courant_number": half}),
    }


def timed(config) -> tuple[float, object]:
    model = build_model(config)
    start = time.perf_counter()
    ds, _ = integrate(model, progress=False)
    return time.perf_counter() - start, ds


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--truncation", type=int, default=42)
    parser.add_argument("--repeats", type=int, default=2)
    args = parser.parse_args()
    configs = settings(args.truncation)
    timed(configs["after"].replace(run={"days": 1.0}))  # warm-up: compile, caches
    results = {}
    for label, config in configs.items():
        walls, ds = [], None
        for _ in range(args.repeats if label != "reference" else 1):
            wall, ds = timed(config)
            walls.append(wall)
        results[label] = (statistics.median(walls), walls, ds)
        a = ds.attrs
        print(f"{label:9s} T{args.truncation}: {a['tendency_evaluations']} tendency evaluations, "
              f"{a['steps']} steps, {a['steady_state_time_days']:g} simulated days, wall "
              f"median {statistics.median(walls):.1f} s (runs: "
              f"{', '.join(f'{w:.1f}' for w in walls)}); {a['time_scheme']}; rule "
              f"{a['time_step_rule']}; step changes: {a['time_step_changes']}")
        print("          " + ", ".join(f"{k.removeprefix('final_')} {float(a[k]):.5g}"
                                       for k in DIAGNOSTICS))
    (wb, _, before), (wa, _, after), (_, _, ref) = (results[k] for k in configs)
    evals = before.attrs["tendency_evaluations"] / after.attrs["tendency_evaluations"]
    print(f"ratios before/after: {evals:.2f}x fewer tendency evaluations (target >= 2.5), "
          f"{wb / wa:.2f}x less wall time (target >= 2)")
    for label, ds in (("after", after), ("before", before)):
        for key, (unit, tol, kind) in TARGETS.items():
            value, reference = float(ds.attrs[key]), float(ref.attrs[key])
            diff = abs(value - reference) / (abs(reference) if kind == "relative" else 1.0)
            shown = f"{100 * diff:.3f} %" if kind == "relative" else f"{diff:.4f} {unit}"
            tol_shown = f"{100 * tol:g} %" if kind == "relative" else f"{tol:g} {unit}"
            print(f"{label} - reference {key.removeprefix('final_')}: {shown} "
                  f"(target <= {tol_shown}): {'ok' if diff <= tol else 'MISSED'}")


if __name__ == "__main__":
    main()
