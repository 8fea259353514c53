"""Progress output that suits a log (issue 14): no bar updates when standard error is not a
terminal, a line per output interval at most (throttled in wall time), nothing with --quiet.

Checked against what a log reader sees: the bytes a subprocess writes to a pipe (a pipe is not
a terminal: POSIX isatty), with no carriage returns (the character tqdm redraws its bar with).
"""

import io
import subprocess
import sys

from torrid.workflow.progress import LogProgress

ARGS = ["--set", "numerics.truncation=10", "--set", "run.days=3",
        "--set", "run.output_interval_days=0.25", "--set", "run.stop_at_steady_state=false",
        "--no-plot"]


def test_one_line_per_interval_at_most():
    stream = io.StringIO()
    progress = LogProgress(total=2.0, initial=0.0, label="planet", interval_days=0.5,
                           stream=stream, min_seconds=0.0)
    for _ in range(40):  # 40 steps of 0.05 day: 4 output intervals
        progress.update(0.05)
    progress.close()
    lines = stream.getvalue().splitlines()
    assert len(lines) == 4 + 1, lines  # one per interval, and the end
    assert lines[-1].startswith("planet: day 2 of 2 (100 %)")


def test_log_of_a_run_is_sparse_and_quiet_is_silent(tmp_path):
    run = [sys.executable, "-m", "torrid", "run", "-o", str(tmp_path / "r.nc"), *ARGS]
    logged = subprocess.run(run, capture_output=True, text=True)
    assert logged.returncode == 0, logged.stderr
    assert "\r" not in logged.stderr
    lines = logged.stderr.splitlines()
    assert 1 <= len(lines) <= 13, lines  # 12 intervals at most, plus the end line
    quiet = subprocess.run(run + ["--quiet", "--overwrite"], capture_output=True, text=True)
    assert quiet.returncode == 0 and quiet.stderr == ""


def test_other_bars_redraw_rarely_in_a_log(monkeypatch):
    """tqdm redraws every 0.1 s by default (tqdm's documented ``mininterval``); in a log the
    sweep, linear-point and posterior bars take bar_options() and redraw at most every 10 s."""
    import time

    from tqdm.auto import tqdm

    from torrid.workflow.progress import bar_options

    log = io.StringIO()  # not a terminal
    monkeypatch.setattr(sys, "stderr", log)
    for _ in tqdm(range(30), file=log, **bar_options()):
        time.sleep(0.02)  # 0.6 s: six redraws at tqdm's default
    assert log.getvalue().count("\r") <= 2, log.getvalue()  # the first draw and the last
    monkeypatch.setattr(log, "isatty", lambda: True, raising=False)
    assert bar_options() == {}  # a terminal keeps tqdm's own redraws


def test_log_of_a_sweep_is_not_redrawn_each_second(tmp_path):
    """The sweep bar's clock ticks once a second on a terminal; in a log it is drawn at the
    start and the end only (points finish within tqdm's 10 s interval here)."""
    sweep = tmp_path / "s.toml"
    sweep.write_text("[numerics]\ntruncation = 10\n[run]\ndays = 40\nstop_at_steady_state = "
                     "false\noutput_interval_days = 10\n[sweep]\nname = \"s\"\n"
                     "[[sweep.axis]]\nkey = \"atmosphere.radiative_timescale_days\"\n"
                     "values = [0.5, 1.0, 2.0]\n")
    run = [sys.executable, "-m", "torrid", "sweep", str(sweep), "--folder", str(tmp_path / "s"),
           "--workers", "1"]
    logged = subprocess.run(run, capture_output=True, text=True)
    assert logged.returncode == 0, logged.stderr
    draws = logged.stderr.count("sweep: ")
    assert draws <= 3, logged.stderr  # the first draw, the last, one at most between
