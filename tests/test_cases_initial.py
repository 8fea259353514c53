"""Initial conditions of the standard test cases against their published definitions.

Sources: Williamson, Drake, Hack, Jakob & Swarztrauber (1992), J. Comput. Phys. 102, 211-224
("W92"); Galewsky, Scott & Polvani (2004), Tellus 56A, 429-440 ("G04"); Haurwitz (1940) for the
Rossby-Haurwitz phase speed. Derivatives are checked with 4th-order central finite differences,
independently of the formulas' derivation.
"""

import math

import numpy as np
import pytest

from torrid.physics.cases import CASES, CaseFields, earth, galewsky, williamson2, williamson5
from torrid.physics.cases import williamson6
from torrid.physics.coriolis import coriolis_parameter

A, OMEGA, G = earth.RADIUS_M, earth.ROTATION_RATE_S, earth.GRAVITY_M_S2
PLANET = dict(radius_m=A, rotation_rate_s=OMEGA, gravity_m_s2=G)


def d(f, x, step):
    """4th-order central difference of f at x."""
    return (-f(x + 2 * step) + 8 * f(x + step) - 8 * f(x - step) + f(x - 2 * step)) / (12 * step)


def spherical_ops(state, tilt=0.0, step=2e-3):
    """Vector-invariant shallow-water terms of ``state(lat, lon) -> (u, v, phi)`` by finite differences.

    Returns functions of (lat, lon): relative vorticity zeta, and the momentum tendency
    (du/dt, dv/dt) = (eta v - (1/(a cos)) d(phi+E)/dlon, -eta u - (1/a) d(phi+E)/dlat),
    eta = zeta + f, E = (u^2 + v^2)/2 (Williamson et al. 1992, vector-invariant form).
    """
    def bernoulli(lat, lon):
        u, v, phi = state(lat, lon)
        return phi + 0.5 * (u**2 + v**2)

    def zeta(lat, lon):
        dv_dlon = d(lambda x: state(lat, x)[1], lon, step)
        du_cos_dlat = d(lambda y: state(y, lon)[0] * np.cos(y), lat, step)
        return (dv_dlon - du_cos_dlat) / (A * np.cos(lat))

    def tendency(lat, lon):
        u, v, _ = state(lat, lon)
        eta = zeta(lat, lon) + coriolis_parameter(lat, lon, OMEGA, tilt)
        db_dlon = d(lambda x: bernoulli(lat, x), lon, step)
        db_dlat = d(lambda y: bernoulli(y, lon), lat, step)
        return eta * v - db_dlon / (A * np.cos(lat)), -eta * u - db_dlat / A

    return zeta, tendency


POINTS = np.meshgrid(np.array([-1.2, -0.5, 0.1, 0.7, 1.3]), np.array([0.3, 1.9, 4.0, -2.5]))


# ---------------------------------------------------------------- Williamson case 2 (W92) ----------
def w2_state(alpha):
    def state(lat, lon):
        f = williamson2.initial_fields(lat, lon, alpha_rad=alpha, **PLANET)
        return f.u, f.v, G * f.h
    return state


def test_w2_geostrophic_balance_untilted():
    """W92 case 2, alpha = 0: g dh/dlat = -(a f + u tan(lat)) u (gradient balance), by FD."""
    lat = np.linspace(-1.5, 1.5, 61)
    h = lambda y: williamson2.initial_fields(y, 0.0, **PLANET).h
    lhs = G * d(h, lat, 1e-3)
    u = williamson2.initial_fields(lat, 0.0, **PLANET).u
    rhs = -(A * 2 * OMEGA * np.sin(lat) + u * np.tan(lat)) * u
    assert np.max(np.abs(lhs - rhs)) < 1e-9 * np.max(np.abs(rhs))


@pytest.mark.parametrize("alpha", [0.0, 0.05, np.pi / 4, np.pi / 2 - 0.05, np.pi / 2])
def test_w2_is_steady_for_any_tilt(alpha):
    """W92 case 2 is an exact steady state with f about the tilted axis: momentum tendency = 0."""
    _, tendency = spherical_ops(w2_state(alpha), tilt=alpha)
    lat, lon = POINTS
    du, dv = tendency(lat, lon)
    u0 = williamson2.wind_speed_m_s(A)
    scale = 2 * OMEGA * u0  # size of the Coriolis term, m s^-2
    assert np.max(np.abs(du)) < 1e-10 * scale and np.max(np.abs(dv)) < 1e-10 * scale


@pytest.mark.parametrize("alpha", [0.0, 0.3, np.pi / 2, 2.0])
def test_w2_is_solid_body_rotation_about_tilted_axis(alpha):
    """W92 case 2: V = (u0/a) n x r and f = 2 Omega n.r with n = (-sin alpha, 0, cos alpha)."""
    lat, lon = POINTS
    fields = williamson2.initial_fields(lat, lon, alpha_rad=alpha, **PLANET)
    r = np.stack([np.cos(lat) * np.cos(lon), np.cos(lat) * np.sin(lon), np.sin(lat)], -1)
    east = np.stack([-np.sin(lon), np.cos(lon), 0 * lon], -1)
    north = np.stack([-np.sin(lat) * np.cos(lon), -np.sin(lat) * np.sin(lon), np.cos(lat)], -1)
    n = np.array([-np.sin(alpha), 0.0, np.cos(alpha)])
    u0 = 2 * np.pi * A / (12 * 86400.0)  # W92: once around in 12 days
    vel = u0 * np.cross(n, r)
    assert np.allclose(fields.u, np.sum(vel * east, -1), rtol=0, atol=1e-12 * u0)
    assert np.allclose(fields.v, np.sum(vel * north, -1), rtol=0, atol=1e-12 * u0)
    assert np.allclose(coriolis_parameter(lat, lon, OMEGA, alpha), 2 * OMEGA * (r @ n), atol=1e-18)
    gh = 2.94e4 - (A * OMEGA * u0 + u0**2 / 2) * (r @ n) ** 2  # W92 case 2 height
    assert np.allclose(fields.h, gh / G, rtol=1e-13)
    assert fields.coriolis_tilt_rad == alpha


def test_w2_alpha_half_pi_puts_flow_poles_on_equator():
    """W92, alpha = pi/2: flow axis through (lon 0 / pi, lat 0). Values derived by hand:
    no wind at the flow poles, where h = (g h0 - a Omega u0 - u0^2/2)/g = 1092.833 m; along the
    flow equator lon = +-pi/2, |V| = u0 = 38.6107 m/s (southward at lon = +pi/2) and h = g h0/g."""
    alpha = np.pi / 2
    at = lambda lat, lon: williamson2.initial_fields(lat, lon, alpha_rad=alpha, **PLANET)
    for lon in (0.0, np.pi):
        f = at(0.0, lon)
        assert abs(f.u) < 1e-12 and abs(f.v) < 1e-12
        assert f.h == pytest.approx(1092.83298453136, rel=1e-12)
    f = at(0.0, np.pi / 2)
    assert f.u == pytest.approx(0.0, abs=1e-12) and f.v == pytest.approx(-38.61068276698372)
    assert f.h == pytest.approx(2.94e4 / G, rel=1e-13)
    lat = np.linspace(-1.5, 1.5, 7)
    g = at(lat, -np.pi / 2)
    assert np.allclose(np.hypot(g.u, g.v), 38.61068276698372, rtol=1e-13)
    # The Coriolis axis points to lon = pi on the equator: f = 2 Omega there, -2 Omega at lon 0.
    assert coriolis_parameter(0.0, np.pi, OMEGA, alpha) == pytest.approx(2 * OMEGA)
    assert coriolis_parameter(0.0, 0.0, OMEGA, alpha) == pytest.approx(-2 * OMEGA)


def test_w2_exact_height_is_steady():
    """W92 case 2 is steady: the exact height at day 5 equals the initial height."""
    lat, lon = POINTS
    h0 = williamson2.initial_fields(lat, lon, alpha_rad=0.7, **PLANET).h
    h5 = williamson2.exact_height(lat, lon, 5 * 86400.0, alpha_rad=0.7, **PLANET)
    assert np.array_equal(h0, h5)


# ---------------------------------------------------------------- Williamson case 5 (W92) ----------
def test_w5_mountain_peak_radius_and_wrapping():
    """W92 case 5: h_s = 2000 (1 - r/(pi/9)), centre (3 pi/2, pi/6); any longitude range works."""
    peak = williamson5.surface_height
    for lon_c in (1.5 * np.pi, -0.5 * np.pi, 3.5 * np.pi, -2.5 * np.pi):
        assert peak(np.pi / 6, lon_c) == pytest.approx(2000.0, rel=1e-14)
    R = np.pi / 9
    assert peak(np.pi / 6 + R / 2, -np.pi / 2) == pytest.approx(1000.0, rel=1e-12)
    assert peak(np.pi / 6, -np.pi / 2 + 0.25 * R) == pytest.approx(1500.0, rel=1e-12)
    # outside the radius (in the (lon, lat) plane of the paper) the ground is flat
    ang = np.linspace(0, 2 * np.pi, 50)
    ring = peak(np.pi / 6 + 1.0001 * R * np.sin(ang), 1.5 * np.pi + 1.0001 * R * np.cos(ang))
    assert np.all(ring == 0.0)
    lat, lon = np.meshgrid(np.linspace(-np.pi / 2, np.pi / 2, 91), np.arange(0, 360, 2.0) * np.pi / 180)
    hs = peak(lat, lon)
    assert np.array_equal(hs, peak(lat, lon - 2 * np.pi))  # [0, 2pi) versus [-2pi, 0)
    assert hs.min() == 0.0 and hs.max() <= 2000.0
    assert np.count_nonzero(hs) > 0


def test_w5_flow_and_height():
    """W92 case 5: u = 20 cos(lat), v = 0, g h = g 5960 - (a Omega u0 + u0^2/2) sin^2(lat):
    h = 5960 m on the equator, 4992.0587 m at the poles (hand value), and in gradient balance."""
    f = williamson5.initial_fields(np.array([0.0, np.pi / 2, -np.pi / 2]), 0.3, **PLANET)
    assert f.h == pytest.approx([5960.0, 4992.0587010613735, 4992.0587010613735], rel=1e-13)
    assert f.u[0] == 20.0 and np.all(f.v == 0) and f.coriolis_tilt_rad == 0.0
    lat = np.linspace(-1.5, 1.5, 31)
    lhs = G * d(lambda y: williamson5.initial_fields(y, 0.0, **PLANET).h, lat, 1e-3)
    rhs = -(A * 2 * OMEGA * np.sin(lat) + 20 * np.cos(lat) * np.tan(lat)) * 20 * np.cos(lat)
    assert np.max(np.abs(lhs - rhs)) < 1e-9 * np.max(np.abs(rhs))
    full = williamson5.initial_fields(np.pi / 6, -np.pi / 2, **PLANET)
    assert full.surface_height == pytest.approx(2000.0)
    assert full.h - full.surface_height > 0  # positive thickness on the mountain top


# ---------------------------------------------------------------- Williamson case 6 (W92) ----------
def w6_state(lat, lon):
    f = williamson6.initial_fields(lat, lon, **PLANET)
    return f.u, f.v, G * f.h


def test_w6_hand_values():
    """W92 case 6 by hand (omega = K): at lat 0, cos = 1 and A = omega(2 Omega + omega)/2 - K^2/4,
    B = 2 (Omega + omega) K / 30, C = -K^2/4, so h(0, 0) = 8000 + a^2 (A + B + C)/g = 10543.854 m,
    h(0, pi/4) = 8000 + a^2 (A - B + C)/g = 10194.003 m; u(0, 0) = a (omega - K) = 0,
    u(0, pi/4) = 2 a omega = 100.0029 m/s; at the poles A = B = C = 0 so h = 8000 m, u = v = 0."""
    f = williamson6.initial_fields(np.array([0.0, 0.0, np.pi / 2, -np.pi / 2]),
                                   np.array([0.0, np.pi / 4, 1.0, 2.0]), **PLANET)
    assert f.h == pytest.approx([10543.8536847305, 10194.002548979632, 8000.0, 8000.0], rel=1e-12)
    assert f.u == pytest.approx([0.0, 2 * A * 7.848e-6, 0.0, 0.0], abs=1e-9)
    assert f.v == pytest.approx([0.0, 0.0, 0.0, 0.0], abs=1e-9)


def test_w6_wind_from_stream_function():
    """W92 case 6 / Haurwitz (1940): psi = -a^2 omega sin + a^2 K cos^R sin cos(R lon);
    u = -(1/a) dpsi/dlat, v = (1/(a cos)) dpsi/dlon (nondivergent), checked by FD."""
    w = k = 7.848e-6
    psi = lambda lat, lon: A**2 * (-w * np.sin(lat) + k * np.cos(lat) ** 4 * np.sin(lat) * np.cos(4 * lon))
    lat, lon = POINTS
    u, v, _ = w6_state(lat, lon)
    assert np.allclose(u, -d(lambda y: psi(y, lon), lat, 1e-3) / A, rtol=0, atol=1e-8)
    assert np.allclose(v, d(lambda x: psi(lat, x), lon, 1e-3) / (A * np.cos(lat)), rtol=0, atol=1e-8)


def test_w6_height_has_zero_divergence_tendency():
    """W92 case 6: h is the balance-equation height of the nondivergent wave, i.e. the initial
    divergence tendency vanishes: div(-(eta) k x V - grad(phi + E)) = 0 (checked by nested FD)."""
    zeta, tendency = spherical_ops(w6_state)
    step = 2e-3

    def div_tendency(lat, lon):
        du_dlon = d(lambda x: tendency(lat, x)[0], lon, step)
        dvcos_dlat = d(lambda y: tendency(y, lon)[1] * np.cos(y), lat, step)
        return (du_dlon + dvcos_dlat) / (A * np.cos(lat))

    lat, lon = POINTS
    residual = div_tendency(lat, lon)
    # size of one of the balancing terms: the Laplacian of g h (a wrong A, B or C gives O(1) misfit)
    phi = lambda y, x: w6_state(y, x)[2]
    lap = (d(lambda x: d(lambda x2: phi(lat, x2), x, step), lon, step) / np.cos(lat) ** 2
           + d(lambda y: np.cos(y) * d(lambda y2: phi(y2, lon), y, step), lat, step) / np.cos(lat)) / A**2
    assert np.max(np.abs(residual)) < 1e-7 * np.max(np.abs(lap))


def test_w6_phase_speed():
    """Haurwitz (1940): a degree-n harmonic in solid-body flow omega moves at
    nu = omega - 2 (Omega + omega) / (n (n+1)); with n = R + 1 this is W92 eq. 147. For the W92
    constants nu = 2.46347e-6 rad/s = 12.195 degrees longitude per day, eastward."""
    w, R = 7.848e-6, 4
    nu = williamson6.rossby_haurwitz_angular_speed(OMEGA)
    assert nu == pytest.approx(w - 2 * (OMEGA + w) / ((R + 1) * (R + 2)), rel=1e-14)
    assert nu == pytest.approx(2.4634666666666667e-06, rel=1e-12)
    assert math.degrees(nu * 86400) == pytest.approx(12.195, abs=1e-3)


# --------------------------------------------------------------------- Galewsky et al. (G04) ------
def test_galewsky_jet_profile():
    """G04: u = 80 m/s at the jet centre (pi/7 + 5 pi/14)/2 = pi/4, u <= 80, zero outside the jet."""
    assert galewsky.jet_zonal_wind(np.pi / 4) == pytest.approx(80.0, rel=1e-14)
    lat = np.linspace(-np.pi / 2, np.pi / 2, 20001)
    u = galewsky.jet_zonal_wind(lat)
    assert u.max() <= 80.0 * (1 + 1e-14) and lat[np.argmax(u)] == pytest.approx(np.pi / 4, abs=2e-4)
    outside = (lat <= np.pi / 7) | (lat >= np.pi / 2 - np.pi / 7)
    assert np.all(u[outside] == 0.0) and np.all(u[~outside] >= 0.0)
    assert np.all(u[np.abs(lat - np.pi / 4) < 0.33] > 0.0)  # (half-width 0.3366; exp underflows at the edges)


@pytest.mark.parametrize("n", [256, 512])
def test_galewsky_global_mean_depth(n):
    """G04: global mean of the balanced h is 10 km (Gauss-Legendre quadrature in sin(lat))."""
    x, w = np.polynomial.legendre.leggauss(n)
    f = galewsky.initial_fields(np.arcsin(x), 0.0, perturbed=False, **PLANET)
    mean = np.sum(w * f.h) / 2.0
    assert abs(mean - 10000.0) < 1e-10 * 10000.0


def test_galewsky_gradient_balance_and_zonality():
    """G04: g dh/dlat = -a u (f + u tan(lat)/a) by FD; unperturbed h, u zonal, v = 0."""
    lat = np.linspace(-1.5, 1.5, 301)
    h = lambda y: galewsky.initial_fields(y, 0.0, perturbed=False, **PLANET).h
    u = galewsky.jet_zonal_wind(lat)
    rhs = -A * u * (2 * OMEGA * np.sin(lat) + u * np.tan(lat) / A)
    assert np.max(np.abs(G * d(h, lat, 1e-3) - rhs)) < 1e-8 * np.max(np.abs(rhs))
    lat2, lon2 = np.meshgrid(lat[::10], np.linspace(-np.pi, np.pi, 9))
    f = galewsky.initial_fields(lat2, lon2, perturbed=False, **PLANET)
    assert np.all(f.h == f.h[:1]) and np.all(f.u == f.u[:1]) and np.all(f.v == 0)


def test_galewsky_perturbation():
    """G04: h' = 120 cos(lat) exp(-(lon/(1/3))^2) exp(-((pi/4 - lat)/(1/15))^2): 120 cos(pi/4)
    at (lon 0, lat pi/4); the true maximum sits beta^2 tan(phi2)/2 ~ 2.2e-3 rad further south,
    because of the cos(lat) factor, and is 0.11 % higher; longitude wraps into (-pi, pi]."""
    pert = lambda lat, lon: (galewsky.initial_fields(lat, lon, perturbed=True, **PLANET).h
                             - galewsky.initial_fields(lat, lon, perturbed=False, **PLANET).h)
    assert pert(np.pi / 4, 0.0) == pytest.approx(120 * np.cos(np.pi / 4), rel=1e-12)
    assert pert(np.pi / 4, 2 * np.pi) == pytest.approx(120 * np.cos(np.pi / 4), rel=1e-12)
    assert pert(np.pi / 4, np.pi) == pytest.approx(pert(np.pi / 4, -np.pi), abs=1e-14)
    assert pert(np.pi / 4, 0.2) == pytest.approx(pert(np.pi / 4, 0.2 - 2 * np.pi), rel=1e-12)
    lat, lon = np.meshgrid(np.linspace(0.6, 1.0, 4001), np.linspace(-0.5, 0.5, 101))
    hp = galewsky.height_perturbation(lat, lon)
    i = np.unravel_index(np.argmax(hp), hp.shape)
    assert lon[i] == 0.0 and lat[i] == pytest.approx(np.pi / 4 - 2.2e-3, abs=2e-4)
    assert hp[i] / (120 * np.cos(np.pi / 4)) == pytest.approx(1.0011, abs=2e-4)


# ----------------------------------------------------------------------------- registry -----------
def test_registry_builds_every_case():
    """Every registered case returns read-only CaseFields of the broadcast shape."""
    assert set(CASES) == {"williamson2", "williamson5", "williamson6", "galewsky",
                          "galewsky-unperturbed"}
    lat, lon = np.linspace(-1.4, 1.4, 5)[:, None], np.linspace(-np.pi, np.pi, 8)[None, :]
    for name, spec in CASES.items():
        f = spec.initial_fields(lat, lon, **PLANET)
        assert isinstance(f, CaseFields) and spec.name == name
        assert f.u.shape == f.v.shape == f.h.shape == f.surface_height.shape == (5, 8)
        assert not f.h.flags.writeable
        tau = spec.default_hyperdiffusion_days(85)
        assert (tau == math.inf) if name == "williamson2" else (0 < tau < math.inf)
        assert spec.default_days > 0 and spec.default_output_interval_days > 0 and spec.notes
    assert CASES["williamson2"].parameters == ("alpha_rad",)
    assert CASES["williamson2"].initial_fields(0.0, 0.0, alpha_rad=0.4, **PLANET).coriolis_tilt_rad == 0.4
    g = CASES["galewsky-unperturbed"].initial_fields(lat, lon, **PLANET)
    assert np.all(g.h == g.h[:, :1])


def test_latitude_out_of_range_is_rejected():
    """Latitudes are radians in [-pi/2, pi/2]: degrees passed by mistake raise."""
    with pytest.raises(ValueError):
        williamson6.initial_fields(45.0, 0.0, **PLANET)
    with pytest.raises(TypeError):
        galewsky.initial_fields(0.0, 0.0, perturbed="no", **PLANET)
