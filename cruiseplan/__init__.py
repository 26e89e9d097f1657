"""cruiseplan: cruise planning for small propeller aircraft and drones, from physics.

A planning aid only: the aircraft's approved flight manual, licensed flight planning and
local rules come first.

The public API accepts pint Quantities or SI floats and returns SI floats::

    import cruiseplan as cp
    af = cp.load_airframe("demo-trainer")
    grid = cp.cruise_grid(af, altitudes=[0, 1000, 2000], tas=[45, 50, 55])
    plan = cp.plan_mission(cp.load_mission("demo-cross-country"))

Layers, from the bottom: units, constants, errors, limits and cautions; ``physics``;
``kinds`` (airframe kinds behind one protocol); ``model`` (missions and tolerances as
data); ``planning``; ``io`` (files in); ``report``; ``plots``; ``cli``.
"""

from cruiseplan.cautions import CAUTION_LINE, CAUTIONS
from cruiseplan.errors import (
    AirframeFileError,
    AtmosphereRangeError,
    CruiseplanError,
    CruiseplanWarning,
    LogFileError,
    MissionFileError,
    UnitError,
)
from cruiseplan.io.airframe_file import bundled_airframes, load_airframe, read_airframe
from cruiseplan.io.mission_file import (
    apply_overrides,
    bundled_missions,
    load_mission,
    read_mission,
)
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.kinds import KINDS, Airframe, FixedWing, LevelFlight, Loading, Multirotor
from cruiseplan.limits import Limit, describe, explain
from cruiseplan.model.mission import Leg, Mission, Profile, Reserve
from cruiseplan.model.survey import Survey
from cruiseplan.physics.atmosphere import AirState, air_state, density_altitude
from cruiseplan.physics.winds import WindProfile
from cruiseplan.planning.mission import Plan, Segment, plan_mission
from cruiseplan.planning.nogo import Remedies, what_would_make_it_go
from cruiseplan.planning.optimise import (
    BestCruise,
    Climb,
    best_angle_climb,
    best_cruise,
    best_rate_climb,
    ceilings,
)
from cruiseplan.planning.performance import (
    CruisePoints,
    cruise_grid,
    cruise_points,
    power_setting_table,
)
from cruiseplan.planning.reserve import ReserveAmount, reserve_required
from cruiseplan.planning.survey import SurveyPlan, plan_survey
from cruiseplan.version import __version__

__all__ = [
    "KINDS", "Airframe", "AirframeFileError", "AirState", "AtmosphereRangeError",
    "BestCruise", "CAUTIONS", "CAUTION_LINE", "CruisePoints", "CruiseplanError",
    "CruiseplanWarning", "FixedWing", "Leg", "LevelFlight", "Limit", "Loading",
    "LogFileError", "Mission", "MissionFileError", "Multirotor", "Plan", "Profile",
    "Reserve", "Segment", "UnitError", "WindProfile", "__version__", "air_state",
    "best_cruise", "bundled_airframes", "bundled_missions", "ceilings", "cruise_grid",
    "cruise_points", "density_altitude", "describe", "explain", "load_airframe",
    "load_mission", "parse_wind_profile", "plan_mission", "power_setting_table",
    "read_airframe", "read_mission", "apply_overrides", "Remedies", "what_would_make_it_go",
    "Climb", "best_angle_climb", "best_rate_climb", "ReserveAmount", "reserve_required",
    "Survey", "SurveyPlan", "plan_survey",
]
