"""``torrid run``: run a built-in standard case and write its run file."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from torrid.api import build_case_config, run
from torrid.io.config import ConfigError
from torrid.physics.cases import CASES

DEFAULT_FOLDER = Path("runs")



def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "run", help="run a model case and write its netCDF run file",
        description="Run a built-in standard case of the shallow-water core and write a "
                    "CF-1.10 netCDF run file (h, u, v, vorticity, divergence on a schedule in "
                    "simulated time, the initial state at time 0).",
        epilog="cases:\n" + "\n".join(f"  {name:22s}{spec.title}" for name, spec in CASES.items()),
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("--case", choices=list(CASES), default="williamson6", metavar="CASE",
                   help="built-in standard case (listed below; default: williamson6)")
    p.add_argument("--truncation", "-T", type=int, default=42, metavar="N",
                   help="triangular truncation T_N, e.g. 42, 85, 170 (default: 42)")
    p.add_argument("--days", type=float, default=None, metavar="D",
                   help="simulated days (default: the case's)")
    p.add_argument("--output-interval", type=float, default=None, metavar="DAYS",
                   help="days between written snapshots (default: the case's)")
    p.add_argument("--alpha", type=float, default=0.0, metavar="RADIANS",
                   help="williamson2 only: tilt of the flow's axis against the grid pole, rad (default: 0)")
    p.add_argument("--hyperdiffusion-days", type=float, default=None, metavar="DAYS",
                   help="e-folding time at the truncation scale ('inf' = off; default: the case's)")
    p.add_argument("--time-step", type=float, default=None, metavar="SECONDS",
                   help="fixed time step (default: automatic from the Courant number)")
    p.add_argument("--courant", type=float, default=1.0, metavar="C",
                   help="advective Courant number of the automatic time step (default: 1.0)")
    p.add_argument("--threads", type=int, default=1, help="transform threads (default: 1)")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="FILE.nc",
                   help="run file to write (default: runs/<case>-T<N>.nc)")
    p.add_argument("--overwrite", action="store_true", help="replace an existing run file")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress bar")
    p.set_defaults(handler=handle)


#: configuration keys set by options, so errors name the option the user typed
OPTION_FOR_KEY = {
    "numerics.truncation": "--truncation", "run.days": "--days",
    "run.output_interval_days": "--output-interval", "case.alpha_rad": "--alpha",
    "numerics.hyperdiffusion_days": "--hyperdiffusion-days", "numerics.time_step_s": "--time-step",
    "numerics.courant_number": "--courant", "numerics.threads": "--threads",
}


def handle(args: argparse.Namespace) -> int:
    try:
        config = _config(args)
    except ConfigError as err:
        message = str(err)
        for key, option in OPTION_FOR_KEY.items():
            if message.startswith(key + " "):
                message = option + message[len(key):]
        raise ConfigError(message) from None
    output = args.output or DEFAULT_FOLDER / f"{args.case}-T{args.truncation}.nc"
    ds = run(config, output, overwrite=args.overwrite, progress=not args.quiet)
    print(f"{ds.attrs['summary']} -> {output}", file=sys.stdout)
    return 0


def _config(args: argparse.Namespace):
    return build_case_config(
        args.case, truncation=args.truncation, days=args.days,
        output_interval_days=args.output_interval, alpha_rad=args.alpha,
        hyperdiffusion_days=args.hyperdiffusion_days, time_step_s=args.time_step,
        courant_number=args.courant, threads=args.threads,
    )
