"""What a run may ask for: refusals and warnings before any work (issue 12).

Each limit is a stated number, not a physical law; a run beyond it is almost certainly a slip
(a unit, a sign, an exponent) and would cost hours, gigabytes or a hang before saying so:

* :data:`MAX_SNAPSHOTS` output snapshots (``run.days / run.output_interval_days``);
* :data:`MAX_STEPS` time steps (``run.days`` over the step; a step or Courant number of
  1e-300 would otherwise hang silently);
* an output interval longer than ``run.days`` (it would silently lengthen the run), and a
  steady-state window shorter than two output intervals (the final values need two
  snapshots in it);
* estimated memory above :data:`MEMORY_WARN_BYTES` is warned about, above the machine's
  physical memory refused; estimated disk (run file and restart data) above
  :data:`DISK_WARN_BYTES` is warned about, above the free space refused.

The memory estimate counts :data:`GRID_FIELDS` double-precision fields on the Gauss grid (the
stepper's stages, the transforms' work arrays and the snapshot: an estimate from the code,
measured 0.2-0.3 GB above the ~250 MB of imports at T170) on top of :data:`BASE_MEMORY_BYTES`.
"""

from __future__ import annotations

import math
import os
import warnings

from torrid.io.config import SECONDS_PER_DAY, ConfigError, ModelConfig
from torrid.io.storage import check_free_space, format_bytes
from torrid.meta import TorridWarning
from torrid.physics.grid import alias_free_nlat

#: Most output snapshots a run may write (a 1e-9-day interval wrote 1.8 GB in 2 minutes).
MAX_SNAPSHOTS = 20_000
#: Most time steps a run may take (about 3 hours at T42 on one core of this machine).
MAX_STEPS = 10_000_000
#: Most points a sweep runs without ``--yes``.
MAX_SWEEP_POINTS = 1_000
#: Warn above this estimated memory of one run (bytes).
MEMORY_WARN_BYTES = 2e9
#: Warn above this estimated disk of one run or sweep (bytes).
DISK_WARN_BYTES = 10e9
#: Memory of the imported libraries (bytes, measured: ~250 MB).
BASE_MEMORY_BYTES = 2.5e8
#: Grid fields a run holds at once (estimate, see the module docstring).
GRID_FIELDS = 60
#: Maps in a snapshot (h, u, v, vorticity, divergence).
SNAPSHOT_MAPS = 5


def grid_points(truncation: int) -> int:
    """Points of the alias-free Gauss grid of truncation ``truncation``."""
    nlat = alias_free_nlat(truncation)
    return nlat * 2 * nlat


def snapshot_count(config: ModelConfig) -> int:
    """Snapshots a run writes (the initial one included)."""
    run = config.run
    return max(1, math.ceil(run.days / run.output_interval_days - 1e-9)) + 1


def snapshot_bytes(truncation: int) -> int:
    """Bytes of one output snapshot's maps (uncompressed: an upper bound)."""
    return SNAPSHOT_MAPS * grid_points(truncation) * 8


def run_disk_bytes(config: ModelConfig) -> float:
    """Disk a run needs at its peak: the restart segments and the run file merged from them
    (each the snapshots' size), and the restart state."""
    truncation = config.numerics.truncation
    state = 3 * (truncation + 1) * (truncation + 2) // 2 * 16
    return 2 * snapshot_count(config) * snapshot_bytes(truncation) + 2 * state


def run_memory_bytes(config: ModelConfig) -> float:
    """Estimated peak memory of a run (bytes)."""
    return BASE_MEMORY_BYTES + GRID_FIELDS * grid_points(config.numerics.truncation) * 8


def physical_memory_bytes() -> float:
    """This machine's physical memory (bytes; inf where unknown)."""
    try:
        return os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES")
    except (ValueError, OSError, AttributeError):
        return math.inf


def check_schedule(config: ModelConfig) -> None:
    """The output schedule (before the model is built): one-line :class:`ConfigError`."""
    run = config.run
    if config.numerics.solver == "linear":
        return
    if run.output_interval_days > run.days * (1 + 1e-9):
        raise ConfigError(f"run.output_interval_days = {run.output_interval_days:g}: longer "
                          f"than run.days = {run.days:g}; must be at most run.days")
    count = snapshot_count(config)
    if count > MAX_SNAPSHOTS:
        raise ConfigError(f"run.output_interval_days = {run.output_interval_days:g}: "
                          f"{count} snapshots over {run.days:g} days; at most {MAX_SNAPSHOTS} "
                          "are allowed (lengthen the interval)")
    window = run.steady_window_days
    if window is not None and config.is_planet and window < 2 * run.output_interval_days:
        raise ConfigError(f"run.steady_window_days = {window:g}: shorter than two output "
                          f"intervals (2 x {run.output_interval_days:g} days); the final "
                          "values need two snapshots in the window")
    step = config.numerics.time_step_s
    if step is not None:
        check_steps(run.days * SECONDS_PER_DAY / step, "numerics.time_step_s", step)


def check_steps(steps: float, key: str, value: float) -> None:
    """Refuse a run of more than :data:`MAX_STEPS` steps (one line, what it would take)."""
    if steps > MAX_STEPS:
        raise ConfigError(f"{key} = {value:g}: the run would take {steps:.3g} steps; at most "
                          f"{MAX_STEPS:.0e} are allowed (a larger step or Courant number)")


def check_resources(config: ModelConfig, output=None, points: int = 1,
                    stacklevel: int = 3) -> None:
    """Estimated memory and disk of a run (or a sweep of ``points`` runs): refused beyond the
    machine, warned about beyond the thresholds above."""
    memory = run_memory_bytes(config)
    if memory > physical_memory_bytes():
        raise ConfigError(f"numerics.truncation = {config.numerics.truncation}: a run would "
                          f"need about {format_bytes(memory)} of memory, more than this "
                          f"machine's {format_bytes(physical_memory_bytes())}")
    if memory > MEMORY_WARN_BYTES:
        warnings.warn(f"numerics.truncation = {config.numerics.truncation}: a run needs about "
                      f"{format_bytes(memory)} of memory", TorridWarning, stacklevel=stacklevel)
    disk = run_disk_bytes(config) * points
    if output is not None:
        check_free_space(output, disk, "the run file and its restart data" if points == 1
                         else f"the {points} run files")
    if disk > DISK_WARN_BYTES:
        warnings.warn(f"{'the run' if points == 1 else f'the {points} runs'} will write about "
                      f"{format_bytes(disk)} ({snapshot_count(config)} snapshots of "
                      f"{format_bytes(snapshot_bytes(config.numerics.truncation))})",
                      TorridWarning, stacklevel=stacklevel)
