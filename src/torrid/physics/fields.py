"""Conversions between grid-point fields (u, v, h) and the spectral prognostic state."""

from __future__ import annotations

import numpy as np

from torrid.physics.state import DIVERGENCE, GEOPOTENTIAL, VORTICITY
from torrid.physics.transforms import Transforms


def spectral_state(transforms: Transforms, u: np.ndarray, v: np.ndarray,
                   geopotential_deviation: np.ndarray) -> np.ndarray:
    """Fit grid winds (m s^-1) and phi' (m^2 s^-2) to the state (3, ncoeff): zeta, delta, phi'.

    The fit is the Gauss-Legendre analysis, exact for fields within the truncation.
    """
    state = np.empty((3, transforms.grid.ncoeff), dtype=complex)
    div, curl = transforms.divergence_curl(u, v)
    state[VORTICITY] = curl
    state[DIVERGENCE] = div
    state[GEOPOTENTIAL] = transforms.to_spectral(geopotential_deviation)
    return state


def grid_state(transforms: Transforms, state: np.ndarray) -> dict[str, np.ndarray]:
    """Grid fields of a state: u, v (m s^-1), vorticity, divergence (s^-1), phi' (m^2 s^-2)."""
    winds = transforms.winds(state[VORTICITY], state[DIVERGENCE])
    return {
        "u": winds[1].copy(),
        "v": -winds[0],
        "vorticity": transforms.to_grid(state[VORTICITY]),
        "divergence": transforms.to_grid(state[DIVERGENCE]),
        "geopotential_deviation": transforms.to_grid(state[GEOPOTENTIAL]),
    }
