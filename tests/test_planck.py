"""Band-integrated Planck function and its inverse, against astropy's blackbody model.

Reference implementation: astropy.modeling.models.BlackBody (tests only), integrated with
scipy.integrate.quad; Stefan-Boltzmann law with astropy's constant; the Planck constants are
exact in the SI since 2019, so agreement is limited only by the quadratures.
"""

import numpy as np
import pytest
from astropy import constants as const
from astropy import units as u
from astropy.modeling.models import BlackBody
from scipy.integrate import quad

from torrid.physics.planck import (H_PLANCK, C_LIGHT, planck_wavelength, tabulated_band,
                                   tophat_band)

TEMPERATURES = [300.0, 1000.0, 1800.0, 6000.0]


def astropy_b_lambda(wavelength_m, temperature_k):
    """B_lambda (W m^-3 sr^-1) from astropy's B_nu: B_lambda = B_nu c / lambda^2."""
    bnu = BlackBody(temperature=temperature_k * u.K)(wavelength_m * u.m)
    bnu = bnu.to_value(u.W / (u.m**2 * u.Hz * u.sr))
    return bnu * C_LIGHT / wavelength_m**2


@pytest.mark.parametrize("temperature", TEMPERATURES)
def test_spectral_radiance_matches_astropy(temperature):
    lam = np.geomspace(0.3e-6, 30e-6, 25)
    ours = planck_wavelength(lam, temperature)
    # tolerance 1e-12: same exact constants, only round-off differs
    np.testing.assert_allclose(ours, astropy_b_lambda(lam, temperature), rtol=1e-12)


@pytest.mark.parametrize("photon", [False, True])
@pytest.mark.parametrize("temperature", TEMPERATURES)
def test_tophat_band_matches_quad_of_astropy(temperature, photon):
    lo, hi = 4.0e-6, 5.0e-6
    weight = (lambda lam: lam / (H_PLANCK * C_LIGHT)) if photon else (lambda lam: 1.0)
    ref, err = quad(lambda lam: astropy_b_lambda(lam, temperature) * weight(lam), lo, hi,
                    epsrel=1e-13)
    ours = tophat_band(lo, hi, photon=photon).radiance(temperature)
    # tolerance 1e-11: quad's own error estimate is below 1e-13 relative; 32 Gauss nodes on a
    # 1-micron band integrate the smooth Planck function to round-off
    assert ours == pytest.approx(ref, rel=1e-11)


def test_tabulated_band_matches_quad_of_astropy():
    # triangular response 3.5-4.5-5.5 micron plus a flat shoulder, linear between rows
    lam = np.array([3.5, 4.5, 5.0, 5.5]) * 1e-6
    resp = np.array([0.0, 1.0, 0.5, 0.5])
    band = tabulated_band(lam, resp, photon=False)
    ref = sum(quad(lambda x: astropy_b_lambda(x, 1200.0) * np.interp(x, lam, resp), a, b,
                   epsrel=1e-13)[0] for a, b in zip(lam[:-1], lam[1:]))
    # tolerance 1e-11 as above (each table interval is its own set of Gauss panels)
    assert band.radiance(1200.0) == pytest.approx(ref, rel=1e-11)


def test_band_quadrature_converges():
    """Wide band (1-30 micron) at 300 K, where the integrand changes most across the band."""
    reference = tophat_band(1e-6, 30e-6, order=16, panels=64).radiance(300.0)
    errors = [abs(tophat_band(1e-6, 30e-6, order=8, panels=p).radiance(300.0) / reference - 1)
              for p in (1, 2, 4, 8)]
    # spectral convergence: each doubling of the panels gains at least a factor 100 until
    # round-off (measured: 1e-3, 1e-6, 6e-11, 1e-15), and the default (4 panels of 8 nodes)
    # is good to 1e-9 even on this band
    assert errors[1] < errors[0] / 100 and errors[2] < errors[1] / 100
    assert errors[3] < 1e-13 and errors[2] < 1e-9


def test_wide_band_gives_stefan_boltzmann():
    """int B_lambda dlambda = sigma T^4 / pi (Stefan-Boltzmann; sigma from astropy), less the
    Rayleigh-Jeans tail beyond the band's end, int_L^inf 2 c k T / lambda^4 = 2 c k T / (3 L^3)
    (the tail below 0.05 micron is exp(-190) small at 1500 K)."""
    t, end = 1500.0, 2000e-6
    band = tophat_band(0.05e-6, end, photon=False, panels=100)
    sigma = const.sigma_sb.to_value(u.W / u.m**2 / u.K**4)
    tail = 2 * C_LIGHT * const.k_B.value * t / (3 * end**3)
    # tolerance 1e-10: the next Rayleigh-Jeans term of the tail is about 1e-13 of the total
    assert band.radiance(t) == pytest.approx(sigma * t**4 / np.pi - tail, rel=1e-10)


@pytest.mark.parametrize("photon", [False, True])
def test_brightness_temperature_inverts_the_band(photon):
    band = tophat_band(3.0e-6, 4.0e-6, photon=photon)
    temperature = np.array([[50.0, 400.0, 1234.5], [2000.0, 6000.0, 12000.0]])
    back = band.brightness_temperature(band.radiance(temperature))
    # Newton to 1e-12 relative; shape kept
    np.testing.assert_allclose(back, temperature, rtol=1e-10)
    assert np.isnan(band.brightness_temperature(np.array([0.0, -1.0]))).all()


def test_narrow_band_brightness_temperature_is_the_monochromatic_inverse():
    """Textbook inverse of Planck's law at one wavelength: T = hc / (lambda k ln(1 + 2hc^2 /
    (lambda^5 B))); a 1e-4-wide band around 4.5 micron behaves as monochromatic."""
    lam = 4.5e-6
    band = tophat_band(lam * (1 - 5e-5), lam * (1 + 5e-5), photon=False)
    radiance = astropy_b_lambda(lam, 1500.0) * lam * 1e-4
    k = const.k_B.value
    expected = H_PLANCK * C_LIGHT / (lam * k * np.log1p(2 * H_PLANCK * C_LIGHT**2 / lam**5
                                                         / (radiance / (lam * 1e-4))))
    # tolerance 1e-7 K relative: the band's curvature over a 1e-4 width (second order, ~1e-9)
    assert band.brightness_temperature(radiance) == pytest.approx(expected, rel=1e-7)
    assert expected == pytest.approx(1500.0, rel=1e-7)


def test_bad_bands_are_refused():
    with pytest.raises(ValueError, match="0 < low < high"):
        tophat_band(5e-6, 4e-6)
    with pytest.raises(ValueError, match="increasing"):
        tabulated_band([5e-6, 4e-6], [1.0, 1.0])
