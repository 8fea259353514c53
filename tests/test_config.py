"""Configuration: validated once, frozen, one-line errors, round trip through plain data."""

import dataclasses
import math

import pytest

import torrid
from torrid.io.config import ConfigError, ModelConfig, NumericsConfig, PlanetConfig


def test_standard_cases_run_on_the_williamson_earth():
    # Williamson et al. (1992), section 2: a = 6.37122e6 m, Omega = 7.292e-5 s^-1, g = 9.80616.
    p = torrid.build_case_config("williamson6").planet
    assert p.radius_m == 6.37122e6
    assert p.rotation_rate_s == pytest.approx(7.292e-5, rel=1e-14)
    assert p.gravity_m_s2 == 9.80616


def test_negative_period_spins_the_other_way():
    assert PlanetConfig(rotation_period_days=-1.0).rotation_rate_s < 0
    assert PlanetConfig(rotation_period_days=math.inf).rotation_rate_s == 0


def test_config_is_frozen():
    cfg = ModelConfig()
    with pytest.raises(dataclasses.FrozenInstanceError):
        cfg.numerics.truncation = 85


@pytest.mark.parametrize("section, values, fragment", [
    ("numerics", {"truncation": 0}, "numerics.truncation = 0: must be >= 1"),
    ("numerics", {"truncation": 4.5}, "must be an integer"),
    ("numerics", {"truncation": "42"}, "must be an integer"),
    ("numerics", {"courant_number": 3.0}, "must be <= 1.8"),
    ("planet", {"radius_m": -1.0}, "planet.radius_m = -1.0: must be >= 100000.0"),
    ("planet", {"rotation_period_days": 0}, "must be non-zero"),
    ("run", {"days": float("nan")}, "must be a finite number"),
    ("run", {"days": True}, "must be a number"),
    ("case", {"name": "williamson9"}, "must be one of"),
    ("case", {"name": "williamson6", "alpha_rad": 0.3}, "only williamson2"),
])
def test_bad_values_give_one_line_errors(section, values, fragment):
    with pytest.raises(ConfigError) as err:
        ModelConfig.from_dict({section: values})
    assert fragment in str(err.value)
    assert "\n" not in str(err.value)


def test_unknown_key_suggests_the_closest():
    with pytest.raises(ConfigError, match=r"unknown key 'numerics.truncaton' \(did you mean "
                                          r"'numerics.truncation'\?\)"):
        ModelConfig.from_dict({"numerics": {"truncaton": 42}})
    with pytest.raises(ConfigError, match="unknown section 'numeric'.*'numerics'"):
        ModelConfig.from_dict({"numeric": {}})


def test_round_trip_through_plain_data():
    cfg = torrid.build_case_config("williamson2", truncation=63, alpha_rad=0.05, days=3)
    again = ModelConfig.from_dict(cfg.to_dict())
    assert again == cfg
    assert again.replace(numerics={"truncation": 85}).numerics.truncation == 85


def test_time_step_longer_than_output_interval_is_refused():
    with pytest.raises(ConfigError, match="numerics.time_step_s"):
        ModelConfig(numerics=NumericsConfig(time_step_s=2 * 86400.0))


def test_given_time_step_is_shortened_to_divide_the_output_interval():
    from torrid.workflow.setup import build_model

    config = torrid.build_case_config("williamson6", truncation=10, time_step_s=5000.0)
    model = build_model(config)
    assert model.dt == pytest.approx(86400 / 18) and model.steps_per_output == 18
    exact = build_model(config.replace(numerics={"time_step_s": 600.0}))
    assert exact.dt == 600.0 and exact.steps_per_output == 144
