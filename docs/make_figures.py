"""The README's figures of the demo: the sweep plot, the maps grid, the phase curves and the fit.

    python docs/make_figures.py                     # runs (or reuses) runs/demo, writes docs/*.png
    python docs/make_figures.py --folder runs/demo --output docs

Each figure is drawn by the public plotting function that returns it (``torrid.plot_*``), so
the images show what a user gets. ``tests/test_figures.py`` runs this script briefly (a tiny
sweep) to keep it working; the committed images come from the full demo (T21, 4 x 4 points).
"""

from __future__ import annotations

import argparse
import shutil
from pathlib import Path

import xarray as xr

import torrid
from torrid.interface.demo import DEMO_SWEEP, POSTERIOR_STEPS, run_demo, truth_index

HERE = Path(__file__).parent
#: file name of each README figure
FIGURES = {"sweep": "demo-sweep.png", "maps": "demo-maps.png", "phase": "demo-phase.png",
           "fit": "demo-fit.png", "posterior": "demo-posterior.png"}
DPI = 100


def make_figures(folder: Path, output: Path, sweep_text: str = DEMO_SWEEP,
                 progress: bool = True, posterior_steps: int = POSTERIOR_STEPS) -> dict[str, Path]:
    """Run the demo into ``folder`` if it has not run there, then draw the figures into
    ``output``; returns the images by role. The posterior's corner plot is the demo's own
    (drawn by ``torrid.plot_posterior``; the sample itself is not kept in the fit file)."""
    if not (folder / "demo-fit.nc").exists():
        run_demo(folder, sweep_text=sweep_text, progress=progress, overwrite=True,
                 posterior_steps=posterior_steps)
    with xr.open_dataset(folder / "demo-table.nc") as ds:
        table = ds.load()
    with xr.open_dataset(folder / "demo-fit.nc") as ds:
        fit = ds.load()
    curves = table.torrid.phase_curve()
    dims = [d for d in curves["flux_ratio"].dims if d != "phase"]
    truth = dict(zip(dims, truth_index([curves.sizes[d] for d in dims])))
    output.mkdir(parents=True, exist_ok=True)
    figures = {
        "sweep": torrid.plot_sweep_diagnostics(table),
        "maps": torrid.plot_sweep_maps(table, scale="panel"),
        "phase": torrid.plot_phase_curve(curves.isel(truth)),
        "fit": torrid.plot_fit(fit),
    }
    written = {"posterior": output / FIGURES["posterior"]}
    shutil.copyfile(folder / "demo-fit-posterior.png", written["posterior"])
    for role, figure in figures.items():
        path = output / FIGURES[role]
        figure.savefig(path, dpi=DPI, bbox_inches="tight")
        written[role] = path
    import matplotlib.pyplot as plt

    plt.close("all")
    return written


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--folder", type=Path, default=Path("runs/demo"),
                        help="the demo folder (run there first if it has no fit yet)")
    parser.add_argument("--output", type=Path, default=HERE, help="where the PNGs go")
    args = parser.parse_args(argv)
    for role, path in make_figures(args.folder, args.output).items():
        print(f"{role}: {path}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
