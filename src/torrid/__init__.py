"""torrid: a toy shallow-water circulation model for tidally locked hot gas giants.

The package is layered (see DEVELOPERS.md): ``torrid.physics`` holds pure array functions,
``torrid.io`` configuration and files, ``torrid.workflow`` the run driver, and
``torrid.interface`` the command line and plots. The names re-exported here are the Python API.
"""

from torrid.meta import TorridWarning, __version__
from torrid.interface import accessor as _accessor  # noqa: F401  (registers ds.torrid)

_API = ("build_case_config", "run", "ModelConfig", "load_config", "phase_curve", "ObserverSettings",
        "sweep", "fit")
__all__ = ["__version__", "TorridWarning", *_API]


def __getattr__(name):
    """Load the Python API (and with it the whole package) on first use."""
    if name in _API:
        from torrid import api

        return getattr(api, name)
    raise AttributeError(f"module 'torrid' has no attribute {name!r}")
