"""The ``torrid`` xarray accessor: ``ds.torrid.phase_curve(...)`` on run datasets and sweep tables.

Registered by ``import torrid``; this module imports only xarray, the work is imported on use.
"""

from __future__ import annotations

import xarray as xr


@xr.register_dataset_accessor("torrid")
class TorridAccessor:
    """torrid's post-processing of a run dataset or sweep table."""

    def __init__(self, ds: xr.Dataset):
        self._ds = ds

    def phase_curve(self, settings=None, **changes) -> xr.Dataset:
        """Thermal phase curve and headline numbers (see
        :func:`torrid.workflow.phase.phase_curve`; ``changes`` are observer settings such as
        ``inclination=80``, ``band=(3.0, 4.0)``, ``day_temperature=2000``)."""
        from torrid.workflow.phase import phase_curve

        return phase_curve(self._ds, settings, **changes)

    def plot_phase_curve(self, path=None, overwrite: bool = False, settings=None, **changes):
        """Draw the phase curve (figure, or a PNG at ``path``)."""
        from torrid.interface.phase_plot import plot_phase_curve

        return plot_phase_curve(self.phase_curve(settings, **changes), path, overwrite)
