"""Restart files: the complete state of a run at an output time, so a resumed run continues
bit for bit.

A run writing ``runs/x.nc`` keeps its restart data in the folder ``runs/.x.nc.restart/``:

* ``output-000012.npz``: the output snapshot number 12 (maps and diagnostics), written once,
  when it is taken;
* ``state.npz``: the spectral state, the time step and its changes, the step and output
  counters, and the configuration (JSON), written on the restart schedule and at the end.

Each file is written under a temporary name and renamed, and ``state.npz`` only ever refers to
snapshot files that are complete, so a kill -9 at any moment leaves a usable restart. The time
stepper (an IMEX Runge-Kutta scheme) is a one-step method: the state at a step boundary is all
of its memory, the step is saved, and the forcing depends on time only, so nothing else is
needed for an exact continuation. ``state.npz`` also counts the tendency evaluations so far.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np

from torrid.io.atomic import atomic_path
from torrid.io.config import ConfigError, ModelConfig


def restart_folder(output: str | os.PathLike) -> Path:
    """Where the restart data of the run file ``output`` live."""
    output = Path(output)
    return output.parent / f".{output.name}.restart"


def _save_npz(path: Path, **arrays) -> None:
    with atomic_path(path) as tmp, open(tmp, "wb") as fh:
        np.savez(fh, **arrays)


class RestartStore:
    """Reads and writes the restart data of one run file."""

    def __init__(self, output: str | os.PathLike):
        self.folder = restart_folder(output)

    def exists(self) -> bool:
        """True if a complete restart state is there."""
        return (self.folder / "state.npz").is_file()

    def clear(self) -> None:
        """Remove old restart data (a fresh run replaces them)."""
        if self.folder.is_dir():
            for path in self.folder.iterdir():
                path.unlink()

    def write_output(self, index: int, snapshot: dict) -> None:
        """Store output snapshot number ``index`` (time 0 is number 0)."""
        self.folder.mkdir(parents=True, exist_ok=True)
        _save_npz(self.folder / f"output-{index:06d}.npz",
                  **{name: np.asarray(value) for name, value in snapshot.items()})

    def write_state(self, config: ModelConfig, progress: dict, state: np.ndarray) -> None:
        """Store the model state and the run's counters (``progress``: JSON-safe values)."""
        self.folder.mkdir(parents=True, exist_ok=True)
        _save_npz(self.folder / "state.npz", state=state,
                  progress=np.array(json.dumps(progress)),
                  configuration=np.array(json.dumps(config.to_dict(), sort_keys=True)))

    def read(self, config: ModelConfig) -> tuple[dict, np.ndarray, list[dict]]:
        """The saved counters, state and output snapshots, after checking the configuration.

        Only ``run.days`` may differ from the configuration the restart was written with (a
        resumed run may be extended); anything else is refused with a one-line error.
        """
        path = self.folder / "state.npz"
        if not path.is_file():
            raise ConfigError(f"--resume: no restart data in {self.folder} (run without --resume)")
        try:
            with np.load(path, allow_pickle=False) as data:
                state = data["state"].copy()
                progress = json.loads(str(data["progress"]))
                saved = json.loads(str(data["configuration"]))
            outputs = []
            for index in range(progress["outputs_written"]):
                with np.load(self.folder / f"output-{index:06d}.npz", allow_pickle=False) as snap:
                    outputs.append({name: snap[name] for name in snap.files})
        except (OSError, ValueError, KeyError) as err:
            raise ConfigError(f"--resume: restart data in {self.folder} unreadable "
                              f"({type(err).__name__}); run without --resume") from None
        current = config.to_dict()
        saved.get("run", {}).pop("days", None)
        current.get("run", {}).pop("days", None)
        if saved != json.loads(json.dumps(current, sort_keys=True)):
            differing = sorted(f"{section}.{key}" for section in set(saved) | set(current)
                               for key in set(saved.get(section, {})) | set(current.get(section, {}))
                               if saved.get(section, {}).get(key) != current.get(section, {}).get(key))
            raise ConfigError(f"--resume: the restart in {self.folder} was written with a "
                              f"different configuration ({', '.join(differing) or 'sections'} "
                              "differ)")
        return progress, state, outputs
