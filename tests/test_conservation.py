"""Global conservation: mass to round-off, energy drift of an inviscid run bounded.

The shallow-water equations conserve mass, total energy and potential enstrophy (Williamson,
Drake, Hack, Jakob & Swarztrauber 1992, section 3, which defines the normalised invariants the
model reports). In the spectral model the mean thickness is the l = 0 coefficient of phi', whose
tendency is (minus) a divergence: its l = 0 part is multiplied by l (l + 1) = 0, so mass is
conserved exactly up to the round-off of the diagnostic. Energy is conserved by the spatially
discrete model only up to the truncation of the nonlinear terms, and the time scheme adds an
O(dt^p) error (ARS(4,4,3), third order: Ascher, Ruuth & Spiteri 1997; the default IMEX(3,3,2),
second order: tests/test_timestepping.py).
"""

import math

import numpy as np
import pytest

import torrid
from torrid.workflow.driver import integrate
from torrid.workflow.setup import build_model


def _run(case, truncation, days, time_scheme=None, **kwargs):
    cfg = torrid.build_case_config(case, truncation=truncation, days=days,
                                   output_interval_days=kwargs.pop("output_interval_days", 0.25),
                                   **kwargs)
    if time_scheme:  # that scheme at the step fixed at the start (the rule before issue 14)
        cfg = cfg.replace(numerics={"time_scheme": time_scheme, "time_step_rule": "fixed_start"})
    model = build_model(cfg)
    ds, summary = integrate(model, progress=False)
    return model, ds, summary


@pytest.mark.parametrize("case", ["williamson6", "williamson5", "galewsky"])
def test_mass_conserved_to_round_off(case):
    """Case 6 (and, as cheap extras, the mountain case 5 and the perturbed jet) at T31 for 2 days:
    max relative change of the mean thickness < 1e-13 (round-off of a mean of 96 x 48 values of
    ~1e4 m: a few 1e-16; measured <= 1e-15)."""
    _, ds, summary = _run(case, 31, 2.0)
    mass = ds.mean_thickness.values
    change = float(np.max(np.abs(mass - mass[0])) / mass[0])
    print(f"\n{case} T31 2 days: max |mass change| {change:.2e} over {mass.size} outputs")
    assert mass.size == 9
    assert change < 1e-13
    assert abs(summary.mass_change_relative) < 1e-13


ENERGY_DAYS = 2.0


@pytest.fixture(scope="module")
def inviscid_case6():
    """Inviscid case 6 at T42 for 2 days with ARS(4,4,3) (the third-order scheme, whose drift
    shows the spatial part best) at its automatic start step (Courant 1, kept fixed) and 1/2,
    1/4 of it."""
    model, ds, _ = _run("williamson6", 42, ENERGY_DAYS, "ars443", hyperdiffusion_days=math.inf,
                        output_interval_days=1.0)
    dt = model.dt
    runs = {1: (model, ds)}
    for k in (2, 4):
        m, d, _ = _run("williamson6", 42, ENERGY_DAYS, "ars443", hyperdiffusion_days=math.inf,
                       output_interval_days=1.0, time_step_s=dt / k)
        runs[k] = (m, d)
    return runs


def _energy_change(ds):
    e = ds.total_energy.values
    return float((e[-1] - e[0]) / e[0])


def test_inviscid_energy_drift_bounded(inviscid_case6):
    """|dE/E| < 1e-5 over 2 days at T42 with hyperdiffusion off (default step, Courant 1).

    Measured -2.7e-6 (dt = 1490 s), -4.1e-7 (dt/2), -5.6e-8 (dt/4). The bound keeps a 3.7x margin
    over the measurement; a time step out of the stable range or an energy-inconsistent term
    gives errors growing in time by orders of magnitude.
    """
    model, ds = inviscid_case6[1]
    assert model.process("hyperdiffusion").efolding_days == math.inf
    assert np.all(model.process("hyperdiffusion").rates == 0)
    change = _energy_change(ds)
    z = ds.potential_enstrophy.values
    print(f"\ninviscid case 6 T42 {ENERGY_DAYS:g} days, dt {model.dt:.1f} s: dE/E {change:.3e}, "
          f"dZ/Z {(z[-1] - z[0]) / z[0]:.3e}")
    assert abs(change) < 1e-5


def test_inviscid_energy_drift_is_a_high_order_time_error(inviscid_case6):
    """Halving the step cuts the energy drift by more than 4x: it is a time-discretisation error
    of order > 2 (the scheme is third order: 8x expected; measured 6.5x and 7.3x, orders 2.7,
    2.9), not a non-conservation of the spatial discretisation (that part is at most the
    5.6e-8 left at dt/4)."""
    changes = {k: _energy_change(ds) for k, (_, ds) in inviscid_case6.items()}
    r1, r2 = changes[1] / changes[2], changes[2] / changes[4]
    print(f"\ninviscid energy drift dt, dt/2, dt/4: {changes[1]:.3e}, {changes[2]:.3e}, "
          f"{changes[4]:.3e}; ratios {r1:.2f}, {r2:.2f} (orders {math.log2(r1):.2f}, "
          f"{math.log2(r2):.2f})")
    assert r1 > 4 and r2 > 4
    assert abs(changes[4]) < 1e-7
