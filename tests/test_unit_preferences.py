"""Per-quantity display units: --unit KIND=UNIT on top of --units, and the settings file."""

from __future__ import annotations

import pytest

from cruiseplan.cli import main
from cruiseplan.errors import CruiseplanError
from cruiseplan.units import display, unit_choice


def run(capsys, *argv):
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


def header(out):
    """The units line of a text table (the one starting with '[')."""
    return next(ln for ln in out.splitlines() if ln.strip().startswith("[ft]")
                or ln.strip().startswith("[m]"))


def test_display_override_and_derived_kinds():
    u = unit_choice("aviation", {"volume": "L", "mass": "kg"})
    assert u == "aviation;mass=kg;volume=L"
    assert display("altitude", u) == display("altitude", "aviation")
    assert display("volume", u) == pytest.approx((1000.0, "L"))
    f, label = display("volume_flow", u)
    assert label == "L/h" and f == pytest.approx(3.6e6)
    assert display("sr_fuel", u)[1] == "nm/L"
    assert display("mass_flow", u)[1] == "kg/h"


@pytest.mark.parametrize("kind, unit", [("colour", "L"), ("volume", "kg"), ("speed", "zz")])
def test_bad_override_is_one_line(kind, unit):
    with pytest.raises(CruiseplanError) as exc:
        unit_choice("aviation", {kind: unit})
    assert "\n" not in str(exc.value) and kind in str(exc.value)


def test_table_with_litres_keeps_feet(capsys):
    status, out, err = run(capsys, "table", "demo-trainer", "--units", "aviation",
                           "--unit", "volume=L")
    assert status == 0, err
    units = header(out)
    assert "[L/h]" in units and "[ft]" in units and "[kt]" in units
    assert "US gal" not in units
    status, plain, _ = run(capsys, "table", "demo-trainer", "--units", "aviation")
    assert "[US gal/h]" in header(plain)


def test_settings_file_applies_and_command_line_wins(capsys, tmp_path, monkeypatch):
    f = tmp_path / "settings.toml"
    f.write_text('[units]\nsystem = "si"\n\n[units.overrides]\nvolume = "gallon"\n')
    monkeypatch.setenv("CRUISEPLAN_SETTINGS", str(f))
    status, out, err = run(capsys, "table", "demo-trainer")
    assert status == 0, err
    units = header(out)
    assert "[m]" in units and "[US gal/h]" in units
    status, out, err = run(capsys, "table", "demo-trainer", "--units", "aviation",
                           "--unit", "volume=L")
    units = header(out)
    assert status == 0 and "[ft]" in units and "[L/h]" in units


def test_project_file_is_ignored_when_disabled(capsys, tmp_path, monkeypatch):
    (tmp_path / "cruiseplan.toml").write_text('[units]\nsystem = "si"\n')
    monkeypatch.chdir(tmp_path)
    status, out, _ = run(capsys, "table", "demo-trainer")  # CRUISEPLAN_SETTINGS is ""
    assert status == 0 and "[ft]" in header(out)
    monkeypatch.delenv("CRUISEPLAN_SETTINGS")
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "none"))
    status, out, _ = run(capsys, "table", "demo-trainer")
    assert status == 0 and "[m]" in header(out)


@pytest.mark.parametrize("argv, words", [
    (("--unit", "colour=L"), ("--unit", "valid kinds", "volume_flow")),
    (("--unit", "volume=kg"), ("--unit", "volume")),
    (("--unit", "volume"), ("--unit", "KIND=UNIT")),
])
def test_bad_unit_option_exit_2_nothing_written(capsys, tmp_path, argv, words):
    out_file = tmp_path / "t.csv"
    status, out, err = run(capsys, "table", "demo-trainer", "--format", "csv",
                           "--output", str(out_file), *argv)
    assert status == 2 and out == ""
    assert len(err.strip().splitlines()) == 1
    assert all(w in err for w in words)
    assert not list(tmp_path.iterdir())


@pytest.mark.parametrize("text, words", [
    ('[units]\nsystem = "metric"\n', ("[units] system", "metric")),
    ('[units.overrides]\ncolour = "L"\n', ("[units.overrides] colour", "valid kinds")),
    ('[units.overrides]\nvolume = "kg"\n', ("[units.overrides] volume",)),
    ('[unit]\nsystem = "si"\n', ("unit", "unknown field")),
    ("[units\n", ("not valid TOML",)),
])
def test_bad_settings_file_names_file_and_field(capsys, tmp_path, monkeypatch, text, words):
    f = tmp_path / "settings.toml"
    f.write_text(text)
    monkeypatch.setenv("CRUISEPLAN_SETTINGS", str(f))
    out_file = tmp_path / "out" / "t.csv"
    out_file.parent.mkdir()
    status, out, err = run(capsys, "table", "demo-trainer", "--output", str(out_file))
    assert status == 2 and out == ""
    assert len(err.strip().splitlines()) == 1
    assert str(f) in err and all(w in err for w in words), err
    assert not out_file.exists()
