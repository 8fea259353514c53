"""Closed-form steady response of the damped equatorial beta-plane to a localised heating.

Gill (1980, Q. J. R. Meteorol. Soc. 106, 447-462, section 2 and the symmetric case of section 3);
the free wave modes are those of Matsuno (1966, J. Meteorol. Soc. Japan 44, 25-43). The
derivation below is ours (redone from the equations, not copied from the paper); the paper is
recalled from memory only for its choice of scales, its forcing shape and the structure of the
answer, which the derivation reproduces.

Scales
------
Equatorial beta-plane, f = beta y, linear shallow water with gravity-wave speed c, Rayleigh
friction and Newtonian cooling at the same rate r. With Gill's units

    length L_G = sqrt(c / (2 beta)),  time T_G = 1 / sqrt(2 beta c),  velocity c,
    geopotential perturbation c^2,

the steady equations become (the factor 1/2 is beta L_G^2 / c = 1/2 in both Coriolis terms):

    eps u - y v / 2 = -p_x                       (1)
    eps v + y u / 2 = -p_y                       (2)
    eps p + u_x + v_y = -Q                       (3),   eps = r T_G = r / sqrt(2 beta c).

(Note L_G is 1/sqrt(2) times the usual equatorial deformation radius sqrt(c / beta).)

Long-wave approximation
-----------------------
Gill's closed form drops eps v in (2) (meridional geostrophy, y u / 2 = -p_y). This filters the
short Rossby and mixed Rossby-gravity waves; the neglected term is O(eps k) relative to the kept
ones for zonal wavenumber k of the forcing. Everything below solves (1), (2'), (3) exactly.

Derivation
----------
With q = p + u and r = p - u, (1) + (3) and (3) - (1) give

    eps q + q_x + (v_y - y v / 2) = -Q,     eps r - r_x + (v_y + y v / 2) = -Q,

and (2') is (q_y + y q / 2) + (r_y - y r / 2) = 0. Expand in parabolic cylinder functions
D_n(y) = He_n(y) exp(-y^2 / 4), which obey D_n' + y D_n / 2 = n D_(n-1) and
D_n' - y D_n / 2 = -D_(n+1). For Q = F(x) D_0(y) only the n = 0 coefficient of Q is nonzero,
and the bounded solution has

    Kelvin wave:     q = q0(x) D_0, with q0' + eps q0 = -F        (decays eastward at rate eps)
    n = 1 Rossby:    q = q2(x) D_2, r = 2 q2 D_0, v = v1 D_1, with
                     q2' - 3 eps q2 = F, v1 = eps q2 + q2' = F + 4 eps q2
                     (decays westward at rate 3 eps)

(the D_1 coefficient of (2') forces r0 = 2 q2; adding the r0 and q2 equations eliminates v1).
Hence, with p = (q + r) / 2 and u = (q - r) / 2,

    p = [q0 + q2 (1 + y^2)] exp(-y^2 / 4) / 2
    u = [q0 + q2 (y^2 - 3)] exp(-y^2 / 4) / 2
    v = [F + 4 eps q2] y exp(-y^2 / 4)

For F = cos(k x) on |x| < Lx, 0 elsewhere, k = pi / (2 Lx), the ODEs integrate in closed form:
q0 = 0 west of the heating and q2 = 0 east of it (no wave enters from outside), continuity at
x = -Lx (q0) and x = +Lx (q2) fixes the homogeneous parts.

Sign: Q > 0 (heating, a mass sink in the layer) gives p < 0 over the heating. Relaxation toward
a raised equilibrium thickness is a mass source, i.e. Q = -eps p_eq in these units.
"""

from __future__ import annotations

import numpy as np


def heating_profile(x, lx: float) -> np.ndarray:
    """F(x) = cos(k x) for |x| < Lx, else 0, with k = pi / (2 Lx)."""
    x = np.asarray(x, dtype=float)
    k = np.pi / (2 * lx)
    return np.where(np.abs(x) < lx, np.cos(k * x), 0.0)


def kelvin_amplitude(x, eps: float, lx: float) -> np.ndarray:
    """q0(x): bounded solution of q0' + eps q0 = -F with q0 = 0 for x <= -Lx."""
    x = np.asarray(x, dtype=float)
    k = np.pi / (2 * lx)
    d = eps**2 + k**2
    inside = -(eps * np.cos(k * x) + k * np.sin(k * x) + k * np.exp(-eps * (x + lx))) / d
    at_east_edge = -k * (1 + np.exp(-2 * eps * lx)) / d
    east = at_east_edge * np.exp(-eps * (x - lx))
    return np.where(x <= -lx, 0.0, np.where(x < lx, inside, east))


def rossby_amplitude(x, eps: float, lx: float) -> np.ndarray:
    """q2(x): bounded solution of q2' - 3 eps q2 = F with q2 = 0 for x >= Lx."""
    x = np.asarray(x, dtype=float)
    k = np.pi / (2 * lx)
    d = 9 * eps**2 + k**2
    inside = (-3 * eps * np.cos(k * x) + k * np.sin(k * x) - k * np.exp(3 * eps * (x - lx))) / d
    at_west_edge = -k * (1 + np.exp(-6 * eps * lx)) / d
    west = at_west_edge * np.exp(3 * eps * (x + lx))
    return np.where(x >= lx, 0.0, np.where(x > -lx, inside, west))


def gill_fields(x, y, eps: float, lx: float) -> dict[str, np.ndarray]:
    """p, u, v (Gill's units) of the symmetric heating Q = F(x) exp(-y^2 / 4) (long-wave form).

    Also returns the Kelvin and Rossby parts of p separately (``p_kelvin``, ``p_rossby``).
    """
    x, y = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(y, dtype=float))
    q0 = kelvin_amplitude(x, eps, lx)
    q2 = rossby_amplitude(x, eps, lx)
    f = heating_profile(x, lx)
    d0 = np.exp(-y**2 / 4)
    p_kelvin = 0.5 * q0 * d0
    p_rossby = 0.5 * q2 * (1 + y**2) * d0
    return {
        "p": p_kelvin + p_rossby,
        "u": 0.5 * (q0 + q2 * (y**2 - 3)) * d0,
        "v": (f + 4 * eps * q2) * y * d0,
        "p_kelvin": p_kelvin,
        "p_rossby": p_rossby,
    }
