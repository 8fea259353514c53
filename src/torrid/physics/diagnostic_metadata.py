"""Metadata of a diagnostic time series (units, names, how its final value is formed).

Declared beside the code that computes each diagnostic (the core invariants, the processes);
the run-file variable table (:mod:`torrid.io.variables`) is assembled from these declarations.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Diagnostic:
    """Metadata of one diagnostic time series of a run file.

    Attributes
    ----------
    units, long_name : str
        CF ``units`` and ``long_name``.
    standard_name : str or None
        CF standard name, where CF has one.
    angle : bool
        An angle in degrees (unwrapped before time means).
    final : bool
        Reported for planet runs as ``final_<name>``: the mean over the trailing
        steady-state window.
    """

    units: str
    long_name: str
    standard_name: str | None = None
    angle: bool = False
    final: bool = True
