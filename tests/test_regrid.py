"""Spectral least-squares fit of lon-lat fields onto the model grid (torrid.physics.regrid).

Sources: the spherical harmonics come from scipy.special.sph_harm_y (orthonormal, Condon-Shortley
phase, the same convention as ducc0); the solid-body winds and their vorticity are those of
Williamson, Drake, Hack, Jakob & Swarztrauber (1992), J. Comput. Phys. 102, 211-224 ("W92"),
test cases 1 and 2: u = u0 (cos lat cos a + cos lon sin lat sin a), v = -u0 sin lon sin a
(solid-body rotation about an axis tilted by a), whose relative vorticity is twice the angular
velocity along the local vertical, zeta = 2 u0 / a (sin lat cos a - cos lon cos lat sin a).
"""

import ducc0
import numpy as np
import pytest
from scipy.special import sph_harm_y

from torrid.physics.fields import spectral_state
from torrid.physics.grid import SpectralGrid
from torrid.physics.regrid import FitNotConvergedError, fit_scalar, fit_state, fit_winds
from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY
from torrid.physics.transforms import Transforms

N = 21
RADIUS_M = 7.0e7  # a hot-Jupiter-sized sphere, m
GRAVITY_M_S2 = 10.0

# A few harmonics of degree <= N (complex coefficient of Y_lm, m >= 0), including l = m = N.
HARMONICS = [(0, 0, 1.3), (1, 1, 0.4 - 0.7j), (3, 0, -0.5), (5, 2, 0.3 - 0.2j), (12, 7, 0.25j),
             (17, 9, 0.2 + 0.1j), (N, 0, 0.15), (N, N, -0.1j)]


@pytest.fixture(scope="module")
def tr():
    return Transforms(SpectralGrid(N), RADIUS_M)


def regular_grid(step_deg):
    """Regular lon-lat grid including both poles, longitudes [0, 360), degrees."""
    return np.linspace(-90.0, 90.0, int(round(180 / step_deg)) + 1), np.arange(0.0, 360.0, step_deg)


def irregular_grid(nlat, nlon, seed=3):
    """Jittered grid: latitudes north to south without poles, longitudes in [-180, 180)."""
    rng = np.random.default_rng(seed)
    dlat, dlon = 180.0 / nlat, 360.0 / nlon
    lat = np.linspace(-90 + dlat / 2, 90 - dlat / 2, nlat) + rng.uniform(-0.3, 0.3, nlat) * dlat
    lon = np.arange(-180.0, 180.0, dlon) + rng.uniform(-0.3, 0.3, nlon) * dlon
    return lat[::-1], lon


def harmonic_field(lat_deg, lon_deg, harmonics=HARMONICS):
    """Real field sum a_l0 Y_l0 + 2 Re sum_{m>0} a_lm Y_lm on a lon-lat grid (scipy harmonics)."""
    theta = np.deg2rad(90.0 - np.asarray(lat_deg))[:, None]
    phi = np.deg2rad(np.asarray(lon_deg))[None, :]
    f = np.zeros((theta.size, phi.size))
    for l, m, c in harmonics:
        y = sph_harm_y(l, m, theta, phi)
        f += (c * y).real if m == 0 else 2.0 * (c * y).real
    return f


def harmonic_coeffs(grid, harmonics=HARMONICS):
    out = np.zeros(grid.ncoeff, dtype=complex)
    for l, m, c in harmonics:
        out[grid.index(l, m)] = c.real if m == 0 else c
    return out


def relative_error(a, b):
    return np.max(np.abs(a - b)) / np.max(np.abs(b))


# --- band-limited scalars ------------------------------------------------------------------------
@pytest.mark.parametrize("grid_kind", ["regular 1 deg with poles", "irregular 4x5 deg"])
def test_band_limited_scalar_recovered(tr, grid_kind):
    # Harmonics of degree <= N lie in the model space, so the least-squares fit is exact for them
    # up to the solver tolerance (1e-12) and the transforms' accuracy (3e-13).
    if grid_kind.startswith("regular"):
        lat, lon = regular_grid(1.0)
    else:
        lat, lon = irregular_grid(45, 72)
    coeffs = fit_scalar(tr, lat, lon, harmonic_field(lat, lon))
    assert coeffs.shape == (tr.grid.ncoeff,) and coeffs.dtype == np.complex128
    assert relative_error(coeffs, harmonic_coeffs(tr.grid)) < 1e-8
    assert np.all(coeffs[tr.grid.order == 0].imag == 0.0)


def test_scalar_fit_independent_of_axis_order_and_longitude_range(tr):
    # The same points listed in another order or longitude convention are the same problem.
    lat, lon = irregular_grid(30, 50, seed=5)
    f = harmonic_field(lat, lon)
    ref = fit_scalar(tr, lat, lon, f)
    ilat, ilon = np.random.default_rng(0).permutation(lat.size), np.argsort(np.mod(lon, 360.0))
    other = fit_scalar(tr, lat[ilat], np.mod(lon, 360.0)[ilon], f[ilat][:, ilon])
    assert relative_error(other, ref) < 1e-11


def test_duplicated_meridian_shares_its_cell(tr):
    # A grid listing 0 and 360 deg both (common in data sets) fits like the grid without 360.
    lat, lon = regular_grid(3.0)
    lon_dup = np.append(lon, 360.0)
    ref = fit_scalar(tr, lat, lon, harmonic_field(lat, lon))
    dup = fit_scalar(tr, lat, lon_dup, harmonic_field(lat, lon_dup))
    assert relative_error(dup, ref) < 1e-11


def test_mean_is_y00_coefficient_over_sqrt_4pi(tr):
    # Y_00 = 1 / sqrt(4 pi) for the orthonormal basis: the grid mean of the synthesised fit.
    lat, lon = irregular_grid(40, 80)
    coeffs = fit_scalar(tr, lat, lon, harmonic_field(lat, lon))
    mean = tr.grid.global_mean(tr.to_grid(coeffs))
    assert mean == pytest.approx(coeffs[tr.grid.index(0, 0)].real * np.sqrt(1 / (4 * np.pi)),
                                 rel=1e-13)
    assert mean == pytest.approx(1.3 / np.sqrt(4 * np.pi), rel=1e-10)


def test_fit_approximates_l2_projection_of_unresolved_field(tr):
    # Content above the truncation (l = 25..35) is orthogonal to the model space, so the
    # continuous L2 projection keeps exactly the l <= N harmonics. With cell-area weights the
    # discrete fit converges to it at second order in the grid spacing (midpoint-type quadrature).
    high = [(30, 4, 0.5), (27, 27, 0.3j), (35, 0, 0.4), (25, 12, -0.3)]
    errors = []
    for step in (2.0, 1.0):
        lat, lon = regular_grid(step)
        coeffs = fit_scalar(tr, lat, lon, harmonic_field(lat, lon, HARMONICS + high))
        errors.append(relative_error(coeffs, harmonic_coeffs(tr.grid)))
    assert errors[1] < 1e-3
    assert errors[0] / errors[1] > 3.0  # ~4 for second order
    # Strongly uneven spacing (0.5 deg in one half, 1.5 deg in the other, both axes): the cell
    # widths must follow the spacing (equal widths would give an error of about 1e-2 here).
    lat = np.concatenate([np.arange(-89.75, 0.0, 0.5), np.arange(0.5, 90.0, 1.5)])[::-1]
    lon = np.concatenate([np.arange(-180.0, 0.0, 0.5), np.arange(0.0, 180.0, 1.5)])
    coeffs = fit_scalar(tr, lat, lon, harmonic_field(lat, lon, HARMONICS + high))
    assert relative_error(coeffs, harmonic_coeffs(tr.grid)) < 1.5e-3


@pytest.mark.parametrize("spin", [0, 1])
def test_normal_operator_is_symmetric(tr, spin):
    # Conjugate gradients needs S^T W S symmetric: the real parametrisation's adjoint must be the
    # transpose of its synthesis, <W S x, S y> = <x, S^T W S y> (dot-product test).
    from torrid.physics.regrid import NUFFT_EPSILON, _geometry, _RealParameters

    loc, area = _geometry(*irregular_grid(90, 180))
    params = _RealParameters(tr.grid.degree, tr.grid.order, spin)
    kw = dict(spin=spin, lmax=N, loc=loc, epsilon=NUFFT_EPSILON)
    rng = np.random.default_rng(spin)
    x, y = rng.standard_normal((2, params.size))
    sx = ducc0.sht.synthesis_general(alm=params.to_coeffs(x), **kw)
    sy = ducc0.sht.synthesis_general(alm=params.to_coeffs(y), **kw)
    sty = params.adjoint(ducc0.sht.adjoint_synthesis_general(map=sy * area, **kw))
    assert np.sum(sx * sy * area) == pytest.approx(x @ sty, rel=1e-12)
    # and the parametrisation is normalised: S^T W S is close to the identity on a fine grid
    assert np.linalg.norm(sty - y) < 0.1 * np.linalg.norm(y)


# --- winds ------------------------------------------------------------------------------------
@pytest.mark.parametrize("alpha", [0.0, 0.7])
def test_solid_body_rotation_vorticity_and_zero_divergence(tr, alpha):
    # W92 cases 1/2 wind (alpha = 0: u = U cos lat): zeta = 2 U/a (sin lat cos a
    # - cos lon cos lat sin a), divergence 0. Given on a 2-degree grid in [-180, 180) with poles,
    # where the tilted flow crosses the poles (the spin-1 fit must treat the pole points right).
    u0 = 150.0
    lat, lon = np.linspace(-90.0, 90.0, 91), np.arange(-180.0, 180.0, 2.0)
    la, lo = np.meshgrid(np.deg2rad(lat), np.deg2rad(lon), indexing="ij")
    u = u0 * (np.cos(la) * np.cos(alpha) + np.cos(lo) * np.sin(la) * np.sin(alpha))
    v = -u0 * np.sin(lo) * np.sin(alpha)
    vort, div = fit_winds(tr, lat, lon, u, v)
    g_lat, g_lon = tr.grid.mesh()
    expected = 2 * u0 / RADIUS_M * (np.sin(g_lat) * np.cos(alpha)
                                    - np.cos(g_lon) * np.cos(g_lat) * np.sin(alpha))
    scale = 2 * u0 / RADIUS_M
    assert np.max(np.abs(tr.to_grid(vort) - expected)) < 1e-10 * scale
    assert np.max(np.abs(tr.to_grid(div))) < 1e-10 * scale
    assert np.max(np.abs(div)) < 1e-10 * scale
    assert vort[tr.grid.index(0, 0)] == 0 and div[tr.grid.index(0, 0)] == 0
    # only degree 1 is present: sin(lat) = sqrt(4 pi / 3) Y_10
    assert vort[tr.grid.index(1, 0)].real == pytest.approx(
        scale * np.cos(alpha) * np.sqrt(4 * np.pi / 3), rel=1e-10)


def test_irrotational_winds_give_divergence(tr):
    # Winds grad(chi) of chi = a c Y_lm (band-limited): divergence -l(l+1) c Y_lm / a, no vorticity.
    lat, lon = irregular_grid(40, 64, seed=7)
    l, m, c = 6, 3, 2.0 - 1.0j
    theta = np.deg2rad(90.0 - lat)[:, None]
    phi = np.deg2rad(lon)[None, :]
    # chi = 2 Re(c Y_lm); d/dtheta from scipy (diff_n=1), d/dphi = i m
    y, dy = sph_harm_y(l, m, theta, phi, diff_n=1)[:2]
    chi_theta = 2 * (c * dy[..., 0]).real  # d chi / d theta (per unit a c)
    chi_phi = 2 * (c * y * 1j * m).real
    u = chi_phi / np.sin(theta)  # (1/(a sin theta)) d(a chi)/d phi
    v = -chi_theta  # northward = -(1/a) d(a chi)/d theta
    vort, div = fit_winds(tr, lat, lon, u, v)
    expected = np.zeros(tr.grid.ncoeff, dtype=complex)
    expected[tr.grid.index(l, m)] = -l * (l + 1) * c / RADIUS_M
    assert relative_error(div, expected) < 1e-8
    assert np.max(np.abs(vort)) < 1e-8 * np.max(np.abs(expected))


# --- agreement with the Gauss-grid analysis --------------------------------------------------
def polynomial_field(lat, lon):
    """A degree-6 polynomial in x, y, z on the unit sphere (band-limited to l <= 6)."""
    x, y, z = np.cos(lat) * np.cos(lon), np.cos(lat) * np.sin(lon), np.sin(lat)
    return 3.0 + x**3 * y - 2.0 * x * y * z**2 + z**5 + 0.5 * y**6 - x * z


def test_fit_then_synthesis_matches_gauss_analysis(tr):
    lat, lon = irregular_grid(36, 60, seed=11)
    la, lo = np.meshgrid(np.deg2rad(lat), np.deg2rad(lon), indexing="ij")
    coeffs = fit_scalar(tr, lat, lon, polynomial_field(la, lo))
    g_lat, g_lon = tr.grid.mesh()
    direct = tr.to_spectral(polynomial_field(g_lat, g_lon))
    assert relative_error(coeffs, direct) < 1e-10
    assert relative_error(tr.to_grid(coeffs), tr.to_grid(direct)) < 1e-10


def test_fit_state_matches_gauss_analysis_williamson2(tr):
    # W92 case 2 (tilted) with a band-limited surface height; fit_state must equal the
    # Gauss-grid analysis of the same fields (torrid.physics.fields.spectral_state).
    alpha, u0 = 0.3, 2 * np.pi * RADIUS_M / (12 * 86400.0)
    omega = 2 * np.pi / (3.5 * 86400.0)

    def fields(la, lo):
        u = u0 * (np.cos(la) * np.cos(alpha) + np.cos(lo) * np.sin(la) * np.sin(alpha))
        v = -u0 * np.sin(lo) * np.sin(alpha)
        k = -np.cos(lo) * np.cos(la) * np.sin(alpha) + np.sin(la) * np.cos(alpha)
        h = (4.0e5 - (RADIUS_M * omega * u0 + u0**2 / 2) * k**2) / GRAVITY_M_S2
        hs = 200.0 * (1 + np.cos(la) ** 2 * np.cos(2 * lo))
        return h, u, v, hs

    lat, lon = regular_grid(2.5)
    la, lo = np.meshgrid(np.deg2rad(lat), np.deg2rad(lon), indexing="ij")
    h, u, v, hs = fields(la, lo)
    state, mean = fit_state(tr, lat, lon, h, u, v, GRAVITY_M_S2, surface_height_m=hs)

    gh, gu, gv, ghs = fields(*tr.grid.mesh())
    phi = GRAVITY_M_S2 * (gh - ghs)
    ref_mean = tr.grid.global_mean(phi)
    ref = spectral_state(tr, gu, gv, phi - ref_mean)
    assert state.shape == (3, tr.grid.ncoeff) and state.dtype == np.complex128
    assert mean == pytest.approx(ref_mean, rel=1e-12)
    for row in (VORTICITY, DIVERGENCE, GEOPOTENTIAL):
        scale = np.max(np.abs(ref[VORTICITY if row == DIVERGENCE else row]))
        assert np.max(np.abs(state[row] - ref[row])) < 1e-10 * scale
    assert state[GEOPOTENTIAL, tr.grid.index(0, 0)] == 0


def test_fit_state_without_topography(tr):
    lat, lon = regular_grid(3.0)
    h = 1000.0 + harmonic_field(lat, lon)
    zeros = np.zeros_like(h)
    state, mean = fit_state(tr, lat, lon, h, zeros, zeros, GRAVITY_M_S2)
    expected = GRAVITY_M_S2 * harmonic_coeffs(tr.grid)
    expected[0] = 0.0
    assert mean == pytest.approx(GRAVITY_M_S2 * (1000.0 + 1.3 / np.sqrt(4 * np.pi)), rel=1e-12)
    assert relative_error(state[GEOPOTENTIAL], expected) < 1e-8
    assert np.all(state[VORTICITY] == 0) and np.all(state[DIVERGENCE] == 0)


# --- bad input --------------------------------------------------------------------------------
def _one_line_value_error(func, *args, match, **kw):
    with pytest.raises(ValueError, match=match) as err:
        func(*args, **kw)
    assert "\n" not in str(err.value)


def test_refuses_too_coarse_grid(tr):
    lat = np.linspace(-80.0, 80.0, N)  # N latitudes: one too few
    lon = np.linspace(0.0, 360.0, 2 * N + 1, endpoint=False)
    _one_line_value_error(fit_scalar, tr, lat, lon, np.ones((N, 2 * N + 1)),
                          match=f"{N} distinct latitudes.*need at least {N + 1}")
    lat = np.linspace(-80.0, 80.0, N + 1)
    lon = np.linspace(0.0, 360.0, 2 * N, endpoint=False)  # 2N longitudes: one too few
    _one_line_value_error(fit_winds, tr, lat, lon, np.ones((N + 1, 2 * N)),
                          np.ones((N + 1, 2 * N)), match=f"{2 * N} distinct longitudes")
    # N + 1 rows but both poles: the two poles carry one latitude's worth of information
    lat = np.linspace(-90.0, 90.0, N + 1)
    lon = np.linspace(0.0, 360.0, 2 * N + 1, endpoint=False)
    _one_line_value_error(fit_scalar, tr, lat, lon, np.ones((N + 1, 2 * N + 1)),
                          match="too coarse")
    # 0 and 360 deg are one meridian
    lon = np.append(np.linspace(0.0, 360.0, 2 * N, endpoint=False), 360.0)
    lat = np.linspace(-80.0, 80.0, N + 1)
    _one_line_value_error(fit_scalar, tr, lat, lon, np.ones((N + 1, 2 * N + 1)),
                          match=f"{2 * N} distinct longitudes")


@pytest.mark.parametrize("bad", [np.nan, np.inf])
def test_refuses_non_finite_values(tr, bad):
    lat, lon = regular_grid(5.0)
    good = np.ones((lat.size, lon.size))
    worse = good.copy()
    worse[3, 4] = bad
    _one_line_value_error(fit_scalar, tr, lat, lon, worse, match="values.*non-finite")
    _one_line_value_error(fit_winds, tr, lat, lon, good, worse, match="^v contains non-finite")
    _one_line_value_error(fit_state, tr, lat, lon, good, worse, good, GRAVITY_M_S2,
                          match="^u contains non-finite")
    _one_line_value_error(fit_state, tr, lat, lon, worse, good, good, GRAVITY_M_S2,
                          match="^h_m contains non-finite")
    bad_lat = lat.copy()
    bad_lat[0] = bad
    _one_line_value_error(fit_scalar, tr, bad_lat, lon, good, match="lat_deg.*non-finite")


def test_refuses_mismatched_shapes(tr):
    lat, lon = regular_grid(5.0)
    good = np.ones((lat.size, lon.size))
    _one_line_value_error(fit_scalar, tr, lat, lon, good.T, match=r"values has shape \(72, 37\)")
    _one_line_value_error(fit_winds, tr, lat, lon, good, good[:, :-1], match="v has shape")
    _one_line_value_error(fit_state, tr, lat, lon, good, good, good, GRAVITY_M_S2,
                          surface_height_m=good[1:], match="surface_height_m has shape")
    _one_line_value_error(fit_scalar, tr, good, lon, good, match="lat_deg must be .*1-D")
    _one_line_value_error(fit_scalar, tr, lat + 1.0, lon, good, match=r"\[-90, 90\]")


def test_non_convergence_raises(tr):
    # Latitudes with a 40-degree gap at T21 make the normal equations ill-conditioned:
    # a tiny iteration limit must raise instead of returning an unconverged fit.
    lat = np.concatenate([np.linspace(-89.0, -20.0, 30), np.linspace(20.0, 89.0, 30)])
    lon = np.arange(0.0, 360.0, 5.0)
    with pytest.raises(FitNotConvergedError, match="did not converge in 3 iterations"):
        fit_scalar(tr, lat, lon, harmonic_field(lat, lon), maxiter=3)


def test_run_starts_from_another_runs_fields(tmp_path):
    """A run started from a run file's last output continues from that state: on the same grid
    the fit is exact (the fields lie in the model space), so the new run's first output equals
    the old run's last to the solver tolerance."""
    import torrid

    config = torrid.ModelConfig().replace(numerics={"truncation": 21},
                                          run={"days": 2.0, "stop_at_steady_state": False})
    first = torrid.run(config, tmp_path / "first.nc")
    again = torrid.run(config.replace(run={"initial_fields": str(tmp_path / "first.nc")}))
    for name in ("h", "u", "v", "vorticity"):
        a, b = first[name].isel(time=-1).values, again[name].isel(time=0).values
        assert np.abs(a - b).max() <= 1e-8 * np.abs(a).max(), name
    with pytest.raises(torrid.io.config.ConfigError, match="no such file"):
        torrid.run(config.replace(run={"initial_fields": str(tmp_path / "none.nc")}))
