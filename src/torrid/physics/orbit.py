"""Orbit and spin: Kepler's equation, the star's distance and the substellar longitude.

Conventions (design notes): longitude 0 is the substellar point at t = 0; longitudes increase
eastward (the direction of a prograde spin). The orbit turns in the same sense as the spin
(prograde), so a negative rotation rate mirrors the whole problem. At t = 0 the planet is at
mean anomaly ``initial_mean_anomaly_rad`` (0: periastron).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np


def solve_kepler(mean_anomaly_rad, eccentricity: float, tol: float = 1e-15, max_iter: int = 50):
    """Eccentric anomaly E (rad) solving Kepler's equation M = E - e sin E (0 <= e < 1).

    Newton's iteration from Danby's (1987) starting value E0 = M + 0.85 e sign(sin M), which
    converges for every M when e < 1 (the simpler E0 = M + e sin M diverges for e near 1).
    """
    if not 0 <= eccentricity < 1:
        raise ValueError(f"eccentricity must be in [0, 1), got {eccentricity}")
    m = np.asarray(mean_anomaly_rad, dtype=float)
    e = eccentricity
    big = np.remainder(m + np.pi, 2 * np.pi) - np.pi  # reduce to [-pi, pi)
    ecc = big + 0.85 * e * np.sign(np.sin(big))
    for _ in range(max_iter):
        delta = (ecc - e * np.sin(ecc) - big) / (1 - e * np.cos(ecc))
        ecc = ecc - delta
        if np.all(np.abs(delta) < tol):
            break
    return ecc + (m - big)


def true_anomaly(eccentric_anomaly_rad, eccentricity: float):
    """True anomaly nu (rad) from the eccentric anomaly: tan(nu/2) = sqrt((1+e)/(1-e)) tan(E/2)."""
    e = eccentricity
    big = np.asarray(eccentric_anomaly_rad, dtype=float)
    return 2 * np.arctan2(np.sqrt(1 + e) * np.sin(big / 2), np.sqrt(1 - e) * np.cos(big / 2))


def pseudo_synchronous_ratio(eccentricity: float) -> float:
    """Hut (1981, A&A 99, 126, eq. 42): pseudo-synchronous spin rate over the mean motion.

    Omega_ps / n = (1 + 15/2 e^2 + 45/8 e^4 + 5/16 e^6) / ((1 + 3 e^2 + 3/8 e^4) (1 - e^2)^(3/2)).
    """
    e2 = eccentricity**2
    num = 1 + 7.5 * e2 + 45 / 8 * e2**2 + 5 / 16 * e2**3
    den = (1 + 3 * e2 + 3 / 8 * e2**2) * (1 - e2) ** 1.5
    return num / den


@dataclass(frozen=True)
class Orbit:
    """Where the star is, seen from the rotating planet.

    Parameters
    ----------
    orbital_period_s : float
        Orbital period (s).
    eccentricity : float
        0 <= e < 1.
    rotation_rate_s : float
        Signed planetary rotation rate Omega (rad s^-1); its sign sets the orbit's sense.
    initial_mean_anomaly_rad : float
        Mean anomaly at t = 0 (rad; 0 = periastron).
    """

    orbital_period_s: float
    eccentricity: float = 0.0
    rotation_rate_s: float = 0.0
    initial_mean_anomaly_rad: float = 0.0

    @property
    def mean_motion_s(self) -> float:
        """n = 2 pi / P (rad s^-1), unsigned."""
        return 2 * math.pi / self.orbital_period_s

    @property
    def sense(self) -> float:
        """+1 for a prograde (eastward) spin and orbit, -1 for the mirror image."""
        return -1.0 if self.rotation_rate_s < 0 else 1.0

    def anomalies(self, time_s):
        """Eccentric and true anomaly (rad) at ``time_s``."""
        m = self.initial_mean_anomaly_rad + self.mean_motion_s * np.asarray(time_s, float)
        ecc = solve_kepler(m, self.eccentricity)
        return ecc, true_anomaly(ecc, self.eccentricity)

    def distance_ratio(self, time_s):
        """Star-planet distance over the semi-major axis, r / a = 1 - e cos E."""
        ecc, _ = self.anomalies(time_s)
        return 1 - self.eccentricity * np.cos(ecc)

    def substellar_longitude(self, time_s):
        """Substellar longitude (rad, wrapped to [-pi, pi)): the star's orbital angle moved
        since t = 0 minus the planet's rotation angle, 0 at t = 0."""
        _, nu = self.anomalies(time_s)
        _, nu0 = self.anomalies(0.0)
        angle = self.sense * (nu - nu0) - self.rotation_rate_s * np.asarray(time_s, float)
        return np.remainder(angle + np.pi, 2 * np.pi) - np.pi

    @property
    def is_steady(self) -> bool:
        """True if the substellar point and distance never change (circular, synchronous)."""
        return self.eccentricity == 0 and math.isclose(
            abs(self.rotation_rate_s), self.mean_motion_s, rel_tol=1e-12)
