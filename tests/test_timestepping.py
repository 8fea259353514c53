"""The IMEX Runge-Kutta schemes (ARS(4,4,3) and IMEX(3,3,2)): tableaux, order conditions,
stability, measured order, for every selectable scheme (``numerics.time_scheme``).

Sources:

* Ascher, Ruuth & Spiteri (1997), "Implicit-explicit Runge-Kutta methods for time-dependent
  partial differential equations", Appl. Numer. Math. 25, 151-167, section 2.8: the (4,4,3)
  scheme. The coefficients below are typed from memory of that paper (not re-checked against a
  copy); the order conditions checked after them are independent of memory.
* Order conditions up to order 3 of Runge-Kutta methods (Butcher trees; Hairer, Norsett & Wanner,
  "Solving Ordinary Differential Equations I", 1993, section II.2) and the coupling conditions of
  additive/partitioned Runge-Kutta pairs (Kennedy & Carpenter 2003, Appl. Numer. Math. 44,
  139-181; also ARS 1997 section 2): for order 3 every mix of (b, A, c) from the two tableaux must
  satisfy sum b = 1, b.c = 1/2, b.(c c') = 1/3, b.A c' = 1/6.
* Stability functions of the scalar test equation y' = (lambda_E + lambda_I) y with the explicit
  and implicit parts: R = e_s^T (I - z_E A_E - z_I A_I)^-1 1 for this stiffly accurate pair (the
  new value is the last stage). L-stability of the implicit part: |R(z)| <= 1 on Re z <= 0 and
  R(z) -> 0 for z -> -inf (Hairer & Wanner, "Solving ODEs II", 1996, section IV.3).
* IMEX(3,3,2) is this project's pair (torrid.physics.timestepping.imex332_tableaux): its order
  conditions (order 2: sum b = 1, b.c = 1/2 for both parts and each mix) are checked here in
  floating point; its explicit stability polynomial 1 + z + z^2/2 + z^3/4 has the widest
  imaginary-axis interval, 2, of any three-stage second-order Runge-Kutta method (Kinnmark &
  Gray 1984, Math. Comput. Simul. 26, 181-188; from memory); the limit is measured below.
* Measured order on a smooth unsteady flow: Williamson, Drake, Hack, Jakob & Swarztrauber (1992)
  test case 6 (Rossby-Haurwitz wave), which is not steady in the shallow-water equations.
"""

import math
from fractions import Fraction as F
from itertools import product

import numpy as np
import pytest

import torrid
from torrid.physics.timestepping import (ARS443, COURANT_LIMIT, EXPLICIT,
                                        EXPLICIT_DAMPING_LIMIT, IMEX332, IMPLICIT, NODES, ORDER,
                                        SCHEMES)
from torrid.workflow.setup import build_model

# ARS(4,4,3) from memory of Ascher, Ruuth & Spiteri (1997), section 2.8, padded to 5 stages.
ARS_EXPLICIT = [
    [0, 0, 0, 0, 0],
    [F(1, 2), 0, 0, 0, 0],
    [F(11, 18), F(1, 18), 0, 0, 0],
    [F(5, 6), F(-5, 6), F(1, 2), 0, 0],
    [F(1, 4), F(7, 4), F(3, 4), F(-7, 4), 0],
]
ARS_IMPLICIT = [
    [0, 0, 0, 0, 0],
    [0, F(1, 2), 0, 0, 0],
    [0, F(1, 6), F(1, 2), 0, 0],
    [0, F(-1, 2), F(1, 2), F(1, 2), 0],
    [0, F(3, 2), F(-3, 2), F(1, 2), F(1, 2)],
]
TABLEAU_TOL = 4 * np.finfo(float).eps  # the float tableaux are correctly rounded fractions


def _stability(z_explicit, z_implicit, scheme=ARS443):
    """Amplification factor of one step for y' = (lambda_E + lambda_I) y, z = lambda dt."""
    n = len(scheme.explicit)
    stages = np.linalg.solve(np.eye(n) - z_explicit * scheme.explicit
                             - z_implicit * scheme.implicit, np.ones(n, dtype=complex))
    return stages[-1]  # padded form: the last row gives the new value


ALL_SCHEMES = pytest.mark.parametrize("scheme", list(SCHEMES.values()), ids=list(SCHEMES))


# --- the tableau -------------------------------------------------------------------------------
def test_tableau_matches_ascher_ruuth_spiteri_1997():
    np.testing.assert_allclose(EXPLICIT, np.array(ARS_EXPLICIT, dtype=float), rtol=0,
                               atol=TABLEAU_TOL)
    np.testing.assert_allclose(IMPLICIT, np.array(ARS_IMPLICIT, dtype=float), rtol=0,
                               atol=TABLEAU_TOL)
    assert ORDER == 3


def test_structure_explicit_lower_triangular_implicit_sdirk():
    assert np.all(np.triu(EXPLICIT) == 0)  # explicit: strictly lower triangular
    assert np.all(np.triu(IMPLICIT, 1) == 0)  # implicit: DIRK
    assert np.all(np.diag(IMPLICIT)[1:] == 0.5)  # singly diagonal, gamma = 1/2 (ARS 1997)
    assert IMPLICIT[0, 0] == 0 and np.all(IMPLICIT[:, 0] == 0)  # first stage explicit
    # stiffly accurate: the last rows are the weights, the explicit one does not use stage 5
    assert EXPLICIT[-1, -1] == 0


def test_nodes_are_row_sums_of_both_tableaux():
    np.testing.assert_allclose(NODES, EXPLICIT.sum(axis=1), rtol=0, atol=TABLEAU_TOL)
    np.testing.assert_allclose(NODES, IMPLICIT.sum(axis=1), rtol=0, atol=TABLEAU_TOL)


def _order_conditions(b, a, c, c2):
    """Residuals of the order-1..3 conditions for weights b, matrix a, nodes c, c2 (exact)."""
    n = len(b)
    return [
        sum(b) - 1,
        sum(b[i] * c[i] for i in range(n)) - F(1, 2),
        sum(b[i] * c[i] * c2[i] for i in range(n)) - F(1, 3),
        sum(b[i] * a[i][j] * c2[j] for i in range(n) for j in range(n)) - F(1, 6),
    ]


@pytest.mark.parametrize("name", ["explicit", "implicit"])
def test_each_tableau_is_third_order(name):
    """Order conditions up to 3 for each tableau alone, in exact rational arithmetic."""
    a = ARS_EXPLICIT if name == "explicit" else ARS_IMPLICIT
    b = a[-1]  # stiffly accurate
    c = [sum(row) for row in a]
    assert _order_conditions(b, a, c, c) == [0, 0, 0, 0]


def test_coupling_conditions_for_order_3():
    """Every mix of weights, matrix and nodes from the pair satisfies the order-3 conditions."""
    tableaux = {"E": ARS_EXPLICIT, "I": ARS_IMPLICIT}
    for kb, ka, kc, kc2 in product("EI", repeat=4):
        b = tableaux[kb][-1]
        c = [sum(r) for r in tableaux[kc]]
        c2 = [sum(r) for r in tableaux[kc2]]
        assert _order_conditions(b, tableaux[ka], c, c2) == [0, 0, 0, 0], (kb, ka, kc, kc2)


def test_float_tableaux_satisfy_order_conditions():
    """The same conditions on the arrays the stepper uses (float round-off only)."""
    for b_tab, a_tab in product((EXPLICIT, IMPLICIT), repeat=2):
        b, c = b_tab[-1], NODES
        res = [b.sum() - 1, b @ c - 0.5, b @ (c * c) - 1 / 3, b @ a_tab @ c - 1 / 6]
        assert np.max(np.abs(res)) < 16 * np.finfo(float).eps


@ALL_SCHEMES
def test_padded_structure_and_order_conditions_in_floating_point(scheme):
    """Explicit strictly lower triangular, implicit singly diagonal (zero first column: the
    first stage is explicit), nodes the row sums of both, and the order conditions up to the
    scheme's order for every mix of the two tableaux (Kennedy & Carpenter 2003)."""
    e, i = scheme.explicit, scheme.implicit
    assert np.all(np.triu(e) == 0) and np.all(np.triu(i, 1) == 0)
    assert np.all(i[:, 0] == 0)
    diagonal = np.diag(i)[1:]
    assert np.all((diagonal == scheme.gamma) | (diagonal == 0)) and diagonal[-1] in (0, scheme.gamma)
    np.testing.assert_allclose(e.sum(axis=1), i.sum(axis=1), rtol=0, atol=TABLEAU_TOL)
    c = scheme.nodes
    for b_tab, a_tab in product((e, i), repeat=2):
        b = b_tab[-1]
        res = [b.sum() - 1, b @ c - 0.5]
        if scheme.order >= 3:
            res += [b @ (c * c) - 1 / 3, b @ a_tab @ c - 1 / 6]
        assert np.max(np.abs(res)) < 64 * np.finfo(float).eps
    assert scheme.evaluations == {"ars443": 4, "imex332": 3}[scheme.name]


def test_imex332_explicit_stability_polynomial_is_kinnmark_gray():
    """R_E(z) = 1 + z + z^2/2 + z^3/4 exactly (a degree-3 polynomial; Kinnmark & Gray 1984)."""
    for z in (0.3, -1.1 + 0.4j, 1.7j, -2.0):
        assert abs(_stability(z, 0.0, IMEX332) - (1 + z + z**2 / 2 + z**3 / 4)) < 1e-12


@ALL_SCHEMES
def test_explicit_part_stable_on_imaginary_axis_beyond_courant_limit(scheme):
    """|R(i y)| <= 1 for 0 <= y <= the scheme's courant_limit and stability_limit (measured
    limit printed: about 1.57 for ARS(4,4,3), 2.0 for IMEX(3,3,2))."""
    y = np.linspace(0.0, 3.0, 30001)
    amp = np.array([abs(_stability(1j * yy, 0.0, scheme)) for yy in y])
    unstable = y[amp > 1 + 1e-12]  # 1e-12: round-off of a 5 x 5 solve, far below any instability
    limit = float(unstable[0]) if unstable.size else math.inf
    print(f"\nexplicit {scheme.name} imaginary-axis stability limit: {limit:.4f}; "
          f"courant_limit = {scheme.courant_limit}; stability_limit = {scheme.stability_limit}")
    assert limit > scheme.courant_limit > scheme.courant_number
    assert limit >= scheme.stability_limit - 1e-3
    assert abs(_stability(1j * scheme.courant_limit, 0.0, scheme)) < 1.0


def test_explicit_stability_polynomial_agrees_with_taylor_to_order_3():
    """ARS(4,4,3): R_E(z) = 1 + z + z^2/2 + z^3/6 + O(z^4): the order shows in the polynomial."""
    for z in (1e-2, 1e-2j, -1e-2 + 5e-3j):
        taylor = 1 + z + z**2 / 2 + z**3 / 6
        assert abs(_stability(z, 0.0) - taylor) < 10 * abs(z) ** 4


@ALL_SCHEMES
def test_implicit_part_is_l_stable(scheme):
    """A-stable on the left half-plane and R_I(z) -> 0 as z -> -inf (like 1/z)."""
    radii = np.logspace(-3, 8, 120)
    angles = np.linspace(np.pi / 2, 3 * np.pi / 2, 181)
    worst = max(abs(_stability(0.0, r * np.exp(1j * t), scheme)) for r in radii for t in angles)
    assert worst <= 1 + 1e-12  # round-off of the 5 x 5 solve
    far = [abs(_stability(0.0, -x, scheme)) for x in (1e4, 1e6, 1e8)]
    print("\nimplicit |R(-1e4)|, |R(-1e6)|, |R(-1e8)| = " + ", ".join(f"{x:.3e}" for x in far))
    assert far[0] < 1e-3 and far[1] < 1e-5 and far[2] < 1e-7
    assert far[2] < far[1] < far[0]


@ALL_SCHEMES
def test_stiff_damping_with_explicit_advection_stays_stable(scheme):
    """Damping (relaxation, drag, hyperdiffusion: real z_I <= 0, any size) together with explicit
    advection up to courant_limit on the imaginary axis is stable: why those terms are implicit."""
    limit = scheme.courant_limit
    zs_e = 1j * np.linspace(-limit, limit, 41)
    zs_i = -np.concatenate(([0.0], np.logspace(-3, 9, 121)))
    worst = max(abs(_stability(ze, zi, scheme)) for ze in zs_e for zi in zs_i)
    assert worst <= 1 + 1e-12
    # and very stiff damping kills the mode within one step whatever the advection (L-stability)
    assert max(abs(_stability(ze, -1e9, scheme)) for ze in zs_e) < 1e-8


def test_imex332_advection_with_implicit_gravity_waves_stays_stable():
    """IMEX(3,3,2) was chosen so that explicit advection up to its courant_limit stays stable
    with implicit terms anywhere in the left half-plane (gravity waves: imaginary z_I, damped
    ones: complex; frozen-coefficient analysis)."""
    zs_e = 1j * np.linspace(-IMEX332.courant_limit, IMEX332.courant_limit, 17)
    radii = np.logspace(-2, 6, 25)
    angles = np.linspace(np.pi / 2, 3 * np.pi / 2, 31)
    worst = max(abs(_stability(ze, r * np.exp(1j * t), IMEX332))
                for ze in zs_e for r in radii for t in angles)
    assert worst <= 1 + 1e-10


@ALL_SCHEMES
def test_explicit_damping_limit_is_inside_the_stable_region(scheme):
    """A damping left to the explicit part (the spatially varying rest of a drag, rate r) is
    stable for r dt <= EXPLICIT_DAMPING_LIMIT together with advection up to courant_limit, with
    or without an implicit uniform part (frozen-coefficient analysis of y' = (-r + i w) y).
    Measured for ARS(4,4,3): the negative real axis is stable to 2.15, and with |w| <= 1.2 to
    1.55; for IMEX(3,3,2) to 2.0 on the real axis, and r = 1.0 with |w| <= 1.6."""
    ws = np.linspace(0.0, scheme.courant_limit, 25)
    rs = np.linspace(0.0, EXPLICIT_DAMPING_LIMIT, 21)
    for implicit in (0.0, -0.5, -5.0, -1e4):
        worst = max(abs(_stability(-r + 1j * w, implicit, scheme)) for r in rs for w in ws)
        assert worst <= 1 + 1e-12, implicit
    if scheme is ARS443:  # the region's edges, as quoted: real axis to 2.15, with advection 1.55
        assert abs(_stability(-2.1, 0.0)) <= 1 < abs(_stability(-2.2, 0.0))
        assert max(abs(_stability(-1.5 + 1j * w, 0.0)) for w in ws) <= 1 + 1e-12
        assert max(abs(_stability(-1.6 + 1j * w, 0.0)) for w in ws) > 1
    else:
        assert abs(_stability(-1.99, 0.0, scheme)) <= 1 < abs(_stability(-2.01, 0.0, scheme))


# --- measured convergence order ----------------------------------------------------------------
CONVERGENCE_TRUNCATION = 21
CONVERGENCE_DAYS = 1.0
CONVERGENCE_DT_S = 600.0


def _final_state(dt_s, scheme):
    cfg = torrid.build_case_config("williamson6", truncation=CONVERGENCE_TRUNCATION,
                                   days=CONVERGENCE_DAYS, output_interval_days=CONVERGENCE_DAYS,
                                   time_step_s=dt_s).replace(numerics={"time_scheme": scheme})
    model = build_model(cfg)
    nsteps = round(CONVERGENCE_DAYS * 86400 / dt_s)
    assert abs(nsteps * dt_s - CONVERGENCE_DAYS * 86400) < 1e-6
    state = model.initial_state
    for k in range(nsteps):
        state = model.stepper.step(state, k * dt_s)
    return state


@pytest.mark.parametrize("scheme", list(SCHEMES))
def test_measured_convergence_order(scheme):
    """Williamson case 6 at T21 for 1 day, dt = 600, 300, 150 s against dt = 37.5 s, for every
    selectable scheme: the measured order is the scheme's (3 for ARS(4,4,3), 2 for IMEX(3,3,2)).

    Why these numbers: the asymptotic regime needs the stiff (implicitly treated) gravity waves
    resolved in time as well: with c = sqrt(g h0) ~ 280 m/s the fastest one has
    c dt sqrt(N (N + 1)) / a ~ 0.6 at dt = 600 s. At dt = 3600 s (gravity-wave Courant number ~3.5)
    the measured order of ARS(4,4,3) drops to ~1.4 (order reduction of IMEX schemes in the stiff
    regime, which costs accuracy but not stability). The reference with dt/16 has (1/16)^p of the
    dt = 600 s error, negligible.
    Acceptance order >= p - 0.5: measured 2.93-3.12 (ARS(4,4,3)) and 1.97-2.07 (IMEX(3,3,2)) per
    component; the margin allows for higher-order terms and the reference's own error while
    excluding the next lower order.
    """
    order = SCHEMES[scheme].order
    reference = _final_state(CONVERGENCE_DT_S / 16, scheme)
    errors = []
    for k in (1, 2, 4):
        state = _final_state(CONVERGENCE_DT_S / k, scheme)
        errors.append([np.linalg.norm(state[i] - reference[i]) / np.linalg.norm(reference[i])
                       for i in range(3)])
    errors = np.array(errors)  # rows: dt, dt/2, dt/4; columns: vorticity, divergence, phi'
    orders = np.log2(errors[:-1] / errors[1:])
    print(f"\n{scheme} on Williamson case 6, T{CONVERGENCE_TRUNCATION}, {CONVERGENCE_DAYS} day:")
    for name, col in zip(("vorticity", "divergence", "geopotential"), range(3)):
        print(f"  {name:12s} rel. errors {errors[:, col]}  orders {orders[:, col]}")
    assert np.all(orders >= order - 0.5)
    assert np.all(orders < order + 0.7)  # and not a higher order than claimed
    # and the errors are small at dt = 600 s: vorticity and phi' measured <= 1e-4 (ARS(4,4,3))
    # and <= 8e-4 (IMEX(3,3,2)) relative. (The divergence of this nearly nondivergent wave is
    # small, its relative error ~1e-2, not bounded.)
    assert errors[0, 0] < 1e-3 and errors[0, 2] < 1e-3
