"""The physical processes of the model, one module each, and their registry.

The model of a run is the ordered list of the registered processes that are present in it
(:func:`build_processes`); the explicit tendency sums their explicit parts in this order and
the implicit operator sums their rates. Adding a process: DEVELOPERS.md, "Adding a physical
process".
"""

from __future__ import annotations

import dataclasses
from typing import Any, Callable

from torrid.physics.processes.base import (CASE, PLANET, GridFields, ImplicitRates, Process,
                                           ProcessContext, Snapshot, provides)
from torrid.physics.processes.drag import RayleighDrag
from torrid.physics.processes.hyperdiffusion import Hyperdiffusion
from torrid.physics.processes.mass_exchange import MassExchange
from torrid.physics.processes.relaxation import NewtonianRelaxation
from torrid.physics.processes.topography import Topography

__all__ = ["REGISTRY", "build_processes", "Process", "ProcessContext", "ImplicitRates",
           "GridFields", "Snapshot", "provides", "PLANET", "CASE"]

#: Every process, in the order they are built and summed (a process may use those before it).
REGISTRY: tuple[type[Process], ...] = (
    Hyperdiffusion,
    RayleighDrag,
    NewtonianRelaxation,
    MassExchange,
    Topography,
)


def build_processes(value_of: Callable[[str], Any], context: ProcessContext) -> tuple[Process, ...]:
    """The processes present in a run.

    Parameters
    ----------
    value_of : callable
        ``value_of("section.name")``: the run's setting (each process gets only the keys it
        declares).
    context : ProcessContext
        The shared set-up; ``context.kind`` selects the processes of the run kind.
    """
    built: dict[str, Process] = {}
    for cls in REGISTRY:
        if context.kind not in cls.kinds:
            continue
        settings = {key: value_of(key) for key in cls.settings}
        process = cls.build(settings, dataclasses.replace(context, built=dict(built)))
        if process is not None:
            built[cls.name] = process
    return tuple(built.values())
