"""Spherical-harmonic transforms (ducc0) between spectral coefficients and grid-point fields.

Conventions (measured, see DEVELOPERS.md): spin-1 maps hold (V_theta, V_phi), so the eastward
component is V_phi and the northward component is -V_theta. With E = sqrt(l(l+1)) chi and
B = sqrt(l(l+1)) psi the field is grad chi + r x grad psi; on a sphere of radius a the winds of
vorticity zeta and divergence delta have E = -a delta / sqrt(l(l+1)), B = -a zeta / sqrt(l(l+1)),
and the analysis of a vector field gives div = -sqrt(l(l+1)) E / a, curl = -sqrt(l(l+1)) B / a.

On the Gauss-Legendre grid, analysis equals the adjoint synthesis of the field multiplied by the
quadrature weights; the ``*_weighted`` methods take fields already multiplied by
:attr:`Transforms.weights` (the tendency kernel fuses that product in) and save one pass.
"""

from __future__ import annotations

import ducc0
import numpy as np

from torrid.physics.grid import SpectralGrid


class Transforms:
    """Scalar and vector transforms for one grid on a sphere of given radius.

    Parameters
    ----------
    grid : SpectralGrid
        Truncation and Gauss-Legendre grid.
    radius_m : float
        Sphere radius a (m); enters the derivative operators.
    nthreads : int
        Threads used by ducc0 (one is fastest below T85 on two cores).
    """

    def __init__(self, grid: SpectralGrid, radius_m: float, nthreads: int = 1):
        if grid.nlon < 2 * grid.truncation + 1:  # ducc0 silently cuts m otherwise
            raise ValueError(f"nlon = {grid.nlon} too small for T{grid.truncation}")
        self.grid = grid
        self.radius_m = float(radius_m)
        self.nthreads = int(nthreads)
        lmax = grid.truncation
        l = grid.degree.astype(float)
        root = np.sqrt(l * (l + 1))
        inv_root = np.divide(1.0, root, out=np.zeros_like(root), where=root > 0)
        self._wind_factor = -self.radius_m * inv_root  # zeta or delta -> B or E
        self._deriv_factor = -root / self.radius_m  # E or B -> div or curl
        self.weights = np.ascontiguousarray(
            np.broadcast_to(grid.quadrature_weights[:, None], grid.shape)
        )
        self._kw = dict(lmax=lmax, geometry="GL", nthreads=self.nthreads)
        self._vector_alm = np.zeros((2, grid.ncoeff), dtype=np.complex128)

    # --- scalars -----------------------------------------------------------------------------
    def to_grid(self, coeffs: np.ndarray, out: np.ndarray | None = None) -> np.ndarray:
        """Synthesis of a scalar field: coefficients (ncoeff,) -> grid (nlat, nlon)."""
        g = self.grid
        out3 = None if out is None else out.reshape(1, *g.shape)
        res = ducc0.sht.synthesis_2d(
            alm=coeffs.reshape(1, -1), spin=0, ntheta=g.nlat, nphi=g.nlon, map=out3, **self._kw
        )
        return res[0]

    def to_spectral(self, field: np.ndarray) -> np.ndarray:
        """Analysis of a scalar grid field (nlat, nlon) -> coefficients (ncoeff,)."""
        return self.to_spectral_weighted(field * self.weights)

    def to_spectral_weighted(self, weighted_field: np.ndarray) -> np.ndarray:
        """Analysis of a field already multiplied by :attr:`weights`."""
        res = ducc0.sht.adjoint_synthesis_2d(
            map=weighted_field.reshape(1, *self.grid.shape), spin=0, **self._kw
        )
        return res[0]

    # --- vectors -----------------------------------------------------------------------------
    def winds(self, vorticity: np.ndarray, divergence: np.ndarray,
              out: np.ndarray | None = None) -> np.ndarray:
        """Winds of a vorticity and a divergence field (both spectral, s^-1).

        Returns
        -------
        numpy.ndarray, shape (2, nlat, nlon)
            The spin-1 map (V_theta, V_phi) = (-v, u) in m s^-1.
        """
        alm = self._vector_alm
        np.multiply(divergence, self._wind_factor, out=alm[0])
        np.multiply(vorticity, self._wind_factor, out=alm[1])
        g = self.grid
        return ducc0.sht.synthesis_2d(alm=alm, spin=1, ntheta=g.nlat, nphi=g.nlon, map=out,
                                      **self._kw)

    def divergence_curl_weighted(self, weighted_map: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Divergence and curl (k . curl) of a weighted spin-1 map (V_theta, V_phi) * weights."""
        eb = ducc0.sht.adjoint_synthesis_2d(map=weighted_map, spin=1, **self._kw)
        return eb[0] * self._deriv_factor, eb[1] * self._deriv_factor

    def divergence_weighted(self, weighted_map: np.ndarray) -> np.ndarray:
        """Divergence alone of a weighted spin-1 map (cheaper: ducc0's GRAD_ONLY mode)."""
        e = ducc0.sht.adjoint_synthesis_2d(map=weighted_map, spin=1, mode="GRAD_ONLY", **self._kw)
        return e[0] * self._deriv_factor

    def divergence_curl(self, eastward: np.ndarray, northward: np.ndarray):
        """Divergence and curl (s^-1 times the field's unit / m) of a grid vector field."""
        vmap = np.stack([-northward * self.weights, eastward * self.weights])
        return self.divergence_curl_weighted(vmap)

    def gradient(self, coeffs: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Eastward and northward components of the gradient of a spectral scalar (per m)."""
        alm = np.zeros((2, self.grid.ncoeff), dtype=np.complex128)
        l = self.grid.degree
        alm[0] = coeffs * np.sqrt(l * (l + 1.0)) / self.radius_m
        g = self.grid
        vmap = ducc0.sht.synthesis_2d(alm=alm, spin=1, ntheta=g.nlat, nphi=g.nlon, **self._kw)
        return vmap[1], -vmap[0]

    def laplacian_eigenvalues(self) -> np.ndarray:
        """-l (l + 1) / a^2 for every coefficient (m^-2)."""
        l = self.grid.degree.astype(float)
        return -l * (l + 1) / self.radius_m**2
