"""``torrid plot``: draw a run file as PNG images."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from torrid.io.runfile import is_planet_run, refuse_existing

#: The observer options that set the temperature map's end points (as in torrid phase).
TEMPERATURE_OPTIONS = (
    ("--night-temperature", "K", "--temperature: K at the nightside equilibrium thickness H "
                                 "(default: derived from the star)"),
    ("--day-temperature", "K", "--temperature: K at the substellar equilibrium thickness "
                               "(default: derived from the star)"),
    ("--star-temperature", "K", "--temperature: stellar effective temperature of the derived "
                                "end points"),
    ("--star-radius", "RSUN", "--temperature: stellar radius of the derived end points"),
    ("--semi-major-axis", "AU", "--temperature: semi-major axis of the derived end points"),
    ("--albedo", "A_B", "--temperature: Bond albedo of the derived end points"),
    ("--redistribution", "EPSILON", "--temperature: redistribution of the derived end points"),
)


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "plot", help="draw a run file (PNG maps and spin-up time series) or a sweep table",
        description="Draw a run file. For a planet run: the thickness map centred on the "
                    "substellar point with wind arrows, the substellar point and the hotspot "
                    "marked and the zonal-mean zonal wind beside it (RUN.png), and the spin-up "
                    "diagnostics against time (RUN-spinup.png). With --variable, or for a "
                    "standard case: a lon-lat map of one variable (RUN-<variable>.png). For a "
                    "sweep table (torrid sweep, torrid collect): hotspot offset, day-night "
                    "contrast and jet speed over the two main swept axes (TABLE.png) and, if "
                    "it has maps, the thickness map of every point (TABLE-maps.png); if it sweeps "
                    "numerics.solver over both solvers, linear against nonlinear "
                    "(TABLE-solvers.png).")
    p.add_argument("run_file", type=Path, metavar="RUN.nc", help="run file written by torrid run, or a sweep table")
    p.add_argument("--variable", default=None,
                   help="draw this variable as a plain map: h, u, v, vorticity, divergence "
                        "(default for standard cases: h)")
    p.add_argument("--time", type=float, default=None, metavar="DAY",
                   help="simulated day to draw (default: the last output)")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="FILE.png",
                   help="image to write (default: beside the run file, named as above)")
    p.add_argument("--temperature", action="store_true",
                   help="draw temperature instead of thickness, by the phase curves' map "
                        "(end points given below or derived from the star, as in torrid phase)")
    p.add_argument("--scale", choices=("panel", "shared"), default="panel",  # COLOUR_SCALES
                   help="sweep maps: one colour scale per panel (default) or one shared by all")
    num = dict(type=float, default=None)
    for option, metavar, text in TEMPERATURE_OPTIONS:
        p.add_argument(option, metavar=metavar, help=text, **num)
    p.add_argument("--overwrite", action="store_true", help="replace existing images")
    p.set_defaults(handler=handle, config=None)


def handle(args: argparse.Namespace) -> int:
    from torrid.interface import plots
    from torrid.interface.cli.observer_options import build_settings
    from torrid.interface.sweep_plots import is_sweep_table, plot_sweep_file
    from torrid.io.runfile import read_run

    quantity = "temperature" if args.temperature else "thickness"
    settings = build_settings(args) if args.temperature else None
    if is_sweep_table(args.run_file):  # a table of torrid sweep / torrid collect
        if args.variable or args.time is not None:
            raise ValueError(f"{args.run_file} is a sweep table: --variable and --time apply "
                             "to run files only")
        images = plot_sweep_file(args.run_file, args.output, overwrite=args.overwrite,
                                 quantity=quantity, scale=args.scale, settings=settings)
        images += _solver_comparison(args.run_file, images[0], args.overwrite)
        print(f"wrote {' and '.join(map(str, images))}", file=sys.stdout)
        return 0
    ds = read_run(args.run_file, lazy=True)
    stem = args.run_file.with_suffix("")
    if args.variable or not is_planet_run(ds):
        if args.temperature:
            raise ValueError(f"--temperature: {args.run_file} is not a planet run (or "
                             "--variable was given); temperature maps are of planet runs")
        variable = args.variable or "h"
        out = args.output or Path(f"{stem}-{variable}.png")
        plots.plot_map(ds, variable, args.time, out, overwrite=args.overwrite)
        print(f"wrote {out}", file=sys.stdout)
        return 0
    image = args.output or stem.with_suffix(".png")
    spinup = image.with_name(f"{image.stem}-spinup.png")
    refuse_existing((image, spinup), args.overwrite)
    plots.plot_planet_map(ds, image, overwrite=args.overwrite, time_days=args.time,
                          quantity=quantity, settings=settings)
    plots.plot_spinup(ds, spinup, overwrite=args.overwrite, quantity=quantity,
                      settings=settings)
    print(f"wrote {image} and {spinup}", file=sys.stdout)
    return 0


def _solver_comparison(table_path: Path, image: Path, overwrite: bool) -> list[Path]:
    """``<stem>-solvers.png`` beside the diagnostics image, for a table that sweeps
    numerics.solver over both solvers (linear against nonlinear, issue 13); else nothing."""
    import xarray as xr

    from torrid.interface.solver_plots import plot_solver_comparison, solver_dimension

    with xr.open_dataset(table_path, engine="netcdf4") as ds:
        table = ds.load()
    if solver_dimension(table) is None:
        return []
    out = image.with_name(f"{image.stem}-solvers.png")
    return [plot_solver_comparison(table, out, overwrite=overwrite)]
