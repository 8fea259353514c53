"""The one table of output variables of every file torrid writes: dimensions, units, long_name
and CF standard_name.

One row per variable and file kind: run files (:data:`COORDINATES`, :data:`VARIABLES`),
phase-curve files (:data:`PHASE_VARIABLES`), fit files (:data:`FIT_VARIABLES`) and sweep tables
(:data:`SWEEP_VARIABLES`). Every netCDF variable attribute these files carry and the variable
tables in the README come from here (``python -m torrid.io.variables``); other tools rely on
these names, so they are fixed. :data:`PARAMETERS` in a row's dims stands for the swept
dimensions (those of the sweep table; none for a phase curve of a single run). The swept
coordinates themselves describe their configuration key (``torrid.workflow.collect``).
"""

from __future__ import annotations

import sys
from dataclasses import dataclass
from typing import Sequence

import numpy as np
import xarray as xr

from torrid.io.cf import CALENDAR, DAYS_COORDINATE, TIME_UNITS
from torrid.physics.invariants import CORE_DIAGNOSTICS
from torrid.physics.processes import REGISTRY

# --- The source of the diagnostics rows (one place; the run files' time series and the sweep
# table's final values both derive from it): the diagnostics of every run, then those each
# registered process declares (:attr:`torrid.physics.processes.base.Process.diagnostic_variables`).
DIAGNOSTICS = {**CORE_DIAGNOSTICS,
               **{name: d for process in REGISTRY
                  for name, d in process.diagnostic_variables.items()}}
#: The diagnostics a planet run reports as ``final_<name>`` (sweep-table variables).
FINAL_DIAGNOSTICS = tuple(name for name, d in DIAGNOSTICS.items() if d.final)

#: Placeholder in :attr:`Variable.dims` for the swept (parameter) dimensions.
PARAMETERS = "(parameters)"


@dataclass(frozen=True)
class Variable:
    """Metadata of one output variable (CF-1.10 attributes).

    ``units`` is None for string and flag (boolean) variables, which have no units.
    """

    dims: tuple[str, ...]
    units: str | None
    long_name: str
    standard_name: str | None = None
    calendar: str | None = None

    def attrs(self) -> dict[str, str]:
        """The netCDF attributes of the variable."""
        out = {} if self.units is None else {"units": self.units}
        out["long_name"] = self.long_name
        if self.standard_name:
            out["standard_name"] = self.standard_name
        if self.calendar:
            out["calendar"] = self.calendar
        return out

    def dims_over(self, parameters: Sequence[str] = ()) -> tuple[str, ...]:
        """The dims with :data:`PARAMETERS` replaced by ``parameters`` (the swept dims)."""
        out: list[str] = []
        for dim in self.dims:
            if dim == PARAMETERS:
                out.extend(parameters)
            else:
                out.append(dim)
        return tuple(out)

    def variable(self, values, parameters: Sequence[str] = ()):
        """The row as an xarray variable holding ``values``.

        Parameters
        ----------
        values : array_like or xarray.DataArray
            The data. A DataArray (which keeps its coordinates) must already be on the row's
            dims; any other array becomes an ``xarray.Variable`` on them.
        parameters : sequence of str
            The swept dims that :data:`PARAMETERS` stands for.

        Returns
        -------
        xarray.Variable or xarray.DataArray
            With the row's attributes as its only attributes.
        """
        dims = self.dims_over(parameters)
        if isinstance(values, xr.DataArray):
            if values.dims != dims:
                raise ValueError(f"{self.long_name!r}: dims {values.dims}, the table says {dims}")
            out = values.copy(deep=False)
            out.attrs = self.attrs()
            return out
        return xr.Variable(dims, np.asarray(values), self.attrs())


# --- run files --------------------------------------------------------------------------------
MAP = ("time", "lat", "lon")
COORDINATES: dict[str, Variable] = {
    "time": Variable(("time",), TIME_UNITS, "simulated time (day 0, the start of the run, at "
                     "the nominal epoch; time_days holds the days)", "time", CALENDAR),
    DAYS_COORDINATE: Variable(("time",), "days", "simulated days since the start of the run"),
    "lat": Variable(("lat",), "degrees_north", "latitude", "latitude"),
    "lon": Variable(("lon",), "degrees_east",
                    "longitude east of the substellar meridian (grid longitude 0)", "longitude"),
}
VARIABLES: dict[str, Variable] = {
    "h": Variable(MAP, "m", "layer thickness (free-surface height where there is topography)"),
    "u": Variable(MAP, "m s-1", "eastward wind", "eastward_wind"),
    "v": Variable(MAP, "m s-1", "northward wind", "northward_wind"),
    "vorticity": Variable(MAP, "s-1", "relative vorticity", "atmosphere_relative_vorticity"),
    "divergence": Variable(MAP, "s-1", "horizontal divergence", "divergence_of_wind"),
    "surface_height": Variable(("lat", "lon"), "m", "height of the bottom topography",
                               "surface_altitude"),
}
#: The diagnostic time series (DIAGNOSTICS above).
VARIABLES.update({name: Variable(("time",), d.units, d.long_name, d.standard_name)
                  for name, d in DIAGNOSTICS.items()})

# --- phase-curve files (torrid.workflow.phase) ------------------------------------------------
_P = (PARAMETERS,)
_CURVE = (PARAMETERS, "phase")
_MAP_OFFSET = ", east positive in grid longitude"
PHASE_VARIABLES: dict[str, Variable] = {
    "phase": Variable(("phase",), "1", "orbital phase (time since mid-transit over the period; "
                                       "0: mid-transit)"),
    "flux_ratio": Variable(_CURVE, "ppm", "planet-to-star flux ratio in the band"),
    "brightness_temperature": Variable(
        _CURVE, "K", "band brightness temperature of the planet's disk-averaged intensity"),
    "sub_observer_longitude": Variable(("phase",), "degree",
                                       "sub-observer longitude east of the substellar point"),
    "time": Variable(("phase",), "days", "simulated time of each phase sample"),
    "day_temperature": Variable(("phase",), "K",
                                "day end point of the temperature map at the sample's time: "
                                "T_day (a / r)^k, the substellar equilibrium's temperature"),
    "eclipse_depth": Variable(_P, "ppm", "flux ratio at mid-eclipse"),
    "nightside_flux": Variable(_P, "ppm", "flux ratio at mid-transit"),
    "amplitude": Variable(_P, "ppm", "peak-to-peak amplitude of the curve"),
    "maximum_flux_ratio": Variable(_P, "ppm", "maximum of the flux ratio"),
    "minimum_flux_ratio": Variable(_P, "ppm", "minimum of the flux ratio"),
    "phase_of_maximum": Variable(_P, "1", "orbital phase of the maximum"),
    "phase_of_minimum": Variable(_P, "1", "orbital phase of the minimum"),
    "offset_of_maximum": Variable(_P, "degree",
                                  "(eclipse phase - phase of maximum) x 360 (east positive)"),
    "offset_of_minimum": Variable(_P, "degree", "(transit phase - phase of minimum) x 360"),
    "mean_flux_ratio": Variable(_P, "ppm", "orbit-mean flux ratio"),
    "harmonic_amplitude": Variable(_P, "ppm", "peak-to-peak amplitude of the first harmonic"),
    "harmonic_offset": Variable(_P, "degree", "(eclipse phase - phase of the first harmonic's "
                                              "maximum) x 360"),
    "phase_offset_of_maximum": Variable(
        _P, "degree", "(eclipse phase - phase of maximum) x 360, in degrees of orbital phase: "
                      "a time offset, not a longitude (time-dependent orbits)"),
    "phase_offset_of_minimum": Variable(
        _P, "degree", "(transit phase - phase of minimum) x 360, in degrees of orbital phase: "
                      "a time offset, not a longitude (time-dependent orbits)"),
    "harmonic_phase_offset": Variable(
        _P, "degree", "(eclipse phase - phase of the first harmonic's maximum) x 360, in degrees "
                      "of orbital phase: a time offset, not a longitude (time-dependent orbits)"),
    "eclipse_phase": Variable((), "1", "orbital phase of mid-eclipse"),
    "map_hotspot_offset": Variable(
        _P, "degree", f"the map's hotspot offset (equatorial maximum){_MAP_OFFSET}"),
    "map_hotspot_offset_harmonic": Variable(
        _P, "degree",
        f"the map's hotspot offset (first harmonic of the equatorial band){_MAP_OFFSET}"),
}

# --- fit files (torrid.workflow.fit) ----------------------------------------------------------
FIT_VARIABLES: dict[str, Variable] = {
    "phase": PHASE_VARIABLES["phase"],
    "observed_phase": Variable(("observation",), "1",
                               "orbital phase of each measured point (0: mid-transit)"),
    "chi_square": Variable(_P, "1", "chi-square against the observation"),
    "delta_chi_square": Variable(_P, "1", "chi-square minus its minimum"),
    "within_68": Variable(_P, None, "inside the 68.27 % joint region (delta chi-square <= 2.30)"),
    "within_95": Variable(_P, None, "inside the 95.45 % joint region (delta chi-square <= 6.18)"),
    "best_flux_ratio": Variable(("phase",), "ppm", "phase curve of the best grid point"),
    "observed_flux_ratio": Variable(("observation",), "ppm", "measured flux ratio"),
    "observed_error": Variable(("observation",), "ppm", "1-sigma error of the measured flux ratio"),
    "consistent": Variable(_P, None,
                           "reproduces the measured offset and amplitude within their errors"),
    "chi_square_fixed_temperatures": Variable(_P, "1", "chi-square against the observation with "
                                                       "the assumed temperature end points"),
    "night_temperature_fit": Variable(_P, "K", "fitted temperature of the nightside "
                                               "equilibrium thickness (profiled end point)"),
    "day_temperature_fit": Variable(_P, "K", "fitted temperature of the substellar equilibrium "
                                             "thickness (profiled end point)"),
    "shape_offset": Variable(("curve", PARAMETERS), "ppm", "fitted offset (mean level) of each "
                                                           "curve's normalised model"),
    "shape_amplitude": Variable(("curve", PARAMETERS), "ppm", "fitted peak-to-peak amplitude of "
                                                              "each curve's normalised model"),
    "best_curve_flux_ratio": Variable(("curve", "phase"), "ppm",
                                      "model phase curve of the best grid point in each band"),
    "observed_curve": Variable(("observation",), "1", "index of the measured curve each point "
                                                      "belongs to (attribute curves)"),
}

# --- sweep tables (torrid.workflow.collect) ---------------------------------------------------
#: The maps a sweep table holds with ``maps``.
SWEEP_MAPS = ("h", "u", "v")
SWEEP_VARIABLES: dict[str, Variable] = {
    "lat": COORDINATES["lat"],
    "lon": COORDINATES["lon"],
    **{name: Variable(_P, VARIABLES[name].units, f"{VARIABLES[name].long_name} (final value)")
       for name in FINAL_DIAGNOSTICS},
    "steady_state_reached": Variable(_P, "1", "1 if the run stopped at its steady state, 0 if it "
                                              "ran its days (NaN: no run)"),
    "steady_state_time_days": Variable(_P, "days",
                                       "simulated day at which the steady state was reached"),
    "averaging_window_days": Variable(_P, "days",
                                      "length of the trailing window the point's final values "
                                      "are time means over (0: its last output)"),
    "averaging_end_days": Variable(_P, "days", "simulated day at which that window ends (the "
                                               "point's last output)"),
    "hotspot_offset_reason": Variable(_P, None, "why the point's hotspot offsets are defined "
                                                "or NaN"),
    "run_status": Variable(_P, None, "status of the point: complete, steady, linear (the direct "
                                     "steady solver), failed or missing"),
    "run_status_reason": Variable(_P, None, "why the point has its status"),
    "run_file": Variable(_P, None, "the point's run file in the sweep folder (named by its "
                                   "configuration; empty for linear points, which have none)"),
    "nightside_thickness_m": Variable(_P, "m", "smallest equilibrium thickness (the nightside H; "
                                               "antistellar for the global profile)"),
    "substellar_thickness_m": Variable(_P, "m", "largest (substellar) equilibrium thickness"),
    "forcing_contrast": Variable(_P, "1", "forcing contrast dH / H"),
    **{name: Variable((PARAMETERS, "lat", "lon"), VARIABLES[name].units,
                      f"{VARIABLES[name].long_name}, at the last output",
                      VARIABLES[name].standard_name)
       for name in SWEEP_MAPS},
    "map_substellar_longitude": Variable(_P, "degree", "substellar longitude (east positive) "
                                                       "at the last output, where the maps' "
                                                       "star was (0 on circular synchronous "
                                                       "orbits)"),
}


def final_value_row(name: str) -> Variable:
    """The sweep-table row of the final value of diagnostic ``name``; a diagnostic this table
    does not know (a point file of another version) gets a row without units."""
    if name in FINAL_DIAGNOSTICS:
        return SWEEP_VARIABLES[name]
    return Variable(_P, None, f"final {name}")


#: Every table by file kind, as the README shows them.
TABLES: dict[str, dict[str, Variable]] = {
    "run": {**COORDINATES, **VARIABLES},
    "phase": PHASE_VARIABLES,
    "fit": FIT_VARIABLES,
    "sweep": SWEEP_VARIABLES,
}


def markdown_table(kind: str = "run") -> str:
    """The variable table of one file kind (a key of :data:`TABLES`) as Markdown."""
    def cell(text: str | None) -> str:
        return (text or "").replace("|", "\\|")

    rows = ["| name | dims | units | long_name | standard_name |", "|---|---|---|---|---|"]
    for name, var in TABLES[kind].items():
        rows.append(f"| `{name}` | {', '.join(var.dims) or '(scalar)'} | {cell(var.units)} | "
                    f"{cell(var.long_name)} | {cell(var.standard_name)} |")
    return "\n".join(rows)


def main(argv: Sequence[str]) -> str:
    """``python -m torrid.io.variables [KIND ...]``: the README's tables (default: all)."""
    kinds = list(argv) or list(TABLES)
    unknown = [k for k in kinds if k not in TABLES]
    if unknown:
        raise SystemExit(f"unknown file kind {unknown[0]!r}: choose from {', '.join(TABLES)}")
    if len(kinds) == 1:
        return markdown_table(kinds[0])
    return "\n\n".join(f"{kind}:\n\n{markdown_table(kind)}" for kind in kinds)


if __name__ == "__main__":
    print(main(sys.argv[1:]))
