"""Model phase curves of a sweep table as linear functionals of the band radiance at a few
temperature nodes: cheap to re-evaluate for any temperature end points.

The temperature map is affine in the normalised thickness s = (h - H) / (H dH/H):
T = T_night + (T_day - T_night) s. The band intensity B(T(s)) is replaced by its piecewise-
linear interpolant on :data:`NODES` equally spaced nodes s_k spanning every map of the table
(hat functions phi_k(s)); the disk integral is linear in the intensity, so

    F(phase) = scale * sum_k D_k(phase) B_band(T_night + (T_day - T_night) s_k),
    D_k(phase) = disk integral of phi_k(s(lat, lon)) seen at that phase,

with scale = (R_p / R_s)^2 / (pi B_band(T_star)) * 1e6 (ppm). D is computed once per grid point
and measured phase; any (T_night, T_day) then costs NODES band radiances. With 64 nodes the
interpolation error of B is below 1e-3 of the flux over 500-4000 K in the infrared (checked
against the direct phase curve in tests/test_joint_fit.py). Steady maps only (a sweep table).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import xarray as xr

from torrid.io.observed import ObservedCurve
from torrid.io.observer import ObserverSettings
from torrid.physics.disk import DiskQuadrature
from torrid.physics.planck import Band
from torrid.physics.viewing import (eclipse_phase, orbital_angle, sub_observer_latitude,
                                    sub_observer_offset)

#: Temperature nodes of the piecewise-linear band radiance.
NODES = 64
#: Lowest temperature (K) of a node: colder nodes (s far below 0 with a wide end-point
#: span) radiate as this (nothing, in the infrared).
FLOOR_K = 1.0
#: Phases of the dense model curves kept for plots.
DENSE_PHASES = 180


def single_thread():
    """A context with BLAS limited to one thread: the fit's matrices are small (a few thousand
    rows), and two BLAS threads on a busy two-core machine were 40 times slower than one
    (0.75 ms against 32 ms a likelihood call, measured here)."""
    from threadpoolctl import threadpool_limits

    return threadpool_limits(limits=1, user_api="blas")


@dataclass(frozen=True, eq=False)
class CurveModel:
    """One measured curve and its model over the grid.

    Attributes
    ----------
    observed : ObservedCurve
        The measurement (its own phases; the kernels include the curve's phase shift).
    band : Band
        Its band quadrature.
    kernels : ndarray (npoint, nobs, NODES)
        D_k at the measured phases (sr) for every grid point (flattened grid).
    dense : ndarray (npoint, DENSE_PHASES, NODES)
        D_k at :data:`DENSE_PHASES` uniform phases (for plots).
    nodes : ndarray (NODES,)
        The normalised thickness s_k of the nodes.
    scale : float
        ppm per unit disk integral of band radiance.
    description : str
        The curve's file and band.
    """

    observed: ObservedCurve
    band: Band
    kernels: np.ndarray
    dense: np.ndarray
    nodes: np.ndarray
    scale: float
    description: str

    def node_radiance(self, t_night, t_day) -> np.ndarray:
        """B_band at the nodes, shape (..., NODES) for end points broadcasting to (...)."""
        t_night, t_day = np.asarray(t_night, float), np.asarray(t_day, float)
        temperature = t_night[..., None] + (t_day - t_night)[..., None] * self.nodes
        return self.band.radiance(np.maximum(temperature, FLOOR_K))

    def node_derivatives(self, t_night: float, t_day: float) -> tuple[np.ndarray, np.ndarray]:
        """d B(T_k) / d T_night and d / d T_day at the nodes."""
        temperature = np.maximum(t_night + (t_day - t_night) * self.nodes, FLOOR_K)
        slope = self.band.radiance_derivative(temperature)
        return slope * (1 - self.nodes), slope * self.nodes

    def flux(self, point, t_night, t_day, dense: bool = False) -> np.ndarray:
        """Model flux ratio (ppm) of grid point(s) ``point`` at the measured (or dense) phases."""
        kernels = (self.dense if dense else self.kernels)[point]
        return self.scale * kernels @ self.node_radiance(t_night, t_day)


def normalised_thickness(table: xr.Dataset, dims: list[str]) -> np.ndarray:
    """s = (h - H) / (H dH/H) of every grid point, shape (*grid, nlat, nlon)."""
    from torrid.workflow.phase import _per_point

    h = table["h"]
    if "time" in h.dims:
        h = h.isel(time=-1)
    big_h = _per_point(table, "nightside_thickness_m", True, "sweep table")
    contrast = _per_point(table, "forcing_contrast", True, "sweep table")
    top = _per_point(table, "substellar_thickness_m", False, "sweep table")
    if isinstance(top, xr.DataArray) or np.isfinite(top):
        contrast = top / big_h - 1
    s = (h - big_h) / (big_h * contrast)
    return xr.DataArray(s).transpose(*dims, "lat", "lon").values


def observer_geometry(table: xr.Dataset, settings: ObserverSettings):
    """(observer latitude, function phase -> observer longitude, eclipse phase) of a table."""
    from torrid.workflow.phase import _last_substellar_longitude, run_orbit

    orbit, _ = run_orbit(table)
    e = orbit.eccentricity if orbit else 0.0
    omega = math.radians(settings.argument_of_periastron)
    sense = orbit.sense if orbit else 1.0
    lon_sub = _last_substellar_longitude(table)
    obs_lat = sub_observer_latitude(math.radians(settings.inclination))

    def longitude(phases):
        return lon_sub + sub_observer_offset(orbital_angle(np.asarray(phases, float), e, omega),
                                             sense)

    return obs_lat, longitude, eclipse_phase(e, omega)


def node_span(s: np.ndarray) -> np.ndarray:
    """The nodes: :data:`NODES` values spanning [min(s, 0), max(s, 1)]."""
    low = min(float(np.nanmin(s)), 0.0) if np.isfinite(s).any() else 0.0
    high = max(float(np.nanmax(s)), 1.0) if np.isfinite(s).any() else 1.0
    return np.linspace(low, high, NODES)


def hat_kernels(s: np.ndarray, nodes: np.ndarray, weights: np.ndarray) -> np.ndarray:
    """D[p, o, k] = sum_pixels weights[o, pixel] phi_k(s[p, pixel]).

    Parameters
    ----------
    s : ndarray (npoint, npixel)
        Normalised thickness of each grid point's map (NaN: a failed point).
    nodes : ndarray (NODES,)
        Equally spaced nodes covering every finite s.
    weights : ndarray (nobs, npixel)
        Disk-integral weights (sr) of each observer.
    """
    from scipy import sparse

    npoint, npixel = s.shape
    step = nodes[1] - nodes[0]
    out = np.full((npoint, weights.shape[0], nodes.size), np.nan)
    for p in range(npoint):
        if not np.isfinite(s[p]).all():
            continue
        x = np.clip((s[p] - nodes[0]) / step, 0, nodes.size - 1)
        k = np.minimum(np.floor(x).astype(int), nodes.size - 2)
        f = x - k
        rows = np.concatenate([np.arange(npixel), np.arange(npixel)])
        hat = sparse.csr_matrix((np.concatenate([1 - f, f]), (rows, np.concatenate([k, k + 1]))),
                                shape=(npixel, nodes.size))
        out[p] = (hat.T @ weights.T).T
    return out


def curve_models(table: xr.Dataset, dims: list[str], curves, settings: ObserverSettings):
    """The :class:`CurveModel` of every measured curve against a sweep table with maps.

    ``curves`` holds (ObservedCurve, ObserverSettings of its band and radius ratio,
    phase shift, description) tuples; ``settings`` the shared geometry.
    """
    from torrid.workflow.phase import build_band

    s = normalised_thickness(table, dims)
    npoint = int(np.prod(s.shape[:-2])) if s.ndim > 2 else 1
    flat = s.reshape(npoint, -1)
    nodes = node_span(flat)
    quad = DiskQuadrature(table["lat"].values, table["lon"].values)
    obs_lat, longitude, _ = observer_geometry(table, settings)
    dense_phases = np.arange(DENSE_PHASES) / DENSE_PHASES
    dense_weights = quad.weights(obs_lat, longitude(dense_phases)).reshape(DENSE_PHASES, -1)
    dense = hat_kernels(flat, nodes, dense_weights)  # band-independent: shared by the curves
    out = []
    for observed, curve_settings, shift, description in curves:
        band = build_band(curve_settings)
        phases = np.remainder(observed.phase + shift, 1.0)
        weights = quad.weights(obs_lat, longitude(phases)).reshape(phases.size, -1)
        star = float(band.radiance(curve_settings.star_temperature))
        scale = curve_settings.radius_ratio**2 / (np.pi * star) * 1e6
        out.append(CurveModel(observed=observed, band=band,
                              kernels=hat_kernels(flat, nodes, weights),
                              dense=dense, nodes=nodes,
                              scale=scale, description=description))
    return out, dense_phases
