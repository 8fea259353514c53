"""The run driver: step a model through simulated time, collect output on schedule, summarise."""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

import numpy as np
import xarray as xr
from tqdm.auto import tqdm

from torrid.io.config import SECONDS_PER_DAY, ModelConfig
from torrid.io.provenance import provenance_attrs
from torrid.io.runfile import build_dataset
from torrid.physics import invariants
from torrid.physics.fields import grid_state
from torrid.workflow.setup import Model, build_model


@dataclass(frozen=True)
class RunSummary:
    """What the end-of-run line reports."""

    simulated_days: float
    wall_seconds: float
    steps: int
    mass_change_relative: float
    energy_change_relative: float

    @property
    def days_per_second(self) -> float:
        """Simulated days per wall-clock second."""
        return self.simulated_days / self.wall_seconds if self.wall_seconds > 0 else math.inf

    def line(self, label: str) -> str:
        """One-line human summary."""
        return (f"{label}: {self.simulated_days:g} days in {self.steps} steps, "
                f"{self.wall_seconds:.1f} s ({self.days_per_second:.3g} simulated days/s); "
                f"mass change {self.mass_change_relative:.2e}, "
                f"energy change {self.energy_change_relative:.2e} (relative)")


def _to_output_grid(field: np.ndarray) -> np.ndarray:
    """Model grid (north to south, lon from 0) -> output (south to north, lon from -180)."""
    return np.roll(field[::-1], field.shape[-1] // 2, axis=-1)


def output_coordinates(model: Model) -> tuple[np.ndarray, np.ndarray]:
    """Output latitudes (ascending, degrees_north) and longitudes ([-180, 180), degrees_east)."""
    lat = np.degrees(model.grid.latitude[::-1])
    lon = np.degrees(model.grid.longitude)
    lon = np.roll(np.where(lon >= 180, lon - 360, lon), model.grid.nlon // 2)
    return lat, lon


def snapshot(model: Model, state: np.ndarray) -> dict[str, np.ndarray | float]:
    """Output fields and global invariants of one state (output-grid orientation)."""
    fields = grid_state(model.transforms, state)
    g = model.gravity_m_s2
    thickness = (fields["geopotential_deviation"] + model.mean_geopotential) / g
    grid = model.grid
    out = {
        "h": thickness + model.surface_height_m,
        "u": fields["u"], "v": fields["v"],
        "vorticity": fields["vorticity"], "divergence": fields["divergence"],
    }
    out = {k: _to_output_grid(v) for k, v in out.items()}
    out["mean_thickness"] = invariants.mean_thickness(grid, thickness)
    out["total_energy"] = invariants.total_energy(grid, thickness, fields["u"], fields["v"],
                                                  model.surface_height_m, g)
    out["potential_enstrophy"] = invariants.potential_enstrophy(
        grid, thickness, fields["vorticity"], model.dynamics.coriolis)
    return out


def integrate(model: Model, progress: bool = True, label: str = "") -> tuple[xr.Dataset, RunSummary]:
    """Run ``model`` for the configured days; return the run dataset and its summary."""
    config = model.config
    dt = model.dt
    nsteps = max(1, round(config.run.days * SECONDS_PER_DAY / dt))
    state = model.initial_state
    times, series = [0.0], {}
    _append(series, snapshot(model, state))
    bar = tqdm(total=round(nsteps * dt / SECONDS_PER_DAY, 6), unit="day", disable=not progress,
               desc=label or config.case.name, leave=False, dynamic_ncols=True,
               bar_format="{desc}: {percentage:3.0f}%|{bar}| {n:.2f}/{total:g} days "
                          "[{elapsed}<{remaining}, {rate_fmt}]")
    start = time.perf_counter()
    time_s = 0.0
    for step in range(1, nsteps + 1):
        state = model.stepper.step(state, time_s)
        time_s = step * dt
        if step % model.steps_per_output == 0 or step == nsteps:
            times.append(time_s / SECONDS_PER_DAY)
            _append(series, snapshot(model, state))
        bar.update(dt / SECONDS_PER_DAY)
    wall = time.perf_counter() - start
    bar.close()
    summary = RunSummary(
        simulated_days=nsteps * dt / SECONDS_PER_DAY, wall_seconds=wall, steps=nsteps,
        mass_change_relative=_relative_change(series["mean_thickness"]),
        energy_change_relative=_relative_change(series["total_energy"]),
    )
    lat, lon = output_coordinates(model)
    static = {"surface_height": _to_output_grid(model.surface_height_m)}
    ds = build_dataset(times, lat, lon, series, static, _run_attrs(model, summary))
    return ds, summary


def run_config(config: ModelConfig, progress: bool = True) -> tuple[xr.Dataset, RunSummary]:
    """Build and integrate the model of ``config``."""
    return integrate(build_model(config), progress=progress)


def _append(series: dict[str, list], values: dict) -> None:
    for key, value in values.items():
        series.setdefault(key, []).append(value)


def _relative_change(values: list[float]) -> float:
    return float((values[-1] - values[0]) / abs(values[0])) if values[0] else float("nan")


def _run_attrs(model: Model, summary: RunSummary) -> dict:
    grid, case = model.grid, model.case
    return {
        "title": f"torrid run: {case.title}",
        "case": case.name,
        "references": case.reference,
        **provenance_attrs(model.config.to_dict()),
        "truncation": f"T{grid.truncation}",
        "grid": f"Gauss-Legendre, {grid.nlat} latitudes x {grid.nlon} longitudes",
        "time_step_s": model.dt,
        "time_scheme": "IMEX Runge-Kutta ARS(4,4,3), gravity waves and damping implicit",
        "hyperdiffusion": (f"del^{2 * model.hyperdiffusion_order}, e-folding "
                           f"{model.hyperdiffusion_days:g} days at l = {grid.truncation}"),
        "mean_geopotential_m2_s2": model.mean_geopotential,
        "gravity_m_s2": model.gravity_m_s2,
        "radius_m": model.config.planet.radius_m,
        "rotation_rate_s": model.config.planet.rotation_rate_s,
        "steps": summary.steps,
        "wall_time_s": round(summary.wall_seconds, 3),
    }
