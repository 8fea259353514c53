"""torrid: a toy shallow-water circulation model for tidally locked hot gas giants.

The package is layered (see DEVELOPERS.md): ``torrid.physics`` holds pure array functions,
``torrid.io`` configuration and files, ``torrid.workflow`` the run driver, and
``torrid.interface`` the command line and plots. The names re-exported here are the Python API.
"""

from torrid.meta import TorridWarning, __version__
from torrid.interface import accessor as _accessor  # noqa: F401  (registers ds.torrid)

_API = ("build_case_config", "run", "ModelConfig", "load_config", "phase_curve", "ObserverSettings",
        "sweep", "fit")
#: The figures: each function returns its matplotlib figure (or writes a PNG when given a path).
_PLOTS = {"plot_map": "plots", "plot_planet_map": "plots", "plot_spinup": "plots",
          "plot_sweep_diagnostics": "sweep_plots", "plot_sweep_maps": "sweep_plots",
          "plot_phase_curve": "phase_plot", "plot_phase_curve_family": "phase_plot",
          "plot_fit": "fit_plot", "plot_posterior": "fit_plot"}
__all__ = ["__version__", "TorridWarning", *_API, *_PLOTS]


def __getattr__(name):
    """Load the Python API (and with it the whole package) on first use."""
    if name in _API:
        from torrid import api

        return getattr(api, name)
    if name in _PLOTS:
        import importlib

        return getattr(importlib.import_module(f"torrid.interface.{_PLOTS[name]}"), name)
    raise AttributeError(f"module 'torrid' has no attribute {name!r}")
