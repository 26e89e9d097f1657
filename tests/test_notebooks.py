"""The notebooks in notebooks/: stored without outputs, public API only, and they run.

Each notebook asserts its own key figures in a code cell, so executing it is a test of the
computation it shows; executing is done on a copy, so the stored file keeps no outputs.
"""

from __future__ import annotations

import ast
import shutil
from pathlib import Path

import nbclient
import nbformat
import pytest

NOTEBOOKS = Path(__file__).resolve().parent.parent / "notebooks"
PATHS = sorted(NOTEBOOKS.glob("*.ipynb"))
EXPECTED = ("tourer-hot-day-altitude", "survey-drone-battery", "polar-from-flight-log",
            "best-departure-hour")


def code_of(cell) -> str:
    """A code cell's source with IPython magics (``%...``) left out, for ``ast``."""
    return "\n".join(line for line in cell.source.splitlines()
                     if not line.lstrip().startswith("%"))


def test_notebooks_are_stored_without_outputs():
    assert {p.stem for p in PATHS} >= set(EXPECTED)
    for path in PATHS:
        nb = nbformat.read(path, as_version=nbformat.NO_CONVERT)
        nbformat.validate(nb)
        assert nb.nbformat == 4, path.name
        assert nb.metadata.kernelspec.name == "python3", path.name
        for i, cell in enumerate(nb.cells):
            if cell.cell_type == "code":
                assert cell.outputs == [], f"{path.name} cell {i} has outputs"
                assert cell.execution_count is None, f"{path.name} cell {i} has a count"


def test_notebooks_use_the_public_api_and_carry_the_cautions():
    for path in PATHS:
        nb = nbformat.read(path, as_version=4)
        code = [code_of(c) for c in nb.cells if c.cell_type == "code"]
        for i, source in enumerate(code):
            for node in ast.walk(ast.parse(source)):
                names = []
                if isinstance(node, ast.ImportFrom):
                    names = (node.module or "").split(".") + [a.name for a in node.names]
                elif isinstance(node, ast.Import):
                    names = [part for a in node.names for part in a.name.split(".")]
                elif isinstance(node, ast.Attribute):
                    names = [node.attr]
                private = [n for n in names if n.startswith("_")]
                assert not private, f"{path.name} code cell {i} uses private names {private}"
        assert any("print" in c and "CAUTIONS" in c for c in code), path.name
        markdown = " ".join(c.source for c in nb.cells if c.cell_type == "markdown")
        markdown = " ".join(markdown.replace(">", " ").lower().split())   # quote lines joined
        assert "planning aid" in markdown and "flight manual" in markdown, path.name
        assert any("assert " in c for c in code), f"{path.name} asserts no key figure"


@pytest.mark.parametrize("path", PATHS, ids=[p.stem for p in PATHS])
def test_notebook_runs(path, tmp_path, monkeypatch):
    # The kernel's connection file and IPython's history go to the test's own folder.
    monkeypatch.setenv("JUPYTER_RUNTIME_DIR", str(tmp_path / "runtime"))
    monkeypatch.setenv("IPYTHONDIR", str(tmp_path / "ipython"))
    copy = tmp_path / path.name
    shutil.copyfile(path, copy)
    nb = nbformat.read(copy, as_version=4)
    # "python3" is the kernel ipykernel installs into this environment; jupyter_client runs
    # it with this interpreter (sys.executable).
    client = nbclient.NotebookClient(nb, timeout=120, kernel_name="python3",
                                     resources={"metadata": {"path": str(NOTEBOOKS)}})
    client.execute()          # raises CellExecutionError, with the cell, if an assert fails
    nbformat.write(nb, copy)
    errors = [o for c in nb.cells if c.cell_type == "code" for o in c.outputs
              if o.output_type == "error"]
    assert not errors
    images = sum("image/png" in o.get("data", {}) for c in nb.cells
                 if c.cell_type == "code" for o in c.outputs)
    assert images >= 2, f"{path.name} shows {images} figures"
