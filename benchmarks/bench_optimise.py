"""Issue 17 benchmark: best cruise at 1000 altitudes against a per-altitude scipy loop.

Figure (no timed assertions; medians of interleaved runs):

**scipy loop / best_cruise** [-] at 1000 altitudes (target >= 100). The loop calls
``scipy.optimize.minimize_scalar(method="bounded")`` with its default tolerance once per
altitude, for the one problem a user wants solved, the best-range TAS, on plain Python
floats: closed-form troposphere density, CL, CD, drag, shaft power and fuel flow written
out with ``math``. ``best_cruise(airframe, h, objective="range")`` is the public call with
everything it returns (all objectives' speeds, the power window, the binding limits, the
best altitude).

The airframe is ``demo-trainer`` with a constant propeller efficiency, in calm air, where
the best-range TAS has the closed form V(L/D)max = sqrt(2 W / (rho S)) (k / CD0)^(1/4)
(Anderson, *Aircraft Performance and Design*, 1999, eq. 5.34). The API's best-range TAS
must lie within 1e-6 relative of it (printed with the loop's own error, for information).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
from figures import figure, interleaved
from scipy.optimize import minimize_scalar

import cruiseplan as cp
from cruiseplan.physics.propulsion import PropellerEfficiency
from cruiseplan.planning.optimise import best_cruise

#: Timed runs of each side.
RUNS = 15


def scipy_loop(h, mass, S, cd0, k, eta, bsfc, cl_max):
    """Best-range TAS per altitude by a scalar bounded minimiser on plain floats."""
    out = []
    for hi in h:
        T = 288.15 - 0.0065 * hi
        rho = 101325.0 * (T / 288.15) ** (9.80665 / (0.0065 * 287.05287)) / (287.05287 * T)
        weight = mass * 9.80665

        def minus_specific_range(v, rho=rho, weight=weight):
            qs = 0.5 * rho * v * v * S
            cl = weight / qs
            shaft = qs * (cd0 + k * cl * cl) * v / eta
            return -v / (bsfc * shaft)

        v_stall = math.sqrt(2 * weight / (rho * S * cl_max))
        top = 0.6 * math.sqrt(1.4 * 287.05287 * T)
        out.append(minimize_scalar(minus_specific_range, bounds=(0.5 * v_stall, top),
                                   method="bounded").x)
    return np.array(out)


def main():
    af = cp.load_airframe("demo-trainer")
    af = replace(af, propulsion=replace(af.propulsion,
                                        propeller=PropellerEfficiency((0.0,), (0.72,))))
    load = af.loading()
    pol, prop = af.polar, af.propulsion
    h = np.linspace(0.0, 3000.0, 1000)

    def api():
        return best_cruise(af, h, objective="range")

    def loop():
        return scipy_loop(h, load.mass, af.wing_area, pol.cd0, pol.k, 0.72, prop.bsfc,
                          af.cl_max)

    T = 288.15 - 0.0065 * h
    rho = 101325.0 * (T / 288.15) ** (9.80665 / (0.0065 * 287.05287)) / (287.05287 * T)
    v_md = np.sqrt(2 * load.mass * 9.80665 / (rho * af.wing_area)) * (pol.k / pol.cd0) ** 0.25
    err_api = np.max(np.abs(api().schedule.tas_unconstrained["range"] / v_md - 1))
    err_loop = np.max(np.abs(loop() / v_md - 1))
    t = interleaved({"loop": loop, "api": api}, RUNS)
    figure("scipy loop / best_cruise, 1000 altitudes", t["loop"] / t["api"], 100.0,
           at_most=False, fmt=".0f",
           detail=f"loop {t['loop'] * 1e3:.0f} ms, best_cruise {t['api'] * 1e3:.2f} ms "
                  f"(medians)")
    figure("best-range TAS vs closed-form V(L/D)max, largest relative difference", err_api,
           1e-6, fmt=".1e", detail=f"scipy loop {err_loop:.1e}")


if __name__ == "__main__":
    main()
