"""The work of one sweep point, as run in a worker process (local or on a dask worker).

Kept light at import: a worker unpickles :func:`run_point` by importing this module, and the
thread limits must be in the environment before numba and the transform library load.
"""

from __future__ import annotations

import os

#: Set to 1 in every worker before the model is imported: sweeps parallelise across processes.
THREAD_VARIABLES = ("NUMBA_NUM_THREADS", "OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS",
                    "MKL_NUM_THREADS")


def limit_threads(environ=os.environ) -> None:
    """One thread for numba, OpenMP and BLAS in this process (set before they are imported)."""
    for name in THREAD_VARIABLES:
        environ[name] = "1"


def run_point(config_json: str, path: str) -> dict:
    """Run one point and write its file at ``path``; return what happened.

    Parameters
    ----------
    config_json : str
        The point's configuration (JSON of ``ModelConfig.to_dict()``).
    path : str
        The point's file (absolute; on a cluster, in a folder all workers share).

    Returns
    -------
    dict
        ``path``, ``status`` (complete, steady or failed), ``reason``, ``wall_s`` (s),
        ``host`` and ``pid`` (where it ran). A run that blows up is a result (status failed, its run file
        written by :func:`torrid.run`); an invalid configuration gets a record file. Other
        errors propagate (nothing is written, so a rerun tries the point again).
    """
    limit_threads()
    import json
    import socket
    import time

    from torrid.io.config import ConfigError, ModelConfig
    from torrid.io.pointfile import write_failure_record
    from torrid.workflow.restart import RestartStore

    data = json.loads(config_json)
    start = time.perf_counter()
    try:
        config = ModelConfig.from_dict(data)
    except ConfigError as err:
        reason = f"invalid configuration: {err}"
        write_failure_record(path, data, reason, overwrite=True)
        return _result(path, "failed", reason, start, socket.gethostname())
    store = RestartStore(path)
    try:
        status, reason = write_run(config, path, store)
    except ConfigError as err:  # found only when the model is built
        status, reason = "failed", f"invalid configuration: {err}"
        write_failure_record(path, data, reason, overwrite=True)
    _remove_restart(store)  # the run file is the result; restarts would double the disk use
    return _result(path, status, reason, start, socket.gethostname())


def write_run(config, path: str, store) -> tuple[str, str]:
    """Run ``config`` into the run file ``path`` as :func:`torrid.run` does (a blown-up run's
    file has status failed and its last good state); a point killed mid-run continues from its
    restart data (bit for bit). Returns the run's status and reason."""
    from torrid.io.config import ConfigError
    from torrid.workflow.driver import RunFailedError, run_to_file

    resume = store.exists()
    try:
        try:
            ds = run_to_file(config, path, overwrite=True, resume=resume)
        except ConfigError:
            if not resume:
                raise
            store.clear()  # restart data unusable: start afresh
            ds = run_to_file(config, path, overwrite=True)
    except RunFailedError as failure:
        return "failed", str(failure)
    return ds.attrs["run_status"], ds.attrs["run_status_reason"]


def _remove_restart(store) -> None:
    store.remove()


def _result(path, status, reason, start, host) -> dict:
    import time

    return {"path": path, "status": status, "reason": reason,
            "wall_s": time.perf_counter() - start, "host": host, "pid": os.getpid()}
