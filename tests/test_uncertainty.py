"""Monte Carlo over tolerances: exactness at zero spread, convergence, reproducibility."""

import json
from dataclasses import replace

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.io.mission_file import load_mission
from cruiseplan.model.tolerance import Tolerance
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.uncertainty import (
    cruise_uncertainty,
    plan_uncertainty,
    quantiles,
    sample_airframe,
)


def zero_spread(mission):
    af = mission.airframe
    zero = tuple((k, Tolerance("normal", 0.0)) for k, _ in af.tolerances)
    return replace(mission, airframe=replace(af, tolerances=zero), wind_tolerance=None)


@pytest.fixture(scope="module", params=["demo-cross-country", "demo-survey-run"])
def mission(request):
    return load_mission(request.param)


def test_zero_tolerances_give_the_deterministic_plan_exactly(mission):
    m = zero_spread(mission)
    plan = plan_mission(m)
    u = plan_uncertainty(plan, 257, seed=11)
    assert np.all(u.remaining == plan.remaining)
    assert np.all(u.reserve_required == plan.reserve_required)
    assert np.all(u.time == plan.time)
    assert np.all(u.used == plan.used)
    assert u.reserve_probability == (1.0 if plan.remaining >= plan.reserve_required else 0.0)


def test_quantiles_converge(mission):
    # Monte Carlo quantiles at n = 1e4 and 1e5 agree within 1 % (JCGM 101:2008 sec. 7.9
    # on the number of trials; the tolerance here is the issue's).
    plan = plan_mission(mission)
    a = plan_uncertainty(plan, 10_000, seed=1).summary()
    b = plan_uncertainty(plan, 100_000, seed=2).summary()
    for key in ("remaining", "used", "time"):
        np.testing.assert_allclose(a[key], b[key], rtol=0.01)


def test_seeded_and_reproducible(mission):
    plan = plan_mission(mission)
    a = plan_uncertainty(plan, 2000, seed=5)
    b = plan_uncertainty(plan, 2000, seed=5)
    c = plan_uncertainty(plan, 2000, seed=6)
    assert np.array_equal(a.remaining, b.remaining)
    assert not np.array_equal(a.remaining, c.remaining)
    # The probability is the share of samples that land with at least their reserve,
    # counted here from the samples themselves.
    share = np.count_nonzero(a.remaining >= a.reserve_required) / a.remaining.size
    assert a.reserve_probability == share
    assert a.summary()["n"] == 2000 and a.summary()["seed"] == 5


def test_battery_tolerance_moves_only_the_energy_on_board():
    # Physics check: with only the usable-energy tolerance (and Peukert exponent 1, so that
    # the energy drawn per second does not depend on the pack), every sample uses the same
    # energy and lands with initial x factor - used: median = the plan, spread = sd x E.
    m = load_mission("demo-survey-run")
    af = m.airframe
    af = replace(af, tolerances=(("battery_energy", Tolerance("normal", 0.05)),),
                 propulsion=replace(af.propulsion, peukert_exponent=1.0))
    m = replace(m, airframe=af, wind_tolerance=None)
    plan = plan_mission(m)
    u = plan_uncertainty(plan, 40_000, seed=3)
    np.testing.assert_allclose(u.used, plan.used, rtol=1e-12)
    # Sampling tolerances, four standard errors at n = 4e4 (the seeded run lands far
    # closer: 1.3e-6 and 1.2e-5): the median's SE is 1.2533 sd / sqrt(n) = 4.3e-4 of the
    # remaining energy, the standard deviation's 1 / sqrt(2 n) = 3.5e-3 of itself.
    assert np.median(u.remaining) == pytest.approx(plan.remaining, rel=1.7e-3)
    assert np.std(u.remaining) == pytest.approx(0.05 * plan.initial, rel=1.4e-2)


def test_bigger_reserve_is_less_likely_to_hold():
    m = load_mission("demo-survey-run")
    small = plan_uncertainty(plan_mission(replace(m, reserve=replace(m.reserve, amount=0.2))),
                             5000, seed=1).reserve_probability
    large = plan_uncertainty(plan_mission(replace(m, reserve=replace(m.reserve, amount=0.6))),
                             5000, seed=1).reserve_probability
    assert small > large


def test_cruise_uncertainty_zero_spread_and_sampling():
    af = cp.load_airframe("demo-trainer")
    load = af.loading()
    air = cp.air_state(np.array([1500.0]))
    nominal = cp.cruise_points(af, load.mass, air, 50.0, load.store)
    zero = replace(af, tolerances=tuple((k, Tolerance("normal", 0.0))
                                        for k, _ in af.tolerances))
    u = cruise_uncertainty(zero, load.mass, load.store, air, 50.0, 50.0, n=100)
    assert np.all(u.range_ground == nominal.range_ground[0])
    u = cruise_uncertainty(af, load.mass, load.store, air, 50.0, 50.0, n=20_000, seed=4)
    p10, p50, p90 = quantiles(u.range_ground)
    assert p10 < float(nominal.range_ground[0]) * 1.02 and p10 < p50 < p90
    # BSFC tolerance is skewed towards more fuel: the median range is below nominal.
    assert p50 < float(nominal.range_ground[0])


def test_sampled_airframe_broadcasts():
    af = cp.load_airframe("demo-mapping-quad")
    f = {"cd0": np.array([1.0, 1.2]), "battery_energy": np.array([1.0, 0.9])}
    s = sample_airframe(af, f)
    g = s.level_flight(3.0, cp.air_state(0.0), 12.0)
    assert g.shaft.shape == (2,) and g.shaft[1] > g.shaft[0]
    np.testing.assert_allclose(s.propulsion.battery_energy, af.propulsion.battery_energy
                               * np.array([1.0, 0.9]))


@pytest.mark.parametrize("text, match", [
    ('cd0 = "60 %"', r"\[uncertainty\] cd0: '60 %': a standard deviation from 0 to 50 %"),
    ('cd0 = ["+5 %", "-5 %"]', r"\[uncertainty\] cd0: .*a range from low to high"),
    ('cd0 = 0.05', r"\[uncertainty\] cd0: 0.05: expected a standard deviation such as"),
    ('bsfc = "3 %"', r"\[uncertainty\] bsfc: a BSFC tolerance needs a piston-propeller"),
    ('wingspan = "3 %"', r"\[uncertainty\] wingspan: unknown field"),
    ('cd0 = "5 kg"', r"\[uncertainty\] cd0: '5 kg' is not a percentage"),
])
def test_bad_tolerances(tmp_path, text, match):
    src = open(cp.load_airframe("demo-survey-drone").source).read()
    head, _, _ = src.partition("[uncertainty]")
    p = tmp_path / "drone.toml"
    p.write_text(head + "[uncertainty]\n" + text + "\n")
    with pytest.raises(cp.AirframeFileError, match=match):
        cp.read_airframe(p)


def test_cli_monte_carlo(tmp_path, capsys):
    assert main(["plan", "demo-survey-run", "--monte-carlo", "2000", "--seed", "3",
                 "--format", "json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    s = doc["summary"]
    assert s["mc_n"] == 2000 and s["mc_seed"] == 3
    assert s["mc_remaining_p10"] <= s["mc_remaining_p50"] <= s["mc_remaining_p90"]
    # The same seed through the API gives the same samples: the same figures (JSON keeps
    # floats exact).
    api = plan_uncertainty(plan_mission(load_mission("demo-survey-run")), 2000,
                           seed=3).summary()
    assert s["mc_reserve_probability"] == api["reserve_probability"]
    for key in ("remaining", "used", "time", "reserve_required"):
        assert [s[f"mc_{key}_p{p}"] for p in (10, 50, 90)] == list(api[key]), key
    assert any("probability the reserve holds" in line for line in doc["meta_text"])
    assert main(["best", "demo-trainer", "--monte-carlo", "1000"]) == 0
    out = capsys.readouterr().out
    assert "ground range P10 / P50 / P90" in out and "Monte Carlo, 1000 samples" in out
    pdf = tmp_path / "card.pdf"
    assert main(["card", "demo-trainer", "-o", str(pdf), "--monte-carlo", "1000"]) == 0
    assert "range to reserve P10 / P50 / P90" in (tmp_path / "card.md").read_text()
    assert main(["plan", "demo-survey-run", "--monte-carlo", "0"]) == 2
    assert "--monte-carlo: 0 samples is out of range (1 samples to 1000000 samples)" in \
        capsys.readouterr().err
