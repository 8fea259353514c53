"""Values that were accepted but cannot be right are refused with one line (issue 12).

Before issue 12: an output interval longer than ``days`` silently lengthened the run; a tiny
steady-state window gave NaN headlines; a step or Courant number of 1e-300 hung; an interval
of 1e-9 days wrote gigabytes; a sweep axis of 1e8 points was built, even by --dry-run;
``radius_m`` = 1e308 ended in an OverflowError; a measured curve with 40 copies of one row,
or with errors of 1e-300, was accepted. The limits are stated in workflow/limits.py,
io/settings.py, io/sweepfile.py and io/observed.py.
"""

import pytest

import torrid
from torrid.interface.cli import main
from torrid.io.config import ConfigError
from torrid.io.observed import ObservedDataError, read_observed_csv
from torrid.workflow import limits

BRIEF = ["--set", "numerics.truncation=21", "-q", "--no-plot"]


def _one_line(capsys) -> str:
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "Traceback" not in err, err
    return err


@pytest.mark.parametrize("sets, message", [
    (["run.days=20", "run.output_interval_days=50"],
     "run.output_interval_days = 50: longer than run.days = 20; must be at most run.days"),
    (["run.days=20", "run.steady_window_days=0.001"],
     "run.steady_window_days = 0.001: shorter than two output intervals"),
    (["run.days=20", "numerics.time_step_s=1e-300"],
     "numerics.time_step_s = 1e-300: the run would take 1.73e+306 steps; at most 1e+07"),
    (["run.days=20", "numerics.courant_number=1e-300"],
     "numerics.courant_number = 1e-300: the run would take"),
    (["run.days=20", "run.output_interval_days=1e-9"],
     "run.output_interval_days = 1e-09: 20000000001 snapshots over 20 days; at most 20000"),
    (["planet.radius_m=1e308"], "planet.radius_m = 1e+308: must be <= 1000000000.0"),
    (["planet.radius_m=1e-300"], "planet.radius_m = 1e-300: must be >= 100000.0"),
    (["planet.gravity_m_s2=1e-9"], "planet.gravity_m_s2 = 1e-09: must be >= 0.001"),
    (["planet.rotation_period_days=1e-9"],
     "planet.rotation_period_days = 1e-09: |value| must be >= 0.001"),
])
def test_refused_at_start_in_one_line(tmp_path, capsys, sets, message):
    argv = ["run", "-o", str(tmp_path / "r.nc"), *BRIEF]
    for s in sets:
        argv += ["--set", s]
    assert main(argv) == 2
    err = _one_line(capsys)
    assert message in err
    assert not (tmp_path / "r.nc").exists()


def test_in_memory_runs_are_checked_too():
    config = torrid.ModelConfig().replace(run={"days": 2.0, "output_interval_days": 5.0})
    with pytest.raises(ConfigError, match="longer than run.days"):
        torrid.run(config)


def test_a_very_large_truncation_is_warned_about_or_refused():
    config = torrid.ModelConfig().replace(numerics={"truncation": 1000})
    memory = limits.run_memory_bytes(config)
    assert memory > limits.MEMORY_WARN_BYTES  # about 2.4 GB of grid fields at T1000
    if memory > limits.physical_memory_bytes():
        with pytest.raises(ConfigError, match="of memory, more than this machine's"):
            limits.check_resources(config)
    else:
        with pytest.warns(torrid.TorridWarning) as record:
            limits.check_resources(config)
        messages = [str(w.message) for w in record]
        assert any("a run needs about" in m for m in messages)
        assert any("the run will write about 75.9 GB (201 snapshots of 189 MB)" in m
                   for m in messages)  # 5 maps of 1504 x 3008 doubles each


SWEEP = """\
[numerics]
truncation = 21
[sweep]
name = "huge"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
log_range = [0.1, 10.0, 2000]
"""


def test_a_sweep_of_too_many_points_needs_yes_and_dry_run_only_counts(tmp_path, capsys):
    path = tmp_path / "huge.toml"
    path.write_text(SWEEP)
    assert main(["sweep", str(path), "--folder", str(tmp_path / "f"), "-q"]) == 2
    assert "2000 points (2000), more than 1000: pass --yes" in _one_line(capsys)
    assert main(["sweep", str(path), "--folder", str(tmp_path / "f"), "--dry-run"]) == 0
    out = capsys.readouterr().out
    assert "2000 points" in out and "counted only, not built" in out
    assert not (tmp_path / "f").exists()


def test_an_axis_of_1e8_values_is_refused_before_building_it(tmp_path, capsys):
    path = tmp_path / "axis.toml"
    path.write_text(SWEEP.replace("2000]", "100000000]"))
    assert main(["sweep", str(path), "--dry-run"]) == 2
    assert "count must be at most 100000" in _one_line(capsys)


def _curve(tmp_path, rows):
    path = tmp_path / "curve.csv"
    path.write_text("phase,flux,error\n" + "\n".join(",".join(map(str, r)) for r in rows))
    return path


def test_duplicated_phases_are_refused_with_their_count(tmp_path):
    rows = [(0.1, 100.0, 5.0)] * 40 + [(0.5, 300.0, 5.0), (0.7, 200.0, 5.0)]
    with pytest.raises(ObservedDataError, match="39 lines repeat a phase given before"):
        read_observed_csv(_curve(tmp_path, rows))


def test_errors_below_the_floor_are_refused(tmp_path):
    rows = [(0.1, 100.0, 1e-300), (0.5, 300.0, 5.0), (0.7, 200.0, 5.0)]
    with pytest.raises(ObservedDataError, match="below the floor of 0.001 ppm"):
        read_observed_csv(_curve(tmp_path, rows))


def test_a_measured_curve_beyond_the_size_limit_is_refused_unread(tmp_path, monkeypatch):
    from torrid.io import observed

    monkeypatch.setattr(observed, "MAX_OBSERVED_BYTES", 100)
    rows = [(i / 50, 100.0, 5.0) for i in range(50)]
    with pytest.raises(ObservedDataError, match="bin it in phase first"):
        read_observed_csv(_curve(tmp_path, rows))
