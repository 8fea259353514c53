"""The README's figures are made by docs/make_figures.py from the demo; a brief run of the
script (a 3 x 3 sweep at T10 over 6 days) keeps it working, and the README shows the images
that are committed."""

import importlib.util
import re
import warnings
from pathlib import Path

ROOT = Path(__file__).parents[1]
SCRIPT = ROOT / "docs" / "make_figures.py"

from torrid.meta import TorridWarning  # noqa: E402
from test_examples import SMALL_DEMO  # noqa: E402  (the brief demo sweep of the examples)


def load_script():
    spec = importlib.util.spec_from_file_location("make_figures", SCRIPT)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_the_script_draws_every_readme_figure_briefly(tmp_path):
    script = load_script()
    with warnings.catch_warnings():  # a brief chain: its convergence warning is expected
        warnings.filterwarnings("ignore", "posterior.*has not converged", TorridWarning)
        written = script.make_figures(tmp_path / "demo", tmp_path / "out", sweep_text=SMALL_DEMO,
                                      progress=False, posterior_steps=150)
    assert set(written) == set(script.FIGURES)
    for path in written.values():
        assert path.read_bytes()[:4] == b"\x89PNG" and path.stat().st_size > 10_000


def test_the_readme_shows_the_committed_figures():
    script = load_script()
    readme = (ROOT / "README.md").read_text()
    shown = set(re.findall(r"!\[[^\]]*\]\((docs/[^)]+\.png)\)", readme))
    for name in script.FIGURES.values():
        assert f"docs/{name}" in shown, name
        assert (ROOT / "docs" / name).read_bytes()[:4] == b"\x89PNG"
