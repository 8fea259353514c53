"""Provenance attributes that every file torrid writes carries."""

from __future__ import annotations

import datetime as _dt
import json
import platform

from torrid.meta import __version__


def provenance_attrs(config: dict) -> dict[str, str]:
    """Package version, creation date (UTC, ISO 8601), platform and full configuration (JSON)."""
    return {
        "source": f"torrid {__version__}",
        "torrid_version": __version__,
        "date_created": _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat(),
        "python_version": platform.python_version(),
        "configuration_json": json.dumps(config, sort_keys=True),
    }


def config_from_attrs(attrs: dict) -> dict:
    """The configuration dict stored by :func:`provenance_attrs` (inf survives as Infinity)."""
    return json.loads(attrs["configuration_json"])
