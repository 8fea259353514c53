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


#: Largest measured-curve file read (bytes): a 55 MB CSV took 1.84 GB and 67 s; bin the data
#: first (a phase curve is resolved by far fewer points).
MAX_OBSERVED_BYTES = 10_000_000
#: Most points of a measured curve.
MAX_OBSERVED_POINTS = 100_000
#: Smallest 1-sigma error (ppm): no phase curve is measured to better than a part per billion
#: (common practice; the best space photometry reaches a few ppm), so smaller is a unit slip.
MIN_ERROR_PPM = 1e-3


def read_observed_csv(path: str | os.PathLike) -> ObservedCurve:
    """Read and validate a measured phase curve (format in the module docstring).

    Refused with one line: a file over :data:`MAX_OBSERVED_BYTES` or
    :data:`MAX_OBSERVED_POINTS` points, errors below :data:`MIN_ERROR_PPM`, and phases given
    twice (say how many lines repeat one).
    """
    path = Path(path)
    if path.is_file() and path.stat().st_size > MAX_OBSERVED_BYTES:
        raise ObservedDataError(f"{path}: {path.stat().st_size / 1e6:.3g} MB: a measured curve "
                                f"is read up to {MAX_OBSERVED_BYTES / 1e6:g} MB "
                                f"({MAX_OBSERVED_POINTS} points); bin it in phase first")
    rows, first_line = [], {}
    for where, values in numeric_rows(path, 3, ObservedDataError, "file",
                                      "phase, flux ratio ppm, error ppm"):
        phase, _, error = values
        if not 0 <= phase < 1:
            raise ObservedDataError(f"{where}: phase = {phase!r}: must be in [0, 1) "
                                    "(0 = mid-transit)")
        if not error > 0:
            raise ObservedDataError(f"{where}: error = {error!r}: must be > 0 ppm")
        if error < MIN_ERROR_PPM:
            raise ObservedDataError(f"{where}: error = {error!r}: below the floor of "
                                    f"{MIN_ERROR_PPM:g} ppm (no phase curve is measured that "
                                    "precisely: a unit slip?)")
        first_line.setdefault(phase, where)
        rows.append(values)
        if len(rows) > MAX_OBSERVED_POINTS:
            raise ObservedDataError(f"{path}: more than {MAX_OBSERVED_POINTS} points; bin the "
                                    "curve in phase first")
    repeats = len(rows) - len(first_line)
    if repeats:
        seen, where_again = set(), None
        for values in rows:
            if values[0] in seen:
                where_again = values[0]
                break
            seen.add(values[0])
        raise ObservedDataError(f"{path}: {repeats} lines repeat a phase given before (first "
                                f"phase {where_again!r}, {first_line[where_again]}); combine "
                                "or remove them")
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
