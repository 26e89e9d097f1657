"""Issue 17 benchmark: the cruise grid against bare numpy of the same chain, and its memory.

Figures (no timed assertions; medians of interleaved runs):

1. **Grid / bare numpy** [-] at 1000 x 1000 and at 100 x 100 points: the median time of
   ``cruise_grid(airframe, h, v)`` (the call alone; outputs it derives on first read are
   not read) over the median time of a bare-numpy function computing the same chain from
   the altitude and speed vectors: closed-form troposphere temperature, pressure and
   density (inside the timing), then CL, CD, drag, shaft power and fuel flow on the grid,
   nothing else. Targets: <= 1.5 at 1e6 points, <= 3 at 1e4.
2. **Peak memory per point** [bytes] of ``cruise_grid`` at 1000 x 1000 (tracemalloc
   peak of the call over the number of points; target <= 60). Bare numpy's own peak is
   printed beside it.
3. **`cruiseplan table` start-up** is measured by ``bench_startup.py``.

The airframe is ``demo-trainer`` with the constant propeller efficiency the bare side
writes out (the bundled file gives a diameter: momentum theory). Both sides must agree
(drag and shaft power to 1e-9 relative) before anything is timed.
"""

from __future__ import annotations

import tracemalloc
from dataclasses import replace

import numpy as np
from figures import figure, interleaved

import cruiseplan as cp
from cruiseplan.physics.propulsion import PropellerEfficiency

#: Timed runs of each side.
RUNS = 9


def bare_numpy_chain(h, v, mass, S, cd0, k, eta, bsfc):
    """CL, CD, drag, shaft power and fuel flow by hand, ISA troposphere in closed form.

    ``h`` is geopotential altitude [m] (below 11 km), ``v`` TAS [m/s].
    """
    T = 288.15 - 0.0065 * h
    p = 101325.0 * (T / 288.15) ** (9.80665 / (0.0065 * 287.05287))
    rho = (p / (287.05287 * T))[:, None]
    qs = 0.5 * rho * (v * v)[None, :] * S
    cl = mass * 9.80665 / qs
    cd = cd0 + k * cl * cl
    drag = qs * cd
    shaft = drag * v[None, :] / eta
    return cl, cd, drag, shaft, bsfc * shaft


def main():
    af = cp.load_airframe("demo-trainer")
    af = replace(af, propulsion=replace(af.propulsion,
                                        propeller=PropellerEfficiency((0.0,), (0.72,))))
    load = af.loading()
    pol, prop = af.polar, af.propulsion
    for n, target in ((1000, 1.5), (100, 3.0)):
        h = np.linspace(0.0, 4000.0, n)
        v = np.linspace(30.0, 80.0, n)

        def api(h=h, v=v):
            return cp.cruise_grid(af, h, v)

        def bare(h=h, v=v):
            return bare_numpy_chain(h, v, load.mass, af.wing_area, pol.cd0, pol.k, 0.72,
                                    prop.bsfc)

        g, b = api(), bare()
        assert np.allclose(g.drag, b[2], rtol=1e-9) and np.allclose(g.shaft_power, b[3],
                                                                    rtol=1e-9)
        t = interleaved({"api": api, "bare": bare}, RUNS if n == 1000 else 10 * RUNS)
        figure(f"cruise grid {n}x{n} / bare numpy", t["api"] / t["bare"], target,
               detail=f"API {t['api'] * 1e3:.3f} ms, bare numpy {t['bare'] * 1e3:.3f} ms "
                      f"(medians)")
    h = np.linspace(0.0, 4000.0, 1000)
    v = np.linspace(30.0, 80.0, 1000)
    peaks = {}
    for name, fn in (("api", lambda: cp.cruise_grid(af, h, v)),
                     ("bare", lambda: bare_numpy_chain(h, v, load.mass, af.wing_area,
                                                       pol.cd0, pol.k, 0.72, prop.bsfc))):
        tracemalloc.start()
        fn()
        peaks[name] = tracemalloc.get_traced_memory()[1] / h.size / v.size
        tracemalloc.stop()
    figure("cruise grid peak memory per point", peaks["api"], 60.0, fmt=".0f",
           unit=" bytes", detail=f"bare numpy {peaks['bare']:.0f} bytes")


if __name__ == "__main__":
    main()
