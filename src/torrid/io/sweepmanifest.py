"""The sweep manifest ``<folder>/sweep.json``: what a sweep folder holds.

Written by the sweep runner when a sweep starts (before any point runs), read by
``torrid collect``. It lists the sweep's dimensions (name, keys, values, spacing) and every
point: its identifier and file name, its index along each dimension, its parameter values and,
if its configuration does not validate, the error. The folder can be moved: file names are
relative to it. JSON with ``Infinity`` for infinite values (Python's json reads it).
"""

from __future__ import annotations

import json
import os
from pathlib import Path

from torrid.io.atomic import write_text
from torrid.io.sweepspec import SweepPoint, SweepSpec
from torrid.meta import __version__

MANIFEST_NAME = "sweep.json"
FORMAT = 1


class SweepFolderError(ValueError):
    """A folder given as a sweep folder has no readable manifest (one-line message)."""


def manifest_data(spec: SweepSpec, points: list[SweepPoint]) -> dict:
    """The manifest of ``spec`` with its generated ``points``, as JSON-safe data."""
    return {
        "torrid_sweep": spec.name,
        "format": FORMAT,
        "torrid_version": __version__,
        "source": str(spec.source) if spec.source else None,
        "base_configuration": spec.base,
        "dimensions": [{"name": d.name, "zip": d.zip,
                        "axes": [{"key": a.key, "name": a.name, "values": list(a.values),
                                  "spacing": a.spacing} for a in d.axes]}
                       for d in spec.dimensions],
        "points": [{"id": p.identifier, "file": p.file_name, "index": list(p.index),
                    "parameters": p.parameters, "configuration_error": p.error}
                   for p in points],
    }


def write_manifest(folder: str | os.PathLike, data: dict) -> Path:
    """Write the manifest ``data`` into ``folder``.

    An existing manifest of the same sweep name is replaced (a sweep file that gained values
    reuses the points it already has: their file names do not change); one of another sweep
    is refused, so two sweeps never share a folder.
    """
    path = Path(folder) / MANIFEST_NAME
    if path.is_file():
        try:
            old = read_manifest(folder)
        except SweepFolderError:
            old = None
        if old is not None and old.get("torrid_sweep") != data["torrid_sweep"]:
            raise SweepFolderError(f"{folder} holds the sweep {old.get('torrid_sweep')!r} "
                                   f"({MANIFEST_NAME}), not {data['torrid_sweep']!r}: give "
                                   "this sweep its own folder (sweep.folder or --folder)")
    return write_text(path, json.dumps(data, indent=1, allow_nan=True) + "\n")


def read_manifest(folder: str | os.PathLike) -> dict:
    """The manifest of the sweep folder ``folder`` (one-line SweepFolderError if none)."""
    folder = Path(folder)
    path = folder / MANIFEST_NAME
    if not folder.is_dir():
        raise SweepFolderError(f"{folder}: no such sweep folder")
    if not path.is_file():
        raise SweepFolderError(f"{folder}: no {MANIFEST_NAME}, so not a sweep folder "
                               "(torrid sweep writes it when a sweep starts)")
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
        ok = isinstance(data, dict) and {"torrid_sweep", "dimensions", "points"} <= set(data)
    except (OSError, UnicodeDecodeError, ValueError) as err:
        raise SweepFolderError(f"{path}: unreadable sweep manifest "
                               f"({type(err).__name__})") from None
    if not ok:
        raise SweepFolderError(f"{path}: not a torrid sweep manifest")
    return data
