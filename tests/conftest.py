"""Shared fixtures of the cruiseplan test suite."""

from __future__ import annotations

import os
import textwrap
from dataclasses import replace

import pytest
from hypothesis import HealthCheck, settings

import cruiseplan as cp
from cruiseplan.physics.propulsion import PropellerEfficiency

# Deterministic property tests (same examples every run, so CI never flakes); no deadline
# because the first call of a test may import ambiance/pint.
settings.register_profile(
    "cruiseplan", deadline=None, max_examples=60, derandomize=True,
    suppress_health_check=[HealthCheck.function_scoped_fixture])
settings.load_profile("cruiseplan")

# Hermetic: no user's or project's settings file (cruiseplan.toml, ~/.config/cruiseplan)
# changes the display units of a test; tests that want one set CRUISEPLAN_SETTINGS.
os.environ["CRUISEPLAN_SETTINGS"] = ""


def constant_propeller(af, efficiency=0.72):
    """The airframe with a constant propeller efficiency and no diameter, so that the
    closed forms of the textbook (constant efficiency) hold exactly."""
    prop = replace(af.propulsion, propeller=PropellerEfficiency((0.0,), (efficiency,)))
    return replace(af, propulsion=prop)


@pytest.fixture(scope="session")
def trainer():
    """The bundled two-seat piston trainer with a constant propeller efficiency (0.72).

    The bundled file gives a propeller diameter (momentum theory); the closed-form checks
    need the textbook's constant efficiency, so this fixture puts one in its place.
    """
    return constant_propeller(cp.load_airframe("demo-trainer"))


@pytest.fixture(scope="session")
def tourer():
    """Bundled piston tourer (propeller efficiency tabulated against TAS)."""
    return cp.load_airframe("demo-tourer")


@pytest.fixture(scope="session")
def drone():
    """Bundled electric survey drone (Peukert exponent 1.03)."""
    return cp.load_airframe("demo-survey-drone")


@pytest.fixture
def write_toml(tmp_path):
    """Write a TOML text (dedented) to ``tmp_path / name`` and return the path."""

    def write(text: str, name: str = "airframe.toml"):
        path = tmp_path / name
        path.write_text(textwrap.dedent(text), encoding="utf-8")
        return path

    return write
