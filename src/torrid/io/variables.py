"""The one table of output variables: dimensions, units, long_name and CF standard_name.

Every netCDF attribute and the variable list in the README come from :data:`VARIABLES`;
other tools rely on these names, so they are fixed.
"""

from __future__ import annotations

from dataclasses import dataclass

from torrid.physics.invariants import CORE_DIAGNOSTICS
from torrid.physics.processes import REGISTRY


@dataclass(frozen=True)
class Variable:
    """Metadata of one output variable (CF-1.10 attributes)."""

    dims: tuple[str, ...]
    units: str
    long_name: str
    standard_name: str | None = None

    def attrs(self) -> dict[str, str]:
        """The netCDF attributes of the variable."""
        out = {"units": self.units, "long_name": self.long_name}
        if self.standard_name:
            out["standard_name"] = self.standard_name
        return out


MAP = ("time", "lat", "lon")
COORDINATES: dict[str, Variable] = {
    "time": Variable(("time",), "days", "simulated time since the start of the run", "time"),
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
#: The diagnostic time series: those of every run, then those each process declares.
for _diagnostics in (CORE_DIAGNOSTICS, *(process.diagnostic_variables for process in REGISTRY)):
    VARIABLES.update({name: Variable(("time",), d.units, d.long_name, d.standard_name)
                      for name, d in _diagnostics.items()})


def markdown_table() -> str:
    """The variable table as Markdown (for the README)."""
    rows = ["| name | dims | units | long_name | standard_name |", "|---|---|---|---|---|"]
    for name, var in {**COORDINATES, **VARIABLES}.items():
        rows.append(f"| `{name}` | {', '.join(var.dims)} | {var.units} | {var.long_name} | "
                    f"{var.standard_name or ''} |")
    return "\n".join(rows)


if __name__ == "__main__":  # python -m torrid.io.variables: the README's table
    print(markdown_table())
