"""How a local sweep worker process is started: forked from a warm sweep, or spawned afresh.

A spawned worker (``python -m torrid.workflow.sweep_worker``) pays its start before its first
point: the interpreter, the imports (xarray, scipy, numba; 0.85 s here), numba's first load
of the cached kernels (0.25 s) and xarray's first look for dask (0.2 s), about 1.3 s on this
machine, and every worker pays it again. A forked worker is a copy of the sweep process,
which has the imports already and warms the model once (:func:`warm_up`, 0.5 s): the workers
then start in milliseconds each and with their kernels loaded (issue 14).

Forking is safe only from a process with no other thread: a thread holding a lock at the
fork leaves it held forever in the child. :func:`can_fork` therefore stops tqdm's idle
monitor thread (tqdm restarts it with the next bar) and refuses if any other thread runs
(a notebook kernel has several): the pool then spawns. Only Linux forks here.

Both kinds look alike to the pool: a ``process`` with ``pid``, ``stdin`` (points in),
``stdout`` (answers out), ``poll``, ``kill`` and ``wait``, as :class:`subprocess.Popen` has.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import threading
import time
import warnings

#: Parent-side pipe ends of live forked workers (closed in every later child, so that only
#: the sweep holds a worker's input open and the worker sees end-of-file when it dies).
_PARENT_ENDS: set[int] = set()

_warm = False


def warm_up() -> None:
    """Import the model and run one tiny point into a scratch file, once per process, so that
    forked workers find numba's kernels, the transforms and the file writers loaded."""
    global _warm
    if _warm:
        return
    import tempfile

    from torrid.io.config import ModelConfig
    from torrid.workflow.driver import run_to_file

    step_s = 3600.0
    config = ModelConfig.from_dict({
        "numerics": {"truncation": 10, "time_step_s": step_s},
        "run": {"days": step_s / 86400.0, "output_interval_days": step_s / 86400.0,
                "stop_at_steady_state": False, "keep_restart": False}})
    with tempfile.TemporaryDirectory(prefix="torrid-warm-") as scratch, warnings.catch_warnings():
        warnings.simplefilter("ignore")  # a one-step run is shorter than its timescales
        run_to_file(config, os.path.join(scratch, "warm.nc"), progress=False)
    _warm = True


def _stop_tqdm_monitors() -> None:
    for thread in threading.enumerate():
        if type(thread).__name__ == "TMonitor":
            thread.exit()  # tqdm starts a new one with its next bar


def choose_start(start: str) -> str:
    """``"fork"`` or ``"spawn"`` for a pool's ``start`` (``"auto"``: fork if :func:`can_fork`
    before and after :func:`warm_up`, which also must succeed; else spawn)."""
    if start != "auto":
        return start
    if not can_fork():
        return "spawn"
    try:
        warm_up()
    except Exception:  # noqa: BLE001 - e.g. no scratch space: spawned workers need none
        return "spawn"
    return "fork" if can_fork() else "spawn"


def can_fork() -> bool:
    """Whether workers may be forked from this process: Linux, and no thread besides this
    one (tqdm's idle monitor is stopped first)."""
    if not sys.platform.startswith("linux") or not hasattr(os, "fork"):
        return False
    _stop_tqdm_monitors()
    return threading.active_count() == 1


def spawn(pass_fds: tuple[int, ...], env: dict) -> subprocess.Popen:
    """A fresh ``python -m torrid.workflow.sweep_worker`` with pipes for points and answers."""
    return subprocess.Popen([sys.executable, "-m", "torrid.workflow.sweep_worker"],
                            stdin=subprocess.PIPE, stdout=subprocess.PIPE, pass_fds=pass_fds,
                            env=env, close_fds=True)


class ForkedProcess:
    """A worker forked from this process (the :class:`subprocess.Popen` interface the pool
    uses). The child closes every other worker's pipes, restores the default signal actions
    and warning filters, keeps one thread for BLAS and serves points until its input ends."""

    def __init__(self, env: dict, serve):
        task_read, task_write = os.pipe()
        answer_read, answer_write = os.pipe()
        for stream in (sys.stdout, sys.stderr):
            if stream is not None:
                stream.flush()  # else the child would write the parent's buffered text again
        pid = os.fork()
        if pid == 0:  # the worker: never returns into the sweep's code
            try:
                for fd in _PARENT_ENDS | {task_write, answer_read}:
                    os.close(fd)
                _become_worker(env)
                serve(os.fdopen(task_read, "rb"),
                      os.fdopen(answer_write, "w", buffering=1, encoding="utf-8"))
            finally:
                os._exit(1)
        os.close(task_read)
        os.close(answer_write)
        self._ends = (task_write, answer_read)
        _PARENT_ENDS.update(self._ends)
        self.pid = pid
        self.stdin = os.fdopen(task_write, "wb")
        self.stdout = os.fdopen(answer_read, "rb")
        self.returncode: int | None = None

    def poll(self) -> int | None:
        """The exit code, or None while the worker runs."""
        if self.returncode is None:
            try:
                pid, status = os.waitpid(self.pid, os.WNOHANG)
            except ChildProcessError:  # reaped elsewhere
                pid, status = self.pid, 0
            if pid == self.pid:
                self.returncode = os.waitstatus_to_exitcode(status)
        return self.returncode

    def kill(self) -> None:
        """SIGKILL the worker (nothing if it has gone)."""
        if self.poll() is None:
            try:
                os.kill(self.pid, signal.SIGKILL)
            except ProcessLookupError:
                pass

    def wait(self, timeout: float | None = None) -> int:
        """Wait for the worker to end; :class:`subprocess.TimeoutExpired` after ``timeout`` s."""
        deadline = None if timeout is None else time.monotonic() + timeout
        while self.poll() is None:
            if deadline is not None and time.monotonic() > deadline:
                raise subprocess.TimeoutExpired("torrid sweep worker", timeout)
            time.sleep(0.005)
        return self.returncode

    def release(self) -> None:
        """The pool has closed this worker's pipes: later children need not close them."""
        _PARENT_ENDS.difference_update(self._ends)


def _become_worker(env: dict) -> None:
    """In a forked child: the worker's environment, signals and warnings, as if spawned."""
    os.environ.clear()
    os.environ.update(env)
    for signum in (signal.SIGTERM, signal.SIGHUP, signal.SIGCHLD):
        signal.signal(signum, signal.SIG_DFL)
    warnings.resetwarnings()  # the sweep's filters (a test's errors) are not the worker's
    for category in (DeprecationWarning, PendingDeprecationWarning, ImportWarning,
                     ResourceWarning):
        warnings.simplefilter("ignore", category)  # Python's default filters
    from threadpoolctl import threadpool_limits

    threadpool_limits(limits=1)  # BLAS was loaded with the sweep's thread count
