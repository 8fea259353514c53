"""The mass-exchange momentum term of Showman & Polvani (2011), explicit.

Where the relaxation adds mass (Q = (h_eq - h) / tau_rad > 0), the new mass arrives at rest,
so it slows the layer: R = -v Q / h on both wind components; where mass is removed (Q <= 0)
R = 0. ``atmosphere.mass_exchange_momentum = false`` leaves the term out (as many published
runs do); it is on by default.
"""

from __future__ import annotations

import numpy as np

from torrid.physics.processes.base import Process


class MassExchange(Process):
    """R = -v Q / h where Q > 0, from the Newtonian relaxation's Q (m s^-2)."""

    name = "mass_exchange"
    settings = ("atmosphere.mass_exchange_momentum",)
    reference = "Showman & Polvani (2011)"

    def __init__(self, relaxation):
        self.relaxation = relaxation
        shape = relaxation.transforms.grid.shape
        self._east = np.zeros(shape)
        self._north = np.zeros(shape)

    @classmethod
    def build(cls, settings, context):
        relaxation = context.built.get("newtonian_relaxation")
        if not settings["atmosphere.mass_exchange_momentum"] or relaxation is None \
                or relaxation.rate == 0.0:
            return None
        return cls(relaxation)

    def momentum_forcing(self, time_s, fields):
        relaxation = self.relaxation
        q = relaxation.heating(time_s, fields.geopotential)
        factor = np.maximum(q, 0.0) / (fields.geopotential + relaxation.mean_geopotential)
        np.multiply(-fields.winds[1], factor, out=self._east)  # Q / h (s^-1) times -u
        np.multiply(fields.winds[0], factor, out=self._north)  # -v = winds[0]
        return self._east, self._north
