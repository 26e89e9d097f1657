"""Altitudes and headings as flown: indicated altitude on QNH, drone heights, magnetic
headings, a cruising-level rule, and what-if overrides of a mission file on ``plan``."""

import json
import re
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.io.mission_file import apply_overrides, read_mission
from cruiseplan.model.levels import LevelSector, check_sectors
from cruiseplan.physics.atmosphere import indicated_altitude, pressure_altitude_from_altimeter
from cruiseplan.planning.levels import cruising_levels, magnetic, sector_for
from cruiseplan.planning.mission import plan_mission
from cruiseplan.report.tables import plan_report

FT = 0.3048
HPA = 100.0
P0 = 101325.0

# --- indicated altitude --------------------------------------------------------------------


@settings(max_examples=200, deadline=None)
@given(h=st.floats(-500.0, 11000.0), qnh=st.floats(85000.0, 108000.0))
def test_indicated_altitude_inverts_pressure_altitude_from_altimeter(h, qnh):
    # The two are inverses on the same troposphere relation, both ways, to rounding.
    assert pressure_altitude_from_altimeter(indicated_altitude(h, qnh), qnh) == \
        pytest.approx(h, abs=1e-9)
    assert indicated_altitude(pressure_altitude_from_altimeter(h, qnh), qnh) == \
        pytest.approx(h, abs=1e-9)


def test_ten_hpa_below_standard_reads_about_275_ft_lower_near_sea_level():
    # Source: the ISA troposphere pressure-height relation (ICAO Doc 7488/3, 1993) gives
    # 274.7 ft at sea level; the "about 27-30 ft per hPa" rule of thumb is common
    # practice, no source. Setting 1003.25 hPa instead of 1013.25 hPa lowers the reading.
    for pa in (0.0, 1000 * FT):
        drop = (indicated_altitude(pa, 1013.25 * HPA) - indicated_altitude(pa, 1003.25 * HPA))
        assert 270 * FT <= drop <= 280 * FT, drop / FT


def test_standard_setting_reads_pressure_altitude():
    h = np.linspace(-500.0, 11000.0, 47)
    assert indicated_altitude(h, P0) == pytest.approx(h, abs=1e-9)
    # A higher QNH reads higher: the same pressure lies farther above the datum.
    assert np.all(indicated_altitude(h, 1020 * HPA) > h)


# --- mission files -------------------------------------------------------------------------

BASE = """
[mission]
airframe = "demo-trainer"
fuel = "80 L"
payload = "165 kg"
[day]
isa_dev = "+10 K"
altimeter = "1009 hPa"
[profile]
departure_elevation = "1150 ft"
arrival_elevation = "620 ft"
[[legs]]
name = "out"
distance = "60 nm"
course = 40
elevation = "2300 ft"
wind = "040/18kt@2000ft,030/28kt@6000ft"
[[legs]]
name = "back"
distance = "40 nm"
course = 220
elevation = "1400 ft"
wind = "040/18kt@2000ft,030/28kt@6000ft"
"""

LEVELS = """
[levels]
sectors = [
  { from = 0, to = 179, levels = "3500 ft + 2000 ft" },
  { from = 180, to = 359, levels = "4500 ft + 2000 ft" },
]
"""


def write(tmp_path, text, name="m.toml"):
    p = tmp_path / name
    p.write_text(text)
    return p


def rows(doc, name):
    """The values of one column of a JSON report."""
    i = [c["name"] for c in doc["columns"]].index(name)
    return [r[i] for r in doc["rows"]]


def json_plan(*argv, capsys):
    assert main(["plan", *map(str, argv), "--format", "json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_plan_shows_indicated_altitude_on_the_file_qnh(tmp_path, capsys):
    doc = json_plan(write(tmp_path, BASE), capsys=capsys)
    assert "Day: ISA +10.0 K; altitudes: pressure altitude (PA) and indicated on QNH " \
           "1009 hPa" in doc["meta_text"]
    units = {c["name"]: c["unit"] for c in doc["columns"]}
    assert units["IA from"] == units["IA to"] == "ft"
    pa, ia = np.array(rows(doc, "PA to")), np.array(rows(doc, "IA to"))
    assert ia == pytest.approx(indicated_altitude(pa * FT, 1009 * HPA) / FT, abs=1e-6)
    # The departure row reads the field elevation as written in the file.
    assert rows(doc, "IA from")[0] == pytest.approx(1150.0, abs=1e-6)
    # Without a setting: pressure altitudes only, and the header says so.
    doc = json_plan(write(tmp_path, BASE.replace('altimeter = "1009 hPa"\n', "")),
                    capsys=capsys)
    assert "IA to" not in [c["name"] for c in doc["columns"]]
    assert any(m.endswith("altitudes are pressure altitudes (PA)") for m in doc["meta_text"])


def test_magnetic_heading_is_true_minus_variation(tmp_path, capsys):
    text = BASE.replace('payload = "165 kg"', 'payload = "165 kg"\nvariation = "5 E"')
    text = text.replace('name = "back"', 'name = "back"\nvariation = "3 W"')
    path = write(tmp_path, text)
    mission = read_mission(path)
    assert mission.variation == 5.0
    assert [leg.variation for leg in mission.legs] == [5.0, -3.0]   # the leg's overrides
    plan = plan_mission(mission)
    doc = json_plan(path, capsys=capsys)
    assert {c["name"]: c["unit"] for c in doc["columns"]}["HDG"] == "deg M"
    shown = rows(doc, "HDG")
    by_leg = {"out": 5.0, "back": -3.0}
    checked = 0
    for seg, hdg in zip(plan.segments, shown):
        if seg.time == 0:
            assert hdg is None
            continue
        assert hdg == pytest.approx((seg.heading - by_leg[seg.leg]) % 360.0, abs=1e-9)
        checked += 1
    assert checked >= 4
    assert any("variation out 5 E, back 3 W" in m for m in doc["meta_text"])
    # Without a variation the headings are true and equal the plan's.
    doc = json_plan(write(tmp_path, BASE, "t.toml"), capsys=capsys)
    assert {c["name"]: c["unit"] for c in doc["columns"]}["HDG"] == "deg T"


@pytest.mark.parametrize("written, value", [("5 E", 5.0), ("3 W", -3.0), ("-3 deg", -3.0),
                                            ("2.5 deg w", -2.5), ("7", 7.0)])
def test_variation_forms(tmp_path, written, value):
    raw = f'"{written}"' if not written.isdigit() else written
    m = read_mission(write(tmp_path, BASE.replace('payload = "165 kg"',
                                                  f'payload = "165 kg"\nvariation = {raw}')))
    assert m.variation == value and all(leg.variation == value for leg in m.legs)


# --- cruising levels -----------------------------------------------------------------------

RULE = (LevelSector(0, 179, 3500 * FT, 2000 * FT, "3500 ft + 2000 ft"),
        LevelSector(180, 359, 4500 * FT, 2000 * FT, "4500 ft + 2000 ft"))


def test_level_rule_picks_only_the_sector_levels_within_the_caps():
    check_sectors(RULE)
    east = cruising_levels(sector_for(RULE, 90.0), 3000 * FT, 10000 * FT)
    assert east / FT == pytest.approx([3500, 5500, 7500, 9500])
    west = cruising_levels(sector_for(RULE, 270.0), 3000 * FT, 10000 * FT)
    assert west / FT == pytest.approx([4500, 6500, 8500])
    # The caps bound the levels, ends included.
    assert cruising_levels(RULE[0], 5500 * FT, 7500 * FT) / FT == pytest.approx([5500, 7500])
    assert cruising_levels(RULE[0], 5600 * FT, 7400 * FT).size == 0
    # The sector is found on the magnetic course: 175 true with 10 W is 185 magnetic.
    assert sector_for(RULE, magnetic(175.0, -10.0)) is RULE[1]
    assert sector_for(RULE, magnetic(185.0, 10.0)) is RULE[0]
    assert sector_for(RULE, 359.6) is RULE[0]          # rounds to 000
    # On QNH the levels are indicated altitudes: their pressure altitudes read as levels.
    qnh = 1020 * HPA
    pa = cruising_levels(RULE[0], 3000 * FT, 10000 * FT, qnh)
    assert indicated_altitude(pa, qnh) / FT == pytest.approx([3500, 5500, 7500, 9500],
                                                              abs=1e-6)


def test_sectors_may_wrap_through_north():
    rule = (LevelSector(270, 89, 3000 * FT, 2000 * FT), LevelSector(90, 269, 4000 * FT,
                                                                    2000 * FT))
    check_sectors(rule)
    assert sector_for(rule, 0.0) is rule[0] and sector_for(rule, 180.0) is rule[1]


def leg_ia(plan, n):
    return float(indicated_altitude(plan.leg_altitudes[n], plan.mission.altimeter))


def test_a_best_altitude_between_levels_now_flies_a_level(tmp_path):
    free = plan_mission(read_mission(write(tmp_path, BASE)))
    ia = [leg_ia(free, n) for n in range(2)]
    levels_of = [(3500, 2000), (4500, 2000)]  # out: 040 magnetic; back: 220 magnetic

    def on_level(a, base, step):
        k = (a / FT - base) / step
        return abs(k - round(k)) * step < 1.0 and k > -1e-9

    # Without the rule the best altitudes lie between levels (the 500 ft search grid
    # starts at the clearance above ground) ...
    assert not any(on_level(a, *bs) for a, bs in zip(ia, levels_of)), [a / FT for a in ia]
    ruled = plan_mission(read_mission(write(tmp_path, BASE + LEVELS, "r.toml")))
    assert ruled.go, ruled.reasons
    for n, (base, step) in enumerate(levels_of):
        assert on_level(leg_ia(ruled, n), base, step), leg_ia(ruled, n) / FT


def test_levels_honour_the_altitude_caps(tmp_path):
    text = (BASE + LEVELS).replace('name = "out"', 'name = "out"\nmax_altitude = "6000 ft"')
    plan = plan_mission(read_mission(write(tmp_path, text)))
    assert plan.go, plan.reasons
    # Under a 6000 ft cap and above 2300 + 1000 ft: 3500 or 5500 ft indicated.
    assert round(leg_ia(plan, 0) / FT, 6) in (3500.0, 5500.0)


def test_fixed_altitude_off_the_levels_is_a_no_go_reason(tmp_path):
    text = (BASE + LEVELS).replace('name = "back"', 'name = "back"\naltitude = "5500 ft"')
    plan = plan_mission(read_mission(write(tmp_path, text)))
    assert not plan.go
    assert any(re.match(r"altitude not a cruising level for magnetic course 220: leg 'back' "
                        r"at 1676 m \(5500 ft\) indicated \(sector 180-359: 4500 ft \+ "
                        r"2000 ft\); nearest levels .*4500 ft.* and .*6500 ft", r)
               for r in plan.reasons), plan.reasons
    on = plan_mission(read_mission(write(tmp_path, text.replace('"5500 ft"', '"6500 ft"'),
                                         "on.toml")))
    assert on.go, on.reasons


def test_no_level_between_the_caps_is_a_no_go_reason(tmp_path):
    text = (BASE + LEVELS).replace('name = "out"', 'name = "out"\nmax_altitude = "5000 ft"')
    # Out (040 magnetic) may fly 3300 to 5000 ft indicated; its sector starts at 6000 ft.
    text = text.replace('"3500 ft + 2000 ft"', '"6000 ft + 2000 ft"')
    plan = plan_mission(read_mission(write(tmp_path, text)))
    assert any(r.startswith("no cruising level for magnetic course 040 on leg 'out'")
               for r in plan.reasons), plan.reasons


# --- drone heights -------------------------------------------------------------------------

DRONE = """
[mission]
airframe = "demo-survey-drone"
battery = "100 %"
[day]
isa_dev = "+8 K"
{day}
[profile]
departure_elevation = "85 m"
arrival_elevation = "85 m"
climb_rate = "3 m/s"
descent_rate = "2 m/s"
min_clearance = "40 m"
[[legs]]
name = "out"
distance = "3 km"
course = 60
elevation = "95 m"
max_agl = "120 m"
altitude = "best"
[[legs]]
name = "line"
distance = "2 km"
course = 90
elevation = "105 m"
max_agl = "120 m"
altitude = "195 m"
speed = "18 m/s"
"""


@pytest.mark.parametrize("day", ["", 'altimeter = "1002 hPa"'])
def test_drone_heights_above_take_off_and_ground(tmp_path, capsys, day):
    doc = json_plan(write(tmp_path, DRONE.format(day=day)), capsys=capsys)
    names = [c["name"] for c in doc["columns"]]
    assert {"HTO from", "HTO to", "AGL from", "AGL to"} <= set(names)
    legs = rows(doc, "leg")
    hto, agl = rows(doc, "HTO to"), rows(doc, "AGL to")
    kinds = rows(doc, "segment")
    assert hto[0] == pytest.approx(0.0, abs=1e-9) and agl[0] is None
    for leg, kind, h, g in zip(legs, kinds, hto, agl):
        if leg == "line" and kind == "cruise":
            # As written in the file, with or without a QNH: 195 m over 85 m and 105 m.
            assert h == pytest.approx(110.0, abs=1e-6) and g == pytest.approx(90.0, abs=1e-6)
        if kind == "cruise":
            # The height cap stays a height above the leg's highest ground.
            assert g <= 120.0 + 1e-6
    assert any("HTO: height above take-off" in n for n in doc["notes"])


def test_piston_plans_show_no_drone_heights(tmp_path, capsys):
    doc = json_plan(write(tmp_path, BASE), capsys=capsys)
    assert not {"HTO to", "AGL to"} & {c["name"] for c in doc["columns"]}


# --- bad input: file fields ----------------------------------------------------------------

MISSION_VAR = 'payload = "165 kg"\nvariation = {}'
BAD_FILES = [
    (BASE.replace('payload = "165 kg"', MISSION_VAR.format('"5 X"')),
     r"\[mission\] variation: '5 X' is not a quantity in units compatible with deg, e\.g\. "
     r"'5 E', '3 W' or '-3 deg'"),
    (BASE.replace('payload = "165 kg"', MISSION_VAR.format('"200 deg"')),
     r"\[mission\] variation: '200 deg' is out of range; expected >= -180 deg and <= 180"),
    (BASE.replace('name = "back"', 'name = "back"\nvariation = "200 E"'),
     r"leg 2 'back' variation: '200' is out of range; expected >= 0 deg and <= 180 deg"),
    (BASE.replace('name = "back"', 'name = "back"\nvariation = "-4 W"'),
     r"leg 2 'back' variation: '-4' is out of range; expected >= 0 deg"),
    (BASE + "[levels]\n", r"\[levels\] sectors: expected a list of sectors"),
    (BASE + '[levels]\nsectors = "0-359"\n', r"\[levels\] sectors: expected a list of sectors"),
    (BASE + "[levels]\nrule = 1\n", r"\[levels\] rule: unknown field"),
    (BASE + LEVELS.replace('"3500 ft + 2000 ft"', '"3500 + 2000"'),
     r"\[levels\] sectors\[1\] levels: '3500 \+ 2000' should read BASE \+ STEP with their "
     r"units"),
    (BASE + LEVELS.replace('"3500 ft + 2000 ft"', '"3500 ft"'),
     r"\[levels\] sectors\[1\] levels: '3500 ft' should read BASE \+ STEP"),
    (BASE + LEVELS.replace('"3500 ft + 2000 ft"', '"3500 ft + 0 ft"'),
     r"\[levels\] sectors\[1\] levels: '0 ft' is out of range; expected >= 1 m"),
    (BASE + LEVELS.replace('"3500 ft + 2000 ft"', '"3500 kg + 2000 ft"'),
     r"\[levels\] sectors\[1\] levels: '3500 kg' is not a quantity in units compatible "
     r"with m"),
    (BASE + LEVELS.replace("from = 180", "from = 170"),
     r"\[levels\] sectors: magnetic course 170 is in sectors 1 and 2; the sectors must "
     r"cover 000 to 359 without overlap"),
    (BASE + LEVELS.replace("from = 180", "from = 181"),
     r"\[levels\] sectors: magnetic course 180 is in no sector"),
    (BASE + LEVELS.replace("to = 359", "to = 360"),
     r"\[levels\] sectors\[2\] to: 360 is not a whole degree of magnetic course from 0 to "
     r"359"),
    (BASE + LEVELS.replace("from = 0,", "from = 0.5,"),
     r"\[levels\] sectors\[1\] from: 0\.5 is not a whole degree"),
    (BASE + LEVELS.replace("from = 180, ", ""),
     r"\[levels\] sectors\[2\] from: missing; expected a whole degree"),
    (BASE + LEVELS.replace("to = 179,", "to = 179, lvl = 1,"),
     r"\[levels\] sectors\[1\] lvl: unknown field"),
]


@pytest.mark.parametrize("text, match", BAD_FILES)
def test_bad_mission_fields(tmp_path, capsys, text, match):
    path = write(tmp_path, text)
    with pytest.raises(cp.MissionFileError, match=re.escape(str(path)) + ": " + match):
        read_mission(path)
    # The command line: one line naming the file and the field, exit 2, nothing written.
    out = tmp_path / "out" / "plan.txt"
    out.parent.mkdir()
    assert main(["plan", str(path), "--output", str(out)]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and len(captured.err.splitlines()) == 1
    assert re.search(match, captured.err) and str(path) in captured.err
    assert not out.exists()


# --- what-if overrides on plan -------------------------------------------------------------

BAD_OPTIONS = [
    (["--isa-dev", "15 m"], r"--isa-dev: '15 m' is not a quantity of dimension \[temperature\]"),
    (["--isa-dev=+90 K"], r"--isa-dev: '\+90 K' is out of range \(-60 to 60 K\)"),
    (["--oat", "500 degC"], r"--oat: '500 degC' is out of range \(-93 to 67 degC\)"),
    (["--oat", "20 kg"], r"--oat: '20 kg' is not a quantity of dimension \[temperature\]"),
    (["--isa-dev", "5", "--oat", "20 degC"], r"argument --oat: not allowed with argument "
                                             r"--isa-dev"),
    (["--wind", "270/25"], r"--wind: wind '270/25': expected DIR/SPEED@ALTITUDE"),
    (["--wind", "270/25kg@3000ft"], r"--wind: wind speed: '25kg' is not a quantity"),
    (["--fuel", "500 L"], r"--fuel: fuel on board 360 kg is outside 0 to the capacity"),
    (["--fuel", "150 %"], r"--fuel: '150 %' must be between 0 and 100 %"),
    (["--fuel", "450 Wh"], r"--fuel: '450 Wh' is neither a volume nor a mass of fuel"),
    (["--fuel", "20"], r"--fuel: '20' needs a unit"),
    (["--payload=-5 kg"], r"--payload: '-5 kg' must be a finite mass, not negative"),
    (["--payload", "5 m"], r"--payload: '5 m' is not a quantity of dimension \[mass\]"),
    (["--altimeter", "1009"], r"--altimeter: '1009' needs a unit, e\.g\. '1009 hPa' or "
                              r"'29\.80 inHg'"),
    (["--altimeter", "500 hPa"], r"--altimeter: '500 hPa' is out of range; expected 850 to "
                                 r"1080 hPa"),
    (["--altimeter", "1009 kg"], r"--altimeter: '1009 kg' is not a quantity of dimension"),
]


@pytest.mark.parametrize("argv, message", BAD_OPTIONS, ids=[" ".join(a) for a, _ in BAD_OPTIONS])
def test_bad_what_if_options(tmp_path, capsys, argv, message):
    path = write(tmp_path, BASE)
    out = tmp_path / "out" / "plan.txt"
    out.parent.mkdir()
    assert main(["plan", str(path), *argv, "--output", str(out)]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    lines = captured.err.splitlines()
    assert len(lines) == 1 and re.search(message, lines[0]), captured.err
    assert not out.exists()


def test_a_wind_for_every_leg_needs_every_leg_course(tmp_path, capsys):
    calm = BASE.replace('course = 220\n', '').replace(
        'wind = "040/18kt@2000ft,030/28kt@6000ft"\n', '')
    path = write(tmp_path, calm)
    out = tmp_path / "out" / "plan.txt"
    out.parent.mkdir()
    assert main(["plan", str(path), "--wind", "270/25@3000ft", "--output", str(out)]) == 2
    err = capsys.readouterr().err
    assert len(err.splitlines()) == 1
    assert re.search(r"leg 2 'back' course: missing; a leg with wind needs its true course",
                     err), err
    assert not out.exists()


def same_plan(a, b):
    """Rows and summary of two JSON plans, compared exactly (JSON floats round-trip)."""
    assert a["rows"] == b["rows"]
    assert a["summary"] == b["summary"]


def test_isa_dev_override_equals_the_file_bit_for_bit(tmp_path, capsys):
    over = json_plan(write(tmp_path, BASE), "--isa-dev", "+20", capsys=capsys)
    file = json_plan(write(tmp_path, BASE.replace('"+10 K"', '"+20 K"'), "f.toml"),
                     capsys=capsys)
    same_plan(over, file)
    assert "What-if: ISA +20 K (overrides of the mission file)" in over["meta_text"]
    assert not any(m.startswith("What-if") for m in file["meta_text"])


def test_oat_altimeter_and_wind_overrides_equal_the_file(tmp_path, capsys):
    path = write(tmp_path, BASE)
    over = json_plan(path, "--oat", "25 degC", "--altimeter", "29.80 inHg", "--wind",
                     "250/30@2000ft,240/45@8000ft", capsys=capsys)
    text = BASE.replace('isa_dev = "+10 K"', 'oat = "25 degC"').replace(
        '"1009 hPa"', '"29.80 inHg"').replace('"040/18kt@2000ft,030/28kt@6000ft"',
                                              '"250/30@2000ft,240/45@8000ft"')
    file = write(tmp_path, text, "f.toml")
    same_plan(over, json_plan(file, capsys=capsys))
    dev = read_mission(file).isa_dev   # 25 degC at the field's 1255 ft PA: ISA +12.5 K
    assert dev == pytest.approx(12.5, abs=0.05)
    assert (f"What-if: altimeter 29.80 inHg, OAT 25 degC at departure (ISA {dev:+.1f} K), "
            "wind 250/30@2000ft,240/45@8000ft on every leg (overrides of the mission file)"
            in over["meta_text"]), over["meta_text"]
    # The altimeter re-reads the file's elevations: the departure field reads as written.
    assert rows(over, "IA from")[0] == pytest.approx(1150.0, abs=1e-6)


def test_fuel_and_payload_overrides_are_applied_and_echoed(tmp_path, capsys):
    path = write(tmp_path, BASE)
    mission = read_mission(path)
    af = mission.airframe
    half = apply_overrides(mission, fuel="50%")
    assert half.store == pytest.approx(0.5 * af.propulsion.store_capacity, rel=1e-12)
    assert plan_mission(half).initial != plan_mission(mission).initial
    assert half.overrides == ("fuel 50%",)
    doc = json_plan(path, "--fuel", "50%", "--payload", "80 kg", capsys=capsys)
    assert "What-if: fuel 50%, payload 80 kg (overrides of the mission file)" in doc["meta_text"]
    expected = plan_report(plan_mission(apply_overrides(mission, fuel="50%",
                                                        payload="80 kg")))
    assert doc["rows"] == json.loads(expected.render("json"))["rows"]
    # A payload override keeps the fuel on board and changes the take-off mass.
    heavy = apply_overrides(mission, payload="200 kg")
    load = af.loading(mass=heavy.mass, store=heavy.store, payload=heavy.payload)
    load0 = af.loading(mass=mission.mass, store=mission.store, payload=mission.payload)
    assert load.store == load0.store and load.mass == pytest.approx(load0.mass + 35.0)


def test_overrides_from_python(tmp_path):
    mission = read_mission(write(tmp_path, BASE))
    once = apply_overrides(mission, fuel="60 %")
    # An altimeter or wind override reads the file again: all overrides in one call.
    with pytest.raises(cp.CruiseplanError, match=r"altimeter: the mission already has "
                                                 r"what-if overrides \(fuel 60 %\)"):
        apply_overrides(once, altimeter="1020 hPa")
    both = apply_overrides(mission, fuel="60 %", altimeter=1020 * HPA, isa_dev=15.0)
    assert both.altimeter == 1020 * HPA and both.isa_dev == 15.0
    assert both.overrides == ("altimeter 1020 hPa", "ISA +15 K", "fuel 60 %")
    # A mission built in Python has no file: a wind goes on its legs, an altimeter cannot.
    bare = replace(mission, source="", overrides=())
    windy = apply_overrides(bare, wind="180/20@3000ft")
    assert all(leg.wind.directions == (180.0,) for leg in windy.legs)
    with pytest.raises(cp.CruiseplanError, match=r"altimeter: the mission has no file"):
        apply_overrides(bare, altimeter="1020 hPa")
    with pytest.raises(cp.CruiseplanError, match=r"isa_dev and oat: give one, not both"):
        apply_overrides(mission, isa_dev=5.0, oat=300.0)
