"""Measured phase curves: a CSV file of orbital phase, flux ratio (ppm) and its 1-sigma error.

Format: three comma-separated numeric columns per line (phase in [0, 1) with 0 = mid-transit,
planet-to-star flux ratio in ppm, its 1-sigma error in ppm > 0). A first line that is not
numeric is taken as a header; blank lines and lines starting with ``#`` are skipped.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np


class ObservedDataError(ValueError):
    """A measured phase-curve file that cannot be used (one-line message naming file and line)."""


@dataclass(frozen=True, eq=False)
class ObservedCurve:
    """A measured phase curve.

    Attributes
    ----------
    phase : ndarray
        Orbital phase (0 = mid-transit, 0.5 = mid-eclipse), in [0, 1).
    flux_ratio_ppm, error_ppm : ndarray
        Planet-to-star flux ratio and its 1-sigma error (ppm).
    source : str
        Where it came from (file name), for messages and attributes.
    """

    phase: np.ndarray
    flux_ratio_ppm: np.ndarray
    error_ppm: np.ndarray
    source: str = "observation"


def read_observed_csv(path: str | os.PathLike) -> ObservedCurve:
    """Read and validate a measured phase curve (format in the module docstring)."""
    path = Path(path)
    if not path.is_file():
        raise ObservedDataError(f"{path}: no such file")
    try:
        text = path.read_text(encoding="utf-8")
    except (UnicodeDecodeError, OSError) as err:
        raise ObservedDataError(f"{path}: not a readable text file ({type(err).__name__})") from None
    rows = []
    for number, line in enumerate(text.splitlines(), start=1):
        stripped = line.strip()
        if not stripped or stripped.startswith("#"):
            continue
        fields = [f.strip() for f in stripped.split(",")]
        try:
            values = [float(f) for f in fields]
        except ValueError:
            if not rows and number == _first_content_line(text):
                continue  # a header
            raise ObservedDataError(f"{path}, line {number}: {_short(stripped)!r}: expected three "
                                    "numbers (phase, flux ratio ppm, error ppm)") from None
        if len(values) != 3:
            raise ObservedDataError(f"{path}, line {number}: {len(values)} columns: expected 3 "
                                    "(phase, flux ratio ppm, error ppm)")
        phase, flux, error = values
        if not all(math.isfinite(v) for v in values):
            raise ObservedDataError(f"{path}, line {number}: non-finite value in {_short(stripped)!r}")
        if not 0 <= phase < 1:
            raise ObservedDataError(f"{path}, line {number}: phase = {phase!r}: must be in [0, 1) "
                                    "(0 = mid-transit)")
        if not error > 0:
            raise ObservedDataError(f"{path}, line {number}: error = {error!r}: must be > 0 ppm")
        rows.append(values)
    if len(rows) < 3:
        raise ObservedDataError(f"{path}: {len(rows)} data lines: need at least 3")
    data = np.array(rows)
    return ObservedCurve(phase=data[:, 0], flux_ratio_ppm=data[:, 1], error_ppm=data[:, 2],
                         source=str(path))


def write_observed_csv(curve: ObservedCurve, path: str | os.PathLike) -> Path:
    """Write a curve in the format :func:`read_observed_csv` reads (atomically)."""
    import tempfile

    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    with os.fdopen(fd, "w") as fh:
        fh.write(f"# {curve.source}\n")
        fh.write("phase,flux_ratio_ppm,error_ppm\n")
        for row in zip(curve.phase, curve.flux_ratio_ppm, curve.error_ppm):
            fh.write(",".join(f"{v:.10g}" for v in row) + "\n")
    os.replace(tmp, path)
    return path


def _first_content_line(text: str) -> int:
    for number, line in enumerate(text.splitlines(), start=1):
        if line.strip() and not line.strip().startswith("#"):
            return number
    return 0


def _short(text: str) -> str:
    return text if len(text) <= 40 else text[:37] + "..."
