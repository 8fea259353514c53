"""Operating-system errors in plain words, and the checks that can be made before a run.

Every failure to write is reported once, when it happens, as one line naming the path, the
cause (the disk is full, permission denied, the name is too long, is a directory) and what
recovers the work: :class:`StorageError`, raised from the ``OSError`` (or the netCDF
library's ``RuntimeError: NetCDF: HDF error``, which does not say why) by :func:`storage`.
"""

from __future__ import annotations

import contextlib
import errno
import os
import shutil
from pathlib import Path

#: Below this free space (bytes) a failed netCDF write is put down to a full disk.
FULL_DISK_BYTES = 16 * 2**20

#: Characters that the restart folder and temporary files add to an output's name
#: (``.NAME.restart``, ``.NAME.XXXXXXXX.tmp``).
NAME_OVERHEAD = len("..restart") + len(".XXXXXXXX.tmp")


class StorageError(OSError):
    """A file could not be written or read (one line: path, cause, what recovers the work)."""


def _existing_parent(path: Path) -> Path:
    path = Path(path).absolute()
    while not path.exists() and path != path.parent:
        path = path.parent
    return path


def free_bytes(path: str | os.PathLike) -> int:
    """Free bytes on the file system of ``path`` (its nearest existing folder)."""
    return shutil.disk_usage(_existing_parent(Path(path))).free


def cause(err: BaseException, path: str | os.PathLike) -> str:
    """The cause of ``err`` (on ``path``) in plain words."""
    code = getattr(err, "errno", None)
    words = {
        errno.ENOSPC: "the disk is full",
        errno.EDQUOT: "the disk quota is used up",
        errno.EACCES: "permission denied",
        errno.EPERM: "permission denied",
        errno.EROFS: "the file system is read-only",
        errno.ENAMETOOLONG: "the file name is too long",
        errno.EISDIR: "it is a directory",
        errno.ENOTDIR: "a part of the path is not a directory",
        errno.ENOENT: "the folder does not exist (removed meanwhile?)",
    }
    if code in words:
        return words[code]
    if free_bytes(path) < FULL_DISK_BYTES:
        return "the disk is full"
    folder = _existing_parent(Path(path).parent)
    if not os.access(folder, os.W_OK):
        return f"permission denied (the folder {folder} is not writable)"
    text = str(err).strip().splitlines()[0] if str(err).strip() else type(err).__name__
    return f"the write failed ({text})"


@contextlib.contextmanager
def storage(path: str | os.PathLike, recovery: str):
    """Turn an OS or netCDF write error inside the block into one :class:`StorageError`
    line: ``<path>: <cause>; <recovery>``."""
    try:
        yield
    except StorageError:
        raise
    except (OSError, RuntimeError) as err:
        if isinstance(err, RuntimeError) and "NetCDF" not in str(err) and "HDF" not in str(err):
            raise
        raise StorageError(f"{path}: {cause(err, path)}; {recovery}") from None


def name_limit(folder: str | os.PathLike) -> int:
    """Longest file name (bytes) the file system of ``folder`` takes."""
    try:
        return os.pathconf(_existing_parent(Path(folder)), "PC_NAME_MAX")
    except (OSError, ValueError, AttributeError):
        return 255


def check_output_path(path: str | os.PathLike, option: str = "-o") -> Path:
    """Before any work: the output's name is legal here (with room for the restart folder's
    and temporary files' additions), it is not a directory and its folder can be made and
    written. Returns the Path; raises :class:`StorageError` (one line)."""
    path = Path(path)
    if path.is_dir():
        raise StorageError(f"{option} {path}: it is a directory; give a file name (e.g. "
                           f"{path / 'run.nc'})")
    limit = name_limit(path.parent) - NAME_OVERHEAD
    length = len(path.name.encode())
    if length > limit:
        raise StorageError(f"{option} {path.name[:40]}...: the file name is {length} bytes "
                           f"long; at most {limit} fit here (the file system takes "
                           f"{limit + NAME_OVERHEAD}, the restart folder adds {NAME_OVERHEAD})")
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise StorageError(f"{option} {path}: cannot make the folder {path.parent}: "
                           f"{cause(err, path.parent)}") from None
    if not os.access(path.parent, os.W_OK):
        raise StorageError(f"{option} {path}: permission denied: the folder {path.parent} is "
                           "not writable; choose another folder")
    return path


def check_free_space(path: str | os.PathLike, needed_bytes: float, what: str) -> None:
    """Refuse (one line) if the estimated ``needed_bytes`` do not fit on the disk of ``path``."""
    free = free_bytes(path)
    if needed_bytes > free:
        raise StorageError(f"{path}: {what} need about {format_bytes(needed_bytes)}, but only "
                           f"{format_bytes(free)} are free there; free space, choose another "
                           "folder, or write fewer snapshots (run.output_interval_days)")


def format_bytes(count: float) -> str:
    """``1.2 GB``-style size (powers of 1000)."""
    for unit in ("bytes", "kB", "MB", "GB", "TB"):
        if abs(count) < 1000 or unit == "TB":
            return f"{count:.0f} {unit}" if unit == "bytes" else f"{count:.3g} {unit}"
        count /= 1000
    return f"{count:.3g} TB"
