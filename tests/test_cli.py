"""The command line, run in-process: commands, formats, files and bad input."""

from __future__ import annotations

import csv
import io
import json
import re
import subprocess
import sys

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main

FT = 0.3048
KT = 1852.0 / 3600.0


def run(capsys, *argv):
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


def _csv_rows(text):
    """Comment lines (without '# ') and the table rows of a CSV report."""
    comments = [ln[2:] for ln in text.splitlines() if ln.startswith("# ")]
    body = "\n".join(ln for ln in text.splitlines() if not ln.startswith("#"))
    return comments, list(csv.reader(io.StringIO(body)))


# --- commands ------------------------------------------------------------------------------------

def test_airframes_lists_the_bundled_ones(capsys):
    status, out, err = run(capsys, "airframes")
    assert status == 0 and err == ""
    lines = out.splitlines()
    # Issue 12 added the two demo airframes whose packs are equivalent circuits.
    assert [ln.split()[0] for ln in lines] == ["demo-mapping-quad-4s", "demo-mapping-quad",
                                               "demo-sensor-wing", "demo-survey-drone-6s",
                                               "demo-survey-drone", "demo-tourer",
                                               "demo-trainer"]
    assert "fixed-wing piston" in out and "fixed-wing electric" in out
    assert "multirotor electric" in out
    status, out, _ = run(capsys, "airframes", "--format", "json")
    rows = json.loads(out)
    assert {r["name"] for r in rows} == {"demo-mapping-quad", "demo-mapping-quad-4s",
                                         "demo-sensor-wing", "demo-survey-drone",
                                         "demo-survey-drone-6s", "demo-tourer", "demo-trainer"}
    # The listing's masses are the files' (JSON keeps the float exact).
    for r in rows:
        assert r["max_takeoff_kg"] == cp.load_airframe(r["name"]).max_takeoff_mass, r["name"]


def test_atmosphere_command(capsys):
    status, out, err = run(capsys, "atmosphere", "--altitudes", "0:10000ft:5000ft",
                           "--isa-dev", "10", "--format", "json")
    assert status == 0 and err == ""
    doc = json.loads(out)
    units = {c["name"]: c["unit"] for c in doc["columns"]}
    assert units["PA"] == "ft" and units["OAT"] == "degC" and units["density"] == "kg/m^3"
    assert len(doc["rows"]) == 3
    names = [c["name"] for c in doc["columns"]]
    table = {n: np.array([r[i] for r in doc["rows"]]) for i, n in enumerate(names)}
    np.testing.assert_allclose(table["PA"], [0.0, 5000.0, 10000.0], atol=1e-9)
    air = cp.air_state(np.array([0.0, 5000.0, 10000.0]) * FT, 10.0)
    np.testing.assert_allclose(table["OAT"], air.temperature - 273.15, atol=1e-9)
    np.testing.assert_allclose(table["density"], air.density, rtol=1e-12)
    np.testing.assert_allclose(table["ISA dev"], 10.0)
    # ISA + 10 K at sea level: 25 degC and density altitude well above sea level.
    assert table["OAT"][0] == pytest.approx(25.0)
    assert table["DA"][0] == pytest.approx(float(air.density_altitude[0]) / FT, rel=1e-12)
    assert doc["cautions"] == list(cp.CAUTIONS)

    status, out, _ = run(capsys, "atmosphere", "--altitudes", "0:10000ft:5000ft",
                         "--isa-dev", "10")
    assert status == 0
    assert "ISA (ICAO Doc 7488/3)" in out and "CAUTION:" in out
    assert re.search(r"^\s+0\s+25\.00\s+\+10\.0\s+1013\.25\s+1\.18391", out, re.M)


def test_table_by_power_setting(capsys, trainer):
    status, out, err = run(capsys, "table", "demo-trainer", "--power", "55,65,75",
                           "--format", "json")
    assert status == 0 and err == ""
    doc = json.loads(out)
    names = [c["name"] for c in doc["columns"]]
    units = {c["name"]: c["unit"] for c in doc["columns"]}
    assert units["TAS"] == "kt" and units["PA"] == "ft" and units["shaft"] == "hp"
    assert units["fuel flow"] == "US gal/h" and units["range"] == "nm"
    # Default altitudes 0:10000ft:2000ft x three settings.
    assert len(doc["rows"]) == 6 * 3
    col = {n: [r[i] for r in doc["rows"]] for i, n in enumerate(names)}
    assert col["power"][:3] == pytest.approx([55.0, 65.0, 75.0], abs=1e-6)
    # The same numbers as the public API.
    pts = cp.power_setting_table(cp.load_airframe("demo-trainer"),
                                 np.arange(0.0, 10001.0, 2000.0) * FT, [0.55, 0.65, 0.75])
    tas = np.array([np.nan if v is None else v for v in col["TAS"]])
    np.testing.assert_allclose(tas, pts.tas.ravel() / KT, rtol=1e-12)
    # 75 % at 10000 ft exceeds the Gagg-Ferrar full-throttle power there (70 %): flagged.
    assert col["status"][-1] == "POWER" and col["TAS"][-1] is None
    assert any("POWER: power required exceeds power available" in n for n in doc["notes"])
    assert doc["cautions"] == list(cp.CAUTIONS)


def test_table_drone_by_speed_si(capsys):
    status, out, err = run(capsys, "table", "demo-survey-drone", "--speeds", "14:26m/s:4m/s",
                           "--units", "si", "--format", "csv", "--csv-header")
    assert status == 0 and err == ""
    comments, rows = _csv_rows(out)
    header = rows[0]
    for name in ("PA [m]", "TAS [km/h]", "CAS [km/h]", "shaft [W]", "battery [W]",
                 "SR [km/kWh]", "endurance [min]", "range [km]", "L/D", "status"):
        assert name in header, name
    data = rows[1:]
    assert len(data) == 5 * 4  # default drone altitudes 0:400m:100m x four speeds
    tas = [float(r[header.index("TAS [km/h]")]) for r in data[:4]]
    assert tas == pytest.approx([50.4, 64.8, 79.2, 93.6], abs=0.05)
    # 14 m/s is below 1.3 x stall speed: flagged, and the note explains the code.
    assert data[0][header.index("status")] == "STALL"
    assert any(c.startswith("STALL: below the stall margin") for c in comments)
    for caution in cp.CAUTIONS:
        assert f"CAUTION: {caution}" in comments
    assert any("NO reserve" in c for c in comments)


@pytest.mark.parametrize("fmt", ["text", "csv", "json", "markdown"])
def test_every_format_has_units_and_cautions(capsys, fmt):
    # CSV carries its cautions as '#' lines on request (a plain CSV: tests/test_exports.py).
    status, out, err = run(capsys, "table", "demo-trainer", "--altitudes", "0,4000ft",
                           "--speeds", "90,110kt", "--format", fmt,
                           *(["--csv-header"] if fmt == "csv" else []))
    assert status == 0 and err == ""
    if fmt == "json":
        doc = json.loads(out)
        units = {c["name"]: c["unit"] for c in doc["columns"]}
        assert all(units[n] for n in ("PA", "TAS", "CAS", "shaft", "fuel flow", "SR",
                                      "endurance", "range"))
        assert doc["cautions"] == list(cp.CAUTIONS)
        assert len(doc["rows"]) == 4
    elif fmt == "csv":
        comments, rows = _csv_rows(out)
        assert "TAS [kt]" in rows[0] and "fuel flow [US gal/h]" in rows[0]
        assert len(rows) == 1 + 4
        assert sum(c.startswith("CAUTION: ") for c in comments) == len(cp.CAUTIONS)
    elif fmt == "markdown":
        assert "| PA [ft] |" in out and "| TAS [kt] |" in out
        assert "**Cautions**" in out
        assert all(f"- {c}" in out for c in cp.CAUTIONS)
    else:
        assert re.search(r"^\s*PA\s+OAT\s+DA\s+TAS", out, re.M)
        assert re.search(r"^\s*\[ft\]\s+\[degC\]\s+\[ft\]\s+\[kt\]", out, re.M)
        assert "CAUTION:" in out
        assert all(c in out for c in cp.CAUTIONS)


@pytest.mark.parametrize("fmt", ["text", "csv", "json", "markdown"])
def test_output_file_is_written(capsys, tmp_path, fmt):
    dest = tmp_path / f"table.{fmt}"
    status, out, err = run(capsys, "table", "demo-trainer", "--power", "65",
                           "--altitudes", "0,2000ft", "--format", fmt, "--output", str(dest))
    assert status == 0 and out == "" and err == ""
    text = dest.read_text(encoding="utf-8")
    status, out, _ = run(capsys, "table", "demo-trainer", "--power", "65",
                         "--altitudes", "0,2000ft", "--format", fmt)
    assert text == out
    assert not list(tmp_path.glob(".*.tmp"))  # no temporary file left behind


def test_headwind_adds_ground_columns(capsys):
    status, out, _ = run(capsys, "table", "demo-trainer", "--speeds", "100kt",
                         "--altitudes", "0", "--headwind", "20 kt", "--format", "json")
    doc = json.loads(out)
    names = [c["name"] for c in doc["columns"]]
    row = doc["rows"][0]
    assert row[names.index("GS")] == pytest.approx(80.0, abs=1e-9)
    assert row[names.index("gnd range")] == pytest.approx(
        row[names.index("range")] * 0.8, rel=1e-12)


def test_module_runs_as_a_program():
    res = subprocess.run([sys.executable, "-m", "cruiseplan", "airframes"],
                         capture_output=True, text=True, timeout=60)
    assert res.returncode == 0, res.stderr
    assert "demo-trainer" in res.stdout and res.stderr == ""


def test_each_family_registers_the_commands_listed_for_it():
    # The command -> family table decides which module a command imports; it must match
    # what each family registers, or a command would be missing from its own parser.
    from cruiseplan.cli import FAMILIES, build_parser
    for family, commands in FAMILIES.items():
        sub = build_parser(commands[0])._subparsers._group_actions[0]
        assert tuple(sub.choices) == commands, family
    assert tuple(build_parser()._subparsers._group_actions[0].choices) == tuple(
        c for commands in FAMILIES.values() for c in commands)


def test_a_command_imports_only_its_own_family():
    # Start-up time: `table` does not load the mission planner, the log fit, the plots or
    # pint's registry (the airframe's units are converted by the fast table).
    code = ("import sys; from cruiseplan.cli import main; main(['table', 'demo-trainer']); "
            "print(' '.join(sorted(sys.modules)), file=sys.stderr)")
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=60)
    assert res.returncode == 0, res.stderr
    loaded = set(res.stderr.split())
    assert "cruiseplan.cli.tables" in loaded
    for module in ("cruiseplan.cli.plan", "cruiseplan.cli.fit", "cruiseplan.cli.figures",
                   "cruiseplan.io.mission_file", "cruiseplan.planning.fit",
                   "cruiseplan.plots", "matplotlib", "pint"):
        assert module not in loaded, module


# --- bad input: status 2, one line on stderr, no traceback, no output file ---------------------

BAD_CALLS = [
    (["table", "no-such-plane"],
     r"no-such-plane: no such airframe file, nor a bundled airframe \(bundled: "),
    (["atmosphere", "--altitudes", "7777 kg"],
     r"--altitudes: '7777 kg' is not a quantity of dimension \[length\]"),
    (["table", "demo-trainer", "--power", "150"],
     r"--power: '150' must be percentages of rated power in \(0, 100\]"),
    (["table", "demo-trainer", "--power", "0"],
     r"--power: '0' must be percentages of rated power"),
    (["table", "demo-trainer", "--fuel", "200 L"],
     r"fuel on board 144 kg is outside 0 to the capacity of demo-trainer, 72 kg of fuel"),
    (["table", "demo-trainer", "--fuel", "120%"],
     r"--fuel: '120%' must be between 0 and 100 %"),
    (["table", "demo-trainer", "--fuel", "3 m"],
     r"--fuel: '3 m' is neither a volume"),
    (["table", "demo-trainer", "--speeds=-10,20"],
     r"--speeds: speeds must be positive"),
    (["table", "demo-trainer", "--speeds", "0:100"],
     r"--speeds: a range is 'start:stop:step', got '0:100'"),
    (["atmosphere", "--altitudes", "0:10000ft:0ft"],
     r"--altitudes: range '0:10000ft:0ft' needs stop >= start and a positive step"),
    (["atmosphere", "--altitudes", "0:1000000ft:1ft"],
     r"--altitudes: range .* has 1000001 points; at most 100000 allowed"),
    (["table", "demo-trainer", "--weight", "1000 lb"],
     r"mass 453\.6 kg is below empty mass 520\.0 kg plus payload 160\.0 kg of demo-trainer"),
    (["table", "demo-trainer", "--frobnicate"],
     r"unrecognized arguments: --frobnicate"),
    (["atmosphere", "--altitudes", "100 km"],
     r"--altitudes 100000 m \(328084 ft\) is outside the atmosphere model's range "
     r"-5000 to 80000 m pressure altitude"),
    (["table", "demo-trainer", "--altitudes", "0,100km"],
     r"--altitudes 100000 m .* outside the atmosphere model's range"),
    (["table", "demo-trainer", "--stall-margin", "0.5"],
     r"argument --stall-margin: 0\.5 is out of range \(1 to 3\)"),
    (["table", "demo-trainer", "--stall-margin", "abc"],
     r"argument --stall-margin: 'abc' is not a number"),
    (["table", "demo-trainer", "--format", "xml"],
     r"argument --format: invalid choice: 'xml'"),
    (["atmosphere", "--isa-dev", "10 kg"],
     r"--isa-dev: '10 kg' is not a quantity of dimension \[temperature\]"),
    (["atmosphere", "--isa-dev=-400"],
     r"--isa-dev: -400 K is out of range \(-60 K to 60 K\)"),
    (["atmosphere", "--isa-dev", "10", "--oat", "20"],
     r"argument --oat: not allowed with argument --isa-dev"),
    (["table", "demo-trainer", "--headwind", "10 kg"],
     r"--headwind: '10 kg' is not a quantity of dimension \[length\] / \[time\]"),
    (["table", "demo-trainer", "--weight", "1600 lb", "--fuel", "10 L"],
     r"argument --fuel: not allowed with argument --weight"),
]


@pytest.mark.parametrize("argv, message", BAD_CALLS, ids=[" ".join(a) for a, _ in BAD_CALLS])
def test_bad_call(capsys, tmp_path, argv, message):
    dest = tmp_path / "out.txt"
    status, out, err = run(capsys, *argv, "--output", str(dest))
    assert status == 2
    assert out == ""
    assert "Traceback" not in err
    lines = err.splitlines()
    assert len(lines) == 1, err
    assert re.match(r"cruiseplan: error: ", lines[0])
    assert re.search(message, lines[0]), lines[0]
    assert not dest.exists()
    assert list(tmp_path.iterdir()) == []


# Each command with the arguments it requires (argparse reports those first).
COMMANDS = {"airframes": [], "atmosphere": [], "table": ["demo-trainer"],
            "best": ["demo-trainer"], "plan": ["demo-survey-run"],
            "plot": ["demo-trainer", "-o", "x.png"], "card": ["demo-trainer", "-o", "x.pdf"],
            "fit": ["log.csv", "--airframe", "demo-trainer"],
            "sweep": ["demo-hot-day-loads", "-o", "x.zarr"]}


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_every_command_refuses_an_unknown_option_in_one_line(capsys, tmp_path, monkeypatch,
                                                             command):
    # Every command, not only those in BAD_CALLS: status 2, one line naming the option,
    # and nothing written.
    monkeypatch.chdir(tmp_path)
    status, out, err = run(capsys, command, *COMMANDS[command], "--frobnicate")
    assert status == 2 and out == ""
    assert "Traceback" not in err and len(err.splitlines()) == 1, err
    assert re.match(r"cruiseplan: error: unrecognized arguments: --frobnicate$", err), err
    assert list(tmp_path.iterdir()) == []


def test_command_list_is_complete(capsys):
    # The commands above are all the program has: an unknown one is refused with the list.
    status, _, err = run(capsys, "fly")
    assert status == 2
    listed = re.search(r"choose from (.*)\)", err).group(1)
    assert sorted(re.findall(r"[a-z]+", listed)) == sorted(COMMANDS)


@pytest.mark.parametrize("argv, message", [
    ([], r"the following arguments are required: command"),
    (["fly"], r"invalid choice: 'fly'"),
    (["table", "demo-trainer", "--speeds", "90kt", "--output", "/nonexistent-dir/x.txt"],
     r"--output /nonexistent-dir/x\.txt: folder /nonexistent-dir does not exist"),
])
def test_bad_call_without_output_file(capsys, argv, message):
    status, out, err = run(capsys, *argv)
    assert status == 2 and out == ""
    assert "Traceback" not in err and len(err.splitlines()) == 1
    assert re.search(message, err)


def test_bad_airframe_file_path(capsys, tmp_path):
    bad = tmp_path / "broken.toml"
    bad.write_text("[masses]\nempty = 5\n", encoding="utf-8")
    dest = tmp_path / "out.csv"
    status, out, err = run(capsys, "table", str(bad), "--format", "csv", "--output", str(dest))
    assert status == 2 and out == ""
    assert re.fullmatch(r"cruiseplan: error: .*broken\.toml: \[masses\] empty: 5 needs a unit"
                        r".*\n", err)
    assert not dest.exists()
