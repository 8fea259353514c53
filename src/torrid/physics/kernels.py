"""Fused grid-point kernel of the shallow-water tendencies (numba, with a numpy twin).

One pass over the grid forms every product the explicit tendencies need, already multiplied by
the quadrature weights so that the analyses can use the adjoint synthesis directly:

* ``momentum_map`` = w * (spin-1 map of G), G = (zeta + f) k x v - F, whose divergence and curl
  give the divergence and vorticity tendencies (F: extra momentum forcing, m s^-2);
* ``flux_map`` = w * (spin-1 map of phi' v), the thickness flux (phi': geopotential deviation);
* ``energy`` = w * (u^2 + v^2) / 2, the kinetic energy per unit mass.

Spin-1 maps hold (V_theta, V_phi) = (-northward, eastward). The numba version is used when it
compiles (it is measurably faster, see benchmarks/); the numpy twin is the readable reference
and is checked against it in the tests.
"""

from __future__ import annotations

import os



def grid_products_numpy(vorticity, coriolis, geopotential, winds, weights, force_east,
                        force_north, momentum_map, flux_map, energy):
    """Reference implementation of :func:`grid_products` in plain numpy (same arguments)."""
    u = winds[1]
    v = -winds[0]
    eta = vorticity + coriolis
    momentum_map[0] = -(eta * u - force_north) * weights
    momentum_map[1] = (-eta * v - force_east) * weights
    flux_map[0] = -geopotential * v * weights
    flux_map[1] = geopotential * u * weights
    energy[...] = 0.5 * (u * u + v * v) * weights


def _grid_products_loops(vorticity, coriolis, geopotential, winds, weights, force_east,
                         force_north, momentum_map, flux_map, energy):
    nlat, nlon = vorticity.shape
    for i in range(nlat):
        for j in range(nlon):
            w = weights[i, j]
            u = winds[1, i, j]
            v = -winds[0, i, j]
            eta = vorticity[i, j] + coriolis[i, j]
            phi = geopotential[i, j]
            momentum_map[0, i, j] = -(eta * u - force_north[i, j]) * w
            momentum_map[1, i, j] = (-eta * v - force_east[i, j]) * w
            flux_map[0, i, j] = -phi * v * w
            flux_map[1, i, j] = phi * u * w
            energy[i, j] = 0.5 * (u * u + v * v) * w


def _compile():
    """numba-compile the loop kernel; fall back to numpy if numba or its cache is unusable."""
    if os.environ.get("TORRID_NO_NUMBA"):
        return grid_products_numpy, "numpy"
    try:
        import numba
    except ImportError:  # pragma: no cover - numba is a dependency
        return grid_products_numpy, "numpy"
    try:
        return numba.njit(cache=True, fastmath=False)(_grid_products_loops), "numba"
    except Exception:  # noqa: BLE001 - no writable cache location: compile without caching
        return numba.njit(cache=False)(_grid_products_loops), "numba"


grid_products, KERNEL_BACKEND = _compile()
grid_products.__doc__ = """Form the weighted grid products of the explicit tendencies.

Parameters
----------
vorticity, coriolis, geopotential : ndarray (nlat, nlon)
    Relative vorticity (s^-1), Coriolis parameter (s^-1), geopotential deviation phi' (m^2 s^-2).
winds : ndarray (2, nlat, nlon)
    Spin-1 wind map (-v, u) in m s^-1.
weights : ndarray (nlat, nlon)
    Gauss-Legendre quadrature weight of each point.
force_east, force_north : ndarray (nlat, nlon)
    Extra momentum forcing (m s^-2), zero when unused.
momentum_map, flux_map : ndarray (2, nlat, nlon), written
energy : ndarray (nlat, nlon), written
"""
