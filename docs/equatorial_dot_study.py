"""The equatorial dot of the demo's tau_rad = 0.1 day maps: physical or numerical?

Runs the default planet with tau_rad = 0.1 day and no drag to its steady state at T21, T42 and
T85 with the default hyperdiffusion (del^8, 0.1 day at the truncation), and at T42 with
hyperdiffusion ten times stronger and weaker and of lower order (del^4); then measures the
dot on the equator west of the substellar point (the front where the thickness rises, its width,
the crest behind it, the Froude numbers on either side) and draws docs/equatorial-dot.png
(the numbers go to docs/equatorial-dot.json). The finding: docs/equatorial-dot.md.

    python docs/equatorial_dot_study.py [--folder runs/equatorial-dot] [--quick]

``--quick`` runs T21 and T42 only (a few minutes). The runs are kept in the folder, so a
second call only redraws.
"""

from __future__ import annotations

import argparse
import json
from pathlib import Path

import numpy as np
import xarray as xr

import torrid
from torrid.io.runfile import read_run

HERE = Path(__file__).parent
BASE = {"atmosphere": {"radiative_timescale_days": 0.1, "drag_timescale_days": float("inf")},
        "run": {"days": 120.0, "output_interval_days": 0.5}}
#: label -> numerics of each run
RUNS = {
    "T21": {"numerics": {"truncation": 21}},
    "T42": {"numerics": {"truncation": 42}},
    "T85": {"numerics": {"truncation": 85}},
    "T42, hyperdiffusion x10": {"numerics": {"truncation": 42, "hyperdiffusion_days": 0.01}},
    "T42, hyperdiffusion / 10": {"numerics": {"truncation": 42, "hyperdiffusion_days": 1.0}},
    "T42, del^4": {"numerics": {"truncation": 42, "hyperdiffusion_order": 2}},
    "T21, drag 100 d": {"numerics": {"truncation": 21},
                        "atmosphere": {"drag_timescale_days": 100.0}},
    "T42, drag 100 d": {"numerics": {"truncation": 42},
                        "atmosphere": {"drag_timescale_days": 100.0}},
    "T85, drag 100 d": {"numerics": {"truncation": 85},
                        "atmosphere": {"drag_timescale_days": 100.0}},
}
QUICK = ("T21", "T42", "T42, hyperdiffusion x10", "T42, hyperdiffusion / 10", "T42, del^4",
         "T21, drag 100 d", "T42, drag 100 d")
#: where the dot is searched: west of the substellar point, on the dayside of the terminator
SEARCH_DEG = (-110.0, -40.0)


def run_all(folder: Path, labels) -> dict[str, xr.Dataset]:
    out = {}
    for label in labels:
        path = folder / (label.replace(", ", "-").replace(" ", "_").replace("^", "")
                         .replace("/", "over") + ".nc")
        if not path.exists():
            changes = {section: {**BASE.get(section, {}), **RUNS[label].get(section, {})}
                       for section in {*BASE, *RUNS[label]}}
            torrid.run(torrid.ModelConfig().replace(**changes), output=path, progress=False)
        out[label] = read_run(path)
    return out


def equator(ds: xr.Dataset) -> dict[str, np.ndarray]:
    """Final h (m), u (m/s) and the Froude number u / sqrt(g h) on the equator (the mean of
    the two grid rings nearest it), by longitude (deg)."""
    rings = np.argsort(np.abs(ds.lat.values))[:2]
    last = ds.isel(time=-1)
    h = last.h.values[rings].mean(axis=0)
    u = last.u.values[rings].mean(axis=0)
    gravity = float(ds.attrs["gravity_m_s2"])
    return {"lon": ds.lon.values, "h": h, "u": u, "froude": u / np.sqrt(gravity * h)}


def measure(ds: xr.Dataset) -> dict:
    """The front on the equator west of the substellar point: where h rises fastest, its
    10-90 % width, the crest behind it (the "dot") and its overshoot over the trough east of
    it, and the Froude numbers upstream (the 25 degrees beyond 15 degrees west of the front)
    and downstream (10-30 degrees east of it); plus the run's final diagnostics."""
    e = equator(ds)
    lon, h = e["lon"], e["h"]
    slope = np.gradient(h, lon)
    search = (lon >= SEARCH_DEG[0]) & (lon <= SEARCH_DEG[1])
    front = np.flatnonzero(search)[np.argmax(slope[search])]
    upstream = (lon > lon[front] - 40) & (lon < lon[front] - 15)
    downstream = (lon > lon[front] + 10) & (lon < lon[front] + 30)
    behind = (lon > lon[front]) & (lon < lon[front] + 25)
    crest = np.flatnonzero(behind)[np.argmax(h[behind])]
    after = (lon > lon[crest]) & (lon < lon[crest] + 30)
    rise = (h - h[upstream].mean()) / (h[crest] - h[upstream].mean())
    start = np.flatnonzero(search & (rise > 0.1) & (lon < lon[crest]))[0]
    top = np.flatnonzero(search & (rise > 0.9))[0]
    a = ds.attrs
    return {"front_lon_deg": float(lon[front]),
            "front_width_10_90_deg": float(lon[top] - lon[start]),
            "crest_lon_deg": float(lon[crest]), "crest_km": float(h[crest] / 1e3),
            "overshoot_km": float((h[crest] - h[after].min()) / 1e3),
            "upstream_froude": float(e["froude"][upstream].max()),
            "downstream_froude": float(e["froude"][downstream].mean()),
            "upstream_u_m_s": float(e["u"][upstream].max()),
            "grid_spacing_deg": float(360.0 / lon.size),
            "steady_day": float(a.get("steady_state_time_days", np.nan)),
            **{name: float(a[f"final_{name}"]) for name in DIAGNOSTICS}}


#: the final diagnostics compared between the runs
DIAGNOSTICS = ("hotspot_offset", "hotspot_offset_harmonic", "day_night_contrast",
               "peak_contrast", "equatorial_zonal_wind", "max_wind_speed")


def draw(runs: dict[str, xr.Dataset], path: Path) -> None:
    from torrid.interface.axes_style import figure_style, plt

    resolutions = [label for label in ("T21", "T42", "T85") if label in runs]
    dragged = [label for label in runs if label.endswith("drag 100 d")]
    variants = ["T42", *[label for label in runs if label.startswith("T42,")
                         and "drag" not in label]]
    with figure_style():
        fig = plt.figure(figsize=(15, 9.5), layout="constrained")
        grid = fig.add_gridspec(2, 6)
        mesh = None
        for c, label in enumerate(resolutions):
            ax = fig.add_subplot(grid[0, 2 * c:2 * c + 2])
            h = runs[label].h.isel(time=-1) / 1e3
            window = h.sel(lon=slice(-130, 0), lat=slice(-45, 45))
            mesh = ax.pcolormesh(window.lon, window.lat, window, cmap="inferno",
                                 shading="auto", vmin=400, vmax=700)
            ax.set_title(f"{label} (grid {360 / h.sizes['lon']:.2g} deg): final h")
            ax.set_xlabel("longitude east of the substellar point (deg)")
            ax.axvline(-90, color="white", ls=":", lw=1)
            if c == 0:
                ax.set_ylabel("latitude (deg)")
        fig.colorbar(mesh, ax=fig.axes, label="layer thickness (km)", shrink=0.8)
        panels = [("no drag: resolution", resolutions, "h"),
                  ("drag 100 days: resolution", dragged, "h"),
                  ("no drag, T42: hyperdiffusion", variants, "h"),
                  ("no drag: Froude number u / sqrt(g h)", resolutions, "froude")]
        spans = (slice(0, 2), slice(2, 3), slice(3, 4), slice(4, 6))  # of the 6 columns
        for span, (title, labels, field) in zip(spans, panels):
            ax = fig.add_subplot(grid[1, span])
            for label in labels:
                e = equator(runs[label])
                values = e[field] / (1e3 if field == "h" else 1.0)
                ax.plot(e["lon"], values, label=label.replace("no drag", ""))
            ax.axvline(-90, color="grey", ls=":", lw=1)
            if field == "froude":
                ax.axhline(1.0, color="black", lw=0.8)
                ax.set_ylabel("Froude number on the equator")
            else:
                ax.set_ylabel("h on the equator (km)")
            ax.set_xlim(-130, 0)
            ax.set_xlabel("longitude (deg east)")
            ax.set_title(title)
            ax.legend(fontsize=8)
        fig.suptitle("tau_rad = 0.1 day: the bright equatorial dot west of the substellar point "
                     "is the crest of a hydraulic jump (dotted: the terminator)")
    fig.savefig(path, dpi=100)
    plt.close(fig)


def markdown(table: dict[str, dict]) -> str:
    """The measurements as a Markdown table."""
    rows = ["| run | front (deg) | 10-90 % width (deg) | crest (deg, km) | overshoot (km) | "
            "Froude up / down | hotspot offset (deg) | day-night contrast | jet (m/s) |",
            "|---|---|---|---|---|---|---|---|---|"]
    for label, m in table.items():
        rows.append(f"| {label} | {m['front_lon_deg']:.1f} | {m['front_width_10_90_deg']:.1f} | "
                    f"{m['crest_lon_deg']:.1f}, {m['crest_km']:.0f} | {m['overshoot_km']:.1f} | "
                    f"{m['upstream_froude']:.2f} / {m['downstream_froude']:.2f} | "
                    f"{m['hotspot_offset']:.2f} | {m['day_night_contrast']:.4f} | "
                    f"{m['equatorial_zonal_wind']:.0f} |")
    return "\n".join(rows)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--folder", type=Path, default=Path("runs/equatorial-dot"))
    parser.add_argument("--quick", action="store_true", help="T21 and T42 only")
    parser.add_argument("--figure", type=Path, default=HERE / "equatorial-dot.png")
    args = parser.parse_args(argv)
    args.folder.mkdir(parents=True, exist_ok=True)
    runs = run_all(args.folder, QUICK if args.quick else RUNS)
    table = {label: measure(ds) for label, ds in runs.items()}
    print(json.dumps(table, indent=1))
    print(markdown(table))
    args.figure.with_suffix(".json").write_text(json.dumps(table, indent=1) + "\n")
    draw(runs, args.figure)
    print(f"wrote {args.figure}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
