"""Restart data: the latest complete state of a run, so a resumed run continues bit for bit,
and the run's outputs so far, which become its run file.

A run writing ``runs/x.nc`` keeps its restart data in the folder ``runs/.x.nc.restart/``:

* ``state.npz``: the one latest restart state: the spectral state, the time step and its
  changes, the step and output counters, the configuration (JSON) and the list of history
  files (below) it continues; written on the restart schedule and at the end, replacing the
  one before;
* ``segment-000012.nc``: the output snapshots from number 12 on, appended one by one as they
  are taken (netCDF with the run file's variables, :mod:`torrid.io.runstream`) until the next
  restart state closes it: memory holds one snapshot, not the whole series;
* ``run-000041.nc``: at the end, the segments merged into the run file (41 snapshots), which is
  then published as ``runs/x.nc`` by a hard link (one file on disk under two names; a copy
  where links are not possible); the segments are removed;
* ``lock``: held while a run writes (a second run on the same output is refused at start).

So a completed run leaves beside its run file only the one state (smaller than one snapshot)
and the second name of its run file, and ``--resume`` with a longer ``run.days`` extends it
bit for bit; ``run.keep_restart = false`` removes the folder at the end instead.

Every file is written under a temporary name and renamed, or is a segment that ``state.npz``
refers to only once it is closed, so a kill -9 at any moment leaves a usable restart (a segment
open at the kill is not referenced and is removed on resume). The time stepper (an IMEX
Runge-Kutta scheme) is a one-step method: the state at a step boundary is all of its memory,
the step is saved, and the forcing depends on time only, so nothing else is needed for an
exact continuation. ``state.npz`` also counts the tendency evaluations so far.
"""

from __future__ import annotations

import contextlib
import json
import os
import shutil
from pathlib import Path

import numpy as np

from torrid.io.atomic import atomic_path, try_lock
from torrid.io.config import ConfigError, ModelConfig
from torrid.io.runfile import file_options
from torrid.io.runstream import (append_record, merge_records, read_scalar_series,
                                 start_record_file)
from torrid.io.storage import storage

LOCK_NAME = "lock"
STATE_NAME = "state.npz"
#: Keys that may differ between a restart and the configuration resuming it.
RESUMABLE_CHANGES = ("days", "keep_restart")


class RunLockedError(FileExistsError):
    """Another torrid run is writing the same output."""


def restart_folder(output: str | os.PathLike) -> Path:
    """Where the restart data of the run file ``output`` live."""
    output = Path(output)
    return output.parent / f".{output.name}.restart"


def _guarded(method):
    """Run a store method so that an OS error is one line: the path, the cause in plain
    words, and what recovers the run (:func:`torrid.io.storage.storage`)."""
    def wrapper(self, *args, **kwargs):
        target = self.output if method.__name__ == "publish" else self.folder
        with storage(target, self.recovery(published=method.__name__ == "publish")):
            return method(self, *args, **kwargs)
    wrapper.__name__, wrapper.__doc__ = method.__name__, method.__doc__
    return wrapper


def _save_npz(path: Path, **arrays) -> None:
    with atomic_path(path) as tmp, open(tmp, "wb") as fh:
        np.savez(fh, **arrays)


class RestartStore:
    """Reads and writes the restart data of one run file (see the module docstring)."""

    def __init__(self, output: str | os.PathLike):
        self.output = Path(output)
        self.folder = restart_folder(output)
        self.history: list[tuple[str, int]] = []  # closed history files and their records
        self._segment = None  # (name, open handle, first index, records)
        self.saved_day: float | None = None  # the day of the latest restart state written

    def recovery(self, published: bool = False) -> str:
        """What recovers the run after a failed write, in words."""
        if published:
            return (f"the finished run is kept in its restart data ({self.folder}): fix "
                    "that and rerun with --resume, which only writes the file")
        if self.saved_day is None:
            return "nothing of the run was kept: fix that and rerun"
        return (f"the run is kept in its restart data up to day {self.saved_day:g} "
                f"({self.folder}): fix that (free space, permissions) and rerun with --resume")

    def exists(self) -> bool:
        """True if a complete restart state is there."""
        return (self.folder / STATE_NAME).is_file()

    @contextlib.contextmanager
    def lock(self):
        """Hold the output's run lock (released by the OS even on kill -9), or refuse."""
        with storage(self.folder, "nothing was run: fix that and rerun"):
            self.folder.mkdir(parents=True, exist_ok=True)
        handle = try_lock(self.folder / LOCK_NAME)
        if handle is False:  # no POSIX locks: no protection against two runs
            yield
            return
        if handle is None:
            raise RunLockedError(f"{self.output}: another torrid run is writing this output "
                                 "(wait for it, stop it, or choose another -o)") from None
        try:
            yield
        finally:
            handle.close()

    def _files(self):
        return [p for p in self.folder.iterdir() if p.name != LOCK_NAME] \
            if self.folder.is_dir() else []

    def clear(self) -> None:
        """Remove old restart data (a fresh run replaces them)."""
        self.close_segment(keep=False)
        self.history = []
        for path in self._files():
            path.unlink()

    def remove(self) -> None:
        """Remove the restart folder altogether (its lock too)."""
        self.close_segment(keep=False)
        if self.folder.is_dir():
            shutil.rmtree(self.folder, ignore_errors=True)

    @_guarded
    def append(self, index: int, time_days: float, snapshot: dict, template) -> None:
        """Append output snapshot number ``index`` (time 0 is number 0) to the open segment,
        starting one (from ``template(time_days, snapshot)``, a one-record run dataset) if
        none is open."""
        if self._segment is None:
            self.folder.mkdir(parents=True, exist_ok=True)
            name = f"segment-{index:06d}.nc"
            path = self.folder / name
            path.unlink(missing_ok=True)
            self._segment = [name, start_record_file(path, template(time_days, snapshot)),
                             index, 1]
            return
        name, handle, first, records = self._segment
        append_record(handle, index - first, time_days, snapshot)
        self._segment[3] = records + 1

    def close_segment(self, keep: bool = True) -> None:
        """Close the open segment; it joins the history (``keep``) or is deleted."""
        if self._segment is None:
            return
        name, handle, _, records = self._segment
        self._segment = None
        handle.close()
        if keep:
            self.history.append((name, records))
        else:
            (self.folder / name).unlink(missing_ok=True)

    @_guarded
    def write_state(self, config: ModelConfig, progress: dict, state: np.ndarray) -> None:
        """Store the model state and the run's counters (``progress``: JSON-safe values),
        after closing the open segment; then remove what the state no longer refers to."""
        self.close_segment()
        self.folder.mkdir(parents=True, exist_ok=True)
        if progress.get("times_days"):
            self.saved_day = float(progress["times_days"][-1])
        _save_npz(self.folder / STATE_NAME, state=state,
                  progress=np.array(json.dumps({**progress, "history": self.history})),
                  configuration=np.array(json.dumps(config.to_dict(), sort_keys=True)))
        self._remove_unreferenced()

    def _remove_unreferenced(self) -> None:
        keep = {name for name, _ in self.history} | {STATE_NAME}
        for path in self._files():
            if path.name not in keep:  # old segments and run files, killed writers' temporaries
                path.unlink(missing_ok=True)

    @_guarded
    def merged(self, config: ModelConfig, progress: dict, state: np.ndarray,
               attrs: dict) -> Path:
        """A completed run: the history merged into one run file (global ``attrs``), which
        becomes the only history of the state written with it. Returns the file."""
        self.write_state(config, progress, state)  # whole even if the merge fails
        total = sum(count for _, count in self.history)
        path = self.folder / f"run-{total:06d}.nc"
        with atomic_path(path) as tmp:
            merge_records([(self.folder / n, c) for n, c in self.history], tmp, attrs,
                          **file_options(config))
        self.history = [(path.name, total)]
        self.write_state(config, progress, state)
        return path

    @_guarded
    def failed(self, config: ModelConfig, attrs: dict) -> Path:
        """A failed run: the saved history and the open segment (up to the last good state)
        merged into a run file for the output (global ``attrs``, compression and precision of
        ``config``); the restart state is left as it was."""
        name = self._segment[0] if self._segment else None
        sources = list(self.history)
        if self._segment is not None:
            self._segment[1].close()
            sources.append((name, self._segment[3]))
            self._segment = None
        path = self.folder / "failed.nc"
        with atomic_path(path) as tmp:
            merge_records([(self.folder / n, c) for n, c in sources], tmp, attrs,
                          **file_options(config))
        if name is not None:
            (self.folder / name).unlink(missing_ok=True)
        return path

    @_guarded
    def publish(self, path: Path, link: bool) -> Path:
        """Put the run file ``path`` (in this folder) at the output: a hard link (``link``:
        the file stays the restart's history) or a rename."""
        with atomic_path(self.output) as tmp:
            tmp.unlink()
            if link:
                try:
                    os.link(path, tmp)
                except OSError:  # no hard links here: a copy
                    shutil.copyfile(path, tmp)
            else:
                os.replace(path, tmp)
        return self.output

    def read(self, config: ModelConfig) -> tuple[dict, np.ndarray, tuple[list, dict]]:
        """The saved counters, state, and output times (days) and number series so far, after
        checking the configuration; the history files become this store's.

        Only ``run.days`` (and ``run.keep_restart``) may differ from the configuration the restart was written with (a
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
            history = [(str(name), int(count)) for name, count in progress["history"]]
            times, series = [], {}
            for name, count in history:
                part_times, part = read_scalar_series(self.folder / name, count)
                times += part_times
                for key, values in part.items():
                    series.setdefault(key, []).extend(values)
        except (OSError, ValueError, KeyError, RuntimeError) as err:
            raise ConfigError(f"--resume: restart data in {self.folder} unreadable "
                              f"({type(err).__name__}); run without --resume") from None
        current = config.to_dict()
        for key in RESUMABLE_CHANGES:
            saved.get("run", {}).pop(key, None)
            current.get("run", {}).pop(key, None)
        if saved != json.loads(json.dumps(current, sort_keys=True)):
            differing = sorted(f"{section}.{key}" for section in set(saved) | set(current)
                               for key in set(saved.get(section, {})) | set(current.get(section, {}))
                               if saved.get(section, {}).get(key) != current.get(section, {}).get(key))
            raise ConfigError(f"--resume: the restart in {self.folder} was written with a "
                              f"different configuration ({', '.join(differing) or 'sections'} "
                              "differ)")
        self.history = history
        self.saved_day = float(progress["times_days"][-1]) if progress.get("times_days") else None
        self._remove_unreferenced()  # a segment open at the kill
        return progress, state, (times, series)
