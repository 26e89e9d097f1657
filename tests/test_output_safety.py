"""Output safety: a previous file stays until the new one is complete, a failed run rolls
back only what it created, special files are streamed as they are, inputs are never
outputs, and every output is checked before anything is computed."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from cruiseplan.cli import main
from cruiseplan.errors import CruiseplanError
from cruiseplan.report import output
from cruiseplan.report.output import check_outputs, write_files_atomic

ROOT = Path(__file__).resolve().parents[1]


def test_a_failed_rename_puts_back_the_previous_file_and_removes_the_new_one(tmp_path,
                                                                            monkeypatch):
    old = tmp_path / "card.pdf"
    old.write_bytes(b"previous good card")
    new = tmp_path / "card.md"
    real = os.replace
    calls = []

    def flaky(src, dst):
        calls.append(dst)
        if len(calls) == 2:            # the second output fails as it is moved in place
            raise OSError(28, "No space left on device")
        return real(src, dst)

    monkeypatch.setattr(output.os, "replace", flaky)
    with pytest.raises(OSError):
        write_files_atomic({old: b"new card", new: "new twin"})
    monkeypatch.setattr(output.os, "replace", real)
    assert old.read_bytes() == b"previous good card"
    assert not new.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["card.pdf"]   # no temporary


def test_a_failed_staging_leaves_every_previous_file(tmp_path):
    old = tmp_path / "a.csv"
    old.write_text("previous\n")
    with pytest.raises(CruiseplanError, match="does not exist"):
        write_files_atomic({old: "new\n", tmp_path / "nowhere" / "b.txt": "x"})
    assert old.read_text() == "previous\n"
    assert [p.name for p in tmp_path.iterdir()] == ["a.csv"]


def test_a_complete_write_replaces_the_previous_files(tmp_path):
    a, b = tmp_path / "a.csv", tmp_path / "a.meta.txt"
    a.write_text("old\n")
    write_files_atomic({a: "new\n", b: b"side\n"})
    assert a.read_text() == "new\n" and b.read_text() == "side\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.csv", "a.meta.txt"]


def test_a_special_file_is_streamed_not_replaced(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    fd = os.open(fifo, os.O_RDONLY | os.O_NONBLOCK)
    try:
        write_files_atomic({fifo: "streamed\n"})
        assert os.read(fd, 100) == b"streamed\n"
    finally:
        os.close(fd)
    assert not fifo.is_file() and fifo.exists()


def test_outputs_are_checked_against_inputs_and_each_other(tmp_path):
    src = tmp_path / "in.toml"
    src.write_text("x")
    with pytest.raises(CruiseplanError, match="--output .*is an input"):
        check_outputs({"--output": src}, inputs=[src])
    with pytest.raises(CruiseplanError, match="--output and --plot name the same file"):
        check_outputs({"--output": tmp_path / "p.png", "--plot": tmp_path / "p.png"})
    with pytest.raises(CruiseplanError, match="is a folder"):
        check_outputs({"--output": tmp_path})


def test_plan_checks_its_output_before_writing_the_plot(capsys, tmp_path, monkeypatch):
    # The plot is not written when --output cannot be: both or neither.
    monkeypatch.chdir(tmp_path)
    status = main(["plan", str(ROOT / "missions" / "demo-cross-country.toml"),
                   "--plot", "p.png", "-o", "nowhere/out.txt"])
    assert status == 2
    assert "--output nowhere/out.txt" in capsys.readouterr().err
    assert list(tmp_path.iterdir()) == []


def test_table_never_writes_over_its_airframe_file(capsys, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    text = (ROOT / "airframes" / "demo-trainer.toml").read_text()
    Path("mine.toml").write_text(text)
    assert main(["table", "mine.toml", "-o", "mine.toml"]) == 2
    assert "is an input of this command" in capsys.readouterr().err
    assert Path("mine.toml").read_text() == text


def test_negative_values_with_units_are_values(capsys):
    assert main(["table", "demo-trainer", "--headwind", "-20kt", "--altitudes", "-500,0ft",
                 "--power", "65"]) == 0
    out = capsys.readouterr().out
    assert "GS" in out and "-500" in out
    assert main(["atmosphere", "--oat", "-10degC", "--altitudes", "-1000,0ft"]) == 0
    assert "-10.00" in capsys.readouterr().out


def test_density_altitude_beyond_the_model_flags_the_row_not_the_table(capsys):
    assert main(["atmosphere", "--altitudes", "19000:20000m:500m", "--isa-dev", "12",
                 "--units", "si"]) == 0
    out = capsys.readouterr().out
    rows = [ln for ln in out.splitlines() if ln.strip().startswith(("19000", "19500",
                                                                     "20000"))]
    assert len(rows) == 3 and rows[-1].split()[-1] == "ATMOS" and rows[0].split()[-1] == "ok"
    assert "ATMOS: density outside" in out
