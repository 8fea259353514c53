"""What a run writes: output snapshots, the run summary and the run file's attributes."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from torrid.io.provenance import provenance_attrs
from torrid.physics import invariants
from torrid.physics.curvefeatures import unwrap_degrees, wrap_degrees
from torrid.physics.diagnostics import DIAGNOSTIC_VARIABLES, planet_diagnostics
from torrid.physics.fields import grid_state
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


def to_output_grid(field: np.ndarray) -> np.ndarray:
    """Model grid (north to south, lon from 0) -> output (south to north, lon from -180)."""
    return np.roll(field[::-1], field.shape[-1] // 2, axis=-1)


def output_coordinates(model: Model) -> tuple[np.ndarray, np.ndarray]:
    """Output latitudes (ascending, degrees_north) and longitudes ([-180, 180), degrees_east)."""
    lat = np.degrees(model.grid.latitude[::-1])
    lon = np.degrees(model.grid.longitude)
    lon = np.roll(np.where(lon >= 180, lon - 360, lon), model.grid.nlon // 2)
    return lat, lon


def planet_snapshot(model: Model, state: np.ndarray, time_s: float,
                    geopotential_deviation: np.ndarray) -> dict[str, float]:
    """Hot-planet diagnostics of one state at ``time_s`` (s); ``geopotential_deviation`` is the
    state's phi' on the model grid (m^2 s^-2), already synthesised by the caller."""
    forcing = model.forcing
    lon_sub, _ = forcing.state_at(time_s)
    h_eq = forcing.equilibrium(time_s) / model.gravity_m_s2
    out = planet_diagnostics(model.transforms, state, mean_geopotential=model.mean_geopotential,
                             gravity_m_s2=model.gravity_m_s2,
                             rotation_rate_s=model.rotation_rate_s,
                             substellar_longitude_rad=lon_sub, equilibrium_thickness_m=h_eq)
    source = forcing.heating(time_s, geopotential_deviation)
    out["mean_mass_source"] = model.grid.global_mean(source) / model.gravity_m_s2
    out["substellar_longitude"] = float(np.degrees(lon_sub))
    out["star_distance_ratio"] = float(model.orbit.distance_ratio(time_s))
    return out


def snapshot(model: Model, state: np.ndarray, time_s: float = 0.0) -> dict[str, np.ndarray | float]:
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
    out = {k: to_output_grid(v) for k, v in out.items()}
    if model.forcing is not None:
        out.update(planet_snapshot(model, state, time_s, fields["geopotential_deviation"]))
    out["max_speed"] = float(np.sqrt(fields["u"] ** 2 + fields["v"] ** 2).max())
    out["mean_thickness"] = invariants.mean_thickness(grid, thickness)
    out["total_energy"] = invariants.total_energy(grid, thickness, fields["u"], fields["v"],
                                                  model.surface_height_m, g)
    out["potential_enstrophy"] = invariants.potential_enstrophy(
        grid, thickness, fields["vorticity"], model.dynamics.coriolis)
    return out


def final_value(times_days, values, window_days: float, angle: bool = False) -> float:
    """Time mean of a diagnostic over the trailing window (its last value if the run is
    shorter than the window). Angles (degrees) are unwrapped first."""
    values = unwrap_degrees(values) if angle else np.asarray(values, float)
    end = times_days[-1]
    if end - times_days[0] < window_days or not np.isfinite(values[-1]):
        mean = values[-1]
    else:
        mean = window_means(times_days, values, end - window_days, end)
    return float(wrap_degrees(mean)) if angle else float(mean)


def planet_attrs(model: Model, times_days: list, series: dict, criterion: SteadyCriterion,
                 stopping: bool, steady_day: float | None) -> dict:
    """Steady-state record and final diagnostics (means over the criterion's window)."""
    atm = model.config.atmosphere
    window = criterion.window_days
    out = {
        "steady_state_reached": int(steady_day is not None),
        "steady_state_time_days": steady_day if steady_day is not None else float("nan"),
        "steady_state_criterion": ("none (run.stop_at_steady_state = false)" if not stopping
                                   else f"window {criterion.window_days:g} days, tolerance "
                                        f"{criterion.tolerance:g}"
                                        + ("" if model.orbit.is_steady
                                           else ", whole orbits (orbit-to-orbit repeat)")),
        "nightside_thickness_m": atm.mean_geopotential_m2_s2 / model.gravity_m_s2,
        "forcing_contrast": atm.forcing_contrast,
    }
    out["final_values"] = (f"time means over the last {window:g} days (the steady-state "
                           "window; whole orbits on eccentric orbits), or the last output if "
                           "the run is shorter")
    for name in DIAGNOSTIC_VARIABLES:
        out[f"final_{name}"] = final_value(times_days, series[name], window,
                                           angle=name.startswith("hotspot"))
    return out


def append_snapshot(series: dict[str, list], values: dict) -> None:
    for key, value in values.items():
        series.setdefault(key, []).append(value)


def relative_change(values: list[float]) -> float:
    return float((values[-1] - values[0]) / abs(values[0])) if values[0] else float("nan")


def run_attrs(model: Model, summary: RunSummary) -> dict:
    grid, case = model.grid, model.case
    if case is None:
        described = {"title": "torrid run: forced hot gas giant", "case": "planet",
                     "references": "forcing: Showman & Polvani (2011); "
                                   "Perez-Becker & Showman (2013)"}
    else:
        described = {"title": f"torrid run: {case.title}", "case": case.name,
                     "references": case.reference}
    return {
        **described,
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
        "rotation_rate_s": model.rotation_rate_s,
        "steps": summary.steps,
        "wall_time_s": round(summary.wall_seconds, 3),
    }
