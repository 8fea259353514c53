"""Diagnostics of a hot-planet run: hotspot, day-night contrast, jets, energies, limb winds.

All functions are pure: they take the spectral state (3, ncoeff) of
:mod:`torrid.physics.tendencies` (relative vorticity zeta and divergence delta in s^-1,
geopotential deviation phi' = g h - Phi_mean in m^2 s^-2, no topography, so the layer thickness is
h = (phi' + Phi_mean) / g) and return plain floats in the units listed in
:data:`DIAGNOSTIC_VARIABLES`.

Geometry and conventions (design notes): longitude 0 is the substellar point of a synchronous
circular orbit, east positive; the substellar longitude ``lon_sub`` may move and is given in
radians; output longitudes and offsets are in degrees in [-180, 180), a positive offset is
eastward. Quantities that the model grid would only sample (the equator, the terminator) are
evaluated exactly from the spectral coefficients on rings of arbitrary colatitude with ducc0's
ring-based synthesis (which folds every order m into the ring's nphi points correctly, also for
nphi < 2 m_max + 1).

Limb geometry used by :func:`planet_diagnostics` (derivation, planet-centred axes: x toward the
star, z along the spin/orbit north pole, y = z cross x, i.e. toward lon_sub + 90 deg):
at latitude lat and dl = lon - lon_sub the eastward and northward unit vectors are
e = (-sin dl, cos dl, 0) and n = (-sin lat cos dl, -sin lat sin dl, cos lat). In transit the
observer lies in the -x (antistellar) direction, so the velocity away from the observer is
v . (+x):

    v_r = -(u sin dl + v sin lat cos dl)      (positive = redshift)

On the terminator (dl = +/- 90 deg) cos dl = 0, so v_r = -u on the east limb and +u on the west
limb at every latitude: the meridional wind lies in the sky plane there. An eastward wind on the
east (evening) limb, and any day-to-night flow on either limb, moves toward the observer
(blueshift). Leading and trailing limb: at mid-transit the planet lies between star and
observer, i.e. at -x as seen from the star; a prograde orbit (counter-clockwise about +z) moves it
along z cross (-x) = -y, toward its west limb. So for a prograde synchronous orbit the west
(morning, lon_sub - 90 deg) limb is the leading limb in transit and the east (evening,
lon_sub + 90 deg) limb the trailing one.
"""

from __future__ import annotations

import functools

import ducc0
import numpy as np

from torrid.physics.curvefeatures import wrap_degrees
from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY
from torrid.physics.transforms import Transforms

#: Half-width of the equatorial band whose cos(lat)-weighted mean gives the harmonic hotspot
#: offset (degrees of latitude; rings with |lat| <= this value are used).
EQUATORIAL_BAND_HALF_WIDTH_DEG = 30.0

#: Points of the fine equatorial ring per model-grid longitude for the hotspot search.
HOTSPOT_RING_OVERSAMPLING = 4

#: Points closer to the terminator than this (in cos(lat) cos(lon - lon_sub)) count half to the
#: dayside and half to the nightside (the trapezoid rule's end-point weight).
TERMINATOR_TOLERANCE = 1e-9

#: Relative range below which a field is treated as flat and its hotspot as undefined (NaN).
FLAT_FIELD_TOLERANCE = 1e-12

#: Longitudinal contrast (``longitudinal_contrast``: the equatorial band's range over longitude
#: relative to that of the radiative equilibrium) below which both hotspot offsets are
#: undefined (NaN). Why 0.01: it is the default steady-state tolerance (``run.steady_tolerance``),
#: the change in the day-night contrast (scale 1) that the run's own steady-state test still
#: calls "no change". A longitudinal structure smaller than that is, by the run's own
#: criterion, not distinguishable from a featureless layer, and the longitude of its maximum
#: is set by residual waves rather than by the forcing (the demo's tau_rad = 10 days points
#: with weak drag sit at 0.007-0.008 with harmonic offsets of -47 and -83 degrees; the
#: smallest contrast of its other points is 0.025).
HOTSPOT_CONTRAST_THRESHOLD = 0.01

#: The diagnostics that are NaN where the hotspot is undefined.
HOTSPOT_DIAGNOSTICS = ("hotspot_longitude", "hotspot_offset", "hotspot_offset_harmonic")
#: The angles among the diagnostics (degrees; unwrapped before time means).
ANGLE_DIAGNOSTICS = HOTSPOT_DIAGNOSTICS

_LIMB = "mean line-of-sight velocity (positive away from a transit observer) of the"

#: Units (CF strings) and long names of every key returned by :func:`planet_diagnostics`
#: (leading/trailing limbs as for a prograde orbit).
DIAGNOSTIC_VARIABLES: dict[str, tuple[str, str]] = {
    "hotspot_longitude": (
        "degree", "longitude (east positive) of the maximum of the layer thickness on the "
                  "equator"),
    "hotspot_offset": (
        "degree", "eastward offset of the equatorial thickness maximum from the substellar point"),
    "hotspot_offset_harmonic": (
        "degree", "eastward offset of the first longitudinal harmonic of the equatorial-band "
        "thickness from the substellar point"),
    "longitudinal_contrast": (
        "1", "longitudinal contrast of the equatorial band: range over longitude of its "
             "cos(lat)-weighted mean thickness (|lat| <= 30 deg) relative to that of the "
             "radiative equilibrium"),
    "hotspot_offset_defined": (
        "1", f"1 where the hotspot offsets are defined (longitudinal contrast >= "
             f"{HOTSPOT_CONTRAST_THRESHOLD:g}), 0 where they are NaN"),
    "day_night_contrast": (
        "1", "hemisphere-mean day-night contrast: day-minus-night mean thickness relative to "
             "that of the radiative equilibrium"),
    "peak_contrast": (
        "1", "peak-to-peak contrast: maximum minus minimum thickness relative to that of the "
             "radiative equilibrium"),
    "equatorial_zonal_wind": ("m s-1", "zonal-mean eastward wind on the equator"),
    "kinetic_energy": ("m3 s-2", "global mean of h |v|^2 / 2"),
    "available_potential_energy": ("m3 s-2", "global mean of g (h - mean h)^2 / 2"),
    "limb_wind_east": ("km s-1", f"{_LIMB} winds on the evening (east, trailing) limb"),
    "limb_wind_west": ("km s-1", f"{_LIMB} winds on the morning (west, leading) limb"),
    "limb_velocity_east": (
        "km s-1", f"{_LIMB} winds plus rotation on the evening (east, trailing) limb"),
    "limb_velocity_west": (
        "km s-1", f"{_LIMB} winds plus rotation on the morning (west, leading) limb"),
}


# --- helpers ---------------------------------------------------------------------------------
def _wind_coefficients(transforms: Transforms, vorticity: np.ndarray,
                       divergence: np.ndarray) -> np.ndarray:
    """Spin-1 (E, B) coefficients of the winds of zeta and delta (s^-1), shape (2, ncoeff), m s^-1.

    E = -a delta / sqrt(l (l + 1)), B = -a zeta / sqrt(l (l + 1)), zero for l = 0 (ducc0's
    gradient/curl convention, /work/shared/notes-measured.md).
    """
    l = transforms.grid.degree.astype(float)
    root = np.sqrt(l * (l + 1.0))
    factor = -transforms.radius_m * np.divide(1.0, root, out=np.zeros_like(root), where=root > 0)
    return np.stack([divergence * factor, vorticity * factor]).astype(np.complex128)


def _ring_synthesis(alm: np.ndarray, lmax: int, colatitude: np.ndarray, nphi: int,
                    phi0: float, spin: int) -> np.ndarray:
    """Fields on rings of given colatitudes (rad), ``nphi`` points each from ``phi0`` (rad).

    Returns an array (ncomp, nring, nphi): ncomp = 1 for spin 0, 2 (V_theta, V_phi) for spin 1.
    """
    colatitude = np.ascontiguousarray(colatitude, dtype=np.float64)
    nring = colatitude.size
    out = ducc0.sht.synthesis(
        alm=np.ascontiguousarray(alm, dtype=np.complex128), theta=colatitude, lmax=lmax,
        nphi=np.full(nring, nphi, dtype=np.uintp), phi0=np.full(nring, float(phi0)),
        ringstart=(np.arange(nring) * nphi).astype(np.uintp), spin=spin)
    return out.reshape(out.shape[0], nring, nphi)


@functools.lru_cache(maxsize=8)
def _gauss_nodes(count: int) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre nodes and weights on [-1, 1] (numpy ``leggauss``, cached: it costs an
    eigenvalue problem, tens of ms at T42, on every output otherwise)."""
    nodes, weights = np.polynomial.legendre.leggauss(count)
    nodes.flags.writeable = weights.flags.writeable = False
    return nodes, weights


def _parabolic_peak(values: np.ndarray) -> tuple[float, float]:
    """Fractional index and value of the maximum of a periodic sequence, parabola-refined.

    The parabola through the largest sample and its two neighbours has its vertex at
    k + (f_- - f_+) / (2 (f_- - 2 f_0 + f_+)) in index units.
    """
    n = values.size
    k = int(np.argmax(values))
    fm, f0, fp = values[(k - 1) % n], values[k], values[(k + 1) % n]
    curvature = fm - 2.0 * f0 + fp
    shift = 0.0 if curvature >= 0 else 0.5 * (fm - fp) / curvature
    return k + shift, f0


def _is_flat(values: np.ndarray) -> bool:
    scale = float(np.max(np.abs(values)))
    return float(np.ptp(values)) <= FLAT_FIELD_TOLERANCE * scale


# --- public functions ------------------------------------------------------------------------
def hotspot_defined(longitudinal_contrast: float) -> bool:
    """True where the hotspot offsets are defined: the longitudinal contrast (1) is at least
    :data:`HOTSPOT_CONTRAST_THRESHOLD` (False for NaN)."""
    return bool(np.isfinite(longitudinal_contrast)
                and longitudinal_contrast >= HOTSPOT_CONTRAST_THRESHOLD)


def hotspot_reason(longitudinal_contrast: float) -> str:
    """Why the hotspot offsets are defined or not (one line)."""
    if hotspot_defined(longitudinal_contrast):
        return (f"defined: longitudinal contrast {longitudinal_contrast:.2g} >= "
                f"{HOTSPOT_CONTRAST_THRESHOLD:g}")
    if not np.isfinite(longitudinal_contrast):
        return "no longitudinal contrast to measure (a flat equilibrium or a flat layer)"
    return (f"longitudinal contrast {longitudinal_contrast:.2g} below "
            f"{HOTSPOT_CONTRAST_THRESHOLD:g}: the equatorial band is too flat for a hotspot")



def planet_diagnostics(transforms: Transforms, state: np.ndarray, *, mean_geopotential: float,
                       gravity_m_s2: float, rotation_rate_s: float,
                       substellar_longitude_rad: float,
                       equilibrium_thickness_m: np.ndarray) -> dict[str, float]:
    """Scalar diagnostics of one model state of a tidally locked planet.

    Parameters
    ----------
    transforms : Transforms
        Grid, sphere radius a (m) and transforms of the run.
    state : numpy.ndarray, complex, shape (3, ncoeff)
        Spectral state: relative vorticity (s^-1), divergence (s^-1), phi' = g h - Phi_mean
        (m^2 s^-2).
    mean_geopotential : float
        Phi_mean = g H (m^2 s^-2).
    gravity_m_s2 : float
        (Reduced) gravity g (m s^-2).
    rotation_rate_s : float
        Planetary rotation rate Omega (rad s^-1; negative for retrograde spin).
    substellar_longitude_rad : float
        Substellar longitude lon_sub at this time (rad, east positive; any real value).
    equilibrium_thickness_m : numpy.ndarray, shape (nlat, nlon)
        Radiative-equilibrium thickness h_eq (m) on the model grid (rings north to south,
        longitudes 2 pi j / nlon), e.g. from :func:`torrid.physics.processes.relaxation.equilibrium_thickness`.

    Returns
    -------
    dict[str, float]
        Keys and units as in :data:`DIAGNOSTIC_VARIABLES`:

        ``longitudinal_contrast`` (1)
            C = (max - min over longitude of b) / (the same of b_eq), b the cos(lat)-weighted
            mean of h over the model-grid rings with |lat| <= ``EQUATORIAL_BAND_HALF_WIDTH_DEG``
            and b_eq that of h_eq. NaN if b_eq is flat.
        ``hotspot_offset_defined`` (1)
            1.0 if C >= :data:`HOTSPOT_CONTRAST_THRESHOLD`, else 0.0; the three hotspot
            diagnostics below are NaN where it is 0 (:func:`hotspot_reason` says why).
        ``hotspot_longitude`` (degree, east positive, [-180, 180))
            Longitude of the maximum of h on the equator. h is synthesised exactly on an
            equatorial ring of ``HOTSPOT_RING_OVERSAMPLING * nlon`` points and the maximum refined
            by the parabola through the largest sample and its neighbours (error about
            |h'''/h''| s^2 / 6 for a ring spacing s). NaN if h is flat on the equator.
        ``hotspot_offset`` (degree)
            hotspot_longitude - lon_sub wrapped to [-180, 180); positive = east of the
            substellar point.
        ``hotspot_offset_harmonic`` (degree)
            Phase of the first longitudinal harmonic of the equatorial band: b(lon_j) is the
            cos(lat)-weighted mean of h over the model-grid rings with
            |lat| <= ``EQUATORIAL_BAND_HALF_WIDTH_DEG``; c1 = sum_j b_j exp(-i lon_j) and the offset
            is -arg(c1) - lon_sub wrapped to [-180, 180). NaN if |c1| vanishes.
        ``day_night_contrast`` (1)
            A = (<h>_day - <h>_night) / (<h_eq>_day - <h_eq>_night), where <.> is the area
            mean, with the Gauss-Legendre weights of the model grid, over the dayside
            (cos(lat) cos(lon - lon_sub) > 0) or the nightside (< 0) hemisphere; grid points
            within ``TERMINATOR_TOLERANCE`` of the terminator count half to each. Perez-Becker &
            Showman (2013) measure the day-night thickness difference relative to that of the
            radiative equilibrium (cited from memory); this hemisphere-mean form is ours.
            A -> 1 when the layer follows its equilibrium (tau_rad -> 0) and A -> 0 for perfect
            redistribution. NaN if the equilibrium has no day-night difference.
        ``peak_contrast`` (1)
            (max h - min h) / (max h_eq - min h_eq) over the model-grid points: the
            peak-to-peak form common in published shallow-water studies (Perez-Becker & Showman
            2013 define their fractional day-night height difference this way, from memory; not
            checked against the paper). Like A it tends to 1 for tau_rad -> 0 and to 0 for
            tau_rad -> inf, but it sees local extremes (a hotspot, the cold Rossby gyres), so it
            is larger than A when the layer is far from its equilibrium. NaN if h_eq is flat.
        ``equatorial_zonal_wind`` (m s-1)
            Zonal mean of u exactly on the equator (spin-1 ring synthesis at colatitude pi/2).
        ``kinetic_energy`` (m3 s-2)
            Global mean of h |v|^2 / 2.
        ``available_potential_energy`` (m3 s-2)
            Global mean of g (h - mean h)^2 / 2.
        ``limb_wind_east``, ``limb_wind_west`` (km s-1)
            Line-of-sight velocity of the winds seen by a transit observer (who looks at the
            nightside, along the antistellar direction), v_r = -(u sin dl + v sin lat cos dl),
            dl = lon - lon_sub, positive = away from the observer (redshift); averaged uniformly in
            latitude along the east limb (evening terminator, lon_sub + 90 deg; trailing in
            transit for a prograde orbit) and the west limb (morning terminator, lon_sub - 90 deg;
            leading). On the limbs v_r = -u (east) and +u (west). The latitude mean uses
            Gauss-Legendre nodes (numpy leggauss) with u synthesised exactly at those
            colatitudes.
        ``limb_velocity_east``, ``limb_velocity_west`` (km s-1)
            As the limb winds with the solid-body rotation Omega a cos(lat) added to u:
            the rotation contributes -/+ Omega a 2 / pi (east/west).

    Notes
    -----
    h = (phi' + Phi_mean) / g (no topography). The derivation of v_r and of the leading/trailing
    limbs is in the module docstring.
    """
    grid = transforms.grid
    lmax = grid.truncation
    radius = transforms.radius_m
    g = float(gravity_m_s2)
    lon_sub = float(substellar_longitude_rad)
    lon_sub_deg = float(np.rad2deg(lon_sub))
    state = np.asarray(state)
    h_eq = np.asarray(equilibrium_thickness_m, dtype=float)
    if h_eq.shape != grid.shape:
        raise ValueError(f"equilibrium_thickness_m has shape {h_eq.shape}, expected {grid.shape}")

    # thickness h (m): spectral coefficients (the mean enters the l = 0 coefficient) and grid
    thickness_lm = (state[GEOPOTENTIAL] / g).astype(np.complex128)
    thickness_lm[grid.index(0, 0)] += mean_geopotential / g * np.sqrt(4.0 * np.pi)
    h = transforms.to_grid(thickness_lm)

    out: dict[str, float] = {}

    # the equatorial band's longitudinal contrast, which decides whether a hotspot is defined
    band = np.abs(grid.latitude) <= np.deg2rad(EQUATORIAL_BAND_HALF_WIDTH_DEG)
    cos_band = np.cos(grid.latitude[band])
    band_profile = cos_band @ h[band] / cos_band.sum()
    band_range_eq = float(np.ptp(cos_band @ h_eq[band] / cos_band.sum()))
    flat_eq = band_range_eq <= FLAT_FIELD_TOLERANCE * float(np.max(np.abs(h_eq)))
    contrast = np.nan if flat_eq else float(np.ptp(band_profile)) / band_range_eq
    out["longitudinal_contrast"] = contrast
    defined = hotspot_defined(contrast)
    out["hotspot_offset_defined"] = float(defined)

    # hotspot: exact equatorial ring, parabolic refinement
    nring = HOTSPOT_RING_OVERSAMPLING * grid.nlon
    h_equator = _ring_synthesis(thickness_lm[None, :], lmax, np.array([np.pi / 2]), nring,
                                0.0, spin=0)[0, 0]
    if not defined or _is_flat(h_equator):
        hotspot = np.nan
    else:
        k, _ = _parabolic_peak(h_equator)
        hotspot = float(wrap_degrees(360.0 * k / nring))
    out["hotspot_longitude"] = hotspot
    out["hotspot_offset"] = (float(wrap_degrees(hotspot - lon_sub_deg)) if np.isfinite(hotspot)
                             else np.nan)

    # harmonic offset of the equatorial band
    c1 = np.sum(band_profile * np.exp(-1j * grid.longitude))
    if not defined or abs(c1) <= FLAT_FIELD_TOLERANCE * grid.nlon * np.max(np.abs(band_profile)):
        out["hotspot_offset_harmonic"] = np.nan
    else:
        out["hotspot_offset_harmonic"] = float(wrap_degrees(-np.rad2deg(np.angle(c1))
                                                            - lon_sub_deg))

    # day-night contrast
    lat2, lon2 = grid.mesh()
    cos_angle = np.cos(lat2) * np.cos(lon2 - lon_sub)
    day = np.where(cos_angle > TERMINATOR_TOLERANCE, 1.0,
                   np.where(cos_angle < -TERMINATOR_TOLERANCE, 0.0, 0.5))
    w = transforms.weights
    w_day, w_night = w * day, w * (1.0 - day)

    def day_minus_night(f):
        return float(np.sum(w_day * f) / np.sum(w_day) - np.sum(w_night * f) / np.sum(w_night))

    reference = day_minus_night(h_eq)
    no_contrast = abs(reference) <= FLAT_FIELD_TOLERANCE * float(np.max(np.abs(h_eq)))
    out["day_night_contrast"] = np.nan if no_contrast else day_minus_night(h) / reference
    equilibrium_range = float(np.ptp(h_eq))
    flat = equilibrium_range <= FLAT_FIELD_TOLERANCE * float(np.max(np.abs(h_eq)))
    out["peak_contrast"] = np.nan if flat else float(np.ptp(h)) / equilibrium_range

    # winds
    wind_lm = _wind_coefficients(transforms, state[VORTICITY], state[DIVERGENCE])
    winds = transforms.winds(state[VORTICITY], state[DIVERGENCE])
    u, v = winds[1], -winds[0]
    speed2 = u * u + v * v
    nphi_eq = 2 * lmax + 2  # > lmax: the ring mean is the m = 0 part alone
    u_equator = _ring_synthesis(wind_lm, lmax, np.array([np.pi / 2]), nphi_eq, 0.0, spin=1)[1, 0]
    out["equatorial_zonal_wind"] = float(np.mean(u_equator))

    # global integrals
    h_mean = grid.global_mean(h)
    out["kinetic_energy"] = grid.global_mean(0.5 * h * speed2)
    out["available_potential_energy"] = grid.global_mean(0.5 * g * (h - h_mean) ** 2)

    # limb line-of-sight velocities (u along the terminator is a trigonometric polynomial of
    # degree <= lmax + 1 in latitude; 2 (lmax + 8) Gauss nodes integrate it to round-off)
    nodes, node_weights = _gauss_nodes(2 * (lmax + 8))
    lat_nodes = 0.5 * np.pi * nodes
    node_weights = 0.5 * node_weights  # uniform mean over lat in [-pi/2, pi/2]
    # two points per ring: lon_sub + 90 deg (east limb) and lon_sub + 270 deg = lon_sub - 90 deg
    limb = _ring_synthesis(wind_lm, lmax, 0.5 * np.pi - lat_nodes, 2, lon_sub + 0.5 * np.pi,
                           spin=1)
    u_east, u_west = limb[1, :, 0], limb[1, :, 1]
    rotation = rotation_rate_s * radius * np.cos(lat_nodes)
    km = 1e-3
    out["limb_wind_east"] = float(-node_weights @ u_east) * km
    out["limb_wind_west"] = float(node_weights @ u_west) * km
    out["limb_velocity_east"] = float(-node_weights @ (u_east + rotation)) * km
    out["limb_velocity_west"] = float(node_weights @ (u_west + rotation)) * km
    return out
