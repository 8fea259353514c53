"""``torrid collect``: the sweep table of a sweep folder (one xarray Dataset, netCDF)."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "collect", help="build the sweep table of a sweep folder",
        description="Build the sweep table of a sweep folder (written by torrid sweep): one "
                    "netCDF file whose dimensions are the swept parameters (named after the key "
                    "after the dot, e.g. radiative_timescale_days) with the final diagnostics of "
                    "every point (hotspot_offset, day_night_contrast, equatorial_zonal_wind, "
                    "...), steady_state_reached, steady_state_time_days, run_status, "
                    "run_status_reason and run_file. Points without a run file yet appear as "
                    "missing (NaN), except linear ones (numerics.solver = linear), which are "
                    "solved here (milliseconds each); failed points have their reason and NaN diagnostics. Open "
                    "it with xarray.open_dataset; draw it with torrid plot.")
    p.add_argument("folder", type=Path, metavar="FOLDER", help="the sweep folder")
    p.add_argument("-o", "--output", type=Path, default=None, metavar="FILE.nc",
                   help="table to write (default: FOLDER/<name>-table.nc)")
    p.add_argument("--maps", action="store_true",
                   help="add the final h, u, v maps of every point (dimensions ..., lat, lon)")
    p.add_argument("--overwrite", action="store_true", help="replace an existing table")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    from torrid.io.runfile import check_writable
    from torrid.io.sweepmanifest import read_manifest
    from torrid.workflow.collect import collect_sweep, table_path, write_table

    manifest = read_manifest(args.folder)
    output = args.output or table_path(args.folder, manifest["torrid_sweep"])
    check_writable(output, args.overwrite)  # refuse before reading every point
    table = collect_sweep(args.folder, maps=args.maps, progress=True)
    write_table(table, output, overwrite=args.overwrite)
    status = table["run_status"].values.ravel()
    for reason, state in zip(table["run_status_reason"].values.ravel(), status):
        if state == "missing" and ("unreadable" in reason or "no valid" in reason
                                   or "another configuration" in reason):
            print(f"torrid collect: {args.folder}/{reason}; shown as missing (rerun the sweep "
                  "to redo the point)", file=sys.stderr)
    a = table.attrs
    print(f"sweep {a['torrid_sweep']}: {a['points_total']} points: "
          f"{a['points_complete'] + a['points_steady'] + a['points_linear']} done, "
          f"{a['points_failed']} failed, "
          f"{a['points_missing']} missing -> {output}", file=sys.stdout)
    return 0
