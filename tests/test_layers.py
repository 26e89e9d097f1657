"""The package's import graph keeps its layers, has no cycles and no hidden dependencies.

Read from the source with ``ast`` (nothing is imported), so a new import that breaks the
architecture fails here with the module and the line.

Layers, bottom to top: base (units, constants, errors, limits, cautions, amounts, version,
numerics, allocator, frames) < physics < kinds < model < planning < studies < report < plots
< cli, with io (files in) beside planning: io may use the base, physics, kinds and model,
never planning or report; studies (sweeps of many plans) use both planning and io.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "cruiseplan"
#: frames (labelled arrays) reads result objects by their attributes and imports only
#: limits from the package, so it sits in the base layer where the result classes of
#: planning may reach it.
BASE = {"units", "constants", "errors", "limits", "cautions", "amounts", "version", "ranges",
        "_numerics", "_allocator", "frames"}
#: What each layer may import from the package (its own layer always).
ALLOWED = {
    "base": {"base"},
    "physics": {"base"},
    "kinds": {"base", "physics"},
    "model": {"base", "physics", "kinds"},
    "planning": {"base", "physics", "kinds", "model"},
    "io": {"base", "physics", "kinds", "model"},
    "studies": {"base", "physics", "kinds", "model", "planning", "io"},
    "report": {"base", "physics", "kinds", "model", "planning", "io", "studies"},
    "plots": {"base", "physics", "kinds", "model", "planning", "io", "report", "studies"},
    "cli": {"base", "physics", "kinds", "model", "planning", "io", "report", "plots",
            "studies"},
}
#: Heavy packages a module may import inside a function, so that importing the package or
#: running a command that does not need them stays quick. cruiseplan.plots carries
#: matplotlib, so it counts as heavy too; cruiseplan.frames carries pandas and xarray (the
#: optional "frames" extra), imported by the result classes' to_xarray/to_dataframe only.
#: tqdm draws the command line's progress bars (cli/progress.py), only on a terminal.
#: dask, distributed and zarr run studies (the "sweeps" extra), imported when one runs.
LAZY_OK = ("matplotlib", "scipy", "pint", "ambiance", "cruiseplan.plots", "cruiseplan.frames",
           "pandas", "xarray", "tqdm", "dask", "distributed", "zarr")


def module_name(path: Path) -> str:
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def layer_of(module: str) -> str | None:
    parts = module.split(".")
    if len(parts) == 1:
        return None  # the package root: the public API, above every layer
    head = parts[1]
    if head in BASE:
        return "base"
    if head == "__main__":
        return "cli"
    return head if head in ALLOWED else None


def imports(path: Path):
    """(line, imported module, names, at module level) for each import of the package."""
    tree = ast.parse(path.read_text(), filename=str(path))
    top_level = {id(node) for node in tree.body}
    # Imports under `if TYPE_CHECKING:` or try/except at the top also count as top level.
    for node in tree.body:
        for child in ast.walk(node):
            if isinstance(child, (ast.Import, ast.ImportFrom)) and not isinstance(
                    node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
                top_level.add(id(child))
    me = module_name(path)
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = me.split(".")
                if path.name != "__init__.py":
                    base = base[:-1]
                base = base[:len(base) - node.level + 1]
                mod = ".".join(base + ([node.module] if node.module else []))
            else:
                mod = node.module or ""
            names = [a.name for a in node.names]
            if mod == "cruiseplan" or mod.startswith("cruiseplan."):
                # `from cruiseplan.x import y` may name a submodule y.
                yield node.lineno, mod, names, id(node) in top_level
            else:
                yield node.lineno, mod, names, id(node) in top_level
        elif isinstance(node, ast.Import):
            for alias in node.names:
                yield node.lineno, alias.name, [], id(node) in top_level


def package_modules():
    return sorted(PACKAGE.rglob("*.py"))


def internal_edges():
    """(importer, imported module, line) for every import inside the package."""
    edges = []
    known = {module_name(p) for p in package_modules()}
    for path in package_modules():
        me = module_name(path)
        for line, mod, names, _ in imports(path):
            if not (mod == "cruiseplan" or mod.startswith("cruiseplan.")):
                continue
            targets = [f"{mod}.{n}" for n in names if f"{mod}.{n}" in known] or [mod]
            edges += [(me, t, line) for t in targets]
    return edges


def test_every_module_has_a_layer():
    for path in package_modules():
        me = module_name(path)
        if me == "cruiseplan":
            continue
        assert layer_of(me) is not None, f"{me} is in no layer: add it to a layer folder"


@pytest.mark.parametrize("path", package_modules(), ids=module_name)
def test_layers(path):
    me = module_name(path)
    mine = layer_of(me)
    if mine is None:
        return
    for line, mod, names, _ in imports(path):
        if not mod.startswith("cruiseplan"):
            continue
        if mod == "cruiseplan" and not set(names) <= {"plots"}:
            pytest.fail(f"{me}:{line} imports the package root ({names}): import from the "
                        "module that defines the name")
        theirs = layer_of(mod) if mod != "cruiseplan" else "plots"
        assert theirs in ALLOWED[mine] | {mine}, (
            f"{me}:{line} ({mine}) imports {mod} ({theirs}); {mine} may import only "
            f"{sorted(ALLOWED[mine])}")


@pytest.mark.parametrize("path", package_modules(), ids=module_name)
def test_no_private_names_from_other_modules(path):
    me = module_name(path)
    for line, mod, names, _ in imports(path):
        if not mod.startswith("cruiseplan") or mod == me:
            continue
        private = [n for n in names if n.startswith("_") and n != "__version__"]
        assert not private, f"{me}:{line} imports private names {private} from {mod}"


@pytest.mark.parametrize("path", package_modules(), ids=module_name)
def test_lazy_imports_only_for_heavy_packages(path):
    me = module_name(path)
    for line, mod, names, top in imports(path):
        if top or mod == "__future__":
            continue
        full = [mod] + [f"{mod}.{n}" for n in names]
        assert any(m == lazy or m.startswith(lazy + ".") for m in full for lazy in LAZY_OK), (
            f"{me}:{line} imports {mod} inside a function; only heavy packages "
            f"({', '.join(LAZY_OK)}) may be imported late, so a module's dependencies show "
            "at its top")


def test_no_import_cycles():
    graph = {}
    for a, b, _ in internal_edges():
        if a != b:
            graph.setdefault(a, set()).add(b)
    # A package's __init__ importing its own submodules is not a cycle of concern, but a
    # submodule importing its package's __init__ back is.
    state, stack = {}, []

    def visit(node):
        state[node] = "open"
        stack.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == "open":
                cycle = stack[stack.index(nxt):] + [nxt]
                pytest.fail("import cycle: " + " -> ".join(cycle))
            if nxt not in state:
                visit(nxt)
        stack.pop()
        state[node] = "done"

    for node in sorted(graph):
        if node not in state:
            visit(node)


def test_the_graph_is_read():
    # The checks above mean something only if imports are found at all.
    edges = internal_edges()
    assert ("cruiseplan.planning.performance", "cruiseplan.limits") in {(a, b) for a, b, _ in
                                                                        edges}
    assert len(edges) > 100
