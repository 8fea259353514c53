"""Property-based: random and malformed configurations are accepted or refused with a one-line
ConfigError; no other exception escapes the validators (hypothesis)."""

import math

import numpy as np

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from torrid.io.config import SECTION_CLASSES, ConfigError, ModelConfig
from torrid.io.tomlfile import load_config

KNOWN = {name: list(cls.__dataclass_fields__) for name, cls in SECTION_CLASSES.items()}
values = st.one_of(
    st.none(), st.booleans(), st.integers(-10**6, 10**6), st.integers(),
    st.sampled_from([10**400, -10**400, 2**63, 0, 1, -1, 0.5, 1e308, -0.0]),
    st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=12),
    st.lists(st.integers(), max_size=3), st.dictionaries(st.text(max_size=4), st.integers(),
                                                         max_size=2),
    st.sampled_from(["williamson2", "galewsky", "synchronous", "pseudo-synchronous", "given"]),
)
section_names = st.one_of(st.sampled_from(list(KNOWN)), st.text(max_size=10))


@st.composite
def configurations(draw):
    data = {}
    for section in draw(st.lists(section_names, max_size=4)):
        keys = KNOWN.get(section, []) + ["bogus", "truncaton"]
        data[section] = draw(st.dictionaries(st.one_of(st.sampled_from(keys), st.text(max_size=8)),
                                             values, max_size=4))
    return draw(st.one_of(st.just(data), values))


def _accepted_or_one_line(call, errors=ConfigError):
    """The call's result, or None if it raised one of ``errors`` with a one-line message (any
    other exception escapes and fails the test)."""
    try:
        return call()
    except errors as err:
        text = str(err)
        assert text and "\n" not in text
        return None


@settings(max_examples=300, deadline=None)
@given(configurations())
def test_random_configurations(data):
    config = _accepted_or_one_line(lambda: ModelConfig.from_dict(data))
    if config is not None:
        assert ModelConfig.from_dict(config.to_dict()) == config
        assert math.isfinite(config.planet.radius_m) and config.numerics.truncation >= 1


toml_lines = st.one_of(
    st.sampled_from(["[planet]", "[numerics]", "[run]", "[orbit]", "[atmosphere]", "[case]",
                     "[nonsense]", "truncation = 21", "truncation = -4", "truncation = 'x'",
                     "days = inf", "days = nan", "eccentricity = 0.99", "eccentricity = 1",
                     "rotation = \"given\"", "rotation_period_days = 0", "name = \"galewsky\"",
                     "radiative_timescale_days = 1e-9", "x = [1, 2", "= 3", "\x00", "]["]),
    st.text(max_size=20),
)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(toml_lines, max_size=8))
def test_random_configuration_files(tmp_path, lines):
    path = tmp_path / "fuzz.toml"
    path.write_bytes("\n".join(lines).encode("utf-8", errors="replace"))
    config = _accepted_or_one_line(lambda: load_config(path))
    if config is not None:
        assert isinstance(config, ModelConfig)


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=40))
def test_random_overrides(assignment):
    _accepted_or_one_line(lambda: ModelConfig().with_override(assignment))


# --- data files: measured phase curves and band responses ------------------------------------
from torrid.io.observed import ObservedDataError, read_observed_csv  # noqa: E402
from torrid.io.observer import (ObserverError, ObserverSettings, read_observer_toml,  # noqa: E402
                                read_response)

cells = st.one_of(st.sampled_from(["0.1", "0.5", "0.99", "1.0", "-1", "nan", "inf", "1e400",
                                   "abc", "", " ", "2.5", "10", "0", "1e-9", "#", "\"3\""]),
                  st.floats(allow_nan=True, allow_infinity=True).map(repr),
                  st.text(max_size=6))
csv_rows = st.lists(st.lists(cells, min_size=0, max_size=4).map(",".join), max_size=8)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(csv_rows)
def test_random_observed_csv_files(tmp_path, rows):
    path = tmp_path / "observed.csv"
    path.write_bytes("\n".join(rows).encode("utf-8", errors="replace"))
    curve = _accepted_or_one_line(lambda: read_observed_csv(path), ObservedDataError)
    if curve is not None:
        assert curve.phase.size >= 3 and (curve.error_ppm > 0).all()
        assert ((curve.phase >= 0) & (curve.phase < 1)).all()


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(csv_rows)
def test_random_response_files(tmp_path, rows):
    path = tmp_path / "response.csv"
    path.write_bytes("\n".join(rows).encode("utf-8", errors="replace"))
    table = _accepted_or_one_line(lambda: read_response(path), ObserverError)
    if table is not None:
        wavelength, response = table
        assert (np.diff(wavelength) > 0).all() and (response >= 0).all()


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(st.one_of(st.sampled_from(["[observer]", "band = '4-5'", "band = [5, 4]",
                                           "inclination = 200", "phases = 0", "star_temperature = -3",
                                           "radius_ratio = 'x'", "weighting = 'photon'",
                                           "bogus = 1", "[other]", "albedo = 1.5"]),
                          st.text(max_size=12)), max_size=6))
def test_random_observer_sections(tmp_path, lines):
    path = tmp_path / "observer.toml"
    path.write_bytes("\n".join(lines).encode("utf-8", errors="replace"))
    section = _accepted_or_one_line(lambda: read_observer_toml(path), (ObserverError, ConfigError))
    if section is not None:
        _accepted_or_one_line(lambda: ObserverSettings(**section), ObserverError)
