"""Thermal phase curves of run files (and sweep tables): what a telescope sees, and its numbers.

A post-processor: it reads a run dataset and never reruns the model. The chain is

    thickness map h -> temperature map T(h) (affine; :mod:`torrid.physics.temperature`)
    -> band intensity I = B_band(T) (isotropic; :mod:`torrid.physics.planck`)
    -> disk integral D(o) over the visible hemisphere (:mod:`torrid.physics.disk`)
    -> planet-to-star flux ratio (R_p / R_s)^2 D / (pi B_band(T_star)), in ppm,

for observers o at orbital phases 0..1 (:mod:`torrid.physics.viewing`: phase 0 = mid-transit;
the sub-observer point is 180 deg - theta east of the substellar point, mirrored for
retrograde runs, at latitude 90 deg - inclination). The flux ratio is the planet's emission
alone: neither the transit nor the eclipse itself (the planet hidden) is modelled.

Which map. A synchronous circular run (or a dataset without a time axis, e.g. a sweep table)
uses its final, steady map for every phase. An eccentric or non-synchronous run uses its time
series over the last orbit: the phase sample at time t (t within the last orbital period of the
run) sees the two snapshots around t, each carried along with the substellar point to time t
(a map that moves with the star between snapshots), linearly weighted in time, with the
observer direction of time t. Snapshots must then be dense in time (output interval well
below the period; a coarser one is warned about). Each snapshot's temperature map follows the
star's distance as the forcing does: its equilibrium contrast is dH/H (a/r)^k and its day end
point T_day (a/r)^k (k = orbit.distance_exponent, 0.5 by default: T_eq ~ r^-1/2), while the
nightside end point stays T_night; ``day_temperature`` records the day end point per sample.

Headline numbers (per sweep point): eclipse depth (flux ratio at mid-eclipse), nightside flux
(at mid-transit), peak-to-peak amplitude, the phases of the maximum and minimum (refined
below the sampling by a parabola through the extreme sample and its neighbours) and their
offsets, offset_of_maximum = (phase_eclipse - phase_max) x 360 deg (positive = peak before
eclipse = eastward hotspot; phase_eclipse = 0.5 on a circular orbit) and
offset_of_minimum = -phase_min x 360 deg (wrapped to [-180, 180)), the first harmonic of the
curve (its peak-to-peak amplitude and offset), and the map's own hotspot offsets from the run.
On a time-dependent orbit these curve offsets are 360 x a phase difference, a time offset rather
than a longitude, and are named phase_offset_of_maximum, phase_offset_of_minimum and
harmonic_phase_offset (in degrees of orbital phase) instead.
Those are east-positive in grid longitude: on a retrograde run (attribute rotation_sense = -1)
the planet turns westward in grid longitudes, its hotspot offset is negative where the curve
still peaks before eclipse (a mirror image of planet, orbit and observer shows the same light
curve), so compare the curve's offsets with rotation_sense x the map's.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import xarray as xr

from torrid.io.cf import time_days
from torrid.io.config import SECONDS_PER_DAY, ModelConfig
from torrid.io.observer import (ASTRONOMICAL_UNIT_M, SOLAR_RADIUS_M, ObserverError,
                                ObserverSettings, read_response)
from torrid.io.provenance import config_from_attrs, provenance_attrs
from torrid.io.variables import PHASE_VARIABLES
from torrid.meta import TorridWarning
from torrid.physics.curvefeatures import first_harmonic, parabolic_extremum, wrap_degrees
from torrid.physics.disk import DiskQuadrature
from torrid.physics.orbit import Orbit
from torrid.physics.planck import Band, tabulated_band, tophat_band
from torrid.physics.processes.relaxation import equilibrium_extremes
from torrid.physics.temperature import (cowan_agol_temperatures, irradiation_temperature,
                                        thickness_to_temperature)
from torrid.physics.viewing import (eclipse_phase, orbital_angle, sub_observer_latitude,
                                    sub_observer_offset, transit_mean_anomaly)
from torrid.workflow.setup import rotation_rate

#: On time-dependent (eccentric or non-synchronous) orbits the curve's offsets measure time in
#: degrees of orbital phase, not a hotspot longitude, and are named so.
PHASE_OFFSET_NAMES = {"offset_of_maximum": "phase_offset_of_maximum",
                      "offset_of_minimum": "phase_offset_of_minimum",
                      "harmonic_offset": "harmonic_phase_offset"}

#: fewer snapshots than this per orbit in a time-dependent run are warned about
MIN_SNAPSHOTS_PER_ORBIT = 20
MAP_DIMS = ("lat", "lon")


class PhaseCurveError(ValueError):
    """A dataset that phase curves cannot be made from (the message names it)."""


def build_band(settings: ObserverSettings) -> Band:
    """The band quadrature of ``settings``: its top-hat band or its response file."""
    photon = settings.weighting == "photon"
    if settings.response is not None:
        lam_um, response = read_response(settings.response)
        return tabulated_band(lam_um * 1e-6, response, photon=photon,
                              description=f"response {settings.response} "
                                          f"({lam_um[0]:g}-{lam_um[-1]:g} micron)")
    low, high = settings.band_um
    return tophat_band(low * 1e-6, high * 1e-6, photon=photon)


def end_temperatures(settings: ObserverSettings) -> tuple[float, float, float]:
    """Night and day end-point temperatures (K) of the map and the irradiation temperature T0."""
    t0 = irradiation_temperature(settings.star_temperature, settings.star_radius * SOLAR_RADIUS_M,
                                 settings.semi_major_axis * ASTRONOMICAL_UNIT_M)
    if settings.temperatures_given:
        return settings.night_temperature, settings.day_temperature, t0
    day, night = cowan_agol_temperatures(t0, settings.albedo, settings.redistribution)
    return night, day, t0


def run_configuration(ds: xr.Dataset) -> ModelConfig | None:
    """The run's configuration (None if the dataset has none, e.g. a sweep table)."""
    if "configuration_json" not in ds.attrs:
        return None
    try:
        config = ModelConfig.from_dict(config_from_attrs(ds.attrs))
    except (ValueError, KeyError) as err:
        raise PhaseCurveError(f"its configuration_json is not a valid configuration ({err})")
    if not config.is_planet:
        raise PhaseCurveError(f"a standard case ({config.case.name}), not a planet run")
    return config


def run_orbit(ds: xr.Dataset) -> tuple[Orbit | None, str]:
    """The run's orbit rebuilt from its configuration (None: synchronous circular assumed)."""
    config = run_configuration(ds)
    if config is not None:
        omega, period_s = rotation_rate(config)
        return Orbit(orbital_period_s=period_s, eccentricity=config.orbit.eccentricity,
                     rotation_rate_s=omega, initial_mean_anomaly_rad=math.radians(
                         config.orbit.initial_mean_anomaly_deg)), "the run's configuration"
    return None, "assumed synchronous and circular (no configuration_json)"


def _per_point(ds: xr.Dataset, name: str, required: bool, source: str, alias: str = ""):
    """A per-point value: a variable (sweep tables; also under ``alias`` if it has no time
    dim), a dataset attribute, or NaN."""
    if name in ds.data_vars or name in ds.coords:
        return ds[name]
    if name in ds.attrs:
        return float(ds.attrs[name])
    if alias and alias in ds and "time" not in ds[alias].dims:
        return ds[alias]
    if required:
        raise PhaseCurveError(f"{source}: no {name!r} (variable or attribute): phase curves need "
                              "a hot-planet run")
    return float("nan")


def phase_curve(ds: xr.Dataset, settings: ObserverSettings | None = None, *,
                source: str = "dataset", **changes) -> xr.Dataset:
    """Thermal phase curve and headline numbers of a run dataset or sweep table.

    Parameters
    ----------
    ds : xarray.Dataset
        A run dataset (``h`` on (time, lat, lon) with the run's attributes) or a sweep table
        (``h`` with leading parameter dims before lat, lon, and ``nightside_thickness_m``,
        ``forcing_contrast`` as variables over those dims or as attributes).
    settings : ObserverSettings, optional
        Star, geometry and band (defaults: :class:`ObserverSettings`).
    source : str
        Name of the dataset in error messages (e.g. the run file).
    **changes
        Settings to change, e.g. ``inclination=80`` or ``band=(3.0, 4.0)``.

    Returns
    -------
    xarray.Dataset
        ``flux_ratio`` (ppm) and ``brightness_temperature`` (K) over the parameter dims and
        ``phase``; headline numbers as variables with units; every setting as an attribute.
    """
    settings = (settings or ObserverSettings()).replace(**changes)
    try:
        return _phase_curve(ds, settings, source)
    except (PhaseCurveError, ObserverError):
        raise
    except ValueError as err:  # grid, temperature-map problems: name the dataset
        raise PhaseCurveError(f"{source}: {err}") from None


def _phase_curve(ds: xr.Dataset, settings: ObserverSettings, source: str) -> xr.Dataset:
    if "h" not in ds or not set(MAP_DIMS) <= set(ds["h"].dims):
        raise PhaseCurveError(f"{source}: no thickness map h on (lat, lon)")
    try:
        orbit, orbit_source = run_orbit(ds)
    except PhaseCurveError as err:
        raise PhaseCurveError(f"{source}: {err}") from None
    band = build_band(settings)
    t_night, t_day, t0 = end_temperatures(settings)
    h = ds["h"]
    param_dims = [d for d in h.dims if d not in (*MAP_DIMS, "time")]
    quad = DiskQuadrature(ds["lat"].values, ds["lon"].values)
    e = orbit.eccentricity if orbit else 0.0
    omega = math.radians(settings.argument_of_periastron)
    phase_ecl = eclipse_phase(e, omega)
    n = settings.phases
    phases = np.concatenate([np.arange(n) / n, [phase_ecl, 0.0]])  # + eclipse, transit
    obs_lat = sub_observer_latitude(math.radians(settings.inclination))
    sense = orbit.sense if orbit else (-1.0 if ds.attrs.get("rotation_rate_s", 1.0) < 0 else 1.0)
    offset = sub_observer_offset(orbital_angle(phases, e, omega), sense)
    big_h = _per_point(ds, "nightside_thickness_m", True, source)
    contrast = _per_point(ds, "forcing_contrast", True, source)
    top = _per_point(ds, "substellar_thickness_m", False, source)
    if isinstance(top, xr.DataArray) or np.isfinite(top):  # the map spans the equilibrium
        contrast = top / big_h - 1
    steady = orbit is None or orbit.is_steady or "time" not in h.dims
    times = None
    if steady:
        snap = h.isel(time=-1) if "time" in h.dims else h
        lon_sub = _last_substellar_longitude(ds)
        snap, big_h, contrast = xr.broadcast(snap, xr.DataArray(big_h), xr.DataArray(contrast))
        param_dims = [d for d in snap.dims if d not in MAP_DIMS]
        order = (*param_dims, *MAP_DIMS)
        temperature = thickness_to_temperature(*(a.transpose(*order).values
                                                 for a in (snap, big_h, contrast)),
                                               t_night, t_day)
        intensity = band.radiance(temperature)
        disk = quad.integrate(intensity, obs_lat, lon_sub + offset)
        map_source = (f"final map (day {time_days(ds)[-1]:g})" if "time" in h.dims
                      else "the dataset's map")
    else:
        if param_dims:
            raise PhaseCurveError(f"{source}: phase curves of time-dependent orbits need a "
                                  f"single run, not a table over {', '.join(param_dims)}")
        disk, times, map_source = _time_series_disk(ds, settings, orbit, quad, band, phases,
                                                    offset, obs_lat, (big_h, contrast),
                                                    (t_night, t_day), source)
    star = float(band.radiance(settings.star_temperature))
    ratio = settings.radius_ratio**2 * disk / (np.pi * star) * 1e6
    coords = {d: ds[d] for d in param_dims if d in ds.coords}
    return _assemble(ds, settings, band, ratio, disk, phases[:n], phase_ecl, coords, param_dims,
                     offset[:n], times, dict(t_night=t_night, t_day=t_day, t0=t0,
                                             orbit_source=orbit_source, map_source=map_source,
                                             source=source, sense=sense))


def _last_substellar_longitude(ds: xr.Dataset) -> float:
    if "substellar_longitude" in ds and ds["substellar_longitude"].size:
        return float(np.radians(ds["substellar_longitude"].values.reshape(-1)[-1]))
    return 0.0


def _time_series_disk(ds, settings, orbit: Orbit, quad: DiskQuadrature, band: Band, phases,
                      offset, obs_lat, thickness_scale, end_points, source):
    """Disk integrals at the phases over the last orbit of a time-dependent run."""
    times_s = time_days(ds) * SECONDS_PER_DAY
    period = orbit.orbital_period_s
    if times_s.size < 2 or times_s[-1] - times_s[0] < period * (1 - 1e-9):
        raise PhaseCurveError(
            f"{source}: a time-dependent orbit needs snapshots over at least one orbit (the run "
            f"covers {(times_s[-1] - times_s[0]) / SECONDS_PER_DAY:g} days, the orbital period "
            f"is {period / SECONDS_PER_DAY:g} days)")
    start = times_s[-1] - period
    m_tr = transit_mean_anomaly(orbit.eccentricity, math.radians(settings.argument_of_periastron))
    t_phase = (m_tr + 2 * np.pi * phases - orbit.initial_mean_anomaly_rad) / orbit.mean_motion_s
    t = start + np.remainder(t_phase - start, period)
    window = times_s[times_s >= start - 1e-6 * period]
    spacing = np.max(np.diff(window)) if window.size > 1 else period
    if spacing > period / MIN_SNAPSHOTS_PER_ORBIT:
        warnings.warn(f"{source}: snapshots {spacing / SECONDS_PER_DAY:g} days apart over an orbit "
                      f"of {period / SECONDS_PER_DAY:g} days: the phase curve interpolates a "
                      "coarse time series", TorridWarning, stacklevel=4)
    k = np.clip(np.searchsorted(times_s, t, side="right") - 1, 0, times_s.size - 2)
    alpha = (t - times_s[k]) / (times_s[k + 1] - times_s[k])
    used, local = np.unique(np.concatenate([k, k + 1]), return_inverse=True)
    local_k, local_k1 = local[:k.size], local[k.size:]
    if "substellar_longitude" in ds:
        lon_sub = np.radians(ds["substellar_longitude"].values[used])
    else:
        lon_sub = orbit.substellar_longitude(times_s[used])
    h = ds["h"].isel(time=used).transpose("time", *MAP_DIMS).values
    scale = _distance_scaling(ds, orbit, times_s[used])
    low, high, t_day = _snapshot_end_points(ds, thickness_scale, end_points, scale)
    temperature = thickness_to_temperature(h, low[:, None, None],
                                           (high / low - 1)[:, None, None], end_points[0],
                                           t_day[:, None, None])
    intensity = band.radiance(temperature)
    d0 = quad.integrate(intensity, obs_lat, lon_sub[local_k] + offset, snapshot=local_k)
    d1 = quad.integrate(intensity, obs_lat, lon_sub[local_k1] + offset, snapshot=local_k1)
    days = (start / SECONDS_PER_DAY, times_s[-1] / SECONDS_PER_DAY)
    day_temperature = _snapshot_end_points(ds, thickness_scale, end_points,
                                           _distance_scaling(ds, orbit, t, exact=True))[2]
    return ((1 - alpha) * d0 + alpha * d1, (t / SECONDS_PER_DAY, day_temperature),
            f"time series over the last orbit (days {days[0]:g}-{days[1]:g}, {used.size} "
            "snapshots; linear in time, each carried with the substellar point)")


def _distance_scaling(ds, orbit: Orbit, times_s: np.ndarray, exact: bool = False) -> np.ndarray:
    """(a / r)^k at the given times (k: the run's orbit.distance_exponent): the factor of the
    forcing contrast, read from the run's star_distance_ratio at snapshot times (or from the
    orbit itself)."""
    config = run_configuration(ds)
    k = config.orbit.distance_exponent if config is not None else 0.0
    if "star_distance_ratio" in ds and not exact:
        index = np.searchsorted(time_days(ds) * SECONDS_PER_DAY, times_s)
        ratio = ds["star_distance_ratio"].values[np.clip(index, 0, ds.sizes["time"] - 1)]
    else:
        ratio = np.asarray(orbit.distance_ratio(times_s), dtype=float)
    return ratio ** (-k)


def _snapshot_end_points(ds, thickness_scale, end_points, scale: np.ndarray):
    """The temperature map's end points at times where the forcing contrast is scaled by
    ``scale`` = (a / r)^k: the equilibrium's smallest and largest thickness (m) and the day
    temperature T_day (a / r)^k (K) (T_night is fixed: the nightside equilibrium does not
    follow the star)."""
    config = run_configuration(ds)
    big_h, contrast = float(thickness_scale[0]), float(thickness_scale[1])
    profile = "dayside"
    if config is not None:
        atm = config.atmosphere
        big_h = atm.mean_geopotential_m2_s2 / config.planet.gravity_m_s2
        contrast, profile = atm.forcing_contrast, atm.equilibrium_profile
    low, high = equilibrium_extremes(big_h, contrast * scale, profile)
    return np.broadcast_to(low, scale.shape), high, end_points[1] * scale


def _variable(name: str, values, parameters=()) -> xr.Variable:
    """The phase-file variable ``name`` (its row of the table) holding ``values`` as floats."""
    return PHASE_VARIABLES[name].variable(np.asarray(values, dtype=float), parameters)


def _assemble(ds, settings, band, ratio, disk, phases, phase_ecl, coords, param_dims, offset,
              times, info) -> xr.Dataset:
    n = phases.size
    curve, at_eclipse, at_transit = ratio[..., :n], ratio[..., n], ratio[..., n + 1]
    k_max, f_max = parabolic_extremum(curve, maximum=True)
    k_min, f_min = parabolic_extremum(curve, maximum=False)
    mean, semi, phase_h = first_harmonic(curve)
    p = tuple(param_dims)
    per_point = {
        "flux_ratio": curve,
        "brightness_temperature": band.brightness_temperature(disk[..., :n] / np.pi),
        "sub_observer_longitude": np.degrees(offset),
        "eclipse_depth": at_eclipse,
        "nightside_flux": at_transit,
        "amplitude": f_max - f_min,
        "maximum_flux_ratio": f_max,
        "minimum_flux_ratio": f_min,
        "phase_of_maximum": k_max / n,
        "phase_of_minimum": k_min / n,
        "offset_of_maximum": wrap_degrees((phase_ecl - k_max / n) * 360),
        "offset_of_minimum": wrap_degrees(-k_min / n * 360),
        "mean_flux_ratio": mean,
        "harmonic_amplitude": 2 * semi,
        "harmonic_offset": wrap_degrees((phase_ecl - phase_h) * 360),
        "eclipse_phase": phase_ecl,
    }
    if times is not None:  # a time-dependent orbit: these offsets are times, not longitudes
        per_point = {PHASE_OFFSET_NAMES.get(name, name): values
                     for name, values in per_point.items()}
    data = {name: _variable(name, values, p) for name, values in per_point.items()}
    for name in ("hotspot_offset", "hotspot_offset_harmonic"):
        value = _per_point(ds, f"final_{name}", False, "", alias=name)
        if isinstance(value, xr.DataArray):  # a sweep table's variable: onto the curve's dims
            value = value.expand_dims([d for d in p if d not in value.dims]).transpose(*p).values
        data[f"map_{name}"] = _variable(f"map_{name}", np.broadcast_to(value, curve.shape[:-1]),
                                        p)
    if times is not None:  # a time-dependent orbit: each sample's time and day end point
        data["time"] = _variable("time", times[0][:n])
        data["day_temperature"] = _variable("day_temperature", times[1][:n])
    out = xr.Dataset(data, coords={"phase": _variable("phase", phases), **coords})
    out.attrs.update(_attributes(ds, settings, band, info))
    return out


def _attributes(ds, settings: ObserverSettings, band: Band, info: dict) -> dict:
    s = settings
    attrs = {
        "title": "torrid thermal phase curve",
        "Conventions": "CF-1.10",
        "phase_convention": "phase 0 = mid-transit, 0.5 = mid-eclipse on a circular orbit; "
                            "positive offsets = eastward = peak before eclipse",
        "star_temperature_K": s.star_temperature, "star_radius_solar": s.star_radius,
        "radius_ratio": s.radius_ratio, "semi_major_axis_au": s.semi_major_axis,
        "inclination_deg": s.inclination, "band": band.description,
        "weighting": s.weighting, "night_temperature_K": info["t_night"],
        "day_temperature_K": info["t_day"],
        "temperatures": "given" if s.temperatures_given else
                        "derived (Cowan & Agol 2011; day = substellar end point)",
        "irradiation_temperature_K": info["t0"], "albedo": s.albedo,
        "redistribution": s.redistribution,
        "argument_of_periastron_deg": s.argument_of_periastron, "phases": s.phases,
        "temperature_map": "T = T_night + (T_day - T_night) (h - h_min) / (h_max - h_min), "
                           "h_min and h_max the equilibrium's smallest and largest thickness; "
                           "on an eccentric orbit each snapshot's h_max follows the forcing "
                           "contrast dH/H (a/r)^k and T_day becomes T_day (a/r)^k "
                           "(k = orbit.distance_exponent)",
        "rotation_sense": int(info["sense"]),
        "map_source": info["map_source"], "orbit_source": info["orbit_source"],
        "source_run": info["source"],
        "run_configuration_json": ds.attrs.get("configuration_json", ""),
        "run_title": ds.attrs.get("title", ""),
    }
    attrs.update(provenance_attrs({"observer": s.to_dict()}))
    return attrs
