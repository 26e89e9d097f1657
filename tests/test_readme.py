"""The README's sample output is what the commands print today (dates aside)."""

import re
import shlex
from pathlib import Path

import pytest

from cruiseplan.cli import main

README = Path(__file__).resolve().parent.parent / "README.md"


def samples():
    """(command, printed text) pairs: a backquoted `cruiseplan ...` line, then a text block."""
    text = README.read_text()
    pattern = re.compile(r"`(cruiseplan [^`]+)`[^`]*?\n```text\n(.*?)```", re.S)
    return [(cmd, out) for cmd, out in pattern.findall(text) if "$ " not in out]


def undated(text):
    return [ln for ln in text.splitlines() if not ln.startswith("Made ")]


@pytest.mark.parametrize("command, printed", samples())
def test_readme_sample_is_real_output(command, printed, capsys):
    assert main(shlex.split(command)[1:]) == 0
    assert undated(capsys.readouterr().out) == undated(printed)


def test_readme_has_samples():
    assert len(samples()) >= 2
