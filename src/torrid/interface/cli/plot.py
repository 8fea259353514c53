"""``torrid plot``: draw a map of a run file as a PNG."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("plot", help="draw a map of a run file (PNG)",
                       description="Draw a lon-lat map of one variable of a run file.")
    p.add_argument("run_file", type=Path, metavar="RUN.nc", help="run file written by torrid run")
    p.add_argument("--variable", default="h", help="variable to draw: h, u, v, vorticity, divergence (default: h)")
    p.add_argument("--time", type=float, default=None, metavar="DAY",
                   help="simulated day to draw (default: the last output)")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="FILE.png",
                   help="image to write (default: RUN-<variable>.png beside the run file)")
    p.add_argument("--overwrite", action="store_true", help="replace an existing image")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    from torrid.interface.plots import plot_map
    from torrid.io.runfile import read_run

    ds = read_run(args.run_file)
    out = args.output or args.run_file.with_name(f"{args.run_file.stem}-{args.variable}.png")
    plot_map(ds, args.variable, args.time, out, overwrite=args.overwrite)
    print(f"wrote {out}", file=sys.stdout)
    return 0
