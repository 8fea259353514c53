"""Spherical-harmonic operators against analytic eigenfunctions and closed-form fields.

External references:

* scipy.special.sph_harm_y (SciPy >= 1.15): orthonormal complex Y_l^m with the Condon-Shortley
  phase, called as sph_harm_y(l, m, colatitude, longitude); with ``diff_n=1`` it also returns the
  colatitude and longitude derivatives. ducc0's coefficients use the same normalisation and phase,
  m >= 0 only, and a real field is f = sum_l a_l0 Y_l0 + 2 Re sum_{l, m > 0} a_lm Y_lm
  (ducc0 documentation; /work/shared/notes-measured.md). So Re Y_l^m (m > 0) has the single
  coefficient a_lm = 1/2, Im Y_l^m has a_lm = -i/2, and Y_l^0 has a_l0 = 1.
* The surface Laplacian of a homogeneous polynomial P of degree n restricted to the sphere of
  radius a: Lap_S P = (Lap_3 P - n (n + 1) P) / a^2 at r = 1 (from Euler's theorem
  r dP/dr = n P; a standard identity, derived here; the textbook pointer, Arfken & Weber,
  "Mathematical Methods for Physicists", chapter on spherical harmonics, is from memory).
  The tangential gradient of any extension F is grad F minus its radial part; its east/north
  components are grad F . e_east / a and grad F . e_north / a.
* Solid-body rotation about an axis tilted by alpha: u = U (cos(lat) cos(alpha) + cos(lon)
  sin(lat) sin(alpha)), v = -U sin(lon) sin(alpha) has vorticity
  2 U / a (sin(lat) cos(alpha) - cos(lon) cos(lat) sin(alpha)) and no divergence (Williamson,
  Drake, Hack, Jakob & Swarztrauber 1992, test cases 1-2).
* Divergence (1 / (a cos(lat))) d(v cos(lat)) / d(lat) and vorticity
  -(1 / (a cos(lat))) d(u cos(lat)) / d(lat) of zonally symmetric flows: standard spherical
  vector calculus (e.g. Williamson et al. 1992, section 2).

Tolerances. All checks are for fields the truncation represents exactly, so only floating-point
round-off remains. Plain analysis/synthesis errors are measured at 1e-15 .. 7e-14 relative
(recurrences over l accumulate ~l * eps); the tolerance is 1e-12. Derivative operators applied to
*analysed* fields amplify the analysis round-off that lands on high degrees (~1e-15 per
coefficient up to l = N): the gradient by ~sqrt(N (N + 1)) and by the growth of the associated
Legendre functions' derivatives near the poles, the Laplacian by N (N + 1) on top. At T42 the
measured gradient errors are <= 4e-13 (tolerance 1e-12), the Laplacian ones 2.5e-12
(tolerance 1e-11). Applied to exact (band-limited) coefficients the operators are at 1e-15.
"""

import numpy as np
import pytest
from scipy.special import sph_harm_y

from torrid.physics.grid import SpectralGrid
from torrid.physics.transforms import Transforms

RADIUS_M = 6.37122e6  # Williamson et al. (1992) test radius; any value would do
EPS = np.finfo(float).eps

ROUNDOFF = 1e-12  # transforms and first derivatives (see module docstring)
ROUNDOFF_LAPLACIAN = 1e-11  # second derivative of an analysed field at T42 (module docstring)
ROUNDOFF_EXACT = 1e-13  # operators applied to exact coefficients (measured <= 3e-15)

HARMONICS = [(0, 0), (1, 0), (1, 1), (2, 1), (5, 3), (20, 7), (41, 40), (42, 0), (42, 17),
             (42, 42)]


@pytest.fixture(scope="module")
def t42():
    grid = SpectralGrid(42)
    return grid, Transforms(grid, RADIUS_M)


def _relmax(err, ref):
    return float(np.max(np.abs(err)) / np.max(np.abs(ref)))


def _ylm(grid, l, m, diff=False):
    """scipy's complex Y_l^m (and optionally its colatitude/longitude derivatives) on the grid."""
    lat, lon = grid.mesh()
    colat = np.pi / 2 - lat
    if diff:
        y, jac = sph_harm_y(l, m, colat, lon, diff_n=1)
        return y, jac[..., 0], jac[..., 1]  # derivatives stacked on the last axis
    return sph_harm_y(l, m, colat, lon)


def _cartesian(grid):
    lat, lon = grid.mesh()
    return np.cos(lat) * np.cos(lon), np.cos(lat) * np.sin(lon), np.sin(lat), lat, lon


def _cubic(grid):
    """f = xyz + 2 z^3 - x y^2 + x^2/2 + 0.3 y - 1.7 on the unit sphere, its Lap_S, its gradient.

    Homogeneous parts (degree n, Lap_3 P): xyz (3, 0), z^3 (3, 6 z), x y^2 (3, 2 x), x^2 (2, 2),
    y (1, 0), 1 (0, 0); Lap_S P = (Lap_3 P - n (n + 1) P) / a^2.
    """
    x, y, z, lat, lon = _cartesian(grid)
    f = x * y * z + 2 * z**3 - x * y**2 + 0.5 * x**2 + 0.3 * y - 1.7
    lap = (-12 * x * y * z + 2 * (6 * z - 12 * z**3) - (2 * x - 12 * x * y**2)
           + 0.5 * (2 - 6 * x**2) + 0.3 * (-2 * y)) / RADIUS_M**2
    fx = y * z - y**2 + x
    fy = x * z - 2 * x * y + 0.3
    fz = x * y + 6 * z**2
    east = (-np.sin(lon) * fx + np.cos(lon) * fy) / RADIUS_M
    north = (-np.sin(lat) * np.cos(lon) * fx - np.sin(lat) * np.sin(lon) * fy
             + np.cos(lat) * fz) / RADIUS_M
    return f, lap, east, north


# --- analysis and synthesis --------------------------------------------------------------------
@pytest.mark.parametrize("l, m", HARMONICS)
def test_analysis_of_real_harmonic_gives_single_coefficient(t42, l, m):
    """Re Y_l^m (and Im Y_l^m) analyse to one coefficient, 1/2 (-i/2), or 1 for m = 0 (scipy)."""
    grid, tr = t42
    y = _ylm(grid, l, m)
    parts = [(y.real, 1.0 if m == 0 else 0.5)]
    if m > 0:
        parts.append((y.imag, -0.5j))
    for field, value in parts:
        expected = np.zeros(grid.ncoeff, dtype=complex)
        expected[grid.index(l, m)] = value
        coeffs = tr.to_spectral(field)
        # coefficients are O(1); round-off of the quadrature sums (measured <= 5e-15)
        assert np.max(np.abs(coeffs - expected)) < ROUNDOFF, (l, m)


@pytest.mark.parametrize("l, m", HARMONICS)
def test_synthesis_of_single_coefficient_is_scipy_harmonic(t42, l, m):
    """A single coefficient synthesises to scipy's Re Y_l^m (same normalisation and phase)."""
    grid, tr = t42
    y = _ylm(grid, l, m)
    coeffs = np.zeros(grid.ncoeff, dtype=complex)
    coeffs[grid.index(l, m)] = 1.0 if m == 0 else 0.5
    assert _relmax(tr.to_grid(coeffs) - y.real, y.real) < ROUNDOFF, (l, m)


# --- Laplacian ---------------------------------------------------------------------------------
def test_laplacian_eigenvalues_are_minus_l_l_plus_1_over_a2(t42):
    grid, tr = t42
    expected = -grid.degree * (grid.degree + 1.0) / RADIUS_M**2
    np.testing.assert_allclose(tr.laplacian_eigenvalues(), expected, rtol=4 * EPS, atol=0)


@pytest.mark.parametrize("l, m", [(1, 1), (5, 3), (20, 7), (42, 17)])
def test_laplacian_of_harmonic(t42, l, m):
    """Lap Y_l^m = -l (l + 1) / a^2 Y_l^m, with Y from scipy, through analysis and synthesis."""
    grid, tr = t42
    f = _ylm(grid, l, m).real
    lap = tr.to_grid(tr.to_spectral(f) * tr.laplacian_eigenvalues())
    expected = -l * (l + 1) / RADIUS_M**2 * f
    assert _relmax(lap - expected, expected) < ROUNDOFF_LAPLACIAN, (l, m)


def test_cubic_polynomial_is_band_limited_to_degree_3(t42):
    """A degree-3 polynomial in x, y, z has no harmonic above l = 3 (its analysis is exact)."""
    grid, tr = t42
    f, *_ = _cubic(grid)
    coeffs = tr.to_spectral(f)
    high = np.abs(coeffs[grid.degree > 3]).max() / np.abs(coeffs).max()
    print(f"\ncubic: largest coefficient above l = 3, relative: {high:.2e}")
    assert high < 10 * EPS * grid.truncation  # round-off of a sum over ~N rings


@pytest.mark.parametrize("truncation", [21, 42])
def test_laplacian_of_cubic_polynomial(truncation):
    """Spectral Laplacian of a non-eigenfunction against the closed form (Euler's theorem)."""
    grid = SpectralGrid(truncation)
    tr = Transforms(grid, RADIUS_M)
    f, lap, _, _ = _cubic(grid)
    coeffs = tr.to_spectral(f)
    got = tr.to_grid(coeffs * tr.laplacian_eigenvalues())
    err = _relmax(got - lap, lap)
    exact_coeffs = np.where(grid.degree <= 3, coeffs, 0)  # drop the round-off above l = 3
    err_exact = _relmax(tr.to_grid(exact_coeffs * tr.laplacian_eigenvalues()) - lap, lap)
    print(f"\nT{truncation} Laplacian of cubic: max rel err {err:.2e} "
          f"(band-limited {err_exact:.2e})")
    assert err < ROUNDOFF_LAPLACIAN
    assert err_exact < ROUNDOFF_EXACT


# --- gradient ----------------------------------------------------------------------------------
def test_gradient_of_sin_latitude(t42):
    """grad sin(lat) = (0, cos(lat) / a)."""
    grid, tr = t42
    lat, _ = grid.mesh()
    east, north = tr.gradient(tr.to_spectral(np.sin(lat)))
    scale = 1 / RADIUS_M
    assert np.max(np.abs(east)) / scale < ROUNDOFF
    assert np.max(np.abs(north - np.cos(lat) / RADIUS_M)) / scale < ROUNDOFF


def test_gradient_of_cubic_polynomial(t42):
    """Tangential gradient of the cubic against grad F projected on the local east/north axes."""
    grid, tr = t42
    f, _, east, north = _cubic(grid)
    ge, gn = tr.gradient(tr.to_spectral(f))
    scale = max(np.abs(east).max(), np.abs(north).max())
    assert np.max(np.abs(ge - east)) / scale < ROUNDOFF
    assert np.max(np.abs(gn - north)) / scale < ROUNDOFF


@pytest.mark.parametrize("l, m", [(1, 0), (1, 1), (5, 3), (20, 7), (42, 0), (42, 42)])
def test_gradient_of_harmonic_against_scipy_derivatives(t42, l, m):
    """east = (1 / (a cos(lat))) dY/dlon, north = -(1 / a) dY/dcolat, from scipy's diff_n=1."""
    grid, tr = t42
    y, d_colat, d_lon = _ylm(grid, l, m, diff=True)
    lat, _ = grid.mesh()
    east = d_lon.real / (RADIUS_M * np.cos(lat))
    north = -d_colat.real / RADIUS_M
    coeffs = np.zeros(grid.ncoeff, dtype=complex)
    coeffs[grid.index(l, m)] = 1.0 if m == 0 else 0.5  # Re Y_l^m exactly
    ge, gn = tr.gradient(coeffs)
    scale = max(np.abs(east).max(), np.abs(north).max())
    assert np.max(np.abs(ge - east)) / scale < ROUNDOFF, (l, m)
    assert np.max(np.abs(gn - north)) / scale < ROUNDOFF, (l, m)


# --- divergence and vorticity of winds ---------------------------------------------------------
@pytest.mark.parametrize("alpha", [0.0, 0.05, np.pi / 3, np.pi / 2])
def test_solid_body_rotation_vorticity_and_divergence(t42, alpha):
    """zeta = 2 U / a (sin(lat) cos(alpha) - cos(lon) cos(lat) sin(alpha)), delta = 0."""
    grid, tr = t42
    lat, lon = grid.mesh()
    u0 = 40.0
    u = u0 * (np.cos(lat) * np.cos(alpha) + np.cos(lon) * np.sin(lat) * np.sin(alpha))
    v = -u0 * np.sin(lon) * np.sin(alpha)
    zeta = 2 * u0 / RADIUS_M * (np.sin(lat) * np.cos(alpha)
                                - np.cos(lon) * np.cos(lat) * np.sin(alpha))
    div, curl = tr.divergence_curl(u, v)
    scale = 2 * u0 / RADIUS_M
    assert np.max(np.abs(tr.to_grid(curl) - zeta)) / scale < ROUNDOFF
    assert np.max(np.abs(tr.to_grid(div))) / scale < ROUNDOFF
    # and back: the winds of that vorticity (no divergence) are the solid-body flow
    winds = tr.winds(tr.to_spectral(zeta), np.zeros(grid.ncoeff, dtype=complex))
    assert np.max(np.abs(winds[1] - u)) / u0 < ROUNDOFF
    assert np.max(np.abs(-winds[0] - v)) / u0 < ROUNDOFF


def test_divergent_zonal_flow(t42):
    """v = V cos(lat) sin(lat): delta = V (cos^2 - 2 sin^2) / a, zeta = 0; and the winds back."""
    grid, tr = t42
    lat, _ = grid.mesh()
    v0 = 10.0
    v = v0 * np.cos(lat) * np.sin(lat)
    expected = v0 * (np.cos(lat) ** 2 - 2 * np.sin(lat) ** 2) / RADIUS_M
    div, curl = tr.divergence_curl(np.zeros_like(v), v)
    scale = v0 / RADIUS_M
    assert np.max(np.abs(tr.to_grid(div) - expected)) / scale < ROUNDOFF
    assert np.max(np.abs(tr.to_grid(curl))) / scale < ROUNDOFF
    winds = tr.winds(np.zeros(grid.ncoeff, dtype=complex), tr.to_spectral(expected))
    assert np.max(np.abs(winds[1])) / v0 < ROUNDOFF
    assert np.max(np.abs(-winds[0] - v)) / v0 < ROUNDOFF


def test_divergence_of_gradient_and_curl_of_rotated_gradient(t42):
    """div grad f = Lap f and k . curl (k x grad f) = Lap f for the cubic; the other part is 0."""
    grid, tr = t42
    f, lap, east, north = _cubic(grid)
    div, curl = tr.divergence_curl(east, north)
    assert _relmax(tr.to_grid(div) - lap, lap) < ROUNDOFF
    assert np.max(np.abs(curl)) / np.max(np.abs(lap)) < ROUNDOFF
    div, curl = tr.divergence_curl(-north, east)  # k x (east, north) = (-north, east)
    assert _relmax(tr.to_grid(curl) - lap, lap) < ROUNDOFF
    assert np.max(np.abs(div)) / np.max(np.abs(lap)) < ROUNDOFF


def test_winds_of_velocity_potential_and_streamfunction(t42):
    """winds(0, Lap chi) = grad chi and winds(Lap psi, 0) = k x grad psi (Helmholtz)."""
    grid, tr = t42
    f, _, east, north = _cubic(grid)
    coeffs = np.where(grid.degree <= 3, tr.to_spectral(f), 0)  # exact, band-limited
    lap = coeffs * tr.laplacian_eigenvalues()
    zero = np.zeros_like(coeffs)
    scale = max(np.abs(east).max(), np.abs(north).max())
    w = tr.winds(zero, lap)
    assert np.max(np.abs(w[1] - east)) / scale < ROUNDOFF_EXACT
    assert np.max(np.abs(-w[0] - north)) / scale < ROUNDOFF_EXACT
    w = tr.winds(lap, zero)
    assert np.max(np.abs(w[1] + north)) / scale < ROUNDOFF_EXACT
    assert np.max(np.abs(-w[0] - east)) / scale < ROUNDOFF_EXACT


@pytest.mark.parametrize("truncation", [21, 42, 85])
def test_round_trip_winds_divergence_curl(truncation):
    """Random band-limited (zeta, delta) -> winds -> (delta, zeta) -> winds reproduces both.

    The l = 0 coefficients must come back as 0: the global integral of a divergence or a curl of
    a tangent field vanishes (Gauss / Stokes on the closed sphere).
    """
    grid = SpectralGrid(truncation)
    tr = Transforms(grid, RADIUS_M)
    rng = np.random.default_rng(1992)
    amp = 1e-5

    def random_coeffs():
        c = amp * (rng.standard_normal(grid.ncoeff) + 1j * rng.standard_normal(grid.ncoeff))
        c[grid.order == 0] = c[grid.order == 0].real  # imaginary part of m = 0 is meaningless
        c[grid.index(0, 0)] = 0.0
        return c

    vort, div = random_coeffs(), random_coeffs()
    winds = tr.winds(vort, div)
    div2, vort2 = tr.divergence_curl(winds[1], -winds[0])
    # coefficients O(amp); round-off of analysis and the sqrt(l(l+1)) factors (measured <= 2e-13)
    assert np.max(np.abs(div2 - div)) / amp < ROUNDOFF
    assert np.max(np.abs(vort2 - vort)) / amp < ROUNDOFF
    assert div2[grid.index(0, 0)] == 0 and vort2[grid.index(0, 0)] == 0
    winds2 = tr.winds(vort2, div2)
    assert _relmax(winds2 - winds, winds) < ROUNDOFF
