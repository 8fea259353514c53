"""Reading TOML configuration files with one-line errors that name the file."""

from __future__ import annotations

import os
from pathlib import Path

from torrid.io.config import ConfigError, ModelConfig
from torrid.io.tomltext import TOMLDecodeError, loads


def read_toml(path: str | os.PathLike) -> dict:
    """Parse a TOML file; a missing or malformed file raises a one-line ConfigError."""
    path = Path(path)
    if not path.is_file():
        raise ConfigError(f"{path}: no such configuration file")
    try:
        return loads(path.read_text(encoding="utf-8"))
    except UnicodeDecodeError:
        raise ConfigError(f"{path}: not a text (UTF-8) file") from None
    except TOMLDecodeError as err:
        raise ConfigError(f"{path}: invalid TOML: {str(err).splitlines()[0]}") from None


def load_config(path: str | os.PathLike, overrides: tuple[str, ...] = ()) -> ModelConfig:
    """Validated configuration from a TOML file plus ``section.key=value`` overrides.

    Errors name the file: ``run.toml: numerics.truncation = 0: must be >= 1``.
    """
    data = read_toml(path)
    try:
        config = ModelConfig.from_dict(data)
    except ConfigError as err:
        raise ConfigError(f"{path}: {err}") from None
    for assignment in overrides:
        config = config.with_override(assignment)
    return config
