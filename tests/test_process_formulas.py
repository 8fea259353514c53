"""Each physical process against its published formula, on a prescribed state (issue 10).

The state is made on the model grid from analytic fields (winds and a thickness with both
signs of the relaxation's mass source Q), so every term is evaluated where its formula is known
in closed form; the process's output must equal the formula to round-off (1e-12 relative to the
field's largest value: a handful of ulps of the transforms). A term applied to one component
only, with the wrong sign, or where the formula says zero, fails by O(1).

Sources: Showman & Polvani (2011, ApJ 738, 71), eqs. 1-3 and the definition of R
(R = -v Q / h where Q > 0, else 0; Q = (h_eq - h) / tau_rad); the equilibrium profile of
Showman & Polvani (2011) and Perez-Becker & Showman (2013) (dayside cosine), and the global
cosine of linear Matsuno-Gill studies (Matsuno 1966; Gill 1980; Showman & Polvani 2011,
section 3). Formulas quoted from memory of the papers, as in the module docstrings.
"""

import math

import numpy as np
import pytest

import torrid
from torrid.physics.fields import spectral_state
from torrid.physics.processes.relaxation import equilibrium_thickness
from torrid.workflow.setup import build_model

DAY_S = 86400.0
ROUND_OFF = 1e-12


def _model(**atmosphere):
    config = torrid.ModelConfig().replace(numerics={"truncation": 21},
                                          atmosphere={"radiative_timescale_days": 0.5,
                                                      **atmosphere})
    return build_model(config)


def _prescribed(model):
    """Analytic grid fields: u, v (m/s) and h (m) with h_eq - h of both signs on the dayside."""
    lat, lon = model.grid.mesh()
    big_h = model.mean_geopotential / model.gravity_m_s2
    u = 800.0 * np.cos(lat) + 300.0 * np.cos(lat) * np.sin(lon)
    v = 900.0 * np.sin(lat) * np.cos(lat) * np.cos(2 * lon)
    h = big_h * (1.4 + 0.3 * np.cos(lat) * np.cos(lon + 0.7))
    return u, v, h


def _grid_fields(model, u, v, h):
    """The dynamics' grid fields of the state made from (u, v, h), and that state's own
    grid u, v, h (the truncated fields the process sees)."""
    g = model.gravity_m_s2
    state = spectral_state(model.transforms, u, v, g * h - model.mean_geopotential)
    model.dynamics.grid_fields(state)
    fields = model.dynamics.fields
    return fields, fields.winds[1].copy(), -fields.winds[0], \
        (fields.geopotential + model.mean_geopotential) / g


def test_mass_exchange_is_minus_v_q_over_h_where_mass_is_added():
    """R = -v Q / h on both components where Q > 0 and 0 where Q <= 0 (Showman & Polvani 2011)."""
    model = _model()
    process = model.process("mass_exchange")
    fields, u, v, h = _grid_fields(model, *_prescribed(model))
    lat, lon = model.grid.mesh()
    big_h = model.mean_geopotential / model.gravity_m_s2
    h_eq = equilibrium_thickness(lat, lon, mean_thickness_m=big_h, contrast=1.0,
                                 substellar_longitude_rad=0.0)
    q = (h_eq - h) / (0.5 * DAY_S)
    assert (q > 0).any() and (q < 0).any()  # the state tests both branches
    expected_east = np.where(q > 0, -u * q / h, 0.0)
    expected_north = np.where(q > 0, -v * q / h, 0.0)
    east, north = process.momentum_forcing(0.0, fields)
    scale = np.abs(expected_east).max()
    np.testing.assert_allclose(east, expected_east, rtol=0, atol=ROUND_OFF * scale)
    np.testing.assert_allclose(north, expected_north, rtol=0,
                               atol=ROUND_OFF * np.abs(expected_north).max())
    assert np.abs(expected_north).max() > 0.05 * scale  # the northward part is not negligible


def test_mass_exchange_switch():
    assert _model().process("mass_exchange") is not None
    assert _model(mass_exchange_momentum=False).process("mass_exchange") is None


@pytest.mark.parametrize("profile", ["dayside", "global"])
def test_relaxation_source_and_rate_against_the_profile(profile):
    """The relaxation's explicit source is (Phi_eq - Phi_mean) / tau_rad of the published
    profile and its implicit thickness rate 1 / tau_rad: together d phi'/dt = (Phi_eq - Phi) /
    tau_rad. dayside: H (1 + c max(0, cos lat cos(lon - s))) (Showman & Polvani 2011); global:
    H (1 + c cos lat cos(lon - s)) (Matsuno 1966; Gill 1980)."""
    model = _model(equilibrium_profile=profile, forcing_contrast=0.6)
    relaxation = model.process("newtonian_relaxation")
    tau_s = 0.5 * DAY_S
    assert relaxation.implicit_rates().thickness == 1 / tau_s
    assert relaxation.implicit_rates().vorticity is None
    lat, lon = model.grid.mesh()
    big_h = model.mean_geopotential / model.gravity_m_s2
    cosine = np.cos(lat) * np.cos(lon)
    shape = np.maximum(cosine, 0) if profile == "dayside" else cosine
    h_eq = big_h * (1 + 0.6 * shape)
    np.testing.assert_allclose(relaxation.equilibrium(0.0) / model.gravity_m_s2, h_eq, rtol=1e-14)
    out = np.zeros((3, model.grid.ncoeff), dtype=complex)
    relaxation.spectral_tendency(0.0, model.dynamics.fields, out)
    source = model.transforms.to_grid(out[2])
    expected = model.gravity_m_s2 * (h_eq - big_h) / tau_s
    scale = np.abs(expected).max()
    if profile == "global":  # a degree-1 field: exact in the truncation
        np.testing.assert_allclose(source, expected, atol=ROUND_OFF * scale)
    else:  # the kinked cosine, truncated at T21: its spectral fit
        fit = model.transforms.to_grid(model.transforms.to_spectral(expected))
        np.testing.assert_allclose(source, fit, atol=ROUND_OFF * scale)
    assert np.abs(out[:2]).max() == 0  # no momentum part


def test_global_profile_needs_a_contrast_below_one():
    from torrid.io.config import ConfigError

    with pytest.raises(ConfigError, match="must be < 1 with atmosphere.equilibrium_profile"):
        _model(equilibrium_profile="global", forcing_contrast=1.0)


@pytest.mark.parametrize("profile, low", [("dayside", 1.0), ("global", 0.4)])
def test_temperature_map_end_points_span_the_equilibrium(profile, low):
    """The run file's nightside_thickness_m / substellar_thickness_m are the equilibrium's
    smallest and largest thickness, the end points of the phase curves' temperature map."""
    model = _model(equilibrium_profile=profile, forcing_contrast=0.6)
    attrs = model.process("newtonian_relaxation").attrs()
    big_h = model.mean_geopotential / model.gravity_m_s2
    assert attrs["nightside_thickness_m"] == pytest.approx(low * big_h, rel=1e-15)
    assert attrs["substellar_thickness_m"] == pytest.approx(1.6 * big_h, rel=1e-15)


def _winds_and_fields(model, time_s=0.0):
    fields, u, v, _ = _grid_fields(model, *_prescribed(model))
    return fields, u, v


def test_uniform_drag_is_all_implicit():
    model = _model(drag_timescale_days=2.0)
    drag = model.process("rayleigh_drag")
    rates = drag.implicit_rates()
    assert rates.vorticity == rates.divergence == 1 / (2.0 * DAY_S)
    assert rates.thickness is None
    assert drag.momentum_forcing(0.0, model.dynamics.fields) is None
    assert drag.max_time_step_s() is None


def _substellar_cosine(model, time_s):
    lat, lon = model.grid.mesh()
    orbit = model.orbit
    lon_sub = 0.0 if orbit.is_steady else float(orbit.substellar_longitude(time_s))
    return np.cos(lat) * np.cos(lon - lon_sub)


@pytest.mark.parametrize("profile", ["dayside", "global"])
def test_day_night_drag_against_its_definition(profile):
    """r(x) = r_night + (r_day - r_night) s(x), s = (h_eq - min h_eq) / (max h_eq - min h_eq)
    (max(0, cos psi) for the dayside profile, (1 + cos psi) / 2 for the global one), on both
    components; implicit part r0 = min(r_day, r_night), so -r0 v (implicit) plus the explicit
    forcing must be -r(x) v at every point. On an eccentric orbit at a time when the substellar
    point has moved (the shape moves with it)."""
    tau_day, tau_night = 0.05, 2.0
    model = build_model(torrid.ModelConfig().replace(
        numerics={"truncation": 21}, orbit={"eccentricity": 0.3, "rotation": "given",
                                            "orbital_period_days": 4.0},
        atmosphere={"drag_timescale_days": tau_day, "drag_timescale_nightside_days": tau_night,
                    "equilibrium_profile": profile, "forcing_contrast": 0.5}))
    drag = model.process("rayleigh_drag")
    time_s = 0.9 * DAY_S
    fields, u, v = _winds_and_fields(model)
    cosine = _substellar_cosine(model, time_s)
    assert abs(float(model.orbit.substellar_longitude(time_s))) > 0.05  # it has moved
    r_day, r_night = 1 / (tau_day * DAY_S), 1 / (tau_night * DAY_S)
    shape = np.maximum(cosine, 0) if profile == "dayside" else 0.5 * (1 + cosine)
    rate = r_night + (r_day - r_night) * shape
    r0 = drag.implicit_rates().vorticity
    assert r0 == drag.implicit_rates().divergence == r_night
    east, north = drag.momentum_forcing(time_s, fields)
    scale = r_day * np.abs(u).max()
    np.testing.assert_allclose(-r0 * u + east, -rate * u, rtol=0, atol=ROUND_OFF * scale)
    np.testing.assert_allclose(-r0 * v + north, -rate * v, rtol=0, atol=ROUND_OFF * scale)
    assert drag.max_time_step_s() == pytest.approx(1.0 / (r_day - r_night), rel=1e-15)


def test_zonal_drag_acts_on_u_only():
    """drag_components = zonal: d u/dt = -u / tau, nothing on v, all explicit (no implicit
    part: a zonal-only drag is not diagonal in vorticity and divergence)."""
    model = _model(drag_timescale_days=0.5, drag_components="zonal")
    drag = model.process("rayleigh_drag")
    fields, u, v = _winds_and_fields(model)
    assert drag.implicit_rates() is None
    east, north = drag.momentum_forcing(0.0, fields)
    r = 1 / (0.5 * DAY_S)
    np.testing.assert_allclose(east, -r * u, rtol=0, atol=ROUND_OFF * r * np.abs(u).max())
    assert np.all(north == 0)
    assert np.abs(v).max() > 100  # v is there, and left alone
