"""The bottom layer: the package version and torrid's warning class.

Every other module may import this one; it imports nothing of torrid. ``torrid.__version__``
and ``torrid.TorridWarning`` are these names, re-exported.
"""

from importlib.metadata import PackageNotFoundError, version as _version

try:
    __version__ = _version("torrid")
except PackageNotFoundError:  # running from a source tree that is not installed
    __version__ = "0.0.0+unknown"


class TorridWarning(UserWarning):
    """Warnings issued by torrid itself (turned into errors in the test suite)."""
