"""What a run writes: output snapshots, the run summary and the run file's attributes."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from torrid.io.provenance import provenance_attrs
from torrid.physics.curvefeatures import unwrap_degrees, wrap_degrees
from torrid.physics.diagnostic_metadata import Diagnostic
from torrid.physics.fields import grid_state
from torrid.physics.invariants import CORE_DIAGNOSTICS, core_diagnostics
from torrid.physics.processes import Snapshot
from torrid.workflow.setup import Model
from torrid.workflow.steady import SteadyCriterion, window_means


@dataclass(frozen=True)
class RunSummary:
    """What the end-of-run line reports."""

    simulated_days: float
    wall_seconds: float
    steps: int
    mass_change_relative: float
    energy_change_relative: float
    start_days: float = 0.0  # where a resumed run continued (0 for a run from the start)
    tendency_evaluations: int = 0  # explicit tendency evaluations of the time scheme

    @property
    def days_per_second(self) -> float:
        """Simulated days per wall-clock second, of the days run in this session."""
        days = self.simulated_days - self.start_days
        return days / self.wall_seconds if self.wall_seconds > 0 else math.inf

    def line(self, label: str, budget: str = "relative") -> str:
        """One-line human summary; ``budget`` says what the mass and energy changes include
        (:func:`budget_note`). A resumed run reports the days run now and their speed."""
        now = self.simulated_days - self.start_days
        if self.start_days and now <= 0:
            timing = f"nothing left to run (resumed at day {self.start_days:g})"
        elif self.start_days:
            timing = (f"resumed at day {self.start_days:g}: {now:g} days in "
                      f"{self.wall_seconds:.1f} s ({self.days_per_second:.3g} simulated days/s)")
        else:
            timing = f"{self.wall_seconds:.1f} s ({self.days_per_second:.3g} simulated days/s)"
        return (f"{label}: {self.simulated_days:g} days in {self.steps} steps, {timing}; "
                f"mass change {self.mass_change_relative:+.2e}, "
                f"energy change {self.energy_change_relative:+.2e} ({budget})")


def budget_note(model: Model) -> str:
    """What the relative mass and energy changes of a run include, in a few words: a forced
    run gains and loses mass through the relaxation (the thickness source), so its changes
    are the forcing's, not a conservation error."""
    names = [p.name.replace("_", " ") for p in model.processes]
    if model.is_planet:
        return ("relative to day 0, including what the forcing adds: the relaxation adds "
                "and removes mass, it and the damping change the energy")
    if names:
        return (f"relative to day 0; no forcing, so the mass is conserved to round-off; the "
                f"energy includes what {' and '.join(names)} removes")
    return "relative to day 0; no forcing or damping: both conserved to round-off"


def to_output_grid(field: np.ndarray) -> np.ndarray:
    """Model grid (north to south, lon from 0) -> output (south to north, lon from -180)."""
    return np.roll(field[::-1], field.shape[-1] // 2, axis=-1)


def output_coordinates(model: Model) -> tuple[np.ndarray, np.ndarray]:
    """Output latitudes (ascending, degrees_north) and longitudes ([-180, 180), degrees_east)."""
    lat = np.degrees(model.grid.latitude[::-1])
    lon = np.degrees(model.grid.longitude)
    lon = np.roll(np.where(lon >= 180, lon - 360, lon), model.grid.nlon // 2)
    return lat, lon


def snapshot(model: Model, state: np.ndarray, time_s: float = 0.0) -> dict[str, np.ndarray | float]:
    """Output fields (output-grid orientation) and diagnostics of one state at ``time_s`` (s):
    the core diagnostics of every run, then those of each process."""
    fields = grid_state(model.transforms, state)
    g = model.gravity_m_s2
    thickness = (fields["geopotential_deviation"] + model.mean_geopotential) / g
    out = {
        "h": thickness + model.surface_height_m,
        "u": fields["u"], "v": fields["v"],
        "vorticity": fields["vorticity"], "divergence": fields["divergence"],
    }
    out = {k: to_output_grid(v) for k, v in out.items()}
    out.update(core_diagnostics(model.grid, thickness, fields["u"], fields["v"],
                                fields["vorticity"], model.dynamics.coriolis,
                                model.surface_height_m, g))
    taken = Snapshot(time_s=time_s, state=state, u=fields["u"], v=fields["v"],
                     vorticity=fields["vorticity"], divergence=fields["divergence"],
                     geopotential=fields["geopotential_deviation"])
    for process in model.processes:
        out.update(process.diagnostics(taken))
    return out


def diagnostic_metadata(model: Model) -> dict[str, Diagnostic]:
    """Name -> metadata of every diagnostic the run writes (core first, then its processes)."""
    out = dict(CORE_DIAGNOSTICS)
    for process in model.processes:
        out.update(type(process).diagnostic_variables)
    return out


def final_value(times_days, values, window_days: float, angle: bool = False) -> float:
    """Time mean of a diagnostic over the trailing window (its last value if the run is
    shorter than the window). Angles (degrees) are unwrapped first. Undefined (NaN) samples
    are left out of the mean; with fewer than two defined samples in the window it is NaN."""
    values = unwrap_degrees(values) if angle else np.asarray(values, float)
    times = np.asarray(times_days, float)
    end = times[-1]
    if end - times[0] < window_days:
        mean = values[-1]
    else:
        keep = np.isfinite(values)
        if keep.all():
            mean = window_means(times, values, end - window_days, end)
        elif np.count_nonzero(keep & (times >= end - window_days - 1e-9)) >= 2:
            mean = window_means(times[keep], values[keep], end - window_days, end)
        else:
            mean = float("nan")
    return float(wrap_degrees(mean)) if angle else float(mean)


def averaging_window(times_days, window_days: float) -> tuple[float, float]:
    """(length, end) in days of the window the final values are means over: the trailing
    steady-state window, or length 0 (the last output) if the run is shorter than it."""
    start, end = float(times_days[0]), float(times_days[-1])
    return (float(window_days) if end - start >= window_days else 0.0), end


def planet_attrs(model: Model, times_days: list, series: dict, criterion: SteadyCriterion,
                 stopping: bool, steady_day: float | None) -> dict:
    """Steady-state record and final diagnostics (means over the criterion's window)."""
    window = criterion.window_days
    out = {
        "steady_state_reached": int(steady_day is not None),
        "steady_state_time_days": steady_day if steady_day is not None else float("nan"),
        "steady_state_criterion": ("none (run.stop_at_steady_state = false)" if not stopping
                                   else f"window {criterion.window_days:g} days, tolerance "
                                        f"{criterion.tolerance:g}"
                                        + ("" if model.orbit.is_steady
                                           else ", whole orbits (orbit-to-orbit repeat)")),
    }
    length, end = averaging_window(times_days, window)
    out["averaging_window_days"], out["averaging_end_days"] = length, end
    out["final_values"] = (f"time means over days {end - length:g}-{end:g} (the last "
                           f"{length:g} days: the steady-state window, whole orbits on "
                           "eccentric orbits)" if length else
                           f"the last output (day {end:g}): the run is shorter than the "
                           f"steady-state window of {window:g} days")
    finals = {}
    for name, meta in diagnostic_metadata(model).items():
        if meta.final and name in series:
            finals[name] = final_value(times_days, series[name], window, angle=meta.angle)
    out.update({f"final_{name}": value for name, value in finals.items()})
    for process in model.processes:
        out.update(process.final_attrs(finals))
    return out


def append_snapshot(series: dict[str, list], values: dict) -> None:
    for key, value in values.items():
        series.setdefault(key, []).append(value)


def relative_change(values: list[float]) -> float:
    return float((values[-1] - values[0]) / abs(values[0])) if values[0] else float("nan")


def run_attrs(model: Model, summary: RunSummary) -> dict:
    grid, case = model.grid, model.case
    references = "; ".join(dict.fromkeys(type(p).reference for p in model.processes
                                         if type(p).reference))
    if model.is_planet:
        described = {"title": "torrid run: forced hot gas giant", "case": "planet",
                     "references": references}
    else:
        described = {"title": f"torrid run: {case.title}", "case": case.name,
                     "references": case.reference}
    out = {
        **described,
        **provenance_attrs(model.config.to_dict()),
        "truncation": f"T{grid.truncation}",
        "grid": f"Gauss-Legendre, {grid.nlat} latitudes x {grid.nlon} longitudes",
        "time_step_s": model.dt,
        "time_scheme": f"{model.scheme.title} ({model.scheme.name}), gravity waves and "
                       "damping implicit",
        "time_step_rule": (model.config.numerics.time_step_rule
                           if model.config.numerics.time_step_s is None else "given"),
        "processes": ", ".join(p.name for p in model.processes) or "none",
    }
    for process in model.processes:
        out.update(process.attrs())
    out.update({
        "mean_geopotential_m2_s2": model.mean_geopotential,
        "gravity_m_s2": model.gravity_m_s2,
        "radius_m": model.config.planet.radius_m,
        "rotation_rate_s": model.rotation_rate_s,
        "steps": summary.steps,
        "tendency_evaluations": int(summary.tendency_evaluations),
        "wall_time_s": round(summary.wall_seconds, 3),
    })
    return out
