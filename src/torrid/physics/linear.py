"""The implicit part: gravity-wave terms and linear damping, diagonal in spectral space.

For each coefficient of total wavenumber l, with k_l = l (l + 1) / a^2,

    d zeta  / dt = -a_zeta zeta
    d delta / dt = -a_delta delta + k_l phi'
    d phi'  / dt = -Phi_mean delta - a_phi phi'

where a_zeta, a_delta, a_phi (s^-1) are the sums of the processes' implicit rates
(:meth:`torrid.physics.processes.base.Process.implicit_rates`: hyperdiffusion nu_l, Rayleigh
drag 1 / tau_drag, Newtonian relaxation 1 / tau_rad, ...). The implicit stage equation
(I - c L) x = b is solved in closed form (a 2 x 2 system for delta and phi' per l).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterable

import numpy as np

from torrid.physics.processes.base import ImplicitRates
from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY


@dataclass(frozen=True, eq=False)
class LinearTerms:
    """Diagonal implicit operator (see module docstring).

    Parameters
    ----------
    laplacian_factor : ndarray
        k_l = l (l + 1) / a^2 per coefficient (m^-2).
    mean_geopotential : float
        Phi_mean (m^2 s^-2).
    vorticity_damping, divergence_damping, thickness_damping : ndarray
        a_zeta, a_delta, a_phi per coefficient (s^-1).
    """

    laplacian_factor: np.ndarray
    mean_geopotential: float
    vorticity_damping: np.ndarray
    divergence_damping: np.ndarray
    thickness_damping: np.ndarray

    @classmethod
    def from_rates(cls, laplacian_factor: np.ndarray, mean_geopotential: float,
                   rates: Iterable[ImplicitRates | None]) -> "LinearTerms":
        """The operator of the gravity waves plus the sum of the given rates (in order)."""
        total = {name: np.zeros(np.shape(laplacian_factor))
                 for name in ("vorticity", "divergence", "thickness")}
        for rate in rates:
            if rate is None:
                continue
            for name in total:
                value = getattr(rate, name)
                if value is not None:
                    total[name] = total[name] + value
        return cls(laplacian_factor=laplacian_factor, mean_geopotential=mean_geopotential,
                   vorticity_damping=total["vorticity"], divergence_damping=total["divergence"],
                   thickness_damping=total["thickness"])

    def apply(self, state: np.ndarray, out: np.ndarray) -> np.ndarray:
        """out = L state."""
        out[VORTICITY] = -self.vorticity_damping * state[VORTICITY]
        out[DIVERGENCE] = (-self.divergence_damping * state[DIVERGENCE]
                           + self.laplacian_factor * state[GEOPOTENTIAL])
        out[GEOPOTENTIAL] = (-self.mean_geopotential * state[DIVERGENCE]
                             - self.thickness_damping * state[GEOPOTENTIAL])
        return out

    def solver(self, c: float) -> "ImplicitSolver":
        """Precomputed solver of (I - c L) x = b for a fixed c = dt * a_ii (s)."""
        az, ad, ap = self.vorticity_damping, self.divergence_damping, self.thickness_damping
        k, phi = self.laplacian_factor, self.mean_geopotential
        det = (1 + c * ad) * (1 + c * ap) + c * c * k * phi
        return ImplicitSolver(
            vorticity=1.0 / (1 + c * az),
            dd=(1 + c * ap) / det, dp=c * k / det,
            pd=-c * phi / det, pp=(1 + c * ad) / det,
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
