"""A linear run (``numerics.solver = "linear"``): the direct steady solution as a run dataset.

The dataset is an ordinary run file (the same variables, diagnostics and attributes as a
time-stepped run) with one snapshot, at time 0, holding the steady state of the problem
linearised about rest (:mod:`torrid.workflow.linear_state`). ``run_status`` is ``linear``;
``steady_state_reached`` is 1 (the state is steady by construction) and
``steady_state_time_days`` NaN (no time was simulated); the ``final_<name>`` values are the
diagnostics of that state. So ``torrid phase``, ``plot``, ``collect`` and ``fit`` read it as
they read any finished run.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

import xarray as xr

from torrid.io.config import ModelConfig
from torrid.io.pointfile import LINEAR
from torrid.io.runfile import build_dataset
from torrid.workflow.linear_state import LinearSolution, solve_linear
from torrid.workflow.output import (RunSummary, append_snapshot, output_coordinates,
                                    planet_attrs, run_attrs, snapshot, to_output_grid)
from torrid.workflow.setup import Model, build_model
from torrid.workflow.steady import SteadyCriterion

KEY = "numerics.solver"

#: What the linear problem keeps and drops (a run-file attribute).
LINEAR_PROBLEM = ("the shallow-water equations linearised about rest: Coriolis terms, gravity "
                  "waves and the processes' implicit rates (relaxation, uniform drag, "
                  "hyperdiffusion), forced by the relaxation's source; advection and the "
                  "mass-exchange momentum term (products of two perturbations) dropped")


def model_solution(model: Model, key: str = KEY) -> LinearSolution:
    """The linear steady state of a built model (refusals: :mod:`.linear_state`)."""
    return solve_linear(model.config, key, model.transforms, model.processes, model.dynamics,
                        model.linear, model.rotation_rate_s, model.orbit)


def _summary(wall_s: float) -> RunSummary:
    return RunSummary(simulated_days=0.0, wall_seconds=wall_s, steps=0,
                      mass_change_relative=0.0, energy_change_relative=0.0)


def linear_attrs(model: Model, solution: LinearSolution, solve_s: float,
                 wall_s: float) -> dict:
    """The run-file attributes of a linear run (those of a time-stepped run, adapted)."""
    attrs = run_attrs(model, _summary(wall_s))
    attrs.pop("time_step_s", None)
    blocks = model.grid.truncation + 1
    attrs.update(
        time_scheme=("none: steady state solved directly, one banded system per zonal "
                     f"wavenumber ({blocks} systems, LAPACK zgbsv through scipy)"),
        linear_problem=LINEAR_PROBLEM,
        linear_residual=solution.residual,
        linear_solve_s=round(solve_s, 6),
        run_status=LINEAR,
        run_status_reason="linear steady state, solved directly (numerics.solver = linear)",
        time_step_changes="none",
        summary=(f"{model.label}: linear steady state ({blocks} banded systems) in "
                 f"{1e3 * solve_s:.1f} ms, {wall_s:.2f} s with set-up; residual "
                 f"{solution.residual:.1e}"),
    )
    return attrs


@dataclass(frozen=True, eq=False)
class LinearRun:
    """A solved linear run before it becomes a dataset: its model, solution, the one
    snapshot (as the series of a run, one entry each) and the run-file attributes."""

    model: Model
    solution: LinearSolution
    series: dict
    attrs: dict
    summary: RunSummary


def solve_run(config: ModelConfig) -> LinearRun:
    """Build the model of ``config``, solve its linear steady state and diagnose it."""
    start = time.perf_counter()
    model = build_model(config)
    solve_start = time.perf_counter()
    solution = model_solution(model)
    solve_s = time.perf_counter() - solve_start
    series: dict = {}
    append_snapshot(series, snapshot(model, solution.state, 0.0))
    wall_s = time.perf_counter() - start
    attrs = linear_attrs(model, solution, solve_s, wall_s)
    criterion = SteadyCriterion(window_days=math.inf,  # final values: the one snapshot
                                tolerance=config.run.steady_tolerance)
    steady = planet_attrs(model, [0.0], series, criterion, True, 0.0)
    steady.update(steady_state_time_days=float("nan"),
                  steady_state_criterion="none: the state is steady by construction",
                  final_values="the diagnostics of the steady state (numerics.solver = linear)")
    attrs.update(steady)
    return LinearRun(model, solution, series, attrs, _summary(wall_s))


def run_linear(config: ModelConfig) -> tuple[xr.Dataset, RunSummary]:
    """Solve the linear steady state of ``config`` into a run dataset (module docstring)."""
    run = solve_run(config)
    lat, lon = output_coordinates(run.model)
    static = {"surface_height": to_output_grid(run.model.surface_height_m)}
    return build_dataset([0.0], lat, lon, run.series, static, run.attrs), run.summary


def solve_point(config: ModelConfig, maps: bool = False) -> tuple[dict, dict | None]:
    """A linear sweep point without a run file: the attributes its run file would have and,
    with ``maps``, its output-grid ``lat``, ``lon`` and maps ``h``, ``u``, ``v`` (what
    :mod:`torrid.workflow.collect` takes from a point's file)."""
    run = solve_run(config)
    if not maps:
        return run.attrs, None
    lat, lon = output_coordinates(run.model)
    return run.attrs, {"lat": lat, "lon": lon,
                       **{name: run.series[name][-1] for name in ("h", "u", "v")}}
