"""Issue 13 benchmark: a cruise grid as a labelled xarray Dataset, against computing the grid.

The baseline is the grid's own compute time: ``cruise_grid`` of the demo trainer over a
1000 x 1000 altitude x TAS grid through the public API (level flight, limits, store rate,
endurance, range; no conversion). The other side is ``to_xarray()`` of that finished grid:
coordinates, every field with its ``units`` and ``long_name``, the limits as a CF flag
variable (xarray imported before timing, as a notebook has it). Both run interleaved in one
process, several times each; the ratio of the medians is reported (target <= 0.2x). No timed
assertion: the ratio is printed.
"""

from __future__ import annotations

import numpy as np
import xarray  # noqa: F401 - imported before timing, as in a notebook
from figures import figure, interleaved

import cruiseplan as cp


def main():
    af = cp.load_airframe("demo-trainer")
    h = np.linspace(0.0, 4000.0, 1000)
    v = np.linspace(30.0, 80.0, 1000)
    grid = cp.cruise_grid(af, h, v)
    ds = grid.to_xarray()
    # Same figures first: the Dataset holds the grid.
    assert ds.sizes == {"altitude": 1000, "airspeed": 1000}
    np.testing.assert_array_equal(ds["range_ground"].values, grid.range_ground)
    med = interleaved({"grid": lambda: cp.cruise_grid(af, h, v), "xr": grid.to_xarray}, runs=9)
    t_grid, t_xr = med["grid"], med["xr"]
    figure("to_xarray() / cruise_grid, 1000x1000", t_xr / t_grid, 0.2, fmt=".3f",
           detail=f"to_xarray() {t_xr * 1e3:.1f} ms, cruise_grid {t_grid * 1e3:.1f} ms")


if __name__ == "__main__":
    main()
