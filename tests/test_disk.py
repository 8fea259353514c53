"""Disk integrals over the visible hemisphere and the orbit geometry of the observer.

References: direct numerical quadrature with scipy.integrate.dblquad; the harmonic kernel of
Cowan & Agol (2008, ApJ 678, L129), derived here again: for an edge-on observer
F(lon_o) = int J(lon) max(0, cos(lon - lon_o)) dlon with J(lon) = int I cos^2(lat) dlat, whose
m-th longitudinal harmonic is multiplied by int_{-pi/2}^{pi/2} cos x cos(m x) dx: 2 (m = 0),
pi/2 (m = 1), 0 for odd m >= 3, 2/3 for m = 2 (and the harmonic keeps its phase); ducc0's
Gauss-Legendre weights; Kepler's equation solved with scipy's brentq (Murray & Dermott 1999,
ch. 2, for the anomalies).
"""

import math

import ducc0
import numpy as np
import pytest
from scipy.integrate import dblquad
from scipy.optimize import brentq

from torrid.physics.disk import DiskQuadrature, GridError, gauss_legendre_ring_weights
from torrid.physics.grid import SpectralGrid
from torrid.physics.viewing import (eclipse_phase, orbital_angle, sub_observer_latitude,
                                    sub_observer_offset)


def output_grid(truncation):
    """Latitudes (ascending) and longitudes ([-180, 180)) of a run file, degrees."""
    grid = SpectralGrid(truncation)
    return np.degrees(grid.latitude[::-1]), np.degrees(grid.longitude) - 180.0


def analytic_map(lat, lon):
    """A smooth, non-band-limited test map (lat, lon in rad)."""
    return (1.0 + 0.4 * np.cos(lat) * np.cos(lon - 0.5) + 0.3 * np.sin(lat)
            + 0.2 * np.cos(lat) ** 2 * np.cos(2 * lon + 0.3) + 0.1 * np.exp(np.sin(lat)))


def dblquad_disk(intensity, obs_lat, obs_lon):
    """int I(n) (n . o) dOmega over the visible cap, in coordinates about the sub-observer
    point (psi: angle from it, chi: azimuth), where the integrand is smooth."""
    o = np.array([np.cos(obs_lat) * np.cos(obs_lon), np.cos(obs_lat) * np.sin(obs_lon),
                  np.sin(obs_lat)])
    e1 = np.cross([0.0, 0.0, 1.0], o) if abs(o[2]) < 0.9 else np.cross([1.0, 0.0, 0.0], o)
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(o, e1)

    def integrand(psi, chi):
        n = np.cos(psi) * o + np.sin(psi) * (np.cos(chi) * e1 + np.sin(chi) * e2)
        return intensity(np.arcsin(np.clip(n[2], -1, 1)), np.arctan2(n[1], n[0])) \
            * np.cos(psi) * np.sin(psi)

    value, _ = dblquad(integrand, 0, 2 * np.pi, 0, np.pi / 2, epsabs=1e-11, epsrel=1e-11)
    return value


def test_ring_weights_are_gauss_legendre_as_in_ducc0():
    lat, _ = output_grid(21)
    # ducc0 orders rings north to south and gives the solid angle of each ring (sum 4 pi)
    ducc = ducc0.sht.get_gridweights("GL", lat.size)[::-1]
    np.testing.assert_allclose(2 * np.pi * gauss_legendre_ring_weights(lat), ducc, rtol=1e-13)


def test_grids_that_are_not_the_model_grid_are_refused():
    lat, lon = output_grid(21)
    with pytest.raises(GridError, match="Gauss-Legendre nodes"):
        DiskQuadrature(np.linspace(-80, 80, lat.size), lon)
    with pytest.raises(GridError, match="uniformly spaced"):
        DiskQuadrature(lat, np.sort(np.random.default_rng(1).uniform(-180, 180, lon.size)))


@pytest.mark.parametrize("inclination", [90.0, 60.0, 20.0])
def test_disk_integral_matches_dblquad(inclination):
    lat, lon = output_grid(42)  # 64 x 128
    lat2, lon2 = np.meshgrid(np.radians(lat), np.radians(lon), indexing="ij")
    quad = DiskQuadrature(lat, lon)
    obs_lat = np.radians(90.0 - inclination)
    obs_lon = np.radians([-150.0, 10.0, 100.0])
    ours = quad.integrate(analytic_map(lat2, lon2), obs_lat, obs_lon)
    reference = [dblquad_disk(analytic_map, obs_lat, x) for x in obs_lon]
    # tolerance 1e-4 relative: the longitude integral is exact for resolved rings; the
    # latitude quadrature of the limb's kink on 64 Gauss latitudes is measured at 2e-6
    # (edge-on) to 5e-5 (inclination 20) for a uniform map (it falls as nlat^-2)
    np.testing.assert_allclose(ours, reference, rtol=1e-4)


def test_uniform_map_integrates_to_pi_and_converges():
    """D = pi I for a uniform map (the projected area of the disk)."""
    errors = {}
    for truncation in (21, 42):
        lat, lon = output_grid(truncation)
        quad = DiskQuadrature(lat, lon)
        for inclination in (90.0, 60.0, 10.0):
            d = quad.integrate(np.ones((lat.size, lon.size)), np.radians(90.0 - inclination),
                               np.radians(np.arange(0, 360, 30)))
            # flat in longitude to round-off: the longitude integral is exact
            assert np.ptp(d) < 1e-12
            errors[truncation, inclination] = abs(d[0] / np.pi - 1)
    # bound 1e-4 at 32 latitudes (measured 1.5e-5, 1.1e-5, 6.4e-5); edge-on the error is the
    # Gauss quadrature of cos(lat) = sqrt(1 - x^2), which falls about 8-fold per doubling
    assert max(errors.values()) < 1e-4
    assert errors[42, 90.0] < errors[21, 90.0] / 5


def test_harmonic_kernel_of_cowan_and_agol_2008():
    lat, lon = output_grid(21)
    lat2, lon2 = np.meshgrid(np.radians(lat), np.radians(lon), indexing="ij")
    lon0, lon3 = 0.7, -0.4
    intensity = (1.0 + 0.3 * np.cos(lon2 - lon0) + 0.2 * np.cos(3 * (lon2 - lon3))
                 + 0.1 * np.cos(2 * lon2)) * (1 + 0.0 * lat2)
    nphase = 360
    obs_lon = 2 * np.pi * np.arange(nphase) / nphase
    flux = DiskQuadrature(lat, lon).integrate(intensity, 0.0, obs_lon)
    # J(lon) = int I cos^2(lat) dlat = sum_i w_i cos(lat_i) I_i (weights in sin(lat))
    w = gauss_legendre_ring_weights(lat)
    profile = (w * np.cos(np.radians(lat))) @ intensity
    j = np.fft.rfft(profile) / lon.size * np.exp(1j * np.arange(lon.size // 2 + 1)
                                                 * np.radians(lon[0]))
    f = np.fft.rfft(flux) / nphase  # harmonics in the observer's longitude
    # tolerance 1e-12 relative: both sides use the same latitude sum; the longitude
    # integral is exact, so only round-off remains
    assert f[0].real == pytest.approx(2 * j[0].real, rel=1e-12)
    assert f[1] == pytest.approx(np.pi / 2 * j[1], rel=1e-12)
    assert f[2] == pytest.approx(2 / 3 * j[2], rel=1e-12)
    assert abs(f[3]) < 1e-12 * abs(j[3]) and abs(j[3]) > 0.05  # odd m >= 3: invisible
    assert -np.angle(f[1]) == pytest.approx(lon0, abs=1e-12)  # the phase is kept


def test_phase_geometry_of_a_circular_orbit():
    """180 - 360 phi east of the substellar point; mirror image for retrograde runs."""
    phase = np.array([0.0, 0.25, 0.5, 0.75])
    east = np.degrees(sub_observer_offset(orbital_angle(phase)))
    np.testing.assert_allclose(east, [-180.0, 90.0, 0.0, -90.0], atol=1e-12)
    west = np.degrees(sub_observer_offset(orbital_angle(phase), sense=-1.0))
    np.testing.assert_allclose(west, [-180.0, -90.0, 0.0, 90.0], atol=1e-12)
    assert np.degrees(sub_observer_latitude(np.radians(80.0))) == pytest.approx(10.0)


def kepler_true_anomaly(mean_anomaly, e):
    """nu of M by brentq on M = E - e sin E, then tan(nu/2) = sqrt((1+e)/(1-e)) tan(E/2)."""
    m = math.remainder(mean_anomaly, 2 * math.pi)
    ecc = brentq(lambda x: x - e * math.sin(x) - m, -math.pi - 1, math.pi + 1, xtol=1e-15)
    return 2 * math.atan2(math.sqrt(1 + e) * math.sin(ecc / 2),
                          math.sqrt(1 - e) * math.cos(ecc / 2))


@pytest.mark.parametrize("e, omega_deg", [(0.3, 30.0), (0.6, 200.0)])
def test_eccentric_phase_geometry_matches_kepler(e, omega_deg):
    omega = math.radians(omega_deg)
    nu_transit = math.pi / 2 - omega
    ecc_tr = 2 * math.atan2(math.sqrt(1 - e) * math.sin(nu_transit / 2),
                            math.sqrt(1 + e) * math.cos(nu_transit / 2))
    m_transit = ecc_tr - e * math.sin(ecc_tr)
    for phase in (0.0, 0.1, 0.37, 0.8):
        nu = kepler_true_anomaly(m_transit + 2 * math.pi * phase, e)
        expected = math.remainder(nu + omega - math.pi / 2, 2 * math.pi)
        got = math.remainder(float(orbital_angle(phase, e, omega)), 2 * math.pi)
        # tolerance 1e-9 rad: both solve Kepler's equation to ~1e-15
        assert got == pytest.approx(expected, abs=1e-9)
    # eclipse: nu + omega = 270 deg, i.e. the orbital angle is 180 deg
    theta = float(orbital_angle(eclipse_phase(e, omega), e, omega))
    assert math.remainder(theta - math.pi, 2 * math.pi) == pytest.approx(0.0, abs=1e-9)
    assert eclipse_phase(0.0, omega) == pytest.approx(0.5, abs=1e-15)
