"""Bottom topography h_s: the pressure gradient of the free surface h = h* + h_s.

In vorticity-divergence form the surface enters the divergence tendency as -lap(Phi_s),
Phi_s = g h_s (Williamson et al. 1992, eq. 3 in this form), a constant spectral tendency. The
process is present only where the run has topography (Williamson case 5).
"""

from __future__ import annotations

import numpy as np

from torrid.physics.processes.base import CASE, PLANET, Process
from torrid.physics.state import DIVERGENCE


class Topography(Process):
    """Constant divergence tendency -lap(g h_s) of a bottom surface."""

    name = "topography"
    kinds = frozenset({PLANET, CASE})
    reference = "Williamson et al. (1992), case 5"

    def __init__(self, divergence_tendency: np.ndarray):
        self.divergence_tendency = divergence_tendency

    @classmethod
    def build(cls, settings, context):
        if not np.any(context.surface_height_m):
            return None
        tr = context.transforms
        surface = tr.to_spectral(context.gravity_m_s2 * context.surface_height_m)
        return cls(-tr.laplacian_eigenvalues() * surface)

    def spectral_tendency(self, time_s, fields, out) -> None:
        out[DIVERGENCE] += self.divergence_tendency
