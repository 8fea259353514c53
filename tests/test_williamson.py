"""Williamson et al. (1992) shallow-water test cases 2, 5 and 6.

Source: Williamson, Drake, Hack, Jakob & Swarztrauber (1992), "A standard test set for numerical
approximations to the shallow water equations in spherical geometry", J. Comput. Phys. 102,
211-224 ("W92"). Error norms (W92 section 3): with I the global integral,
    l2 = sqrt(I[(h - hT)^2]) / sqrt(I[hT^2]),   linf = max|h - hT| / max|hT|,
computed here with the exact Gauss-Legendre quadrature of the model grid.

Run outputs are on the output grid (latitudes south to north, longitudes from -180 deg); the
helpers below turn a field back into the model's orientation (north to south, longitude from 0)
before a spectral analysis. Every test prints what it measures (see them with ``pytest -s``).

Run times on the 2-core machine (measured): case 2 T42 5 days 0.2-0.5 s each, case 6 T42 14 days
1.5 s, T85 9 s, T170 92 s (slow), case 5 T42 15 days 0.3 s.
"""

import math

import numpy as np
import pytest

import torrid
from torrid.physics.cases import earth, williamson2, williamson6
from torrid.physics.grid import SpectralGrid
from torrid.physics.transforms import Transforms
from torrid.workflow.driver import integrate, snapshot
from torrid.workflow.setup import build_model

DAY_S = 86400.0
RADIUS_M, OMEGA, GRAVITY = earth.RADIUS_M, earth.ROTATION_RATE_S, earth.GRAVITY_M_S2


# --- helpers -----------------------------------------------------------------------------------
def output_weights(grid):
    """Gauss weights (per point) in the output orientation (rings south to north)."""
    return np.broadcast_to(grid.quadrature_weights[::-1, None], grid.shape)


def error_norms(h, h_true, grid):
    """W92 l2 and linf relative errors of a field on the output grid."""
    w = output_weights(grid)
    l2 = math.sqrt(np.sum(w * (h - h_true) ** 2) / np.sum(w * h_true**2))
    linf = float(np.max(np.abs(h - h_true)) / np.max(np.abs(h_true)))
    return l2, linf


def to_model_orientation(field):
    """Inverse of the driver's output reordering: rings north to south, longitude from 0."""
    return np.roll(field, -field.shape[-1] // 2, axis=-1)[..., ::-1, :]


def height_coefficients(grid, field):
    """Spectral coefficients of an output-grid field of truncation ``grid`` (exact analysis)."""
    return Transforms(grid, RADIUS_M).to_spectral(to_model_orientation(field))


def padded(coeffs, grid, fine):
    """Zero-pad coefficients of ``grid`` to the truncation of ``fine`` (spectral interpolation)."""
    out = np.zeros(fine.ncoeff, dtype=complex)
    for l, m, c in zip(grid.degree, grid.order, coeffs):
        out[fine.index(l, m)] = c
    return out


def resolution_difference(ds_coarse, grid_coarse, ds_fine, grid_fine, time_index=-1):
    """W92 norms of the coarse height against the fine one, on the fine grid.

    The coarse field is interpolated exactly (its spherical-harmonic series evaluated on the fine
    grid); the fine grid's quadrature then integrates the squared difference exactly.
    """
    tr = Transforms(grid_fine, RADIUS_M)
    fine = height_coefficients(grid_fine, ds_fine.h.values[time_index])
    coarse = padded(height_coefficients(grid_coarse, ds_coarse.h.values[time_index]), grid_coarse,
                    grid_fine)
    h_fine, h_coarse = tr.to_grid(fine), tr.to_grid(coarse)
    w = np.broadcast_to(grid_fine.quadrature_weights[:, None], grid_fine.shape)
    l2 = math.sqrt(np.sum(w * (h_coarse - h_fine) ** 2) / np.sum(w * h_fine**2))
    linf = float(np.max(np.abs(h_coarse - h_fine)) / np.max(np.abs(h_fine)))
    return l2, linf


def wave_phase_speed(ds, grid, m=4):
    """Eastward angular speed (rad/day) of the zonal-wavenumber-m part of h, and fit residual.

    The m-th longitudinal Fourier coefficient H_m(t, lat) of h is projected on its initial value,
    c(t) = sum_lat w H_m(t) conj(H_m(0)); a pattern cos(m (lon - nu t)) gives arg c = -m nu t.
    nu is the slope of a straight-line fit to the unwrapped phase; the residual (rad of
    longitude) shows how steadily the wave moves.
    """
    t = ds.time.values
    hm = np.fft.rfft(ds.h.values, axis=-1)[:, :, m]
    w = grid.quadrature_weights[::-1]
    c = np.sum(w[None, :] * hm * np.conj(hm[0])[None, :], axis=1)
    phase = np.unwrap(np.angle(c))
    slope, offset = np.polyfit(t, phase, 1)
    residual = float(np.max(np.abs(phase - (slope * t + offset))) / m)
    return -slope / m, residual


def hyperdiffusion_change(model, days, name):
    """Relative change of an invariant over ``days`` at its initial hyperdiffusive rate.

    d/dt of E (or Z) along the hyperdiffusion tendency -nu_l x of the initial state x, by a
    centred difference (the invariants are smooth in x); times the run length.
    """
    x = model.initial_state
    nu = model.process("hyperdiffusion").rates
    step = 1e3  # s; nu_l * step <= 2e-3 for the cases here: well inside the linear range

    def value(state):
        return snapshot(model, state)[name]

    rate = (value(x - step * nu * x) - value(x + step * nu * x)) / (2 * step)
    return rate * days * DAY_S / value(x)


def relative_changes(ds):
    out = {}
    for name in ("mean_thickness", "total_energy", "potential_enstrophy"):
        values = ds[name].values
        out[name] = (values - values[0]) / values[0]
    return out


def run_case(case, truncation, **kwargs):
    model = build_model(torrid.build_case_config(case, truncation=truncation, **kwargs))
    ds, summary = integrate(model, progress=False)
    return model, ds, summary


# --- case 2: steady zonal geostrophic flow -----------------------------------------------------
CASE2_ALPHAS = [0.0, 0.05, math.pi / 2 - 0.05]


@pytest.mark.parametrize("alpha", CASE2_ALPHAS)
def test_case2_steady_state_error_norms(alpha):
    """Case 2 at T42, 5 days: height and winds equal the exact steady state to round-off.

    Tolerance 1e-10 (W92 norms): the exact u, v are solid-body rotation (spherical-harmonic
    degree 1) and h is quadratic in the Cartesian coordinates (degree <= 2), all represented
    exactly at any truncation, and the discrete tendencies of that state cancel exactly; only
    round-off remains (measured ~1e-15). A real error (e.g. a Coriolis or metric term wrong)
    makes O(1e-3) errors within a day.
    """
    model, ds, summary = run_case("williamson2", 42, days=5, alpha_rad=alpha)
    assert ds.time.values[-1] == pytest.approx(5.0)
    lat = np.radians(ds.lat.values)[:, None]
    lon = np.radians(ds.lon.values)[None, :]
    h_true = williamson2.exact_height(lat, lon, 5 * DAY_S, radius_m=RADIUS_M,
                                      rotation_rate_s=OMEGA, gravity_m_s2=GRAVITY,
                                      alpha_rad=alpha)
    l2, linf = error_norms(ds.h.values[-1], h_true, model.grid)
    l2_0, linf_0 = error_norms(ds.h.values[0], h_true, model.grid)
    u0 = williamson2.wind_speed_m_s(RADIUS_M)
    u_true = u0 * (np.cos(lat) * np.cos(alpha) + np.cos(lon) * np.sin(lat) * np.sin(alpha))
    v_true = -u0 * np.sin(lon) * np.sin(alpha) * np.ones_like(lat)
    wind_err = max(np.abs(ds.u.values[-1] - u_true).max(), np.abs(ds.v.values[-1] - v_true).max())
    print(f"\ncase 2 T42 alpha={alpha:.4f}: day 5 l2 {l2:.2e} linf {linf:.2e} "
          f"(day 0: {l2_0:.2e}, {linf_0:.2e}); max wind error / u0 {wind_err / u0:.2e}; "
          f"dt {model.dt:.0f} s, {summary.wall_seconds:.2f} s wall")
    assert l2 < 1e-10 and linf < 1e-10
    assert wind_err / u0 < 1e-10


# --- case 6: Rossby-Haurwitz wave --------------------------------------------------------------
CASE6_DAYS = 14.0


@pytest.fixture(scope="module")
def case6():
    """Case 6 runs at T42 and T85 (the case's default hyperdiffusion and time step)."""
    return {n: run_case("williamson6", n, days=CASE6_DAYS) for n in (42, 85)}


@pytest.fixture(scope="module")
def case6_t170():
    return run_case("williamson6", 170, days=CASE6_DAYS)


@pytest.mark.parametrize("truncation", [42, 85])
def test_case6_mass_conserved(case6, truncation):
    """Mass to 1e-12 relative: the spectral method never changes the l = 0 coefficient of phi'
    (its tendency is a divergence, multiplied by l (l + 1) = 0), so only the round-off of the
    diagnostic mean remains (measured <= 1e-15)."""
    _, ds, _ = case6[truncation]
    change = np.max(np.abs(relative_changes(ds)["mean_thickness"]))
    print(f"\ncase 6 T{truncation}: max |mass change| {change:.2e}")
    assert change < 1e-12


@pytest.mark.parametrize("truncation", [42, 85])
def test_case6_energy_and_enstrophy_changes_bounded(case6, truncation):
    """Energy and potential enstrophy (conserved by the inviscid equations) only decrease, and by
    amounts the dissipation explains.

    Energy: the case's del^4 hyperdiffusion (nu4 = 1e15 m^4/s, the same at every truncation)
    removes, at the initial state's rate, dE/E = -2.2e-5 in 14 days (computed below). The time
    scheme dissipates a little too (inviscid T42 run at the same step: -2.3e-5 in 14 days,
    third order in dt, so 8x less at T85's half step). Measured: T42 -4.6e-5 (2.1x the
    hyperdiffusive estimate), T85 -2.8e-5 (1.3x), T170 -2.5e-5 (1.2x). Bound: the change is
    negative and between 0.8x and 3x the hyperdiffusive estimate.
    Potential enstrophy: the estimate at the initial rate is -1.6e-4, but enstrophy cascades to
    the dissipation scales, so the loss is larger: measured T42 -8.5e-4, T85 -1.4e-3, T170
    -1.4e-3. Bound: negative and above -5e-3 (3.5x the largest measured; a numerical instability
    or a wrong sign of the damping breaks it).
    """
    model, ds, _ = case6[truncation]
    changes = relative_changes(ds)
    d_energy = changes["total_energy"][-1]
    d_enstrophy = changes["potential_enstrophy"][-1]
    est_energy = hyperdiffusion_change(model, CASE6_DAYS, "total_energy")
    est_enstrophy = hyperdiffusion_change(model, CASE6_DAYS, "potential_enstrophy")
    print(f"\ncase 6 T{truncation}, {CASE6_DAYS:g} days: dE/E {d_energy:.3e} (hyperdiffusion at "
          f"the initial rate {est_energy:.3e}, ratio {d_energy / est_energy:.2f}); dZ/Z "
          f"{d_enstrophy:.3e} (initial-rate estimate {est_enstrophy:.3e})")
    assert est_energy < 0 and est_enstrophy < 0
    assert 3 * est_energy < d_energy < 0.8 * est_energy
    assert -5e-3 < d_enstrophy < 0
    assert np.all(np.diff(ds.total_energy.values) < 0)  # monotone decay, output to output


def test_case6_stays_physical(case6):
    for truncation, (_, ds, _) in case6.items():
        assert np.all(np.isfinite(ds.h.values)) and np.all(np.isfinite(ds.u.values))
        assert ds.h.values.min() > 7000  # h0 = 8 km minus the wave's trough (about 1 km)


@pytest.mark.parametrize("truncation", [42, 85])
def test_case6_drift_against_rossby_haurwitz_speed(case6, truncation):
    """Eastward drift of the wavenumber-4 pattern against the nondivergent speed nu (W92 eq. 147,
    Haurwitz 1940).

    nu = (R (3 + R) omega - 2 Omega) / ((1 + R)(2 + R)) = 12.20 deg/day is exact for the
    nondivergent barotropic wave; the shallow-water wave (divergent, h0 = 8 km) moves slower.
    Measured: 11.31 deg/day at T42, 11.29 at T85 and T170 (0.926 nu), converged to 0.2 % in
    resolution, and steady (straight-line fit residual 0.3 deg of longitude over 14 days).
    Bound: 0.90 nu < speed < 0.97 nu. The slow-down by divergence is expected (a finite
    deformation radius slows Rossby waves; qualitative, from memory: Longuet-Higgins 1968), its
    size is taken from the measurement, with a +-4 % band that a wrong rotation rate, a wrong
    vorticity advection or a westward drift would leave.
    """
    _, ds, _ = case6[truncation]
    grid = SpectralGrid(truncation)
    speed, residual = wave_phase_speed(ds, grid)
    nu = williamson6.rossby_haurwitz_angular_speed(OMEGA) * DAY_S  # rad/day
    ratio = speed / nu
    print(f"\ncase 6 T{truncation}: wave-4 drift {math.degrees(speed):.3f} deg/day, "
          f"nondivergent nu {math.degrees(nu):.3f} deg/day, ratio {ratio:.4f}, "
          f"fit residual {math.degrees(residual):.2f} deg")
    assert 0.90 < ratio < 0.97
    assert math.degrees(residual) < 1.0  # the drift is steady: < 1 deg off a constant speed


def test_case6_drift_converged_between_t42_and_t85(case6):
    """The drift speed hardly depends on resolution (measured 0.14 % between T42 and T85)."""
    s42, _ = wave_phase_speed(case6[42][1], SpectralGrid(42))
    s85, _ = wave_phase_speed(case6[85][1], SpectralGrid(85))
    print(f"\ncase 6 drift T42 vs T85: relative difference {abs(s42 - s85) / s85:.2e}")
    assert abs(s42 - s85) / s85 < 0.01


def test_case6_t42_against_t85(case6):
    """Self-convergence at day 14: T42 height against T85 (W92 norms on the T85 grid).

    Measured l2 5.7e-3, linf 1.4e-2 (T42 against T170: 6.2e-3, 1.5e-2; the T42 error is
    spatial: quartering its time step changes it by < 2 %). Bounds: l2 < 1e-2, linf < 3e-2.
    """
    (_, ds42, _), (_, ds85, _) = case6[42], case6[85]
    l2, linf = resolution_difference(ds42, SpectralGrid(42), ds85, SpectralGrid(85))
    print(f"\ncase 6 day 14 T42 vs T85: l2 {l2:.2e} linf {linf:.2e}")
    assert l2 < 1e-2 and linf < 3e-2


@pytest.mark.slow
def test_case6_converges_to_t170(case6, case6_t170):
    """T42 and T85 height at day 14 against a T170 reference: differences shrink with resolution.

    Measured l2 (linf): T42 6.2e-3 (1.5e-2), T85 5.1e-4 (1.2e-3): 12x smaller for twice the
    resolution. Bounds: T42 l2 < 1e-2, T85 l2 < 1e-3, and at least a 4x reduction (second order
    in the truncation, far less than the spectral method delivers on this smooth flow).
    """
    _, ds170, _ = case6_t170
    g170 = SpectralGrid(170)
    norms = {n: resolution_difference(case6[n][1], SpectralGrid(n), ds170, g170) for n in (42, 85)}
    for n, (l2, linf) in norms.items():
        print(f"\ncase 6 day 14 T{n} vs T170: l2 {l2:.2e} linf {linf:.2e}")
    assert norms[42][0] < 1e-2
    assert norms[85][0] < 1e-3
    assert norms[85][0] < norms[42][0] / 4
    assert norms[85][1] < norms[42][1] / 4


@pytest.mark.slow
def test_case6_t170_invariants_and_drift(case6_t170):
    """The T170 reference itself: mass to 1e-12; energy and enstrophy bounds as at T42/T85;
    drift 0.926 nu (measured)."""
    model, ds, _ = case6_t170
    changes = relative_changes(ds)
    est = hyperdiffusion_change(model, CASE6_DAYS, "total_energy")
    speed, _ = wave_phase_speed(ds, model.grid)
    ratio = speed / (williamson6.rossby_haurwitz_angular_speed(OMEGA) * DAY_S)
    print(f"\ncase 6 T170: mass {np.abs(changes['mean_thickness']).max():.2e}, dE/E "
          f"{changes['total_energy'][-1]:.3e} (hyperdiffusive estimate {est:.3e}), dZ/Z "
          f"{changes['potential_enstrophy'][-1]:.3e}, drift ratio {ratio:.4f}")
    assert np.abs(changes["mean_thickness"]).max() < 1e-12
    assert 3 * est < changes["total_energy"][-1] < 0.8 * est
    assert -5e-3 < changes["potential_enstrophy"][-1] < 0
    assert 0.90 < ratio < 0.97


# --- case 5: zonal flow over an isolated mountain ----------------------------------------------
def test_case5_mountain_stable_and_conservative():
    """Case 5 at T42 for 15 days (W92: no analytic solution; checked for conservation/stability).

    Mass to 1e-12 (as for case 6). Finite fields, positive thickness h - h_s everywhere (measured
    minimum 3837 m; the mountain top is 2000 m under a 5960 m surface). Energy: conserved by the
    inviscid equations, not exactly by the truncated, time-discrete model; measured max
    |dE/E| over the run 3.2e-6 (7.6e-6 inviscid). Bound 5e-5: >10x the measurement, far below
    what an instability or a wrong topographic term would produce (those grow the energy
    by orders of magnitude or shift it by the 1e-3-scale mountain potential energy).
    """
    model, ds, summary = run_case("williamson5", 42, days=15)
    assert ds.time.values[-1] == pytest.approx(15.0)
    changes = relative_changes(ds)
    thickness = ds.h.values - ds.surface_height.values[None]
    speed = np.sqrt(ds.u.values**2 + ds.v.values**2).max()
    print(f"\ncase 5 T42 15 days: max |mass change| {np.abs(changes['mean_thickness']).max():.2e}; "
          f"max |dE/E| {np.abs(changes['total_energy']).max():.2e} "
          f"(end {changes['total_energy'][-1]:.2e}); "
          f"dZ/Z {changes['potential_enstrophy'][-1]:.2e}; min thickness {thickness.min():.1f} m; "
          f"h in [{ds.h.values[-1].min():.1f}, {ds.h.values[-1].max():.1f}] m at day 15; "
          f"max wind {speed:.1f} m/s; dt {model.dt:.0f} s")
    for name in ("h", "u", "v", "vorticity", "divergence"):
        assert np.all(np.isfinite(ds[name].values)), name
    assert np.abs(changes["mean_thickness"]).max() < 1e-12
    assert thickness.min() > 0
    assert np.abs(changes["total_energy"]).max() < 5e-5
    assert ds.surface_height.values.max() == pytest.approx(2000.0, rel=0.05)  # the cone is there
