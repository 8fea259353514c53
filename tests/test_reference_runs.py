"""Reorganising the code changes no result (issue 9).

``tests/data/reference_runs.npz`` was written by ``tests/reference_runs.py`` before the physical
processes became modules. Each run here must give the same bytes; where the order of
floating-point operations changed, the largest relative difference (against the array's own
scale) must stay at round-off, 1e-12: a dozen ulps of double precision amplified by a few
thousand steps of a stable, damped integration (far below any physical change).
"""

import numpy as np
import pytest

from reference_runs import DATA, digest, reference_configs, run_arrays

ROUND_OFF = 1e-12


@pytest.fixture(scope="module")
def stored():
    with np.load(DATA) as data:
        return {key: data[key] for key in data.files}


@pytest.mark.parametrize("label", ["default_planet", "eccentric", "williamson6"])
def test_results_unchanged(label, stored):
    config = reference_configs()[label]
    arrays = run_arrays(config)
    names = sorted(k.split("/")[1] for k in stored if k.startswith(f"{label}/")
                   and k.endswith("/sha256"))
    assert names, f"no reference data for {label}"
    missing = [n for n in names if n not in arrays]
    assert not missing, f"{label}: variables gone: {missing}"
    worst = 0.0
    for name in names:
        values = arrays[name]
        if digest(values) == str(stored[f"{label}/{name}/sha256"]):
            continue
        kept = values[-1] if values.ndim == 3 else values
        reference = stored[f"{label}/{name}/last"]
        assert kept.shape == reference.shape, f"{label}/{name}: shape changed"
        finite = np.isfinite(reference)
        assert np.array_equal(finite, np.isfinite(kept)), f"{label}/{name}: NaNs moved"
        scale = np.max(np.abs(reference[finite])) if finite.any() else 1.0
        diff = np.max(np.abs(kept[finite] - reference[finite])) / (scale or 1.0)
        worst = max(worst, float(diff))
        assert diff <= ROUND_OFF, f"{label}/{name}: relative difference {diff:.3g}"
    print(f"{label}: largest relative difference {worst:.3g}")
