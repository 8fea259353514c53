"""Invented sweep tables with analytic thickness maps, for the joint-fit tests and benchmark.

The maps are smooth in x = log10 tau_rad and y = log10 tau_drag: a dayside bump of contrast
A(x, y) shifted east by delta(x, y), on a Gauss-Legendre grid (T21 by default). Nothing here is
a model run; the family only has to vary like one (contrast falling and offset growing with
tau_rad, offset growing with tau_drag).
"""

import numpy as np
import xarray as xr

from torrid.physics.grid import SpectralGrid

BIG_H = 4.0e5  # m
CONTRAST = 0.5


def _sigmoid(z):
    return 1 / (1 + np.exp(-z))


def normalised_map(lat_deg, lon_deg, x, y):
    """s(lat, lon) of the family at (x, y) = (log10 tau_rad, log10 tau_drag)."""
    lat, lon = np.meshgrid(np.radians(lat_deg), np.radians(lon_deg), indexing="ij")
    amplitude = 0.35 + 0.55 * _sigmoid(-1.6 * x) + 0.08 * np.tanh(-0.8 * y)
    delta = 1.0 * _sigmoid(1.8 * x) * _sigmoid(1.2 * y + 0.5)
    return 0.08 + amplitude * np.cos(lat) ** 1.5 * (1 + np.cos(lon - delta)) / 2


def family_table(tau_rad, tau_drag, truncation: int = 21) -> xr.Dataset:
    """A sweep table (h over radiative_timescale_days, drag_timescale_days, lat, lon)."""
    grid = SpectralGrid(truncation)
    lat, lon = np.degrees(grid.latitude[::-1]), np.degrees(grid.longitude) - 180.0
    tau_rad, tau_drag = np.atleast_1d(tau_rad), np.atleast_1d(tau_drag)
    h = np.empty((tau_rad.size, tau_drag.size, lat.size, lon.size))
    for i, tr in enumerate(tau_rad):
        for j, td in enumerate(tau_drag):
            y = np.log10(td) if np.isfinite(td) else 3.0
            h[i, j] = BIG_H * (1 + CONTRAST * normalised_map(lat, lon, np.log10(tr), y))
    ds = xr.Dataset({"h": (("radiative_timescale_days", "drag_timescale_days", "lat", "lon"), h,
                           {"units": "m"})},
                    coords={"radiative_timescale_days": tau_rad, "drag_timescale_days": tau_drag,
                            "lat": lat, "lon": lon})
    ds.attrs.update(nightside_thickness_m=BIG_H, forcing_contrast=CONTRAST)
    return ds
