"""Assemble a model (grid, transforms, dynamics, implicit terms, time step, initial state)
from a validated configuration."""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from torrid.io.config import SECONDS_PER_DAY, ConfigError, ModelConfig
from torrid.io.initialfile import read_initial_fields
from torrid.physics.cases import CASES, CaseSpec
from torrid.physics.coriolis import coriolis_parameter
from torrid.physics.fields import spectral_state
from torrid.physics.grid import SpectralGrid
from torrid.physics.linear import LinearTerms
from torrid.physics.orbit import Orbit, pseudo_synchronous_ratio
from torrid.physics.processes import CASE, PLANET, Process, ProcessContext, build_processes
from torrid.physics.regrid import FitNotConvergedError, fit_state
from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY
from torrid.physics.tendencies import Dynamics
from torrid.physics.timestepping import SCHEMES, IMEXStepper, automatic_time_step
from torrid.physics.transforms import Transforms
from torrid.workflow.linear_state import solve_linear


@dataclass(frozen=True, eq=False)
class Model:
    """Everything a run needs, built once from a configuration."""

    config: ModelConfig
    case: CaseSpec | None  # None for a hot-planet run
    grid: SpectralGrid
    transforms: Transforms
    processes: tuple[Process, ...]
    dynamics: Dynamics
    linear: LinearTerms
    stepper: IMEXStepper
    initial_state: np.ndarray
    surface_height_m: np.ndarray  # grid (nlat, nlon)
    gravity_m_s2: float
    mean_geopotential: float  # m^2 s^-2
    rotation_rate_s: float
    steps_per_output: int
    orbit: Orbit | None = None
    process_limits_s: tuple[float, ...] = ()  # the processes' longest stable steps (s)

    @property
    def dt(self) -> float:
        """Time step (s)."""
        return self.stepper.dt

    @property
    def scheme(self):
        """The time scheme (:class:`torrid.physics.timestepping.Scheme`)."""
        return self.stepper.scheme

    def new_stepper(self, dt: float) -> IMEXStepper:
        """A stepper of the run's scheme with step ``dt`` (s)."""
        return IMEXStepper(self.dynamics, self.linear, dt, self.initial_state.shape,
                           self.scheme)

    @property
    def is_planet(self) -> bool:
        """True for a forced hot-planet run (the configuration's one test)."""
        return self.config.is_planet

    @property
    def label(self) -> str:
        """Short name of what is run."""
        return self.case.name if self.case else "planet"

    def process(self, name: str) -> Process | None:
        """The run's process called ``name`` (None if it is absent)."""
        return next((p for p in self.processes if p.name == name), None)


@dataclass(frozen=True)
class _Start:
    """Initial fields and physical set-up of a run, before the numerics are attached."""

    u: np.ndarray
    v: np.ndarray
    thickness_m: np.ndarray
    surface_height_m: np.ndarray
    coriolis: np.ndarray
    mean_geopotential: float
    reference_speed_m_s: float
    rotation_rate_s: float
    orbit: Orbit | None = None


#: Hot-planet runs start from rest; the automatic step assumes winds up to this multiple of
#: the gravity-wave speed sqrt(g H) (the equatorial jets of such runs reach about 1-2 c).
PLANET_SPEED_OVER_WAVE_SPEED = 2.0


def choose_time_step(config: ModelConfig, max_speed_m_s: float,
                     process_limits_s: tuple[float, ...] = ()) -> tuple[float, int]:
    """Time step (s) and steps per output interval.

    The step (the given ``time_step_s``, or that of the configured Courant number) is shortened,
    if needed, to the processes' stability limits (``process_limits_s``, s) and to divide the
    output interval exactly, so outputs fall on steps.
    """
    interval_s = config.run.output_interval_days * SECONDS_PER_DAY
    n = config.numerics
    if n.time_step_s is not None:
        dt = n.time_step_s
    else:
        dt = automatic_time_step(max(max_speed_m_s, 1e-3), config.planet.radius_m,
                                 n.truncation, target_courant_number(config))
    dt = min((dt, *process_limits_s))
    steps = max(1, math.ceil(interval_s / dt - 1e-9))
    return interval_s / steps, steps


def target_courant_number(config: ModelConfig) -> float:
    """The automatic step's Courant number: ``numerics.courant_number``, else the scheme's."""
    n = config.numerics
    return n.courant_number if n.courant_number is not None else \
        SCHEMES[n.time_scheme].courant_number


def rotation_rate(config: ModelConfig) -> tuple[float, float]:
    """Signed spin rate Omega (rad s^-1) and orbital period (s) of a planet run."""
    planet, orbit = config.planet, config.orbit
    period_days = orbit.orbital_period_days or abs(planet.rotation_period_days)
    sign = -1.0 if planet.rotation_period_days < 0 else 1.0
    mean_motion = 2 * math.pi / (period_days * SECONDS_PER_DAY)
    if orbit.rotation == "synchronous":
        omega = sign * mean_motion
    elif orbit.rotation == "pseudo-synchronous":
        omega = sign * mean_motion * pseudo_synchronous_ratio(orbit.eccentricity)
    else:
        omega = planet.rotation_rate_s
    return omega, period_days * SECONDS_PER_DAY


def _case_start(config: ModelConfig, grid: SpectralGrid) -> _Start:
    case = CASES[config.case.name]
    planet = config.planet
    lat, lon = grid.mesh()
    params = {"alpha_rad": config.case.alpha_rad} if "alpha_rad" in case.parameters else {}
    fields = case.initial_fields(lat, lon, radius_m=planet.radius_m,
                                 rotation_rate_s=planet.rotation_rate_s,
                                 gravity_m_s2=planet.gravity_m_s2, **params)
    thickness = fields.h - fields.surface_height
    return _Start(
        u=fields.u, v=fields.v, thickness_m=thickness,
        surface_height_m=np.asarray(fields.surface_height, float) * np.ones(grid.shape),
        coriolis=coriolis_parameter(lat, lon, planet.rotation_rate_s, fields.coriolis_tilt_rad),
        mean_geopotential=grid.global_mean(planet.gravity_m_s2 * thickness),
        reference_speed_m_s=float(np.sqrt(fields.u**2 + fields.v**2).max()),
        rotation_rate_s=planet.rotation_rate_s,
    )


def _planet_start(config: ModelConfig, grid: SpectralGrid) -> _Start:
    atm, planet = config.atmosphere, config.planet
    omega, period_s = rotation_rate(config)
    orbit = Orbit(orbital_period_s=period_s, eccentricity=config.orbit.eccentricity,
                  rotation_rate_s=omega,
                  initial_mean_anomaly_rad=math.radians(config.orbit.initial_mean_anomaly_deg))
    phi = atm.mean_geopotential_m2_s2
    lat, lon = grid.mesh()
    zeros = np.zeros(grid.shape)
    return _Start(
        u=zeros, v=zeros, thickness_m=np.full(grid.shape, phi / planet.gravity_m_s2),
        surface_height_m=zeros, coriolis=coriolis_parameter(lat, lon, omega, 0.0),
        mean_geopotential=phi,
        reference_speed_m_s=PLANET_SPEED_OVER_WAVE_SPEED * math.sqrt(phi),
        rotation_rate_s=omega, orbit=orbit,
    )


def _from_file(config: ModelConfig, transforms: Transforms, start: _Start):
    """The initial state fitted to the fields of ``run.initial_fields`` (and the start with
    its reference speed and, for cases, mean geopotential updated)."""
    fields = read_initial_fields(config.run.initial_fields)
    try:
        state, fitted_mean = fit_state(transforms, fields.lat_deg, fields.lon_deg, fields.h_m,
                                       fields.u, fields.v, config.planet.gravity_m_s2,
                                       fields.surface_height_m)
    except (ValueError, FitNotConvergedError) as err:
        raise ConfigError(f"{config.run.initial_fields}: {err}") from None
    mean = start.mean_geopotential if config.is_planet else fitted_mean
    # phi' is relative to the model's reference geopotential: move the l = 0 coefficient
    state[GEOPOTENTIAL, 0] += (fitted_mean - mean) * math.sqrt(4 * math.pi)
    speed = float(np.sqrt(fields.u**2 + fields.v**2).max())
    return state, dataclasses.replace(start, mean_geopotential=mean,
                                      reference_speed_m_s=max(speed, start.reference_speed_m_s))


def _linear_start(config: ModelConfig, transforms: Transforms, processes, dynamics, linear,
                  start: _Start):
    """The linear steady state as the initial state (``run.initial_state = "linear"``), and
    the start with its reference speed raised to the state's largest wind."""
    solution = solve_linear(config, "run.initial_state", transforms, processes, dynamics,
                            linear, start.rotation_rate_s, start.orbit)
    winds = transforms.winds(solution.state[VORTICITY], solution.state[DIVERGENCE])
    speed = float(np.sqrt((winds**2).sum(axis=0)).max())
    return solution.state, dataclasses.replace(
        start, reference_speed_m_s=max(speed, start.reference_speed_m_s))


def build_model(config: ModelConfig) -> Model:
    """Build the model of ``config`` with its initial state."""
    grid = SpectralGrid(config.numerics.truncation)
    transforms = Transforms(grid, config.planet.radius_m, config.numerics.threads)
    start = _planet_start(config, grid) if config.is_planet else _case_start(config, grid)
    g = config.planet.gravity_m_s2
    if config.run.initial_fields:
        state, start = _from_file(config, transforms, start)
    else:
        state = spectral_state(transforms, start.u, start.v,
                               g * start.thickness_m - start.mean_geopotential)
    case = None if config.is_planet else CASES[config.case.name]
    context = ProcessContext(kind=PLANET if config.is_planet else CASE, transforms=transforms,
                             gravity_m_s2=g, mean_geopotential=start.mean_geopotential,
                             rotation_rate_s=start.rotation_rate_s,
                             surface_height_m=start.surface_height_m, orbit=start.orbit,
                             case=case)
    processes = build_processes(config.get, context)
    dynamics = Dynamics(transforms, start.coriolis, start.mean_geopotential, processes)
    l = grid.degree.astype(float)
    linear = LinearTerms.from_rates(l * (l + 1) / config.planet.radius_m**2,
                                    start.mean_geopotential,
                                    [p.implicit_rates() for p in processes])
    if config.run.initial_state == "linear":  # issue 13: warm start from the linear steady state
        state, start = _linear_start(config, transforms, processes, dynamics, linear, start)
    limits = tuple(limit for p in processes if (limit := p.max_time_step_s()) is not None)
    dt, steps_per_output = choose_time_step(config, start.reference_speed_m_s, limits)
    stepper = IMEXStepper(dynamics, linear, dt, state.shape,
                          SCHEMES[config.numerics.time_scheme])
    return Model(config=config, case=case, grid=grid, transforms=transforms,
                 process_limits_s=limits,
                 processes=processes, dynamics=dynamics, linear=linear, stepper=stepper,
                 initial_state=state, surface_height_m=start.surface_height_m, gravity_m_s2=g,
                 mean_geopotential=start.mean_geopotential, rotation_rate_s=start.rotation_rate_s,
                 steps_per_output=steps_per_output, orbit=start.orbit)
