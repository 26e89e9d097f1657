"""Issue 17 benchmark: a long mission file loaded and planned, and the time per leg.

Figures (no timed assertions; medians of interleaved runs):

1. **200-leg mission, load + plan** [s]: ``load_mission`` of a 200-leg mission file for
   ``demo-tourer`` (legs of 5-60 nm, random courses, winds aloft, ``best`` altitudes and
   speeds) then ``plan_mission``, timed together, median of ``RUNS`` (target <= 0.3 s).
   The first run is a warm-up (imports, the bundled airframe's file read), not timed; every
   timed run loads the file again. The tourer's fuel lasts about 20 of the legs: the
   planner flies the others past the empty tank (to say by how much it falls short),
   where the mass stays at the zero-fuel mass.
2. **Time per leg, 1000 legs / 10 legs** [-]: the median load + plan time per leg of the
   first 1000 legs of the same route over that of its first 10 legs, the two mission sizes
   timed in turn (10, 1000, 10, 1000, ...) (target <= 1.25: flat).
3. **A route flown within the fuel, in passes / leg by leg** [-]: ``plan_mission`` of a
   60-leg ``demo-tourer`` route (legs of 1.5-18 nm, full tanks, GO, fuel burning on every
   leg) as planned (runs of legs worked out in passes, ``PASS_LEGS``), over the baseline:
   the same plan with ``PASS_LEGS = 1``, every leg worked out on its own (the same
   figures to the bit), medians of interleaved runs (target <= 0.8: the passes pay where
   every leg changes the mass, not only past an empty tank).
"""

from __future__ import annotations

import tempfile
from pathlib import Path

import numpy as np
from figures import figure, interleaved

from cruiseplan.io.mission_file import load_mission
from cruiseplan.planning import mission as planner
from cruiseplan.planning.mission import plan_mission

#: Timed runs of each side.
RUNS = 7


def mission_text(n_legs: int, *, seed: int = 7, scale: float = 1.0,
                 loading: str = 'takeoff_mass = "1100 kg"') -> str:
    """A mission file of ``n_legs`` legs (the same route for every size, cut at n)."""
    rng = np.random.default_rng(seed)
    dist, course = rng.uniform(5, 60, 1000) * scale, rng.uniform(0, 360, 1000)
    lines = ['[mission]', 'description = "benchmark route"', 'airframe = "demo-tourer"',
             loading, '[day]', 'isa_dev = "+10 K"', '[profile]',
             'departure_elevation = "150 m"', 'arrival_elevation = "300 m"',
             '[allowances]', 'start_taxi_takeoff = "3 kg"', '[reserve]', 'time = "45 min"']
    for i in range(n_legs):
        lines += ['[[legs]]', f'name = "leg {i}"', f'distance = "{dist[i]:.3f} nm"',
                  f'course = {course[i]:.2f}', 'altitude = "best"', 'speed = "best"',
                  'wind = "250/15kt@2000ft,260/30kt@6000ft,270/40kt@10000ft"']
    return "\n".join(lines) + "\n"


def main():
    with tempfile.TemporaryDirectory() as tmp:
        paths = {}
        for n in (10, 200, 1000):
            paths[n] = Path(tmp) / f"route-{n}.toml"
            paths[n].write_text(mission_text(n))

        def load_and_plan(n):
            return lambda: plan_mission(load_mission(paths[n]))

        plan = plan_mission(load_mission(paths[200]))
        t200 = interleaved({"200": load_and_plan(200)}, RUNS)["200"]
        figure("200-leg mission file, load + plan", t200, 0.3, fmt=".3f", unit=" s",
               detail=f"{len(plan.segments)} segments, {t200 / 200 * 1e3:.2f} ms per leg")
        t = interleaved({10: load_and_plan(10), 1000: load_and_plan(1000)}, 3)
        per10, per1000 = t[10] / 10, t[1000] / 1000
        figure("time per leg, 1000 legs / 10 legs", per1000 / per10, 1.25,
               detail=f"{per10 * 1e3:.2f} ms per leg at 10 legs, {per1000 * 1e3:.2f} ms at "
                      f"1000 (load + plan, medians of 3 interleaved)")
        fuel_route = Path(tmp) / "within-fuel.toml"
        fuel_route.write_text(mission_text(60, seed=11, scale=0.3, loading='fuel = "100 %"'))
        mission = load_mission(fuel_route)
        plan = plan_mission(mission)
        width = planner.PASS_LEGS

        def planned(w):
            def run():
                planner.PASS_LEGS = w
                try:
                    return plan_mission(mission)
                finally:
                    planner.PASS_LEGS = width
            return run

        t = interleaved({"passes": planned(width), "alone": planned(1)}, RUNS)
        figure("60-leg route within the fuel, in passes / leg by leg",
               t["passes"] / t["alone"], 0.8,
               detail=f"{t['passes'] * 1e3:.0f} ms and {t['alone'] * 1e3:.0f} ms, "
                      f"{'GO' if plan.go else 'NO-GO'}, "
                      f"{sum(x.used for x in plan.segments if x.flown):.1f} kg of fuel")


if __name__ == "__main__":
    main()
