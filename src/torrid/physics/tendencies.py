"""Explicit (nonlinear) tendencies of the shallow-water equations in vorticity-divergence form.

The prognostic state is one complex array of shape (3, ncoeff): relative vorticity zeta (s^-1),
divergence delta (s^-1) and the geopotential-thickness deviation phi' = g (h - h_s) - Phi_mean
(m^2 s^-2). With eta = zeta + f, v the wind, K = |v|^2 / 2 and Phi_s = g h_s the surface
geopotential (Williamson et al. 1992, eqs. 2-4 in this form; Hack & Jakob 1992):

    d zeta / dt = -div(eta v)                          + k.curl(F)
    d delta/ dt =  k.curl(eta v) - lap(phi' + K + Phi_s) + div(F)
    d phi' / dt = -div(phi' v) - Phi_mean delta         + S

The terms -lap(phi') and -Phi_mean delta (gravity waves) and all linear damping are left to the
implicit part (:mod:`torrid.physics.linear`); everything else is computed here, with the
products on the alias-free grid. F (momentum forcing, m s^-2) and S (thickness source,
m^2 s^-3) come from an optional forcing object.
"""

from __future__ import annotations

from typing import Protocol

import numpy as np

from torrid.physics.kernels import grid_products
from torrid.physics.transforms import Transforms

VORTICITY, DIVERGENCE, GEOPOTENTIAL = 0, 1, 2


class Forcing(Protocol):
    """What the dynamics asks of a forcing (all optional terms of the equations above)."""

    def momentum(self, time_s: float, geopotential: np.ndarray, winds: np.ndarray,
                 out_east: np.ndarray, out_north: np.ndarray) -> None:
        """Write the momentum forcing F (m s^-2) on the grid into ``out_east``/``out_north``."""

    def thickness_source(self, time_s: float, geopotential: np.ndarray) -> np.ndarray:
        """Explicit thickness source S as spectral coefficients (m^2 s^-3)."""


class Dynamics:
    """Explicit tendencies for one planet, grid and (optional) bottom topography.

    Parameters
    ----------
    transforms : Transforms
        Grid, radius and transforms.
    coriolis : ndarray (nlat, nlon)
        Coriolis parameter f (s^-1); any field, so a tilted rotation axis is allowed.
    mean_geopotential : float
        Phi_mean, the global-mean geopotential thickness g H (m^2 s^-2).
    surface_geopotential : ndarray (nlat, nlon), optional
        g h_s (m^2 s^-2); zero (no topography) if omitted.
    forcing : Forcing, optional
        Extra momentum forcing and thickness source.
    """

    def __init__(self, transforms: Transforms, coriolis: np.ndarray, mean_geopotential: float,
                 surface_geopotential: np.ndarray | None = None, forcing: Forcing | None = None):
        self.transforms = transforms
        grid = transforms.grid
        self.coriolis = np.ascontiguousarray(coriolis, dtype=float)
        self.mean_geopotential = float(mean_geopotential)
        self.forcing = forcing
        self._minus_laplacian = -transforms.laplacian_eigenvalues()
        if surface_geopotential is None:
            self.surface_geopotential = np.zeros(grid.ncoeff, dtype=complex)
        else:
            self.surface_geopotential = transforms.to_spectral(surface_geopotential)
        self._vorticity = np.empty(grid.shape)
        self._geopotential = np.empty(grid.shape)
        self._winds = np.empty((2, *grid.shape))
        self._momentum = np.empty((2, *grid.shape))
        self._flux = np.empty((2, *grid.shape))
        self._energy = np.empty(grid.shape)
        self._force_east = np.zeros(grid.shape)
        self._force_north = np.zeros(grid.shape)

    def grid_fields(self, state: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Vorticity (s^-1), geopotential deviation (m^2 s^-2) and winds (-v, u) on the grid.

        The arrays are work buffers, overwritten by the next call.
        """
        tr = self.transforms
        tr.to_grid(state[VORTICITY], out=self._vorticity)
        tr.to_grid(state[GEOPOTENTIAL], out=self._geopotential)
        tr.winds(state[VORTICITY], state[DIVERGENCE], out=self._winds)
        return self._vorticity, self._geopotential, self._winds

    def __call__(self, state: np.ndarray, time_s: float, out: np.ndarray) -> np.ndarray:
        """Write the explicit tendency of ``state`` at ``time_s`` (s) into ``out`` (3, ncoeff)."""
        vorticity, geopotential, winds = self.grid_fields(state)
        if self.forcing is not None:
            self.forcing.momentum(time_s, geopotential, winds, self._force_east,
                                  self._force_north)
        grid_products(vorticity, self.coriolis, geopotential, winds, self.transforms.weights,
                      self._force_east, self._force_north, self._momentum, self._flux,
                      self._energy)
        tr = self.transforms
        div_g, curl_g = tr.divergence_curl_weighted(self._momentum)
        energy = tr.to_spectral_weighted(self._energy)
        np.negative(curl_g, out=out[VORTICITY])
        out[DIVERGENCE] = self._minus_laplacian * (energy + self.surface_geopotential) - div_g
        out[GEOPOTENTIAL] = -tr.divergence_weighted(self._flux)
        if self.forcing is not None:
            out[GEOPOTENTIAL] += self.forcing.thickness_source(time_s, geopotential)
        return out
