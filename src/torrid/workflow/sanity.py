"""Sanity checks of a configuration that is valid but probably not what was meant.

Each check gives one line; :func:`warn_implausible` issues them as one
:class:`torrid.TorridWarning` before a run starts (the run goes ahead). Checked:

* a forcing timescale (``atmosphere.radiative_timescale_days``, ``drag_timescale_days``,
  ``drag_timescale_nightside_days``) longer than :data:`LIKELY_UNIT_SLIP_DAYS`: hot gas giants
  have radiative and drag times from hours to tens of days, so 1000 days or more is most
  likely a value in seconds or hours in a key that is in days (86400 for one day);
* such a timescale longer than the run (``run.days``): the forcing has not acted for one
  e-folding time when the run ends, so the state is a spin-up, not a forced answer.
"""

from __future__ import annotations

import math
import warnings

from torrid.io.config import ModelConfig
from torrid.meta import TorridWarning

#: Forcing timescales (days) above this are flagged as a likely unit slip.
LIKELY_UNIT_SLIP_DAYS = 1000.0
#: The timescales checked.
TIMESCALE_KEYS = ("atmosphere.radiative_timescale_days", "atmosphere.drag_timescale_days",
                  "atmosphere.drag_timescale_nightside_days")


def _value(config: ModelConfig, key: str):
    section, _, name = key.partition(".")
    part = getattr(config, section, None)
    return None if part is None else getattr(part, name, None)


def timescale_problems(config: ModelConfig) -> list[str]:
    """The implausible timescales of a planet configuration, one short phrase each (empty for
    standard cases and plausible values)."""
    if not config.is_planet:
        return []
    days = config.run.days
    problems = []
    for key in TIMESCALE_KEYS:
        value = _value(config, key)
        if value is None or not math.isfinite(value):
            continue
        reasons = []
        if value > LIKELY_UNIT_SLIP_DAYS:
            reasons.append(f"more than {LIKELY_UNIT_SLIP_DAYS:g} days, likely a unit slip (the "
                           "key is in days: 1 day = 86400 s)")
        if value > days:
            reasons.append(f"longer than the run (run.days = {days:g}), which ends before the "
                           "forcing has acted")
        if reasons:
            problems.append(f"{key} = {value:g}: " + " and ".join(reasons))
    return problems


def warn_implausible(config: ModelConfig, stacklevel: int = 3) -> None:
    """Warn (one line, :class:`torrid.TorridWarning`) about the implausible settings of
    ``config``; silent when there are none."""
    problems = timescale_problems(config)
    if problems:
        warnings.warn("; ".join(problems), TorridWarning, stacklevel=stacklevel)


def warn_implausible_points(configs, stacklevel: int = 3) -> None:
    """One warning for the points of a sweep (configurations) with implausible settings:
    how many, and the first one's problem."""
    configs = list(configs)
    flagged = [problems for problems in map(timescale_problems, configs) if problems]
    if flagged:
        warnings.warn(f"{len(flagged)} of {len(configs)} sweep points have implausible "
                      f"settings; the first: {'; '.join(flagged[0])}", TorridWarning,
                      stacklevel=stacklevel)
