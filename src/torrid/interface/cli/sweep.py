"""``torrid sweep``: run every point of a sweep file, resumably, locally or on a dask cluster."""

from __future__ import annotations

import argparse
import sys
import textwrap
from pathlib import Path

MAX_FAILURES_SHOWN = 5


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "sweep", help="run a parameter sweep (every point to its run file) and its table",
        description=textwrap.fill(
            "Run every point of a sweep file: its base configuration with each "
                    "combination of the values of its [[sweep.axis]] tables (zipped axes "
                    "advance together). Each point's run file goes into the sweep folder, named "
                    "point-<12 hex digits>.nc after its configuration, so the same configuration "
                    "always has the same file. Rerunning resumes: only points without a usable "
                    "file run (a point that failed is a result and is rerun only with "
                    "--retry-failed; a point killed mid-run continues from its restart data). "
                    "Points whose configuration is invalid are recorded as failed with the "
                    "reason, and a point that blows up does not stop the others. At the end "
                    "the sweep table <folder>/<name>-table.nc is rebuilt from the folder "
                    "(always replaced: it is derived from the point files, which are never "
                    "replaced); 'torrid collect FOLDER' rebuilds it on its own.", width=79),
        epilog="sweep file: the sections of a run file as the base configuration, and\n"
               "  [sweep]\n"
               "  name = \"grid\"              # optional, default: the file's stem\n"
               "  folder = \"runs/grid\"       # optional, default: runs/<name>\n"
               "  [[sweep.axis]]\n"
               "  key = \"atmosphere.radiative_timescale_days\"\n"
               "  log_range = [0.1, 10.0, 5]  # or values = [...], or range = [start, stop, n]\n"
               "  zip = \"g\"                  # optional: axes of one group advance together\n"
               "\ncluster: start 'dask scheduler' on one machine, and on each machine\n"
               "(torrid installed, the sweep folder on a file system all of them share)\n"
               "  dask worker tcp://HOST:8786 --nthreads 1      # one per core\n"
               "then: torrid sweep FILE.toml --scheduler tcp://HOST:8786",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("sweep_file", type=Path, metavar="FILE.toml", help="the sweep file")
    where = p.add_mutually_exclusive_group()
    where.add_argument("--workers", "-j", type=int, default=None, metavar="N",
                       help="local worker processes, one thread each (default: all cores)")
    where.add_argument("--scheduler", default=None, metavar="ADDRESS",
                       help="run on the dask.distributed cluster of this scheduler instead "
                            "(e.g. tcp://host:8786; needs the optional extra torrid[dist])")
    p.add_argument("--folder", type=Path, default=None, metavar="DIR",
                   help="sweep folder (default: the file's sweep.folder, else runs/<name>)")
    p.add_argument("--retry-failed", action="store_true",
                   help="also rerun points recorded as failed (blown-up runs)")
    p.add_argument("--maps", action="store_true",
                   help="put the final h, u, v maps of every point into the table")
    p.add_argument("--dry-run", action="store_true",
                   help="check the file and list what would run, without running anything")
    p.add_argument("--yes", action="store_true",
                   help="run a sweep of more than 1000 points (refused without it)")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress bar")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    from torrid.io.sweepfile import load_sweep
    from torrid.workflow.limits import MAX_SWEEP_POINTS
    from torrid.workflow.sweep import SweepError, plan_sweep, point_count, run_sweep

    spec = load_sweep(args.sweep_file, folder=args.folder)
    shape = " x ".join(f"{d.size} {d.name}" for d in spec.dimensions)
    if args.dry_run and point_count(spec) > MAX_SWEEP_POINTS:
        print(f"sweep {spec.name}: {point_count(spec)} points ({shape}) in {spec.folder}; "
              f"more than {MAX_SWEEP_POINTS}, so counted only, not built (running them "
              "needs --yes)", file=sys.stdout)
        return 0
    if args.dry_run:
        plan = plan_sweep(spec, spec.folder, args.retry_failed)
        invalid = [p for p in plan.points if p.config is None]
        print(f"sweep {spec.name}: {len(plan.points)} points ({shape}) in {spec.folder}; "
              f"{len(plan.to_run)} to run, {len(plan.linear)} linear (solved with the table), "
              f"{len(plan.results) - len(invalid)} done or failed, "
              f"{len(invalid)} with an invalid configuration", file=sys.stdout)
        for point in invalid[:MAX_FAILURES_SHOWN]:
            print(f"  invalid: {point.file_name}: {point.error}", file=sys.stdout)
        return 0
    outcome = run_sweep(spec, workers=args.workers, scheduler=args.scheduler,
                        retry_failed=args.retry_failed, maps=args.maps,
                        progress=not args.quiet, yes=args.yes)
    c = outcome.counts
    print(f"sweep {spec.name}: {sum(c.values())} points ({shape}): "
          f"{c['complete'] + c['steady'] + c['linear']} done ({c['steady']} steady, "
          f"{c['linear']} linear), {c['failed']} failed, "
          f"{c['missing']} missing; ran {outcome.ran} now, {outcome.skipped} had results "
          f"-> {outcome.table_path}", file=sys.stdout)
    for name, reason in outcome.failures[:MAX_FAILURES_SHOWN]:
        print(f"  failed: {name}: {reason}", file=sys.stdout)
    if len(outcome.failures) > MAX_FAILURES_SHOWN:
        print(f"  ... and {len(outcome.failures) - MAX_FAILURES_SHOWN} more failed (see "
              "run_status_reason in the table)", file=sys.stdout)
    if outcome.errors:
        raise SweepError(f"{len(outcome.errors)} points raised errors and wrote nothing (rerun "
                         f"to retry them); first: {outcome.errors[0]}")
    return 0
