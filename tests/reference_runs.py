"""Reference runs whose data must not change when the code is reorganised (issue 9).

``python tests/reference_runs.py`` (re)writes ``tests/data/reference_runs.npz``: for each run,
the SHA-256 of every data array (float64 bytes) and the arrays themselves (time series, and the
last snapshot of each map), so that ``tests/test_reference_runs.py`` can show the same bytes, or
name the largest relative difference when a refactoring changes the order of floating-point
operations. Written once before a refactoring, on the machine that runs the tests (first before
issue 9; the eccentric example's record again when its distance exponent became 0.5 in issue
10, a deliberate change of the physics; the other two records did not change).
"""

from __future__ import annotations

import hashlib
from pathlib import Path

import numpy as np

ROOT = Path(__file__).parents[1]
DATA = Path(__file__).parent / "data" / "reference_runs.npz"


#: The numerics the records were made with (before issue 14 changed the defaults): ARS(4,4,3),
#: the step fixed at the start and only shortened, at Courant number 1.
RECORDED_NUMERICS = {"time_scheme": "ars443", "time_step_rule": "fixed_start",
                     "courant_number": 1.0}


def reference_configs(numerics: dict | None = None):
    """The three runs: default planet (T21, 30 days), eccentric example (T21, 20 days),
    Williamson case 6 (T42, 2 days), with the recorded numerics (or ``numerics`` instead)."""
    import torrid

    numerics = RECORDED_NUMERICS if numerics is None else numerics
    planet = torrid.ModelConfig().replace(numerics={"truncation": 21}, run={"days": 30.0})
    eccentric = torrid.load_config(ROOT / "examples" / "eccentric.toml",
                                   ("numerics.truncation=21", "run.days=20"))
    w6 = torrid.build_case_config("williamson6", truncation=42, days=2.0)
    return {label: config.replace(numerics=numerics) for label, config in
            {"default_planet": planet, "eccentric": eccentric, "williamson6": w6}.items()}


def digest(values: np.ndarray) -> str:
    """SHA-256 of an array's float64 bytes (C order)."""
    return hashlib.sha256(np.ascontiguousarray(values, dtype=np.float64).tobytes()).hexdigest()


def run_arrays(config) -> dict[str, np.ndarray]:
    """Every data variable of the run, and the last snapshot of each map."""
    import torrid

    ds = torrid.run(config)
    out = {}
    for name, var in ds.data_vars.items():
        out[name] = var.values.astype(np.float64)
    return out


def main() -> None:
    stored = {}
    for label, config in reference_configs().items():
        arrays = run_arrays(config)
        for name, values in arrays.items():
            stored[f"{label}/{name}/sha256"] = np.array(digest(values))
            kept = values[-1] if values.ndim == 3 else values
            stored[f"{label}/{name}/last"] = kept
        print(label, len(arrays), "variables")
    DATA.parent.mkdir(exist_ok=True)
    np.savez_compressed(DATA, **stored)
    print(f"wrote {DATA} ({DATA.stat().st_size / 1e3:.0f} kB)")


if __name__ == "__main__":
    main()
