"""``torrid demo``: the whole chain on a small invented scenario, in a few minutes.

A 4 x 4 sweep of radiative x drag timescale for an invented hot gas giant at T21 (to steady
state), the sweep table with maps, its plots, the phase curves of every point, an invented
"observation" made from one grid point plus Gaussian noise (stated as invented in the file),
and the fit of that observation with the sweep. Everything goes into one folder.
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np

#: The demo's sweep file (written into the demo folder, so it doubles as an example).
DEMO_SWEEP = """\
# torrid demo: an invented hot gas giant (the built-in default planet) at low resolution,
# swept over radiative and drag timescales. Everything here is invented.
[numerics]
truncation = 21

[run]
days = 160.0                  # upper bound; every point stops at its steady state
output_interval_days = 1.0

[sweep]
name = "demo"

[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
log_range = [0.1, 10.0, 4]

[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
log_range = [0.1, 100.0, 4]
"""
#: The grid point (indices along tau_rad, tau_drag) the invented observation is made from,
#: its number of phase samples and its noise (ppm, 1 sigma).
TRUTH_INDEX = (1, 2)
OBSERVATION_POINTS = 60
OBSERVATION_NOISE_PPM = 15.0


def _say(message: str) -> None:
    print(message, flush=True)


def run_demo(folder: str | Path = "runs/demo", workers: int | None = None,
             overwrite: bool = False, sweep_text: str = DEMO_SWEEP,
             progress: bool = True) -> dict[str, Path]:
    """Run the demo into ``folder``; return the files written, by role.

    The sweep itself is resumable (finished points are kept); the derived files (table,
    plots, phase curves, observation, fit) are refused if present unless ``overwrite``.
    """
    from torrid.interface.fit_plot import plot_fit
    from torrid.interface.phase_plot import plot_phase_curve_family
    from torrid.interface.sweep_plots import plot_sweep_file
    from torrid.io.observed import write_observed_csv
    from torrid.io.phasefile import write_phase_netcdf
    from torrid.io.sweepfile import load_sweep
    from torrid.workflow.fit import fit_table, synthetic_observation
    from torrid.workflow.phase import phase_curve
    from torrid.workflow.sweep import run_sweep

    folder = Path(folder)
    files = {name: folder / f"demo-{name}" for name in
             ("phase.nc", "phase.png", "observation.csv", "fit.nc", "fit.png")}
    files = {k.replace(".", "_"): v for k, v in files.items()}
    for path in files.values():
        if path.exists() and not overwrite:
            raise FileExistsError(f"{path} exists: the demo has run here before; pass "
                                  "--overwrite to redo its outputs (finished runs are kept)")
    folder.mkdir(parents=True, exist_ok=True)
    sweep_file = folder / "demo-sweep.toml"
    sweep_file.write_text(sweep_text)
    start = time.perf_counter()
    spec = load_sweep(sweep_file, folder=folder)
    _say(f"[1/5] sweep: {int(np.prod(spec.shape))} points of an invented hot gas giant at T21 "
         f"-> {folder}")
    outcome = run_sweep(spec, workers=workers, maps=True, progress=progress)
    files["table"] = outcome.table_path
    _say(f"      {outcome.counts}")
    _say("[2/5] plots of the sweep table")
    files["table_plots"] = plot_sweep_file(outcome.table_path, overwrite=True)
    import xarray as xr

    with xr.open_dataset(outcome.table_path) as ds:
        table = ds.load()
    _say("[3/5] phase curves of every grid point")
    curves = phase_curve(table, source=str(outcome.table_path))
    write_phase_netcdf(curves, files["phase_nc"], overwrite=overwrite)
    plot_phase_curve_family(curves, files["phase_png"], overwrite=overwrite)
    dims = [d for d in curves["flux_ratio"].dims if d != "phase"]
    truth = {d: min(i, curves.sizes[d] - 1) for d, i in zip(dims, TRUTH_INDEX)}
    truth_values = {d: float(curves[d].values[i]) for d, i in truth.items()}
    _say("[4/5] an INVENTED observation: grid point " + ", ".join(
        f"{d} = {v:g}" for d, v in truth_values.items())
         + f", {OBSERVATION_POINTS} phases, {OBSERVATION_NOISE_PPM:g} ppm noise")
    observed = synthetic_observation(curves["flux_ratio"].isel(truth), OBSERVATION_POINTS,
                                     OBSERVATION_NOISE_PPM, seed=2026,
                                     source="invented observation (torrid demo)")
    if files["observation_csv"].exists():
        files["observation_csv"].unlink()
    write_observed_csv(observed, files["observation_csv"])
    _say("[5/5] fit of the invented observation with the sweep")
    fit = fit_table(files["observation_csv"], outcome.table_path, None,
                    output=files["fit_nc"], overwrite=overwrite)
    plot_fit(fit, files["fit_png"], overwrite=overwrite)
    best = {d: fit.attrs[f"best_{d}"] for d in dims}
    recovered = all(np.isclose(best[d], truth_values[d]) for d in dims)
    _say("      best grid point " + ", ".join(f"{d} = {v:g}" for d, v in best.items())
         + (" (the point the observation was made from)" if recovered
            else " (NOT the point the observation was made from)"))
    _say(f"done in {time.perf_counter() - start:.0f} s; files in {folder}")
    files["recovered"] = recovered
    return files
