"""Small comma-separated numeric tables (measured curves, band responses): the shared parsing.

One row per line; blank lines and lines starting with ``#`` are skipped; a first non-blank line
that is not numeric is a header. Every problem is a one-line error naming the file and line.
"""

from __future__ import annotations

import math
import os
from pathlib import Path

from torrid.io.config import short_repr


def numeric_rows(path: str | os.PathLike, columns: int, error: type[Exception], what: str,
                 meaning: str) -> list[tuple[str, list[float]]]:
    """The rows of ``path`` as (where, values), ``where`` = "FILE, line N" for messages.

    Parameters
    ----------
    columns : int
        Numbers expected per row.
    error : exception class
        Raised (one line) for a missing or unreadable file, a non-numeric or non-finite value,
        or a row with another number of columns.
    what : str
        What the file is, for "no such ..." (e.g. "response file").
    meaning : str
        The columns' meaning, e.g. "wavelength in micron, response".
    """
    path = Path(path)
    if not path.is_file():
        raise error(f"{path}: no such {what}")
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        raise error(f"{path}: not a readable text (UTF-8) file") from None
    rows, first = [], True
    for number, line in enumerate(text.splitlines(), start=1):
        stripped = line.strip()
        if not stripped or stripped.startswith("#"):
            continue
        where = f"{path}, line {number}"
        try:
            values = [float(field) for field in stripped.split(",")]
        except ValueError:
            if first:
                first = False
                continue  # the header
            raise error(f"{where}: {short_repr(stripped)} is not {_count(columns)} numbers "
                        f"({meaning})") from None
        first = False
        if len(values) != columns:
            raise error(f"{where}: {len(values)} columns, expected {columns} ({meaning})")
        if not all(math.isfinite(v) for v in values):
            raise error(f"{where}: {short_repr(stripped)}: values must be finite numbers")
        rows.append((where, values))
    return rows


def _count(n: int) -> str:
    return {2: "two", 3: "three"}.get(n, str(n))
