"""The implicit part: gravity-wave terms and linear damping, diagonal in spectral space.

For each coefficient of total wavenumber l, with k_l = l (l + 1) / a^2,

    d zeta  / dt = -(nu_l + r_drag) zeta
    d delta / dt = -(nu_l + r_drag) delta + k_l phi'
    d phi'  / dt = -Phi_mean delta - (nu_l + r_rad) phi'

where nu_l is the hyperdiffusion rate, r_drag = 1 / tau_drag the Rayleigh drag rate and
r_rad = 1 / tau_rad the Newtonian relaxation rate (all s^-1, zero when off). The implicit stage
equation (I - c L) x = b is solved in closed form (a 2 x 2 system for delta and phi' per l).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from torrid.physics.tendencies import DIVERGENCE, GEOPOTENTIAL, VORTICITY


def hyperdiffusion_rates(degree: np.ndarray, truncation: int, efolding_time_s: float,
                         order: int) -> np.ndarray:
    """Rates nu_l (s^-1) of a del^(2 p) hyperdiffusion, 1 / efolding_time_s at l = truncation.

    nu_l = [l (l + 1) / (N (N + 1))]^p / tau, so the smallest resolved scale decays in tau and
    larger scales far more slowly (scale-selective). tau = inf switches it off.
    """
    if not efolding_time_s > 0:
        raise ValueError(f"hyperdiffusion e-folding time must be > 0 s, got {efolding_time_s}")
    l = np.asarray(degree, dtype=float)
    n = float(truncation)
    return (l * (l + 1) / (n * (n + 1))) ** order / efolding_time_s


@dataclass(frozen=True, eq=False)
class LinearTerms:
    """Diagonal implicit operator (see module docstring).

    Parameters
    ----------
    laplacian_factor : ndarray
        k_l = l (l + 1) / a^2 per coefficient (m^-2).
    mean_geopotential : float
        Phi_mean (m^2 s^-2).
    hyperdiffusion : ndarray
        nu_l per coefficient (s^-1).
    drag_rate, relaxation_rate : float
        1 / tau_drag and 1 / tau_rad (s^-1), 0 when off.
    """

    laplacian_factor: np.ndarray
    mean_geopotential: float
    hyperdiffusion: np.ndarray
    drag_rate: float = 0.0
    relaxation_rate: float = 0.0

    @property
    def momentum_damping(self) -> np.ndarray:
        return self.hyperdiffusion + self.drag_rate

    @property
    def thickness_damping(self) -> np.ndarray:
        return self.hyperdiffusion + self.relaxation_rate

    def apply(self, state: np.ndarray, out: np.ndarray) -> np.ndarray:
        """out = L state."""
        am, ap = self.momentum_damping, self.thickness_damping
        out[VORTICITY] = -am * state[VORTICITY]
        out[DIVERGENCE] = -am * state[DIVERGENCE] + self.laplacian_factor * state[GEOPOTENTIAL]
        out[GEOPOTENTIAL] = -self.mean_geopotential * state[DIVERGENCE] - ap * state[GEOPOTENTIAL]
        return out

    def solver(self, c: float) -> "ImplicitSolver":
        """Precomputed solver of (I - c L) x = b for a fixed c = dt * a_ii (s)."""
        am, ap = self.momentum_damping, self.thickness_damping
        k, phi = self.laplacian_factor, self.mean_geopotential
        det = (1 + c * am) * (1 + c * ap) + c * c * k * phi
        return ImplicitSolver(
            vorticity=1.0 / (1 + c * am),
            dd=(1 + c * ap) / det, dp=c * k / det,
            pd=-c * phi / det, pp=(1 + c * am) / det,
        )


@dataclass(frozen=True, eq=False)
class ImplicitSolver:
    """Closed-form inverse of I - c L: x_zeta = vorticity b_zeta and a 2 x 2 block for (delta, phi')."""

    vorticity: np.ndarray
    dd: np.ndarray
    dp: np.ndarray
    pd: np.ndarray
    pp: np.ndarray

    def __call__(self, rhs: np.ndarray, out: np.ndarray) -> np.ndarray:
        d, p = rhs[DIVERGENCE], rhs[GEOPOTENTIAL]
        out[VORTICITY] = self.vorticity * rhs[VORTICITY]
        new_d = self.dd * d + self.dp * p
        out[GEOPOTENTIAL] = self.pd * d + self.pp * p
        out[DIVERGENCE] = new_d
        return out
