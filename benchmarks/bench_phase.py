"""Phase curves: wall time of 360 phase samples from a T85 map and from an eccentric time series.

Synthetic run datasets on the model's grid (no model run needed): a steady T85 map (one final
snapshot of a hotspot-like thickness field), and an eccentric run (e = 0.3) of 200 snapshots
over two orbits, whose last orbit (100 snapshots) the phase curve uses. The time covers the
whole of ``phase_curve`` (temperature map, band integrals, disk integrals, headline numbers);
each case is repeated (``--repeats``) and the median quoted. Targets: under 1 s and 10 s.

    python benchmarks/bench_phase.py
    python benchmarks/bench_phase.py --repeats 7 --truncation 42
"""

from __future__ import annotations

import argparse
import json
import statistics
import time

import numpy as np
import xarray as xr

import torrid
from torrid.physics.grid import SpectralGrid
from torrid.physics.orbit import Orbit
from torrid.workflow.phase import phase_curve


def grid_coordinates(truncation: int) -> tuple[np.ndarray, np.ndarray]:
    grid = SpectralGrid(truncation)
    return np.degrees(grid.latitude[::-1]), np.degrees(grid.longitude) - 180.0


def thickness(lat_deg, lon_deg, lon_sub_rad, big_h=4e5):
    lat, lon = np.meshgrid(np.radians(lat_deg), np.radians(lon_deg), indexing="ij")
    lon = lon[None] - np.atleast_1d(lon_sub_rad)[:, None, None]
    return big_h * (1 + 0.3 + 0.5 * np.cos(lat) * np.cos(lon - 0.4) + 0.05 * np.sin(3 * lon))


def steady_dataset(truncation: int) -> xr.Dataset:
    lat, lon = grid_coordinates(truncation)
    config = torrid.ModelConfig().replace(numerics={"truncation": truncation})
    return xr.Dataset({"h": (("time", "lat", "lon"), thickness(lat, lon, 0.0))},
                      coords={"time": [100.0], "lat": lat, "lon": lon},
                      attrs={"nightside_thickness_m": 4e5, "forcing_contrast": 1.0,
                             "configuration_json": json.dumps(config.to_dict())})


def eccentric_dataset(truncation: int, snapshots: int = 200) -> xr.Dataset:
    lat, lon = grid_coordinates(truncation)
    config = torrid.ModelConfig().replace(numerics={"truncation": truncation},
                                          orbit={"eccentricity": 0.3})
    period_days = 3.0
    times = np.linspace(0.0, 2 * period_days, snapshots)
    orbit = Orbit(period_days * 86400, 0.3, 2 * np.pi / (period_days * 86400))
    lon_sub = orbit.substellar_longitude(times * 86400)
    return xr.Dataset({"h": (("time", "lat", "lon"), thickness(lat, lon, lon_sub)),
                       "substellar_longitude": ("time", np.degrees(lon_sub))},
                      coords={"time": times, "lat": lat, "lon": lon},
                      attrs={"nightside_thickness_m": 4e5, "forcing_contrast": 1.0,
                             "configuration_json": json.dumps(config.to_dict())})


def median_time(ds: xr.Dataset, repeats: int) -> float:
    phase_curve(ds, phases=360)  # warm-up
    walls = []
    for _ in range(repeats):
        start = time.perf_counter()
        phase_curve(ds, phases=360)
        walls.append(time.perf_counter() - start)
    return statistics.median(walls)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--truncation", type=int, default=85)
    args = parser.parse_args()
    steady = steady_dataset(args.truncation)
    shape = steady.sizes["lat"], steady.sizes["lon"]
    t = median_time(steady, args.repeats)
    print(f"steady T{args.truncation} map ({shape[0]} x {shape[1]}), 360 phases: "
          f"{t:.3f} s median of {args.repeats} (target < 1 s)")
    ecc = eccentric_dataset(args.truncation)
    t = median_time(ecc, args.repeats)
    print(f"eccentric T{args.truncation} time series (200 snapshots, last orbit used), "
          f"360 phases: {t:.3f} s median of {args.repeats} (target < 10 s)")


if __name__ == "__main__":
    main()
