"""Linear against nonlinear: the sweep examples/linear_vs_nonlinear.toml and its comparison plot.

Runs the sweep (radiative x drag timescale, each point with the time-stepped model and the
direct linear steady solver; resumable like any sweep), then draws the hotspot offset and the
two contrasts of both solvers over the grid, and the linear value against the nonlinear one
(the image in the README), and prints the hotspot offsets side by side.

    python examples/linear_vs_nonlinear.py                       # T21, a few minutes on 2 cores
    python examples/linear_vs_nonlinear.py -T 10 --days 2 --values 2 --folder /tmp/try
"""

from __future__ import annotations

import argparse
from pathlib import Path

import torrid
from torrid.interface.solver_plots import plot_solver_comparison
from torrid.io.settings import toml_value
from torrid.io.tomltext import loads

SWEEP = Path(__file__).with_suffix(".toml")


def sweep_text(truncation: int | None, days: float | None, values: int | None) -> str:
    """The example sweep file, with the brief settings of the options applied."""
    data = loads(SWEEP.read_text())
    if truncation is not None:
        data["numerics"]["truncation"] = truncation
    if days is not None:
        data["run"]["days"] = days
    if values is not None:
        for axis in data["sweep"]["axis"]:
            if "log_range" in axis:
                lo, hi, _ = axis.pop("log_range")
                axis["log_range"] = [lo, hi, values]
            elif axis["key"] != "numerics.solver":
                axis["values"] = axis["values"][:values]
    return to_toml(data)


def to_toml(data: dict) -> str:
    """A sweep file's plain data (sections of keys, [sweep] with its [[sweep.axis]]) as TOML."""
    def value(v):
        return "[" + ", ".join(map(toml_value, v)) + "]" if isinstance(v, list) else toml_value(v)

    lines = []
    for section, keys in data.items():
        lines.append(f"[{section}]")
        lines += [f"{k} = {value(v)}" for k, v in keys.items() if k != "axis"]
        for axis in keys.get("axis", []) if section == "sweep" else []:
            lines.append("[[sweep.axis]]")
            lines += [f"{k} = {value(v)}" for k, v in axis.items()]
    return "\n".join(lines) + "\n"


def main(argv=None) -> Path:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("-T", "--truncation", type=int, default=None)
    parser.add_argument("--days", type=float, default=None, help="upper bound of each run")
    parser.add_argument("--values", type=int, default=None,
                        help="values per timescale axis (default: the file's)")
    parser.add_argument("--folder", type=Path, default=Path("runs") / "linear-vs-nonlinear")
    parser.add_argument("--workers", type=int, default=None)
    args = parser.parse_args(argv)
    args.folder.mkdir(parents=True, exist_ok=True)
    sweep_file = args.folder / SWEEP.name
    sweep_file.write_text(sweep_text(args.truncation, args.days, args.values))
    table = torrid.sweep(sweep_file, folder=args.folder, workers=args.workers)
    image = plot_solver_comparison(table, args.folder / "linear-vs-nonlinear.png",
                                   overwrite=True)
    offsets = table.hotspot_offset
    print("hotspot offset (degrees east), time-stepped / linear:")
    for tau_rad in offsets.radiative_timescale_days.values:
        row = offsets.sel(radiative_timescale_days=tau_rad)
        cells = [f"{float(row.sel(drag_timescale_days=d, solver='stepping')):+6.1f} / "
                 f"{float(row.sel(drag_timescale_days=d, solver='linear')):+6.1f}"
                 for d in row.drag_timescale_days.values]
        print(f"  tau_rad {tau_rad:6g} d: " + "   ".join(cells))
    print(f"wrote {image}")
    return image


if __name__ == "__main__":
    main()
