"""Long-lived local sweep workers, owned by the sweep that started them.

Each worker is one process that stays alive across points: forked from the warm sweep, or
a spawned ``python -m torrid.workflow.sweep_worker`` that imports the model once
(:mod:`torrid.workflow.worker_process` says which and why). It takes points from the sweep
(one JSON line each on a pipe) and answers with one JSON line per point on another; its own
fd 1 points at standard error, so nothing the model prints can mix into the answers. The
per-point cost is then the run alone, not a process start, the imports and the numba cache
load.

The sweep owns its workers:

* **the parent's death is noticed at once.** A watcher thread reads the worker's input; when the sweep dies by any means, even kill -9, the pipe's write end closes, the
  read returns end-of-file and the worker exits immediately (``os._exit``), whatever point it
  is running. A check of ``os.getppid()`` every :data:`PARENT_POLL_S` seconds backs this up.
  The point is left as a kill leaves it: its restart data are whole (written atomically), so
  the next sweep continues it bit for bit.
* **the folder lock covers live workers.** The sweep's lock file descriptor is inherited by
  every worker (by the fork, or ``pass_fds``): an ``flock`` belongs to the open file, so the folder stays locked
  until the last worker has gone, and a sweep started at once cannot run a point twice.
* **stopping the sweep stops them.** :meth:`WorkerPool.close` kills the workers; SIGINT is
  ignored in workers (the sweep stops them itself).
"""

from __future__ import annotations

import concurrent.futures as cf
import json
import os
import queue
import signal
import subprocess
import sys
import threading
import time
from collections import deque

from torrid.workflow import worker_process

#: Seconds between checks that the parent is still alive (besides the pipe's end-of-file).
PARENT_POLL_S = 0.5


class PointError(RuntimeError):
    """An unexpected error in a point, raised in a worker; ``kind`` is its exception type."""

    def __init__(self, kind: str, message: str):
        super().__init__(message)
        self.kind = kind


class WorkerDied(RuntimeError):
    """A worker process ended while running a point (killed, out of memory)."""


def _watch_parent(tasks_in, tasks: queue.Queue) -> None:
    """Read points from the sweep; exit the process when the sweep is gone."""
    for line in iter(tasks_in.readline, b""):
        tasks.put(line)
    os._exit(0)  # end-of-file: the sweep closed the pipe or died (even by kill -9)


def _poll_parent(parent: int) -> None:
    while True:
        time.sleep(PARENT_POLL_S)
        if os.getppid() != parent:
            os._exit(0)


def serve(tasks_in, answers) -> None:
    """The worker's main loop (see the module docstring): points as JSON lines from the
    binary stream ``tasks_in``, answers as JSON lines to the text stream ``answers``."""
    from torrid.workflow.sweep_task import limit_threads

    limit_threads()
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    sys.stdout.flush()
    os.dup2(2, 1)  # anything printed by the model goes to standard error
    tasks: queue.Queue = queue.Queue()
    threading.Thread(target=_watch_parent, args=(tasks_in, tasks), daemon=True).start()
    threading.Thread(target=_poll_parent, args=(os.getppid(),), daemon=True).start()

    from tqdm import tqdm

    tqdm.set_lock(threading.RLock())  # no inter-process semaphore left behind by a kill
    from torrid.workflow.sweep_task import run_point

    answers.write(json.dumps({"ready": os.getpid()}) + "\n")
    while True:
        task = json.loads(tasks.get())
        try:
            answer = {"result": run_point(task["config"], task["path"])}
        except Exception as err:  # noqa: BLE001 - reported by the sweep, retried next time
            answer = {"error": type(err).__name__,
                      "message": str(err).splitlines()[0] if str(err) else ""}
        answers.write(json.dumps(answer) + "\n")


def serve_spawned() -> None:
    """A spawned worker: points on standard input, answers on a private copy of fd 1."""
    serve(sys.stdin.buffer, os.fdopen(os.dup(1), "w", buffering=1, encoding="utf-8"))


class _Worker:
    """One worker process and the thread that feeds it points from the pool's queue
    (started by :meth:`start`, once every worker of the pool has its process)."""

    def __init__(self, pool: "WorkerPool", process):
        self.process = process
        self.pool = pool
        self.thread = threading.Thread(target=self._feed, daemon=True)

    def start(self) -> None:
        """Feed this worker."""
        self.thread.start()

    def _answer(self) -> dict | None:
        line = self.process.stdout.readline()
        return json.loads(line) if line else None

    def _feed(self) -> None:
        if self._answer() is None:  # died while starting
            self.pool._worker_gone(None)
            return
        while True:
            job = self.pool._next_job()
            if job is None:
                return
            future, config_json, path = job
            if not future.set_running_or_notify_cancel():
                continue
            try:
                self.process.stdin.write((json.dumps({"config": config_json, "path": path})
                                          + "\n").encode())
                self.process.stdin.flush()
                answer = self._answer()
            except (OSError, ValueError):
                answer = None
            if answer is None:
                future.set_exception(WorkerDied(f"worker {self.process.pid} died running "
                                                f"{path}"))
                self.pool._worker_gone(self)
                return
            if "error" in answer:
                future.set_exception(PointError(answer["error"], answer["message"]))
            else:
                future.set_result(answer["result"])


class WorkerPool:
    """``workers`` long-lived worker processes fed points in order; an executor-like
    ``submit(run_point, config_json, path)`` returns a :class:`concurrent.futures.Future` of the
    point's result (:func:`torrid.workflow.sweep_task.run_point`).

    ``lock_fd`` is inherited by every worker (the sweep folder's lock, see the module
    docstring). Workers start with one thread each (``env`` has the thread limits).
    ``start`` is how: ``"fork"`` from this process once warmed, ``"spawn"`` a fresh
    interpreter each, or ``"auto"``: fork where that is safe
    (:func:`torrid.workflow.worker_process.can_fork`), else spawn. :attr:`start` says which.
    """

    def __init__(self, workers: int, lock_fd: int | None = None, env: dict | None = None,
                 start: str = "auto"):
        if start not in ("auto", "fork", "spawn"):
            raise ValueError(f"start = {start!r}: must be 'auto', 'fork' or 'spawn'")
        self._jobs: deque = deque()
        self._lock = threading.Condition()
        self._closed = False
        env = dict(os.environ if env is None else env)
        self.start = start = worker_process.choose_start(start)
        if start == "fork":
            worker_process.warm_up()
            processes = [worker_process.ForkedProcess(env, serve) for _ in range(workers)]
        else:
            fds = () if lock_fd is None else (lock_fd,)
            processes = [worker_process.spawn(fds, env) for _ in range(workers)]
        self._workers = [_Worker(self, process) for process in processes]
        for worker in self._workers:
            worker.start()

    @property
    def pids(self) -> list[int]:
        """Process ids of the workers."""
        return [w.process.pid for w in self._workers]

    def submit(self, task, config_json: str, path: str) -> cf.Future:
        """Queue one point; ``task`` must be :func:`~torrid.workflow.sweep_task.run_point`
        (the signature of ``Executor.submit``, as the dask path uses it)."""
        if task.__name__ != "run_point":
            raise TypeError(f"WorkerPool runs sweep points only, not {task!r}")
        future: cf.Future = cf.Future()
        with self._lock:
            self._jobs.append((future, config_json, path))
            self._lock.notify()
        return future

    def _next_job(self):
        with self._lock:
            while not self._jobs and not self._closed:
                self._lock.wait()
            return None if self._closed else self._jobs.popleft()

    def _worker_gone(self, worker) -> None:
        """A worker died: if none is left, fail what is still queued."""
        with self._lock:
            alive = [w for w in self._workers if w.process.poll() is None and w is not worker]
            if not alive:
                while self._jobs:
                    future = self._jobs.popleft()[0]
                    if future.set_running_or_notify_cancel():
                        future.set_exception(WorkerDied("no worker process left"))

    def close(self, kill: bool = False) -> None:
        """Stop the workers: at once (``kill``), or by closing their input once the queue is
        empty (they then exit by themselves)."""
        with self._lock:
            self._closed = True
            self._lock.notify_all()
            for future, _, _ in self._jobs:
                future.cancel()
            self._jobs.clear()
        for worker in self._workers:
            if kill:
                worker.process.kill()
            else:
                try:
                    worker.process.stdin.close()
                except OSError:
                    pass
        for worker in self._workers:
            try:
                worker.process.wait(timeout=None if kill else 30)
            except subprocess.TimeoutExpired:
                worker.process.kill()
                worker.process.wait()
            for stream in (worker.process.stdin, worker.process.stdout):
                try:
                    stream.close()
                except OSError:
                    pass
            if hasattr(worker.process, "release"):
                worker.process.release()


if __name__ == "__main__":
    serve_spawned()
