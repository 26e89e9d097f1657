"""The planner's memos give the figures of a fresh evaluation, and never stale ones."""

import copy
import pickle

import numpy as np

from cruiseplan.physics.airspeed import ground_speed
from cruiseplan.physics.propulsion import PropellerEfficiency
from cruiseplan.physics.winds import WindProfile

TABLE = PropellerEfficiency((20.0, 40.0, 60.0, 80.0), (0.55, 0.75, 0.82, 0.80))


def fresh(tas):
    return PropellerEfficiency(TABLE.tas, TABLE.efficiency)(np.array(tas, dtype=float))


def test_propeller_memo_read_only_array_same_figures():
    v = np.linspace(10.0, 95.0, 23).copy()  # owns its data
    v.flags.writeable = False
    first, again = TABLE(v), TABLE(v)
    assert again is first  # the memo
    assert np.array_equal(first, fresh(v))
    assert not first.flags.writeable


def test_propeller_memo_not_for_arrays_that_can_change():
    v = np.linspace(10.0, 95.0, 23)
    before = TABLE(v).copy()
    v += 5.0  # writeable: changed in place, asked again
    assert np.array_equal(TABLE(v), fresh(v))
    assert not np.array_equal(TABLE(v), before)
    # A read-only view of an array that can change (broadcast_to) is not kept either.
    base = np.linspace(10.0, 95.0, 23)
    view = np.broadcast_to(base, (2, 23))
    TABLE(view)
    base += 5.0
    assert np.array_equal(TABLE(view), fresh(np.broadcast_to(base, (2, 23))))


def test_propeller_memo_not_copied():
    v = np.linspace(10.0, 95.0, 23).copy()
    v.flags.writeable = False
    TABLE(v)
    for other in (copy.deepcopy(TABLE), pickle.loads(pickle.dumps(TABLE))):
        assert other == TABLE
        assert other._memo == (None, None)
        assert np.array_equal(other(v), TABLE(v))


def test_wind_profile_kept_winds_are_fresh_figures():
    wind = WindProfile((600.0, 1800.0, 3000.0), (250.0, 260.0, 270.0), (8.0, 15.0, 20.0))
    h = np.linspace(0.0, 3500.0, 22)[None, :]
    direction, speed = wind.at(h)
    north, east = wind.vector(h)
    expected = (np.mod(np.degrees(np.arctan2(-east, -north)), 360.0), np.hypot(east, north))
    for got, want in zip(wind.at(h.copy()), expected):
        assert np.array_equal(got, want)
        assert not got.flags.writeable
    assert wind.at(h)[0] is direction
    # Many altitudes at once are not kept, and a copy starts afresh.
    big = np.linspace(0.0, 3500.0, 1000)
    assert np.array_equal(wind.at(big)[1], np.hypot(*wind.vector(big)))
    assert pickle.loads(pickle.dumps(wind))._at == {}
    assert pickle.loads(pickle.dumps(wind)) == wind


def test_ground_speed_with_crosswind_squared_same_figures():
    rng = np.random.default_rng(3)
    tas, head, cross = rng.uniform(5, 60, 50), rng.uniform(-30, 30, 50), rng.uniform(-40, 40, 50)
    a = ground_speed(tas, head, cross)
    b = ground_speed(tas, head, cross, crosswind_squared=cross * cross)
    assert np.array_equal(a, b, equal_nan=True)
    assert np.isnan(a).any()  # some crosswinds beyond the airspeed


def test_propeller_memo_dropped_when_the_array_is_made_writeable_again():
    v = np.linspace(10.0, 95.0, 23).copy()
    v.flags.writeable = False
    TABLE(v)
    v.flags.writeable = True
    v += 5.0
    assert np.array_equal(TABLE(v), fresh(v))


def test_planner_shortcuts_give_the_figures_worked_out_in_full(monkeypatch):
    # The cruise does not work out again the derivatives of a stage at the same masses as
    # the last (nothing burns: a plain pack, or past an empty tank), and a climb worked
    # out in passes stops when a pass changes nothing. With every such check made to say
    # "changed" (all work done in full), the plans are the same to the last bit: a plain
    # pack, a fuel plan that runs out of fuel on its fourth leg and flies on past the
    # empty tank, and the bundled missions.
    import warnings

    import cruiseplan as cp
    import cruiseplan.planning.mission as planner
    from cruiseplan.errors import CruiseplanWarning
    from cruiseplan.io.mission_file import load_mission
    from cruiseplan.model.mission import Leg, Mission, Profile, Reserve

    tourer = cp.load_airframe("demo-tourer")
    legs = tuple(Leg(f"leg {i}", 150e3, course=40.0 * i, altitude=None) for i in range(8))
    dry = Mission("dry", tourer, legs, Reserve("time", 2700.0),
                  Profile(departure_elevation=100.0, arrival_elevation=100.0),
                  store=60.0)
    missions = [dry] + [load_mission(name) for name in (
        "demo-cross-country", "demo-quad-inspection", "demo-quad-mast-check",
        "demo-ridge-patrol", "demo-survey-run")]

    def plans():
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", CruiseplanWarning)
            return repr([(p.segments, p.reasons) for p in map(planner.plan_mission, missions)])

    quick = plans()
    assert "runs out" in quick   # the fuel plan flies on past its empty tank
    monkeypatch.setattr(planner, "all_true", lambda a: False)
    assert plans() == quick
