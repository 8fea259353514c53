"""The Python API, mirroring the command line.

>>> import torrid
>>> planet = torrid.ModelConfig()                         # the built-in default planet
>>> dragged = planet.with_override("atmosphere.drag_timescale_days=1")
>>> ds = torrid.run(dragged)                              # doctest: +SKIP
>>> config = torrid.build_case_config("williamson6", truncation=42, days=14)
>>> ds = torrid.run(config, output="runs/w6.nc")          # doctest: +SKIP
"""

from __future__ import annotations

import os

import xarray as xr

from torrid.io.config import ConfigError, ModelConfig
from torrid.io.tomlfile import load_config
from torrid.physics.cases import CASES
from torrid.io.observer import ObserverSettings
from torrid.workflow.phase import phase_curve
from torrid.workflow.driver import run_config, run_to_file
from torrid.workflow.sanity import warn_implausible

__all__ = ["build_case_config", "run", "load_config", "ModelConfig", "phase_curve",
           "ObserverSettings", "sweep", "fit"]


def build_case_config(case: str = "williamson6", *, truncation: int | None = None,
                      days: float | None = None, output_interval_days: float | None = None,
                      alpha_rad: float | None = None, hyperdiffusion_days: float | None = None,
                      hyperdiffusion_order: int | None = None, time_step_s: float | None = None,
                      courant_number: float | None = None,
                      threads: int | None = None) -> ModelConfig:
    """Validated configuration of a built-in standard case.

    Every argument left at ``None`` takes the case's default, or else the settings table's
    (``torrid settings``).

    Parameters
    ----------
    case : str
        ``williamson2``, ``williamson5``, ``williamson6``, ``galewsky`` or
        ``galewsky-unperturbed``.
    truncation : int, optional
        Triangular truncation N.
    days, output_interval_days : float, optional
        Run length and output interval (days).
    alpha_rad : float, optional
        Williamson case 2 only: tilt of the flow's axis (rad).
    hyperdiffusion_days, hyperdiffusion_order : optional
        E-folding time (days) at the truncation scale and p of del^(2p) (``math.inf``
        switches it off).
    time_step_s : float, optional
        Fixed time step (s); automatic from ``courant_number`` if omitted.
    courant_number : float, optional
        Advective Courant number of the automatic step.
    threads : int, optional
        Transform threads.
    """
    given = {
        "case": {"name": case, "alpha_rad": alpha_rad},
        "numerics": {"truncation": truncation, "hyperdiffusion_days": hyperdiffusion_days,
                     "hyperdiffusion_order": hyperdiffusion_order, "time_step_s": time_step_s,
                     "courant_number": courant_number, "threads": threads},
        "run": {"days": days, "output_interval_days": output_interval_days},
    }
    data = {section: {k: v for k, v in keys.items() if v is not None}
            for section, keys in given.items()}
    if case not in CASES:
        raise ConfigError(f"case = {case!r}: must be one of {', '.join(CASES)}")
    return ModelConfig.from_dict(data)


def run(config: ModelConfig, output: str | os.PathLike | None = None, *,
        overwrite: bool = False, progress: bool = False, resume: bool = False) -> xr.Dataset:
    """Run ``config`` and return its run dataset; also write it to ``output`` if given.

    An existing ``output`` is refused (before any work) unless ``overwrite``. A run that
    fails its health checks raises :class:`torrid.workflow.driver.RunFailedError` after
    writing ``output`` with ``run_status = "failed"`` and the last good state.

    A timescale longer than the run or than 1000 days (a likely unit slip) is warned about
    (:mod:`torrid.workflow.sanity`); the run goes ahead.

    With ``output``, restart data are kept beside it (``.NAME.nc.restart/``, see
    :mod:`torrid.workflow.restart`); ``resume=True`` continues an interrupted run from them.
    """
    warn_implausible(config)
    if output is not None:
        return run_to_file(config, output, overwrite=overwrite, progress=progress,
                           resume=resume)
    if resume:
        raise ConfigError("resume: needs the run file name (output) to find its restart data")
    ds, _ = run_config(config, progress=progress)
    return ds


def sweep(sweep_file: str | os.PathLike, *, workers: int | None = None,
          scheduler: str | None = None, folder: str | os.PathLike | None = None,
          maps: bool = False, progress: bool = False, yes: bool = False) -> xr.Dataset:
    """Run a sweep file (resuming if it ran before) and return its sweep table.

    Parameters
    ----------
    sweep_file : path
        A sweep TOML file (see the README, "Sweeps").
    workers, scheduler : optional
        Local worker processes (default: all cores), or a dask.distributed scheduler address.
    folder : path, optional
        Instead of the file's ``[sweep] folder``.
    maps : bool
        Put the final h, u, v maps into the table (needed for phase curves and fits).
    yes : bool
        Run a sweep of more than 1000 points (refused otherwise).
    """
    from torrid.io.sweepfile import load_sweep
    from torrid.workflow.sweep import run_sweep

    outcome = run_sweep(load_sweep(sweep_file, folder=folder), workers=workers,
                        scheduler=scheduler, maps=maps, progress=progress, yes=yes)
    with xr.open_dataset(outcome.table_path) as ds:
        return ds.load()


def fit(observed_csv: str | os.PathLike, table_path: str | os.PathLike,
        settings: ObserverSettings | None = None, *, temperatures: str = "fixed",
        posterior: int | None = None, progress: bool = True, **comparison) -> xr.Dataset:
    """Fit a measured phase curve (CSV: phase, flux ratio ppm, error ppm) or the curves of an
    observation file (TOML, :mod:`torrid.io.observation`) with a sweep table that has maps.

    ``temperatures``: ``fixed``, ``free`` or ``shape``; ``posterior``: emcee steps per walker
    (summary in the returned attributes); ``comparison`` (one CSV, fixed end points):
    offset_deg, offset_error_deg, amplitude_ppm, amplitude_error_ppm (see
    :func:`torrid.workflow.fit.fit_sweep`)."""
    from pathlib import Path

    from torrid.workflow.fit import fit_table

    joint = Path(observed_csv).suffix.lower() == ".toml" or temperatures != "fixed" or posterior
    if not joint:
        return fit_table(observed_csv, table_path, settings, **comparison)
    from torrid.io.observation import MeasuredCurve, Observation
    from torrid.io.observed import read_observed_csv
    from torrid.workflow.joint_fit import fit_observation

    observation = observed_csv
    if Path(observed_csv).suffix.lower() != ".toml":
        settings = settings or ObserverSettings()
        observation = Observation(curves=(MeasuredCurve(read_observed_csv(observed_csv),
                                                        settings),), settings=settings,
                                  source=str(observed_csv))
    return fit_observation(observation, table_path, temperatures=temperatures,
                           posterior_steps=posterior, progress=progress)[0]
