"""The files of a sweep's points: a stable name per configuration, and what a file holds.

Every point of a sweep is one run file in the sweep's folder, named after its configuration:
``point-<first 12 hex digits of the SHA-256 of the canonical JSON of the configuration>.nc``.
The canonical JSON is :func:`canonical_json` of ``ModelConfig.to_dict()`` (of the merged plain
data for a configuration that does not validate), so the same configuration always gets the
same name, on any machine, in any sweep.

A point's file is one of:

* a run file written by :func:`torrid.run` (``run_status`` ``complete``, ``steady``,
  ``linear`` (the direct steady solver) or ``failed``, the last when the run blew up);
* a small record file without data, written for a configuration that does not validate
  (``run_status = "failed"`` and the validation error as ``run_status_reason``).

:func:`read_point` tells which, and whether the file is usable at all.
"""

from __future__ import annotations

import hashlib
import json
import os
from dataclasses import dataclass, field
from pathlib import Path

import xarray as xr

from torrid.io.provenance import provenance_attrs
from torrid.io.runfile import write_atomic

#: The status of a linear run (``numerics.solver = "linear"``: the steady state solved directly).
LINEAR = "linear"
#: Statuses of a finished run; ``failed`` is a result too (recorded, not rerun by default).
FINISHED = ("complete", "steady", LINEAR)
FAILED = "failed"
MISSING = "missing"
#: Every status a point of a sweep table may have.
STATUSES = (*FINISHED, FAILED, MISSING)
IDENTIFIER_LENGTH = 12


def canonical_json(data: dict) -> str:
    """Key-sorted, compact JSON (``inf`` as ``Infinity``): the text that is hashed."""
    return json.dumps(data, sort_keys=True, separators=(",", ":"), allow_nan=True)


def config_identifier(data: dict) -> str:
    """The stable identifier of a configuration given as plain data (12 hex digits)."""
    digest = hashlib.sha256(canonical_json(data).encode("utf-8")).hexdigest()
    return digest[:IDENTIFIER_LENGTH]


def point_file_name(identifier: str) -> str:
    """File name of the point with ``identifier`` (``point-<identifier>.nc``)."""
    return f"point-{identifier}.nc"


@dataclass(frozen=True)
class PointResult:
    """What a point's file says (``status`` is ``missing`` when there is no usable file).

    Attributes
    ----------
    status : str
        ``complete``, ``steady``, ``linear``, ``failed`` or ``missing``.
    reason : str
        The run's ``run_status_reason``, or why the file is not usable.
    attrs : dict
        The file's global attributes (empty when missing).
    """

    status: str
    reason: str
    attrs: dict = field(default_factory=dict)

    @property
    def is_result(self) -> bool:
        """True for a recorded result (finished or failed), False for a point still to run."""
        return self.status != MISSING


def read_point(path: str | os.PathLike, identifier: str) -> PointResult:
    """Read the status of the point file ``path`` without raising.

    A file that does not exist, does not open, has no valid ``run_status`` or holds another
    configuration than ``identifier`` gives status ``missing`` with the reason.
    """
    path = Path(path)
    if not path.is_file():
        return PointResult(MISSING, "no run file yet")
    try:
        with xr.open_dataset(path, engine="netcdf4") as ds:
            attrs = dict(ds.attrs)
    except Exception as err:  # noqa: BLE001 - any reader failure means "not usable"
        return PointResult(MISSING, f"{path.name} is unreadable ({type(err).__name__})")
    status = attrs.get("run_status")
    if status not in (*FINISHED, FAILED):
        return PointResult(MISSING, f"{path.name} has no valid run_status ({status!r})")
    try:
        found = config_identifier(json.loads(attrs["configuration_json"]))
    except (KeyError, TypeError, ValueError):
        return PointResult(MISSING, f"{path.name} has no readable configuration_json")
    if found != identifier:
        return PointResult(MISSING, f"{path.name} holds another configuration ({found})")
    return PointResult(status, str(attrs.get("run_status_reason", "")), attrs)


def write_failure_record(path: str | os.PathLike, config_data: dict, reason: str,
                         overwrite: bool = False) -> Path:
    """Write the record file of a point whose configuration does not validate.

    Parameters
    ----------
    path : path
        The point's file (``point-<identifier>.nc``).
    config_data : dict
        The point's configuration as plain data (what was hashed for its identifier).
    reason : str
        One line: why the point failed.
    overwrite : bool
        Replace an existing file.
    """
    attrs = {"Conventions": "CF-1.10",
             "title": "torrid sweep point: not run (invalid configuration)",
             **provenance_attrs(config_data),
             "run_status": FAILED, "run_status_reason": reason}
    return write_atomic(xr.Dataset(attrs=attrs), path, overwrite=overwrite)
