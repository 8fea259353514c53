"""Planetary constants used by the standard shallow-water test cases.

Values of Williamson, Drake, Hack, Jakob & Swarztrauber (1992), also used by Galewsky, Scott &
Polvani (2004). These are the papers' test-case constants, not a claim about any real planet.
"""

RADIUS_M = 6.37122e6
"""Planetary radius a, m (Williamson et al. 1992)."""

ROTATION_RATE_S = 7.292e-5
"""Rotation rate Omega, s^-1 (Williamson et al. 1992)."""

GRAVITY_M_S2 = 9.80616
"""Gravitational acceleration g, m s^-2 (Williamson et al. 1992)."""

DAY_S = 86400.0
"""One day, s (the papers' time unit)."""
