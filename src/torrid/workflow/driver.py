"""The run driver: step a model through simulated time, collect output on schedule, summarise."""

from __future__ import annotations

import math
import os
import time
from dataclasses import dataclass, field

import numpy as np
import xarray as xr

from torrid.io.config import SECONDS_PER_DAY, ModelConfig
from torrid.io.runfile import (build_dataset, check_writable, file_options, open_run,
                               write_atomic)
from torrid.io.storage import check_output_path
from torrid.physics.timestepping import courant_number
from torrid.workflow.health import HealthProblem, check_step
from torrid.workflow.limits import check_resources, check_schedule, check_steps
from torrid.workflow.linear_run import run_linear
from torrid.workflow.output import (RunSummary, append_snapshot, output_coordinates,
                                    planet_attrs, relative_change, run_attrs, snapshot,
                                    to_output_grid)
from torrid.workflow.output import budget_note
from torrid.workflow.progress import run_progress
from torrid.workflow.restart import RestartStore
from torrid.workflow.setup import Model, build_model, target_courant_number
from torrid.workflow.steady import SteadyCriterion, is_steady


class RunFailedError(RuntimeError):
    """A run stopped by a failed health check; ``dataset`` holds the output up to then (or,
    for a run with restart data, the run file ``path`` holds it)."""

    def __init__(self, message: str, dataset: xr.Dataset | None, path=None):
        super().__init__(message)
        self.dataset = dataset
        self.path = path


@dataclass
class _Progress:
    """Mutable bookkeeping of a run in progress (all times in seconds unless named days)."""

    state: np.ndarray
    stepper: object
    steps_per_output: int
    outputs_done: int = 0  # output intervals completed
    steps: int = 0
    evaluations: int = 0  # explicit tendency evaluations
    courant_rate_s: float = 0.0  # largest Courant number / dt of the interval so far (s^-1)
    times_days: list = field(default_factory=lambda: [0.0])
    series: dict = field(default_factory=dict)
    dt_changes: list = field(default_factory=list)

    @property
    def dt(self) -> float:
        return self.stepper.dt


#: The automatic step (``numerics.time_step_rule = "follow_winds"``) grows by at most
#: GROWTH_LIMIT per change, and is kept while it is within CHANGE_MARGIN of the target (so
#: small fluctuations of the largest wind do not change it at every output time).
GROWTH_LIMIT = 1.5
CHANGE_MARGIN = 1.1


def _automatic(model: Model) -> bool:
    return model.config.numerics.time_step_s is None


def _shorter_step(model: Model, run: _Progress, courant: float, span_s: float,
                  now_s: float) -> bool:
    """Shorten an automatic step whose Courant number has passed the scheme's courant_limit.

    The new step brings the Courant number back to the target (``numerics.courant_number``)
    and divides ``span_s`` (the rest of the output interval) exactly. Returns True if it changed.
    """
    if not _automatic(model) or courant <= model.scheme.courant_limit:
        return False
    target = run.dt * target_courant_number(model.config) / courant
    steps = max(1, math.ceil(span_s / target - 1e-9))
    run.stepper = model.new_stepper(span_s / steps)
    run.dt_changes.append((now_s / SECONDS_PER_DAY, run.dt))
    return True


def _step_from_winds(model: Model, run: _Progress, interval_s: float) -> float:
    """The step (s) for the next output interval under ``time_step_rule = "follow_winds"``.

    From the largest Courant number per second seen during the interval (the largest wind),
    but at least that of the gravity-wave speed sqrt(Phi_mean): the step giving the target
    Courant number, grown by at most GROWTH_LIMIT, within the processes' limits, dividing the
    output interval. The step is kept while the interval's Courant number stayed within
    CHANGE_MARGIN above the target and the winds allow less than CHANGE_MARGIN more.
    """
    config = model.config
    wave_rate = courant_number(math.sqrt(model.mean_geopotential), 1.0,
                               config.planet.radius_m, config.numerics.truncation)
    target = target_courant_number(config) / max(run.courant_rate_s, wave_rate)
    target = min(target, GROWTH_LIMIT * run.dt, *model.process_limits_s)
    # a step shortened within the interval divides only its rest: it is replaced
    divides = abs(interval_s / run.dt - round(interval_s / run.dt)) < 1e-9
    if divides and target / CHANGE_MARGIN < run.dt <= target * CHANGE_MARGIN and \
            run.dt <= min(model.process_limits_s, default=math.inf):
        return run.dt
    steps = max(1, math.ceil(interval_s / target - 1e-9))
    return interval_s / steps


def _restore(model: Model, store: RestartStore) -> _Progress:
    """Rebuild the run's bookkeeping from its restart data (see :mod:`.restart`): the state,
    the counters and the number series so far (the maps stay in the restart's files)."""
    saved, state, (_, series) = store.read(model.config)
    run = _Progress(state=state,
                    stepper=model.new_stepper(saved["dt"]),
                    steps_per_output=saved["steps_per_output"],
                    outputs_done=saved["outputs_done"], steps=saved["steps"],
                    evaluations=saved.get("evaluations",
                                          saved["steps"] * model.scheme.evaluations),
                    times_days=list(saved["times_days"]),
                    dt_changes=[tuple(c) for c in saved["dt_changes"]])
    run.series.update(series)
    return run


def _counters(run: _Progress) -> dict:
    return {"dt": run.dt, "steps_per_output": run.steps_per_output,
            "outputs_done": run.outputs_done, "steps": run.steps,
            "evaluations": run.evaluations, "times_days": run.times_days,
            "dt_changes": run.dt_changes, "outputs_written": len(run.times_days)}


def _save_restart(model: Model, store: RestartStore, run: _Progress) -> None:
    store.write_state(model.config, _counters(run), run.state)


def _keep(run: _Progress, values: dict, streaming: bool) -> None:
    """Add a snapshot to the series in memory: all of it, or its numbers only when the maps
    are streamed to the restart's files (memory then does not grow with the outputs)."""
    append_snapshot(run.series, {k: v for k, v in values.items()
                                 if not streaming or np.ndim(v) == 0})


def _template(model: Model):
    """A function (time in days, snapshot) -> one-record run dataset (the first record of a
    restart segment)."""
    lat, lon = output_coordinates(model)
    static = {"surface_height": to_output_grid(model.surface_height_m)}

    def template(time_days: float, values: dict) -> xr.Dataset:
        return build_dataset([time_days], lat, lon, {k: [v] for k, v in values.items()},
                             static, {"title": "torrid restart data (output snapshots)"})
    return template


def _advance_interval(model: Model, run: _Progress, interval_s: float,
                      bar) -> tuple[HealthProblem | None, float]:
    """Step ``run`` through its next output interval (health-checking every step, shortening
    an automatic step whose Courant number grows too large). Returns the first problem (or
    None) and the time (s) of the state reached: the interval's end, or the last good step."""
    base_s = run.outputs_done * interval_s
    segment_s, done, steps = base_s, 0, run.steps_per_output  # steps of this segment
    changed = False
    while done < steps:
        time_s = segment_s + done * run.dt
        new_state = run.stepper.step(run.state, time_s)
        run.steps += 1
        run.evaluations += run.stepper.evaluations
        problem, courant = check_step(model, new_state, (time_s + run.dt) / SECONDS_PER_DAY,
                                      run.dt)
        run.courant_rate_s = max(run.courant_rate_s, courant / run.dt)
        if problem is not None:
            return problem, time_s  # run.state is still the last good state
        run.state = new_state
        done += 1
        bar.update(run.dt / SECONDS_PER_DAY)
        now_s = segment_s + done * run.dt
        rest_s = base_s + interval_s - now_s
        if done < steps and _shorter_step(model, run, courant, rest_s, now_s):
            segment_s, done, changed = now_s, 0, True
            steps = round(rest_s / run.dt)
    run.outputs_done += 1
    if _automatic(model) and model.config.numerics.time_step_rule == "follow_winds":
        dt = _step_from_winds(model, run, interval_s)
        if dt != run.dt:
            run.stepper = model.new_stepper(dt)
            run.dt_changes.append((run.outputs_done * interval_s / SECONDS_PER_DAY, dt))
        run.steps_per_output = round(interval_s / run.dt)
    elif changed:  # the step was shortened: the next intervals use it, dividing them exactly
        run.steps_per_output = max(1, math.ceil(interval_s / run.dt - 1e-9))
        run.stepper = model.new_stepper(interval_s / run.steps_per_output)
    run.courant_rate_s = 0.0
    return None, run.outputs_done * interval_s


def integrate(model: Model, progress: bool = True, label: str = "",
              restart: RestartStore | None = None,
              resume: bool = False) -> tuple[xr.Dataset | os.PathLike, RunSummary]:
    """Run ``model`` for the configured days; return the run dataset and its summary (with
    a ``restart`` store: the run file merged in it, see :meth:`RestartStore.merged`).

    The run length is rounded up to a whole number of output intervals. An automatic time step
    is shortened as soon as the winds push the Courant number past the scheme's courant_limit
    (the step then divides the rest of the output interval); with ``numerics.time_step_rule =
    "follow_winds"`` it is set again at each output time from the interval's largest wind
    (:func:`_step_from_winds`), else the shortened step is kept for the following intervals.
    With a ``restart`` store, restart data are written every ``run.restart_interval_days``
    and at the end; ``resume`` continues from them (bit for bit equal to a straight run).
    Raises :class:`RunFailedError` (with the dataset up to the last good state) if a step
    fails its health check (:mod:`torrid.workflow.health`).
    """
    config = model.config
    interval_s = config.run.output_interval_days * SECONDS_PER_DAY
    n_outputs = max(1, math.ceil(config.run.days / config.run.output_interval_days - 1e-9))
    fixed = not _automatic(model)
    check_steps(n_outputs * model.steps_per_output,
                "numerics.time_step_s" if fixed else "numerics.courant_number",
                config.numerics.time_step_s if fixed else config.numerics.courant_number)
    restart_every = max(1, round(config.run.restart_interval_days
                                 / config.run.output_interval_days))
    streaming = restart is not None
    template = _template(model) if streaming else None
    if resume and streaming:
        run = _restore(model, restart)
    else:
        run = _Progress(state=model.initial_state, stepper=model.stepper,
                        steps_per_output=model.steps_per_output)
        first = snapshot(model, run.state, 0.0)
        _keep(run, first, streaming)
        if streaming:
            restart.clear()
            restart.append(0, 0.0, first, template)
    start_days = run.times_days[-1] if resume else 0.0
    criterion = steady_criterion(model)
    stopping = criterion is not None and config.run.stop_at_steady_state
    status, reason = "complete", ""
    bar = run_progress(round(n_outputs * config.run.output_interval_days, 6),
                       round(run.times_days[-1], 6), label or model.label,
                       config.run.output_interval_days, progress)
    start = time.perf_counter()
    problem = None
    while run.outputs_done < n_outputs and problem is None:
        problem, time_s = _advance_interval(model, run, interval_s, bar)
        run.times_days.append(time_s / SECONDS_PER_DAY)
        taken = snapshot(model, run.state, time_s)
        _keep(run, taken, streaming)
        if streaming:  # a failed run's last good state too: its file shows it
            restart.append(len(run.times_days) - 1, run.times_days[-1], taken, template)
            if problem is None and run.outputs_done % restart_every == 0:
                _save_restart(model, restart, run)
        if problem is None and stopping and is_steady(run.times_days, run.series, criterion):
            status, reason = "steady", f"steady state reached at day {run.times_days[-1]:g}"
            break
    if problem is not None:
        status, reason = "failed", problem.message()
    wall = time.perf_counter() - start
    bar.close()
    summary = RunSummary(
        simulated_days=run.times_days[-1], wall_seconds=wall, steps=run.steps,
        start_days=start_days,
        tendency_evaluations=run.evaluations,
        mass_change_relative=relative_change(run.series["mean_thickness"]),
        energy_change_relative=relative_change(run.series["total_energy"]),
    )
    attrs = run_attrs(model, summary)
    attrs.update(run_status=status, run_status_reason=reason or "ran the configured days",
                 time_step_changes="; ".join(f"day {d:g}: {dt:.6g} s" for d, dt in run.dt_changes)
                 or "none")
    if model.is_planet:
        steady_day = run.times_days[-1] if status == "steady" else None
        attrs.update(planet_attrs(model, run.times_days, run.series, criterion,
                                  config.run.stop_at_steady_state, steady_day))
    attrs["summary"] = summary.line(model.label, budget_note(model))
    if streaming:  # the run file is merged from the restart's files, snapshot by snapshot
        attrs = {"Conventions": "CF-1.10", **attrs}
        if problem is not None:
            raise RunFailedError(problem.message(), None,
                                 path=restart.failed(config, attrs))
        return restart.merged(config, _counters(run), run.state, attrs), summary
    lat, lon = output_coordinates(model)
    static = {"surface_height": to_output_grid(model.surface_height_m)}
    ds = build_dataset(run.times_days, lat, lon, run.series, static, attrs)
    if problem is not None:
        raise RunFailedError(problem.message(), ds)
    return ds, summary


def steady_criterion(model: Model) -> SteadyCriterion | None:
    """The steady-state test (and averaging window) of a planet run; None for a case."""
    if not model.is_planet:
        return None
    run = model.config.run
    rotation_days = (2 * math.pi / abs(model.rotation_rate_s) / SECONDS_PER_DAY
                     if model.rotation_rate_s else math.inf)
    cycle = None if model.orbit.is_steady else model.orbit.orbital_period_s / SECONDS_PER_DAY
    return SteadyCriterion.for_run(rotation_days,
                                   model.config.atmosphere.radiative_timescale_days,
                                   run.steady_tolerance, run.steady_window_days, cycle)


def run_config(config: ModelConfig, progress: bool = True, restart: RestartStore | None = None,
               resume: bool = False) -> tuple[xr.Dataset, RunSummary]:
    """Build and integrate the model of ``config`` (see :func:`integrate`); with
    ``numerics.solver = "linear"``, solve its linear steady state instead (no time loop, no
    restart data: :mod:`torrid.workflow.linear_run`)."""
    check_schedule(config)
    if config.numerics.solver == "linear":  # issue 13: the one dispatch on the solver
        return run_linear(config)
    return integrate(build_model(config), progress=progress, restart=restart, resume=resume)


def run_to_file(config: ModelConfig, output: str | os.PathLike, *, overwrite: bool = False,
                progress: bool = False, resume: bool = False) -> xr.Dataset:
    """Run ``config`` into the run file ``output``, with its restart data beside it.

    An existing ``output`` is refused before any work unless ``overwrite``, and so is a second
    run on the same output while one runs (a lock in the restart folder). The snapshots are
    streamed into the restart data, which become the run file (:mod:`.restart`); the one
    latest restart state is kept unless ``run.keep_restart`` is false. A run that fails its
    health checks still writes ``output`` (status failed, the last good state) and then
    raises :class:`RunFailedError`; ``resume`` continues from the restart data.

    Returns the run file opened lazily (maps are read when used).
    """
    check_output_path(output)
    check_writable(output, overwrite)
    check_schedule(config)
    check_resources(config, output)
    store = RestartStore(output)
    with store.lock():
        try:
            result, _ = run_config(config, progress=progress, restart=store, resume=resume)
        except RunFailedError as failure:
            if failure.path is not None:
                store.publish(failure.path, link=False)
            else:
                write_atomic(failure.dataset, output, overwrite=overwrite,
                             **file_options(config))
            raise
        if isinstance(result, xr.Dataset):  # a linear solve: no time loop, no restart data
            write_atomic(result, output, overwrite=overwrite, **file_options(config))
            store.remove()
            return result
        store.publish(result, link=config.run.keep_restart)
        if not config.run.keep_restart:
            store.remove()
    return open_run(output)

