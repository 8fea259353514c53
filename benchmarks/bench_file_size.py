"""Run-file size and write time: the encoding before issue 14 against the new default and options.

The default planet (T42, rest to the steady-state stop, the default numerics) is run once; its
dataset is then written ``--repeats`` times with each encoding (median write time quoted):

* ``no shuffle``: zlib level 1 without the shuffle filter;
* ``before = default``: zlib level 1 after the shuffle filter (``run.output_compression_level
  = 1``): the encoding before issue 14 too, where shuffle was netCDF4-python's default for
  zlib variables (measured: ``netCDF4.Variable.filters()`` of a run file written then);
* ``level 4``, ``level 9``: higher zlib levels with shuffle;
* ``single``: the default with ``run.output_precision = "single"`` (maps in float32).

Each double-precision file is read back and compared bit for bit with the dataset.

    python benchmarks/bench_file_size.py
"""

from __future__ import annotations

import argparse
import statistics
import tempfile
import time
from pathlib import Path

import numpy as np
import xarray as xr

import torrid
from torrid.io.cf import cf_dataset, netcdf_encoding


def encodings(ds: xr.Dataset) -> dict[str, dict]:
    before = netcdf_encoding(ds)
    for name in ds.data_vars:
        before[name] = {"zlib": True, "complevel": 1, "shuffle": False}
    return {"zlib 1, no shuffle": before,
            "before = default (zlib 1 + shuffle)": netcdf_encoding(ds),
            "level 4 + shuffle": netcdf_encoding(ds, 4),
            "level 9 + shuffle": netcdf_encoding(ds, 9),
            "single precision, level 1 + shuffle": netcdf_encoding(ds, 1, True)}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--truncation", type=int, default=42)
    args = parser.parse_args()
    ds = torrid.run(torrid.ModelConfig().replace(numerics={"truncation": args.truncation}))
    print(f"default planet T{args.truncation}: {ds.sizes['time']} snapshots, "
          f"{sum(v.nbytes for v in ds.data_vars.values()) / 1e6:.1f} MB of data in memory")
    out = cf_dataset(ds)
    with tempfile.TemporaryDirectory() as folder:
        reference_size = None
        for label, encoding in encodings(ds).items():
            path = Path(folder) / "run.nc"
            walls = []
            for _ in range(args.repeats):
                path.unlink(missing_ok=True)
                start = time.perf_counter()
                out.to_netcdf(path, engine="netcdf4", format="NETCDF4", encoding=encoding)
                walls.append(time.perf_counter() - start)
            size = path.stat().st_size
            reference_size = reference_size or size
            with xr.open_dataset(path, engine="netcdf4", decode_times=False) as back:
                same = all(np.array_equal(back[n].values, ds[n].values, equal_nan=True)
                           and back[n].dtype == ds[n].dtype for n in ds.data_vars)
                worst = max(float(np.nanmax(np.abs(back[n].values - ds[n].values))
                                  / (np.nanmax(np.abs(ds[n].values)) or 1.0))
                            for n in ds.data_vars)
            print(f"{label:38s} {size / 1e6:6.2f} MB ({size / reference_size:.2f} of the first), "
                  f"write median {statistics.median(walls):.3f} s (runs: "
                  f"{', '.join(f'{w:.3f}' for w in walls)}); read back "
                  f"{'bit for bit' if same else f'differs, largest relative {worst:.2e}'}")


if __name__ == "__main__":
    main()
