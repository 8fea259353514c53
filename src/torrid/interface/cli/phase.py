"""``torrid phase``: thermal phase curve of a run file (netCDF + PNG, optionally CSV)."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from torrid.io.observer import DEFAULT_BAND_UM, KEYS, ObserverError, ObserverSettings

#: settings keys -> the option that sets them (error messages name what the user typed)
OPTION_FOR_KEY = {key: "--" + key.replace("_", "-") for key in KEYS}
OPTION_FOR_KEY.update(weighting="--photon/--energy")

_D = ObserverSettings()


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "phase", help="thermal phase curve of a run file (flux ratio against orbital phase)",
        description="Turn a planet run file into what a telescope sees: the planet-to-star flux "
                    "ratio in a band against orbital phase (0 = mid-transit, 0.5 = mid-eclipse), "
                    "its brightness temperature, and the headline numbers (eclipse depth, "
                    "nightside flux, amplitude, peak offset). Writes a netCDF file and a PNG "
                    "plot beside it (and a CSV with --csv). The thickness map becomes a "
                    "temperature map by the affine map h = H -> night temperature, "
                    "h = H (1 + dH/H) -> day (substellar) temperature; both are derived from "
                    "the star (Cowan & Agol 2011) unless given. Settings can also come from "
                    "the [observer] section of a TOML file (keys as the options, with "
                    "underscores); options on the command line override the file.")
    p.add_argument("run_file", type=Path, metavar="RUN.nc", help="run file written by torrid run")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="OUT.nc",
                   help="phase-curve file (default: beside the run, RUN-phase.nc); the plot "
                        "is OUT.png, the CSV OUT.csv")
    p.add_argument("--config", type=Path, default=None, metavar="FILE.toml",
                   help="read the settings from the [observer] section of this TOML file")
    num = dict(type=float, default=None)
    p.add_argument("--star-temperature", metavar="K", **num,
                   help=f"stellar effective temperature, K (default {_D.star_temperature:g})")
    p.add_argument("--star-radius", metavar="RSUN", **num,
                   help=f"stellar radius, solar radii (default {_D.star_radius:g})")
    p.add_argument("--radius-ratio", metavar="RP/RS", **num,
                   help=f"planet-to-star radius ratio (default {_D.radius_ratio:g})")
    p.add_argument("--semi-major-axis", metavar="AU", **num,
                   help=f"semi-major axis, AU (default {_D.semi_major_axis:g})")
    p.add_argument("--inclination", metavar="DEG", **num,
                   help=f"orbital inclination, degrees (default {_D.inclination:g}: edge-on)")
    band = p.add_mutually_exclusive_group()
    band.add_argument("--band", default=None, metavar="LO-HI",
                      help=f"top-hat band, micron (default {DEFAULT_BAND_UM[0]:g}-"
                           f"{DEFAULT_BAND_UM[1]:g})")
    band.add_argument("--response", default=None, metavar="FILE.csv",
                      help="band response: two-column CSV, wavelength (micron), response")
    p.add_argument("--night-temperature", metavar="K", **num,
                   help="temperature of the nightside equilibrium thickness H, K "
                        "(default: derived from the star)")
    p.add_argument("--day-temperature", metavar="K", **num,
                   help="temperature of the substellar equilibrium thickness H (1 + dH/H), K "
                        "(default: derived from the star)")
    p.add_argument("--albedo", metavar="A_B", **num,
                   help=f"Bond albedo of the derived temperatures (default {_D.albedo:g})")
    p.add_argument("--redistribution", metavar="EPSILON", **num,
                   help="heat redistribution efficiency of the derived temperatures, 0-1 "
                        f"(default {_D.redistribution:g})")
    weight = p.add_mutually_exclusive_group()
    weight.add_argument("--photon", dest="weighting", action="store_const", const="photon",
                        default=None, help="photon-counting band integral (the default)")
    weight.add_argument("--energy", dest="weighting", action="store_const", const="energy",
                        help="energy-weighted band integral")
    p.add_argument("--argument-of-periastron", metavar="DEG", **num,
                   help=f"eccentric orbits: argument of periastron, degrees (default "
                        f"{_D.argument_of_periastron:g}: transit at periastron)")
    p.add_argument("--phases", type=int, default=None, metavar="N",
                   help=f"number of orbital phases sampled (default {_D.phases})")
    p.add_argument("--csv", action="store_true", help="also write the curve as CSV (OUT.csv)")
    p.add_argument("--overwrite", action="store_true", help="replace existing output files")
    p.set_defaults(handler=handle)


def build_settings(args: argparse.Namespace) -> ObserverSettings:
    """The settings of the TOML file (if any) with the command-line options on top."""
    from torrid.io.observer import read_observer_toml

    values = read_observer_toml(args.config) if args.config else {}
    given = {key: getattr(args, key) for key in KEYS if getattr(args, key, None) is not None}
    if "band" in given or "response" in given:  # the command line's choice wins over the file's
        values.pop("band", None)
        values.pop("response", None)
    values.update(given)
    try:
        return ObserverSettings(**values)
    except ObserverError as err:
        message = str(err)
        for key in sorted(KEYS, key=len, reverse=True):
            if message.startswith(key + " ") and key in given:
                message = OPTION_FOR_KEY[key] + message[len(key):]
                break
        raise ObserverError(message) from None


def handle(args: argparse.Namespace) -> int:
    from torrid.interface.phase_plot import plot_phase_curve
    from torrid.io.phasefile import write_phase_csv, write_phase_netcdf
    from torrid.io.runfile import read_run
    from torrid.workflow.phase import phase_curve

    settings = build_settings(args)
    output = args.output or args.run_file.with_name(f"{args.run_file.stem}-phase.nc")
    image = output.with_suffix(".png")
    table = output.with_suffix(".csv") if args.csv else None
    for path in (output, image, table):  # refuse before any work
        if path is not None and path.exists() and not args.overwrite:
            raise FileExistsError(f"{path} exists: choose another name or pass --overwrite")
    ds = read_run(args.run_file)
    pc = phase_curve(ds, settings, source=str(args.run_file))
    write_phase_netcdf(pc, output, overwrite=args.overwrite)
    plot_phase_curve(pc, image, overwrite=args.overwrite)
    written = [str(output), str(image)]
    if table is not None:
        write_phase_csv(pc, table, overwrite=args.overwrite)
        written.append(str(table))
    print(summary_line(pc), file=sys.stdout)
    print(f"wrote {', '.join(written)}", file=sys.stdout)
    return 0


def summary_line(pc) -> str:
    """One line of the headline numbers of a (single) phase curve."""
    return (f"eclipse depth {float(pc.eclipse_depth):.1f} ppm, nightside "
            f"{float(pc.nightside_flux):.1f} ppm, amplitude {float(pc.amplitude):.1f} ppm; peak at phase "
            f"{float(pc.phase_of_maximum):.3f} (offset {float(pc.offset_of_maximum):+.1f} deg; "
            f"map hotspot {float(pc.map_hotspot_offset):+.1f} deg); {pc.attrs['band']}, "
            f"T_night {pc.attrs['night_temperature_K']:.0f} K, T_day "
            f"{pc.attrs['day_temperature_K']:.0f} K")
