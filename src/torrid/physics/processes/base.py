"""What a physical process is: the one interface every process module presents.

A process contributes any of

* an explicit tendency, as a momentum forcing on the grid (:meth:`Process.momentum_forcing`,
  m s^-2, folded into the fused grid kernel) and/or spectral tendencies
  (:meth:`Process.spectral_tendency`, added to the state's tendency);
* implicit rates (:meth:`Process.implicit_rates`): linear damping that is diagonal in spectral
  space, solved with the gravity waves (:mod:`torrid.physics.linear`);
* a bound on the time step, if its explicit part is stiff (:meth:`Process.max_time_step_s`);
* diagnostics for the run file (:meth:`Process.diagnostics`, with their metadata in
  :attr:`Process.diagnostic_variables`) and global attributes (:meth:`Process.attrs`).

It reads only the settings it declares (:attr:`Process.settings`, keys of the settings table)
and the shared set-up in :class:`ProcessContext`. The model is an ordered list of processes
(:mod:`torrid.physics.processes`): the explicit tendency sums their explicit parts and the
implicit operator sums their rates; nothing outside a process knows its internals.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, ClassVar, Mapping

import numpy as np

from torrid.physics.diagnostic_metadata import Diagnostic
from torrid.physics.orbit import Orbit
from torrid.physics.transforms import Transforms

PLANET, CASE = "planet", "case"


@dataclass(frozen=True)
class ImplicitRates:
    """Linear damping rates (s^-1) of vorticity, divergence and thickness, per spectral
    coefficient (arrays of shape (ncoeff,)) or uniform (floats); ``None``: no rate."""

    vorticity: np.ndarray | float | None = None
    divergence: np.ndarray | float | None = None
    thickness: np.ndarray | float | None = None


@dataclass(frozen=True)
class GridFields:
    """The state on the model grid at the current explicit evaluation (work buffers of the
    dynamics, valid during the evaluation): vorticity (s^-1), geopotential deviation phi'
    (m^2 s^-2) and the spin-1 wind map (-v, u) (m s^-1), each (nlat, nlon) north to south."""

    vorticity: np.ndarray
    geopotential: np.ndarray
    winds: np.ndarray


@dataclass(frozen=True)
class Snapshot:
    """One output state: spectral ``state`` (3, ncoeff) and its grid fields (model grid,
    north to south): ``u``, ``v`` (m s^-1), ``vorticity``, ``divergence`` (s^-1),
    ``geopotential`` phi' (m^2 s^-2), at ``time_s`` (s)."""

    time_s: float
    state: np.ndarray
    u: np.ndarray
    v: np.ndarray
    vorticity: np.ndarray
    divergence: np.ndarray
    geopotential: np.ndarray


@dataclass(frozen=True)
class ProcessContext:
    """The shared set-up a process may be built from, besides its settings.

    Attributes
    ----------
    kind : str
        ``planet`` (a forced hot-planet run) or ``case`` (a standard test case).
    transforms : Transforms
        Grid, radius and transforms.
    gravity_m_s2 : float
        (Reduced) gravity g.
    mean_geopotential : float
        Phi_mean, the model's reference geopotential (m^2 s^-2).
    rotation_rate_s : float
        Signed spin rate Omega (rad s^-1).
    surface_height_m : ndarray (nlat, nlon)
        Bottom topography h_s (m), zero where there is none.
    orbit : Orbit or None
        Where the star is in time (planets).
    case : object or None
        The standard case's :class:`torrid.physics.cases.CaseSpec` (cases).
    built : dict
        The processes built before this one, by name (for processes that use another's
        state, e.g. the mass exchange of the relaxation).
    """

    kind: str
    transforms: Transforms
    gravity_m_s2: float
    mean_geopotential: float
    rotation_rate_s: float
    surface_height_m: np.ndarray
    orbit: Orbit | None = None
    case: Any = None
    built: dict = field(default_factory=dict)


class Process:
    """Base class of the physical processes; a process overrides what it contributes.

    Class attributes
    ----------------
    name : str
        Registry name (``newtonian_relaxation``).
    kinds : frozenset
        Run kinds it belongs to (``planet``, ``case``).
    settings : tuple of str
        The settings-table keys it reads; :meth:`build` receives exactly these.
    diagnostic_variables : dict
        Name -> :class:`Diagnostic` of every diagnostic it may add to the run file.
    reference : str
        The published form it follows (empty if none).
    """

    name: ClassVar[str] = ""
    kinds: ClassVar[frozenset] = frozenset({PLANET})
    settings: ClassVar[tuple[str, ...]] = ()
    diagnostic_variables: ClassVar[dict[str, Diagnostic]] = {}
    reference: ClassVar[str] = ""

    @classmethod
    def check(cls, settings: Mapping[str, Any]) -> str | None:
        """A rule between the process's settings (each already valid on its own): the reason,
        in one line naming the keys and values, if they do not go together; None if they do.
        Checked when a configuration is validated."""
        return None

    @classmethod
    def build(cls, settings: Mapping[str, Any], context: ProcessContext) -> "Process | None":
        """The process of a run with these settings, or None if it does nothing there."""
        raise NotImplementedError

    def implicit_rates(self) -> ImplicitRates | None:
        """Diagonal damping rates for the implicit solve (None: none)."""
        return None

    def momentum_forcing(self, time_s: float, fields: GridFields
                         ) -> tuple[np.ndarray, np.ndarray] | None:
        """Explicit momentum forcing (eastward, northward) on the grid (m s^-2); None where
        the process has none in this run (e.g. a drag that is all implicit)."""
        raise NotImplementedError

    def spectral_tendency(self, time_s: float, fields: GridFields, out: np.ndarray) -> None:
        """Add explicit tendencies to the spectral tendency ``out`` (3, ncoeff) in place."""
        raise NotImplementedError

    def max_time_step_s(self) -> float | None:
        """The longest step (s) at which the process's explicit part stays stable (None: no
        limit); the model's step is shortened to it."""
        return None

    def diagnostics(self, snapshot: Snapshot) -> dict[str, float]:
        """Values of the process's diagnostics for one output state."""
        return {}

    def attrs(self) -> dict[str, Any]:
        """Global attributes of the run file that describe the process."""
        return {}

    def final_attrs(self, finals: Mapping[str, float]) -> dict[str, Any]:
        """Run-file attributes that follow from the final values (name -> the time mean over
        the steady-state window): new attributes, or ``final_<name>`` values replaced (e.g.
        set to NaN where a diagnostic is undefined)."""
        return {}


def provides(process: Process, method: str) -> bool:
    """True if ``process`` overrides ``method`` of :class:`Process` (has that part)."""
    return getattr(type(process), method) is not getattr(Process, method)
