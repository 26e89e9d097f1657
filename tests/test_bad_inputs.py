"""The bad-input suite: hundreds of bad and hostile inputs over every command and file kind.

Each case runs the command line in-process, in a folder of its own holding copies of the
inputs (airframe, mission, study and log files, good and bad) and a previous output, and
checks the exit-2 contract of the README:

* exit status 2 (never 0 for bad input, never 1 with a traceback);
* one line on standard error, ``cruiseplan: error: ...``, naming the option or the file
  and field at fault (the case's pattern);
* nothing on standard output;
* no file created, changed or deleted (every file's bytes and modification time, before
  and after; no temporary file left).

The cases are built from tables (option x bad value, file x mutation); each one is a real
call that must be refused. ``len(CASES)`` is reported in the closing note of issue 15.
"""

from __future__ import annotations

import os
import re
import shutil
from pathlib import Path

import pytest

from cruiseplan.cli import main

ROOT = Path(__file__).resolve().parents[1]
AIRFRAME = (ROOT / "airframes" / "demo-trainer.toml").read_text()
DRONE = (ROOT / "airframes" / "demo-survey-drone.toml").read_text()
MISSION = (ROOT / "missions" / "demo-cross-country.toml").read_text()
STUDY = (ROOT / "studies" / "demo-hot-day-loads.toml").read_text()
LOG = (ROOT / "logs" / "demo-trainer-flight-test.csv").read_text()
LOG_HEADER = next(ln for ln in LOG.splitlines() if ln and not ln.startswith("#"))
LOG_ROWS = [ln for ln in LOG.splitlines() if ln and not ln.startswith("#")][1:]
PREVIOUS = "previous output, to be kept\n"

# --- the cases -------------------------------------------------------------------------------

CASES = []


def case(argv, pattern, cid=None):
    """Add a case: the arguments and a pattern the one-line error must match."""
    CASES.append(pytest.param(list(argv), pattern, id=cid or " ".join(argv)[:120]))


NON_FINITE = ("nan", "inf", "-inf", "1e999", "NaN kt", "infinity")

# Options taking one number with or without a unit, by command, with the arguments the
# command needs and the pattern naming the option.
NUMERIC = {
    "atmosphere": (["atmosphere", "-o", "previous.txt"],
                   ["--isa-dev", "--oat", "--altitudes"]),
    "table": (["table", "trainer.toml", "-o", "previous.txt"],
              ["--altitudes", "--speeds", "--power", "--weight", "--fuel", "--payload",
               "--isa-dev", "--stall-margin", "--headwind", "--pack-temperature"]),
    "best": (["best", "trainer.toml", "-o", "previous.txt"],
             ["--altitudes", "--floor", "--ceiling", "--max-agl", "--climb-reserve",
              "--weight", "--fuel", "--payload", "--isa-dev", "--stall-margin",
              "--monte-carlo", "--seed", "--headwind"]),
    "plot": (["plot", "trainer.toml", "-o", "new.png"],
             ["--altitudes", "--speeds", "--weight", "--fuel", "--payload", "--isa-dev",
              "--stall-margin", "--headwind"]),
    "card": (["card", "trainer.toml", "-o", "new.pdf"],
             ["--altitudes", "--power", "--reserve", "--weight", "--fuel", "--payload",
              "--isa-dev", "--stall-margin", "--monte-carlo", "--seed"]),
    "plan": (["plan", "mission.toml", "-o", "previous.txt"],
             ["--isa-dev", "--oat", "--fuel", "--payload", "--altimeter", "--monte-carlo",
              "--seed", "--pack-temperature"]),
    "fit": (["fit", "log.csv", "--airframe", "trainer.toml", "-o", "new.toml"],
            ["--reference-mass"]),
}

for command, (base, opts) in NUMERIC.items():
    for opt in opts:
        for bad in NON_FINITE:
            case(base + [opt, bad], re.escape(opt), f"{command} {opt} {bad}")

# Out of the physical range, of the wrong dimension, or not a number at all.
OUT_OF_RANGE = [
    ("atmosphere", "--isa-dev", ["500", "-61", "+61 K", "200 degF"]),
    ("atmosphere", "--oat", ["200 degC", "-150 degC", "500 K"]),
    ("atmosphere", "--altitudes", ["100 km", "-6000 m", "0:1000000ft:1ft", "0:100:0",
                                   "10:0:1", "", ",", "1,,2", "0:1:2:3", "abc", "10 kg",
                                   "0:1e300:1e-300", "0:1e308:1e-308", "1e308,1e308",
                                   "-1e308,0"]),
    ("table", "--isa-dev", ["70", "-100 K", "10 kg", "hot"]),
    ("table", "--stall-margin", ["0.5", "0", "-1", "10", "abc", "1.3 kt"]),
    ("table", "--headwind", ["1000 kt", "-1000kt", "10 kg", "fast"]),
    ("table", "--speeds", ["-10,20", "0", "1000 kt", "10 kg", "90:80kt:1kt", "x",
                           "1e-300:1:1e-300", "1e308"]),
    ("table", "--power", ["0", "150", "-10", "55,200", "x"]),
    ("table", "--weight", ["-5", "0", "1e9 lb", "10 m", "heavy", "1000 lb"]),
    ("table", "--payload", ["-5 kg", "1e9 kg", "10 s"]),
    ("table", "--fuel", ["-10 L", "500 %", "10 kt", "lots"]),
    ("table", "--pack-temperature", ["5 degC"]),
    ("table", "--altitudes", ["0,100km", "0:1e999:1", "a:b:c"]),
    ("best", "--seed", ["-1", "5000000000", "1.5", "x"]),
    ("best", "--monte-carlo", ["0", "-5", "2000000", "1.5", "x"]),
    ("best", "--floor", ["100 km", "10 kg"]),
    ("best", "--ceiling", ["-10 km", "high"]),
    ("best", "--climb-reserve", ["-100 ft/min", "100 m/s", "10 kg"]),
    ("best", "--isa-dev", ["90", "-90 K"]),
    ("best", "--stall-margin", ["0.9", "5"]),
    ("plot", "--speeds", ["100kt", "90,80kt", "-10,20kt", "1000,2000kt"]),
    ("plot", "--isa-dev", ["100"]),
    ("card", "--power", ["0", "120", "x"]),
    ("card", "--reserve", ["-5 min", "forever", "10 kg m"]),
    ("card", "--stall-margin", ["0.5"]),
    ("plan", "--isa-dev", ["90", "-70 K", "5 kg"]),
    ("plan", "--oat", ["150 degC", "-150 degC", "cold"]),
    ("plan", "--altimeter", ["10 hPa", "5000 hPa", "10 kt", "x"]),
    ("plan", "--fuel", ["-5 L", "500 %", "10 kt"]),
    ("plan", "--payload", ["-5 kg", "1e9 kg", "5 m"]),
    ("plan", "--monte-carlo", ["0", "3000000"]),
    ("plan", "--seed", ["-3"]),
    ("plan", "--wind", ["270", "270/20", "abc@def", "400/20@3000ft", "270/-20@3000ft",
                        "270/nan@3000ft", "270/inf@0ft", "270/20@1e308ft",
                        "270/20@-1e308ft", "270/20@500km"]),
    ("fit", "--reference-mass", ["-5 kg", "0", "10 m", "x", "1e308", "1e6 kg"]),
]
for command, opt, values in OUT_OF_RANGE:
    base = NUMERIC[command][0]
    for bad in values:
        case(base + [opt + "=" + bad], re.escape(opt), f"{command} {opt}={bad!r}")

# Negative values with a unit are values, not options: accepted where the quantity may be
# negative (a tailwind, a cold day, a high-pressure day's negative pressure altitude) and,
# where it may not, refused with a message naming the option, not argparse's "expected one
# argument".
for command, opt, value in [("table", "--weight", "-1600lb"), ("table", "--payload", "-5kg"),
                            ("table", "--speeds", "-90kt"), ("table", "--fuel", "-10L"),
                            ("best", "--climb-reserve", "-300ft/min"),
                            ("best", "--max-agl", "-120m"), ("card", "--power", "-55"),
                            ("fit", "--reference-mass", "-700kg"),
                            ("plan", "--payload", "-80kg"), ("plan", "--fuel", "-40L"),
                            ("best", "--course", "-90"), ("best", "--seed", "-7")]:
    extra = ["--wind", "270/20@0ft"] if opt == "--course" else []
    case(NUMERIC[command][0] + extra + [opt, value], re.escape(opt),
         f"{command} {opt} {value} (negative)")

# Options that go together, or not at all.
for argv, pattern in [
    (["best", "trainer.toml", "--wind", "270/20@0ft"], "--wind needs --course"),
    (["best", "trainer.toml", "--course", "90"], "--course goes with --wind"),
    (["best", "trainer.toml", "--course", "400", "--wind", "270/20@0ft"], "--course"),
    (["best", "trainer.toml", "--course", "-1", "--wind", "270/20@0ft"], "--course"),
    (["best", "trainer.toml", "--course", "nan", "--wind", "270/20@0ft"], "--course"),
    (["best", "trainer.toml", "--elevation", "450m"], "--elevation goes with --max-agl"),
    (["best", "trainer.toml", "--wind", "270/20@0ft", "--headwind", "10"], "--headwind"),
    (["best", "trainer.toml", "--objective", "speed"], "--objective"),
    (["table", "trainer.toml", "--speeds", "90", "--power", "55"], "--power"),
    (["table", "trainer.toml", "--weight", "1600", "--fuel", "10 L"], "--fuel"),
    (["table", "trainer.toml", "--units", "metric"], "--units"),
    (["table", "trainer.toml", "--unit", "volume"], "--unit"),
    (["table", "trainer.toml", "--unit", "colour=L"], "colour"),
    (["table", "trainer.toml", "--unit", "volume=kg"], "volume"),
    (["table", "trainer.toml", "--format", "xml"], "--format"),
    (["atmosphere", "--isa-dev", "10", "--oat", "20"], "--oat"),
    (["plot", "trainer.toml", "-o", "new.png", "--kind", "altitude", "--speeds", "90,100"],
     "--speeds"),
    (["plot", "trainer.toml", "-o", "new.png", "--kind", "power", "--headwind", "10"],
     "--headwind"),
    (["plot", "trainer.toml", "-o", "new.png", "--kind", "pie"], "--kind"),
    (["plan", "mission.toml", "--isa-dev", "10", "--oat", "20"], "--oat"),
    (["plan", "survey.toml", "--monte-carlo", "100"], "--monte-carlo"),
    (["fit", "log.csv"], "--airframe"),
    (["sweep", "study.toml"], "--output"),
    (["sweep", "study.toml", "-o", "x.zarr", "--workers", "0"], "--workers"),
    (["sweep", "study.toml", "-o", "x.zarr", "--workers", "1000"], "--workers"),
    (["sweep", "study.toml", "-o", "x.zarr", "--workers", "x"], "--workers"),
    (["sweep", "study.toml", "-o", "x.zarr", "--workers", "2", "--scheduler", "tcp://x:1"],
     "--scheduler"),
    (["sweep", "study.toml", "-o", "x.txt"], "--output"),
    (["sweep", "study.toml", "-o", "keep.zarr"], "keep.zarr"),
    (["frobnicate"], "frobnicate"),
    (["table"], "airframe"),
    (["plan"], "mission"),
]:
    case(argv, re.escape(pattern))

for command, base in [("atmosphere", ["atmosphere"]), ("table", ["table", "trainer.toml"]),
                      ("best", ["best", "trainer.toml"]),
                      ("plot", ["plot", "trainer.toml", "-o", "new.png"]),
                      ("card", ["card", "trainer.toml", "-o", "new.pdf"]),
                      ("plan", ["plan", "mission.toml"]),
                      ("fit", ["fit", "log.csv", "--airframe", "trainer.toml"]),
                      ("sweep", ["sweep", "study.toml", "-o", "new.zarr"]),
                      ("airframes", ["airframes"])]:
    case(base + ["--frobnicate"], "--frobnicate", f"{command} --frobnicate")

# --- outputs: never over an input, never a folder, checked before computing ---------------

OUTPUTS = [
    (["table", "trainer.toml", "-o", "trainer.toml"], "--output"),
    (["table", "trainer.toml", "-o", "./trainer.toml"], "--output"),
    (["table", "trainer.toml", "-o", "link.toml"], "--output"),
    (["table", "trainer.toml", "--format", "csv", "-o", "trainer.toml"], "--output"),
    (["best", "trainer.toml", "-o", "trainer.toml"], "--output"),
    (["table", "trainer.toml", "-o", "folder"], "--output"),
    (["table", "trainer.toml", "-o", "nowhere/out.txt"], "--output"),
    (["table", "trainer.toml", "-o", ""], "--output"),
    (["atmosphere", "-o", "folder"], "--output"),
    (["atmosphere", "-o", "nowhere/x.csv", "--format", "csv"], "--output"),
    (["atmosphere", "--format", "csv", "-o", "folder/"], "--output"),
    (["atmosphere", "--format", "csv", "-o", "side.csv"], "sidecar"),
    (["plan", "mission.toml", "-o", "mission.toml"], "--output"),
    (["plan", "mission.toml", "-o", "folder"], "--output"),
    (["plan", "mission.toml", "--plot", "mission.toml"], "--plot"),
    (["plan", "mission.toml", "--plot", "p.png", "-o", "p.png"], "same file"),
    (["plan", "mission.toml", "--plot", "p.svg"], "--plot"),
    (["plan", "mission.toml", "--plot", "nowhere/p.png"], "--plot"),
    (["plan", "mission.toml", "--plot", "p.png", "-o", "nowhere/out.txt"], "--output"),
    (["plot", "trainer.toml", "-o", "x.txt"], "--output"),
    (["plot", "trainer.toml", "-o", "folder"], "--output"),
    (["plot", "trainer.toml", "-o", "nowhere/x.png"], "--output"),
    (["card", "trainer.toml", "-o", "x.png"], "--output"),
    (["card", "trainer.toml", "-o", "nowhere/x.pdf"], "--output"),
    (["card", "trainer.toml", "-o", "twin.pdf"], "twin"),
    (["fit", "log.csv", "--airframe", "trainer.toml", "-o", "trainer.toml"], "--output"),
    (["fit", "log.csv", "--airframe", "trainer.toml", "-o", "new.txt"], "--output"),
    (["fit", "log.csv", "--airframe", "trainer.toml", "-o", "folder"], "--output"),
    (["fit", "log.csv", "--airframe", "trainer.toml", "-o", "nowhere/n.toml"], "--output"),
    (["fit", "log.csv", "--airframe", "trainer.toml", "--plot", "log.csv"], "--plot"),
    (["fit", "log.csv", "--airframe", "trainer.toml", "--plot", "r.png", "-o", "r.png"],
     "--output"),
    (["fit", "log.csv", "--airframe", "trainer.toml", "--plot", "nowhere/r.png"], "--plot"),
]
for argv, pattern in OUTPUTS:
    case(argv, re.escape(pattern), "output: " + " ".join(argv))

# --- files: airframe, mission, study and log files, bad and hostile --------------------------


def _sub(text, old, new):
    assert old in text, old
    return text.replace(old, new, 1)


AIRFRAME_FILES = {
    "cd0 nan": (_sub(AIRFRAME, "cd0 = 0.036", "cd0 = nan"), r"\[polar\] cd0"),
    "cd0 inf": (_sub(AIRFRAME, "cd0 = 0.036", "cd0 = inf"), r"\[polar\] cd0"),
    "cd0 negative": (_sub(AIRFRAME, "cd0 = 0.036", "cd0 = -0.03"), r"\[polar\] cd0"),
    "cd0 text": (_sub(AIRFRAME, "cd0 = 0.036", 'cd0 = "low"'), r"\[polar\] cd0"),
    "cd0 list": (_sub(AIRFRAME, "cd0 = 0.036", "cd0 = [0.036]"), r"\[polar\] cd0"),
    "e above 1": (_sub(AIRFRAME, "oswald_e = 0.76", "oswald_e = 1.5"), r"oswald_e"),
    "area list": (_sub(AIRFRAME, 'area = "11.2 m^2"', 'area = ["11.2 m^2"]'), r"area"),
    "area table": (_sub(AIRFRAME, 'area = "11.2 m^2"', "area = {a = 1}"), r"area"),
    "area 1e999": (_sub(AIRFRAME, 'area = "11.2 m^2"', 'area = "1e999 m^2"'), r"area"),
    "area nan": (_sub(AIRFRAME, 'area = "11.2 m^2"', 'area = "nan m^2"'), r"area"),
    "area wrong unit": (_sub(AIRFRAME, 'area = "11.2 m^2"', 'area = "11.2 kg"'), r"area"),
    "span zero": (_sub(AIRFRAME, 'span = "9.6 m"', 'span = "0 m"'), r"span"),
    "span 1e308": (_sub(AIRFRAME, 'span = "9.6 m"', 'span = "1e308 m"'), r"span"),
    "area 1e308": (_sub(AIRFRAME, 'area = "11.2 m^2"', 'area = "1e308 m^2"'), r"area|span"),
    "mtom 1e308": (_sub(AIRFRAME, 'max_takeoff = "760 kg"', 'max_takeoff = "1e308 kg"'),
                   r"max_takeoff"),
    "fuel capacity 1e308": (_sub(AIRFRAME, 'fuel_capacity = "100 L"',
                                 'fuel_capacity = "1e308 L"'), r"fuel_capacity"),
    "rated power 1e308": (_sub(AIRFRAME, 'rated_power = "75 kW"', 'rated_power = "1e308 kW"'),
                          r"rated_power"),
    "empty mass 1e999": (_sub(AIRFRAME, 'empty = "520 kg"', 'empty = "1e999 kg"'), r"empty"),
    "empty mass inf": (_sub(AIRFRAME, 'empty = "520 kg"', 'empty = "inf kg"'), r"empty"),
    "empty mass negative": (_sub(AIRFRAME, 'empty = "520 kg"', 'empty = "-520 kg"'),
                            r"empty"),
    "mtom below empty": (_sub(AIRFRAME, 'max_takeoff = "760 kg"', 'max_takeoff = "100 kg"'),
                         r"max_takeoff|empty"),
    "rated power nan": (_sub(AIRFRAME, 'rated_power = "75 kW"', 'rated_power = "nan kW"'),
                        r"rated_power"),
    "rated power text": (_sub(AIRFRAME, 'rated_power = "75 kW"', "rated_power = true"),
                         r"rated_power"),
    "fuel capacity zero": (_sub(AIRFRAME, 'fuel_capacity = "100 L"', 'fuel_capacity = "0 L"'),
                           r"fuel_capacity"),
    "unknown fuel": (_sub(AIRFRAME, 'fuel = "avgas"', 'fuel = "whisky"'), r"fuel"),
    "unknown kind": (_sub(AIRFRAME, 'kind = "piston-propeller"', 'kind = "jet"'), r"kind"),
    "unknown polar": (_sub(AIRFRAME, 'kind = "parabolic"', 'kind = "magic"'), r"kind"),
    "efficiency above 1": (_sub(AIRFRAME, "propeller_efficiency = 0.75",
                                "propeller_efficiency = 1.5"), r"propeller_efficiency"),
    "unknown field": (_sub(AIRFRAME, "cl_max = 1.45", "cl_max = 1.45\nflux = 3"), r"flux"),
    "description table": (_sub(AIRFRAME, 'description = "Two-seat piston trainer (invented '
                               'demo)"', "description = {a = 1}"), r"description"),
    "description list": (_sub(AIRFRAME, 'description = "Two-seat piston trainer (invented '
                              'demo)"', "description = [1, 2]"), r"description"),
    "no wing": (AIRFRAME.replace("[wing]", "[wings]"), r"wing"),
    "not toml": ("this is [not toml", r"not valid TOML"),
    "deep nesting": ("a = " + "[" * 5000 + "]" * 5000, r"nested too deeply|not valid TOML"),
    "empty": ("", r"airframe|\[masses\]|missing"),
    "binary": ("\x00\x01\x02\xff", r"TOML|UTF"),
    "uncertainty nan": (_sub(AIRFRAME, 'cd0 = "6 %"', "cd0 = nan"), r"\[uncertainty\] cd0"),
    "uncertainty huge": (_sub(AIRFRAME, 'cd0 = "6 %"', 'cd0 = "600 %"'),
                         r"\[uncertainty\] cd0"),
}
for name, (text, pattern) in AIRFRAME_FILES.items():
    for argv in (["table", "bad.toml", "-o", "previous.txt"],
                 ["card", "bad.toml", "-o", "new.pdf"]):
        case(argv, pattern + "|bad.toml", f"airframe {name}: {argv[0]}")
        CASES[-1].values[0].insert(0, ("bad.toml", text))

MISSION_FILES = {
    "isa_dev 500": (_sub(MISSION, 'isa_dev = "+20 K"', 'isa_dev = "+500 K"'), r"isa_dev"),
    "isa_dev nan": (_sub(MISSION, 'isa_dev = "+20 K"', 'isa_dev = "nan K"'), r"isa_dev"),
    "isa_dev list": (_sub(MISSION, 'isa_dev = "+20 K"', "isa_dev = [20]"), r"isa_dev"),
    "altimeter 1e999": (_sub(MISSION, 'altimeter = "1009 hPa"', 'altimeter = "1e999 hPa"'),
                        r"altimeter"),
    "altimeter low": (_sub(MISSION, 'altimeter = "1009 hPa"', 'altimeter = "100 hPa"'),
                      r"altimeter"),
    "payload negative": (_sub(MISSION, 'payload = "165 kg"', 'payload = "-165 kg"'),
                         r"payload"),
    "payload inf": (_sub(MISSION, 'payload = "165 kg"', 'payload = "inf kg"'), r"payload"),
    "fuel 500 %": (_sub(MISSION, 'fuel = "100 %"', 'fuel = "500 %"'), r"fuel"),
    "fuel table": (_sub(MISSION, 'fuel = "100 %"', "fuel = {x = 1}"), r"fuel"),
    "unknown airframe": (_sub(MISSION, 'airframe = "demo-trainer"',
                              'airframe = "no-such-plane"'), r"no-such-plane"),
    "airframe list": (_sub(MISSION, 'airframe = "demo-trainer"', 'airframe = ["a"]'),
                      r"airframe"),
    "speed 5000 kt": (_sub(MISSION, 'speed = "best"', 'speed = "5000 kt"'), r"speed"),
    "speed nan": (_sub(MISSION, 'speed = "best"', 'speed = "nan kt"'), r"speed"),
    "speed negative": (_sub(MISSION, 'speed = "best"', 'speed = "-100 kt"'), r"speed"),
    "altitude 1e999": (_sub(MISSION, 'altitude = "best"', 'altitude = "1e999 ft"'),
                       r"altitude"),
    "altitude 500 km": (_sub(MISSION, 'altitude = "best"', 'altitude = "500 km"'),
                        r"altitude"),
    "wind 1000 kt": (_sub(MISSION, "040/18kt@2000ft,", "040/1000kt@2000ft,"), r"wind"),
    "wind direction 400": (_sub(MISSION, "040/18kt@2000ft,", "400/18kt@2000ft,"), r"wind"),
    "wind nan": (_sub(MISSION, "040/18kt@2000ft,", "040/nankt@2000ft,"), r"wind"),
    "from latitude 95": (_sub(MISSION, "from = [44.610, -101.320]",
                              "from = [95.0, -101.320]"), r"from"),
    "from nan": (_sub(MISSION, "from = [44.610, -101.320]", "from = [nan, -101.320]"),
                 r"from"),
    "distance negative": (_sub(MISSION, 'distance = "16 nm"', 'distance = "-16 nm"'),
                          r"distance"),
    "distance inf": (_sub(MISSION, 'distance = "16 nm"', 'distance = "inf nm"'),
                     r"distance"),
    "course 400": (_sub(MISSION, "course = 95", "course = 400"), r"course"),
    "course nan": (_sub(MISSION, "course = 95", "course = nan"), r"course"),
    "reserve negative": (_sub(MISSION, 'time = "45 min"', 'time = "-45 min"'), r"time"),
    "reserve text": (_sub(MISSION, 'time = "45 min"', 'time = "forever"'), r"time"),
    "descent rate zero": (_sub(MISSION, 'descent_rate = "500 ft/min"',
                               'descent_rate = "0 ft/min"'), r"descent_rate"),
    "elevation 1e999": (_sub(MISSION, 'departure_elevation = "1150 ft"',
                             'departure_elevation = "1e999 ft"'), r"departure_elevation"),
    "no legs": (MISSION.split("[[legs]]")[0], r"legs"),
    "unknown field": (_sub(MISSION, "[day]", "[day]\nhumidity = 3"), r"humidity"),
    "not toml": ("[mission\nname=", r"not valid TOML"),
    "deep nesting": ("a = " + "{b = " * 3000 + "1" + "}" * 3000,
                     r"nested too deeply|not valid TOML"),
    "empty": ("", r"mission"),
    "allowance 1e308": (_sub(MISSION, 'start_taxi_takeoff = "4 L"',
                             'start_taxi_takeoff = "1e308 L"'), r"start_taxi_takeoff"),
    "descent rate 1e308": (_sub(MISSION, 'descent_rate = "500 ft/min"',
                                'descent_rate = "1e308 ft/min"'), r"descent_rate"),
    "clearance 1e308": (_sub(MISSION, 'min_clearance = "1000 ft"',
                             'min_clearance = "1e308 ft"'), r"min_clearance"),
    "leg elevation 1e308": (_sub(MISSION, 'elevation = "2300 ft"', 'elevation = "1e308 ft"'),
                            r"elevation"),
    "reserve 1e308 min": (_sub(MISSION, 'time = "45 min"', 'time = "1e308 min"'), r"time"),
}
for name, (text, pattern) in MISSION_FILES.items():
    case(["plan", "bad.toml", "-o", "previous.txt"], pattern + "|bad.toml",
         f"mission {name}")
    CASES[-1].values[0].insert(0, ("bad.toml", text))

STUDY_FILES = {
    "isa_dev nan": (_sub(STUDY, 'isa_dev = "0:30:10 K"', 'isa_dev = "0:nan:10 K"'),
                    r"isa_dev"),
    "isa_dev 1e999": (_sub(STUDY, 'isa_dev = "0:30:10 K"', 'isa_dev = "0:1e999:10 K"'),
                      r"isa_dev"),
    "isa_dev table": (_sub(STUDY, 'isa_dev = "0:30:10 K"', "isa_dev = {a = 1}"),
                      r"isa_dev"),
    "payload negative": (_sub(STUDY, '"120 kg"', '"-120 kg"'), r"payload"),
    "unknown axis": (_sub(STUDY, "[axes]", "[axes]\nflux = [1, 2]"), r"flux"),
    "unknown mission": (_sub(STUDY, 'mission = "demo-cross-country"', 'mission = "nope"'),
                        r"nope"),
    "record unknown": (_sub(STUDY, '"verdict", ', '"verdict", "colour", '), r"colour"),
    "chunk zero": (_sub(STUDY, "chunk = 9", "chunk = 0"), r"chunk"),
    "chunk nan": (_sub(STUDY, "chunk = 9", "chunk = nan"), r"chunk"),
    "huge": (_sub(STUDY, 'isa_dev = "0:30:10 K"', 'isa_dev = "0:30:0.00001 K"'),
             r"isa_dev|points"),
    "not toml": ("[study\n", r"not valid TOML"),
}
for name, (text, pattern) in STUDY_FILES.items():
    case(["sweep", "bad.toml", "-o", "new.zarr"], pattern + "|bad.toml", f"study {name}")
    CASES[-1].values[0].insert(0, ("bad.toml", text))


def _log(rows, header=LOG_HEADER):
    return "\n".join([header, *rows]) + "\n"


LOG_FILES = {
    "identical rows": (_log([LOG_ROWS[0]] * 10), r"bad\.csv|speed"),
    "header only": (_log([]), r"bad\.csv"),
    "empty": ("", r"bad\.csv"),
    "binary": ("\x00\xff\xfe", r"bad\.csv"),
    "nan cell": (_log([_sub(LOG_ROWS[0], ",62.0,", ",nan,")] + LOG_ROWS[1:]), r"cas"),
    "inf cell": (_log([_sub(LOG_ROWS[0], ",62.0,", ",inf,")] + LOG_ROWS[1:]), r"cas"),
    "1e999 cell": (_log([_sub(LOG_ROWS[0], ",62.0,", ",1e999,")] + LOG_ROWS[1:]), r"cas"),
    "negative cas": (_log([_sub(LOG_ROWS[0], ",62.0,", ",-62.0,")] + LOG_ROWS[1:]), r"cas"),
    "text cell": (_log([_sub(LOG_ROWS[0], ",62.0,", ",fast,")] + LOG_ROWS[1:]), r"cas"),
    "missing column": (_log(LOG_ROWS, LOG_HEADER.replace("cas [kt]", "speed [kt]")),
                       r"cas|speed"),
    "wrong unit": (_log(LOG_ROWS, LOG_HEADER.replace("cas [kt]", "cas [kg]")), r"cas"),
    "doubled column": (_log([r + ",60" for r in LOG_ROWS], LOG_HEADER + ",cas [kt]"),
                       r"cas"),
    "short row": (_log([LOG_ROWS[0].rsplit(",", 2)[0]] + LOG_ROWS[1:]), r"bad\.csv"),
    "three rows": (_log(LOG_ROWS[:3]), r"bad\.csv|points"),
    "oat 1e308": (_log([_sub(LOG_ROWS[0], ",19.0,", ",1e308,")] + LOG_ROWS[1:]), r"oat"),
    "cas 1e308": (_log([_sub(LOG_ROWS[0], ",62.0,", ",1e308,")] + LOG_ROWS[1:]), r"cas"),
    "weight 1e308": (_log([_sub(LOG_ROWS[0], ",1658,", ",1e308,")] + LOG_ROWS[1:]),
                     r"weight"),
    "fuel flow 1e308": (_log([_sub(LOG_ROWS[0], ",12.24,", ",1e308,")] + LOG_ROWS[1:]),
                        r"fuel_flow"),
    "altitude 1e308 ft": (_log([LOG_ROWS[0].replace("2000,", "1e308,", 1)] + LOG_ROWS[1:]),
                          r"pressure altitude"),
    "altitude 1e6 ft": (_log([LOG_ROWS[0].replace("2000,", "1000000,", 1)] + LOG_ROWS[1:]),
                        r"pressure_altitude|bad\.csv"),
}
for name, (text, pattern) in LOG_FILES.items():
    case(["fit", "bad.csv", "--airframe", "trainer.toml", "-o", "new.toml"], pattern,
         f"log {name}")
    CASES[-1].values[0].insert(0, ("bad.csv", text))

# Special inputs: a folder, a pipe, a device, a missing file.
for argv, pattern in [
    (["fit", "folder", "--airframe", "trainer.toml"], "folder"),
    (["fit", "fifo", "--airframe", "trainer.toml"], "fifo"),
    (["fit", "/dev/zero", "--airframe", "trainer.toml"], "/dev/zero"),
    (["fit", "missing.csv", "--airframe", "trainer.toml"], "missing.csv"),
    (["fit", "log.csv", "--airframe", "fifo"], "fifo"),
    (["table", "fifo"], "fifo"),
    (["table", "folder"], "folder"),
    (["table", "/dev/zero"], "/dev/zero"),
    (["table", "missing.toml"], "missing.toml"),
    (["plan", "fifo"], "fifo"),
    (["plan", "/dev/zero"], "/dev/zero"),
    (["plan", "missing.toml"], "missing.toml"),
    (["sweep", "fifo", "-o", "new.zarr"], "fifo"),
    (["sweep", "missing.toml", "-o", "new.zarr"], "missing.toml"),
    (["card", "fifo", "-o", "new.pdf"], "fifo"),
    (["plot", "/dev/zero", "-o", "new.png"], "/dev/zero"),
]:
    case(argv, re.escape(pattern), "special input: " + " ".join(argv))


# --- the check -------------------------------------------------------------------------------

def _snapshot(folder: Path) -> dict:
    out = {}
    for path in sorted(folder.rglob("*")):
        st = path.lstat()
        data = path.read_bytes() if path.is_file() and not path.is_symlink() else None
        out[str(path.relative_to(folder))] = (st.st_mode, st.st_mtime_ns, data)
    return out


@pytest.fixture
def workdir(tmp_path, monkeypatch):
    """A folder with the good inputs, a previous output, a folder, a pipe and a link."""
    (tmp_path / "trainer.toml").write_text(AIRFRAME)
    (tmp_path / "drone.toml").write_text(DRONE)
    (tmp_path / "mission.toml").write_text(MISSION)
    shutil.copy(ROOT / "missions" / "demo-field-survey.toml", tmp_path / "survey.toml")
    (tmp_path / "study.toml").write_text(STUDY)
    (tmp_path / "log.csv").write_text(LOG)
    (tmp_path / "previous.txt").write_text(PREVIOUS)
    (tmp_path / "folder").mkdir()
    (tmp_path / "keep.zarr").mkdir()
    (tmp_path / "keep.zarr" / "data").write_text("not a study store\n")
    (tmp_path / "side.meta.txt").mkdir()       # a CSV's sidecar that cannot be written
    (tmp_path / "twin.md").mkdir()             # a card's twin that cannot be written
    os.mkfifo(tmp_path / "fifo")
    (tmp_path / "link.toml").symlink_to("trainer.toml")
    monkeypatch.chdir(tmp_path)
    return tmp_path


@pytest.mark.parametrize("argv, pattern", CASES)
def test_bad_input_is_refused_in_one_line_and_touches_no_file(capsys, workdir, argv,
                                                              pattern):
    argv = list(argv)
    while argv and isinstance(argv[0], tuple):   # a bad file this case brings
        name, text = argv.pop(0)
        (workdir / name).write_bytes(text.encode("utf-8", "surrogateescape"))
    before = _snapshot(workdir)
    status = main(argv)
    out, err = capsys.readouterr()
    assert "Traceback" not in err
    lines = err.splitlines()
    assert status == 2, (status, err)
    assert len(lines) == 1, err
    assert lines[0].startswith("cruiseplan: error: "), lines[0]
    assert re.search(pattern, lines[0]), lines[0]
    assert out == ""
    after = _snapshot(workdir)
    assert after == before, sorted(set(after) ^ set(before)) or "a file changed"


def test_the_suite_has_hundreds_of_cases():
    assert len(CASES) >= 300, len(CASES)
