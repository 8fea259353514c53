"""The physical processes as modules (issue 9): the registry, the interface, and that the model
is their ordered sum.

What is checked here is the composition: each process reads only the settings it declares;
the explicit tendency is the sum of the processes' explicit parts (the tendency is affine in the
momentum forcing and the spectral parts add, so the parts of separate processes must add up to
round-off); the implicit operator's rates are the sum of the processes' rates. Each process's
own formula is checked in tests/test_process_formulas.py.
"""

import math

import numpy as np
import pytest

import torrid
from torrid.io.settings import BY_KEY
from torrid.io.variables import VARIABLES
from torrid.physics.processes import CASE, PLANET, REGISTRY, build_processes
from torrid.physics.tendencies import Dynamics
from torrid.workflow.setup import build_model

SECONDS_PER_DAY = 86400.0


def test_registry_declarations():
    names = [cls.name for cls in REGISTRY]
    assert len(set(names)) == len(names) and all(names)
    for cls in REGISTRY:
        assert cls.kinds and cls.kinds <= {PLANET, CASE}, cls.name
        unknown = [key for key in cls.settings if key not in BY_KEY]
        assert not unknown, f"{cls.name} reads keys the settings table lacks: {unknown}"
        for name, meta in cls.diagnostic_variables.items():
            assert meta.units and meta.long_name, (cls.name, name)
            assert VARIABLES[name].units == meta.units  # the run-file table has it


def test_each_process_gets_only_its_declared_settings():
    config = torrid.ModelConfig().replace(numerics={"truncation": 10},
                                          atmosphere={"drag_timescale_days": 2.0})
    model = build_model(config)
    asked = []

    def value_of(key):
        asked.append(key)
        return config.get(key)

    context = _context(model)
    build_processes(value_of, context)
    declared = [key for cls in REGISTRY if PLANET in cls.kinds for key in cls.settings]
    assert asked == declared


def _context(model):
    from torrid.physics.processes import ProcessContext

    return ProcessContext(kind=PLANET if model.is_planet else CASE, transforms=model.transforms,
                          gravity_m_s2=model.gravity_m_s2,
                          mean_geopotential=model.mean_geopotential,
                          rotation_rate_s=model.rotation_rate_s,
                          surface_height_m=model.surface_height_m, orbit=model.orbit,
                          case=model.case)


@pytest.mark.parametrize("config, expected", [
    (torrid.ModelConfig(), ["hyperdiffusion", "newtonian_relaxation", "mass_exchange"]),
    (torrid.ModelConfig().replace(atmosphere={"drag_timescale_days": 1.0}),
     ["hyperdiffusion", "rayleigh_drag", "newtonian_relaxation", "mass_exchange"]),
    (torrid.ModelConfig().replace(atmosphere={"radiative_timescale_days": math.inf}),
     ["hyperdiffusion", "newtonian_relaxation"]),
    (torrid.build_case_config("williamson6"), ["hyperdiffusion"]),
    (torrid.build_case_config("williamson5"), ["hyperdiffusion", "topography"]),
], ids=["planet", "drag", "no forcing", "williamson6", "williamson5"])
def test_the_processes_of_a_run(config, expected):
    model = build_model(config.replace(numerics={"truncation": 10}))
    assert [p.name for p in model.processes] == expected


def _random_state(model, seed=1):
    """A smooth, non-trivial state: a few low-degree coefficients of each field."""
    rng = np.random.default_rng(seed)
    state = np.zeros_like(model.initial_state)
    low = model.grid.degree <= 6
    scale = np.array([1e-5, 1e-6, 0.05 * model.mean_geopotential])[:, None]
    state[:, low] = scale * (rng.normal(size=(3, low.sum())) + 1j * rng.normal(size=(3, low.sum())))
    state[:, model.grid.order == 0] = state[:, model.grid.order == 0].real
    return state


def test_the_explicit_tendency_is_the_sum_of_the_processes_parts():
    config = torrid.ModelConfig().replace(numerics={"truncation": 21},
                                          orbit={"eccentricity": 0.2})
    model = build_model(config)
    state, time_s = _random_state(model), 1.7e5

    def tendency(processes):
        dyn = Dynamics(model.transforms, model.dynamics.coriolis, model.mean_geopotential,
                       processes)
        return dyn(state, time_s, np.empty_like(state)).copy()

    bare = tendency(())
    total = tendency(model.processes)
    parts = sum(tendency((p,)) - bare for p in model.processes)
    assert np.abs(total - bare).max() > 0  # the processes do something
    scale = np.abs(total).max(axis=1, keepdims=True)
    assert np.all(np.abs((total - bare) - parts) <= 1e-12 * scale)


def test_the_implicit_rates_are_the_sum_of_the_processes_rates():
    tau_rad, tau_drag = 0.5, 3.0
    model = build_model(torrid.ModelConfig().replace(
        numerics={"truncation": 21},
        atmosphere={"radiative_timescale_days": tau_rad, "drag_timescale_days": tau_drag}))
    nu = model.process("hyperdiffusion").rates
    linear = model.linear
    np.testing.assert_allclose(linear.vorticity_damping, nu + 1 / (tau_drag * SECONDS_PER_DAY),
                               rtol=1e-15)
    np.testing.assert_allclose(linear.divergence_damping, nu + 1 / (tau_drag * SECONDS_PER_DAY),
                               rtol=1e-15)
    np.testing.assert_allclose(linear.thickness_damping, nu + 1 / (tau_rad * SECONDS_PER_DAY),
                               rtol=1e-15)
    l = model.grid.degree
    np.testing.assert_allclose(linear.laplacian_factor,
                               l * (l + 1) / model.config.planet.radius_m**2, rtol=1e-15)


def test_run_file_names_its_processes_and_their_sources(small_w6_run):
    assert small_w6_run.attrs["processes"] == "hyperdiffusion"
    assert small_w6_run.attrs["hyperdiffusion"].startswith("del^4")
