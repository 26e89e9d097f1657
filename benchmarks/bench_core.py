"""Issue 2 benchmarks: cruise grid vs bare numpy, and `cruiseplan table` start-up.

Reports ratios measured in one run (no timed assertions):
1. the 1000 x 1000 altitude x TAS cruise grid through the public API against a bare-numpy
   script computing the same outputs on the same machine (target <= 1.5x);
2. `cruiseplan table` on a bundled airframe, end to end, against `python -c "import numpy"`
   (target <= 5x).
"""

from __future__ import annotations

import subprocess
import sys
import time
from dataclasses import replace
from pathlib import Path

import numpy as np

import cruiseplan as cp
from cruiseplan.physics.atmosphere import isa_temperature_pressure
from cruiseplan.physics.propulsion import PropellerEfficiency


def best_of(fn, repeat=5):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def bare_numpy_grid(h, v, mass, S, cd0, k, cl_max, eta, bsfc, p_rated, rho_fuel, store,
                    T_isa, p):
    """The same outputs as cruise_grid, written out by hand (ISA precomputed, as the API
    evaluates it once per altitude vector too)."""
    T = T_isa[:, None]
    rho = p[:, None] / (287.05287 * T)
    a = np.sqrt(1.4 * 287.05287 * T)
    mu = 1.458e-6 * T**1.5 / (T + 110.4)  # noqa: F841 - computed by the API too
    vv = v[None, :]
    qs = 0.5 * rho * vv * vv * S
    cl = mass * 9.80665 / qs
    cd = cd0 + k * cl * cl
    drag = qs * cd
    tp = drag * vv
    shaft = tp / eta
    sigma = rho / 1.225
    avail = p_rated * np.maximum(1.132 * sigma - 0.132, 0.0)
    flow = bsfc * shaft
    out = dict(cl=cl, cd=cd, ld=cl / cd, drag=drag, tp=tp, shaft=shaft, src=flow * 43.5e6,
               avail=avail, margin=avail - shaft, flow=flow, vflow=flow / rho_fuel,
               sr=vv / flow, srg=vv / flow, end=store / flow, rng=vv * (store / flow),
               rngg=vv * (store / flow), vs=np.sqrt(cl_max / cl))
    lim = (cl > cl_max / 1.69).astype(np.uint16)
    lim |= (shaft > avail).astype(np.uint16) << 1
    lim |= (vv > 0.6 * a).astype(np.uint16) << 3
    out["lim"] = lim
    return out


def main():
    # The trainer with the constant propeller efficiency the bare-numpy side writes out
    # (the bundled file gives a diameter: momentum theory).
    af = cp.load_airframe("demo-trainer")
    af = replace(af, propulsion=replace(af.propulsion,
                                        propeller=PropellerEfficiency((0.0,), (0.72,))))
    h = np.linspace(0.0, 4000.0, 1000)
    v = np.linspace(30.0, 80.0, 1000)
    load = af.loading()
    pol, prop = af.polar, af.propulsion

    def api():
        g = cp.cruise_grid(af, h, v)
        return g.specific_range_air

    def bare():
        T_isa, p = isa_temperature_pressure(h)  # ISA once per altitude vector, as the API
        return bare_numpy_grid(h, v, load.mass, af.wing_area, pol.cd0, pol.k, af.cl_max,
                               prop.propeller.efficiency[0], prop.bsfc, prop.rated_power,
                               prop.fuel_density, load.store, T_isa, p)["sr"]

    # Same answers first, where the API gives figures (it shows none beyond a limit).
    a, b = api(), bare()
    shown = np.isfinite(a)
    assert shown.any() and np.allclose(a[shown], b[shown], rtol=1e-12)
    t_api, t_bare = best_of(api), best_of(bare)
    print(f"cruise grid 1000x1000: API {t_api * 1e3:.1f} ms, bare numpy {t_bare * 1e3:.1f} ms, "
          f"ratio {t_api / t_bare:.2f} (target <= 1.5)")

    exe = Path(sys.executable).parent / "cruiseplan"
    cmd_table = [str(exe), "table", "demo-trainer", "--power", "55,65,75"]
    cmd_numpy = [sys.executable, "-c", "import numpy"]
    run = lambda cmd: subprocess.run(cmd, check=True, capture_output=True)  # noqa: E731
    run(cmd_table)  # warm the pint cache and the file system
    t_table = best_of(lambda: run(cmd_table), repeat=5)
    t_numpy = best_of(lambda: run(cmd_numpy), repeat=5)
    print(f"`cruiseplan table` end to end {t_table * 1e3:.0f} ms, `python -c 'import numpy'` "
          f"{t_numpy * 1e3:.0f} ms, ratio {t_table / t_numpy:.2f} (target <= 5)")


if __name__ == "__main__":
    main()
