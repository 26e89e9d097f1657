"""Each planning concept is defined once, so every path that uses it agrees.

- One store rate: specific range x usable store = range, for every bundled airframe, in the
  Python API and in every output format (exact identities, so the tolerances are rounding:
  1e-12 on SI arrays, 1e-14 through the display-unit factors of JSON (measured 4.4e-16),
  and half a unit in the last printed digit for text and CSV).
- One reserve: the card and the mission planner keep the same reserve for the same
  airframe, mass, altitude and policy.
"""

from __future__ import annotations

import contextlib
import csv
import io
import json
from dataclasses import replace

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.io.text import parse_reserve
from cruiseplan.planning.reserve import reserve_required
from cruiseplan.report.card import card_content
from cruiseplan.units import display

AIRFRAMES = sorted(cp.bundled_airframes())


def test_all_seven_bundled_airframes_are_checked():
    # Five, and since issue 12 the two demo airframes whose packs are circuits.
    assert len(AIRFRAMES) == 7


def grid(af):
    batteries = not af.propulsion.store.burns_mass
    h = np.array([0.0, 150.0, 300.0]) if batteries else np.array([0.0, 1000.0, 2500.0])
    v = np.linspace(4.0, 20.0, 5) if af.hovers else (
        np.linspace(15.0, 30.0, 6) if batteries else np.linspace(40.0, 70.0, 7))
    return h, v


@pytest.mark.parametrize("name", AIRFRAMES)
def test_specific_range_times_store_is_range_in_the_api(name):
    af = cp.load_airframe(name)
    h, v = grid(af)
    for fuel in (None, 0.5 * af.propulsion.store_capacity):
        pts = cp.cruise_grid(af, h, v, fuel=fuel, headwind=3.0)
        np.testing.assert_allclose(pts.specific_range_air * pts.store, pts.range_air,
                                   rtol=1e-12)
        np.testing.assert_allclose(pts.specific_range_ground * pts.store, pts.range_ground,
                                   rtol=1e-12)
        # Points that cannot be flown have no endurance nor store rate: NaN, with the bit.
        has = np.isfinite(pts.endurance)
        assert np.all(pts.limits[~has] & cp.limits.UNFLYABLE)
        np.testing.assert_allclose((pts.endurance * pts.store_rate)[has], pts.store,
                                   rtol=1e-12)
    best = cp.best_cruise(af, h, objective="range")
    p = best.points
    ok = best.feasible
    np.testing.assert_allclose((p.specific_range_ground * p.store)[ok], p.range_ground[ok],
                               rtol=1e-12)


def table_json(name, units):
    args = ["table", name, "--format", "json", "--units", units]
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert main(args) == 0
    return json.loads(out.getvalue())


@pytest.mark.parametrize("units", ["aviation", "si"])
@pytest.mark.parametrize("name", AIRFRAMES)
def test_specific_range_times_store_is_range_in_json(name, units):
    # Since issue 12 the table holds a pack given as a circuit at the outside air
    # temperature of its lowest altitude (sea level ISA, 15 degC); no change for others.
    af = cp.load_airframe(name).at_pack_temperature(15.0)
    doc = table_json(name, units)
    heads = [c["name"] for c in doc["columns"]]
    sr, rng = heads.index("SR"), heads.index("range")
    store = af.loading().store
    if af.propulsion.store.burns_mass:
        # SR in distance per volume of fuel, the store as a volume in the same units.
        f_vol, _ = display("volume", units)
        on_board = store / af.propulsion.fuel_density * f_vol
    else:
        on_board = store * display("energy", units)[0] / 1000.0   # kWh, as SR's unit
    rows = [r for r in doc["rows"] if r[sr] is not None]
    assert rows
    for r in rows:
        assert r[sr] * on_board == pytest.approx(r[rng], rel=1e-14)


@pytest.mark.parametrize("fmt", ["csv", "text"])
@pytest.mark.parametrize("name", AIRFRAMES)
def test_specific_range_times_store_is_range_in_printed_tables(name, fmt, capsys):
    af = cp.load_airframe(name).at_pack_temperature(15.0)  # as above (issue 12)
    assert main(["table", name, "--format", fmt, "--units", "si"]) == 0
    out = capsys.readouterr().out
    if fmt == "csv":
        lines = [ln for ln in out.splitlines() if not ln.startswith("#")]
        rows = list(csv.reader(lines))
        heads, body = rows[0], rows[1:]
        sr = heads.index("SR [km/L]" if af.propulsion.store.burns_mass else "SR [km/kWh]")
        rng = heads.index("range [km]")
        values = [(float(r[sr]), float(r[rng])) for r in body if r[sr]]
    else:
        lines = out.splitlines()
        i = next(k for k, ln in enumerate(lines) if ln.lstrip().startswith("PA"))
        # Column spans from the rule of dashes under the two header lines.
        spans, pos = [], 0
        for dashes in lines[i + 2].split("  "):
            if dashes:
                spans.append((pos, pos + len(dashes)))
            pos += len(dashes) + 2
        names = [lines[i][a:b].strip() for a, b in spans]
        sr, rng = names.index("SR"), names.index("range")
        values = []
        for ln in lines[i + 3:]:
            if not ln.strip():
                break
            cells = [ln[a:b].strip() for a, b in spans]
            if cells[sr] != "-":
                values.append((float(cells[sr]), float(cells[rng])))
    store = af.loading().store
    on_board = (store / af.propulsion.fuel_density * 1000.0 if af.propulsion.store.burns_mass
                else store / 3.6e6)
    digits = 0.005 if af.propulsion.store.burns_mass else 0.05   # half the SR's last digit
    assert values
    for s, r in values:
        assert abs(s * on_board - r) <= digits * on_board + 0.5 + 1e-9


def test_card_and_planner_keep_the_same_reserve(tourer):
    # The same airframe and policy through the card and the planner.
    m = cp.load_mission("demo-cross-country")
    mission = replace(m, airframe=tourer, mass=None, store=None, payload=None,
                      reserve=cp.Reserve("time", 45 * 60.0, power=0.65))
    plan = cp.plan_mission(mission)
    card = card_content(tourer, altitudes=[1500.0, 2000.0], power_settings=[0.65],
                        reserve=cp.Reserve("time", 45 * 60.0, power=0.65), isa_dev=m.isa_dev)
    # The same reserve function on the same inputs: rounding only (measured 0).
    assert card.reserve == pytest.approx(plan.reserve_required, rel=1e-14)
    # A fraction is of the usable capacity in both.
    frac = replace(mission, reserve=cp.Reserve("fraction", 0.3))
    card = card_content(tourer, reserve=parse_reserve("30%", tourer.propulsion))
    assert card.reserve == pytest.approx(cp.plan_mission(frac).reserve_required, rel=1e-15)
    assert card.reserve == pytest.approx(0.3 * tourer.propulsion.store_capacity, rel=1e-15)


def test_time_reserve_is_the_fuel_flow_at_its_power_times_the_time(tourer):
    # Reserve rules state a time at normal cruising power (common practice, no source):
    # 45 min at 65 % of rated power uses BSFC x 0.65 x rated power x 0.75 h, exactly, and
    # that is the card's default for a piston airframe.
    prop = tourer.propulsion
    flow_65 = prop.bsfc * 0.65 * prop.rated_power
    kept = reserve_required(tourer, cp.Reserve("time", 2700.0), mass=1000.0)
    assert kept.amount == pytest.approx(0.75 * 3600.0 * flow_65, rel=1e-15)
    assert (kept.power_fraction, kept.power_source) == (0.65, "card")
    assert card_content(tourer).reserve == pytest.approx(kept.amount, rel=1e-15)
    # A plan's default is its own cruise power.
    plan_kept = reserve_required(tourer, cp.Reserve("time", 2700.0), mass=1000.0,
                                 cruise_power=0.55, power_source="plan")
    assert plan_kept.amount == pytest.approx(0.55 / 0.65 * kept.amount, rel=1e-15)
    assert "45 min at 55 % power (the plan's cruise power)" in plan_kept.describe(prop,
                                                                                 "aviation")
