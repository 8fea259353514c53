"""``torrid demo``: the whole chain on a small invented scenario (a few minutes)."""

from __future__ import annotations

import argparse
from pathlib import Path


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "demo", help="run the whole chain on a small invented scenario (a few minutes)",
        description="Run the whole chain on an invented hot gas giant at low resolution: a "
                    "4 x 4 sweep of radiative x drag timescale to steady state, the sweep table "
                    "and its plots, the phase curves of every point, an invented observation "
                    "made from one grid point plus noise, and its fit. Rerunning keeps the "
                    "finished runs; --overwrite redoes the derived files.")
    p.add_argument("--folder", type=Path, default=Path("runs/demo"),
                   help="where everything goes (default: runs/demo)")
    p.add_argument("--workers", type=int, default=None,
                   help="worker processes for the sweep (default: all cores)")
    p.add_argument("--overwrite", action="store_true",
                   help="redo the table, plots, phase curves, observation and fit")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress bar")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    from torrid.interface.demo import run_demo

    files = run_demo(args.folder, workers=args.workers, overwrite=args.overwrite,
                     progress=not args.quiet)
    return 0 if files["recovered"] else 1
