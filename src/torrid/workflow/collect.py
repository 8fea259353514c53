"""The sweep table: one xarray Dataset over the swept parameters, from a sweep folder.

Dimensions are the sweep's dimensions (named after the key after the dot, e.g.
``radiative_timescale_days``; the coordinate holds the values, with ``units``, the full
``config_key`` and the ``spacing``: log, linear or values); the other axes of a zip group are
non-dimension coordinates along their group's dimension. Variables, from each point's file:

* every ``final_<name>`` diagnostic as ``<name>``, NaN for failed and missing points (a failed
  run file keeps its last good state, but that is not a result);
* ``steady_state_reached`` (1, 0; NaN when there is no run), ``steady_state_time_days``;
* ``averaging_window_days`` and ``averaging_end_days``: each point's own averaging window
  of its final values (they differ between points: the window is the longer of 3 rotation
  periods and 5 tau_rad);
* ``hotspot_offset_reason``: why the point's hotspot offsets are defined or NaN (the flag
  ``hotspot_offset_defined`` is among the final values);
* ``run_status`` (complete, steady, linear, failed, missing), ``run_status_reason`` and
  ``run_file`` (the point's file name in the folder, also for points still missing; empty for
  linear points, which are solved here, in milliseconds, and get no file);
* ``nightside_thickness_m``, ``substellar_thickness_m`` (the equilibrium's smallest and largest
  thickness) and ``forcing_contrast`` (unless swept: then the coordinate), so
  that ``table.torrid.phase_curve()`` turns the table into phase curves;
* with ``maps``: ``h``, ``u``, ``v`` of the last output (dimensions ..., lat, lon).

Units and long names are the rows of :data:`torrid.io.variables.SWEEP_VARIABLES`. The table is
plain netCDF: ``xarray.open_dataset`` is all a reader needs.
"""

from __future__ import annotations

import copy
import json
import os
from pathlib import Path

import numpy as np
import xarray as xr
from tqdm.auto import tqdm

from torrid.io.config import ConfigError, ModelConfig
from torrid.io.pointfile import (FAILED, FINISHED, LINEAR, MISSING, STATUSES, PointResult,
                                 read_point)
from torrid.io.runfile import write_atomic
from torrid.io.settings import setting
from torrid.io.sweepmanifest import read_manifest
from torrid.io.variables import SWEEP_MAPS, SWEEP_VARIABLES, final_value_row
from torrid.meta import __version__
from torrid.physics.processes.relaxation import equilibrium_extremes
from torrid.workflow.linear_run import solve_point
from torrid.workflow.progress import bar_options

MAP_VARIABLES = SWEEP_MAPS
#: The run-file diagnostic that says where the star was at a map's time.
SUBSTELLAR = "substellar_longitude"
#: Inputs of each point's forcing that become variables over the sweep (the thickness ->
#: temperature scaling of a phase curve), unless swept (then the coordinate holds them).
FORCING = ("nightside_thickness_m", "substellar_thickness_m", "forcing_contrast")
#: Numbers of each finished point's run file that become variables over the sweep.
RUN_NUMBERS = ("steady_state_time_days", "averaging_window_days", "averaging_end_days")


def table_path(folder: str | os.PathLike, name: str) -> Path:
    """Where a sweep's table goes: ``<folder>/<name>-table.nc``."""
    return Path(folder) / f"{name}-table.nc"


def _coordinate(axis: dict, dim: str) -> xr.Variable:
    """A swept dimension's coordinate, with its units and label from the settings table."""
    values = axis["values"]
    row = setting(axis["key"])
    attrs = {"long_name": row.label, "config_key": axis["key"], "spacing": axis["spacing"]}
    if all(isinstance(v, str) for v in values):
        data = np.array(values, dtype=object)
    else:
        data = np.array(values)
        if data.dtype != bool:
            attrs["units"] = row.unit
    return xr.Variable((dim,), data, attrs)


def _is_number(value) -> bool:
    return isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, bool)


def _final_maps(path: Path) -> dict | None:
    with xr.open_dataset(path, engine="netcdf4") as ds:
        if not all(name in ds for name in MAP_VARIABLES):
            return None
        names = [*MAP_VARIABLES, *([SUBSTELLAR] if SUBSTELLAR in ds else [])]
        last = ds[names].isel(time=-1).load()
    return {"lat": last["lat"].values, "lon": last["lon"].values,
            SUBSTELLAR: float(last[SUBSTELLAR]) if SUBSTELLAR in last else 0.0,
            **{name: last[name].values for name in MAP_VARIABLES}}


def collect_sweep(folder: str | os.PathLike, maps: bool = False,
                  progress: bool = False) -> xr.Dataset:
    """Build the sweep table of ``folder`` (see the module docstring).

    Parameters
    ----------
    folder : path
        A sweep folder (with its ``sweep.json``).
    maps : bool
        Add the final maps h, u, v of every finished point.
    progress : bool
        A progress bar over the linear points solved here.

    Raises
    ------
    SweepFolderError
        If ``folder`` is not a sweep folder.
    ValueError
        With ``maps``, if the points are not all on one grid (truncation swept).
    """
    folder = Path(folder)
    manifest = read_manifest(folder)
    dims = [d["name"] for d in manifest["dimensions"]]
    shape = tuple(len(d["axes"][0]["values"]) for d in manifest["dimensions"])
    results = {tuple(p["index"]): (p, read_point(folder / p["file"], p["id"]))
               for p in manifest["points"]}
    solved = _solve_linear_points(results, manifest["base_configuration"], maps, progress)
    finished = [r for _, r in results.values() if r.status in FINISHED]
    finals = sorted({k[len("final_"):] for r in finished for k, v in r.attrs.items()
                     if k.startswith("final_") and _is_number(v)})
    data = _point_variables(results, manifest["base_configuration"], dims, shape, finals,
                            solved)
    coords = {axis["name"]: _coordinate(axis, dim["name"])
              for dim in manifest["dimensions"] for axis in dim["axes"]}
    for name in [n for n in FORCING if n in coords]:  # swept: the coordinate holds it
        del data[name]
    if not any("hotspot_offset_reason" in r.attrs for r in finished):
        del data["hotspot_offset_reason"]  # standard cases, or files without the rule
    if maps:
        maps_data = _point_maps(folder, results, dims, shape, solved)
        if maps_data is not None:
            grid, fields = maps_data
            coords.update(grid)
            data.update(fields)
    return xr.Dataset(data, coords=coords,
                      attrs=_table_attrs(manifest, data["run_status"].values, finished))


def _point_config(base: dict, point: dict) -> ModelConfig | None:
    """A point's configuration (the base with its parameters); None if it is invalid."""
    data = copy.deepcopy(base)
    for key, value in point["parameters"].items():
        section, _, name = key.partition(".")
        data.setdefault(section, {})[name] = value
    try:
        return ModelConfig.from_dict(data)
    except ConfigError:
        return None


def _solve_linear_points(results: dict, base: dict, maps: bool, progress: bool) -> dict:
    """Solve, in this process, the linear points (``numerics.solver = "linear"``) that have no
    run file: in a sweep they get none, since solving one takes milliseconds and its file
    would take longer to write than the solve (issue 13). Their results replace the
    ``missing`` ones in ``results``; returns index -> their maps (None without ``maps``)."""
    todo = [(index, config) for index, (point, result) in results.items()
            if result.status == MISSING
            and (config := _point_config(base, point)) is not None
            and config.numerics.solver == "linear"]
    solved = {}
    for index, config in tqdm(todo, unit="point", desc="linear points", leave=False,
                              disable=not progress or not todo, dynamic_ncols=True,
                              **bar_options()):
        point, _ = results[index]
        try:
            attrs, fields = solve_point(config, maps)
        except ConfigError as err:  # refused (e.g. an eccentric orbit): a failed point
            results[index] = (point, PointResult(FAILED, f"invalid configuration: {err}"))
            continue
        reason = ("linear steady state, solved when the table was made (numerics.solver = "
                  "linear: no run file)")
        results[index] = (point, PointResult(LINEAR, reason, attrs))
        solved[index] = fields
    return solved


def _forcing_inputs(base: dict, point: dict) -> dict:
    """nightside_thickness_m and forcing_contrast of a point, from its configuration (so they
    are known before it has run); NaN if the configuration is invalid."""
    config = _point_config(base, point)
    if config is None:
        return dict.fromkeys(FORCING, np.nan)
    atm = config.atmosphere
    low, high = equilibrium_extremes(atm.mean_geopotential_m2_s2 / config.planet.gravity_m_s2,
                                     atm.forcing_contrast, atm.equilibrium_profile)
    return {"nightside_thickness_m": low, "substellar_thickness_m": high,
            "forcing_contrast": atm.forcing_contrast}


def _point_variables(results: dict, base: dict, dims: list, shape: tuple, finals: list,
                     solved: dict) -> dict:
    """The per-point variables (everything but the maps) of the table (``solved``: the
    indices of the linear points solved here, which have no file)."""
    numbers = {name: np.full(shape, np.nan) for name in
               [*finals, "steady_state_reached", *RUN_NUMBERS, *FORCING]}
    strings = {name: np.full(shape, "", dtype=object) for name in
               ("run_status", "run_status_reason", "run_file", "hotspot_offset_reason")}
    for index, (point, result) in results.items():
        for name, value in _forcing_inputs(base, point).items():
            numbers[name][index] = value
        strings["run_status"][index] = result.status
        strings["run_status_reason"][index] = result.reason
        strings["run_file"][index] = "" if index in solved else point["file"]
        if "steady_state_reached" in result.attrs:
            numbers["steady_state_reached"][index] = float(result.attrs["steady_state_reached"])
        if result.status not in FINISHED:
            strings["hotspot_offset_reason"][index] = f"no result ({result.status} point)"
            continue
        strings["hotspot_offset_reason"][index] = str(result.attrs.get("hotspot_offset_reason",
                                                                       ""))
        for name in RUN_NUMBERS:
            numbers[name][index] = float(result.attrs.get(name, np.nan))
        for name in finals:
            numbers[name][index] = float(result.attrs.get(f"final_{name}", np.nan))
    data = {name: final_value_row(name).variable(numbers[name], dims) for name in finals}
    columns = {**numbers, **strings}
    for name in ("steady_state_reached", *RUN_NUMBERS, "run_status", "run_status_reason",
                 "run_file", "hotspot_offset_reason", *FORCING):  # FORCING: for phase curves
        data[name] = SWEEP_VARIABLES[name].variable(columns[name], dims)
    return data


def _point_maps(folder: Path, results: dict, dims: list, shape: tuple, solved: dict):
    """(lat/lon coordinates, h/u/v variables) of the finished points, or None if none."""
    fields, grid = None, None
    for index, (point, result) in results.items():
        if result.status not in FINISHED:
            continue
        snapshot = solved[index] if solved.get(index) else _final_maps(folder / point["file"])
        if snapshot is None:
            continue
        if fields is None:
            grid = (snapshot["lat"], snapshot["lon"])
            fields = {n: np.full(shape + snapshot["h"].shape, np.nan) for n in MAP_VARIABLES}
            star = np.full(shape, np.nan)
        elif snapshot["h"].shape != fields["h"].shape[len(shape):]:
            raise ValueError(f"{folder}: --maps needs every point on one grid, but "
                             f"{point['file']} has {snapshot['h'].shape[0]} latitudes, "
                             f"not {fields['h'].shape[len(shape)]} (truncation swept?)")
        for name in MAP_VARIABLES:
            fields[name][index] = snapshot[name]
        star[index] = snapshot.get(SUBSTELLAR, 0.0)
    if fields is None:
        return None
    coords = {"lat": SWEEP_VARIABLES["lat"].variable(grid[0]),
              "lon": SWEEP_VARIABLES["lon"].variable(grid[1])}
    data = {name: SWEEP_VARIABLES[name].variable(fields[name], dims) for name in MAP_VARIABLES}
    data["map_substellar_longitude"] = SWEEP_VARIABLES["map_substellar_longitude"].variable(
        star, dims)
    return coords, data


def _table_attrs(manifest: dict, status: np.ndarray, finished: list) -> dict:
    rates = {float(r.attrs["rotation_rate_s"]) for r in finished if "rotation_rate_s" in r.attrs}
    return {
        "Conventions": "CF-1.10",
        "title": f"torrid sweep table: {manifest['torrid_sweep']}",
        "torrid_sweep": manifest["torrid_sweep"],
        "source": f"torrid {__version__}",
        "torrid_version": __version__,
        "date_created": _now(),
        "sweep_dimensions_json": json.dumps(manifest["dimensions"], allow_nan=True),
        "sweep_base_configuration_json": json.dumps(manifest["base_configuration"],
                                                    sort_keys=True, allow_nan=True),
        "points_total": int(status.size),
        **{f"points_{s}": int((status == s).sum())
           for s in STATUSES},
        **({"rotation_rate_s": rates.pop()} if len(rates) == 1 else {}),
        "final_values": "each point's time means over its own trailing steady-state window "
                        "(averaging_window_days long, ending at averaging_end_days; 0 days: "
                        "its last output)",
        "comment": "one point per combination of the swept values; the diagnostics are each "
                   "run's final_<name> attributes (NaN for failed and missing points, and for "
                   "hotspot offsets where hotspot_offset_defined is 0), the maps its last "
                   "output; run_file names the point's run file in the sweep folder",
    }


def _now() -> str:
    import datetime as dt

    return dt.datetime.now(dt.timezone.utc).replace(microsecond=0).isoformat()


def write_table(table: xr.Dataset, path: str | os.PathLike, overwrite: bool = False) -> Path:
    """Write the sweep table as netCDF4 (atomically; an existing file only with ``overwrite``)."""
    return write_atomic(table, path, overwrite=overwrite)
