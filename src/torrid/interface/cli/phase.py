"""``torrid phase``: thermal phase curve of a run file (netCDF + PNG, optionally CSV)."""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

from torrid.io.runfile import refuse_existing

from torrid.interface.cli.observer_options import add_observer_options, build_settings



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
    add_observer_options(p)
    p.add_argument("--csv", action="store_true", help="also write the curve as CSV (OUT.csv)")
    p.add_argument("--overwrite", action="store_true", help="replace existing output files")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    from torrid.interface.phase_plot import plot_phase_curve
    from torrid.io.phasefile import write_phase_csv, write_phase_netcdf
    from torrid.io.runfile import read_run
    from torrid.workflow.phase import phase_curve

    settings = build_settings(args)
    output = args.output or args.run_file.with_name(f"{args.run_file.stem}-phase.nc")
    image = output.with_suffix(".png")
    table = output.with_suffix(".csv") if args.csv else None
    refuse_existing((output, image, table), args.overwrite)
    ds = read_run(args.run_file, lazy=True)
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


def _map_hotspot(pc) -> str:
    """Both hotspot measures of the map (its final values), or "undefined" where the map is
    too flat for a hotspot (NaN in the run)."""
    harmonic, maximum = float(pc.map_hotspot_offset_harmonic), float(pc.map_hotspot_offset)
    if not (math.isfinite(harmonic) or math.isfinite(maximum)):
        return "map hotspot undefined (the map is too flat: see the run's hotspot_offset_reason)"
    return (f"map hotspot {harmonic:+.1f} deg (first harmonic), {maximum:+.1f} deg "
            "(equatorial maximum)")


def summary_line(pc) -> str:
    """One line of the headline numbers of a (single) phase curve: the curve's peak and its
    first harmonic beside both hotspot measures of the map (its equatorial maximum and the
    first harmonic of the equatorial band, which is what the curve follows)."""
    timed = "phase_offset_of_maximum" in pc  # a time-dependent orbit: offsets in phase
    peak = float(pc["phase_offset_of_maximum" if timed else "offset_of_maximum"])
    harmonic = float(pc["harmonic_phase_offset" if timed else "harmonic_offset"])
    unit = "deg of phase" if timed else "deg"
    return (f"eclipse depth {float(pc.eclipse_depth):.1f} ppm, nightside "
            f"{float(pc.nightside_flux):.1f} ppm, amplitude {float(pc.amplitude):.1f} ppm; "
            f"curve peak at phase {float(pc.phase_of_maximum):.3f} (offset {peak:+.1f} {unit}, "
            f"first harmonic {harmonic:+.1f} {unit}); {_map_hotspot(pc)}; {pc.attrs['band']}, "
            f"T_night {pc.attrs['night_temperature_K']:.0f} K, T_day "
            f"{pc.attrs['day_temperature_K']:.0f} K")
