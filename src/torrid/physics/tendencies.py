"""Explicit (nonlinear) tendencies of the shallow-water equations in vorticity-divergence form.

The prognostic state is one complex array of shape (3, ncoeff) (:mod:`torrid.physics.state`):
relative vorticity zeta (s^-1), divergence delta (s^-1) and the geopotential-thickness deviation
phi' = g (h - h_s) - Phi_mean (m^2 s^-2). With eta = zeta + f, v the wind and K = |v|^2 / 2
(Williamson et al. 1992, eqs. 2-4 in this form; Hack & Jakob 1992):

    d zeta / dt = -div(eta v)                   + k.curl(F) + ...
    d delta/ dt =  k.curl(eta v) - lap(phi' + K) + div(F)    + ...
    d phi' / dt = -div(phi' v) - Phi_mean delta              + ...

The terms -lap(phi') and -Phi_mean delta (gravity waves) and all linear damping are left to the
implicit part (:mod:`torrid.physics.linear`); everything else is computed here, with the
products on the alias-free grid. The physical processes (:mod:`torrid.physics.processes`) add
the rest: a momentum forcing F on the grid (m s^-2), folded into the grid kernel, and spectral
tendencies ("..."), such as a thickness source or the topography's -lap(Phi_s).
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from torrid.physics.kernels import grid_products
from torrid.physics.processes.base import GridFields, Process, provides
from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY
from torrid.physics.transforms import Transforms

__all__ = ["Dynamics", "VORTICITY", "DIVERGENCE", "GEOPOTENTIAL"]


class Dynamics:
    """Explicit tendencies for one planet and grid, with the explicit parts of its processes.

    Parameters
    ----------
    transforms : Transforms
        Grid, radius and transforms.
    coriolis : ndarray (nlat, nlon)
        Coriolis parameter f (s^-1); any field, so a tilted rotation axis is allowed.
    mean_geopotential : float
        Phi_mean, the global-mean geopotential thickness g H (m^2 s^-2).
    processes : sequence of Process
        The run's processes, in order; their momentum forcings and spectral tendencies are
        added (processes without explicit parts are skipped).
    """

    def __init__(self, transforms: Transforms, coriolis: np.ndarray, mean_geopotential: float,
                 processes: Sequence[Process] = ()):
        self.transforms = transforms
        grid = transforms.grid
        self.coriolis = np.ascontiguousarray(coriolis, dtype=float)
        self.mean_geopotential = float(mean_geopotential)
        self._momentum_processes = [p for p in processes if provides(p, "momentum_forcing")]
        self._spectral_processes = [p for p in processes if provides(p, "spectral_tendency")]
        self._minus_laplacian = -transforms.laplacian_eigenvalues()
        self._vorticity = np.empty(grid.shape)
        self._geopotential = np.empty(grid.shape)
        self._winds = np.empty((2, *grid.shape))
        self.fields = GridFields(self._vorticity, self._geopotential, self._winds)
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

    def _momentum_forcing(self, time_s: float) -> tuple[np.ndarray, np.ndarray]:
        """The processes' momentum forcing F (east, north) on the grid (zero if none)."""
        forcings = [f for p in self._momentum_processes
                    if (f := p.momentum_forcing(time_s, self.fields)) is not None]
        if not forcings:
            return self._force_east, self._force_north
        if len(forcings) == 1:
            return forcings[0]
        np.copyto(self._force_east, forcings[0][0])
        np.copyto(self._force_north, forcings[0][1])
        for east, north in forcings[1:]:
            self._force_east += east
            self._force_north += north
        return self._force_east, self._force_north

    def __call__(self, state: np.ndarray, time_s: float, out: np.ndarray) -> np.ndarray:
        """Write the explicit tendency of ``state`` at ``time_s`` (s) into ``out`` (3, ncoeff)."""
        vorticity, geopotential, winds = self.grid_fields(state)
        force_east, force_north = self._momentum_forcing(time_s)
        grid_products(vorticity, self.coriolis, geopotential, winds, self.transforms.weights,
                      force_east, force_north, self._momentum, self._flux, self._energy)
        tr = self.transforms
        div_g, curl_g = tr.divergence_curl_weighted(self._momentum)
        energy = tr.to_spectral_weighted(self._energy)
        np.negative(curl_g, out=out[VORTICITY])
        out[DIVERGENCE] = self._minus_laplacian * energy - div_g
        out[GEOPOTENTIAL] = -tr.divergence_weighted(self._flux)
        for process in self._spectral_processes:
            process.spectral_tendency(time_s, self.fields, out)
        return out
