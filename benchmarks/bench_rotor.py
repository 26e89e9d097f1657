"""Issue 5 benchmark: the multirotor cruise grid against the fixed-wing grid, per point.

Reports the cost per grid point of the mapping quadcopter (momentum theory with Glauert's
inflow solved by vectorised Newton steps, attached-body drag by Reynolds number) and of
the fixed-wing trainer, in one run, and their ratio (target <= 3x). Each grid has every
output read (``figures.full_grid``: the grid derives most of them when first read), the
work a table of it takes. Also the build-up
polar (Reynolds-dependent skin friction) against the fixed parabolic polar.
"""

from __future__ import annotations

import time

import numpy as np
from figures import figure, full_grid

import cruiseplan as cp


def per_point(af, h, v, repeat=5):
    full_grid(af, h, v)
    best = min(_timed(lambda: full_grid(af, h, v)) for _ in range(repeat))
    return best / (h.size * v.size)


def _timed(fn):
    t0 = time.perf_counter()
    fn()
    return time.perf_counter() - t0


def main():
    h = np.linspace(0.0, 3000.0, 500)
    wing = cp.load_airframe("demo-trainer")
    quad = cp.load_airframe("demo-mapping-quad")
    built = cp.load_airframe("demo-sensor-wing")
    t_wing = per_point(wing, h, np.linspace(30.0, 80.0, 500))
    t_quad = per_point(quad, h, np.linspace(1.0, 25.0, 500))
    t_built = per_point(built, h, np.linspace(12.0, 35.0, 500))
    figure("cruise grid 500x500 per point, multirotor / fixed-wing", t_quad / t_wing, 3.0,
           detail=f"fixed-wing {t_wing * 1e9:.0f} ns, multirotor {t_quad * 1e9:.0f} ns")
    print(f"build-up polar (Reynolds-dependent CD0) {t_built * 1e9:.0f} ns per point, "
          f"ratio to the fixed polar {t_built / t_wing:.2f}")


if __name__ == "__main__":
    main()
