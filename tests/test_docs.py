"""The README's promises: its test command is what CI runs."""

import re
from pathlib import Path

ROOT = Path(__file__).parents[1]


def test_ci_runs_the_readme_test_command():
    readme = (ROOT / "README.md").read_text()
    blocks = re.findall(r"```bash\n(.*?)\n```", readme, flags=re.S)
    install_and_run, install_and_test = blocks[0].strip(), blocks[1].strip()
    assert "pip install ." in install_and_run and "torrid" in install_and_run.split("&&")[-1]
    assert install_and_test in (ROOT / ".ci" / "run").read_text()


def test_readme_states_what_the_model_leaves_out():
    readme = (ROOT / "README.md").read_text().lower()
    assert "no radiative transfer" in readme and "one layer" in readme
    assert "not publish" in readme or "not for publication" in readme


def test_readme_tables_are_the_generated_ones():
    """Every table under a ``<!-- table: NAME -->`` marker is what the code generates
    (``python -m torrid.interface.readme`` rewrites them): the settings table and the variable
    tables of run, phase-curve, fit and sweep-table files."""
    from torrid.interface.readme import generated, tables
    from torrid.io.variables import TABLES

    found = tables((ROOT / "README.md").read_text())
    assert set(found) == {"settings", *(f"variables-{kind}" for kind in TABLES)}
    for name, text in found.items():
        assert text == generated(name), f"README table {name!r} is out of date"


def test_developers_worked_example_process():
    """The worked example of DEVELOPERS.md ("Adding a physical process") builds and does what
    it says: its steady state is the prescribed jet, i.e. the implicit damping of the jet's
    vorticity cancels the explicit source exactly."""
    import numpy as np

    import torrid
    from torrid.physics.processes import CASE, PLANET, ProcessContext
    from torrid.physics.state import VORTICITY
    from torrid.workflow.setup import build_model

    text = (ROOT / "DEVELOPERS.md").read_text()
    section = text.split("## Adding a physical process", 1)[1]
    code = re.findall(r"```python\n(.*?)\n```", section, flags=re.S)[0]
    namespace = {}
    exec(compile(code, "DEVELOPERS.md", "exec"), namespace)
    process_class = namespace["JetRelaxation"]
    model = build_model(torrid.ModelConfig().replace(numerics={"truncation": 10}))
    context = ProcessContext(kind=PLANET, transforms=model.transforms, gravity_m_s2=10.0,
                             mean_geopotential=model.mean_geopotential, rotation_rate_s=1e-5,
                             surface_height_m=model.surface_height_m, orbit=model.orbit)
    assert process_class.build({"atmosphere.jet_speed_m_s": 100.0,
                                "atmosphere.jet_timescale_days": float("inf")}, context) is None
    process = process_class.build({"atmosphere.jet_speed_m_s": 100.0,
                                   "atmosphere.jet_timescale_days": 2.0}, context)
    assert PLANET in process.kinds and CASE not in process.kinds
    rate = process.implicit_rates().vorticity
    assert rate == 1 / (2.0 * 86400)
    lat, _ = model.grid.mesh()
    jet = 100.0 * np.cos(lat)
    state = model.transforms.divergence_curl(jet, 0 * jet)[1]
    out = np.zeros((3, model.grid.ncoeff), dtype=complex)
    process.spectral_tendency(0.0, None, out)
    assert np.abs(out[VORTICITY]).max() > 0
    np.testing.assert_allclose(out[VORTICITY] - rate * state, 0, atol=1e-12 * rate * 1e-5)
