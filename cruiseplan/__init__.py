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

import importlib

from cruiseplan.version import __version__

#: The public API: each defining module and the names it gives. Names are imported when
#: first used (PEP 562, as Scientific Python's SPEC 1 recommends), so that
#: ``import cruiseplan`` and each command of the command line load only what they use.
_PUBLIC = {
    "cruiseplan.cautions": ("CAUTION_LINE", "CAUTIONS"),
    "cruiseplan.errors": (
        "AirframeFileError", "AtmosphereRangeError", "CruiseplanError", "CruiseplanWarning",
        "ForecastFileError", "LogFileError", "MissionFileError", "UnitError",
    ),
    "cruiseplan.io.airframe_file": ("bundled_airframes", "load_airframe", "read_airframe"),
    "cruiseplan.io.forecast_file": ("read_forecast",),
    "cruiseplan.io.mission_file": (
        "apply_overrides", "bundled_missions", "load_mission", "read_mission",
    ),
    "cruiseplan.io.text": ("parse_utc_time", "parse_wind_profile"),
    "cruiseplan.kinds": (
        "KINDS", "Airframe", "FixedWing", "LevelFlight", "Loading", "Multirotor",
    ),
    "cruiseplan.limits": ("Limit", "describe", "explain"),
    "cruiseplan.model.mission": ("Leg", "Mission", "Profile", "Reserve"),
    "cruiseplan.model.survey": ("Survey",),
    "cruiseplan.physics.atmosphere": (
        "AirState", "air_state", "density_altitude", "pressure_altitude_from_pressure",
    ),
    "cruiseplan.physics.forecast": ("GriddedWeather",),
    "cruiseplan.physics.winds": ("WindProfile",),
    "cruiseplan.planning.forecast": ("plan_with_forecast",),
    "cruiseplan.planning.mission": ("Plan", "Segment", "plan_mission", "plan_missions"),
    "cruiseplan.planning.nogo": ("Remedies", "what_would_make_it_go"),
    "cruiseplan.planning.optimise": (
        "BestCruise", "Climb", "best_angle_climb", "best_cruise", "best_rate_climb",
        "ceilings",
    ),
    "cruiseplan.planning.performance": (
        "CruisePoints", "cruise_grid", "cruise_points", "power_setting_table",
    ),
    "cruiseplan.planning.reserve": ("ReserveAmount", "reserve_required"),
    "cruiseplan.planning.survey": ("SurveyPlan", "plan_survey"),
    "cruiseplan.io.study_file": ("load_study", "read_study"),
    "cruiseplan.model.study": ("Study",),
    "cruiseplan.studies.sweep": ("run_study",),
}
_API = {name: module for module, names in _PUBLIC.items() for name in names}

__all__ = ["__version__", *sorted(_API)]


def __getattr__(name):
    try:
        module = _API[name]
    except KeyError:
        raise AttributeError(f"module 'cruiseplan' has no attribute {name!r}") from None
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value  # later look-ups skip this function
    return value


def __dir__():
    return sorted(set(globals()) | set(_API))
