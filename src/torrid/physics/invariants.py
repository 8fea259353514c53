"""Global integrals of the shallow-water state (Williamson et al. 1992, section 3, eqs. 136-139).

All are area means over the sphere (the papers' normalised integrals I(.) times a constant that
cancels in relative changes), computed with the exact Gauss-Legendre quadrature.
"""

from __future__ import annotations

import numpy as np

from torrid.physics.grid import SpectralGrid


def mean_thickness(grid: SpectralGrid, thickness_m: np.ndarray) -> float:
    """Global-mean layer thickness h - h_s (m): the mass per unit area divided by density."""
    return grid.global_mean(thickness_m)


def total_energy(grid: SpectralGrid, thickness_m: np.ndarray, u: np.ndarray, v: np.ndarray,
                 surface_height_m: np.ndarray, gravity_m_s2: float) -> float:
    """Global mean of h* |v|^2 / 2 + g (h^2 - h_s^2) / 2 (m^3 s^-2), h* = h - h_s the thickness."""
    h = thickness_m + surface_height_m
    density = 0.5 * thickness_m * (u * u + v * v) + 0.5 * gravity_m_s2 * (h * h - surface_height_m**2)
    return grid.global_mean(density)


def potential_enstrophy(grid: SpectralGrid, thickness_m: np.ndarray, vorticity: np.ndarray,
                        coriolis: np.ndarray) -> float:
    """Global mean of (zeta + f)^2 / (2 h*) (m^-1 s^-2)."""
    return grid.global_mean((vorticity + coriolis) ** 2 / (2 * thickness_m))
