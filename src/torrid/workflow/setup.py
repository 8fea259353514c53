"""Assemble a model (grid, transforms, dynamics, implicit terms, time step, initial state)
from a validated configuration."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from torrid.io.config import SECONDS_PER_DAY, ModelConfig
from torrid.physics.cases import CASES, CaseSpec
from torrid.physics.coriolis import coriolis_parameter
from torrid.physics.fields import spectral_state
from torrid.physics.grid import SpectralGrid
from torrid.physics.linear import LinearTerms, hyperdiffusion_rates
from torrid.physics.tendencies import Dynamics
from torrid.physics.timestepping import IMEXStepper, automatic_time_step
from torrid.physics.transforms import Transforms


@dataclass(frozen=True, eq=False)
class Model:
    """Everything a run needs, built once from a configuration."""

    config: ModelConfig
    case: CaseSpec
    grid: SpectralGrid
    transforms: Transforms
    dynamics: Dynamics
    linear: LinearTerms
    stepper: IMEXStepper
    initial_state: np.ndarray
    surface_height_m: np.ndarray  # grid (nlat, nlon)
    gravity_m_s2: float
    mean_geopotential: float  # m^2 s^-2
    hyperdiffusion_days: float
    hyperdiffusion_order: int
    steps_per_output: int

    @property
    def dt(self) -> float:
        """Time step (s)."""
        return self.stepper.dt


def resolved_hyperdiffusion(config: ModelConfig, case: CaseSpec) -> tuple[float, int]:
    """The hyperdiffusion e-folding time (days) and order p: the configuration's or the case's."""
    n = config.numerics
    days = n.hyperdiffusion_days
    if days is None:
        d = case.default_hyperdiffusion_days
        days = d(n.truncation) if callable(d) else d
    order = n.hyperdiffusion_order or case.default_hyperdiffusion_order
    return float(days), int(order)


def choose_time_step(config: ModelConfig, max_speed_m_s: float) -> tuple[float, int]:
    """Time step (s) and steps per output interval.

    A given ``time_step_s`` is used as is (outputs then fall on the nearest step); otherwise the
    step of the configured Courant number is shortened to divide the output interval exactly.
    """
    interval_s = config.run.output_interval_days * SECONDS_PER_DAY
    n = config.numerics
    if n.time_step_s is not None:
        return n.time_step_s, max(1, round(interval_s / n.time_step_s))
    dt = automatic_time_step(max(max_speed_m_s, 1e-3), config.planet.radius_m, n.truncation,
                             n.courant_number)
    steps = max(1, math.ceil(interval_s / dt - 1e-9))
    return interval_s / steps, steps


def build_model(config: ModelConfig) -> Model:
    """Build the model of ``config`` with its initial state."""
    case = CASES[config.case.name]
    planet = config.planet
    grid = SpectralGrid(config.numerics.truncation)
    transforms = Transforms(grid, planet.radius_m, config.numerics.threads)
    lat, lon = grid.mesh()
    params = {"alpha_rad": config.case.alpha_rad} if "alpha_rad" in case.parameters else {}
    fields = case.initial_fields(lat, lon, radius_m=planet.radius_m,
                                 rotation_rate_s=planet.rotation_rate_s,
                                 gravity_m_s2=planet.gravity_m_s2, **params)
    g = planet.gravity_m_s2
    thickness_geopotential = g * (fields.h - fields.surface_height)
    mean_geopotential = grid.global_mean(thickness_geopotential)
    state = spectral_state(transforms, fields.u, fields.v,
                           thickness_geopotential - mean_geopotential)
    coriolis = coriolis_parameter(lat, lon, planet.rotation_rate_s, fields.coriolis_tilt_rad)
    dynamics = Dynamics(transforms, coriolis, mean_geopotential,
                        surface_geopotential=g * fields.surface_height)
    days, order = resolved_hyperdiffusion(config, case)
    l = grid.degree.astype(float)
    linear = LinearTerms(
        laplacian_factor=l * (l + 1) / planet.radius_m**2,
        mean_geopotential=mean_geopotential,
        hyperdiffusion=hyperdiffusion_rates(l, grid.truncation, days * SECONDS_PER_DAY, order),
    )
    max_speed = float(np.sqrt(fields.u**2 + fields.v**2).max())
    dt, steps_per_output = choose_time_step(config, max_speed)
    stepper = IMEXStepper(dynamics, linear, dt, state.shape)
    return Model(config=config, case=case, grid=grid, transforms=transforms, dynamics=dynamics,
                 linear=linear, stepper=stepper, initial_state=state,
                 surface_height_m=np.asarray(fields.surface_height, float) * np.ones(grid.shape),
                 gravity_m_s2=g, mean_geopotential=mean_geopotential, hyperdiffusion_days=days,
                 hyperdiffusion_order=order, steps_per_output=steps_per_output)
