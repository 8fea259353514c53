"""Atomic file writing: write under a temporary name in the destination folder, then rename.

A reader never sees a half-written file under the final name; a failed or killed write leaves
at most a hidden ``.NAME.*.tmp`` file, never a file that looks complete.
"""

from __future__ import annotations

import contextlib
import os
import signal
import threading
import tempfile
from pathlib import Path


#: The signals that stop a command (SIGTERM, SIGHUP): held back while a library writes.
_STOP_SIGNALS = {getattr(signal, name) for name in ("SIGTERM", "SIGHUP") if hasattr(signal, name)}


@contextlib.contextmanager
def signals_held():
    """Hold SIGTERM and SIGHUP back for the block; one that came meanwhile is handed to its
    handler at the block's end. xarray writes netCDF under a global lock that is not
    reentrant: a stop signal's exception raised inside ``to_netcdf`` reaches the writer's own
    clean-up, which takes that lock again and waits for ever (seen: about one SIGTERM of
    ``torrid run`` in seven). Only the main thread may set handlers; elsewhere nothing is held."""
    if threading.current_thread() is not threading.main_thread() or not _STOP_SIGNALS:
        yield
        return
    pending: list[int] = []
    saved = {sig: signal.signal(sig, lambda signum, frame: pending.append(signum))
             for sig in _STOP_SIGNALS}
    try:
        yield
    finally:
        for sig, handler in saved.items():
            signal.signal(sig, handler)
        if pending:
            handler = saved[pending[0]]
            if callable(handler):
                handler(pending[0], None)
            elif handler != signal.SIG_IGN:
                os.kill(os.getpid(), pending[0])


@contextlib.contextmanager
def atomic_path(path: str | os.PathLike, suffix: str = ".tmp"):
    """Yield a temporary path beside ``path``; on success rename it to ``path``.

    The file gets ordinary permissions (0666 minus the umask), not mkstemp's private ones.
    On an exception the temporary file is removed and the exception propagates.
    """
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=suffix, dir=path.parent)
    os.close(fd)
    tmp = Path(tmp)
    try:
        yield tmp
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    finally:
        tmp.unlink(missing_ok=True)


def write_text(path: str | os.PathLike, text: str) -> Path:
    """Write ``text`` (UTF-8) to ``path`` atomically."""
    with atomic_path(path) as tmp:
        tmp.write_text(text, encoding="utf-8")
    return Path(path)


def try_lock(path: str | os.PathLike):
    """Open ``path`` (created if missing) and take an exclusive ``flock`` on it without
    waiting. Returns the open file (the lock lasts while it, or any process that inherited
    it, is open), None if another process holds the lock, or ``False`` where the platform
    has no POSIX locks."""
    try:
        import fcntl
    except ImportError:
        return False
    handle = open(path, "a")
    try:
        fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        handle.close()
        return None
    return handle
