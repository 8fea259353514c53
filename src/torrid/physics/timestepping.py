"""Semi-implicit (IMEX) Runge-Kutta time stepping.

The scheme is ARS(4,4,3) of Ascher, Ruuth & Spiteri (1997, Appl. Numer. Math. 25, 151-167,
section 2.8): third order, four explicit stages, an L-stable, stiffly accurate SDIRK implicit
part with a_ii = 1/2. The explicit tendencies (advection, nonlinear terms, forcing) are
evaluated at each stage; the linear terms (gravity waves, hyperdiffusion, relaxation, drag) are
solved implicitly, so the step is limited by advection alone and arbitrarily short damping
timescales stay stable and damp (L-stability) rather than oscillate. The method is one-step:
the state at a step boundary is the complete stepper state, so a restart needs nothing else.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable

import numpy as np

if TYPE_CHECKING:  # only a type: the implicit operator imports the processes, which need
    from torrid.physics.linear import LinearTerms  # this module's limits

# Butcher tableaux (rows = stages 0..4); the new state is the last stage (stiffly accurate).
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
#: The explicit part's stability limit on the imaginary axis (|z| = 1.5699, tests): a run whose
#: advective Courant number |v|_max dt sqrt(N (N + 1)) / a exceeds it is stopped as failed.
STABILITY_LIMIT = 1.57
#: Largest Courant number an automatic step may reach before it is shortened (a margin below
#: the stability limit for winds that grow between two output times).
COURANT_LIMIT = 1.2

#: Largest explicit damping rate x step (a linear damping left to the explicit part, such as a
#: spatially varying drag): the scheme's explicit part is stable for rate x dt up to 2.15 on the
#: negative real axis and, with advection at Courant numbers up to COURANT_LIMIT, up to 1.55
#: (frozen-coefficient analysis, tests/test_timestepping.py); 1.0 leaves a margin.
EXPLICIT_DAMPING_LIMIT = 1.0

Tendency = Callable[[np.ndarray, float, np.ndarray], np.ndarray]


class IMEXStepper:
    """Advance ``state`` by ``dt`` with ARS(4,4,3).

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
    """

    def __init__(self, explicit: Tendency, linear: LinearTerms, dt: float, shape: tuple):
        if not dt > 0:
            raise ValueError(f"time step must be > 0 s, got {dt}")
        self.explicit, self.linear, self.dt = explicit, linear, float(dt)
        self.solve = linear.solver(self.dt * IMPLICIT[1, 1])
        nstage = len(NODES)
        self._n = np.zeros((nstage, *shape), dtype=complex)  # explicit tendencies
        self._l = np.zeros((nstage, *shape), dtype=complex)  # linear tendencies
        self._stage = np.zeros(shape, dtype=complex)
        self._rhs = np.zeros(shape, dtype=complex)

    def step(self, state: np.ndarray, time_s: float) -> np.ndarray:
        """Return the state one step later (a new array; ``state`` is not modified)."""
        dt = self.dt
        n, lin, rhs, stage = self._n, self._l, self._rhs, self._stage
        self.explicit(state, time_s, n[0])
        last = len(NODES) - 1
        for i in range(1, last + 1):
            rhs[...] = state
            for j in range(i):
                if EXPLICIT[i, j]:
                    rhs += (dt * EXPLICIT[i, j]) * n[j]
                if IMPLICIT[i, j]:
                    rhs += (dt * IMPLICIT[i, j]) * lin[j]
            self.solve(rhs, stage)
            if i < last:
                self.linear.apply(stage, lin[i])
                self.explicit(stage, time_s + NODES[i] * dt, n[i])
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
