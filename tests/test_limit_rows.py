"""Rows beyond a limit carry no figures, only the reason; multirotors have a hover row.

A point that cannot be flown (beyond CLmax, short of power, no headway, no level-flight
solution) keeps what it would take (drag, power, CL) but has NaN range, endurance, specific
range and flows in the API, with its limit bit; every output prints them as "-" (text),
empty (CSV) or null (JSON), beside the status code. A point merely inside the stall margin
keeps its figures. A multirotor's table starts at TAS 0, the hover, whose endurance is the
hover endurance and whose range is 0.
"""

from __future__ import annotations

import csv
import io
import json
import re
import warnings

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.cli.options import CSV_CAUTIONS_HINT
from cruiseplan.limits import UNFLYABLE, Limit
from cruiseplan.planning.performance import UNFLYABLE_FIELDS, cruise_points
from cruiseplan.report.card import card_content

KT = 1852.0 / 3600.0


@pytest.fixture(scope="module")
def trainer():
    return cp.load_airframe("demo-trainer")


@pytest.fixture(scope="module")
def quad():
    return cp.load_airframe("demo-mapping-quad")


# --- the Python API ------------------------------------------------------------------------------

def _beyond_clmax(trainer):
    # 40 kt at sea level needs CL 2.5 on a wing with CLmax 1.45.
    return cp.cruise_grid(trainer, [0.0], [40.0 * KT]), Limit.BEYOND_CLMAX


def _power(trainer):
    # 140 kt needs far more than the trainer's rated power.
    return cp.cruise_grid(trainer, [0.0], [140.0 * KT]), Limit.POWER


def _wind(trainer):
    # 80 kt into a 90 kt headwind goes backwards.
    return cp.cruise_grid(trainer, [0.0], [80.0 * KT], headwind=90.0 * KT), Limit.WIND


def _crosswind(trainer):
    # A 60 kt wind from the right of the course: at 50 kt TAS the course cannot be held.
    wind = cp.parse_wind_profile("090/60kt@0ft")
    return cp.cruise_grid(trainer, [0.0], [50.0 * KT], wind=wind, course=0.0), Limit.WIND


def _no_solution(trainer):
    # 5 % of rated power cannot hold the trainer level at any speed.
    return cp.power_setting_table(trainer, [0.0], [0.05]), Limit.NO_SOLUTION


CASES = {"beyond CLmax": _beyond_clmax, "power": _power, "wind": _wind,
         "crosswind": _crosswind, "no solution": _no_solution}


@pytest.mark.parametrize("case", CASES)
def test_unflyable_points_have_nan_figures_with_their_bit(trainer, case):
    pts, bit = CASES[case](trainer)
    assert pts.limits[0, 0] & bit
    for name in UNFLYABLE_FIELDS:
        value = getattr(pts, name)
        if value is not None:
            assert np.isnan(np.broadcast_to(value, pts.shape)[0, 0]), name
    if bit != Limit.NO_SOLUTION:
        # What the point would take stays: it says why the point cannot be flown.
        assert np.isfinite(pts.drag[0, 0]) and np.isfinite(pts.shaft_power[0, 0])
        assert np.isfinite(pts.cl[0, 0]) and np.isfinite(pts.stall_speed_ratio[0, 0])


def test_each_unflyable_reason_is_the_one_expected(trainer):
    pts, _ = _beyond_clmax(trainer)
    assert pts.limits[0, 0] == Limit.STALL | Limit.BEYOND_CLMAX
    assert pts.stall_speed_ratio[0, 0] < 1.0 and pts.cl[0, 0] > trainer.cl_max
    pts, _ = _power(trainer)
    assert pts.limits[0, 0] == Limit.POWER
    assert pts.shaft_power[0, 0] > pts.power_available[0, 0]
    pts, _ = _wind(trainer)
    assert pts.limits[0, 0] == Limit.WIND
    assert pts.ground_speed[0, 0] == pytest.approx(-10.0 * KT, rel=1e-12)
    pts, _ = _crosswind(trainer)
    assert pts.limits[0, 0] & Limit.WIND and np.isnan(pts.ground_speed[0, 0])
    pts, _ = _no_solution(trainer)
    assert pts.limits[0, 0] == Limit.NO_SOLUTION


def test_inside_the_stall_margin_keeps_its_figures(trainer):
    # 60 kt at sea level: above the stall speed (V/Vs about 1.13) but inside the 1.3 margin.
    pts = cp.cruise_grid(trainer, [0.0], [60.0 * KT])
    assert 1.0 < pts.stall_speed_ratio[0, 0] < 1.3
    assert pts.limits[0, 0] == Limit.STALL
    for name in UNFLYABLE_FIELDS:
        assert np.isfinite(getattr(pts, name)[0, 0]), name


def test_keep_unflyable_keeps_the_figures_and_the_bits(trainer):
    air = cp.air_state(np.array([0.0])).column()
    v = np.array([[40.0, 80.0, 140.0]]) * KT
    load = trainer.loading()
    hidden = cruise_points(trainer, load.mass, air, v, load.store)
    kept = cruise_points(trainer, load.mass, air, v, load.store, keep_unflyable=True)
    np.testing.assert_array_equal(hidden.limits, kept.limits)
    assert np.all(np.isfinite(kept.endurance)) and np.all(np.isfinite(kept.range_air))
    # int(): the battery limits (issue 12) put UNFLYABLE beyond 16 bits.
    unflyable = (hidden.limits & int(UNFLYABLE)) != 0
    np.testing.assert_array_equal(unflyable, [[True, False, True]])
    np.testing.assert_array_equal(np.isnan(hidden.endurance), unflyable)
    # Where a point can be flown the two agree to the bit.
    assert hidden.endurance[0, 1] == kept.endurance[0, 1]
    np.testing.assert_array_equal(hidden.shaft_power, kept.shaft_power)


def test_a_full_power_setting_is_not_flagged_power_by_roundoff():
    # Without a power lapse, 100 % is available at every altitude: the speed search's last
    # digits must not flag it POWER (and so hide its figures).
    drone = cp.load_airframe("demo-survey-drone")
    pts = cp.power_setting_table(drone, [0.0, 500.0, 1000.0, 1500.0, 2000.0], [1.0])
    assert not np.any(pts.limits & Limit.POWER)
    assert np.all(np.isfinite(pts.endurance))


# --- the command line ----------------------------------------------------------------------------

def _run(capsys, *argv):
    status = main(list(argv))
    out, err = capsys.readouterr()
    # A plain CSV on standard output says on stderr where its cautions are.
    assert status == 0 and err in ("", CSV_CAUTIONS_HINT + "\n"), err
    return out


def _text_rows(out):
    """Rows of a text table as dicts, cut at the dash line's column spans."""
    lines = out.splitlines()
    k = next(i for i, ln in enumerate(lines) if re.fullmatch(r"[- ]+", ln) and "--" in ln)
    spans = [m.span() for m in re.finditer(r"-+", lines[k])]
    spans[-1] = (spans[-1][0], None)  # the status column is left-aligned and ragged

    def cut(line):
        return [line[a:b].strip() for a, b in spans]

    names = cut(lines[k - 2])
    rows = []
    for line in lines[k + 1:]:
        if not line.strip():
            break
        rows.append(dict(zip(names, cut(line))))
    return rows


def _csv_rows(out):
    body = "\n".join(ln for ln in out.splitlines() if not ln.startswith("#"))
    return [{k.split(" [")[0]: v for k, v in row.items()}
            for row in csv.DictReader(io.StringIO(body))]


def _json_rows(out):
    doc = json.loads(out)
    names = [c["name"] for c in doc["columns"]]
    return [dict(zip(names, row)) for row in doc["rows"]]


READERS = {"text": _text_rows, "csv": _csv_rows, "json": _json_rows}
MISSING = {"text": "-", "csv": "", "json": None}
#: Table runs with an unflyable row first and a flyable one, and the first's status code.
RUNS = {
    "beyond CLmax": (["--speeds", "40,80kt"], "STALL+CLMAX"),
    "power": (["--speeds", "140,80kt"], "POWER"),
    "wind": (["--speeds", "80,110kt", "--headwind", "90kt"], "WIND"),
    "no solution": (["--power", "5,65"], "NOSOL"),
}
FIGURES = ("fuel flow", "SR", "endurance", "range")


@pytest.mark.parametrize("fmt", READERS)
@pytest.mark.parametrize("case", RUNS)
def test_table_prints_no_figures_on_unflyable_rows(capsys, case, fmt):
    extra, status = RUNS[case]
    out = _run(capsys, "table", "demo-trainer", "--altitudes", "0", *extra, "--format", fmt)
    bad, good = READERS[fmt](out)
    assert bad["status"] == status
    assert good["status"] == "ok"
    figures = FIGURES + (("gnd range",) if "--headwind" in extra else ())
    for name in figures:
        assert bad[name] == MISSING[fmt], (name, bad[name])
        assert good[name] not in ("-", "", None), (name, good[name])
    if case != "no solution":  # what the point would take is still printed
        assert bad["shaft"] not in ("-", "", None) and bad["CL"] not in ("-", "", None)
    if fmt == "text":
        assert f"{status.split('+')[-1]}: " in out  # the code is explained in the notes
        assert re.search(r"^-: not flyable \(.*\): no fuel flow, specific range, endurance "
                         r"or range$", out, re.M)


def test_best_prints_no_figures_where_no_speed_is_flyable(capsys):
    # A 200 kt headwind at 6000 ft: no speed of the trainer makes headway there.
    out = _run(capsys, "best", "demo-trainer", "--altitudes", "0,6000ft", "--course", "0",
               "--wind", "360/20kt@0ft,360/200kt@6000ft", "--format", "json")
    flyable, blown = _json_rows(out)
    assert blown["status"].startswith("not flyable: wind")
    assert flyable["status"] == "BEST ok"
    for name in ("fuel flow", "gnd SR", "endurance", "gnd range"):
        assert blown[name] is None, name
        assert flyable[name] is not None, name
    assert blown["power"] is not None and blown["GS"] < 0  # what it would take, and why


# --- the hover ----------------------------------------------------------------------------------

def test_the_quads_table_has_a_hover_row(capsys, quad):
    out = _run(capsys, "table", "demo-mapping-quad", "--speeds", "0:20m/s:4m/s",
               "--altitudes", "0,300m", "--format", "json")
    rows = _json_rows(out)
    assert [r["TAS"] for r in rows[:6]] == pytest.approx([0.0, 14.4, 28.8, 43.2, 57.6, 72.0])
    load = quad.loading()
    hover = quad.hover_endurance(load.mass, cp.air_state(np.array([0.0, 300.0])), load.store)
    for row, seconds in zip((rows[0], rows[6]), hover):
        assert row["TAS"] == 0.0 and row["status"] == "ok"
        # The same store rate at the same hover power: equal to the last bit.
        assert row["endurance"] == float(seconds) / 60.0
        assert row["range"] == 0.0 and row["SR"] == 0.0
    text = _run(capsys, "table", "demo-mapping-quad", "--speeds", "0:20m/s:4m/s",
                "--altitudes", "0")
    first = _text_rows(text)[0]
    assert (first["TAS"], first["range"], first["endurance"]) == (
        "0.0", "0", f"{hover[0] / 60:.0f}")
    assert "TAS 0: the hover" in text


def test_the_quads_default_speeds_start_at_the_hover(capsys):
    rows = _json_rows(_run(capsys, "table", "demo-mapping-quad", "--format", "json"))
    assert rows[0]["TAS"] == 0.0 and rows[0]["range"] == 0.0
    assert rows[1]["TAS"] == pytest.approx(7.2)  # 2 m/s in km/h


def test_hover_points_in_the_api_without_warnings(quad):
    h = np.array([0.0, 200.0, 400.0])
    load = quad.loading()
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with np.errstate(all="raise"):
            pts = cp.cruise_grid(quad, h, [0.0, 5.0, 10.0])
    hover = quad.hover_endurance(load.mass, cp.air_state(h), load.store)
    np.testing.assert_array_equal(pts.endurance[:, 0], hover)
    np.testing.assert_array_equal(pts.range_air[:, 0], 0.0)
    np.testing.assert_array_equal(pts.range_ground[:, 0], 0.0)
    np.testing.assert_array_equal(pts.specific_range_air[:, 0], 0.0)
    np.testing.assert_array_equal(pts.limits[:, 0], 0)
    # In a headwind, TAS 0 drifts backwards: no headway, so the WIND limit.
    windy = cp.cruise_grid(quad, [0.0], [0.0, 10.0], headwind=3.0)
    assert windy.limits[0, 0] & Limit.WIND and np.isnan(windy.endurance[0, 0])
    with pytest.raises(cp.CruiseplanError, match=r"speeds of 0 \(the hover\) or more for "
                                                 r"the multirotor demo-mapping-quad"):
        cp.cruise_grid(quad, [0.0], [-1.0, 5.0])


def test_wings_still_refuse_a_speed_of_zero(capsys, trainer):
    with pytest.raises(cp.CruiseplanError, match=r"tas must be a one-dimensional array of "
                                                 r"positive speeds"):
        cp.cruise_grid(trainer, [0.0], [0.0, 50.0])
    status = main(["table", "demo-trainer", "--speeds", "0,80kt"])
    out, err = capsys.readouterr()
    assert status == 2 and out == ""
    assert len(err.splitlines()) == 1 and "Traceback" not in err
    assert re.match(r"cruiseplan: error: --speeds: speeds must be positive \(0, the hover, "
                    r"only for a kind that hovers; demo-trainer is a fixed-wing\)$", err)


# --- the card ------------------------------------------------------------------------------------

def test_the_quads_card_has_hover_and_best_endurance_in_minutes(quad):
    content = card_content(quad)
    md = content.markdown()
    assert "## Hover and best endurance, in minutes (calm air)" in md
    load = quad.loading()
    h = np.array([0.0, 100.0, 200.0, 300.0, 400.0])
    air = cp.air_state(h)
    hover = quad.hover_endurance(load.mass, air, load.store) / 60.0
    hover_res = quad.hover_endurance(load.mass, air, load.store - content.reserve) / 60.0
    best = cp.best_cruise(quad, h, objective="endurance")
    rng = cp.best_cruise(quad, h, objective="range")
    keep = 1.0 - content.reserve / load.store
    for i in range(h.size):
        e = best.points.endurance[i] / 60.0
        row = (f"| {h[i]:.0f} | {hover[i]:.0f} | {hover_res[i]:.0f} | "
               f"{best.schedule.tas['endurance'][i] * 3.6:.0f} | {e:.0f} | {e * keep:.0f} | "
               f"{rng.schedule.tas['range'][i] * 3.6:.0f} | "
               f"{rng.points.range_ground[i] / 1000:.1f} | "
               f"{rng.points.range_ground[i] * keep / 1000:.1f} |")
        assert row in md, row
    # The figures the crews asked for: hover about 17 min, best endurance about 25 min at
    # about 38 km/h, longer than the hover (this airframe file, measured).
    assert 15.0 < hover[0] < 20.0 and 22.0 < best.points.endurance[0] / 60.0 < 28.0
    assert 33.0 < best.schedule.tas["endurance"][0] * 3.6 < 43.0


def test_a_wing_card_has_no_hover_block(trainer):
    md = card_content(trainer).markdown()
    assert "Hover" not in md


def test_the_card_prints_no_figures_beyond_full_throttle(trainer):
    # 100 % of rated power is not available above sea level (power lapse).
    md = card_content(trainer, power_settings=[0.65, 1.0],
                      altitudes=np.array([0.0, 4000.0]) * 0.3048).markdown()
    rows = [ln for ln in md.splitlines() if ln.startswith("| 4000 | 100 |")]
    assert rows == ["| 4000 | 100 | - | - | - | - | - | - | - | POWER |"]
