"""Plots for a paper draft or a talk (issue 11): what each figure shows, read back from the
matplotlib objects the public plotting functions return.

The rules checked are torrid's own, stated in torrid.interface.axes_style (cell values on
grids of at most 36 cells, contours from 6 points per axis up, inf as "none" one step beyond
the largest value) and torrid.interface.temperature_view (the phase curves' temperature map
of torrid.physics.temperature, affine: Cowan & Agol 2011 end points). The tables are
synthetic: their numbers are arbitrary, only the layout is under test.
"""

import matplotlib
import numpy as np
import pytest
import xarray as xr
from matplotlib.collections import QuadMesh
from matplotlib.contour import ContourSet
from matplotlib.quiver import Quiver

import torrid
from torrid.interface.axes_style import Axis, rounded
from torrid.interface.phase_plot import plot_phase_curve
from torrid.interface.sweep_plots import plot_sweep_diagnostics, plot_sweep_maps
from torrid.io.observer import ObserverSettings
from torrid.physics.temperature import thickness_to_temperature
from torrid.workflow.phase import end_temperatures

H_M, DH = 400e3, 1.0


def swept(name, values, spacing):
    key = f"atmosphere.{name}"
    return xr.DataArray(np.array(values, float), dims=name,
                        attrs={"config_key": key, "units": "days", "spacing": spacing,
                               "long_name": name})


def synthetic_table(n_rad=3, n_drag=2, maps=True, status=None):
    """A sweep table over tau_rad (log-spaced) and tau_drag (ending with inf)."""
    rad = swept("radiative_timescale_days", np.logspace(-1, 1, n_rad), "log")
    drag = swept("drag_timescale_days", [*np.logspace(-1, 1, n_drag - 1), np.inf], "values")
    shape = (n_rad, n_drag)
    rng = np.random.default_rng(1)
    data = {
        "hotspot_offset": (("radiative_timescale_days", "drag_timescale_days"),
                           rng.uniform(-30, 30, shape)),
        "day_night_contrast": (rad.dims + drag.dims, rng.uniform(0, 1, shape)),
        "peak_contrast": (rad.dims + drag.dims, rng.uniform(0, 1, shape)),
        "equatorial_zonal_wind": (rad.dims + drag.dims, rng.uniform(-500, 2000, shape)),
        "run_status": (rad.dims + drag.dims, np.full(shape, "steady", dtype=object)
                       if status is None else status),
        "hotspot_offset_defined": (rad.dims + drag.dims, np.ones(shape)),
        "longitudinal_contrast": (rad.dims + drag.dims, np.full(shape, 0.5)),
        "nightside_thickness_m": (rad.dims + drag.dims, np.full(shape, H_M)),
        "substellar_thickness_m": (rad.dims + drag.dims, np.full(shape, H_M * (1 + DH))),
    }
    table = xr.Dataset(data, coords={"radiative_timescale_days": rad,
                                     "drag_timescale_days": drag},
                       attrs={"torrid_sweep": "synthetic"})
    if maps:
        lat = np.linspace(-80, 80, 9)
        lon = np.arange(-180, 180, 20.0)
        la, lo = np.meshgrid(np.radians(lat), np.radians(lon), indexing="ij")
        pattern = np.maximum(0, np.cos(la) * np.cos(lo))
        scale = np.linspace(0.05, 1, n_rad * n_drag).reshape(shape)[..., None, None]
        dims = (*rad.dims, *drag.dims, "lat", "lon")
        table["h"] = (dims, H_M * (1 + DH * scale * pattern))
        table["u"] = (dims, 1000 * scale * np.cos(la) + 0 * lo)
        table["v"] = (dims, 100 * scale * np.sin(lo) + 0 * la)
        table = table.assign_coords(lat=lat, lon=lon)
    return table


def test_log_ticks_are_rounded_and_inf_is_none_at_the_end():
    axis = Axis(swept("drag_timescale_days", [0.1, 0.464159, 2.15443, 10.0, np.inf], "values"))
    assert axis.scale == "log"
    assert axis.labels == ["0.1", "0.46", "2.2", "10", "none"]
    # one log step (factor 4.64) beyond 10, with the break between them
    assert axis.centres[-1] == pytest.approx(10 * 4.64159, rel=1e-4)
    assert 10 < axis.break_at < axis.centres[-1]
    assert [rounded(v) for v in (0.0316228, 100.0, 1.0)] == ["0.032", "100", "1"]


def test_small_grid_gets_words_values_and_no_contours():
    table = synthetic_table(3, 2)
    fig = plot_sweep_diagnostics(table)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "radiative timescale (days)"
    assert ax.get_ylabel() == "drag timescale (days)"
    assert [t.get_text() for t in ax.get_yticklabels()] == ["0.1", "none"]
    assert ax.get_ylim()[1] > 0.1  # inf is drawn above the finite drag values
    assert not any(isinstance(c, ContourSet) for c in ax.get_children())
    written = {t.get_text() for t in ax.texts}
    expected = {f"{v:.1f}" for v in table.hotspot_offset.values.ravel()}
    assert expected <= written  # every cell's value, one decimal below 100


def test_large_grid_gets_contours_and_no_values():
    table = synthetic_table(6, 6, maps=False)
    ax = plot_sweep_diagnostics(table).axes[0]
    assert any(isinstance(c, ContourSet) for c in ax.get_children())
    cells = {f"{v:.1f}" for v in table.hotspot_offset.values.ravel()}
    assert not cells & {t.get_text() for t in ax.texts}


def test_points_that_are_not_steady_failed_or_missing_are_marked():
    status = np.array([["steady", "complete"], ["failed", "steady"], ["missing", "steady"]],
                      dtype=object)
    fig = plot_sweep_diagnostics(synthetic_table(3, 2, status=status))
    labels = [t.get_text() for legend in fig.legends for t in legend.get_texts()]
    assert {"not steady", "failed", "missing"} <= set(labels)


def test_maps_grid_has_arrows_marks_and_a_choice_of_colour_scales():
    table = synthetic_table(3, 2)
    fig = plot_sweep_maps(table)  # one scale per panel: 6 maps, 6 colour bars
    maps = [ax for ax in fig.axes if any(isinstance(c, QuadMesh) for c in ax.collections)
            and ax.get_label() != "<colorbar>"]
    assert len(maps) == 6
    assert all(any(isinstance(c, Quiver) for c in ax.collections) for ax in maps)
    assert all(any(line.get_marker() == "*" for line in ax.lines) for ax in maps)  # substellar
    assert all(any(line.get_marker() == "X" for line in ax.lines) for ax in maps)  # hotspot
    limits = {ax.collections[0].get_clim() for ax in maps}
    assert len(limits) == 6  # each panel its own
    shared = plot_sweep_maps(table, scale="shared")
    limits = {ax.collections[0].get_clim() for ax in shared.axes
              if any(isinstance(c, QuadMesh) for c in ax.collections) and
              ax.get_label() != "<colorbar>" and len(ax.collections) > 1}
    assert len(limits) == 1
    assert max(text.get_fontsize() for ax in maps for text in [ax.title]) >= 10


def test_maps_grid_centres_each_panel_on_its_star():
    """On an eccentric orbit the star of the last output is not at grid longitude 0: the
    panel is drawn about it, so the star mark at 0 sits on the forced maximum."""
    table = synthetic_table(3, 2)
    lon = np.radians(table["lon"].values - 60.0)
    la = np.radians(table["lat"].values)[:, None]
    table["h"].values[...] = H_M * (1 + DH * np.maximum(0, np.cos(la) * np.cos(lon)))
    table["map_substellar_longitude"] = (table["run_status"].dims, np.full((3, 2), 60.0))
    fig = plot_sweep_maps(table, arrows=False)
    ax = next(ax for ax in fig.axes if any(isinstance(c, QuadMesh) for c in ax.collections)
              and ax.get_label() != "<colorbar>")
    mesh = ax.collections[0]
    values = mesh.get_array().reshape(table.sizes["lat"], table.sizes["lon"])
    centres = mesh.get_coordinates()[0, :, 0]
    centres = (centres[:-1] + centres[1:]) / 2
    assert abs(centres[np.argmax(values[table.sizes["lat"] // 2])]) < 20.0


def test_maps_as_temperature_use_the_phase_curves_map():
    table = synthetic_table(3, 2)
    settings = ObserverSettings(night_temperature=1000.0, day_temperature=2000.0)
    fig = plot_sweep_maps(table, quantity="temperature", settings=settings, scale="shared")
    mesh = next(c for ax in fig.axes for c in ax.collections if isinstance(c, QuadMesh)
                and c.get_array().size == table.sizes["lat"] * table.sizes["lon"])
    night, day, _ = end_temperatures(settings)
    expected = thickness_to_temperature(table.h.isel(radiative_timescale_days=2,
                                                     drag_timescale_days=1).values, H_M, DH,
                                        night, day)
    drawn = np.asarray(mesh.get_array()).reshape(expected.shape)
    # the last mesh drawn is the bottom-right panel: largest tau_rad, smallest drag value
    candidates = [thickness_to_temperature(table.h.isel(radiative_timescale_days=i,
                                                        drag_timescale_days=j).values,
                                           H_M, DH, night, day)
                  for i in range(3) for j in range(2)]
    assert any(np.allclose(drawn, c) for c in candidates)
    assert expected.max() == pytest.approx(1000 + 1000 * 1.0, rel=1e-12)  # h_max -> T_day


def test_phase_plot_has_a_brightness_temperature_axis():
    config = torrid.ModelConfig().replace(numerics={"truncation": 10},
                                          run={"days": 1.0, "output_interval_days": 0.5})
    pc = torrid.run(config).torrid.phase_curve(phases=72)
    fig = plot_phase_curve(pc)
    right = [ax for ax in fig.axes if ax.get_ylabel() == "band brightness temperature (K)"]
    assert len(right) == 1
    ticks = right[0].get_yticks()
    labels = [float(t.get_text()) for t in right[0].get_yticklabels()]
    assert len(ticks) >= 2
    flux, temp = pc.flux_ratio.values, pc.brightness_temperature.values
    order = np.argsort(flux)
    np.testing.assert_allclose(np.interp(ticks, flux[order], temp[order]), labels, rtol=1e-3)


@pytest.mark.parametrize("name", [n for n in torrid.__all__ if n.startswith("plot_")])
def test_every_plot_is_a_public_function_that_returns_its_figure(name):
    assert callable(getattr(torrid, name))
    assert getattr(torrid, name).__module__.startswith("torrid.interface.")


def test_figures_are_returned_for_restyling(small_w6_run):
    fig = torrid.plot_map(small_w6_run, "h")
    assert isinstance(fig, matplotlib.figure.Figure)
    assert isinstance(torrid.plot_sweep_diagnostics(synthetic_table()), matplotlib.figure.Figure)
    assert isinstance(torrid.plot_sweep_maps(synthetic_table()), matplotlib.figure.Figure)
