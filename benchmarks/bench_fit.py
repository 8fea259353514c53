"""Joint fits: wall time of a two-band fit with profiled end points on a 6 x 6 grid, and of a
posterior sample of at least 5000 accepted steps.

An invented 6 x 6 sweep table of analytic T21 maps (tests/fit_family.py; no model run), two
top-hat bands (3-4 and 4-5 micron), 60 phases each with 30 ppm noise, made off the grid with end
points other than the assumed ones. The fit time covers the node kernels, the profiled end
points at the 36 points, the fixed-end-point map and the interpolated estimate; the posterior
time covers the emcee run (32 walkers, steps chosen so that acceptance x walkers x steps >=
5000) and its summary. One thread; each case repeated (``--repeats``), medians quoted, target
under 60 s each.

    OMP_NUM_THREADS=1 python benchmarks/bench_fit.py
    OMP_NUM_THREADS=1 python benchmarks/bench_fit.py --repeats 5 --steps 3000
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import sys
import time
import warnings
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from fit_family import family_table  # noqa: E402
from torrid.io.observation import MeasuredCurve, Observation, SamplerSettings  # noqa: E402
from torrid.io.observed import ObservedCurve  # noqa: E402
from torrid.io.observer import ObserverSettings  # noqa: E402
from torrid.meta import TorridWarning  # noqa: E402
from torrid.workflow.fit_model import curve_models  # noqa: E402
from torrid.workflow.joint_fit import joint_fit, smooth_model  # noqa: E402
from torrid.workflow.posterior import sample  # noqa: E402

DIMS = ["radiative_timescale_days", "drag_timescale_days"]


def observation(seed: int = 1) -> Observation:
    settings = ObserverSettings(night_temperature=1000.0, day_temperature=2000.0)
    truth = family_table([0.7], [3.0])
    phases = (np.arange(60) + 0.5) / 60
    rng = np.random.default_rng(seed)
    curves = []
    for band in ((3.0, 4.0), (4.0, 5.0)):
        s = settings.replace(band=band)
        dummy = ObservedCurve(phases, np.zeros(60), np.ones(60))
        flux = curve_models(truth, DIMS, [(dummy, s, 0.0, "truth")], s)[0][0].flux(0, 900.0,
                                                                                  2200.0)
        curves.append(MeasuredCurve(ObservedCurve(phases, flux + rng.normal(0, 30, 60),
                                                  np.full(60, 30.0)), s))
    return Observation(curves=tuple(curves), settings=settings,
                       night_temperature_bounds=(500.0, 1600.0),
                       day_temperature_bounds=(1200.0, 3200.0),
                       sampler=SamplerSettings(walkers=32, burn_in=0.25, seed=seed))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--steps", type=int, default=2000, help="steps per walker")
    args = parser.parse_args()
    warnings.simplefilter("ignore", TorridWarning)
    table = family_table(np.logspace(-1, 1, 6), np.logspace(-1, 2, 6))
    obs = observation()
    fit_times, post_times, accepted = [], [], []
    for _ in range(args.repeats):
        start = time.perf_counter()
        fit, context = joint_fit(table, obs, "free")
        fit_times.append(time.perf_counter() - start)
        model = smooth_model(table, context)
        theta = np.array([model.axes[0].index(fit.attrs["estimate_radiative_timescale_days"]),
                          model.axes[1].index(fit.attrs["estimate_drag_timescale_days"]),
                          fit.attrs["estimate_night_temperature_K"],
                          fit.attrs["estimate_day_temperature_K"]])
        start = time.perf_counter()
        posterior = sample(model, theta, args.steps, obs.sampler, progress=False)
        post_times.append(time.perf_counter() - start)
        accepted.append(posterior.accepted_steps)
    result = {
        "threads": os.environ.get("OMP_NUM_THREADS", "unset"),
        "joint_two_band_profiled_fit_6x6_s": statistics.median(fit_times),
        "posterior_s": statistics.median(post_times),
        "posterior_accepted_steps": int(statistics.median(accepted)),
        "posterior_walkers_x_steps": f"{posterior.walkers} x {args.steps}",
        "repeats": args.repeats,
        "fit_times_s": [round(t, 3) for t in fit_times],
        "posterior_times_s": [round(t, 3) for t in post_times],
        "posterior_summary": posterior.summary(),
    }
    print(json.dumps(result, indent=1))


if __name__ == "__main__":
    main()
