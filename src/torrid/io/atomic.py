"""Atomic file writing: write under a temporary name in the destination folder, then rename.

A reader never sees a half-written file under the final name; a failed or killed write leaves
at most a hidden ``.NAME.*.tmp`` file, never a file that looks complete.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path


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
