"""TOML text: the parser (tomllib, or tomli on Python 3.10) and single values in TOML syntax."""

from __future__ import annotations

try:
    import tomllib
except ImportError:  # Python 3.10
    import tomli as tomllib

TOMLDecodeError = tomllib.TOMLDecodeError


def loads(text: str) -> dict:
    """Parse TOML text (raises :data:`TOMLDecodeError`)."""
    return tomllib.loads(text)


def parse_value(text: str):
    """A value in TOML syntax (numbers, inf, true/false, quoted strings); bare words are strings."""
    try:
        return loads(f"v = {text}")["v"]
    except TOMLDecodeError:
        return text
