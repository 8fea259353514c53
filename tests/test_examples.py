"""Every example script runs (briefly) and produces what it promises."""

import runpy
import sys
from pathlib import Path

import pytest

EXAMPLES = Path(__file__).parents[1] / "examples"


def test_every_example_is_covered():
    assert sorted(p.name for p in EXAMPLES.glob("*.py")) == sorted(BRIEF_ARGS)


BRIEF_ARGS = {
    "galewsky_vorticity.py": ["-T", "21", "--days", "0.5"],
}


@pytest.mark.parametrize("name", sorted(BRIEF_ARGS))
def test_example_runs(name, tmp_path, monkeypatch):
    monkeypatch.setattr(sys, "argv", [name, *BRIEF_ARGS[name], "--folder", str(tmp_path)])
    runpy.run_path(str(EXAMPLES / name), run_name="__main__")
    pngs = list(tmp_path.glob("*.png"))
    assert pngs and all(p.read_bytes()[:4] == b"\x89PNG" for p in pngs)
    assert list(tmp_path.glob("*.nc"))
