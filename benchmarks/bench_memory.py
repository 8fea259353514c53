"""Memory and disk of ``torrid run`` (issue 12).

1. Peak resident memory (``ru_maxrss`` of the child process, as ``/usr/bin/time -v`` reports
   it) of ``torrid run`` at T42 over the same days with 401 snapshots against 21: the
   snapshots stream to disk, so the two should agree within 20 %.
2. Disk use after a completed run at T21 and T170: the run file, its plot and the restart
   data (one state, plus the run file's second name, a hard link counted once), against one
   output snapshot of the run file.

    python benchmarks/bench_memory.py                 # T42 100 days, 2 repeats; T21, T170
    python benchmarks/bench_memory.py --repeats 3 --days 100
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
from pathlib import Path

import xarray as xr


def peak_rss_mb(argv: list[str]) -> float:
    """Run ``argv`` and return its peak resident memory (MB)."""
    proc = subprocess.Popen(argv, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    if os.waitstatus_to_exitcode(status) != 0:
        raise SystemExit(f"failed: {' '.join(argv)}: {proc.stderr.read().decode()}")
    return usage.ru_maxrss / 1024  # kB on Linux


def torrid_run(output: Path, truncation: int, days: float, interval: float,
               plot: bool = False) -> list[str]:
    argv = [sys.executable, "-m", "torrid", "run", "-o", str(output), "-q", "--overwrite",
            "--set", f"numerics.truncation={truncation}", "--set", f"run.days={days}",
            "--set", f"run.output_interval_days={interval}",
            "--set", "run.stop_at_steady_state=false"]
    return argv + ([] if plot else ["--no-plot"])


def disk_bytes(paths) -> int:
    """Bytes on disk of the files, each inode once (as du counts them)."""
    seen, total = set(), 0
    for path in paths:
        st = path.stat()
        if (st.st_dev, st.st_ino) not in seen:
            seen.add((st.st_dev, st.st_ino))
            total += st.st_blocks * 512
    return total


def memory(args) -> None:
    print(f"peak memory of torrid run at T42 over {args.days:g} days "
          f"({args.repeats} repeats, median):")
    results = {}
    with tempfile.TemporaryDirectory() as tmp:
        for snapshots in (21, 401):
            interval = args.days / (snapshots - 1)
            runs = [peak_rss_mb(torrid_run(Path(tmp) / f"m{snapshots}.nc", 42, args.days,
                                           interval)) for _ in range(args.repeats)]
            results[snapshots] = statistics.median(runs)
            print(f"  {snapshots:4d} snapshots: {results[snapshots]:7.1f} MB "
                  f"(runs: {', '.join(f'{r:.1f}' for r in runs)})")
    ratio = results[401] / results[21]
    print(f"  ratio 401/21: {ratio:.3f} ({'within' if abs(ratio - 1) <= 0.2 else 'NOT within'}"
          " 20 %)")


def disk(args) -> None:
    print("disk after a completed run (one day, output every 0.25 days, with its plot):")
    print(f"  {'run':5s} {'run file':>10s} {'plot':>9s} {'restart':>9s} {'one snapshot':>13s} "
          f"{'total (du)':>11s}  restart folder")
    with tempfile.TemporaryDirectory() as tmp:
        for truncation in (21, 170):
            folder = Path(tmp) / f"T{truncation}"
            out = folder / "run.nc"
            subprocess.run(torrid_run(out, truncation, 1.0, 0.25, plot=True), check=True,
                           stdout=subprocess.DEVNULL)
            restart = folder / f".{out.name}.restart"
            state = restart / "state.npz"
            with xr.open_dataset(out) as ds:
                count = ds.sizes["time"]
                snapshot = sum(ds[n].isel(time=0).nbytes for n in ds.data_vars
                               if "time" in ds[n].dims)
            share = out.stat().st_blocks * 512 / count  # one snapshot's share of the file
            everything = [p for p in folder.rglob("*") if p.is_file()]
            names = sorted(p.name for p in restart.iterdir())
            print(f"  T{truncation:<4d} {disk_bytes([out]) / 1e6:8.2f} MB "
                  f"{disk_bytes([out.with_suffix('.png')]) / 1e6:7.3f} MB "
                  f"{disk_bytes([state]) / 1e6:7.3f} MB "
                  f"{snapshot / 1e6:7.3f} MB raw, {share / 1e6:.3f} MB in file "
                  f"{disk_bytes(everything) / 1e6:8.2f} MB  {', '.join(names)}")
            if state.stat().st_size > min(snapshot, share):
                print(f"    the restart state is LARGER than one snapshot")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=2)
    parser.add_argument("--days", type=float, default=100.0)
    parser.add_argument("--skip-memory", action="store_true")
    args = parser.parse_args()
    if not args.skip_memory:
        memory(args)
    disk(args)


if __name__ == "__main__":
    main()
