"""Issue 12 benchmark: planning a survey of 200 lines with pack swaps.

Reports the time of `plan_survey` (lay the lines, split them into packs by a search on
the planner) for 200 lines (target < 0.5 s on this machine), the planner calls it made and
the packs found; with the direction given and with the least-energy direction searched,
for the fixed-wing survey drone and the mapping quadcopter (whose rotor model costs about
three times as much per planned leg). A pack's lines on one course are planned as one leg;
for comparison, one pack planned line by line. No timed assertions.
"""

from __future__ import annotations

import time

import numpy as np
from figures import figure

import cruiseplan as cp
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.model.mission import Leg, Mission, Profile, Reserve
from cruiseplan.model.survey import Survey
from cruiseplan.physics.geo import local_latlon
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.survey import pack_mission, plan_survey

#: Invented centre, open country.
CENTRE = (44.30, -101.20)


def field(width, length):
    x = np.array([-1, 1, 1, -1]) * width / 2
    y = np.array([-1, -1, 1, 1]) * length / 2
    lat, lon = local_latlon(x, y, *CENTRE)
    return tuple(zip(lat.tolist(), lon.tolist()))


def mission(airframe, width, length, spacing, tas, turn, direction):
    af = cp.load_airframe(airframe)
    wind = parse_wind_profile("250/5m/s@0m,235/9m/s@100m")
    leg = Leg("survey", 1.0, wind=wind, altitude=195.0, tas=tas, elevation=95.0,
              max_agl=120.0)
    lat, lon = local_latlon(0.0, -length / 2 - 100.0, *CENTRE)
    survey = Survey(field(width, length), (float(lat), float(lon)), spacing, leg,
                    direction=direction, turn_distance=turn)
    return Mission("bench survey", af, (), Reserve("fraction", 0.25),
                   Profile(departure_elevation=85.0, arrival_elevation=85.0, climb_rate=3.0,
                           descent_rate=2.0, min_clearance=30.0, altitude_step=10.0,
                           top=1000.0), survey=survey)


def best_of(fn, repeat=3):
    times, out = [], None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out


def main():
    cases = [
        ("demo-survey-drone", 8000.0, 1000.0, 40.0, 18.0, 40.0),
        ("demo-mapping-quad", 1000.0, 100.0, 5.0, 12.0, 10.0),
    ]
    for airframe, width, length, spacing, tas, turn in cases:
        for direction, how in ((0.0, "direction given"), (None, "direction searched")):
            m = mission(airframe, width, length, spacing, tas, turn, direction)
            t, sp = best_of(lambda m=m: plan_survey(m))
            figure(f"survey {airframe}, {len(sp.layout.lines)} lines, {how}", t * 1e3,
                   500.0, fmt=".0f", unit=" ms", detail=f"{sp.planner_calls} planner calls, "
                   f"{len(sp.packs)} packs, {sp.verdict}")
        pack = sp.packs[0]
        for grouped in (True, False):
            pm = pack_mission(m, sp.layout, pack.first, pack.last, grouped=grouped)
            t, plan = best_of(lambda pm=pm: plan_mission(pm))
            print(f"  one pack of {pack.lines} lines planned "
                  f"{'by course' if grouped else 'line by line'}: {len(pm.legs)} legs, "
                  f"{t * 1e3:.0f} ms, used {plan.used / 3600:.3f} Wh")


if __name__ == "__main__":
    main()
