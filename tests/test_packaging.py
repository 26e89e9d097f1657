"""Packaging: the wheel carries the bundled airframes and missions and works installed.

The repository's ``airframes/`` and ``missions/`` are the source; ``pyproject.toml`` maps them
into the wheel as ``cruiseplan/_bundled/airframes`` and ``cruiseplan/_bundled/missions``. These
tests build the wheel from a copy of the source tree (so no ``build/`` or stale files of the
checkout leak in), install it non-editable into a folder of its own and run it from outside the
repository, where only the files inside the wheel can be found.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import tomllib
import zipfile
from importlib import metadata
from pathlib import Path

import pytest
from packaging.requirements import Requirement

pytestmark = pytest.mark.packaging

REPO = Path(__file__).resolve().parent.parent
BUNDLED = {"airframes": sorted((REPO / "airframes").glob("*.toml")),
           "missions": sorted((REPO / "missions").glob("*.toml"))}
# Not part of a build: virtual environments, VCS data, build output and caches.
_NOT_SOURCE = shutil.ignore_patterns(".git", ".venv", "build", "dist", "*.egg-info",
                                     "__pycache__", "*.pyc", ".pytest_cache", ".ruff_cache",
                                     ".hypothesis", ".ipynb_checkpoints", "out")


def _run(args, cwd, env=None) -> str:
    """Run a command; fail with its output unless it exits 0; return its stdout."""
    done = subprocess.run([str(a) for a in args], cwd=cwd, env=env, capture_output=True,
                          text=True, stdin=subprocess.DEVNULL)
    assert done.returncode == 0, (f"{' '.join(map(str, args))} exited {done.returncode}\n"
                                  f"--- stdout\n{done.stdout}\n--- stderr\n{done.stderr}")
    return done.stdout


def _build_backend_here() -> bool:
    """Whether this interpreter has every build-system requirement (then no download)."""
    with open(REPO / "pyproject.toml", "rb") as f:
        requires = tomllib.load(f)["build-system"]["requires"]
    for text in requires:
        req = Requirement(text)
        try:
            version = metadata.version(req.name)
        except metadata.PackageNotFoundError:
            return False
        if not req.specifier.contains(version, prereleases=True):
            return False
    return True


@pytest.fixture(scope="module")
def wheel(tmp_path_factory) -> Path:
    """The wheel built from a clean copy of the source tree."""
    src = tmp_path_factory.mktemp("source") / "cruiseplan"
    shutil.copytree(REPO, src, ignore=_NOT_SOURCE)
    out = tmp_path_factory.mktemp("wheelhouse")
    # Offline with the test extras' setuptools; otherwise pip fetches the backend.
    isolation = ["--no-build-isolation"] if _build_backend_here() else []
    _run([sys.executable, "-m", "pip", "wheel", "--no-deps", *isolation,
          "--disable-pip-version-check", "--no-input", "-q", "-w", out, "."], cwd=src)
    (built,) = out.glob("cruiseplan-*.whl")
    return built


@pytest.fixture(scope="module")
def installed(wheel, tmp_path_factory):
    """(target folder, environment, working folder) of the wheel installed non-editable."""
    target = tmp_path_factory.mktemp("target")
    _run([sys.executable, "-m", "pip", "install", "--no-deps", "--no-compile",
          "--disable-pip-version-check", "--no-input", "-q", "--target", target, wheel],
         cwd=target)
    # The venv's site-packages still give numpy, scipy, pint, ambiance and matplotlib. Its
    # editable-install finder sits after the path finder, so PYTHONPATH's copy is found first
    # (test_installed_wheel_is_the_one_imported fails loudly should that ever change).
    env = {**os.environ, "PYTHONPATH": str(target)}
    env.pop("PYTHONHOME", None)
    workdir = tmp_path_factory.mktemp("elsewhere")
    assert REPO not in workdir.parents
    return target, env, workdir


def test_wheel_carries_every_bundled_file_unchanged(wheel):
    assert all(BUNDLED.values()), "no bundled files in the repository"
    with zipfile.ZipFile(wheel) as zf:
        names = set(zf.namelist())
        for folder, files in BUNDLED.items():
            inside = {n for n in names
                      if n.startswith(f"cruiseplan/_bundled/{folder}/") and n.endswith(".toml")}
            assert inside == {f"cruiseplan/_bundled/{folder}/{p.name}" for p in files}
            for p in files:
                assert zf.read(f"cruiseplan/_bundled/{folder}/{p.name}") == p.read_bytes(), p
        # One source: the repository folders are not shipped a second time at the top level.
        assert not any(n.startswith(("airframes/", "missions/")) for n in names)


def test_installed_wheel_is_the_one_imported(installed):
    target, env, workdir = installed
    out = _run([sys.executable, "-c",
                "import cruiseplan\n"
                "from cruiseplan.io.bundled import bundled_files\n"
                "print(cruiseplan.__file__)\n"
                "for kind in ('airframe', 'mission'):\n"
                "    for path in bundled_files(kind).values():\n"
                "        print(path)\n"], cwd=workdir, env=env)
    lines = [Path(line) for line in out.splitlines()]
    assert lines[0].resolve().is_relative_to(target.resolve()), lines[0]
    assert not lines[0].resolve().is_relative_to(REPO)
    expected = {target.resolve() / "cruiseplan" / "_bundled" / folder / p.name
                for folder, files in BUNDLED.items() for p in files}
    assert {p.resolve() for p in lines[1:]} == expected


def test_installed_wheel_lists_the_bundled_airframes(installed):
    target, env, workdir = installed
    out = _run([sys.executable, "-m", "cruiseplan", "airframes"], cwd=workdir, env=env)
    names = {p.stem for p in BUNDLED["airframes"]}
    assert len(names) == 7   # five, and since issue 12 the two with circuit packs
    listed = {line.split()[0] for line in out.splitlines() if line.strip()}
    assert names <= listed, f"{sorted(names - listed)} missing from:\n{out}"


def test_installed_wheel_plans_the_demo_mission(installed):
    target, env, workdir = installed
    out = _run([sys.executable, "-m", "cruiseplan", "plan", "demo-cross-country"],
               cwd=workdir, env=env)
    assert "VERDICT: GO" in out.splitlines(), out
    assert "File: bundled demo-cross-country.toml" in out, out
