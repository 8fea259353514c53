"""Implausible but valid settings are warned about in one line, never silently run (issue 11).

The bound of 1000 days is ours (stated in torrid.workflow.sanity): radiative and drag times of
hot gas giants in published models span hours to tens of days (common practice; e.g. the ranges
swept by Perez-Becker & Showman 2013, from memory), so a value of 1000 days or more in a
``_days`` key is most likely seconds (86400 for one day). A timescale longer than the run
means the forcing has not acted for one e-folding time when the run stops.
"""

import warnings

import pytest

import torrid
from torrid.interface.cli import main
from torrid.io.sweepfile import load_sweep
from torrid.workflow.sanity import timescale_problems, warn_implausible
from torrid.workflow.sweep import run_sweep


def planet(**atmosphere):
    return torrid.ModelConfig().replace(numerics={"truncation": 10},
                                        run={"days": 2.0, "output_interval_days": 1.0},
                                        atmosphere=atmosphere)


def test_a_timescale_in_seconds_is_a_likely_unit_slip():
    config = planet(radiative_timescale_days=86400.0)
    with pytest.warns(torrid.TorridWarning, match="radiative_timescale_days = 86400: more "
                                                  "than 1000 days, likely a unit slip") as seen:
        torrid.run(config)
    assert len(seen) == 1 and "\n" not in str(seen[0].message)


def test_a_timescale_longer_than_the_run():
    problems = timescale_problems(planet(drag_timescale_days=5.0))
    assert problems == ["atmosphere.drag_timescale_days = 5: longer than the run (run.days = "
                        "2), which ends before the forcing has acted"]
    with pytest.warns(torrid.TorridWarning, match="longer than the run"):
        warn_implausible(planet(drag_timescale_days=5.0))


def test_plausible_settings_and_cases_are_silent():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        warn_implausible(torrid.ModelConfig())  # tau_rad 1 day, no drag, 200 days
        warn_implausible(torrid.build_case_config("williamson2", truncation=10))
    assert timescale_problems(planet(drag_timescale_days=float("inf"))) == []


@pytest.mark.filterwarnings("always::torrid.TorridWarning")  # shown, as a user sees it
def test_the_command_line_shows_one_warning_line(tmp_path, capsys):
    out = tmp_path / "slip.nc"
    assert main(["run", "--truncation", "10", "--days", "2", "--set",
                 "atmosphere.drag_timescale_days=86400", "-o", str(out), "-q", "--no-plot"]) == 0
    err = capsys.readouterr().err
    assert err.startswith("torrid: warning: atmosphere.drag_timescale_days = 86400: more than "
                          "1000 days, likely a unit slip")
    assert len(err.strip().splitlines()) == 1


def test_a_sweep_warns_once_for_all_its_points(tmp_path):
    (tmp_path / "s.toml").write_text("""\
[numerics]
truncation = 10
[run]
days = 1.0
output_interval_days = 0.5
[sweep]
name = "s"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.5, 86400.0, 3600.0]
""")
    with pytest.warns(torrid.TorridWarning, match="2 of 3 sweep points have implausible "
                                                  "settings") as seen:
        run_sweep(load_sweep(tmp_path / "s.toml", folder=tmp_path / "s"), workers=1,
                  progress=False)
    assert len([w for w in seen if "sweep points" in str(w.message)]) == 1
