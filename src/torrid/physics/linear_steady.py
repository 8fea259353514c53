"""The steady state of the shallow-water equations linearised about rest, solved directly.

About a resting layer of mean geopotential Phi_mean on a sphere of radius a rotating at Omega,
with the implicit (diagonal) rates of the processes a_zeta, a_delta, a_phi
(:class:`torrid.physics.linear.LinearTerms`) and a steady forcing F (the explicit tendency of
the processes at rest: the relaxation's source), the linear problem is

    d zeta  / dt = -div(f v)                  - a_zeta zeta  + F_zeta
    d delta / dt =  k.curl(f v) - lap(phi')   - a_delta delta + F_delta
    d phi'  / dt = -Phi_mean delta            - a_phi phi'   + F_phi

with f = 2 Omega sin(lat). Every term but the Coriolis ones is diagonal in spectral space. With
U = u cos(lat), V = v cos(lat) and mu = sin(lat), -div(f v) = -f delta - 2 Omega V / a and
k.curl(f v) = f zeta - 2 Omega U / a, and the orthonormal harmonics obey (the classical
recurrences, e.g. Abramowitz & Stegun 1964, 8.5.3-8.5.4, in orthonormal form)

    mu Y_l^m = eps_{l+1} Y_{l+1}^m + eps_l Y_{l-1}^m,
    (1 - mu^2) d Y_l^m / d mu = -l eps_{l+1} Y_{l+1}^m + (l + 1) eps_l Y_{l-1}^m,
    eps_l = eps_l^m = sqrt((l^2 - m^2) / (4 l^2 - 1)),

(the Condon-Shortley phase is the same for every l of one m, so it drops out). With the stream
function psi_l = -a^2 zeta_l / (l (l + 1)) and the velocity potential chi_l likewise from
delta_l, the Coriolis tendencies of degree n and order m are

    d zeta_n  / dt = 2 Omega i m / (n (n + 1)) zeta_n
                     - 2 Omega [(n + 1) / n eps_n delta_{n-1} + n / (n + 1) eps_{n+1} delta_{n+1}]
    d delta_n / dt = 2 Omega i m / (n (n + 1)) delta_n
                     + 2 Omega [(n + 1) / n eps_n zeta_{n-1} + n / (n + 1) eps_{n+1} zeta_{n+1}]

(the same projection onto degrees <= N as the model's transforms make: ``tests`` check them
against the model's explicit tendency). So degree l couples with l +/- 1 at the same m only:
the operator is block diagonal, one block per m, and with the unknowns of each degree side by
side, (zeta_l, delta_l, phi'_l), each block is banded with 4 sub- and 4 super-diagonals. The
steady state solves A x = -F block by block (LAPACK's banded LU, zgbsv, through scipy: the
solver of :func:`scipy.linalg.solve_banded`).

Degree 0: zeta_0 = delta_0 = 0 (no such fields); the global mean phi'_0 relaxes to its
equilibrium, or stays 0 (the mass is conserved) when nothing damps it.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np
import scipy.linalg
import scipy.linalg.lapack
import scipy.sparse

from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY

if TYPE_CHECKING:  # only for annotations (importing it here would close an import cycle)
    from torrid.physics.linear import LinearTerms

#: The two solvers (``numerics.solver``) and starts (``run.initial_state``) of a planet run.
SOLVERS = ("stepping", "linear")
INITIAL_STATES = ("rest", "linear")

#: Sub- and super-diagonals of a block with the unknowns (zeta_l, delta_l, phi'_l) per degree.
BANDWIDTH = 4
FIELDS = 3


def _banded_solver():
    """LAPACK's complex banded solver zgbsv (through scipy), the core of
    :func:`scipy.linalg.solve_banded` without its per-call checks (43 calls at T42)."""
    return scipy.linalg.lapack.get_lapack_funcs("gbsv", dtype=np.complex128)


class SingularProblemError(ValueError):
    """The steady linear problem has no unique solution (one-line message)."""


def recurrence_epsilon(degree: np.ndarray, order: np.ndarray) -> np.ndarray:
    """eps_l^m = sqrt((l^2 - m^2) / (4 l^2 - 1)) of mu Y_l^m = eps_{l+1} Y_{l+1} + eps_l Y_{l-1}
    (orthonormal harmonics; 0 for l = m, where Y_{l-1}^m does not exist)."""
    l = np.asarray(degree, dtype=float)
    m = np.asarray(order, dtype=float)
    return np.sqrt(np.maximum(l * l - m * m, 0.0) / (4 * l * l - 1))


def coriolis_coefficients(degree: np.ndarray, order: np.ndarray, truncation: int,
                          rotation_rate_s: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Coriolis coupling of coefficient (n, m) with (n, m), (n - 1, m) and (n + 1, m), per
    coefficient (s^-1): ``diagonal`` 2 Omega m / (n (n + 1)) (times i), ``lower``
    2 Omega (n + 1) / n eps_n and ``upper`` 2 Omega n / (n + 1) eps_{n+1} (0 at n = N, the
    truncation). ``zeta_n`` gets -lower delta_{n-1} - upper delta_{n+1}, ``delta_n`` gets
    +lower zeta_{n-1} + upper zeta_{n+1} (module docstring). Degree 0 gets zeros."""
    n = np.asarray(degree, dtype=float)
    m = np.asarray(order, dtype=float)
    two_omega = 2.0 * rotation_rate_s
    positive = n > 0
    safe = np.where(positive, n, 1.0)
    diagonal = np.where(positive, two_omega * m / (safe * (safe + 1)), 0.0)
    lower = np.where(positive, two_omega * (safe + 1) / safe * recurrence_epsilon(n, m), 0.0)
    upper = np.where(n < truncation,
                     two_omega * n / (n + 1) * recurrence_epsilon(n + 1, m), 0.0)
    return diagonal, lower, upper


def to_vector(state: np.ndarray) -> np.ndarray:
    """State (3, ncoeff) -> unknowns (3 ncoeff,), the three fields of a coefficient together
    (so the blocks of each m are contiguous, in the coefficient order m, then l)."""
    return np.ascontiguousarray(np.asarray(state).T).ravel()


def to_state(vector: np.ndarray) -> np.ndarray:
    """Inverse of :func:`to_vector`."""
    return np.ascontiguousarray(vector.reshape(-1, FIELDS).T)


class SteadyLinearProblem:
    """The linear operator A (d x / dt = A x + F) of one planet and grid, by blocks of m.

    Parameters
    ----------
    degree, order : ndarray (ncoeff,)
        l and m of every coefficient, in the grid's order (m, then l).
    truncation : int
        N.
    radius_m : float
        a (m).
    rotation_rate_s : float
        Omega (rad s^-1, signed; 0: no rotation).
    terms : LinearTerms
        Gravity waves (k_l, Phi_mean) and the summed implicit rates (s^-1).
    """

    def __init__(self, degree: np.ndarray, order: np.ndarray, truncation: int, radius_m: float,
                 rotation_rate_s: float, terms: LinearTerms):
        self.degree = np.asarray(degree)
        self.order = np.asarray(order)
        self.truncation = int(truncation)
        self.radius_m = float(radius_m)
        self.rotation_rate_s = float(rotation_rate_s)
        self.terms = terms
        self.band = self._band()
        starts = np.flatnonzero(self.degree == self.order)
        self.block_starts = FIELDS * np.append(starts, self.degree.size)

    @classmethod
    def for_grid(cls, grid, radius_m: float, rotation_rate_s: float,
                 terms: LinearTerms) -> "SteadyLinearProblem":
        """The problem on a :class:`torrid.physics.grid.SpectralGrid`."""
        return cls(grid.degree, grid.order, grid.truncation, radius_m, rotation_rate_s, terms)

    # --- the operator in band storage -----------------------------------------------------
    def _band(self) -> np.ndarray:
        """A in LAPACK band storage, ab[BANDWIDTH + i - j, j] = A[i, j] (9, 3 ncoeff)."""
        t = self.terms
        size = self.degree.size
        diagonal, lower, upper = coriolis_coefficients(self.degree, self.order, self.truncation,
                                                       self.rotation_rate_s)

        def per(value):
            return np.broadcast_to(np.asarray(value, dtype=float), (size,))

        ab = np.zeros((2 * BANDWIDTH + 1, FIELDS * size), dtype=complex)

        def put(row_field, col_field, offset, values):
            """A[3 p + row_field, 3 (p + offset) + col_field] = values[p]."""
            d = BANDWIDTH + row_field - col_field - FIELDS * offset
            p = np.arange(size)
            q = p + offset
            ok = (q >= 0) & (q < size)
            ab[d, FIELDS * q[ok] + col_field] = np.asarray(values)[ok]

        z, dv, ph = VORTICITY, DIVERGENCE, GEOPOTENTIAL
        put(z, z, 0, 1j * diagonal - per(t.vorticity_damping))
        put(z, dv, -1, -lower)
        put(z, dv, 1, -upper)
        put(dv, dv, 0, 1j * diagonal - per(t.divergence_damping))
        put(dv, ph, 0, per(t.laplacian_factor))
        put(dv, z, -1, lower)
        put(dv, z, 1, upper)
        put(ph, dv, 0, -t.mean_geopotential * np.ones(size))
        put(ph, ph, 0, -per(t.thickness_damping))
        return ab

    def block_band(self, m: int) -> np.ndarray:
        """The band storage of the block of order ``m`` (a view)."""
        return self.band[:, self.block_starts[m]:self.block_starts[m + 1]]

    def block(self, m: int, *, rest_fields: bool = False) -> scipy.sparse.csr_matrix:
        """The block of order ``m`` as a sparse matrix (s^-1), unknowns (zeta_l, delta_l,
        phi'_l) for l = m..N. For m = 0 the rows and columns of zeta_0 and delta_0 (which are
        no fields) are left out unless ``rest_fields``."""
        ab = self.block_band(m)
        size = ab.shape[1]
        offsets = BANDWIDTH - np.arange(2 * BANDWIDTH + 1)  # band row k: A[j - offset_k, j]
        matrix = scipy.sparse.dia_matrix((ab, offsets), shape=(size, size)).tocsr()
        if m == 0 and not rest_fields:
            keep = np.arange(2, size)
            matrix = matrix[keep][:, keep]
        return matrix

    # --- free modes ---------------------------------------------------------------------------
    def energy_scaling(self, m: int) -> np.ndarray:
        """Weights d of the unknowns of block ``m`` (without zeta_0, delta_0) such that, with
        x = d y, the undamped operator D^-1 A D is skew-Hermitian: sqrt(k_l) = sqrt(l (l + 1))
        / a for zeta_l and delta_l, sqrt(Phi_mean) for phi'_l (y . y* is then twice the energy
        of the linear problem per unit mass, which its Coriolis and gravity-wave terms
        conserve)."""
        l = np.repeat(np.arange(m, self.truncation + 1), FIELDS).astype(float)
        k = l * (l + 1) / self.radius_m**2
        geopotential = np.arange(l.size) % FIELDS == GEOPOTENTIAL
        d = np.where(geopotential, np.sqrt(self.terms.mean_geopotential), np.sqrt(k))
        return d[2:] if m == 0 else d

    def frequencies(self, m: int) -> np.ndarray:
        """Frequencies omega (rad s^-1, ascending) of the free modes of block ``m``, fields
        ~ exp(i (m lon - omega t)): eigenvalues i lambda of the undamped operator, from
        :func:`scipy.linalg.eig_banded` on the Hermitian band i D^-1 A D
        (:meth:`energy_scaling`). Only for operators without damping (ValueError otherwise)."""
        t = self.terms
        if any(np.any(np.asarray(r) != 0) for r in (t.vorticity_damping, t.divergence_damping,
                                                      t.thickness_damping)):
            raise ValueError("free modes: the operator has damping (not Hermitian)")
        ab = self.block_band(m)
        if m == 0:
            ab = ab[:, 2:]
        d = self.energy_scaling(m)
        size = d.size
        upper = np.zeros((BANDWIDTH + 1, size), dtype=complex)
        for row in range(BANDWIDTH + 1):  # H[i, j] = i A[i, j] d[j] / d[i] for i <= j
            offset = BANDWIDTH - row
            j = np.arange(offset, size)
            upper[row, j] = 1j * ab[row, j] * d[j] / d[j - offset]
        return scipy.linalg.eig_banded(upper, lower=False, eigvals_only=True)

    # --- the steady state -------------------------------------------------------------------
    def solve(self, forcing: np.ndarray) -> np.ndarray:
        """The steady state x of A x + F = 0 (state layout (3, ncoeff)).

        Raises
        ------
        SingularProblemError
            If a block is singular (an undamped mode the forcing could drive without bound).
        """
        rhs = -to_vector(forcing).astype(complex)
        # LAPACK's banded LU (zgbsv) wants BANDWIDTH extra rows on top for the fill-in
        ab = np.zeros((3 * BANDWIDTH + 1, self.band.shape[1]), dtype=complex)
        ab[BANDWIDTH:] = self.band
        diagonal = 2 * BANDWIDTH
        # degree 0 (the first three unknowns): zeta_0 = delta_0 = 0; phi'_0 conserved if undamped
        for index in (VORTICITY, DIVERGENCE):
            ab[:, index] = 0.0
            ab[diagonal, index] = 1.0
            rhs[index] = 0.0
        if ab[diagonal, GEOPOTENTIAL] == 0.0:
            ab[diagonal, GEOPOTENTIAL] = 1.0
            rhs[GEOPOTENTIAL] = 0.0
        solution = np.empty_like(rhs)
        gbsv = _banded_solver()
        for m in range(self.truncation + 1):
            lo, hi = self.block_starts[m], self.block_starts[m + 1]
            _, _, block, info = gbsv(BANDWIDTH, BANDWIDTH, ab[:, lo:hi], rhs[lo:hi],
                                     overwrite_ab=True, overwrite_b=True)
            if info != 0 or not np.all(np.isfinite(block)):
                raise SingularProblemError(
                    f"the steady linear problem is singular at zonal wavenumber m = {m} "
                    "(a mode without damping)")
            solution[lo:hi] = block
        return to_state(solution)

    def residual(self, state: np.ndarray, forcing: np.ndarray) -> float:
        """max |A x + F| / max |F| (a check of a solution)."""
        x = to_vector(state)
        ax = np.zeros_like(x, dtype=complex)
        n = x.size
        for k in range(2 * BANDWIDTH + 1):
            offset = BANDWIDTH - k  # band row k holds A[j - offset, j]
            j = np.arange(max(0, offset), min(n, n + offset))
            ax[j - offset] += self.band[k, j] * x[j]
        f = to_vector(forcing)
        return float(np.abs(ax + f).max() / max(np.abs(f).max(), 1e-300))
