"""Choosing the time scheme: stability per evaluation and cost at equal steady-state accuracy.

Part 1 (analysis, no model run): for each candidate, explicit tendency evaluations per step,
the explicit part's stability limit on the imaginary axis (advection), that limit per
evaluation, and whether explicit advection stays stable together with stiff implicit damping
(|R| over z_E in i[-0.8 L, 0.8 L], z_I in [-1e9, 0]; frozen-coefficient analysis):

* ARS(4,4,3) and ARS(2,3,2), ARS(2,2,2) (Ascher, Ruuth & Spiteri 1997; coefficients from
  memory), IMEX(3,3,2) (this project's, torrid.physics.timestepping);
* two semi-implicit multistep schemes, explicit part only: leapfrog with a Robert-Asselin
  filter (nu = 0.05, 0.1; Asselin 1972) and third-order Adams-Bashforth (as in AB3-CN).

Part 2 (model runs): the default planet from rest to the steady-state stop with each
selectable scheme, both with the step following the winds, at their target Courant numbers
(and IMEX(3,3,2) also at 1.5): tendency evaluations per simulated day, wall time, and the
final diagnostics against a reference (ARS(4,4,3) at Courant number 0.5).

    python benchmarks/bench_time_schemes.py                 # T42
    python benchmarks/bench_time_schemes.py --truncation 21
"""

from __future__ import annotations

import argparse
import time

import numpy as np

import torrid
from torrid.physics.timestepping import ARS443, IMEX332
from torrid.workflow.driver import integrate
from torrid.workflow.setup import build_model

GAMMA = 1 - 1 / np.sqrt(2)
DELTA_232 = -2 * np.sqrt(2) / 3
DELTA_222 = 1 - 1 / (2 * GAMMA)
#: name: (explicit, implicit) in the padded form of torrid.physics.timestepping.Scheme
RUNGE_KUTTA = {
    "ARS(4,4,3)": (ARS443.explicit, ARS443.implicit),
    "IMEX(3,3,2)": (IMEX332.explicit, IMEX332.implicit),
    "ARS(2,3,2)": (np.array([[0, 0, 0, 0], [GAMMA, 0, 0, 0], [DELTA_232, 1 - DELTA_232, 0, 0],
                             [0, 1 - GAMMA, GAMMA, 0]]),
                   np.array([[0, 0, 0, 0], [0, GAMMA, 0, 0], [0, 1 - GAMMA, GAMMA, 0],
                             [0, 1 - GAMMA, GAMMA, 0]])),
    "ARS(2,2,2)": (np.array([[0, 0, 0], [GAMMA, 0, 0], [DELTA_222, 1 - DELTA_222, 0]]),
                   np.array([[0, 0, 0], [0, GAMMA, 0], [0, 1 - GAMMA, GAMMA]])),
}


def amplification(explicit, implicit, z_e, z_i) -> float:
    n = len(explicit)
    return abs(np.linalg.solve(np.eye(n) - z_e * explicit - z_i * implicit,
                               np.ones(n, dtype=complex))[-1])


def imaginary_limit(factor, y=np.linspace(1e-4, 3.0, 30000)) -> float:
    bad = [yy for yy in y if factor(1j * yy) > 1 + 1e-9]
    return float(bad[0]) if bad else float(y[-1])


def leapfrog_filtered(z, nu) -> float:
    """Largest root modulus of leapfrog with a Robert-Asselin filter for y' = lambda y."""
    # state (y_n, filtered y_{n-1}): y_{n+1} = ybar_{n-1} + 2 z y_n and
    # ybar_n = y_n + nu (ybar_{n-1} - 2 y_n + y_{n+1})
    matrix = np.array([[2 * z, 1], [1 - 2 * nu + 2 * nu * z, 2 * nu]], dtype=complex)
    return float(max(abs(np.linalg.eigvals(matrix))))


def adams_bashforth3(z) -> float:
    matrix = np.array([[1 + 23 / 12 * z, -16 / 12 * z, 5 / 12 * z], [1, 0, 0], [0, 1, 0]],
                      dtype=complex)
    return float(max(abs(np.linalg.eigvals(matrix))))


def analysis() -> None:
    print("scheme                 evals/step  imag. limit  limit/eval  stiff damping + advection")
    for name, (e, i) in RUNGE_KUTTA.items():
        limit = imaginary_limit(lambda z: amplification(e, i, z, 0.0))
        test = 0.8 * limit
        worst = max(amplification(e, i, 1j * w, -d) for w in np.linspace(-test, test, 21)
                    for d in np.concatenate(([0.0], np.logspace(-3, 9, 61))))
        print(f"{name:22s} {len(e) - 1:10d}  {limit:11.3f}  {limit / (len(e) - 1):10.3f}  "
              f"max |R| {worst:.3f} ({'stable' if worst <= 1 + 1e-9 else 'UNSTABLE'})")
    for nu in (0.05, 0.1):
        limit = imaginary_limit(lambda z: leapfrog_filtered(z, nu))
        print(f"leapfrog + RA nu={nu:<5g} {1:9d}  {limit:11.3f}  {limit:10.3f}  (two time levels, "
              "first order with the filter)")
    limit = imaginary_limit(adams_bashforth3)
    print(f"{'Adams-Bashforth 3':22s} {1:10d}  {limit:11.3f}  {limit:10.3f}  (three time levels)")


def model_runs(truncation: int) -> None:
    planet = torrid.ModelConfig().replace(numerics={"truncation": truncation})
    runs = {"ars443 C=1.0": {"time_scheme": "ars443"},
            "imex332 C=1.2": {"time_scheme": "imex332"},
            "imex332 C=1.5": {"time_scheme": "imex332", "courant_number": 1.5},
            "reference ars443 C=0.5": {"time_scheme": "ars443", "courant_number": 0.5}}
    integrate(build_model(planet.replace(run={"days": 1.0})), progress=False)  # warm-up
    results = {}
    for label, numerics in runs.items():
        model = build_model(planet.replace(numerics=numerics))
        start = time.perf_counter()
        ds, _ = integrate(model, progress=False)
        results[label] = (time.perf_counter() - start, ds)
    _, ref = results["reference ars443 C=0.5"]
    keys = ("final_hotspot_offset_harmonic", "final_day_night_contrast",
            "final_equatorial_zonal_wind")
    print(f"\nT{truncation}, rest -> steady state, step following the winds:")
    for label, (wall, ds) in results.items():
        a = ds.attrs
        per_day = a["tendency_evaluations"] / a["steady_state_time_days"]
        d = [float(a[k]) - float(ref.attrs[k]) for k in keys]
        print(f"{label:24s} {a['tendency_evaluations']:6d} evaluations ({per_day:.0f} per "
              f"simulated day), {a['steady_state_time_days']:g} days, wall {wall:.1f} s; "
              f"minus reference: offset {d[0]:+.4f} deg, contrast {d[1]:+.5f}, jet "
              f"{100 * d[2] / float(ref.attrs[keys[2]]):+.3f} %")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--truncation", type=int, default=42)
    parser.add_argument("--analysis-only", action="store_true")
    args = parser.parse_args()
    analysis()
    if not args.analysis_only:
        model_runs(args.truncation)


if __name__ == "__main__":
    main()
