"""Global integrals of the shallow-water state (Williamson et al. 1992, section 3, eqs. 136-139),
and the maximum wind speed: the diagnostics of every run, planet or standard case.

The integrals are area means over the sphere (the papers' normalised integrals I(.) times a
constant that cancels in relative changes), computed with the exact Gauss-Legendre quadrature.
"""

from __future__ import annotations

import numpy as np

from torrid.physics.diagnostic_metadata import Diagnostic
from torrid.physics.grid import SpectralGrid

#: The diagnostics of every run (time series in the run file).
CORE_DIAGNOSTICS: dict[str, Diagnostic] = {
    "mean_thickness": Diagnostic("m", "global-mean layer thickness (mass per area / density)"),
    "max_wind_speed": Diagnostic("m s-1", "maximum wind speed on the model grid"),
    "total_energy": Diagnostic("m3 s-2", "global mean of kinetic plus potential energy per unit "
                                         "density", final=False),
    "potential_enstrophy": Diagnostic("m-1 s-2", "global mean potential enstrophy", final=False),
}


def core_diagnostics(grid: SpectralGrid, thickness_m: np.ndarray, u: np.ndarray, v: np.ndarray,
                     vorticity: np.ndarray, coriolis: np.ndarray, surface_height_m: np.ndarray,
                     gravity_m_s2: float) -> dict[str, float]:
    """The values of :data:`CORE_DIAGNOSTICS` for one state on the model grid.

    Parameters
    ----------
    grid : SpectralGrid
        The model grid.
    thickness_m : ndarray
        Layer thickness h* = h - h_s (m).
    u, v : ndarray
        Eastward and northward wind (m s^-1).
    vorticity, coriolis : ndarray
        Relative vorticity and Coriolis parameter (s^-1).
    surface_height_m : ndarray
        Bottom topography h_s (m).
    gravity_m_s2 : float
        (Reduced) gravity g (m s^-2).
    """
    return {
        "mean_thickness": mean_thickness(grid, thickness_m),
        "max_wind_speed": float(np.sqrt(u**2 + v**2).max()),
        "total_energy": total_energy(grid, thickness_m, u, v, surface_height_m, gravity_m_s2),
        "potential_enstrophy": potential_enstrophy(grid, thickness_m, vorticity, coriolis),
    }


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
