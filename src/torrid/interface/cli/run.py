"""``torrid run``: run a planet (TOML file or the built-in default) or a standard case."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from torrid.api import build_case_config, run
from torrid.io.config import ConfigError, ModelConfig
from torrid.io.tomlfile import load_config
from torrid.physics.cases import CASES

DEFAULT_FOLDER = Path("runs")

#: options that set configuration keys, so that errors name the option the user typed
OPTION_FOR_KEY = {
    "numerics.truncation": "--truncation", "run.days": "--days",
    "run.output_interval_days": "--output-interval", "case.alpha_rad": "--alpha",
    "numerics.hyperdiffusion_days": "--hyperdiffusion-days", "numerics.time_step_s": "--time-step",
    "numerics.courant_number": "--courant", "numerics.threads": "--threads",
    "run.initial_fields": "--initial",
}


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "run", help="run a hot-planet model (or a standard case) and write its run file",
        description="Run the forced shallow-water model of a tidally locked hot gas giant from "
                    "a TOML configuration file (or the built-in default planet when no file is "
                    "given), or a standard test case of the core with --case. Writes a CF-1.10 "
                    "netCDF run file (fields and diagnostics on a schedule in simulated time, "
                    "the initial state at time 0) and, for planets, a map plot beside it.",
        epilog="cases (--case):\n" + "\n".join(f"  {name:22s}{spec.title}"
                                               for name, spec in CASES.items()),
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("config_file", nargs="?", type=Path, metavar="FILE.toml",
                   help="planet configuration (default: the built-in default planet)")
    p.add_argument("--set", action="append", default=[], metavar="SECTION.KEY=VALUE",
                   help="override one configuration key, e.g. --set "
                        "atmosphere.drag_timescale_days=10 (repeatable)")
    p.add_argument("--case", choices=list(CASES), default=None, metavar="CASE",
                   help="run a built-in standard case instead of a planet (listed below)")
    p.add_argument("--truncation", "-T", type=int, default=None, metavar="N",
                   help="triangular truncation T_N, e.g. 42, 85, 170 (default: 42)")
    p.add_argument("--days", type=float, default=None, metavar="D",
                   help="simulated days; for planets the upper bound of a run that stops at "
                        "steady state (default: the file's or the case's)")
    p.add_argument("--output-interval", type=float, default=None, metavar="DAYS",
                   help="days between written snapshots (default: the file's or the case's)")
    p.add_argument("--alpha", type=float, default=None, metavar="RADIANS",
                   help="williamson2 only: tilt of the flow's axis against the grid pole, rad")
    p.add_argument("--hyperdiffusion-days", type=float, default=None, metavar="DAYS",
                   help="e-folding time at the truncation scale ('inf' = off)")
    p.add_argument("--time-step", type=float, default=None, metavar="SECONDS",
                   help="fixed time step (default: automatic from the Courant number)")
    p.add_argument("--courant", type=float, default=None, metavar="C",
                   help="advective Courant number of the automatic time step (default: 1.0)")
    p.add_argument("--threads", type=int, default=None, help="transform threads (default: 1)")
    p.add_argument("--initial", default=None, metavar="FIELDS.nc",
                   help="start from h, u, v in this file (any lon-lat grid; a run file's last "
                        "output will do), fitted onto the model's harmonics")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="FILE.nc",
                   help="run file to write (default: runs/<name>.nc)")
    p.add_argument("--overwrite", action="store_true", help="replace existing output files")
    p.add_argument("--resume", action="store_true",
                   help="continue an interrupted run from its latest restart data (kept "
                        "beside the run file; same configuration, run.days may grow)")
    p.add_argument("--no-plot", action="store_true", help="planets: skip the map plot")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress bar")
    p.set_defaults(handler=handle)


def build_config(args: argparse.Namespace) -> tuple[ModelConfig, str]:
    """The configuration the options describe and a default output name for it."""
    if args.case and args.config_file:
        raise ConfigError(f"--case {args.case} and {args.config_file}: give one or the other")
    if args.alpha is not None and args.case != "williamson2":
        raise ConfigError(f"--alpha = {args.alpha!r}: only --case williamson2 takes a tilt angle")
    if args.case:
        config = build_case_config(args.case, truncation=args.truncation or 42, days=args.days,
                                   output_interval_days=args.output_interval,
                                   alpha_rad=args.alpha or 0.0)
        name = f"{args.case}-T{config.numerics.truncation}"
    elif args.config_file:
        config = load_config(args.config_file)
        name = args.config_file.stem
    else:
        config = ModelConfig()
        name = "default-planet"
    numerics = {"truncation": args.truncation, "hyperdiffusion_days": args.hyperdiffusion_days,
                "time_step_s": args.time_step, "courant_number": args.courant,
                "threads": args.threads}
    run_keys = {"days": args.days, "output_interval_days": args.output_interval,
                "initial_fields": args.initial}
    config = config.replace(numerics={k: v for k, v in numerics.items() if v is not None},
                            run={k: v for k, v in run_keys.items() if v is not None})
    for assignment in args.set:
        config = config.with_override(assignment)
    return config, name


def handle(args: argparse.Namespace) -> int:
    try:
        config, name = build_config(args)
    except ConfigError as err:
        message = str(err)
        for key, option in OPTION_FOR_KEY.items():
            if message.startswith(key + " "):
                message = option + message[len(key):]
        raise ConfigError(message) from None
    output = args.output or DEFAULT_FOLDER / f"{name}.nc"
    image = output.with_suffix(".png")
    if config.is_planet and not args.no_plot and image.exists() and not args.overwrite:
        raise FileExistsError(f"{image} exists: choose another name or pass --overwrite")
    ds = run(config, output, overwrite=args.overwrite, progress=not args.quiet,
             resume=args.resume)
    print(f"{ds.attrs['summary']} -> {output}", file=sys.stdout)
    if config.is_planet:
        print(planet_line(ds), file=sys.stdout)
        if not args.no_plot:
            from torrid.interface.plots import plot_planet_map

            plot_planet_map(ds, image, overwrite=args.overwrite)
            print(f"map: {image}", file=sys.stdout)
    return 0


def planet_line(ds) -> str:
    """One line of the headline numbers of a planet run."""
    a = ds.attrs
    steady = (f"steady at day {a['steady_state_time_days']:g}" if a["steady_state_reached"]
              else "not steady by the end")
    return (f"hotspot {a['final_hotspot_offset']:+.1f} deg (harmonic "
            f"{a['final_hotspot_offset_harmonic']:+.1f}), day-night contrast "
            f"{a['final_day_night_contrast']:.2f}, equatorial wind "
            f"{a['final_equatorial_zonal_wind'] / 1e3:+.2f} km/s, max wind "
            f"{a['final_max_wind_speed'] / 1e3:.2f} km/s; {steady}")
