"""Hotspot offsets only where they are defined (issue 11): the map's longitudinal contrast
against the stated threshold, NaN with a flag and a reason elsewhere, in run files, sweep
tables, headlines and plots.

Sources: "analytic" values derived in the comments from the definitions in
torrid.physics.diagnostics (the cos(lat)-weighted equatorial-band mean b of h and b_eq of the
dayside equilibrium H + dH cos(lat) max(0, cos lon)); the threshold's reason is stated in
``HOTSPOT_CONTRAST_THRESHOLD``'s comment (the default steady-state tolerance).
"""

import math

import numpy as np
import pytest
import xarray as xr

import torrid
from torrid.interface.cli.run import planet_line
from torrid.interface.headline import hotspot_phrase
from torrid.interface.plots import plot_planet_map
from torrid.interface.sweep_plots import plot_sweep_diagnostics
from torrid.io.sweepfile import load_sweep
from torrid.physics.diagnostics import (EQUATORIAL_BAND_HALF_WIDTH_DEG,
                                        HOTSPOT_CONTRAST_THRESHOLD, hotspot_reason)
from torrid.physics.processes.relaxation import NewtonianRelaxation
from torrid.workflow.sweep import run_sweep

from test_diagnostics import H_M, diagnose, make_state  # noqa: F401 (fixtures below)
from test_diagnostics import mesh, tr  # noqa: F401  (pytest fixtures)

EQ_CONTRAST = 0.5  # dH/H of the equilibrium diagnose() uses


def band_factor(tr):
    """K = sum cos^2 / sum cos over the band rings: b of A cos(lat) f(lon) is A K f(lon)."""
    lat = tr.grid.latitude[np.abs(tr.grid.latitude) <= np.deg2rad(EQUATORIAL_BAND_HALF_WIDTH_DEG)]
    return np.sum(np.cos(lat) ** 2) / np.sum(np.cos(lat))


@pytest.mark.parametrize("ratio", [0.8, 1.2])
def test_offsets_are_nan_below_the_threshold_and_defined_above(tr, mesh, ratio):
    # Analytic: h = H + a cos(lat) cos(lon - 0.2) has band profile H + a K cos(lon - 0.2), range
    # 2 a K; the equilibrium's band profile H + dH K max(0, cos lon) has range dH K (the
    # equator's 1 to the nightside's 0). So C = 2 a / dH, and a = ratio * threshold * dH / 2
    # puts C at ratio x threshold (the grid's discrete maximum of cos over 128 points:
    # cos(pi / 128) - 1 ~ 3e-4 relative, far from the 20 % margins).
    lat, lon = mesh
    dh = EQ_CONTRAST * H_M
    a = ratio * HOTSPOT_CONTRAST_THRESHOLD * dh / 2
    d = diagnose(tr, make_state(tr, h=H_M + a * np.cos(lat) * np.cos(lon - 0.2)))
    assert d["longitudinal_contrast"] == pytest.approx(ratio * HOTSPOT_CONTRAST_THRESHOLD,
                                                       rel=1e-3)
    if ratio < 1:
        assert d["hotspot_offset_defined"] == 0.0
        assert all(math.isnan(d[k]) for k in ("hotspot_longitude", "hotspot_offset",
                                               "hotspot_offset_harmonic"))
    else:
        assert d["hotspot_offset_defined"] == 1.0
        assert d["hotspot_offset_harmonic"] == pytest.approx(np.degrees(0.2), abs=1e-6)
        assert d["hotspot_offset"] == pytest.approx(np.degrees(0.2), abs=0.05)


def test_band_factor_is_what_the_contrast_uses(tr, mesh):
    # the same C from a pattern confined to the band's own weighting: cos(lat) cos(lon)
    # of amplitude dH gives C = 2 exactly (analytic, above)
    lat, lon = mesh
    d = diagnose(tr, make_state(tr, h=H_M + EQ_CONTRAST * H_M * np.cos(lat) * np.cos(lon)))
    assert d["longitudinal_contrast"] == pytest.approx(2.0, rel=1e-3)
    assert 0.8 < band_factor(tr) < 1.0  # <cos> over |lat| <= 30 deg is ~0.95


def test_the_final_rule_and_its_reason():
    process = NewtonianRelaxation.__new__(NewtonianRelaxation)
    flat = process.final_attrs({"longitudinal_contrast": 0.004, "hotspot_offset": 12.0})
    assert flat["final_hotspot_offset_defined"] == 0.0
    assert math.isnan(flat["final_hotspot_offset"])
    assert math.isnan(flat["final_hotspot_offset_harmonic"])
    assert "0.004 below 0.01" in flat["hotspot_offset_reason"]
    fine = process.final_attrs({"longitudinal_contrast": 0.3})
    assert fine["final_hotspot_offset_defined"] == 1.0 and "final_hotspot_offset" not in fine
    assert fine["hotspot_offset_reason"].startswith("defined")
    assert "flat" in hotspot_reason(float("nan"))


def brief_planet(**changes):
    """A T10 planet; tau_rad = 10 days run for 0.05 day leaves a map with about 0.5 % of its
    equilibrium's contrast (relaxation ~ t / tau_rad), well below the threshold."""
    base = {"numerics": {"truncation": 10}, "run": {"days": 0.05, "output_interval_days": 0.025,
                                                    "stop_at_steady_state": False}}
    for section, keys in changes.items():
        base.setdefault(section, {}).update(keys)
    return torrid.ModelConfig().replace(**base)


@pytest.fixture(scope="module")
def flat_run():
    return torrid.run(brief_planet(atmosphere={"radiative_timescale_days": 10.0}))


def test_a_flat_run_reports_no_hotspot_and_says_why(flat_run, tmp_path):
    a = flat_run.attrs
    assert a["final_longitudinal_contrast"] < HOTSPOT_CONTRAST_THRESHOLD
    assert math.isnan(a["final_hotspot_offset"]) and a["final_hotspot_offset_defined"] == 0.0
    assert "below 0.01" in a["hotspot_offset_reason"]
    assert np.isnan(flat_run.hotspot_offset.values).all()
    assert (flat_run.hotspot_offset_defined.values == 0).all()
    line = planet_line(flat_run)
    assert "hotspot undefined (longitudinal contrast" in line and "nan" not in line
    fig = plot_planet_map(flat_run)
    legend = [t.get_text() for t in fig.axes[0].get_legend().get_texts()]
    assert hotspot_phrase(a, with_harmonic=False) in legend
    assert not any(line.get_marker() == "X" for line in fig.axes[0].lines)  # no hotspot mark


def test_map_legend_and_headline_give_the_same_window_mean():
    # a run whose window mean differs from its last snapshot (a 1-day window over a spin-up)
    ds = torrid.run(brief_planet(atmosphere={"radiative_timescale_days": 0.5},
                                 run={"days": 2.0, "output_interval_days": 0.25,
                                      "steady_window_days": 1.0}))
    final, last = ds.attrs["final_hotspot_offset"], float(ds.hotspot_offset[-1])
    assert ds.attrs["averaging_window_days"] == 1.0
    assert abs(final - last) > 0.05  # else the test could not tell the two apart
    phrase = hotspot_phrase(ds.attrs, with_harmonic=False)
    assert f"{final:+.1f} deg" in phrase and "mean over days 1-2" in phrase
    assert phrase.split(";")[0].split(" (")[0] in planet_line(ds)
    legend = [t.get_text() for t in plot_planet_map(ds).axes[0].get_legend().get_texts()]
    assert phrase in legend and not any(f"{last:+.1f} deg" in t for t in legend)


SWEEP = """\
[numerics]
truncation = 10
[run]
days = 0.05
output_interval_days = 0.025
stop_at_steady_state = false
[sweep]
name = "flags"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.1, 10.0]
[[sweep.axis]]
key = "atmosphere.drag_timescale_days"
values = [1.0, inf]
"""


def test_sweep_table_flags_and_plot_marks_undefined_points(tmp_path):
    (tmp_path / "flags.toml").write_text(SWEEP)
    outcome = run_sweep(load_sweep(tmp_path / "flags.toml", folder=tmp_path / "f"), workers=1,
                        progress=False)
    table = xr.open_dataset(outcome.table_path).load()
    flags = table.hotspot_offset_defined.values
    assert (flags[0] == 1).all() and (flags[1] == 0).all()  # tau_rad 0.1 day vs 10 days
    assert np.isnan(table.hotspot_offset.values[1]).all()
    assert np.isfinite(table.hotspot_offset.values[0]).all()
    reasons = table.hotspot_offset_reason.values
    assert all("below 0.01" in str(r) for r in reasons[1])
    assert all(str(r).startswith("defined") for r in reasons[0])
    fig = plot_sweep_diagnostics(table)
    hotspot_panel = fig.axes[0]
    texts = [t.get_text() for t in hotspot_panel.texts]
    assert texts.count("n/d") == 2  # the two flat points, written into their cells
