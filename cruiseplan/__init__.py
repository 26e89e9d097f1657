"""cruiseplan: cruise planning for small propeller aircraft and drones, from physics.

A planning aid only: the aircraft's approved flight manual, licensed flight planning and
local rules come first.

The public API accepts pint Quantities or SI floats and returns SI floats::

    import cruiseplan as cp
    af = cp.load_airframe("demo-trainer")
    grid = cp.cruise_grid(af, altitudes=[0, 1000, 2000], tas=[45, 50, 55])
"""

from .airframe import Airframe, Loading
from .airframe_files import bundled_airframes, load_airframe, read_airframe
from .atmosphere import AirState, air_state, density_altitude
from .errors import (
    AirframeFileError,
    AtmosphereRangeError,
    CruiseplanError,
    CruiseplanWarning,
    UnitError,
)
from .performance import (
    CruisePoints,
    Limit,
    cruise_grid,
    cruise_points,
    explain,
    power_setting_table,
)

__version__ = "0.1.0"

#: Cautions printed with every table, card and plan.
CAUTIONS = (
    "Planning aid only: not a substitute for the approved flight manual (AFM/POH), "
    "licensed flight planning or local rules, which come first.",
    "Figures come from a physics model of the airframe file; real aircraft, engines, "
    "batteries and weather differ. Verify against the flight manual and add margins.",
    "Reserves shown are those you set; local rules decide the minimum reserve.",
)

__all__ = [
    "Airframe", "Loading", "AirState", "CruisePoints", "Limit", "CAUTIONS",
    "AirframeFileError", "AtmosphereRangeError", "CruiseplanError", "CruiseplanWarning",
    "UnitError", "air_state", "bundled_airframes", "cruise_grid", "cruise_points",
    "density_altitude", "explain", "load_airframe", "power_setting_table", "read_airframe",
]
