"""The layers of the package (DEVELOPERS.md, /work/shared/design.md): imports point downwards.

The contract is the ``[tool.importlinter]`` table of pyproject.toml, checked by import-linter
(an external, general-purpose tool; its graph library grimp parses the imports statically, so
imports inside functions count too). The contract is run as ``lint-imports`` would run it, on
the source tree and on a copy with one deliberate upward import, which it must report.
"""

import os
import shutil
import subprocess
import sys
from pathlib import Path

import grimp  # import-linter's graph library (import-linter is in the test extra)
import pytest

ROOT = Path(__file__).parents[1]
SOURCE = ROOT / "src" / "torrid"
#: the layers that may not import the package root (it imports the interface and the API)
LOWER_LAYERS = ("torrid.meta", "torrid.physics", "torrid.io", "torrid.workflow")


def lint_imports(source_parent: Path, config: Path) -> subprocess.CompletedProcess:
    """Run import-linter's command line on the package found in ``source_parent``."""
    code = ("import sys; from importlinter.cli import lint_imports; "
            f"sys.exit(lint_imports(config_filename={str(config)!r}, no_cache=True, "
            "no_logo=True))")
    env = {**os.environ, "PYTHONPATH": str(source_parent)}
    return subprocess.run([sys.executable, "-c", code], cwd=source_parent, env=env,
                          capture_output=True, text=True, timeout=60)


@pytest.fixture(scope="module")
def graph():
    return grimp.build_graph("torrid", cache_dir=None, exclude_type_checking_imports=True)


def test_the_layer_contract_is_kept():
    result = lint_imports(SOURCE.parent, ROOT / "pyproject.toml")
    assert result.returncode == 0, result.stdout + result.stderr
    assert "1 kept, 0 broken" in result.stdout


def test_lower_layers_do_not_import_the_package_root(graph):
    offenders = [module for module in sorted(graph.modules)
                 if module.startswith(LOWER_LAYERS)
                 and "torrid" in graph.find_modules_directly_imported_by(module)]
    assert offenders == []
    # The bottom module imports nothing of torrid at all.
    assert graph.find_modules_directly_imported_by("torrid.meta") == set()


def _imports(graph, module):
    """What importing ``module`` runs first: the modules it imports and, as Python does, the
    packages above them (their ``__init__``), except the packages ``module`` itself is in
    (they are being initialised already). grimp records only the former."""
    own = {module, *(module.rsplit(".", k)[0] for k in range(1, module.count(".") + 1))}
    out = set()
    for imported in graph.find_modules_directly_imported_by(module):
        out.add(imported)
        parts = imported.split(".")
        out.update(p for p in (".".join(parts[:k]) for k in range(1, len(parts)))
                   if p not in own and p in graph.modules)
    return out


def test_no_import_cycle(graph):
    """Depth-first search for a back edge in the module import graph (grimp), with the
    implicit imports of parent packages."""
    state = {}  # module -> "open" while on the DFS stack, "done" afterwards
    cycles = []

    def visit(module, path):
        state[module] = "open"
        for imported in sorted(_imports(graph, module)):
            if state.get(imported) == "open":
                cycles.append(path[path.index(imported):] + [imported])
            elif imported not in state:
                visit(imported, path + [imported])
        state[module] = "done"

    for module in sorted(graph.modules):
        if module not in state:
            visit(module, [module])
    assert cycles == []


def test_an_upward_import_breaks_the_contract(tmp_path):
    copy = tmp_path / "src" / "torrid"
    shutil.copytree(SOURCE, copy, ignore=shutil.ignore_patterns("__pycache__"))
    orbit = copy / "physics" / "orbit.py"
    orbit.write_text(orbit.read_text() + "\nimport torrid.workflow.driver  # deliberately upward\n")
    result = lint_imports(copy.parent, ROOT / "pyproject.toml")
    assert result.returncode != 0
    assert "0 kept, 1 broken" in result.stdout
    assert "torrid.physics.orbit -> torrid.workflow.driver" in result.stdout
