"""Issue 4 benchmark: a 200-leg mission with `best` altitudes and speeds.

Reports the planning time and its ratio to one 1000 x 1000 cruise-grid call (target:
under 1 s on this machine).
"""

from __future__ import annotations

import time

import numpy as np

import cruiseplan as cp
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.model.mission import Leg, Mission, Profile, Reserve
from cruiseplan.planning.mission import plan_mission


def main():
    af = cp.load_airframe("demo-tourer")
    rng = np.random.default_rng(7)
    wind = parse_wind_profile("250/15kt@2000ft,260/30kt@6000ft,270/40kt@10000ft")
    legs = tuple(Leg(f"leg {i}", float(d) * 1852.0, course=float(c), wind=wind)
                 for i, (d, c) in enumerate(zip(rng.uniform(5, 60, 200),
                                                rng.uniform(0, 360, 200))))
    mission = Mission("bench", af, legs, Reserve("time", 45 * 60.0),
                      Profile(departure_elevation=150.0, arrival_elevation=300.0),
                      isa_dev=10.0, mass=1100.0, allowance=3.0)
    # A long route on one tank: the point is the planning time, not the verdict.
    t0 = time.perf_counter()
    plan = plan_mission(mission)
    t_plan = time.perf_counter() - t0
    h = np.linspace(0.0, 4000.0, 1000)
    v = np.linspace(30.0, 80.0, 1000)
    cp.cruise_grid(af, h, v)
    t0 = time.perf_counter()
    cp.cruise_grid(af, h, v)
    t_grid = time.perf_counter() - t0
    print(f"200-leg mission with best altitudes and speeds: {t_plan * 1e3:.0f} ms "
          f"(target < 1000 ms), {len(plan.segments)} segments; one 1000x1000 cruise grid "
          f"{t_grid * 1e3:.1f} ms; ratio {t_plan / t_grid:.1f}")


if __name__ == "__main__":
    main()
