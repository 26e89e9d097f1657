"""Generate logs/demo-trainer-flight-test.csv, an invented level-flight log for the demo.

The points are computed from the bundled demo-trainer airframe (cd0 0.036, oswald_e 0.76,
propeller efficiency 0.72, BSFC 0.46 lb/(hp h), avgas) at two weights (two flights) and two
pressure altitudes on an ISA +8 K day, with instrument noise added: fuel flow 1.5 %, CAS
0.5 kt, OAT 0.5 degC, vertical speed 30 ft/min (1 sigma). Two rows are spoiled on purpose:
one still climbing at 160 ft/min (the reader drops it as not level) and one with a fuel-flow
reading 12 % high (the fit drops it as an outlier). No real aircraft or flight.

Run from the repository root: ``.venv/bin/python logs/make_demo_log.py``.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

import cruiseplan as cp
from cruiseplan.constants import G0
from cruiseplan.physics.airspeed import tas_from_cas
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.planning.performance import cruise_points

SEED = 7
OUT = Path(__file__).resolve().parent / "demo-trainer-flight-test.csv"
FT, KT, LB = 0.3048, 1852.0 / 3600.0, 0.45359237
ISA_DEV = 8.0
#: Each flight: take-off mass [kg] and its blocks of (pressure altitude [ft], CAS [kt]).
FLIGHTS = (
    (752.0, ((2000.0, np.linspace(62.0, 100.0, 7)),     # two aboard, full fuel
             (7000.0, np.linspace(62.0, 88.0, 7)))),
    (655.0, ((2000.0, np.linspace(58.0, 100.0, 7)),     # solo, part fuel
             (7000.0, np.linspace(58.0, 90.0, 7)))),
)
MINUTES_PER_POINT = 4.0


def main() -> None:
    """Compute the points, add the noise and the two spoiled rows, write the CSV."""
    af = cp.load_airframe("demo-trainer")
    prop = af.propulsion
    rng = np.random.default_rng(SEED)
    rows = []
    for mass0, blocks in FLIGHTS:
        mass = mass0
        for pa_ft, cas_kt in blocks:
            h = pa_ft * FT
            air = air_state(np.array([h]), ISA_DEV)
            tas = tas_from_cas(cas_kt * KT, air.pressure, air.speed_of_sound)
            for v, c in zip(tas, cas_kt):
                pts = cruise_points(af, mass, air, np.array([v]), prop.store_capacity)
                shaft = float(pts.shaft_power[0])
                if shaft > 0.95 * float(pts.power_available[0]):
                    raise SystemExit(f"{c:.0f} kt at {pa_ft:.0f} ft needs more power than "
                                     "the engine gives: change FLIGHTS")
                fuel = prop.bsfc * shaft                     # kg/s
                rows.append([h, float(air.temperature[0]), c * KT, mass, fuel, 0.0, v])
                mass -= fuel * MINUTES_PER_POINT * 60.0
    data = np.array(rows)
    n = len(data)
    data[:, 1] += 0.5 * rng.standard_normal(n)
    data[:, 2] += 0.5 * KT * rng.standard_normal(n)
    data[:, 4] *= 1.0 + 0.015 * rng.standard_normal(n)
    data[:, 5] = 30.0 * FT / 60.0 * rng.standard_normal(n)
    # Spoiled rows: still climbing (with the climb's extra power), and a misread fuel flow.
    climbing, misread = 9, 17
    data[climbing, 5] = 160.0 * FT / 60.0
    climb_power = data[climbing, 3] * G0 * data[climbing, 5]          # W v_z [W]
    data[climbing, 4] += prop.bsfc * climb_power / prop.propeller(data[climbing, 6])
    data[misread, 4] *= 1.12

    lines = [
        "# Invented flight-test log for the demo-trainer airframe: no real aircraft or flight.",
        "# Made by logs/make_demo_log.py from the airframe's polar (cd0 0.036, oswald_e 0.76)",
        "# with instrument noise; one row still climbing, one with a misread fuel flow.",
        "pressure_altitude [ft],oat [degC],cas [kt],weight [lb],fuel_flow [L/h],"
        "vertical_speed [ft/min]",
    ]
    for h, t, cas, m, fuel, vs, _ in data:
        litres_per_hour = fuel / prop.fuel_density * 1000.0 * 3600.0
        lines.append(f"{h / FT:.0f},{t - 273.15:.1f},{cas / KT:.1f},{m / LB:.0f},"
                     f"{litres_per_hour:.2f},{round(vs / FT * 60.0)}")
    OUT.write_text("\n".join(lines) + "\n", encoding="utf-8")
    print(f"wrote {OUT} ({n} rows)")


if __name__ == "__main__":
    main()
