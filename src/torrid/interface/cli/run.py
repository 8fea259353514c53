"""``torrid run``: run a planet (TOML file or the built-in default) or a standard case."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from torrid.api import run
from torrid.interface.headline import hotspot_phrase
from torrid.io.config import ConfigError, ModelConfig
from torrid.io.settings import setting
from torrid.io.tomlfile import load_config
from torrid.physics.cases import CASES

DEFAULT_FOLDER = Path("runs")

#: options that set configuration keys (help, type and default come from the settings
#: table; errors name the option the user typed): key -> (option, metavar, help if not the
#: table's description)
OPTIONS = {
    "numerics.truncation": ("--truncation", "N", ""),
    "run.days": ("--days", "D", ""),
    "run.output_interval_days": ("--output-interval", "DAYS", ""),
    "case.alpha_rad": ("--alpha", "RADIANS", "williamson2 only: tilt of the flow's axis "
                                             "against the grid pole"),
    "numerics.hyperdiffusion_days": ("--hyperdiffusion-days", "DAYS", ""),
    "numerics.time_step_s": ("--time-step", "SECONDS", ""),
    "numerics.courant_number": ("--courant", "C", ""),
    "numerics.threads": ("--threads", "N", ""),
    "numerics.solver": ("--solver", "NAME", ""),
    "run.initial_state": ("--initial-state", "STATE", ""),
    "run.initial_fields": ("--initial", "FIELDS.nc", "start from h, u, v in this file (any "
                                                     "lon-lat grid; a run file's last output "
                                                     "will do), fitted onto the model's "
                                                     "harmonics"),
}


def _default_text(row) -> str:
    return f"default: {row.default_description(with_unit=True)}"


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "run", help="run a hot-planet model (or a standard case) and write its run file",
        description="Run the forced shallow-water model of a tidally locked hot gas giant from "
                    "a TOML configuration file (or the built-in default planet when no file is "
                    "given), or a standard test case of the core with --case. Writes a CF-1.10 "
                    "netCDF run file (fields and diagnostics on a schedule in simulated time, "
                    "the initial state at time 0) and, for planets, a map plot beside it. "
                    "Defaults are the default planet's (torrid settings lists every key); a "
                    "--case brings its own planet, length, output interval and dissipation.",
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
    for key, (option, metavar, extra) in OPTIONS.items():
        row = setting(key)
        names = [option, *(["-T"] if option == "--truncation" else [])]
        p.add_argument(*names, type=row.kind, default=None, metavar=metavar,
                       dest=key.replace(".", "__"), help=f"{extra or row.description} "
                                                         f"({key}; {_default_text(row)})")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="FILE.nc",
                   help="run file to write (default: runs/<name>.nc)")
    p.add_argument("--overwrite", action="store_true", help="replace existing output files")
    p.add_argument("--resume", action="store_true",
                   help="continue an interrupted run from its latest restart data (kept "
                        "beside the run file; same configuration, run.days may grow)")
    p.add_argument("--no-plot", action="store_true", help="planets: skip the map plot")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress bar")
    p.set_defaults(handler=handle)


def _given(args: argparse.Namespace) -> dict[str, dict]:
    """The keys set by options, as sections of plain data."""
    out: dict[str, dict] = {}
    for key in OPTIONS:
        value = getattr(args, key.replace(".", "__"))
        if value is not None:
            section, _, name = key.partition(".")
            out.setdefault(section, {})[name] = value
    return out


def build_config(args: argparse.Namespace) -> tuple[ModelConfig, str]:
    """The configuration the options describe and a default output name for it."""
    given = _given(args)
    if args.case and args.config_file:
        raise ConfigError(f"--case {args.case} and {args.config_file}: give one or the other")
    if "case" in given and args.case != "williamson2":
        raise ConfigError(f"--alpha = {given['case']['alpha_rad']!r}: only --case williamson2 "
                          "takes a tilt angle")
    if args.case:
        config = ModelConfig.from_dict({**given, "case": {"name": args.case,
                                                          **given.get("case", {})}})
        name = f"{args.case}-T{config.numerics.truncation}"
    elif args.config_file:
        config = load_config(args.config_file).replace(**given)
        name = args.config_file.stem
    else:
        config = ModelConfig().replace(**given)
        name = "default-planet"
    for assignment in args.set:
        config = config.with_override(assignment)
    return config, name


def handle(args: argparse.Namespace) -> int:
    try:
        config, name = build_config(args)
    except ConfigError as err:
        message = str(err)
        for key, (option, _, _) in OPTIONS.items():
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
    if a.get("run_status") == "linear":
        steady = "the linear steady state (numerics.solver = linear)"
    else:
        steady = (f"steady at day {a['steady_state_time_days']:g}" if a["steady_state_reached"]
                  else "not steady by the end")
    return (f"{hotspot_phrase(a)}, day-night contrast "
            f"{a['final_day_night_contrast']:.2f}, equatorial wind "
            f"{a['final_equatorial_zonal_wind'] / 1e3:+.2f} km/s, max wind "
            f"{a['final_max_wind_speed'] / 1e3:.2f} km/s; {steady}")
