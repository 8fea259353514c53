"""Cheap per-step checks that a run is still healthy, and what to tell the user if not.

After every step: the spectral state must be finite; on the grid of the step's last explicit
stage (half a step before its end, so no extra transforms are needed) the layer thickness must
stay positive and the advective Courant number below the explicit scheme's stability limit.
A failure names what failed, where (lat, lon), when (simulated day), and the likely fix.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from torrid.physics.timestepping import courant_number


@dataclass(frozen=True)
class HealthProblem:
    """What went wrong in a run (one line via :meth:`message`)."""

    kind: str  # "non-finite", "thickness", "courant"
    day: float
    lat_deg: float
    lon_deg: float
    value: float
    automatic_step: bool = False
    limit: float = 1.57  # the scheme's stability limit

    def message(self) -> str:
        """One line: what, where, when, likely cause and fix."""
        where = f"at lat {self.lat_deg:+.1f}, lon {self.lon_deg:+.1f} on day {self.day:.3f}"
        if self.kind == "non-finite":
            return (f"run blew up: non-finite values in the state {where}; likely cause: an "
                    "unstable step; fix: a shorter numerics.time_step_s (or leave it automatic) "
                    "or more hyperdiffusion (a smaller numerics.hyperdiffusion_days)")
        if self.kind == "thickness":
            return (f"run failed: layer thickness fell to {self.value:.4g} m {where}; likely "
                    "cause: forcing too strong for the layer or grid-scale noise; fix: a smaller "
                    "atmosphere.forcing_contrast, more hyperdiffusion (a smaller "
                    "numerics.hyperdiffusion_days) or a shorter numerics.time_step_s")
        if self.automatic_step:  # the step was following the winds: they ran away
            return (f"run blew up: advective Courant number {self.value:.3g} above the "
                    f"scheme's limit {self.limit} {where}, faster than the automatic step "
                    "could follow; likely cause: growing grid-scale noise; fix: more "
                    "hyperdiffusion (a smaller numerics.hyperdiffusion_days), a smaller "
                    "atmosphere.forcing_contrast or a smaller numerics.courant_number")
        return (f"run failed: advective Courant number {self.value:.3g} above the scheme's "
                f"limit {self.limit} {where}; likely cause: the time step is too long "
                "for the winds; fix: a shorter numerics.time_step_s (or leave it automatic)")


def _location(grid, index: int) -> tuple[float, float]:
    i, j = np.unravel_index(index, grid.shape)
    lon = np.degrees(grid.longitude[j])
    return float(np.degrees(grid.latitude[i])), float(lon - 360 if lon >= 180 else lon)


def check_step(model, state: np.ndarray, day: float,
               dt: float) -> tuple[HealthProblem | None, float]:
    """The first problem of the step just taken (None if healthy) and its Courant number."""
    grid = model.grid
    if not np.isfinite(state).all():
        return HealthProblem("non-finite", day, float("nan"), float("nan"), float("nan")), np.inf
    dyn = model.dynamics
    geopotential = dyn._geopotential
    index = int(np.argmin(geopotential))
    thickness = (geopotential.flat[index] + dyn.mean_geopotential) / model.gravity_m_s2
    if not thickness > 0:
        return HealthProblem("thickness", day, *_location(grid, index), float(thickness)), np.inf
    winds = dyn._winds
    speed2 = winds[0] * winds[0] + winds[1] * winds[1]
    index = int(np.argmax(speed2))
    courant = courant_number(float(np.sqrt(speed2.flat[index])), dt,
                             model.config.planet.radius_m, grid.truncation)
    limit = model.scheme.stability_limit
    if not courant <= limit:
        automatic = model.config.numerics.time_step_s is None
        return HealthProblem("courant", day, *_location(grid, index), courant,
                             automatic, limit), courant
    return None, courant
