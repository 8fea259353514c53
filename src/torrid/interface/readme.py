"""The README's generated tables: ``python -m torrid.interface.readme`` rewrites them in place.

Each generated table in README.md follows a marker line ``<!-- table: NAME -->`` and runs to
the next blank line. NAME is ``settings`` (the settings table, :mod:`torrid.io.settings`) or a
file kind of :data:`torrid.io.variables.TABLES` (``variables-run``, ``variables-phase``, ...).
A test checks that the README holds what these functions print.
"""

from __future__ import annotations

import re
import sys
from pathlib import Path

from torrid.io import settings, variables

MARKER = re.compile(r"^<!-- table: ([a-z-]+) -->$", flags=re.M)


def generated(name: str) -> str:
    """The Markdown of table ``name``."""
    if name == "settings":
        return settings.markdown_table()
    kind = name.removeprefix("variables-")
    if kind not in variables.TABLES:
        raise KeyError(f"unknown README table {name!r}")
    return variables.markdown_table(kind)


def tables(text: str) -> dict[str, str]:
    """Name -> the table under each marker of ``text``."""
    out = {}
    for match in MARKER.finditer(text):
        block = text[match.end():].lstrip("\n").split("\n\n", 1)[0]
        out[match[1]] = block.rstrip("\n")
    return out


def rewrite(text: str) -> str:
    """``text`` with every marked table replaced by its generated form."""
    pieces, last = [], 0
    for match in MARKER.finditer(text):
        start = match.end()
        rest = text[start:].lstrip("\n")
        old = rest.split("\n\n", 1)[0]
        end = start + (len(text[start:]) - len(rest)) + len(old)
        pieces += [text[last:start], "\n", generated(match[1])]
        last = end
    return "".join(pieces) + text[last:]


if __name__ == "__main__":  # python -m torrid.interface.readme [README.md]
    path = Path(sys.argv[1] if len(sys.argv) > 1 else "README.md")
    path.write_text(rewrite(path.read_text(encoding="utf-8")), encoding="utf-8")
    print(f"rewrote the generated tables of {path}")
