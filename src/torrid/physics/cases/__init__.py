"""Initial conditions of the standard shallow-water test cases, and their registry.

Each case module exposes a pure function
``initial_fields(lat, lon, *, radius_m, rotation_rate_s, gravity_m_s2, **case_params)`` that takes
latitude and eastward longitude in radians (broadcastable arrays) and returns a :class:`CaseFields`.
:data:`CASES` maps each command-line case name to a :class:`CaseSpec` with the run defaults.

Sources: Williamson, Drake, Hack, Jakob & Swarztrauber (1992), J. Comput. Phys. 102, 211-224;
Galewsky, Scott & Polvani (2004), Tellus 56A, 429-440. Their constants are in :mod:`.earth`.
"""

import functools
import math
from dataclasses import dataclass
from typing import Callable

from torrid.physics.cases import earth, galewsky, williamson2, williamson5, williamson6
from torrid.physics.cases._fields import CaseFields

__all__ = ["CASES", "CaseFields", "CaseSpec", "case_spec", "hyperdiffusion_efolding_days", "earth"]

_WILLIAMSON_1992 = ("Williamson, Drake, Hack, Jakob & Swarztrauber (1992), "
                    "J. Comput. Phys. 102, 211-224")
_GALEWSKY_2004 = "Galewsky, Scott & Polvani (2004), Tellus 56A, 429-440"


def hyperdiffusion_efolding_days(coefficient, order, truncation, radius_m=earth.RADIUS_M):
    """E-folding time, days, of a del^(2p) hyperdiffusion at the truncation wavenumber N.

    tau = a^(2p) / (nu_2p (N (N+1))^p): the del^(2p) operator's eigenvalue on degree N is
    (-N(N+1)/a^2)^p.

    Parameters
    ----------
    coefficient : float
        nu_2p, m^(2p) s^-1.
    order : int
        p (del^(2p)).
    truncation : int
        Triangular truncation N (>= 1).
    radius_m : float, optional
        Planetary radius a, m.

    Returns
    -------
    float
        tau, days.
    """
    if truncation < 1:
        raise ValueError(f"truncation must be >= 1, got {truncation!r}")
    n2 = truncation * (truncation + 1.0)
    return (radius_m**2 / n2) ** order / coefficient / earth.DAY_S


def _inviscid(truncation, radius_m=earth.RADIUS_M):
    """No hyperdiffusion at any truncation (infinite e-folding time)."""
    return math.inf


# Chosen here, from memory: of the order of the del^4 coefficients of spectral models of the 1990s
# (e.g. the reference runs of Jakob-Chien, Hack & Williamson 1995); not checked against that paper.
_NU4_WILLIAMSON_M4_S = 1.0e15
# From memory: Galewsky et al. (2004) quote nu = 1.0e5 m^2 s^-1, a del^2 (p = 1) coefficient by its
# units. The model's hyperdiffusion is del^(2p), p >= 2, so its e-folding time at N is matched.
_NU2_GALEWSKY_M2_S = 1.0e5


def _williamson56_hyperdiffusion(truncation, radius_m=earth.RADIUS_M):
    """tau(N) = a^4 / (nu4 (N (N+1))^2), days, with nu4 = 1e15 m^4 s^-1 (chosen here)."""
    return hyperdiffusion_efolding_days(_NU4_WILLIAMSON_M4_S, 2, truncation, radius_m)


def _galewsky_hyperdiffusion(truncation, radius_m=earth.RADIUS_M):
    """tau(N) = a^2 / (nu2 N (N+1)), days, with nu2 = 1e5 m^2 s^-1 (Galewsky et al. 2004)."""
    return hyperdiffusion_efolding_days(_NU2_GALEWSKY_M2_S, 1, truncation, radius_m)


@dataclass(frozen=True)
class CaseSpec:
    """A test case and its run defaults.

    Attributes
    ----------
    name : str
        Command-line name.
    title : str
        One-line description.
    reference : str
        Published source of the case.
    initial_fields : callable
        ``initial_fields(lat, lon, *, radius_m, rotation_rate_s, gravity_m_s2, **params)`` returning
        :class:`CaseFields`, with fixed case options already bound.
    default_days : float
        Run length, days.
    default_hyperdiffusion_days : callable
        ``f(truncation, radius_m=earth.RADIUS_M)`` giving the e-folding time at the truncation
        wavenumber, days (``math.inf``: off).
    default_hyperdiffusion_order : int
        p of the del^(2p) operator.
    default_output_interval_days : float
        Output interval, days.
    parameters : tuple of str
        Names of the keyword parameters ``initial_fields`` accepts besides the planet's.
    notes : str
        Why the defaults are what they are.
    """

    name: str
    title: str
    reference: str
    initial_fields: Callable[..., CaseFields]
    default_days: float
    default_hyperdiffusion_days: Callable[..., float]
    default_hyperdiffusion_order: int
    default_output_interval_days: float
    parameters: tuple = ()
    notes: str = ""


_GALEWSKY_NOTES = (
    "6 days: the perturbed jet rolls up into vortices by about day 6 (the paper's figures). "
    "Hyperdiffusion del^4 with e-folding time tau(N) = a^2 / (nu2 N(N+1)) at truncation N, "
    "nu2 = 1e5 m^2 s^-1 (from memory, the paper's del^2 coefficient; matched at the truncation "
    "scale, the del^4 operator damps the jet's large scales much less than the paper's del^2). "
    "Output every 0.5 day to follow the roll-up."
)

CASES = {
    "williamson2": CaseSpec(
        name="williamson2",
        title="Global steady-state nonlinear zonal geostrophic flow (optionally tilted by alpha)",
        reference=_WILLIAMSON_1992 + ", test case 2",
        initial_fields=williamson2.initial_fields,
        default_days=5.0,
        default_hyperdiffusion_days=_inviscid,
        default_hyperdiffusion_order=4,
        default_output_interval_days=1.0,
        parameters=("alpha_rad",),
        notes=(
            "5 days: the paper's error-norm time. Inviscid: the state is exact and steady, and "
            "even a weak del^8 term damps its degree-2 height field by more than 1e-10 in 5 days "
            "(e.g. T42 with 0.1-day e-folding at truncation: about 6e-9), which would mask the "
            "round-off-level error norms. The order (4) only applies if diffusion is switched on."
        ),
    ),
    "williamson5": CaseSpec(
        name="williamson5",
        title="Zonal flow over an isolated mountain",
        reference=_WILLIAMSON_1992 + ", test case 5",
        initial_fields=williamson5.initial_fields,
        default_days=15.0,
        default_hyperdiffusion_days=_williamson56_hyperdiffusion,
        default_hyperdiffusion_order=2,
        default_output_interval_days=1.0,
        notes=(
            "15 days: the paper's run length. The paper is inviscid; the cone's kinked rim makes "
            "spectral ringing and a downscale cascade, so a weak del^4 with a fixed coefficient "
            "nu4 = 1e15 m^4 s^-1 is on: tau(N) = a^4 / (nu4 (N(N+1))^2) (0.36 day at T85). The "
            "value is chosen here (from memory, of the order used in spectral reference runs, "
            "Jakob-Chien, Hack & Williamson 1995; not verified)."
        ),
    ),
    "williamson6": CaseSpec(
        name="williamson6",
        title="Rossby-Haurwitz wave, wavenumber 4",
        reference=_WILLIAMSON_1992 + ", test case 6",
        initial_fields=williamson6.initial_fields,
        default_days=14.0,
        default_hyperdiffusion_days=_williamson56_hyperdiffusion,
        default_hyperdiffusion_order=2,
        default_output_interval_days=1.0,
        notes=(
            "14 days: the paper's run length. Same weak del^4 as williamson5, nu4 = 1e15 m^4 s^-1 "
            "(chosen here, not verified against a paper): it damps the wave (degree 5) by only "
            "about 7e-4 in 14 days, while keeping the truncation scale clean."
        ),
    ),
    "galewsky": CaseSpec(
        name="galewsky",
        title="Barotropically unstable mid-latitude jet with a height perturbation",
        reference=_GALEWSKY_2004,
        initial_fields=functools.partial(galewsky.initial_fields, perturbed=True),
        default_days=6.0,
        default_hyperdiffusion_days=_galewsky_hyperdiffusion,
        default_hyperdiffusion_order=2,
        default_output_interval_days=0.5,
        notes=_GALEWSKY_NOTES,
    ),
    "galewsky-unperturbed": CaseSpec(
        name="galewsky-unperturbed",
        title="Balanced mid-latitude jet without perturbation (should stay zonal and steady)",
        reference=_GALEWSKY_2004,
        initial_fields=functools.partial(galewsky.initial_fields, perturbed=False),
        default_days=6.0,
        default_hyperdiffusion_days=_galewsky_hyperdiffusion,
        default_hyperdiffusion_order=2,
        default_output_interval_days=0.5,
        notes=_GALEWSKY_NOTES.replace("the perturbed jet rolls up", "the perturbed twin rolls up"),
    ),
}


def case_spec(name):
    """Return the :class:`CaseSpec` called ``name``; ``KeyError`` lists the known names."""
    try:
        return CASES[name]
    except KeyError:
        raise KeyError(f"unknown test case {name!r}; known: {', '.join(CASES)}") from None
