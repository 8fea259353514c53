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
