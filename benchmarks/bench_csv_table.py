"""Time of a 1e6-point cruise table written as CSV (1001 altitudes x 1000 speeds).

Reports the API's grid alone and the whole command (grid, report, column-wise CSV
formatting, atomic write). Issue 15 measured 34-41 s for the command when the CSV was
formatted cell by cell, against 0.4 s for the grid.

Run: ``python benchmarks/bench_csv_table.py``.
"""

import os
import tempfile
import time

import numpy as np

import cruiseplan as cp
from cruiseplan.cli import main

FT, KT = 0.3048, 1852.0 / 3600.0

af = cp.load_airframe("demo-trainer")
h = np.arange(0.0, 10000.1, 10.0) * FT
v = np.arange(50.0, 149.95, 0.1) * KT
t0 = time.perf_counter()
cp.cruise_grid(af, h, v)
t_grid = time.perf_counter() - t0
with tempfile.TemporaryDirectory() as tmp:
    out = os.path.join(tmp, "big.csv")
    t0 = time.perf_counter()
    status = main(["table", "demo-trainer", "--altitudes", "0:10000ft:10ft", "--speeds",
                   "50:149.9kt:0.1kt", "--format", "csv", "-o", out])
    t_cli = time.perf_counter() - t0
    size = os.path.getsize(out) / 2**20
print(f"1e6-point table ({h.size} x {v.size}): grid {t_grid:.2f} s; CSV command "
      f"{t_cli:.1f} s ({size:.0f} MB, exit {status})")
