"""The hostile cases of issue 12, repeated as a user would try them, as a table: case, the
expected one-line message, and what happened.

    python benchmarks/bench_hostile.py             # about 2 minutes on 2 cores
    python benchmarks/bench_hostile.py --markdown  # the table as Markdown

The full disk is a real one (a 40 MB tmpfs filled while the run writes) where this process
may mount one (root); otherwise that case is reported as skipped. Each case runs in a fresh
folder; T21 runs, a 4-point sweep.
"""

from __future__ import annotations

import argparse
import os
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

TORRID = [sys.executable, "-m", "torrid"]
BRIEF = ["--set", "numerics.truncation=21", "--set", "run.stop_at_steady_state=false",
         "-q", "--no-plot"]
SWEEP = """\
[numerics]
truncation = 21
[run]
days = 400.0
restart_interval_days = 1.0
stop_at_steady_state = false
[sweep]
name = "s"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.5, 1.0, 2.0, 4.0]
"""


def _run(argv, **kw) -> subprocess.CompletedProcess:
    return subprocess.run(argv, capture_output=True, text=True, **kw)


def _last(text: str) -> str:
    lines = [line for line in text.strip().splitlines() if line.strip()]
    return lines[-1] if lines else ""


def _verdict(proc, fragment: str) -> tuple[str, bool]:
    lines = [line for line in proc.stderr.strip().splitlines() if line.strip()]
    one = len(lines) == 1 and "Traceback" not in proc.stderr
    ok = one and fragment in lines[0] and proc.returncode != 0
    return (lines[0] if one else f"{len(lines)} lines: {_last(proc.stderr)}"), ok


def _children(pid: int) -> list[int]:
    out = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            if int(stat.read_text().rsplit(")", 1)[1].split()[1]) == pid:
                out.append(int(stat.parent.name))
        except (OSError, ValueError, IndexError):
            pass
    return out


def _alive(pid: int) -> bool:
    try:
        return Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0] != "Z"
    except OSError:
        return False


def _wait_for(predicate, seconds: float) -> bool:
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        if predicate():
            return True
        time.sleep(0.05)
    return False


def sweep_signal(tmp: Path, signum: int) -> tuple[str, bool]:
    (tmp / "s.toml").write_text(SWEEP)
    folder = tmp / "s"
    proc = subprocess.Popen([*TORRID, "sweep", str(tmp / "s.toml"), "--folder", str(folder),
                             "-j", "2", "-q"], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            text=True, start_new_session=True)
    _wait_for(lambda: len(list(folder.glob(".*.restart/state.npz"))) >= 2, 120)
    workers = _children(proc.pid)
    os.kill(proc.pid, signum)
    _, err = proc.communicate(timeout=60)
    started = time.monotonic()
    gone = _wait_for(lambda: not any(map(_alive, workers)), 10)
    after = time.monotonic() - started
    for pid in workers:
        if _alive(pid):
            os.kill(pid, signal.SIGKILL)
    lines = err.strip().splitlines()
    if signum == signal.SIGKILL:
        return (f"{len(workers)} workers gone {after:.2f} s after the sweep died" if gone
                else "workers still alive after 10 s"), gone
    text = lines[0] if len(lines) == 1 else f"{len(lines)} lines"
    return (f"{text} (rc {proc.returncode}; {len(workers)} workers gone after "
            f"{after:.2f} s)"), gone and len(lines) == 1 and proc.returncode == 128 + signum


def run_sigterm(tmp: Path) -> tuple[str, bool]:
    out = tmp / "r.nc"
    proc = subprocess.Popen([*TORRID, "run", "-o", str(out), *BRIEF, "--set", "run.days=200",
                             "--set", "run.restart_interval_days=1"], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True)
    _wait_for(lambda: (tmp / ".r.nc.restart" / "state.npz").exists(), 120)
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=60)
    tmps = list(tmp.rglob("*.tmp"))
    text = _last(err)
    ok = len(err.strip().splitlines()) == 1 and not tmps
    return f"{text} ({len(tmps)} .tmp left)", ok


def two_runs(tmp: Path) -> tuple[str, bool]:
    out = tmp / "r.nc"
    argv = [*TORRID, "run", "-o", str(out), *BRIEF, "--set", "run.days=50", "--overwrite"]
    first = subprocess.Popen(argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    _wait_for(lambda: (tmp / ".r.nc.restart" / "lock").exists(), 60)
    time.sleep(1.0)
    started = time.monotonic()
    second = _run(argv)
    took = time.monotonic() - started
    first.kill()
    first.wait()
    text, ok = _verdict(second, "another torrid run is writing this output")
    return f"{text} (after {took:.1f} s)", ok


def full_disk(tmp: Path) -> tuple[str, bool]:
    mount = tmp / "small"
    mount.mkdir()
    if os.geteuid() != 0 or _run(["mount", "-t", "tmpfs", "-o", "size=40m", "tmpfs",
                                  str(mount)]).returncode != 0:
        return "skipped (no tmpfs could be mounted)", True
    try:
        argv = [*TORRID, "run", "-o", str(mount / "r.nc"), *BRIEF, "--set", "run.days=30",
                "--set", "run.output_interval_days=0.25", "--set", "run.restart_interval_days=1"]
        proc = subprocess.Popen(argv, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        _wait_for(lambda: (mount / ".r.nc.restart" / "state.npz").exists(), 60)
        with open(mount / "filler", "wb") as fh:  # fill the disk while the run writes
            try:
                while True:
                    fh.write(b"\0" * 2**20)
            except OSError:
                pass
        _, err = proc.communicate(timeout=120)
        text, ok = _verdict(subprocess.CompletedProcess(argv, proc.returncode, "", err),
                            "the disk is full; the run is kept in its restart data")
        (mount / "filler").unlink()
        resumed = _run(argv + ["--resume"])
        return f"{text}; after freeing it, --resume: rc {resumed.returncode}", \
            ok and resumed.returncode == 0
    finally:
        _run(["umount", str(mount)])


def huge_truncation(tmp: Path) -> tuple[str, bool]:
    """Truncation 1000: refused where it cannot fit, else warned about before it starts
    (the run is then stopped here)."""
    argv = [*TORRID, "run", "-o", str(tmp / "r.nc"), *BRIEF, "--set", "numerics.truncation=1000"]
    proc = subprocess.Popen(argv, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    lines = []
    for line in proc.stderr:
        lines.append(line.strip())
        if "error" in line or len([x for x in lines if "warning" in x]) == 2:
            break
    proc.terminate()
    proc.wait()
    said = [x for x in lines if x.startswith("torrid: warning") or x.startswith("torrid: error")]
    return " / ".join(said) or "nothing said", bool(said)


def cli_case(argv_of, fragment):
    def case(tmp: Path) -> tuple[str, bool]:
        return _verdict(_run(argv_of(tmp), cwd=tmp), fragment)
    return case


def _dir_output(tmp: Path) -> list[str]:
    (tmp / "out.nc").mkdir()
    return [*TORRID, "run", "-o", str(tmp / "out.nc"), *BRIEF, "--overwrite"]


def _csv(tmp: Path, rows) -> Path:
    path = tmp / "curve.csv"
    path.write_text("phase,flux,error\n" + "\n".join(",".join(map(str, r)) for r in rows))
    return path


def _fit(tmp: Path, rows) -> list[str]:
    return [*TORRID, "fit", str(_csv(tmp, rows)), str(tmp / "missing-table.nc")]


def _renamed(tmp: Path) -> list[str]:
    _run([*TORRID, "run", "-o", str(tmp / "r.nc"), *BRIEF, "--set", "run.days=0.5",
          "--set", "run.output_interval_days=0.25"], check=True)
    import xarray as xr

    with xr.open_dataset(tmp / "r.nc") as ds:
        ds.load().rename({"lon": "longitude"}).to_netcdf(tmp / "renamed.nc")
    return [*TORRID, "plot", str(tmp / "renamed.nc")]


def _resumed_summary(tmp: Path) -> tuple[str, bool]:
    argv = [*TORRID, "run", "-o", str(tmp / "r.nc"), *BRIEF, "--set", "run.days=1",
            "--set", "run.output_interval_days=0.25"]
    _run(argv, check=True)
    again = _run(argv + ["--resume", "--overwrite"])
    line = _last(again.stdout).split("->")[0] if again.stdout else again.stderr
    line = next((x for x in again.stdout.splitlines() if "steps" in x), line)
    ok = "nothing left to run" in line and "simulated days/s" not in line
    return line.split(";")[0], ok


def _sweep_axis(tmp: Path) -> list[str]:
    (tmp / "big.toml").write_text(SWEEP.replace("values = [0.5, 1.0, 2.0, 4.0]",
                                                "log_range = [0.1, 10.0, 100000000]"))
    return [*TORRID, "sweep", str(tmp / "big.toml"), "--dry-run"]


def _sweep_large(tmp: Path) -> list[str]:
    (tmp / "big.toml").write_text(SWEEP.replace("values = [0.5, 1.0, 2.0, 4.0]",
                                                "log_range = [0.1, 10.0, 5000]"))
    return [*TORRID, "sweep", str(tmp / "big.toml"), "-q"]


def _run_with(*sets):
    def argv(tmp: Path) -> list[str]:
        out = [*TORRID, "run", "-o", str(tmp / "r.nc"), *BRIEF]
        for s in sets:
            out += ["--set", s]
        return out
    return argv


CASES = [
    ("SIGTERM of torrid sweep", "stopped by SIGTERM; rerun ... (workers stop with it)",
     lambda t: sweep_signal(t, signal.SIGTERM)),
    ("SIGHUP of torrid sweep", "stopped by SIGHUP; rerun ... (workers stop with it)",
     lambda t: sweep_signal(t, signal.SIGHUP)),
    ("kill -9 of torrid sweep", "(workers notice and stop within seconds)",
     lambda t: sweep_signal(t, signal.SIGKILL)),
    ("full disk mid-run", "the disk is full; the run is kept ... rerun with --resume",
     full_disk),
    ("output name is a directory", "it is a directory",
     cli_case(_dir_output, "it is a directory")),
    ("244-character file name", "the file name is 244 bytes long",
     cli_case(lambda t: [*TORRID, "run", "-o", str(t / ("x" * 241 + ".nc")), *BRIEF],
              "the file name is 244 bytes long")),
    ("plot of a file with renamed dimensions", "FILE: not a torrid run file (h is on ...)",
     cli_case(_renamed, "renamed.nc: not a torrid run file")),
    ("output interval 50 > days 20", "longer than run.days = 20",
     cli_case(_run_with("run.days=20", "run.output_interval_days=50"),
              "longer than run.days = 20")),
    ("steady_window_days = 1e-6", "shorter than two output intervals",
     cli_case(_run_with("run.steady_window_days=1e-6"), "shorter than two output intervals")),
    ("time_step_s = 1e-300", "the run would take ... steps; at most 1e+07",
     cli_case(_run_with("numerics.time_step_s=1e-300"), "steps; at most 1e+07")),
    ("courant_number = 1e-300", "the run would take ... steps; at most 1e+07",
     cli_case(_run_with("numerics.courant_number=1e-300"), "steps; at most 1e+07")),
    ("output interval 1e-9 days", "snapshots over ... at most 20000",
     cli_case(_run_with("run.output_interval_days=1e-9"), "are allowed")),
    ("sweep axis of 1e8 points, --dry-run", "count must be at most 100000",
     cli_case(_sweep_axis, "count must be at most 100000")),
    ("sweep of 5000 points without --yes", "more than 1000: pass --yes",
     cli_case(_sweep_large, "more than 1000: pass --yes")),
    ("radius_m = 1e308", "must be <= 1e9", cli_case(_run_with("planet.radius_m=1e308"),
                                                     "must be <= 1000000000.0")),
    ("radius_m = 1e-300", "must be >= 1e5", cli_case(_run_with("planet.radius_m=1e-300"),
                                                      "must be >= 100000.0")),
    ("truncation 1000", "memory and disk estimates: refused, or warned before it starts",
     huge_truncation),
    ("fit CSV with 40 copies of one row", "39 lines repeat a phase",
     cli_case(lambda t: _fit(t, [(0.1, 100.0, 5.0)] * 40 + [(0.5, 300, 5), (0.7, 200, 5)]),
              "39 lines repeat a phase")),
    ("fit CSV with errors of 1e-300", "below the floor of 0.001 ppm",
     cli_case(lambda t: _fit(t, [(0.1, 100.0, 1e-300), (0.5, 300, 5), (0.7, 200, 5)]),
              "below the floor of 0.001 ppm")),
    ("SIGTERM of torrid run", "stopped by SIGTERM; rerun with --resume (no .tmp left)",
     run_sigterm),
    ("two torrid run on one -o", "another torrid run is writing this output (at once)",
     two_runs),
    ("resumed run's summary", "nothing left to run (no absurd days/s)", _resumed_summary),
]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--markdown", action="store_true")
    parser.add_argument("-k", default="", help="only cases whose name contains this")
    args = parser.parse_args()
    rows = []
    for name, expected, case in CASES:
        if args.k not in name:
            continue
        with tempfile.TemporaryDirectory() as tmp:
            started = time.monotonic()
            try:
                result, ok = case(Path(tmp))
            except Exception as err:  # noqa: BLE001 - a case that breaks is a result
                result, ok = f"benchmark error: {type(err).__name__}: {err}", False
            rows.append((name, expected, result, "ok" if ok else "FAIL",
                         time.monotonic() - started))
        print(f"{rows[-1][3]:4s} {name} ({rows[-1][4]:.1f} s)", file=sys.stderr)
    if args.markdown:
        print("| case | expected one-line message | result | |")
        print("|---|---|---|---|")
        for name, expected, result, verdict, _ in rows:
            print(f"| {name} | {expected} | {result.replace('|', '/')} | {verdict} |")
    else:
        for name, expected, result, verdict, _ in rows:
            print(f"{verdict:4s} {name}\n     expected: {expected}\n     result:   {result}")
    print(f"{sum(r[3] == 'ok' for r in rows)}/{len(rows)} cases as expected")


if __name__ == "__main__":
    main()
