"""Galewsky, Scott & Polvani (2004): the perturbed mid-latitude jet at day 6, vorticity map.

Runs the barotropically unstable jet (default T85, 6 days, a few seconds), writes the run file
and a PNG of the day-6 relative vorticity, the field the paper shows rolling up into vortices.

    python examples/galewsky_vorticity.py                     # runs/galewsky-T85.nc + .png
    python examples/galewsky_vorticity.py -T 42 --days 1 --folder /tmp/try
"""

from __future__ import annotations

import argparse
from pathlib import Path

import torrid
from torrid.interface.plots import plot_map


def main(argv=None) -> Path:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("-T", "--truncation", type=int, default=85)
    parser.add_argument("--days", type=float, default=6.0)
    parser.add_argument("--folder", type=Path, default=Path("runs"))
    parser.add_argument("--overwrite", action="store_true")
    args = parser.parse_args(argv)
    config = torrid.build_case_config("galewsky", truncation=args.truncation, days=args.days)
    stem = args.folder / f"galewsky-T{args.truncation}"
    ds = torrid.run(config, output=stem.with_suffix(".nc"), overwrite=args.overwrite)
    image = plot_map(ds, "vorticity", args.days, stem.with_suffix(".png"),
                     overwrite=args.overwrite)
    print(f"{ds.attrs['summary']}\nwrote {stem.with_suffix('.nc')} and {image}")
    return image


if __name__ == "__main__":
    main()
