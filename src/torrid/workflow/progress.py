"""Progress of a run: a tqdm bar on a terminal, a few plain lines in a log.

On a terminal, standard error gets tqdm's bar. When standard error is not a terminal (``torrid
run > log 2>&1``, a batch job), a bar would write hundreds of carriage-return updates into the
log; instead :class:`LogProgress` writes one plain line when an output interval completes, at
most one every :data:`LOG_SECONDS` of wall time, and a last line at the end. ``--quiet``
(``progress=False``) writes nothing. Other bars (sweep points, posterior steps) take
:func:`bar_options`, which in a log lets tqdm redraw at most once every :data:`LOG_SECONDS`.
"""

from __future__ import annotations

import sys
import time

from tqdm.auto import tqdm

#: Shortest wall time (s) between two lines of :class:`LogProgress`.
LOG_SECONDS = 10.0


def bar_options() -> dict:
    """Keyword arguments for a tqdm bar: none on a terminal; when standard error is not a
    terminal, at most one redraw every :data:`LOG_SECONDS` (a log gets a few updates, not
    ten per second)."""
    return {} if sys.stderr.isatty() else {"mininterval": LOG_SECONDS}


class LogProgress:
    """tqdm's ``update``/``close`` interface, writing sparse whole lines to a stream.

    Parameters
    ----------
    total, initial : float
        Simulated days of the whole run and already done (a resumed run).
    label : str
        What runs (the line's start).
    interval_days : float
        Output interval: a line may follow each completed one.
    stream : file, optional
        Where the lines go (default: standard error).
    """

    def __init__(self, total: float, initial: float, label: str, interval_days: float,
                 stream=None, min_seconds: float = LOG_SECONDS):
        self.total, self.n, self.label = total, initial, label
        self.interval_days, self.min_seconds = interval_days, min_seconds
        self.stream = stream if stream is not None else sys.stderr
        self.start = self.last = time.perf_counter()
        self.start_days = initial
        self.next_mark = initial + interval_days
        self.lines = 0

    def _line(self, now: float) -> None:
        elapsed = now - self.start
        rate = (self.n - self.start_days) / elapsed if elapsed > 0 else 0.0
        print(f"{self.label}: day {self.n:.6g} of {self.total:g} "
              f"({100 * self.n / self.total:.0f} %), {elapsed:.0f} s, "
              f"{rate:.3g} simulated days/s", file=self.stream, flush=True)
        self.last, self.lines = now, self.lines + 1

    def update(self, days: float) -> None:
        """``days`` more simulated; a line if an output interval ended and enough time passed."""
        self.n += days
        if self.n < self.next_mark - 1e-9 * self.interval_days:
            return
        while self.next_mark <= self.n + 1e-9 * self.interval_days:
            self.next_mark += self.interval_days
        now = time.perf_counter()
        if now - self.last >= self.min_seconds:
            self._line(now)

    def close(self) -> None:
        """The last line (where the run stopped)."""
        self._line(time.perf_counter())


class Silent:
    """The reporter of ``--quiet``: nothing written, and (unlike a disabled tqdm) no tqdm
    monitor thread started, which would keep a sweep from forking its workers."""

    def update(self, days: float) -> None:
        """Nothing."""

    def close(self) -> None:
        """Nothing."""


def run_progress(total_days: float, initial_days: float, label: str, interval_days: float,
                 enabled: bool):
    """A progress reporter of a run: tqdm on a terminal, :class:`LogProgress` otherwise,
    :class:`Silent` if not ``enabled``."""
    if not enabled:
        return Silent()
    if not sys.stderr.isatty():
        return LogProgress(total_days, initial_days, label, interval_days)
    return tqdm(total=total_days, unit="day", initial=initial_days,
                desc=label, leave=False, dynamic_ncols=True,
                bar_format="{desc}: {percentage:3.0f}%|{bar}| {n:.2f}/{total:g} days "
                           "[{elapsed}<{remaining}, {rate_fmt}]")
