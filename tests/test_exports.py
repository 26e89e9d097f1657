"""CSV and JSON exports read by programs: plain tables, full precision, a schema.

pandas is not in the test environment, so the CSV files are read with the standard
library's ``csv.reader`` with no options (no comment character, no skipped rows), as a plain
``pandas.read_csv`` would have to read them.
"""

from __future__ import annotations

import csv
import io
import json
import math
import re
from importlib import resources
from pathlib import Path

import jsonschema
import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.cli.options import CSV_CAUTIONS_HINT
from cruiseplan.errors import CruiseplanError
from cruiseplan.io.flightlog import read_flight_log
from cruiseplan.planning.fit import fit_flight_log
from cruiseplan.report.fit_report import fit_report
from cruiseplan.report.output import SCHEMA_VERSION, Column, Report, write_files_atomic
from cruiseplan.units import display

ROOT = Path(__file__).resolve().parents[1]
LOG = ROOT / "logs" / "demo-trainer-flight-test.csv"

#: Every command with a CSV and JSON output, as a notebook or script user would run it.
OUTPUTS = {
    "table by speed": ["table", "demo-trainer", "--altitudes", "0,4000ft", "--speeds",
                       "40,90,110kt"],
    "table by power": ["table", "demo-tourer", "--altitudes", "0,6000ft", "--power", "55,75"],
    "drone table": ["table", "demo-survey-drone", "--speeds", "14:26m/s:4m/s"],
    "best": ["best", "demo-trainer", "--altitudes", "0:8000ft:2000ft"],
    "plan": ["plan", "demo-cross-country"],
    "survey plan": ["plan", "demo-field-survey"],
}
#: Figures every report of a flight states in ``meta``, with their units.
FLIGHT_META = {"mass": {"kg"}, "store": {"kg", "J"}, "isa_dev": {"K"}, "reserve": {"kg", "J"}}
HEADER = re.compile(r"^[^\[\]]+( \[[^\[\]]+\])?$")
HMM = re.compile(r"^\d+:\d\d$")


def schema():
    text = resources.files("cruiseplan.report").joinpath("schema/report.schema.json")
    return json.loads(text.read_text(encoding="utf-8"))


def validator():
    s = schema()
    jsonschema.Draft202012Validator.check_schema(s)
    return jsonschema.Draft202012Validator(s)


def run(capsys, *argv):
    status = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return status, out, err


def read_csv(path) -> list:
    with open(path, newline="", encoding="utf-8") as fh:
        return list(csv.reader(fh))


def by_header(rows) -> dict:
    """Columns of a plain CSV by header, cells as read."""
    head = rows[0]
    return {h: [r[j] for r in rows[1:]] for j, h in enumerate(head)}


def check_plain_csv(rows):
    head, body = rows[0], rows[1:]
    assert body, "no rows"
    assert len(set(head)) == len(head), head
    assert all(HEADER.match(h) for h in head), head
    assert not any(h.startswith("#") for h in head)
    assert all(len(r) == len(head) for r in body)
    for h, cells in by_header(rows).items():
        assert not any(HMM.match(c) for c in cells), (h, cells)  # no h:mm strings
        if "[" in h:  # a unit: numbers or empty cells only
            assert all(c == "" or math.isfinite(float(c)) for c in cells), (h, cells)


@pytest.mark.parametrize("name", OUTPUTS)
def test_csv_is_a_plain_table_with_the_provenance_beside_it(name, tmp_path, capsys):
    dest = tmp_path / "out.csv"
    status, out, err = run(capsys, *OUTPUTS[name], "--format", "csv", "-o", dest)
    assert status == 0, err
    rows = read_csv(dest)
    check_plain_csv(rows)
    meta = (tmp_path / "out.meta.txt").read_text(encoding="utf-8")
    assert all(c in meta for c in cp.CAUTIONS) and "CAUTION:" in meta
    # The same table on standard output, and one line on stderr saying where the cautions are.
    status, out, err = run(capsys, *OUTPUTS[name], "--format", "csv")
    assert status == 0 and err == CSV_CAUTIONS_HINT + "\n"
    assert list(csv.reader(io.StringIO(out))) == rows
    # With --csv-header the provenance is in '#' lines ahead of the same table.
    status, out, err = run(capsys, *OUTPUTS[name], "--format", "csv", "--csv-header")
    assert status == 0 and err == ""
    lines = out.splitlines()
    k = next(i for i, ln in enumerate(lines) if not ln.startswith("#"))
    assert k > 0 and all(f"# CAUTION: {c}" in lines[:k] for c in cp.CAUTIONS)
    assert list(csv.reader(lines[k:])) == rows
    assert not (tmp_path / "out2.meta.txt").exists()


@pytest.mark.parametrize("name", OUTPUTS)
def test_json_is_structured_and_validates(name, tmp_path, capsys):
    dest = tmp_path / "out.json"
    status, out, err = run(capsys, *OUTPUTS[name], "--format", "json", "-o", dest)
    assert status == 0 and err == ""
    with open(dest, encoding="utf-8") as fh:
        doc = json.load(fh)
    validator().validate(doc)
    assert doc["schema_version"] == SCHEMA_VERSION
    for key, units in FLIGHT_META.items():
        q = doc["meta"][key]
        assert isinstance(q["value"], float) and q["unit"] in units, (key, q)
    argv = OUTPUTS[name]
    dev = cp.load_mission(argv[1]).isa_dev if argv[0] == "plan" else 0.0
    assert doc["meta"]["isa_dev"] == {"value": dev, "unit": "K"}
    assert doc["meta_text"] and all(isinstance(m, str) for m in doc["meta_text"])
    assert doc["cautions"] == list(cp.CAUTIONS)
    units = [c["unit"] for c in doc["columns"]]
    assert "h:mm" not in units
    for row in doc["rows"]:
        assert len(row) == len(units)
        for v, u in zip(row, units):
            assert v is None or not isinstance(v, str) or not u, (v, u)


def test_fit_json_validates_and_its_csv_reads_plain(tmp_path, capsys):
    status, out, err = run(capsys, "fit", LOG, "--airframe", "demo-trainer", "--format", "json")
    assert status == 0, err
    doc = json.load(io.StringIO(out))
    validator().validate(doc)
    assert doc["schema_version"] == SCHEMA_VERSION
    assert doc["meta"]["reference_mass"]["unit"] == "kg"
    assert doc["meta"]["cd0"]["value"] == doc["summary"]["cd0"]
    af = cp.load_airframe("demo-trainer")
    log = read_flight_log(LOG)
    fit = fit_flight_log(af, log)
    dest = tmp_path / "fit.csv"
    write_files_atomic(fit_report(fit, log, af).files("csv", dest))
    rows = read_csv(dest)
    check_plain_csv(rows)
    cols = by_header(rows)
    fs, ls = display("speed", "aviation")
    assert [float(x) for x in cols[f"VIW [{ls}]"]] == pytest.approx((fit.viw * fs).tolist(),
                                                                    rel=1e-15)
    assert [float(x) for x in cols["stud. res."]] == pytest.approx(fit.studentised.tolist(),
                                                                  rel=1e-15)
    assert "fitted from a flight log" in (tmp_path / "fit.meta.txt").read_text()


def test_csv_numbers_are_the_apis_at_full_precision(tmp_path, capsys):
    af = cp.load_airframe("demo-trainer")
    h = np.array([0.0, 4000 * 0.3048])
    v = np.array([90.0, 110.0]) * 1852.0 / 3600.0
    pts = cp.cruise_grid(af, h, v)
    dest = tmp_path / "t.csv"
    assert main(["table", "demo-trainer", "--altitudes", "0,4000ft", "--speeds", "90,110kt",
                 "--units", "si", "--format", "csv", "-o", str(dest)]) == 0
    cols = by_header(read_csv(dest))
    fd, ld = display("distance", "si")
    fp, lp = display("power", "si")

    def numbers(name):  # an empty cell where the point is not flyable
        return [float(x) if x else math.nan for x in cols[name]]

    # The fuel airframe shows h:mm to people; programs get minutes.
    assert numbers("endurance [min]") == pytest.approx((pts.endurance / 60.0).ravel().tolist(),
                                                       rel=1e-15, nan_ok=True)
    assert numbers(f"range [{ld}]") == pytest.approx((pts.range_air * fd).ravel().tolist(),
                                                     rel=1e-15, nan_ok=True)
    assert numbers(f"shaft [{lp}]") == pytest.approx((pts.shaft_power * fp).ravel().tolist(),
                                                     rel=1e-15)
    # Not the display rounding: the text table shows whole km.
    assert sum(math.isfinite(x) for x in numbers("endurance [min]")) >= 3
    assert any(x != round(x, 3) for x in numbers(f"range [{ld}]") if math.isfinite(x))
    assert cols["status"] == [cp.explain(int(c), short=True) for c in pts.limits.ravel()]


def test_plan_csv_times_and_distances_at_full_precision(tmp_path, capsys):
    plan = cp.plan_mission(cp.load_mission("demo-cross-country"))
    dest = tmp_path / "p.csv"
    assert main(["plan", "demo-cross-country", "--units", "si", "--format", "csv",
                 "-o", str(dest)]) == 0
    cols = by_header(read_csv(dest))
    fd, ld = display("distance", "si")
    flown = [s for s in plan.segments if s.flown]
    assert len(cols["time [min]"]) == len(plan.segments)
    assert [float(x) for x in cols["time [min]"] if x] == pytest.approx(
        [s.time / 60.0 for s in flown], rel=1e-15)
    assert [float(x) for x in cols[f"dist [{ld}]"] if x] == pytest.approx(
        [s.distance * fd for s in flown], rel=1e-15)
    assert cols["segment"] == [s.kind for s in plan.segments]
    status, out, _ = run(capsys, "plan", "demo-cross-country", "--format", "json")
    doc = json.loads(out)
    assert doc["meta"]["reserve"]["value"] == pytest.approx(plan.reserve_required, rel=1e-15)
    assert doc["meta"]["mass"]["value"] == pytest.approx(plan.takeoff_mass, rel=1e-15)
    names = [c["name"] for c in doc["columns"]]
    assert doc["columns"][names.index("time")]["unit"] == "min"


def test_schema_rejects_a_document_without_version_or_with_prose_figures():
    check = validator()
    rep = Report("t", ["line"], [Column("a", "m", [1.0])], cautions=("c",),
                 quantities={"mass": (700.0, "kg")})
    doc = json.loads(rep.render("json"))
    check.validate(doc)
    del doc["schema_version"]
    with pytest.raises(jsonschema.ValidationError):
        check.validate(doc)
    doc = json.loads(rep.render("json"))
    doc["meta"]["mass"] = "700 kg"
    with pytest.raises(jsonschema.ValidationError):
        check.validate(doc)


def test_machine_values_beside_display_values():
    col = Column("endurance", "h:mm", ["6:14", None, "-"], "{}", data=[374.2, None, math.nan],
                 data_unit="min")
    rep = Report("t", [], [col, Column("n", "", [np.int64(3), 2, 1], "{:d}")], cautions=("c",))
    assert [col.cell(i) for i in range(3)] == ["6:14", "-", "-"]  # people: unchanged
    assert rep.csv() == "endurance [min],n\n374.2,3\n,2\n,1\n"
    doc = json.loads(rep.render("json"))
    assert doc["columns"][0] == {"name": "endurance", "unit": "min"}
    assert doc["rows"] == [[374.2, 3], [None, 2], [None, 1]]
    x = 0.1 + 0.2  # 0.30000000000000004: repr, not a display format
    assert Report("t", [], [Column("x", "m", [x])]).csv().splitlines()[1] == repr(x)


def test_csv_and_sidecar_are_written_whole_or_not_at_all(tmp_path, capsys):
    class Unwritable(str):
        def encode(self, *args, **kwargs):
            raise OSError("disk full")

    csv_path, meta_path = tmp_path / "a.csv", tmp_path / "a.meta.txt"
    with pytest.raises(OSError, match="disk full"):
        write_files_atomic({csv_path: "x [m]\n1.0\n", meta_path: Unwritable("title\n")})
    assert list(tmp_path.iterdir()) == []  # neither file, no temporary file
    # Old files stay as they were when a new pair cannot be written.
    csv_path.write_text("old\n")
    meta_path.write_text("old meta\n")
    with pytest.raises(OSError):
        write_files_atomic({csv_path: "new\n", meta_path: Unwritable("new meta\n")})
    assert csv_path.read_text() == "old\n" and meta_path.read_text() == "old meta\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.csv", "a.meta.txt"]
    # A missing folder: an error, one line and exit 2 from the command line, nothing written.
    with pytest.raises(CruiseplanError, match="does not exist"):
        write_files_atomic({tmp_path / "no" / "b.csv": "x\n"})
    status, out, err = run(capsys, "table", "demo-trainer", "--altitudes", "0", "--speeds",
                           "90kt", "--format", "csv", "-o", tmp_path / "no" / "b.csv")
    assert status == 2 and out == "" and len(err.strip().splitlines()) == 1
    assert not (tmp_path / "no").exists()


def test_hours_minutes_column_equals_the_one_at_a_time_format():
    import math

    from cruiseplan.report.output import hours_minutes, hours_minutes_list
    rng = np.random.default_rng(1)
    # Half minutes round half to even in both; None, NaN and inf are missing.
    seconds = list(rng.uniform(0.0, 40000.0, 5000)) + [
        None, float("nan"), float("inf"), 0.0, 29.999, 30.0, 90.0, 150.0, 3570.0, 3630.0]
    expected = [None if t is None or not math.isfinite(t) else hours_minutes(t)
                for t in seconds]
    assert hours_minutes_list(seconds) == expected
