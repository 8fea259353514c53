"""``torrid demo``: the whole chain on a small invented scenario, in a few minutes.

A 4 x 4 sweep of radiative x drag timescale for an invented hot gas giant at T21 (to steady
state), the sweep table with maps, its plots, the phase curves of every point, an invented
"observation" in two invented bands made from one grid point (with temperature end points 10 %
away from the assumed ones) plus Gaussian noise (stated as invented in the files), and the
joint fit of both curves with the sweep, with free end points and a posterior sample whose
summary is printed. Everything goes into one folder.
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
#: The two invented bands (micron) and the factors of the true end points over the assumed ones.
DEMO_BANDS = ((3.0, 4.0), (4.0, 5.0))
TRUE_END_POINT_FACTORS = (0.9, 1.1)
#: Posterior steps per walker (32 walkers): enough for 50 autocorrelation times here.
POSTERIOR_STEPS = 5000


def truth_index(sizes) -> tuple[int, ...]:
    """The grid point the observation is made from: :data:`TRUTH_INDEX`, kept off the edges of
    axes with three or more points (a point on the edge is warned about by the fit)."""
    return tuple(min(i, n - 2) if n >= 3 else min(i, n - 1) for i, n in zip(TRUTH_INDEX, sizes))


OBSERVATION_TOML = """\
# torrid demo: an INVENTED observation of an invented hot gas giant in two invented bands.
[posterior]
walkers = 32
burn_in = 0.25
seed = 2026

[[curve]]
file = "demo-observation-{0}.csv"
band = "{0}"

[[curve]]
file = "demo-observation-{1}.csv"
band = "{1}"
"""


def _say(message: str) -> None:
    print(message, flush=True)


def run_demo(folder: str | Path = "runs/demo", workers: int | None = None,
             overwrite: bool = False, sweep_text: str = DEMO_SWEEP,
             progress: bool = True, posterior_steps: int = POSTERIOR_STEPS) -> dict[str, Path]:
    """Run the demo into ``folder``; return the files written, by role.

    The sweep itself is resumable (finished points are kept); the derived files (table,
    plots, phase curves, observation, fit) are refused if present unless ``overwrite``.
    """
    from torrid.interface.fit_plot import plot_fit, plot_posterior
    from torrid.interface.phase_plot import plot_phase_curve_family
    from torrid.interface.sweep_plots import plot_sweep_file
    from torrid.io.observed import ObservedCurve, write_observed_csv
    from torrid.io.observer import ObserverSettings
    from torrid.io.phasefile import write_phase_netcdf
    from torrid.io.sweepfile import load_sweep
    from torrid.workflow.fit_model import curve_models
    from torrid.workflow.joint_fit import fit_observation
    from torrid.workflow.phase import end_temperatures, phase_curve
    from torrid.workflow.sweep import run_sweep

    folder = Path(folder)
    bands = [f"{lo:g}-{hi:g}" for lo, hi in DEMO_BANDS]
    files = {name: folder / f"demo-{name}" for name in
             ("phase.nc", "phase.png", "observation.toml", "fit.nc", "fit.png",
              "fit-posterior.png", *(f"observation-{b}.csv" for b in bands))}
    files = {k.replace(".", "_").replace("-", "_"): v for k, v in files.items()}
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
    truth = dict(zip(dims, truth_index([curves.sizes[d] for d in dims])))
    truth_values = {d: float(curves[d].values[i]) for d, i in truth.items()}
    settings = ObserverSettings()
    assumed = end_temperatures(settings)[:2]
    true_ends = [f * t for f, t in zip(TRUE_END_POINT_FACTORS, assumed)]
    _say("[4/5] an INVENTED observation in two invented bands (" + ", ".join(bands)
         + " micron): grid point " + ", ".join(f"{d} = {v:g}" for d, v in truth_values.items())
         + f", end points {true_ends[0]:.0f} K and {true_ends[1]:.0f} K (assumed "
         f"{assumed[0]:.0f} K and {assumed[1]:.0f} K), {OBSERVATION_POINTS} phases, "
         f"{OBSERVATION_NOISE_PPM:g} ppm noise")
    rng = np.random.default_rng(2026)
    phases = (np.arange(OBSERVATION_POINTS) + 0.5) / OBSERVATION_POINTS
    flat = int(np.ravel_multi_index(tuple(truth[d] for d in dims),
                                    [curves.sizes[d] for d in dims]))
    for band, text in zip(DEMO_BANDS, bands):
        band_settings = settings.replace(band=band)
        blank = ObservedCurve(phases, np.zeros(phases.size), np.ones(phases.size))
        model = curve_models(table, dims, [(blank, band_settings, 0.0, text)], settings)[0][0]
        flux = model.flux(flat, *true_ends)
        observed = ObservedCurve(phases, flux + rng.normal(0, OBSERVATION_NOISE_PPM, flux.size),
                                 np.full(flux.size, OBSERVATION_NOISE_PPM),
                                 source=f"invented observation in {text} micron (torrid demo)")
        path = files[f"observation_{text}_csv".replace(".", "_").replace("-", "_")]
        if path.exists():
            path.unlink()
        write_observed_csv(observed, path)
    files["observation_toml"].write_text(OBSERVATION_TOML.format(*bands))
    _say("[5/5] joint fit of both bands with the sweep, end points free, posterior sample")
    fit, posterior = fit_observation(files["observation_toml"], outcome.table_path,
                                     temperatures="free", posterior_steps=posterior_steps,
                                     output=files["fit_nc"], overwrite=overwrite,
                                     progress=progress)
    plot_fit(fit, files["fit_png"], overwrite=overwrite)
    plot_posterior(posterior, files["fit_posterior_png"], overwrite=overwrite)
    best = {d: fit.attrs[f"best_{d}"] for d in dims}
    recovered = all(np.isclose(best[d], truth_values[d]) for d in dims)
    _say("      best grid point " + ", ".join(f"{d} = {v:g}" for d, v in best.items())
         + (" (the point the observation was made from)" if recovered
            else " (NOT the point the observation was made from)")
         + f"; fitted end points {fit.attrs['best_night_temperature_K']:.0f} K and "
         f"{fit.attrs['best_day_temperature_K']:.0f} K")
    for line in posterior.summary():
        _say(f"      posterior: {line}")
    _say(f"done in {time.perf_counter() - start:.0f} s; files in {folder}")
    files["recovered"] = recovered
    return files
