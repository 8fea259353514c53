"""Phase curves of run files: the workflow, the accessor and ``torrid phase``.

References: Planck band integrals with astropy's blackbody model (scipy quad); the disk
kernel of Cowan & Agol (2008, ApJ 678, L129: edge-on, each longitudinal harmonic of the
cos^2(lat)-weighted brightness is kept with its phase; the first with weight pi/2 against 2 for
the mean); the dayside and nightside temperatures of Cowan & Agol (2011, ApJ 729, 54, quoted from
memory); astropy's solar radius and astronomical unit; Kepler's equation by scipy's brentq.
"""

import json
import math

import numpy as np
import pytest
import xarray as xr
from astropy import constants as const
from astropy import units as u
from astropy.modeling.models import BlackBody
from scipy.integrate import quad
from scipy.optimize import brentq

import torrid
from torrid.interface.cli import main
from torrid.io.observer import (ASTRONOMICAL_UNIT_M, SOLAR_RADIUS_M, ObserverError,
                                ObserverSettings, read_response)
from torrid.physics.disk import gauss_legendre_ring_weights
from torrid.physics.orbit import Orbit
from torrid.physics.planck import tophat_band
from torrid.physics.temperature import (TemperatureMapError, cowan_agol_temperatures,
                                        irradiation_temperature, thickness_to_temperature)
from torrid.workflow.phase import PhaseCurveError, end_temperatures, phase_curve


@pytest.fixture(scope="module")
def planet_run():
    """The default planet at T21 for 60 days: past its spin-up (its first-harmonic hotspot
    turns east after about 45 days; the steady state comes at about 90)."""
    config = torrid.ModelConfig().replace(
        numerics={"truncation": 21},
        run={"days": 60, "output_interval_days": 5, "stop_at_steady_state": False})
    return torrid.run(config)


@pytest.fixture(scope="module")
def run_file(planet_run, tmp_path_factory):
    path = tmp_path_factory.mktemp("phase") / "hot.nc"
    planet_run.to_netcdf(path)
    return path


def with_final_map(ds, h_map):
    """The run with its last thickness map replaced by ``h_map`` (lat, lon)."""
    out = ds.copy()
    h = out["h"].values.copy()
    h[-1] = h_map
    out["h"] = (out["h"].dims, h, out["h"].attrs)
    return out


def mesh(ds):
    return np.meshgrid(np.radians(ds["lat"].values), np.radians(ds["lon"].values), indexing="ij")


def astropy_band(temperature, lo=4e-6, hi=5e-6):
    """Photon-weighted band radiance from astropy's B_nu (B_lambda = B_nu c / lambda^2)."""
    hc = const.h.value * const.c.value

    def integrand(lam):
        bnu = BlackBody(temperature=temperature * u.K)(lam * u.m)
        return bnu.to_value(u.W / (u.m**2 * u.Hz * u.sr)) * const.c.value / lam**2 * lam / hc

    return quad(integrand, lo, hi, epsrel=1e-12)[0]


def test_uniform_planet_gives_a_flat_curve(planet_run):
    big_h = planet_run.attrs["nightside_thickness_m"]
    ds = with_final_map(planet_run, np.full(planet_run["h"].shape[1:], big_h))
    pc = phase_curve(ds, night_temperature=1300.0, day_temperature=2000.0, radius_ratio=0.12)
    expected = 0.12**2 * astropy_band(1300.0) / astropy_band(6000.0) * 1e6
    # tolerance 3e-5 relative: the latitude quadrature of the limb on 32 Gauss latitudes
    # (1.5e-5 edge-on, tests/test_disk.py); the band integrals agree to 1e-11
    np.testing.assert_allclose(pc["flux_ratio"], expected, rtol=3e-5)
    assert float(pc["amplitude"]) < 1e-9 * expected  # flat: the longitude integral is exact
    np.testing.assert_allclose(pc["brightness_temperature"], 1300.0, rtol=1e-5)


def test_first_harmonic_map_gives_a_sinusoid_with_its_offset(planet_run):
    big_h = planet_run.attrs["nightside_thickness_m"]
    c = planet_run.attrs["forcing_contrast"]
    lat, lon = mesh(planet_run)
    h = big_h * (1 + c * (0.5 + 0.3 * np.cos(lat) * np.cos(lon - np.radians(30.0))))
    pc = phase_curve(with_final_map(planet_run, h))
    # Cowan & Agol (2008): the kernel keeps the phase of every harmonic; B(T(h)) adds higher
    # harmonics, all symmetric about the hotspot, so the curve's maximum and its first
    # harmonic both sit 30 deg before eclipse. Tolerances: 1e-9 deg for the harmonic
    # (round-off); 0.05 deg for the parabola through 1-degree samples of a smooth peak
    assert float(pc["harmonic_offset"]) == pytest.approx(30.0, abs=1e-9)
    assert float(pc["offset_of_maximum"]) == pytest.approx(30.0, abs=0.05)
    assert float(pc["phase_of_maximum"]) == pytest.approx(0.5 - 30.0 / 360.0, abs=0.05 / 360)
    assert float(pc["offset_of_minimum"]) == pytest.approx(30.0, abs=0.05)


def test_curve_harmonic_keeps_the_phase_of_the_map_harmonic(planet_run):
    pc = phase_curve(planet_run)
    # the latitude-weighted band brightness J(lon) = int B_band(T) cos^2(lat) dlat of the
    # final map, with the documented affine temperature map, and its first harmonic
    t_night, t_day = pc.attrs["night_temperature_K"], pc.attrs["day_temperature_K"]
    big_h, c = planet_run.attrs["nightside_thickness_m"], planet_run.attrs["forcing_contrast"]
    h = planet_run["h"].isel(time=-1).values
    temperature = t_night + (t_day - t_night) * (h - big_h) / (big_h * c)
    brightness = tophat_band(4e-6, 5e-6).radiance(temperature)  # checked in test_planck.py
    lat = planet_run["lat"].values
    profile = (gauss_legendre_ring_weights(lat) * np.cos(np.radians(lat))) @ brightness
    lon = np.radians(planet_run["lon"].values)
    map_offset = -np.degrees(np.angle(np.sum(profile * np.exp(-1j * lon))))
    # tolerance 1e-6 deg: only round-off separates the two (the kernel's longitude integral is
    # exact and 360 phase samples alias nothing of a T21 map)
    assert float(pc["harmonic_offset"]) == pytest.approx(map_offset, abs=1e-6)
    # and the curve's peak offset has the sign of the map's hotspot offsets (both eastward)
    assert planet_run.attrs["final_hotspot_offset"] > 0
    assert planet_run.attrs["final_hotspot_offset_harmonic"] > 0
    assert float(pc["offset_of_maximum"]) > 0 and float(pc["phase_of_maximum"]) < 0.5
    assert float(pc["map_hotspot_offset"]) == planet_run.attrs["final_hotspot_offset"]
    # headline numbers are the curve's values at eclipse and transit
    assert float(pc["eclipse_depth"]) == pytest.approx(float(pc["flux_ratio"].sel(phase=0.5)))
    assert float(pc["nightside_flux"]) == pytest.approx(float(pc["flux_ratio"][0]), rel=1e-13)
    assert float(pc["amplitude"]) >= float(np.ptp(pc["flux_ratio"].values))


def test_retrograde_run_is_the_mirror_image(planet_run):
    """Mirror the run (lon -> -lon, negative rotation: spin and orbit reversed). A mirror image
    of planet, orbit and observer shows the same light curve: the hotspot now lies west in
    grid longitudes, but so does the hemisphere turned to the observer before eclipse."""
    n = planet_run.sizes["lon"]
    mirror = planet_run.isel(lon=(-np.arange(n)) % n).assign_coords(lon=planet_run["lon"])
    config = json.loads(planet_run.attrs["configuration_json"])
    config["planet"]["rotation_period_days"] *= -1
    mirror.attrs["configuration_json"] = json.dumps(config)
    mirror.attrs["final_hotspot_offset"] = -planet_run.attrs["final_hotspot_offset"]
    forward = phase_curve(planet_run, phases=180)
    backward = phase_curve(mirror, phases=180)
    # tolerance 1e-10 relative: the same sums in another order
    np.testing.assert_allclose(backward["flux_ratio"], forward["flux_ratio"], rtol=1e-10)
    assert float(backward["offset_of_maximum"]) > 0 > float(backward["map_hotspot_offset"])
    assert backward.attrs["rotation_sense"] == -1 and forward.attrs["rotation_sense"] == 1


def test_pole_on_observer_sees_no_variation(planet_run):
    pc = phase_curve(planet_run, inclination=0.0)
    assert float(pc["amplitude"]) < 1e-10 * float(pc["mean_flux_ratio"])
    inclined = phase_curve(planet_run, inclination=60.0)
    edge_on = phase_curve(planet_run)
    assert 0 < float(inclined["amplitude"]) < float(edge_on["amplitude"])


def test_cowan_agol_2011_temperatures():
    t0 = irradiation_temperature(6000.0, 1.1 * SOLAR_RADIUS_M, 0.04 * ASTRONOMICAL_UNIT_M)
    # T0 = T_star sqrt(R_star / a), with astropy's nominal solar radius and au
    assert t0 == pytest.approx(6000.0 * math.sqrt(1.1 * const.R_sun.value
                                                   / (0.04 * const.au.value)), rel=1e-12)
    day, night = cowan_agol_temperatures(t0, 0.3, 1.0)
    assert day == pytest.approx(night, rel=1e-14)  # epsilon = 1: uniform
    day, night = cowan_agol_temperatures(t0, 0.3, 0.0)
    assert day == pytest.approx(t0 * 0.7**0.25 * (2 / 3) ** 0.25, rel=1e-14) and night == 0.0
    # epsilon = 0 leaves a 0 K nightside, which the map refuses with a clear message
    night, day, _ = end_temperatures(ObserverSettings(redistribution=0.0))
    assert night == 0.0


def test_maps_that_go_non_positive_are_refused(planet_run):
    with pytest.raises(PhaseCurveError, match="goes down to .* K"):
        phase_curve(planet_run, night_temperature=5.0, day_temperature=3000.0)
    with pytest.raises(PhaseCurveError, match="night_temperature = 0.0 K: must be > 0"):
        phase_curve(planet_run, redistribution=0.0)
    with pytest.raises(TemperatureMapError, match="forcing_contrast = 0.0: .* needs"):
        thickness_to_temperature(np.ones(3), 1.0, 0.0, 1000.0, 2000.0)
    # the end points map exactly: h = H -> T_night, h = H (1 + dH/H) -> T_day
    t = thickness_to_temperature(np.array([2.0, 3.0]), 2.0, 0.5, 1000.0, 1800.0)
    np.testing.assert_allclose(t, [1000.0, 1800.0], rtol=1e-15)


def test_eccentric_run_follows_the_changing_geometry():
    """A synthetic eccentric run whose map is a fixed small first harmonic about the moving
    substellar point: edge-on, F = a + b cos(180 deg - theta) = a - b sin(nu + omega) with
    nu from Kepler's equation (solved here with brentq). distance_exponent = 0: the forcing, and
    so the temperature map's end points, do not follow the star's distance here (that scaling is
    checked in test_eccentric_temperature_end_points_follow_the_forcing)."""
    e, omega_deg, period_days = 0.3, 40.0, 3.0
    config = torrid.ModelConfig().replace(orbit={"eccentricity": e, "distance_exponent": 0.0},
                                          numerics={"truncation": 21})
    lat_deg = np.degrees(np.arcsin(np.polynomial.legendre.leggauss(32)[0]))
    lon_deg = -180.0 + 360.0 * np.arange(64) / 64
    times = np.linspace(0.0, 2 * period_days, 241)
    n = 2 * math.pi / (period_days * 86400)
    orbit = Orbit(orbital_period_s=period_days * 86400, eccentricity=e, rotation_rate_s=n)
    lon_sub = orbit.substellar_longitude(times * 86400)
    lat, lon = np.meshgrid(np.radians(lat_deg), np.radians(lon_deg), indexing="ij")
    big_h, c, delta = 4e5, 1.0, 1e-4
    h = big_h * (1 + c * (0.5 + delta * np.cos(lat) * np.cos(lon[None] - lon_sub[:, None, None])))
    ds = xr.Dataset({"h": (("time", "lat", "lon"), h),
                     "substellar_longitude": ("time", np.degrees(lon_sub))},
                    coords={"time": times, "lat": lat_deg, "lon": lon_deg},
                    attrs={"nightside_thickness_m": big_h, "forcing_contrast": c,
                           "configuration_json": json.dumps(config.to_dict())})
    pc = phase_curve(ds, argument_of_periastron=omega_deg, phases=72)
    omega = math.radians(omega_deg)

    def true_anomaly(mean):
        m = math.remainder(mean, 2 * math.pi)
        ecc = brentq(lambda x: x - e * math.sin(x) - m, -4, 4, xtol=1e-15)
        return 2 * math.atan2(math.sqrt(1 + e) * math.sin(ecc / 2),
                              math.sqrt(1 - e) * math.cos(ecc / 2))

    nu_tr = math.pi / 2 - omega
    ecc_tr = 2 * math.atan2(math.sqrt(1 - e) * math.sin(nu_tr / 2),
                            math.sqrt(1 + e) * math.cos(nu_tr / 2))
    m_tr = ecc_tr - e * math.sin(ecc_tr)
    shape = np.array([-math.sin(true_anomaly(m_tr + 2 * math.pi * p) + omega)
                      for p in pc["phase"].values])
    flux = pc["flux_ratio"].values
    b, a = np.polyfit(shape, flux, 1)
    # tolerance 2e-4 of the amplitude b: the curvature of B_band(T) over the map's 1e-4
    # contrast (about 3e-5) plus round-off; a wrong sense, omega or phase origin is O(1)
    assert b > 0
    np.testing.assert_allclose(flux, a + b * shape, atol=2e-4 * b)
    assert float(pc["eclipse_phase"]) != pytest.approx(0.5, abs=0.01)
    assert pc["time"].min() >= times[-1] - period_days - 1e-9


def test_accessor_on_a_sweep_table(planet_run):
    h0 = planet_run["h"].isel(time=-1).values
    big_h = planet_run.attrs["nightside_thickness_m"]
    scale = np.array([0.5, 1.0, 1.5])
    heights = np.array([0.9, 1.1]) * big_h
    h = heights[:, None, None, None] + scale[None, :, None, None] * (h0 - big_h)
    table = xr.Dataset(
        {"h": (("thick", "amp", "lat", "lon"), h),
         "nightside_thickness_m": ("thick", heights)},
        coords={"thick": [0.9, 1.1], "amp": scale, "lat": planet_run["lat"],
                "lon": planet_run["lon"]},
        attrs={"forcing_contrast": planet_run.attrs["forcing_contrast"]})
    pc = table.torrid.phase_curve(phases=90)
    assert pc["flux_ratio"].dims == ("thick", "amp", "phase")
    assert pc["eclipse_depth"].dims == ("thick", "amp")
    single = xr.Dataset({"h": (("lat", "lon"), h[1, 2])},
                        coords={"lat": planet_run["lat"], "lon": planet_run["lon"]},
                        attrs={"nightside_thickness_m": heights[1],
                               "forcing_contrast": planet_run.attrs["forcing_contrast"]})
    one = phase_curve(single, phases=90)
    np.testing.assert_allclose(pc["flux_ratio"].sel(thick=1.1, amp=1.5), one["flux_ratio"],
                               rtol=1e-12)
    # a larger map contrast gives a larger amplitude
    assert np.all(np.diff(pc["amplitude"].values, axis=1) > 0)
    # as the sweep tables hold them: final diagnostics as variables named without final_,
    # a failed point as NaN maps (its curve is NaN, the others unaffected)
    table["hotspot_offset"] = (("amp", "thick"), np.arange(6.0).reshape(3, 2))
    table["h"][0, 0] = np.nan
    pc = table.torrid.phase_curve(phases=90)
    np.testing.assert_array_equal(pc["map_hotspot_offset"].values, np.arange(6.0).reshape(3, 2).T)
    assert np.isnan(pc["flux_ratio"][0, 0]).all() and np.isnan(pc["eclipse_depth"][0, 0])
    assert np.isfinite(pc["flux_ratio"][1:]).all()


def test_response_csv_is_validated(tmp_path):
    good = tmp_path / "good.csv"
    good.write_text("wavelength_um,response\n# a comment\n4.0,0\n4.5,1.0\n5.0,0\n")
    lam, resp = read_response(good)
    assert lam.tolist() == [4.0, 4.5, 5.0] and resp.tolist() == [0.0, 1.0, 0.0]
    cases = {"4.0,1\n3.9,1\n": "line 2: wavelength 3.9 micron must be greater",
             "4.0,1\n4.5,-1\n": "line 2: response -1 must be >= 0",
             "4.0,1\n4.5,x\n": "line 2: '4.5,x' is not two numbers",
             "4.0,1,2\n4.5,1,2\n": "line 1: 3 columns, expected 2",
             "4.0,1\n": "at least 2 rows"}
    for text, fragment in cases.items():
        bad = tmp_path / "bad.csv"
        bad.write_text(text)
        with pytest.raises(ObserverError, match=fragment) as info:
            read_response(bad)
        assert str(bad) in str(info.value) and "\n" not in str(info.value)


def test_settings_are_validated():
    with pytest.raises(ObserverError, match="inclination = 200: must be <= 180"):
        ObserverSettings(inclination=200)
    with pytest.raises(ObserverError, match="give day_temperature too"):
        ObserverSettings(night_temperature=900)
    with pytest.raises(ObserverError, match="did you mean 'albedo'"):
        ObserverSettings().replace(albedoo=0.1)


# --- the command line ----------------------------------------------------------------------
def test_cli_writes_curve_plot_and_csv(run_file, tmp_path, capsys):
    out = tmp_path / "curve.nc"
    assert main(["phase", str(run_file), "-o", str(out), "--phases", "120", "--csv",
                 "--inclination", "85", "--energy"]) == 0
    stdout = capsys.readouterr().out
    assert "eclipse depth" in stdout and str(out) in stdout
    with xr.open_dataset(out) as pc:  # both map hotspot measures beside the curve's peak
        for name in ("offset_of_maximum", "harmonic_offset", "map_hotspot_offset",
                     "map_hotspot_offset_harmonic"):
            assert f"{float(pc[name]):+.1f} deg" in stdout, name
    assert "(first harmonic)" in stdout and "(equatorial maximum)" in stdout
    assert (tmp_path / "curve.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    with xr.open_dataset(out) as pc:
        assert pc.sizes["phase"] == 120 and pc.attrs["inclination_deg"] == 85.0
        assert pc.attrs["weighting"] == "energy" and pc["flux_ratio"].attrs["units"] == "ppm"
        depth = float(pc["eclipse_depth"])
    text = (tmp_path / "curve.csv").read_text()
    assert f"# eclipse_depth = {depth:.10g} ppm" in text
    assert "phase,flux_ratio_ppm,brightness_temperature_K" in text
    # the default name sits beside the run file
    assert main(["phase", str(run_file), "--phases", "60"]) == 0
    assert run_file.with_name("hot-phase.nc").exists()
    assert run_file.with_name("hot-phase.png").exists()


def test_cli_refuses_to_overwrite(run_file, tmp_path, capsys):
    out = tmp_path / "curve.nc"
    out.write_text("precious")
    assert main(["phase", str(run_file), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert "--overwrite" in err and len(err.splitlines()) == 1 and out.read_text() == "precious"
    assert main(["phase", str(run_file), "-o", str(out), "--phases", "60", "--overwrite"]) == 0


def test_cli_config_file_and_overrides(run_file, tmp_path):
    response = tmp_path / "band.csv"
    response.write_text("3.0,0.2\n3.6,1.0\n4.0,0.1\n")
    toml = tmp_path / "obs.toml"
    toml.write_text('[observer]\nstar_temperature = 5000.0\ninclination = 80.0\n'
                    'response = "band.csv"\nphases = 60\n')
    out = tmp_path / "c.nc"
    assert main(["phase", str(run_file), "-o", str(out), "--config", str(toml),
                 "--inclination", "70"]) == 0
    with xr.open_dataset(out) as pc:
        assert pc.attrs["star_temperature_K"] == 5000.0  # from the file
        assert pc.attrs["inclination_deg"] == 70.0  # the command line wins
        assert "band.csv" in pc.attrs["band"]


@pytest.mark.parametrize("argv, fragment", [
    (["--band", "5-4"], "--band = '5-4': must be LO-HI in micron with 0 < LO < HI"),
    (["--band", "four"], "--band = 'four': must be LO-HI"),
    (["--phases", "2"], "--phases = 2: must be >= 8"),
    (["--star-temperature", "-1"], "--star-temperature = -1.0: must be > 0"),
])
def test_cli_bad_options_are_one_line(run_file, tmp_path, capsys, argv, fragment):
    assert main(["phase", str(run_file), "-o", str(tmp_path / "x.nc"), *argv]) == 2
    err = capsys.readouterr().err
    assert fragment in err and len(err.splitlines()) == 1 and "Traceback" not in err
    assert not (tmp_path / "x.nc").exists()


def test_cli_bad_files_are_one_line(run_file, tmp_path, capsys):
    bad_csv = tmp_path / "resp.csv"
    bad_csv.write_text("4.0,1\n4.5,1\n4.2,1\n")
    broken = tmp_path / "broken.nc"
    broken.write_bytes(b"\x89HDF\r\n garbage, not a run")
    toml = tmp_path / "o.toml"
    toml.write_text("[observer]\nstar_temprature = 5000.0\n")
    cases = [
        (["phase", str(run_file), "--response", str(bad_csv)], f"{bad_csv}, line 3"),
        (["phase", str(broken)], f"{broken}: not a readable netCDF run file"),
        (["phase", str(tmp_path / "none.nc")], "none.nc: no such run file"),
        (["phase", str(run_file), "--config", str(toml)],
         "unknown key 'star_temprature' (did you mean 'star_temperature'?)"),
    ]
    for argv, fragment in cases:
        assert main([*argv, "-o", str(tmp_path / "y.nc")]) == 2
        err = capsys.readouterr().err
        assert err.startswith("torrid: error:") and fragment in err
        assert len(err.splitlines()) == 1


def test_band_outside_the_blackbody_range_is_refused(tmp_path):
    from torrid.io.observer import ObserverError, ObserverSettings, read_response

    with pytest.raises(ObserverError, match="must lie within 0.2-1000 micron"):
        ObserverSettings(band="0.001-0.01")
    response = tmp_path / "xray.csv"
    response.write_text("0.01,1\n0.02,1\n")
    with pytest.raises(ObserverError, match="xray.csv: response = 0.01-0.02 micron"):
        read_response(response)


@pytest.mark.parametrize("k", [0.5, 2.0])
def test_eccentric_temperature_end_points_follow_the_forcing(k, tmp_path):
    """Issue 10: on an eccentric orbit (e = 0.3) the forcing's substellar excess at periastron is
    (1 - e)^-k times its mean-distance value (the relaxation's equilibrium, the model's own
    numbers), and the phase curve's day end point follows it: T_day (a / r)^k at each sample's
    time, (1 - e)^-k T_day at periastron (a / r = 1 / (1 - e), the periastron distance of a
    Keplerian orbit, any textbook)."""
    from torrid.workflow.setup import build_model

    e = 0.3
    config = torrid.ModelConfig().replace(
        numerics={"truncation": 10}, run={"days": 1.2, "output_interval_days": 0.02,
                                          "stop_at_steady_state": False},
        orbit={"eccentricity": e, "distance_exponent": k, "rotation": "given",
               "orbital_period_days": 1.0})
    model = build_model(config)
    relaxation = model.process("newtonian_relaxation")
    g = model.gravity_m_s2
    excess = relaxation.equilibrium(0.0).max() / g - relaxation.mean_geopotential / g
    assert relaxation.state_at(0.0)[1] == pytest.approx(1.0 * (1 - e) ** -k, rel=1e-12)
    lat, lon = model.grid.mesh()
    mean_distance = relaxation.mean_geopotential / g * np.maximum(
        np.cos(lat) * np.cos(lon - relaxation.state_at(0.0)[0]), 0).max()  # contrast 1
    assert excess == pytest.approx((1 - e) ** -k * mean_distance, rel=1e-12)
    ds = torrid.run(config)
    pc = phase_curve(ds, day_temperature=2000.0, night_temperature=1000.0, phases=72)
    times_s = pc["time"].values * 86400
    ratio = np.asarray(model.orbit.distance_ratio(times_s))
    np.testing.assert_allclose(pc["day_temperature"].values, 2000.0 * ratio ** -k, rtol=1e-12)
    peri = 2000.0 * (1 - e) ** -k
    assert pc["day_temperature"].max() == pytest.approx(peri, rel=2e-3)  # the sample nearest


def test_eccentric_offsets_are_named_as_phase_offsets():
    """On a time-dependent orbit the curve's offsets are 360 x a phase difference, a time offset
    rather than a longitude (issue 10): named phase_offset_of_maximum etc., labelled in degrees
    of orbital phase; the longitude names are absent."""
    config = torrid.ModelConfig().replace(
        numerics={"truncation": 10}, run={"days": 1.2, "output_interval_days": 0.04,
                                          "stop_at_steady_state": False},
        orbit={"eccentricity": 0.2, "rotation": "given", "orbital_period_days": 1.0})
    pc = phase_curve(torrid.run(config), phases=36)
    for timed in ("phase_offset_of_maximum", "phase_offset_of_minimum", "harmonic_phase_offset"):
        assert "degrees of orbital phase" in pc[timed].attrs["long_name"]
    assert "offset_of_maximum" not in pc and "harmonic_offset" not in pc
    from torrid.interface.cli.phase import summary_line

    assert "deg of phase" in summary_line(pc)
