"""RPM and manifold pressure for a power setting, from the engine's power chart.

The chart's law, P/P_rated = (MP/MP_rated)(N/N_rated) sqrt(T_std/T), is the common
approximation (common practice, no source); these checks are its identities.
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.physics.propulsion import PowerChart

INHG = 3386.389  # Pa per inch of mercury (exact to the digits of its definition)


@pytest.fixture(scope="module")
def chart():
    return cp.load_airframe("demo-tourer").propulsion.power_chart


def test_the_file_s_chart_is_read(chart):
    assert chart.rated_rpm == pytest.approx(2700.0, rel=1e-12)
    assert chart.rated_manifold_pressure == pytest.approx(28.6 * INHG, rel=1e-6)
    assert chart.cruise_rpm == pytest.approx((2200.0, 2300.0, 2400.0, 2500.0), rel=1e-12)


def test_manifold_pressure_gives_back_the_power(chart):
    # The law inverted and applied again: exact but for rounding.
    for frac, rpm, t, t_std in ((0.65, 2300.0, 290.0, 278.2), (0.55, 2500.0, 260.0, 268.3)):
        mp = chart.manifold_pressure(frac, rpm, t, t_std)
        back = (mp / chart.rated_manifold_pressure) * (rpm / chart.rated_rpm) * math.sqrt(
            t_std / t)
        assert back == pytest.approx(frac, rel=1e-14)


def test_the_lowest_rpm_the_throttle_allows_is_chosen(chart):
    air = cp.air_state(np.array([0.0, 2438.4]))   # sea level and 8000 ft, ISA
    t_std = air.temperature - air.isa_dev
    rpm, mp = chart.setting(np.array([0.65, 0.65]), air.pressure, air.temperature, t_std)
    top = air.pressure - chart.intake_loss
    assert np.all(mp <= top) and np.all(mp <= chart.rated_manifold_pressure)
    # At sea level the lowest RPM fits; at 8000 ft it does not and a higher one is set.
    assert rpm[0] == 2200.0 and rpm[1] > 2200.0
    lower = chart.manifold_pressure(0.65, rpm[1] - 100.0, air.temperature[1], t_std[1])
    assert lower > top[1]


def test_full_throttle_at_every_rpm_has_no_setting(chart):
    air = cp.air_state(np.array([3048.0 * 1.5]))   # 15000 ft
    rpm, mp = chart.setting(0.75, air.pressure, air.temperature,
                            air.temperature - air.isa_dev)
    assert np.isnan(rpm[0]) and np.isnan(mp[0])


def test_tables_and_plans_show_the_pair(capsys):
    assert main(["table", "demo-tourer", "--power", "65", "--altitudes", "0",
                 "--format", "csv"]) == 0
    out = capsys.readouterr().out
    assert "RPM [rpm]" in out and "MP [inHg]" in out
    assert main(["plan", "demo-ridge-patrol"]) == 0
    assert re.search(r"65 % power set \(\d{4} rpm, \d+\.\d inHg\)", capsys.readouterr().out)
    # The trainer has no chart (a fixed-pitch propeller): % only.
    assert main(["table", "demo-trainer", "--power", "65", "--altitudes", "0"]) == 0
    assert "RPM" not in capsys.readouterr().out


@pytest.mark.parametrize("edit, message", [
    ('rated_rpm = "2700 rpm"', r"rated_rpm: missing"),
    ('cruise_rpm = ["2200 rpm", "2300 rpm", "2400 rpm", "2500 rpm"]',
     r"cruise_rpm: expected a list of values"),
    ('rated_manifold_pressure = "28.6 inHg"', r"rated_manifold_pressure: missing"),
])
def test_bad_power_charts(tmp_path, capsys, edit, message):
    text = open(cp.load_airframe("demo-tourer").source, encoding="utf-8").read()
    assert edit in text
    path = tmp_path / "bad.toml"
    path.write_text(text.replace(edit + "\n", ""))
    out = tmp_path / "table.txt"
    assert main(["table", str(path), "--output", str(out)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and re.search(message, err), err
    assert not out.exists()


def test_rpms_must_increase(tmp_path):
    text = open(cp.load_airframe("demo-tourer").source, encoding="utf-8").read()
    path = tmp_path / "bad.toml"
    path.write_text(text.replace('"2200 rpm", "2300 rpm"', '"2300 rpm", "2200 rpm"'))
    with pytest.raises(cp.AirframeFileError, match=r"cruise_rpm: RPMs must increase"):
        cp.read_airframe(path)
    assert PowerChart(2700.0, 1e5, (2400.0,)).intake_loss == pytest.approx(INHG)
