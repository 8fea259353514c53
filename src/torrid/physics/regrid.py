"""Least-squares spectral fit of fields given on any lon-lat grid onto the model's harmonics.

A run can start from fields h, u, v given on a regular or irregular longitude-latitude grid (for
example a reanalysis or another model's output): the fit finds the spectral coefficients, at the
model's truncation T_N, whose field is closest to the given point values in the area-weighted
least-squares sense

    minimise  sum_p w_p |f_p - (S c)_p|^2 ,

where S evaluates the spherical harmonics of degree <= N at the given points (ducc0's
``synthesis_general``; its transpose is ``adjoint_synthesis_general``) and w_p is the solid angle
(sr) of the lon-lat cell around point p. The weights sum to 4 pi on a grid that covers the
sphere, so the fit approximates the continuous L2 projection onto the model space, and it is exact
for any field that lies in that space (up to the solver tolerance). The normal equations
S^T W S c = S^T W f are solved with conjugate gradients (scipy), starting from the quadrature
estimate c_0 = S^T W f, which is already close because S^T W S is close to the identity.

Real fields have complex coefficients for m >= 0 only, and the imaginary part of m = 0 is ignored
(ducc0's convention, see :mod:`torrid.physics.grid`); the unknowns of the least-squares problem
are therefore real parameters: Re a_l0, and sqrt(2) Re a_lm, sqrt(2) Im a_lm for m > 0. The
factor sqrt(2) makes every parameter's basis field have unit L2 norm, since a real field is
sum a_l0 Y_l0 + 2 Re sum_{m>0} a_lm Y_lm.

Winds are fitted as one spin-1 field, the map (V_theta, V_phi) = (-v, u), with the E (gradient)
and B (curl) coefficients of degree 1..N as unknowns; they convert to divergence and vorticity as
div_lm = -sqrt(l(l+1)) E_lm / a and vort_lm = -sqrt(l(l+1)) B_lm / a (see
:mod:`torrid.physics.transforms`).
"""

from __future__ import annotations

import ducc0
import numpy as np
from scipy.sparse.linalg import LinearOperator, cg

from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY
from torrid.physics.transforms import Transforms

__all__ = ["FitNotConvergedError", "fit_scalar", "fit_winds", "fit_state"]

#: Accuracy asked of ducc0's general-position transforms (its double-precision floor is 2e-13).
NUFFT_EPSILON = 3e-13
#: Relative residual of the normal equations at which the solver stops.
DEFAULT_RTOL = 1e-12
#: Iteration limit of the solver; a well-resolved grid needs about ten iterations.
DEFAULT_MAXITER = 500

_POLE_TOL_DEG = 1e-9  # latitudes this close to +-90 deg are treated as a pole
_LON_KEY_DEG = 1e-9  # longitudes closer than this (modulo 360 deg) count as one meridian


class FitNotConvergedError(RuntimeError):
    """The least-squares solver did not reach its tolerance within the iteration limit."""


# --- input checks and geometry ----------------------------------------------------------------
def _axes(lat_deg, lon_deg) -> tuple[np.ndarray, np.ndarray]:
    """Check the 1-D latitude and longitude axes (deg) and return them as float arrays."""
    lat = np.asarray(lat_deg, dtype=float)
    lon = np.asarray(lon_deg, dtype=float)
    for name, axis in (("lat_deg", lat), ("lon_deg", lon)):
        if axis.ndim != 1 or axis.size == 0:
            raise ValueError(f"{name} must be a non-empty 1-D array, got shape {axis.shape}")
        if not np.all(np.isfinite(axis)):
            raise ValueError(f"{name} contains non-finite values")
    if np.any(np.abs(lat) > 90.0 + _POLE_TOL_DEG):
        raise ValueError("lat_deg must lie in [-90, 90] degrees")
    return np.clip(lat, -90.0, 90.0), lon


def _field(name: str, values, shape: tuple[int, int]) -> np.ndarray:
    """Check one grid field of the given shape and return it as a float array."""
    arr = np.asarray(values)
    if np.iscomplexobj(arr):
        raise ValueError(f"{name} must be real, got dtype {arr.dtype}")
    arr = arr.astype(float, copy=False)
    if arr.shape != shape:
        raise ValueError(f"{name} has shape {arr.shape}, expected (nlat_in, nlon_in) = {shape}")
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"{name} contains non-finite values (NaN or inf)")
    return arr


def _check_resolution(lat: np.ndarray, lon: np.ndarray, truncation: int) -> None:
    """Refuse grids with too few distinct latitudes or meridians to determine T_N uniquely.

    For each order m the fit in latitude is a polynomial fit of degree N - m (times a fixed
    factor that vanishes at the poles for m > 0), and the fit in longitude is a trigonometric
    fit of degree N: both are unique with N + 1 distinct latitudes and 2 N + 1 distinct
    meridians. The two poles count as one latitude together, because only the m = 0 (scalar) or
    m = 1 (vector) harmonics are nonzero there.
    """
    n = truncation
    pole = np.abs(lat) >= 90.0 - _POLE_TOL_DEG
    nlat_eff = np.unique(lat[~pole]).size + int(pole.any())
    keys = np.mod(np.round(lon / _LON_KEY_DEG), round(360.0 / _LON_KEY_DEG))
    nlon_eff = np.unique(keys).size
    if nlat_eff < n + 1 or nlon_eff < 2 * n + 1:
        raise ValueError(
            f"input grid too coarse for T{n}: {nlat_eff} distinct latitudes (poles count as one) "
            f"and {nlon_eff} distinct longitudes, need at least {n + 1} and {2 * n + 1}"
        )


def _cell_widths_lat(lat_rad: np.ndarray) -> np.ndarray:
    """Integral of cos(lat) over each latitude cell (dimensionless), in the input order.

    Cell edges lie halfway between neighbouring latitudes; the outermost edges lie half a
    spacing beyond the outermost latitudes, clipped to the poles. The integral
    sin(upper edge) - sin(lower edge) is cos(lat) times the cell width, exact also at a pole.
    """
    order = np.argsort(lat_rad, kind="stable")
    s = lat_rad[order]
    if s.size == 1:
        edges = np.array([-np.pi / 2, np.pi / 2])
    else:
        mid = 0.5 * (s[1:] + s[:-1])
        edges = np.concatenate([[s[0] - (mid[0] - s[0])], mid, [s[-1] + (s[-1] - mid[-1])]])
    edges = np.clip(edges, -np.pi / 2, np.pi / 2)
    out = np.empty_like(s)
    out[order] = np.diff(np.sin(edges))
    return out


def _cell_widths_lon(lon_rad: np.ndarray) -> np.ndarray:
    """Longitude width (rad) of each meridian's cell, periodic, in the input order.

    Cell edges lie halfway between neighbouring meridians (modulo 2 pi), so uneven spacing and
    any longitude range are allowed; the widths sum to 2 pi. A meridian given twice (e.g. 0 and
    360 deg) shares one cell between its copies.
    """
    phi = np.mod(lon_rad, 2 * np.pi)
    order = np.argsort(phi, kind="stable")
    s = phi[order]
    nxt = np.concatenate([s[1:], [s[0] + 2 * np.pi]])
    prv = np.concatenate([[s[-1] - 2 * np.pi], s[:-1]])
    out = np.empty_like(s)
    out[order] = 0.5 * (nxt - prv)
    return out


def _geometry(lat: np.ndarray, lon: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """ducc0 locations (npix, 2) = (colatitude, longitude) in rad and cell solid angles (sr)."""
    lat_rad, lon_rad = np.deg2rad(lat), np.deg2rad(lon)
    theta = np.clip(np.pi / 2 - lat_rad, 0.0, np.pi)
    phi = np.mod(lon_rad, 2 * np.pi)
    tt, pp = np.meshgrid(theta, phi, indexing="ij")
    loc = np.ascontiguousarray(np.stack([tt.ravel(), pp.ravel()], axis=1))
    area = np.outer(_cell_widths_lat(lat_rad), _cell_widths_lon(lon_rad)).ravel()
    return loc, area


# --- real parametrisation of the coefficients -------------------------------------------------
class _RealParameters:
    """Map between real unknowns and complex coefficients (ncomp, ncoeff) of degree >= spin.

    The parameters of one component are [Re a_l0 (l >= lmin), sqrt(2) Re a_lm, sqrt(2) Im a_lm
    (m > 0)], so each parameter's basis field has unit L2 norm on the unit sphere.
    """

    def __init__(self, degree: np.ndarray, order: np.ndarray, spin: int):
        keep = degree >= max(spin, 0)
        self.zonal = np.flatnonzero(keep & (order == 0))
        self.other = np.flatnonzero(keep & (order > 0))
        self.ncomp = 1 if spin == 0 else 2
        self.ncoeff = degree.size
        self.per_comp = self.zonal.size + 2 * self.other.size
        self.size = self.ncomp * self.per_comp

    def to_coeffs(self, x: np.ndarray) -> np.ndarray:
        """Complex coefficients (ncomp, ncoeff) of a parameter vector (size,)."""
        x = x.reshape(self.ncomp, self.per_comp)
        nz, no = self.zonal.size, self.other.size
        alm = np.zeros((self.ncomp, self.ncoeff), dtype=np.complex128)
        alm[:, self.zonal] = x[:, :nz]
        alm[:, self.other] = (x[:, nz:nz + no] + 1j * x[:, nz + no:]) / np.sqrt(2.0)
        return alm

    def adjoint(self, alm: np.ndarray) -> np.ndarray:
        """Transpose of :meth:`to_coeffs` composed with ducc0's adjoint synthesis.

        ducc0's adjoint returns c_lm = sum_p f_p conj(Y_lm(p)); the derivative of the real field
        sum a_l0 Y_l0 + 2 Re sum a_lm Y_lm with respect to (Re a_lm, Im a_lm), m > 0, pairs with
        (2 Re c_lm, 2 Im c_lm), hence the factor 2 / sqrt(2) = sqrt(2) below.
        """
        c = alm[:, self.other]
        return np.concatenate(
            [alm[:, self.zonal].real, np.sqrt(2.0) * c.real, np.sqrt(2.0) * c.imag], axis=1
        ).ravel()


def _solve(transforms: Transforms, spin: int, loc: np.ndarray, area: np.ndarray,
           maps: np.ndarray, rtol: float, maxiter: int) -> np.ndarray:
    """Weighted least-squares coefficients (ncomp, ncoeff) of spin-``spin`` point values.

    ``maps`` has shape (ncomp, npix); the normal equations are solved by conjugate gradients.
    """
    grid = transforms.grid
    params = _RealParameters(grid.degree, grid.order, spin)
    kw = dict(spin=spin, lmax=grid.truncation, loc=loc, epsilon=NUFFT_EPSILON,
              nthreads=transforms.nthreads)

    def normal(x):
        field = ducc0.sht.synthesis_general(alm=params.to_coeffs(np.ravel(x)), **kw)
        return params.adjoint(ducc0.sht.adjoint_synthesis_general(map=field * area, **kw))

    rhs = params.adjoint(ducc0.sht.adjoint_synthesis_general(map=maps * area, **kw))
    operator = LinearOperator((params.size, params.size), matvec=normal, dtype=np.float64)
    # Initial guess: the quadrature estimate S^T W f itself (S^T W S is close to the identity).
    x, info = cg(operator, rhs, x0=rhs.copy(), rtol=rtol, atol=0.0, maxiter=maxiter)
    if info != 0:
        norm_rhs = np.linalg.norm(rhs)
        residual = np.linalg.norm(rhs - normal(x)) / (norm_rhs if norm_rhs > 0 else 1.0)
        raise FitNotConvergedError(
            f"spectral fit (spin {spin}, T{grid.truncation}) did not converge in {maxiter} "
            f"iterations: relative residual {residual:.1e} > {rtol:.1e}; the input grid may "
            f"leave parts of the sphere uncovered"
        )
    return params.to_coeffs(x)


# --- public API -------------------------------------------------------------------------------
def fit_scalar(transforms: Transforms, lat_deg, lon_deg, values, *, rtol: float = DEFAULT_RTOL,
               maxiter: int = DEFAULT_MAXITER) -> np.ndarray:
    """Spectral coefficients of a scalar field given on a lon-lat grid (area-weighted fit).

    Parameters
    ----------
    transforms : Transforms
        Model grid (its truncation N sets the harmonics fitted).
    lat_deg : array_like, shape (nlat_in,)
        Latitudes of the grid rows, degrees in [-90, 90], any order, poles optional.
    lon_deg : array_like, shape (nlon_in,)
        Longitudes of the grid columns, degrees east, any range (e.g. [0, 360) or
        [-180, 180)), unevenly spaced allowed.
    values : array_like, shape (nlat_in, nlon_in)
        The field at the grid points, any unit; the coefficients carry the same unit.
    rtol : float, optional
        Relative residual of the normal equations at which the solver stops.
    maxiter : int, optional
        Iteration limit of the solver.

    Returns
    -------
    numpy.ndarray, shape (ncoeff,), complex
        Coefficients in the model's layout (orthonormal harmonics, m >= 0, imaginary part of
        m = 0 exactly zero).

    Raises
    ------
    ValueError
        If the axes or values are malformed or non-finite, or the grid has fewer than N + 1
        distinct latitudes or 2 N + 1 distinct longitudes.
    FitNotConvergedError
        If the solver does not reach ``rtol`` within ``maxiter`` iterations.
    """
    lat, lon = _axes(lat_deg, lon_deg)
    shape = (lat.size, lon.size)
    f = _field("values", values, shape)
    _check_resolution(lat, lon, transforms.grid.truncation)
    loc, area = _geometry(lat, lon)
    return _solve(transforms, 0, loc, area, f.reshape(1, -1), rtol, maxiter)[0]


def fit_winds(transforms: Transforms, lat_deg, lon_deg, u, v, *, rtol: float = DEFAULT_RTOL,
              maxiter: int = DEFAULT_MAXITER) -> tuple[np.ndarray, np.ndarray]:
    """Vorticity and divergence coefficients of winds given on a lon-lat grid.

    The winds are fitted as one spin-1 field (V_theta, V_phi) = (-v, u) with area weights; the
    gradient (E) and curl (B) coefficients give div_lm = -sqrt(l(l+1)) E_lm / a and
    vort_lm = -sqrt(l(l+1)) B_lm / a on a sphere of radius a = ``transforms.radius_m``.

    Parameters
    ----------
    transforms : Transforms
        Model grid and radius.
    lat_deg, lon_deg : array_like, shapes (nlat_in,), (nlon_in,)
        Grid axes in degrees, as in :func:`fit_scalar`.
    u, v : array_like, shape (nlat_in, nlon_in)
        Eastward and northward wind, m s^-1.
    rtol, maxiter : optional
        Solver tolerance and iteration limit, as in :func:`fit_scalar`.

    Returns
    -------
    vorticity, divergence : numpy.ndarray, shape (ncoeff,), complex
        Spectral relative vorticity and divergence, s^-1 (l = 0 entries zero).

    Raises
    ------
    ValueError
        As :func:`fit_scalar`, for either wind component.
    FitNotConvergedError
        If the solver does not reach ``rtol`` within ``maxiter`` iterations.
    """
    lat, lon = _axes(lat_deg, lon_deg)
    shape = (lat.size, lon.size)
    u = _field("u", u, shape)
    v = _field("v", v, shape)
    _check_resolution(lat, lon, transforms.grid.truncation)
    loc, area = _geometry(lat, lon)
    maps = np.stack([-v.ravel(), u.ravel()])
    eb = _solve(transforms, 1, loc, area, maps, rtol, maxiter)
    l = transforms.grid.degree.astype(float)
    factor = -np.sqrt(l * (l + 1)) / transforms.radius_m
    return eb[1] * factor, eb[0] * factor


def fit_state(transforms: Transforms, lat_deg, lon_deg, h_m, u, v, gravity_m_s2: float,
              surface_height_m=None, *, rtol: float = DEFAULT_RTOL,
              maxiter: int = DEFAULT_MAXITER) -> tuple[np.ndarray, float]:
    """Initial spectral state of the model from h, u, v given on a lon-lat grid.

    Parameters
    ----------
    transforms : Transforms
        Model grid and radius.
    lat_deg, lon_deg : array_like, shapes (nlat_in,), (nlon_in,)
        Grid axes in degrees, as in :func:`fit_scalar`.
    h_m : array_like, shape (nlat_in, nlon_in)
        Free-surface height h, m (the fluid thickness is h - h_s).
    u, v : array_like, shape (nlat_in, nlon_in)
        Eastward and northward wind, m s^-1.
    gravity_m_s2 : float
        (Reduced) gravity g, m s^-2.
    surface_height_m : array_like, shape (nlat_in, nlon_in), optional
        Bottom-topography height h_s, m; zero if omitted.
    rtol, maxiter : optional
        Solver tolerance and iteration limit, as in :func:`fit_scalar`.

    Returns
    -------
    state : numpy.ndarray, shape (3, ncoeff), complex
        Rows VORTICITY, DIVERGENCE (s^-1) and GEOPOTENTIAL, the deviation
        phi' = g (h - h_s) - Phi_mean (m^2 s^-2, its l = 0 coefficient zero).
    mean_geopotential : float
        Phi_mean = g times the global-mean thickness of the fitted field, m^2 s^-2
        (Y_00 = 1 / sqrt(4 pi), so Phi_mean = a_00 / sqrt(4 pi)).

    Raises
    ------
    ValueError
        If an input is malformed or non-finite, or the grid is too coarse for the truncation.
    FitNotConvergedError
        If a solver does not reach ``rtol`` within ``maxiter`` iterations.
    """
    lat, lon = _axes(lat_deg, lon_deg)
    shape = (lat.size, lon.size)
    h = _field("h_m", h_m, shape)
    hs = np.zeros(shape) if surface_height_m is None else _field("surface_height_m",
                                                               surface_height_m, shape)
    g = float(gravity_m_s2)
    if not (np.isfinite(g) and g > 0):
        raise ValueError(f"gravity_m_s2 must be positive and finite, got {gravity_m_s2}")
    # Check the winds before the first (costly) fit, so bad input fails fast.
    _field("u", u, shape)
    _field("v", v, shape)
    geopotential = fit_scalar(transforms, lat, lon, g * (h - hs), rtol=rtol, maxiter=maxiter)
    vorticity, divergence = fit_winds(transforms, lat, lon, u, v, rtol=rtol, maxiter=maxiter)
    i00 = transforms.grid.index(0, 0)
    mean_geopotential = float(geopotential[i00].real) / np.sqrt(4 * np.pi)
    state = np.empty((3, transforms.grid.ncoeff), dtype=np.complex128)
    state[VORTICITY] = vorticity
    state[DIVERGENCE] = divergence
    state[GEOPOTENTIAL] = geopotential
    state[GEOPOTENTIAL, i00] = 0.0
    return state, mean_geopotential
