"""Rayleigh drag -v / tau_drag on both wind components, implicit (Showman & Polvani 2011).

Uniform drag is diagonal in spectral space: the same rate 1 / tau_drag damps vorticity and
divergence. tau_drag = inf: no drag (the process is then absent).
"""

from __future__ import annotations

import math

from torrid.physics.processes.base import ImplicitRates, Process
from torrid.physics.units import SECONDS_PER_DAY


class RayleighDrag(Process):
    """Uniform Rayleigh drag with timescale ``atmosphere.drag_timescale_days``."""

    name = "rayleigh_drag"
    settings = ("atmosphere.drag_timescale_days",)
    reference = "Showman & Polvani (2011)"

    def __init__(self, rate_s: float):
        self.rate_s = float(rate_s)

    @classmethod
    def build(cls, settings, context):
        days = settings["atmosphere.drag_timescale_days"]
        if math.isinf(days):
            return None
        return cls(1.0 / (days * SECONDS_PER_DAY))

    def implicit_rates(self) -> ImplicitRates:
        return ImplicitRates(vorticity=self.rate_s, divergence=self.rate_s)
