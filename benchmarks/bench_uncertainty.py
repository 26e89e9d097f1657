"""Issue 6 benchmark: a 10,000-sample Monte Carlo re-flight of a 10-leg mission.

Target under 2 s on this machine, vectorised over the samples (the atmosphere is
evaluated once per altitude step, not per sample). Also reports one deterministic plan of
the same mission for scale.

Issue 14: the peak resident memory (VmHWM, the process's own) of a new process that runs
1,000,000 samples of the same plan; target under 200 MB (the samples are flown in chunks,
so the peak is set by the chunk, not by the number of samples).
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

import numpy as np
from figures import figure

import cruiseplan as cp
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.model.mission import Leg, Mission, Profile, Reserve
from cruiseplan.model.tolerance import WindTolerance
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.uncertainty import plan_uncertainty

MILLION_CHILD = """
import re, sys
sys.path.insert(0, sys.argv[1])
from bench_uncertainty import ten_leg_plan
from cruiseplan.planning.uncertainty import plan_uncertainty
u = plan_uncertainty(ten_leg_plan(), 1_000_000, seed=0)
with open("/proc/self/status") as f:
    print(re.search(r"VmHWM:\\s*(\\d+) kB", f.read()).group(1), u.reserve_probability)
"""


def ten_leg_plan():
    """The plan of the benchmark's 10-leg mission (invented legs)."""
    af = cp.load_airframe("demo-trainer")
    rng = np.random.default_rng(3)
    wind = parse_wind_profile("250/15kt@2000ft,260/30kt@6000ft")
    legs = tuple(Leg(f"leg {i}", float(d) * 1852.0, course=float(c), wind=wind)
                 for i, (d, c) in enumerate(zip(rng.uniform(10, 40, 10),
                                                rng.uniform(0, 360, 10))))
    mission = Mission("bench", af, legs, Reserve("time", 45 * 60.0),
                      Profile(departure_elevation=150.0, arrival_elevation=300.0),
                      isa_dev=10.0, allowance=3.0,
                      wind_tolerance=WindTolerance(2.5, 15.0))
    return plan_mission(mission)


def main():
    ten_leg_plan()
    t0 = time.perf_counter()
    plan = ten_leg_plan()
    t_plan = time.perf_counter() - t0
    plan_uncertainty(plan, 1000, seed=0)  # warm imports (scipy.stats)
    t0 = time.perf_counter()
    u = plan_uncertainty(plan, 10_000, seed=0)
    t_mc = time.perf_counter() - t0
    s = u.summary()
    figure("10-leg mission, 10,000-sample Monte Carlo", t_mc * 1e3, 2000.0, fmt=".0f",
           unit=" ms", detail=f"plan {t_plan * 1e3:.0f} ms; fuel at landing P10/P50/P90 "
           + " / ".join(f"{q / 0.72:.1f}" for q in s["remaining"])
           + f" L; reserve holds in {s['reserve_probability'] * 100:.1f} % of samples")
    here = str(Path(__file__).resolve().parent)
    t0 = time.perf_counter()
    out = subprocess.run([sys.executable, "-c", MILLION_CHILD, here], capture_output=True,
                         text=True, check=True).stdout.split()
    figure("10-leg mission, 1,000,000-sample Monte Carlo, peak resident memory",
           int(out[0]) / 1024, 200.0, fmt=".0f", unit=" MB",
           detail=f"{time.perf_counter() - t0:.0f} s in a new process; reserve holds in "
           f"{float(out[1]) * 100:.1f} % of samples")


if __name__ == "__main__":
    main()
