"""The one table of settings (torrid.io.settings) and everything derived from it (issue 9).

These are checks of internal consistency (the derived documents, help and checks agree with
the table), not of physics; the physical defaults themselves are the invented default planet.
"""

import dataclasses
import math
from pathlib import Path

import pytest

import torrid
from torrid.interface.cli import build_parser, main
from torrid.io.config import SECTION_CLASSES, ConfigError, ModelConfig
from torrid.io.settings import (BY_KEY, REQUIRED, SECTIONS, SETTINGS, default_planet_toml,
                                setting, text_table)

ROOT = Path(__file__).parents[1]


def test_one_row_per_key_and_the_classes_follow_the_table():
    assert len(BY_KEY) == len(SETTINGS)
    for name, cls in SECTION_CLASSES.items():
        fields = {f.name: f for f in dataclasses.fields(cls)}
        rows = [s for s in SETTINGS if s.section == name]
        assert list(fields) == [s.name for s in rows]
        for s in rows:
            if s.default is not REQUIRED:
                assert fields[s.name].default == s.default or (
                    isinstance(s.default, float) and math.isnan(s.default))
    assert set(SECTIONS) == set(SECTION_CLASSES)


@pytest.mark.parametrize("row", SETTINGS, ids=lambda s: s.key)
def test_every_default_passes_its_own_check(row):
    if row.default is not REQUIRED:
        assert row.validate(row.default) == row.default


@pytest.mark.parametrize("row", [s for s in SETTINGS if s.kind in (int, float)],
                         ids=lambda s: s.key)
def test_limits_are_enforced_with_one_line(row):
    """Just outside each stated limit is refused with one line naming the key and value."""
    for limit, exclusive, sign in ((row.minimum, row.exclusive_minimum, -1),
                                   (row.maximum, row.exclusive_maximum, +1)):
        if limit is None:
            continue
        outside = limit if exclusive else limit + sign * max(1.0, abs(limit)) * 1e-3
        with pytest.raises(ConfigError) as err:
            row.validate(outside)
        message = str(err.value)
        assert message.startswith(f"{row.key} = ") and "\n" not in message
    if not row.allow_inf:
        with pytest.raises(ConfigError, match="finite|integer"):
            row.validate(math.inf)


def test_inf_hint_for_words_in_timescales():
    with pytest.raises(ConfigError, match=r"must be a number \(inf for none\)"):
        ModelConfig.from_dict({"atmosphere": {"drag_timescale_days": "none"}})


def test_default_planet_example_is_generated_from_the_table():
    text = (ROOT / "examples" / "default_planet.toml").read_text()
    assert text == default_planet_toml(), "rerun: python -m torrid.io.settings --toml"
    assert torrid.load_config(ROOT / "examples" / "default_planet.toml") == ModelConfig()


def test_settings_command_lists_every_key(capsys):
    assert main(["settings"]) == 0
    out = capsys.readouterr().out
    for row in SETTINGS:
        assert f"  {row.name} " in out
    assert main(["settings", "numerics"]) == 0
    out = capsys.readouterr().out
    assert "truncation" in out and "radius_m" not in out
    assert out == text_table("numerics")


def test_settings_command_refuses_an_unknown_section(capsys):
    assert main(["settings", "numeric"]) == 2
    err = capsys.readouterr().err
    assert "did you mean 'numerics'" in err and len(err.splitlines()) == 1


def test_run_help_shows_the_table_defaults():
    from torrid.interface.cli.run import OPTIONS

    parser = build_parser()
    run = parser._subparsers._group_actions[0].choices["run"]
    helps = {a.option_strings[0]: a.help for a in run._actions if a.option_strings}
    for key, (option, _, _) in OPTIONS.items():
        assert setting(key).default_description(with_unit=True) in helps[option], option


def test_case_defaults_come_from_the_case_not_the_planet():
    """A [case] run gets the Earth of Williamson et al. (1992) and the case's own length and
    dissipation; the planet's table defaults do not leak into it, and given keys win."""
    config = ModelConfig.from_dict({"case": {"name": "williamson6"}})
    assert config.planet.radius_m == 6.37122e6
    assert config.run.days == 14.0 and not config.run.stop_at_steady_state
    assert config.numerics.hyperdiffusion_days is None  # resolved from the case at build
    given = ModelConfig.from_dict({"case": {"name": "williamson6"}, "run": {"days": 2.0},
                                   "numerics": {"hyperdiffusion_days": math.inf}})
    assert given.run.days == 2.0 and given.numerics.hyperdiffusion_days == math.inf
    assert torrid.build_case_config("williamson6") == config
    with pytest.raises(ConfigError, match=r"\[case\] needs case.name"):
        ModelConfig.from_dict({"case": {}})


def test_sweep_table_units_come_from_the_table():
    """A swept run.days is in days (the name-suffix guess gave "1")."""
    from torrid.workflow.collect import _coordinate

    axis = {"key": "run.days", "values": [10.0, 20.0], "spacing": "values"}
    coordinate = _coordinate(axis, "days")
    assert coordinate.attrs["units"] == "days"
    assert coordinate.attrs["long_name"] == setting("run.days").label


def test_unsweepable_keys_are_refused(tmp_path):
    from torrid.io.sweepfile import load_sweep

    path = tmp_path / "s.toml"
    path.write_text('[sweep]\n[[sweep.axis]]\nkey = "numerics.threads"\nvalues = [1, 2]\n')
    with pytest.raises(ConfigError, match="numerics.threads.*cannot be swept"):
        load_sweep(path)
