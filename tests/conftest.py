"""Shared fixtures: small, fast runs reused across test modules."""

import matplotlib
import pytest

matplotlib.use("Agg")


@pytest.fixture(scope="session")
def small_w6_run():
    """Williamson case 6 at T21 for 1 day, output every 0.5 day (a few tenths of a second)."""
    import torrid

    config = torrid.build_case_config("williamson6", truncation=21, days=1.0,
                                      output_interval_days=0.5)
    return torrid.run(config)
