"""The linear steady state of a planet configuration: what the direct solver refuses, and the
solve itself on the model's own parts (the steady problem: :mod:`torrid.physics.linear_steady`).

Used by the linear run (``numerics.solver = "linear"``, :mod:`torrid.workflow.linear_run`) and
by the warm start of a time-stepped run (``run.initial_state = "linear"``,
:func:`torrid.workflow.setup.build_model`). The problem is the model's, linearised about rest:
its Coriolis field, gravity waves and the implicit rates of its processes (relaxation, uniform
drag, hyperdiffusion), forced by the explicit tendency of the processes at rest (the
relaxation's source toward the configured equilibrium profile). Advection and the
mass-exchange momentum term are products of two perturbations and drop out.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from torrid.io.config import ConfigError, ModelConfig
from torrid.physics.linear import LinearTerms
from torrid.physics.linear_steady import SingularProblemError, SteadyLinearProblem
from torrid.physics.orbit import Orbit
from torrid.physics.processes import Process
from torrid.physics.tendencies import Dynamics
from torrid.physics.transforms import Transforms


def refusal(config: ModelConfig, orbit: Orbit | None, key: str) -> str | None:
    """Why the linear steady state of ``config`` cannot be solved for, in one line naming
    ``key`` (``numerics.solver`` or ``run.initial_state``) and the keys in the way; None if it
    can."""
    what = f"{key} = 'linear'"
    if not config.is_planet:
        return f"{what}: planets only (a standard case has no steady forcing to solve for)"
    o, atm = config.orbit, config.atmosphere
    if orbit is None or not orbit.is_steady:
        return (f"{what}: needs a circular synchronous orbit, where the forcing is steady in "
                f"the planet's frame (got orbit.eccentricity = {o.eccentricity:g}, "
                f"orbit.rotation = {o.rotation!r})")
    if key == "run.initial_state" and config.run.initial_fields:
        return (f"{what} and run.initial_fields = {config.run.initial_fields!r}: give one "
                "start or the other")
    night = atm.drag_timescale_nightside_days
    if math.isinf(atm.radiative_timescale_days) and math.isinf(atm.drag_timescale_days) \
            and (night is None or math.isinf(night)):
        return (f"{what}: atmosphere.radiative_timescale_days and "
                "atmosphere.drag_timescale_days are both inf: without relaxation or drag the "
                "linear problem is undamped and singular (its free modes have no damping)")
    if night is not None and night != atm.drag_timescale_days:
        return (f"{what}: atmosphere.drag_timescale_nightside_days = {night:g} differs from "
                f"atmosphere.drag_timescale_days = {atm.drag_timescale_days:g}: a drag that "
                "varies over the planet couples zonal wavenumbers, which the linear solver "
                "(one banded system per wavenumber) does not take; make them equal")
    if atm.drag_components != "both":
        return (f"{what}: atmosphere.drag_components = {atm.drag_components!r}: a drag on the "
                "eastward wind alone is not diagonal in spectral space (it couples every "
                "degree of a wavenumber), which the linear solver does not take; use 'both'")
    return None


@dataclass(frozen=True, eq=False)
class LinearSolution:
    """The linear steady state (3, ncoeff), its problem and residual max|A x + F| / max|F|."""

    state: np.ndarray
    problem: SteadyLinearProblem
    forcing: np.ndarray
    residual: float


def solve_linear(config: ModelConfig, key: str, transforms: Transforms,
                 processes: tuple[Process, ...], dynamics: Dynamics, linear: LinearTerms,
                 rotation_rate_s: float, orbit: Orbit | None) -> LinearSolution:
    """The steady state of the model's problem linearised about rest (module docstring).

    Raises
    ------
    ConfigError
        One line, if the configuration is refused (:func:`refusal`) or its problem is
        singular.
    """
    problem_text = refusal(config, orbit, key)
    if problem_text:
        raise ConfigError(problem_text)
    grid = transforms.grid
    rest = np.zeros((3, grid.ncoeff), dtype=complex)
    forcing = dynamics(rest, 0.0, np.zeros_like(rest)).copy()  # the processes' forcing at rest
    problem = SteadyLinearProblem.for_grid(grid, transforms.radius_m, rotation_rate_s, linear)
    try:
        state = problem.solve(forcing)
    except SingularProblemError as err:
        raise ConfigError(f"{key} = 'linear': {err}") from None
    return LinearSolution(state, problem, forcing, problem.residual(state, forcing))
