"""Shared style, output and helpers of the figures (palette, fonts, footer, PNG/PDF bytes)."""

from __future__ import annotations

import io
import textwrap
from datetime import date

import matplotlib
import numpy as np
from matplotlib import patheffects
from matplotlib.figure import Figure

from cruiseplan.cautions import CAUTION_LINE
from cruiseplan.constants import MACH_LIMIT
from cruiseplan.errors import CruiseplanError
from cruiseplan.limits import Limit
from cruiseplan.physics.atmosphere import air_state, check_altitude
from cruiseplan.planning.optimise import speed_schedule
from cruiseplan.planning.performance import resolve_loading
from cruiseplan.report.tables import store_text
from cruiseplan.units import display, temperature_difference, to_si

#: Okabe-Ito palette [1]_ (yellow left out: it does not show on white paper).
OKABE_ITO = {
    "black": "#000000", "orange": "#E69F00", "sky_blue": "#56B4E9", "green": "#009E73",
    "blue": "#0072B2", "vermillion": "#D55E00", "purple": "#CC79A7",
}
#: Colour, line style and marker of successive series (altitudes), distinct in grey print.
SERIES_STYLES = (
    (OKABE_ITO["blue"], "-", "o"),
    (OKABE_ITO["vermillion"], "--", "s"),
    (OKABE_ITO["green"], "-.", "^"),
    (OKABE_ITO["purple"], ":", "D"),
    (OKABE_ITO["orange"], (0, (7, 2, 1, 2, 1, 2)), "v"),
    (OKABE_ITO["sky_blue"], (0, (1, 1)), "P"),
    (OKABE_ITO["black"], (0, (10, 3)), "X"),
)
#: Colour and marker of each best-speed objective.
OBJECTIVE_STYLES = {
    "range": (OKABE_ITO["blue"], "o"),
    "endurance": (OKABE_ITO["vermillion"], "s"),
    "economy": (OKABE_ITO["green"], "^"),
}
#: Hatch pattern of each limit reason on the specific-range map.
LIMIT_HATCHES = {
    Limit.STALL: "///", Limit.POWER: "\\\\\\", Limit.ATMOSPHERE: "xx",
    Limit.MACH: "..", Limit.POLAR_RANGE: "|||", Limit.LAPSE_RANGE: "---",
    Limit.NO_SOLUTION: "++", Limit.WIND: "oo", Limit.ROTOR_RANGE: "**",
    Limit.REYNOLDS_RANGE: "OO",
}
#: Output formats of :func:`figure_bytes`.
FORMATS = ("png", "pdf")
#: Size of the plots [in]: A5 landscape.
PLOT_SIZE = (8.27, 5.83)
#: Smallest font on any figure [pt] (kneeboard-legible).
MIN_FONT = 7.0

HALO = [patheffects.withStroke(linewidth=3.5, foreground="white")]


# --- output -------------------------------------------------------------------------------

def figure_bytes(fig: Figure, fmt: str, *, dpi: float = 150.0) -> bytes:
    """Render a figure to PNG or PDF bytes.

    PDF text is embedded as TrueType (font type 42) so that it can be searched and copied.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure.
    fmt : str
        ``"png"`` or ``"pdf"``, or a file name whose extension (.png, .pdf) decides.
    dpi : float, optional
        Resolution of PNG output [dots per inch].

    Returns
    -------
    bytes
        The whole file.

    Raises
    ------
    CruiseplanError
        For any other format or extension.
    """
    text = str(fmt)
    kind = text.rsplit(".", 1)[-1].lower() if "." in text else text.lower()
    if kind not in FORMATS:
        raise CruiseplanError(f"cannot draw {text!r}: the format must be "
                              f"{' or '.join(FORMATS)} (a file ending in .png or .pdf)")
    buf = io.BytesIO()
    meta = {"Creator": "cruiseplan"} if kind == "pdf" else {"Software": "cruiseplan"}
    with matplotlib.rc_context({"pdf.fonttype": 42}):
        fig.savefig(buf, format=kind, dpi=dpi, metadata=meta)
    return buf.getvalue()


# --- shared pieces ------------------------------------------------------------------------

def footer(fig: Figure, context: str) -> None:
    """Caution line, and the context above it, at the bottom of a plot.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure drawn on.
    context : str
        What the figure holds for (see :func:`figure_context`), wrapped to the width.
    """
    fig.text(0.012, 0.012, CAUTION_LINE, fontsize=MIN_FONT + 0.5, ha="left", va="bottom",
             style="italic")
    width = fig.get_size_inches()[0]
    lines = textwrap.wrap(context, int(width * 17.5))  # ~17.5 characters per inch at 7 pt
    fig.text(0.012, 0.042, "\n".join(lines), fontsize=MIN_FONT, ha="left", va="bottom",
             color="0.25", linespacing=1.25)


def figure_context(airframe, mass: float, store: float, isa_dev: float, units: str,
                   extra: str = "") -> str:
    """The line a figure's footer says it holds for: airframe, loading, day, date.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Mass [kg].
    store : float
        Fuel [kg] or usable energy [J] on board.
    isa_dev : float
        ISA deviation [K].
    units : {"aviation", "si"}
        Display units.
    extra : str, optional
        More context, e.g. the wind.

    Returns
    -------
    str
        One line, parts joined by middle dots.
    """
    fm, lm = display("mass", units)
    parts = [f"{airframe.name} (file sha256 {airframe.checksum[:16]})",
             f"mass {mass * fm:.1f} {lm}", store_text(airframe, store, units),
             f"ISA {isa_dev:+.0f} K"]
    if extra:
        parts.append(extra)
    parts.append(f"made {date.today().isoformat()} by cruiseplan")
    return " \u00b7 ".join(parts)


def sr_display(airframe, units: str):
    """Factor from SI specific range (m/kg or m/J) to display units, and the label.

    Parameters
    ----------
    airframe : Airframe
        The airframe; its propulsion picks fuel (per volume) or energy.
    units : {"aviation", "si"}
        Display unit system.

    Returns
    -------
    factor : float
        Multiplies a specific range in m/kg (fuel) or m/J (energy) [display unit per SI
        unit]; for fuel it includes the fuel density [kg/m^3], so the display is per
        volume.
    label : str
        The display unit.
    """
    prop = airframe.propulsion
    if prop.store.burns_mass:
        f, label = display("sr_fuel", units)
        return f * prop.fuel_density, label
    return display("sr_energy", units)


def power_display(airframe, units: str):
    """Factor from W to the display unit of shaft power, and its label.

    Engines read in hp or kW, electric motors in W.

    Parameters
    ----------
    airframe : Airframe
        The airframe; its propulsion's store picks the kind of power.
    units : {"aviation", "si"}
        Display unit system.

    Returns
    -------
    factor : float
        Multiplies a power in W [display unit per W].
    label : str
        The display unit.
    """
    return display(airframe.propulsion.store.power_kind, units)


def marker_every(n: int, marks: int = 8):
    """Marker spacing that puts about ``marks`` markers on a line of ``n`` points.

    Parameters
    ----------
    n : int
        Number of points on the line [-].
    marks : int, optional
        Markers wanted [-].

    Returns
    -------
    int
        Every how many points a marker goes [-], at least 1.
    """
    return max(1, int(round(n / marks)))


def isa_dev_of(air) -> float:
    """The ISA deviation [K] of an air state (the same at every altitude).

    Parameters
    ----------
    air : AirState
        Air state; its first ``isa_dev`` value is taken.

    Returns
    -------
    float
        Temperature deviation from ISA [K].
    """
    return float(np.ravel(air.isa_dev)[0])


def speed_span(airframe, altitudes, *, mass=None, fuel=None, payload=None, isa_dev=0.0,
               n: int = 60) -> np.ndarray:
    """True airspeeds that span a plot: from below the stall to beyond full throttle.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    altitudes : array_like or pint.Quantity
        Pressure altitudes [m] the plot shows.
    mass, fuel, payload : float or pint.Quantity, optional
        Loading [kg, kg or J, kg], as in :func:`cruiseplan.cruise_grid`.
    isa_dev : float or pint.Quantity, optional
        ISA deviation [K].
    n : int, optional
        Number of speeds [-].

    Returns
    -------
    numpy.ndarray
        ``n`` increasing TAS [m/s], from 0.85 x the lowest stall speed to 1.1 x the fastest
        level speed the power available allows at any of the altitudes (capped at the Mach
        model limit and the kind's trusted speeds).
    """
    h = check_altitude(np.atleast_1d(to_si(altitudes, "m", what="altitudes")))
    isa_dev = temperature_difference(isa_dev)
    loading = resolve_loading(airframe, mass, fuel, payload)
    air = air_state(h, isa_dev)
    v_stall = airframe.stall_speed(loading.mass, air.density)
    # The flyable region's fast edge: the fastest level speed the power available allows
    # at any of the altitudes (not full rated power, which a lapsing engine lacks aloft).
    sched = speed_schedule(airframe, loading.mass, air, loading.store, stall_margin=1.0)
    fast = sched.window_hi[np.isfinite(sched.window_hi)]
    v_hi = 1.1 * float(np.max(fast)) if fast.size else 2.5 * float(np.max(v_stall))
    v_hi = min(v_hi, MACH_LIMIT * float(np.min(air.speed_of_sound)))
    # Stay near the speeds the kind's model is trusted to (a rotor's advance ratio).
    v_hi = min(v_hi, 1.15 * airframe.model_speed_limit)
    # A multirotor has no stall speed: start just above the hover.
    return np.linspace(max(0.85 * float(np.min(v_stall)), 1.0), v_hi, n)
