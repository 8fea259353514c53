"""Measured phase curves: a CSV file of orbital phase, flux ratio (ppm) and its 1-sigma error.

Format: three comma-separated numeric columns per line (phase in [0, 1) with 0 = mid-transit,
planet-to-star flux ratio in ppm, its 1-sigma error in ppm > 0). A first line that is not
numeric is taken as a header; blank lines and lines starting with ``#`` are skipped.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from torrid.io.atomic import write_text
from torrid.io.csvtable import numeric_rows


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
    rows = []
    for where, values in numeric_rows(path, 3, ObservedDataError, "file",
                                      "phase, flux ratio ppm, error ppm"):
        phase, _, error = values
        if not 0 <= phase < 1:
            raise ObservedDataError(f"{where}: phase = {phase!r}: must be in [0, 1) "
                                    "(0 = mid-transit)")
        if not error > 0:
            raise ObservedDataError(f"{where}: error = {error!r}: must be > 0 ppm")
        rows.append(values)
    if len(rows) < 3:
        raise ObservedDataError(f"{path}: {len(rows)} data lines: need at least 3")
    data = np.array(rows)
    return ObservedCurve(phase=data[:, 0], flux_ratio_ppm=data[:, 1], error_ppm=data[:, 2],
                         source=str(path))


def write_observed_csv(curve: ObservedCurve, path: str | os.PathLike) -> Path:
    """Write a curve in the format :func:`read_observed_csv` reads (atomically)."""
    lines = [f"# {curve.source}", "phase,flux_ratio_ppm,error_ppm"]
    lines += [",".join(f"{v:.10g}" for v in row)
              for row in zip(curve.phase, curve.flux_ratio_ppm, curve.error_ppm)]
    return write_text(path, "\n".join(lines) + "\n")
