"""``torrid plot``: draw a run file as PNG images."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from torrid.io.runfile import is_planet_run, refuse_existing


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
    p.add_argument("--overwrite", action="store_true", help="replace existing images")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    from torrid.interface import plots
    from torrid.interface.sweep_plots import is_sweep_table, plot_sweep_file
    from torrid.io.runfile import read_run

    if is_sweep_table(args.run_file):  # a table of torrid sweep / torrid collect
        if args.variable or args.time is not None:
            raise ValueError(f"{args.run_file} is a sweep table: --variable and --time apply "
                             "to run files only")
        images = plot_sweep_file(args.run_file, args.output, overwrite=args.overwrite)
        images += _solver_comparison(args.run_file, images[0], args.overwrite)
        print(f"wrote {' and '.join(map(str, images))}", file=sys.stdout)
        return 0
    ds = read_run(args.run_file)
    stem = args.run_file.with_suffix("")
    if args.variable or not is_planet_run(ds):
        variable = args.variable or "h"
        out = args.output or Path(f"{stem}-{variable}.png")
        plots.plot_map(ds, variable, args.time, out, overwrite=args.overwrite)
        print(f"wrote {out}", file=sys.stdout)
        return 0
    image = args.output or stem.with_suffix(".png")
    spinup = image.with_name(f"{image.stem}-spinup.png")
    refuse_existing((image, spinup), args.overwrite)
    plots.plot_planet_map(ds, image, overwrite=args.overwrite, time_days=args.time)
    plots.plot_spinup(ds, spinup, overwrite=args.overwrite)
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
