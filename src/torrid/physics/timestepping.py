"""Semi-implicit (IMEX) Runge-Kutta time stepping.

Two schemes are selectable (``numerics.time_scheme``): IMEX(3,3,2), the default (three explicit
evaluations per step, second order, imaginary-axis limit 2; see :func:`imex332_tableaux` and
docs/time-schemes.md for the measurements that chose it), and ARS(4,4,3).

ARS(4,4,3) is of Ascher, Ruuth & Spiteri (1997, Appl. Numer. Math. 25, 151-167,
section 2.8): third order, four explicit stages, an L-stable, stiffly accurate SDIRK implicit
part with a_ii = 1/2. The explicit tendencies (advection, nonlinear terms, forcing) are
evaluated at each stage; the linear terms (gravity waves, hyperdiffusion, relaxation, drag) are
solved implicitly, so the step is limited by advection alone and arbitrarily short damping
timescales stay stable and damp (L-stability) rather than oscillate. The method is one-step:
the state at a step boundary is the complete stepper state, so a restart needs nothing else.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Callable

import numpy as np

if TYPE_CHECKING:  # only a type: the implicit operator imports the processes, which need
    from torrid.physics.linear import LinearTerms  # this module's limits

@dataclass(frozen=True)
class Scheme:
    """An IMEX Runge-Kutta pair in padded form: row 0 is the explicit first stage, the last row
    gives the new value (the weights), so the new state is the last "stage".

    ``explicit[i, i] = 0``; ``implicit[i, i]`` is either the scheme's single diagonal value
    gamma or 0 (the last row of a scheme whose new value needs no solve). The explicit tendency
    is evaluated at every stage but the last: ``evaluations`` per step.
    """

    name: str
    title: str
    explicit: np.ndarray
    implicit: np.ndarray
    order: int
    #: The explicit part's stability limit on the imaginary axis (measured, tests): a run whose
    #: advective Courant number |v|_max dt sqrt(N (N + 1)) / a exceeds it is stopped as failed.
    stability_limit: float
    #: Largest Courant number an automatic step may reach before it is shortened within an
    #: output interval (a margin below the stability limit).
    courant_limit: float
    #: The automatic step's target Courant number (``numerics.courant_number`` unset).
    courant_number: float

    @property
    def nodes(self) -> np.ndarray:
        """c_i, the stage times as fractions of the step."""
        return self.explicit.sum(axis=1)

    @property
    def evaluations(self) -> int:
        """Explicit tendency evaluations per step."""
        return len(self.explicit) - 1

    @property
    def gamma(self) -> float:
        """The single diagonal coefficient of the implicit part."""
        return float(self.implicit[1, 1])


# ARS(4,4,3), Ascher, Ruuth & Spiteri (1997) section 2.8 (rows = stages 0..4; stiffly accurate).
EXPLICIT = np.array([
    [0, 0, 0, 0, 0],
    [1 / 2, 0, 0, 0, 0],
    [11 / 18, 1 / 18, 0, 0, 0],
    [5 / 6, -5 / 6, 1 / 2, 0, 0],
    [1 / 4, 7 / 4, 3 / 4, -7 / 4, 0],
])
IMPLICIT = np.array([
    [0, 0, 0, 0, 0],
    [0, 1 / 2, 0, 0, 0],
    [0, 1 / 6, 1 / 2, 0, 0],
    [0, -1 / 2, 1 / 2, 1 / 2, 0],
    [0, 3 / 2, -3 / 2, 1 / 2, 1 / 2],
])
NODES = EXPLICIT.sum(axis=1)  # c_i: 0, 1/2, 2/3, 1/2, 1
ORDER = 3
STABILITY_LIMIT = 1.57
COURANT_LIMIT = 1.2
ARS443 = Scheme("ars443", "IMEX Runge-Kutta ARS(4,4,3)", EXPLICIT, IMPLICIT, ORDER,
                STABILITY_LIMIT, COURANT_LIMIT, courant_number=1.0)


def imex332_tableaux(c2: float = 0.61, gamma: float = 0.32,
                     a32: float = 1.95) -> tuple[np.ndarray, np.ndarray]:
    """The explicit and implicit tableaux of IMEX(3,3,2) from its three free parameters.

    A pair built for this model (docs/time-schemes.md): three explicit evaluations at
    c = (0, gamma, c2), both parts stiffly accurate (the new value is the last stage), second
    order for each part and coupled (equal nodes), the implicit part an SDIRK with a zero first
    column (so L-stable, as in ARS 1997), and the explicit stability polynomial
    1 + z + z^2/2 + z^3/4, whose imaginary-axis interval, 2, is the largest any three-stage
    second-order method has (Kinnmark & Gray 1984). The free values were chosen by a search for
    the widest stable region of explicit advection (imaginary z_E) with implicit gravity waves
    and damping (z_I anywhere in the left half-plane); every other entry follows from the
    order conditions.
    """
    c1 = gamma
    a21 = 0.25 / (a32 * c1)  # z^3 coefficient a32 a21 a10 = 1/4
    a31 = (0.5 - a32 * c2) / c1  # b . c = 1/2
    explicit = np.array([
        [0, 0, 0, 0],
        [c1, 0, 0, 0],
        [c2 - a21, a21, 0, 0],
        [1 - a31 - a32, a31, a32, 0],
    ])
    i32 = (0.5 - gamma - (1 - gamma) * c1) / (c2 - c1)  # b . c = 1/2, sum b = 1
    implicit = np.array([
        [0, 0, 0, 0],
        [0, gamma, 0, 0],
        [0, c2 - gamma, gamma, 0],
        [0, 1 - gamma - i32, i32, gamma],
    ])
    return explicit, implicit


IMEX332 = Scheme("imex332", "IMEX Runge-Kutta (3,3,2), three evaluations, L-stable",
                 *imex332_tableaux(), order=2, stability_limit=2.0, courant_limit=1.6,
                 courant_number=1.2)

#: The selectable schemes (``numerics.time_scheme``).
SCHEMES = {scheme.name: scheme for scheme in (IMEX332, ARS443)}
#: The default (chosen by measurement: docs/time-schemes.md).
DEFAULT_SCHEME = "imex332"

#: Largest explicit damping rate x step (a linear damping left to the explicit part, such as a
#: spatially varying drag): the explicit parts are stable for rate x dt up to 2.15 (ARS443) and
#: 2.0 (IMEX332) on the negative real axis and, with advection at Courant numbers up to the
#: schemes' courant_limit, beyond 1.0 (frozen-coefficient analysis, tests/test_timestepping.py).
EXPLICIT_DAMPING_LIMIT = 1.0

Tendency = Callable[[np.ndarray, float, np.ndarray], np.ndarray]


class IMEXStepper:
    """Advance ``state`` by ``dt`` with an IMEX Runge-Kutta :class:`Scheme`.

    Parameters
    ----------
    explicit : callable (state, time_s, out) -> out
        Explicit tendency.
    linear : LinearTerms
        Implicit linear operator.
    dt : float
        Time step (s).
    shape : tuple
        Shape of the complex state array.
    scheme : Scheme
        The tableaux (default ARS(4,4,3)).
    """

    def __init__(self, explicit: Tendency, linear: LinearTerms, dt: float, shape: tuple,
                 scheme: Scheme = ARS443):
        if not dt > 0:
            raise ValueError(f"time step must be > 0 s, got {dt}")
        self.explicit, self.linear, self.dt = explicit, linear, float(dt)
        self.scheme = scheme
        self.solve = linear.solver(self.dt * scheme.gamma)
        nstage = len(scheme.explicit)
        self._n = np.zeros((nstage, *shape), dtype=complex)  # explicit tendencies
        self._l = np.zeros((nstage, *shape), dtype=complex)  # linear tendencies
        self._stage = np.zeros(shape, dtype=complex)
        self._rhs = np.zeros(shape, dtype=complex)

    @property
    def evaluations(self) -> int:
        """Explicit tendency evaluations per step."""
        return self.scheme.evaluations

    def step(self, state: np.ndarray, time_s: float) -> np.ndarray:
        """Return the state one step later (a new array; ``state`` is not modified)."""
        dt = self.dt
        ex, im, nodes = self.scheme.explicit, self.scheme.implicit, self.scheme.nodes
        n, lin, rhs, stage = self._n, self._l, self._rhs, self._stage
        self.explicit(state, time_s, n[0])
        last = len(nodes) - 1
        for i in range(1, last + 1):
            rhs[...] = state
            for j in range(i):
                if ex[i, j]:
                    rhs += (dt * ex[i, j]) * n[j]
                if im[i, j]:
                    rhs += (dt * im[i, j]) * lin[j]
            if im[i, i]:
                self.solve(rhs, stage)
            else:
                stage[...] = rhs
            if i < last:
                self.linear.apply(stage, lin[i])
                self.explicit(stage, time_s + nodes[i] * dt, n[i])
        return stage.copy()


def automatic_time_step(max_speed_m_s: float, radius_m: float, truncation: int,
                        courant_number: float) -> float:
    """Time step (s) giving the advective Courant number |v|_max dt sqrt(N (N + 1)) / a.

    sqrt(N (N + 1)) / a is the largest wavenumber of the truncation, so this bounds the explicit
    advection eigenvalues by ``courant_number`` (the scheme is stable to about 1.57 on the
    imaginary axis, :data:`COURANT_LIMIT` leaves a margin).
    """
    if not max_speed_m_s > 0:
        raise ValueError(f"reference wind speed must be > 0 m/s, got {max_speed_m_s}")
    return courant_number * radius_m / (np.sqrt(truncation * (truncation + 1.0)) * max_speed_m_s)


def courant_number(max_speed_m_s: float, dt_s: float, radius_m: float, truncation: int) -> float:
    """Advective Courant number of a wind speed at a time step (see :func:`automatic_time_step`)."""
    return max_speed_m_s * dt_s * np.sqrt(truncation * (truncation + 1.0)) / radius_m
