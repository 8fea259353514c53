"""Where a distant observer sits as seen from the planet, against orbital phase.

Derivation (planet-centred axes of :mod:`torrid.physics.diagnostics`: x toward the star, z along
the orbit's (and spin's) north pole, y = z cross x, i.e. toward lon_sub + 90 deg, east). Let the
planet sit at orbital angle theta, measured in the orbit's sense from the point where it is
closest to the observer's line of sight (mid-transit). In the star-centred frame with X
toward an edge-on observer, the planet is at (cos theta, sin theta, 0), so from the planet the
star lies along x = -(cos theta, sin theta, 0) and the east axis is y = z cross x =
(sin theta, -cos theta, 0). The observer direction (1, 0, 0) then has x-component -cos theta and
y-component sin theta: it lies atan2(sin theta, -cos theta) = 180 deg - theta east of the
substellar point. At transit (theta = 0) the observer sees the nightside, at quarter phase
(theta = 90 deg) the evening (east) hemisphere, at eclipse the dayside. Tilting the observer
by the inclination i from the orbit's pole puts it at latitude 90 deg - i. A retrograde run
(negative rotation) is the mirror image lon -> -lon, so its sub-observer longitude is
-(180 deg - theta); latitudes (and i, measured from the grid's north pole) are unchanged.

Orbital phase. On an eccentric orbit with true anomaly nu and argument of periastron omega the
planet is at theta = nu + omega - 90 deg: mid-transit is nu + omega = 90 deg and mid-eclipse
nu + omega = 270 deg (the usual convention of the argument of periastron measured from the
sky-plane node). The orbital phase is the time since mid-transit over the period,
phi = (M - M_transit) / (2 pi) mod 1 with M the mean anomaly, so 0 is mid-transit always and
mid-eclipse is at 0.5 only on a circular orbit (:func:`eclipse_phase`). On a circular orbit
theta = 2 pi phi whatever omega.
"""

from __future__ import annotations

import numpy as np

from torrid.physics.orbit import solve_kepler, true_anomaly


def _wrap(angle_rad):
    """Wrap angles (rad) to [-pi, pi)."""
    return np.remainder(np.asarray(angle_rad, dtype=float) + np.pi, 2 * np.pi) - np.pi


def mean_anomaly_of_true(true_anomaly_rad, eccentricity: float):
    """Mean anomaly M (rad) of a true anomaly nu (rad): E from tan(E/2) =
    sqrt((1-e)/(1+e)) tan(nu/2), then Kepler's equation M = E - e sin E."""
    nu = np.asarray(true_anomaly_rad, dtype=float)
    e = eccentricity
    ecc = 2 * np.arctan2(np.sqrt(1 - e) * np.sin(nu / 2), np.sqrt(1 + e) * np.cos(nu / 2))
    return ecc - e * np.sin(ecc)


def transit_mean_anomaly(eccentricity: float, argument_of_periastron_rad: float) -> float:
    """Mean anomaly (rad) at mid-transit, where nu + omega = 90 deg."""
    return float(mean_anomaly_of_true(np.pi / 2 - argument_of_periastron_rad, eccentricity))


def eclipse_phase(eccentricity: float, argument_of_periastron_rad: float) -> float:
    """Orbital phase (0-1) of mid-eclipse, where nu + omega = 270 deg (0.5 if e = 0)."""
    m_ecl = mean_anomaly_of_true(1.5 * np.pi - argument_of_periastron_rad, eccentricity)
    m_tr = transit_mean_anomaly(eccentricity, argument_of_periastron_rad)
    return float(np.remainder((m_ecl - m_tr) / (2 * np.pi), 1.0))


def orbital_angle(phase, eccentricity: float = 0.0, argument_of_periastron_rad: float = np.pi / 2):
    """Angle theta (rad) of the planet from mid-transit, in the orbit's sense, at ``phase``.

    theta = nu + omega - 90 deg, with nu from Kepler's equation at M = M_transit + 2 pi phase.
    """
    phase = np.asarray(phase, dtype=float)
    if eccentricity == 0:
        return 2 * np.pi * phase
    m = transit_mean_anomaly(eccentricity, argument_of_periastron_rad) + 2 * np.pi * phase
    nu = true_anomaly(solve_kepler(m, eccentricity), eccentricity)
    return nu + argument_of_periastron_rad - np.pi / 2


def sub_observer_offset(theta_rad, sense: float = 1.0):
    """Sub-observer longitude east of the substellar point (rad, [-pi, pi)):
    sense (180 deg - theta); ``sense`` is +1 for prograde, -1 for retrograde runs."""
    return _wrap(sense * (np.pi - np.asarray(theta_rad, dtype=float)))


def sub_observer_latitude(inclination_rad: float) -> float:
    """Sub-observer latitude (rad): 90 deg - inclination (inclination from the grid's pole)."""
    return float(np.pi / 2 - inclination_rad)
