"""Issue 12 benchmark: the equivalent-circuit pack against today's energy model, per point.

The baseline is today's energy model: the same airframe (the fixed-wing survey drone with
its 6-cell pack, ``demo-survey-drone-6s``) with the pack as a fixed usable energy and a
Peukert exponent of 1.03 (``battery_energy`` / ``peukert_exponent``, no circuit), through
the same public cruise grid (``cruise_grid``: level flight, limits, store rate, endurance,
range; every output read, ``figures.full_grid``, as the grid derives most of them when
first read). The other side is the same grid with the pack as its internal-resistance circuit
(a constant-power discharge to the loaded cut-off at every point, with its pack limits).
Both run interleaved in one process, several times each; the ratio of the medians is
reported (target <= 2x per grid point). A second ratio does the same for the planner
(``plan_mission`` of a survey run, the state of charge followed through every segment).
No timed assertion: the ratios are printed.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
from figures import figure, full_grid, interleaved

import cruiseplan as cp
from cruiseplan.io.mission_file import read_mission
from cruiseplan.planning.mission import plan_mission


def todays_model(af):
    """The airframe with its pack as today's fixed energy and Peukert exponent 1.03."""
    prop = af.propulsion
    return replace(af, propulsion=replace(prop, circuit=None, peukert_exponent=1.03,
                                          battery_energy=prop.store_capacity))


def main():
    circuit = cp.load_airframe("demo-survey-drone-6s").at_pack_temperature(15.0)
    today = todays_model(circuit)
    h = np.linspace(0.0, 1000.0, 300)
    v = np.linspace(14.0, 40.0, 300)
    med = interleaved({"today": lambda: full_grid(today, h, v),
                       "circuit": lambda: full_grid(circuit, h, v)}, runs=9)
    t_today, t_circuit = med["today"], med["circuit"]
    n = h.size * v.size
    figure("cruise grid 300x300, equivalent circuit / today's energy model",
           t_circuit / t_today, 2.0, detail=f"{t_today / n * 1e9:.0f} ns and "
           f"{t_circuit / n * 1e9:.0f} ns per point")

    here = Path(__file__).resolve().parent.parent
    text = (here / "missions" / "demo-survey-run.toml").read_text(encoding="utf-8")
    path = Path("/tmp") / "cruiseplan-bench-battery.toml"
    path.write_text(text.replace('airframe = "demo-survey-drone"',
                                 'airframe = "demo-survey-drone-6s"'), encoding="utf-8")
    mission = read_mission(path)
    plain = replace(mission, airframe=todays_model(mission.airframe))
    med = interleaved({"plain": lambda: plan_mission(plain),
                       "pack": lambda: plan_mission(mission)}, runs=5)
    t_plain, t_pack = med["plain"], med["pack"]
    print(f"plan of demo-survey-run on the 6-cell pack: today's energy model "
          f"{t_plain * 1e3:.0f} ms, equivalent circuit {t_pack * 1e3:.0f} ms, ratio "
          f"{t_pack / t_plain:.2f}")


if __name__ == "__main__":
    main()
