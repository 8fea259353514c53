"""``torrid fit``: compare a measured phase curve with every point of a sweep table."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from torrid.io.runfile import refuse_existing

from torrid.interface.cli.observer_options import add_observer_options, build_settings


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "fit", help="fit measured phase curves with a sweep table (chi-square map, posterior)",
        description="Compare measured phase curves with the phase curve of every point of a "
                    "sweep table (built with maps: torrid collect FOLDER --maps): one CSV "
                    "(phase, flux ratio in ppm, 1-sigma error in ppm) or an observation TOML "
                    "file listing several curves ([[curve]] tables with file and band or "
                    "response), fitted jointly. Writes the chi-square over the grid, the best "
                    "point, the 68.27 and 95.45 % joint regions (delta chi-square 2.30 and 6.18, "
                    "Avni 1976), an interpolated best estimate, and a plot; with --posterior "
                    "also a posterior sample (emcee) and its corner plot.")
    p.add_argument("observed", type=Path, metavar="OBSERVATION.toml|OBSERVED.csv",
                   help="observation file (TOML, several curves) or one measured curve (CSV)")
    p.add_argument("table", type=Path, metavar="SWEEP.nc", help="sweep table with maps")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="FIT.nc",
                   help="fit result (default: beside the table, SWEEP-fit.nc; plot FIT.png)")
    add_observer_options(p)
    p.add_argument("--offset", type=float, default=None, metavar="DEG",
                   help="measured peak offset (degrees, east positive) for the simple comparison")
    p.add_argument("--offset-error", type=float, default=None, metavar="DEG",
                   help="its 1-sigma error (degrees)")
    p.add_argument("--amplitude", type=float, default=None, metavar="PPM",
                   help="measured peak-to-peak amplitude (ppm) for the simple comparison")
    p.add_argument("--amplitude-error", type=float, default=None, metavar="PPM",
                   help="its 1-sigma error (ppm)")
    p.add_argument("--temperatures", choices=("fixed", "free", "shape"), default="fixed",
                   help="temperature end points: fixed (the assumed ones), free (fitted at every "
                        "grid point within bounds) or shape (each curve normalised, its offset "
                        "and amplitude fitted)")
    p.add_argument("--posterior", type=int, default=None, metavar="STEPS",
                   help="sample the posterior between grid points for STEPS steps per walker "
                        "(emcee; settings in the observation file's [posterior] section)")
    p.add_argument("--no-progress", action="store_true", help="no progress bar")
    p.add_argument("--overwrite", action="store_true", help="replace existing output files")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    from torrid.interface.fit_plot import plot_fit
    from torrid.workflow.fit import fit_table

    settings = build_settings(args)
    output = args.output or args.table.with_name(f"{args.table.stem}-fit.nc")
    image = output.with_suffix(".png")
    joint = (args.observed.suffix.lower() == ".toml" or args.temperatures != "fixed"
             or args.posterior is not None)
    if joint:
        return _handle_joint(args, settings, output, image)
    refuse_existing((output, image), args.overwrite)
    fit = fit_table(args.observed, args.table, settings, offset_deg=args.offset,
                    offset_error_deg=args.offset_error, amplitude_ppm=args.amplitude,
                    amplitude_error_ppm=args.amplitude_error, output=output,
                    overwrite=args.overwrite)
    plot_fit(fit, image, overwrite=args.overwrite)
    print(fit_line(fit), file=sys.stdout)
    print(f"wrote {output}, {image}", file=sys.stdout)
    return 0


def fit_line(fit) -> str:
    """One line: best point, estimate, region sizes."""
    dims = list(fit["chi_square"].dims)
    best = ", ".join(f"{d} = {fit.attrs[f'best_{d}']:.4g}" for d in dims)
    est = ", ".join(f"{d} = {fit.attrs[f'estimate_{d}']:.4g}" for d in dims
                    if f"estimate_{d}" in fit.attrs)
    line = (f"best grid point {best} (chi-square {fit.attrs['chi_square_min']:.1f} for "
            f"{fit.attrs['degrees_of_freedom']} dof); {int(fit.within_68.sum())} points within "
            f"68 %, {int(fit.within_95.sum())} within 95 %")
    if "best_night_temperature_K" in fit.attrs:
        line += (f"; fitted end points T_night = {fit.attrs['best_night_temperature_K']:.0f} K, "
                 f"T_day = {fit.attrs['best_day_temperature_K']:.0f} K")
    if est:
        line += f"; interpolated estimate {est}"
    if "consistent" in fit:
        line += f"; {int(fit.consistent.sum())} points match the offset and amplitude"
    return line


def _handle_joint(args, settings, output, image) -> int:
    from torrid.interface.fit_plot import plot_fit, plot_posterior
    from torrid.io.observation import MeasuredCurve, Observation, read_observation
    from torrid.io.observed import read_observed_csv
    from torrid.workflow.joint_fit import fit_observation

    corner = output.with_name(f"{output.stem}-posterior.png")
    refuse_existing((output, image) + ((corner,) if args.posterior is not None else ()),
                    args.overwrite)
    if args.observed.suffix.lower() == ".toml":
        observation = read_observation(args.observed)
    else:
        observation = Observation(curves=(MeasuredCurve(read_observed_csv(args.observed),
                                                        settings),),
                                  settings=settings, source=str(args.observed))
    fit, posterior = fit_observation(observation, args.table, temperatures=args.temperatures,
                                     posterior_steps=args.posterior, output=output,
                                     overwrite=args.overwrite, progress=not args.no_progress)
    plot_fit(fit, image, overwrite=args.overwrite)
    print(fit_line(fit), file=sys.stdout)
    written = [str(output), str(image)]
    if posterior is not None:
        for line in posterior.summary():
            print(f"posterior: {line}", file=sys.stdout)
        plot_posterior(posterior, corner, overwrite=args.overwrite)
        written.append(str(corner))
    print(f"wrote {', '.join(written)}", file=sys.stdout)
    return 0
