"""``torrid settings``: print the table of configuration keys (defaults, units, limits)."""

from __future__ import annotations

import argparse
import sys

from torrid.io.config import ConfigError, unknown_message
from torrid.io.settings import SECTIONS, text_table


def add_parser(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "settings", help="list the configuration keys: defaults, units, allowed values",
        description="Print every key of a run configuration (TOML sections and keys): its "
                    "default (the built-in default planet's), unit, allowed values, whether a "
                    "sweep may vary it, and what it means.")
    p.add_argument("section", nargs="?", default=None, metavar="SECTION",
                   help=f"only this section ({', '.join(SECTIONS)})")
    p.set_defaults(handler=handle)


def handle(args: argparse.Namespace) -> int:
    if args.section is not None and args.section not in SECTIONS:
        raise ConfigError(unknown_message(args.section, list(SECTIONS), "section"))
    sys.stdout.write(text_table(args.section))
    return 0
