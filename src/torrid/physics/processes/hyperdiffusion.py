"""Scale-selective hyperdiffusion del^(2p), implicit, with its e-folding time at the truncation
scale as the knob.

nu_l = [l (l + 1) / (N (N + 1))]^p / tau damps every coefficient of degree l of vorticity,
divergence and thickness, so the smallest resolved scale (l = N) decays in tau and larger
scales far more slowly. tau = inf switches it off.
"""

from __future__ import annotations

import math

import numpy as np

from torrid.physics.processes.base import CASE, PLANET, ImplicitRates, Process
from torrid.physics.units import SECONDS_PER_DAY


def hyperdiffusion_rates(degree: np.ndarray, truncation: int, efolding_time_s: float,
                         order: int) -> np.ndarray:
    """Rates nu_l (s^-1) of a del^(2 p) hyperdiffusion, 1 / efolding_time_s at l = truncation.

    nu_l = [l (l + 1) / (N (N + 1))]^p / tau, so the smallest resolved scale decays in tau and
    larger scales far more slowly (scale-selective). tau = inf switches it off.
    """
    if not efolding_time_s > 0:
        raise ValueError(f"hyperdiffusion e-folding time must be > 0 s, got {efolding_time_s}")
    l = np.asarray(degree, dtype=float)
    n = float(truncation)
    return (l * (l + 1) / (n * (n + 1))) ** order / efolding_time_s


class Hyperdiffusion(Process):
    """del^(2p) hyperdiffusion of vorticity, divergence and thickness (implicit only).

    Unset settings (standard cases) take the case's published setting at the run's truncation.
    """

    name = "hyperdiffusion"
    kinds = frozenset({PLANET, CASE})
    settings = ("numerics.hyperdiffusion_days", "numerics.hyperdiffusion_order")

    def __init__(self, rates: np.ndarray, efolding_days: float, order: int, truncation: int):
        self.rates = rates
        self.efolding_days = float(efolding_days)
        self.order = int(order)
        self.truncation = int(truncation)

    @classmethod
    def build(cls, settings, context):
        grid = context.transforms.grid
        days = settings["numerics.hyperdiffusion_days"]
        order = settings["numerics.hyperdiffusion_order"]
        if days is None:
            default = context.case.default_hyperdiffusion_days
            days = default(grid.truncation) if callable(default) else default
        if order is None:
            order = context.case.default_hyperdiffusion_order
        rates = hyperdiffusion_rates(grid.degree.astype(float), grid.truncation,
                                     days * SECONDS_PER_DAY, order)
        return cls(rates, days, order, grid.truncation)

    def implicit_rates(self) -> ImplicitRates:
        return ImplicitRates(vorticity=self.rates, divergence=self.rates, thickness=self.rates)

    def attrs(self) -> dict:
        efolding = "off" if math.isinf(self.efolding_days) else f"{self.efolding_days:g} days"
        return {"hyperdiffusion": f"del^{2 * self.order}, e-folding {efolding} at "
                                  f"l = {self.truncation}"}
