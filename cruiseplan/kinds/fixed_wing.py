"""Fixed-wing airframes: a wing with a drag polar and a propeller (SI, no file handling).

Loading from TOML files is in :mod:`cruiseplan.io.airframe_file`; this module holds the
validated description and its level-flight physics.

References
----------
.. [1] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, sec. 5.3.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import ClassVar

import numpy as np

from cruiseplan._numerics import IN_PLACE_SIZE, owned, set_flag
from cruiseplan.constants import G0
from cruiseplan.errors import CruiseplanError
from cruiseplan.kinds.base import AirframeBase, LevelFlight
from cruiseplan.limits import LIMIT_DTYPE, Limit
from cruiseplan.physics.aerodynamics import lift_coefficient, speed_for_lift_coefficient

_BEYOND_CLMAX = LIMIT_DTYPE(Limit.BEYOND_CLMAX | Limit.STALL)
_POLAR_RANGE = LIMIT_DTYPE(Limit.POLAR_RANGE)
_REYNOLDS_RANGE = LIMIT_DTYPE(Limit.REYNOLDS_RANGE)
#: G0 as a 0-d array: a ufunc takes it quicker than a Python float (the same figures).
_G0 = np.array(G0)


@dataclass(frozen=True, kw_only=True)
class FixedWing(AirframeBase):
    """A fixed-wing airframe in SI units.

    Parameters
    ----------
    wing_area : float
        Reference wing area [m^2].
    span : float
        Wing span [m].
    cl_max : float
        Maximum lift coefficient in the cruise configuration [-].
    polar : object
        A drag polar from :data:`cruiseplan.physics.aerodynamics.POLAR_KINDS` or a
        build-up polar.
    **common
        The fields of :class:`~cruiseplan.kinds.base.AirframeBase`.
    """

    kind: ClassVar[str] = "fixed-wing"
    has_wing: ClassVar[bool] = True
    hovers: ClassVar[bool] = False
    tolerance_keys: ClassVar[tuple] = ("cd0", "oswald_e", "propeller_efficiency", "bsfc",
                                       "battery_energy")

    wing_area: float
    span: float
    cl_max: float
    polar: object

    #: Fastest TAS the model is trusted to [m/s]: the wing has no limit of its own (the
    #: Mach limit applies to every kind).
    model_speed_limit: ClassVar[float] = float("inf")

    @property
    def aspect_ratio(self) -> float:
        """Aspect ratio b^2 / S [-]."""
        return self.span**2 / self.wing_area

    def stall_speed(self, mass, density):
        """Stall TAS at CLmax [m/s].

        Parameters
        ----------
        mass : array_like
            Mass [kg].
        density : array_like
            Air density [kg/m^3].

        Returns
        -------
        numpy.ndarray
            Stall speed [m/s].

        References
        ----------
        .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.3 (level flight, lift
           equals weight).
        """
        return speed_for_lift_coefficient(mass, density, self.wing_area, self.cl_max)

    def level_flight(self, mass, air, tas) -> LevelFlight:
        """Lift and drag coefficients, drag and shaft power in level flight.

        Parameters
        ----------
        mass : array_like
            Mass [kg].
        air : AirState
            Air, broadcastable against ``tas``.
        tas : array_like
            True airspeed [m/s].

        Returns
        -------
        LevelFlight
            ``cl``, ``cd`` [-], ``drag`` [N], ``shaft`` [W]: the propulsion's shaft power
            for a thrust equal to the drag (``shaft_for_thrust``).

        References
        ----------
        .. [1] J. D. Anderson, *Aircraft Performance and Design*, 1999, sec. 5.3.
        """
        tas = np.asarray(tas, dtype=float)
        cl = lift_coefficient(mass, air.density, tas, self.wing_area)
        cd = self.polar.drag_coefficient(cl, tas, air)
        drag = mass * _G0 * cd  # lift = weight, drag = lift / (L/D)
        if type(drag) is np.ndarray and drag.size >= IN_PLACE_SIZE and owned(
                drag, np.shape(cl)):
            drag /= cl  # a large grid: in place
        else:
            drag = drag / cl
        # Thrust = drag: D V / eta_p(V), or with a propeller diameter momentum theory.
        shaft = self.propulsion.shaft_for_thrust(drag, tas, air.density)
        return LevelFlight(drag=drag, shaft=shaft, cl=cl, cd=cd)

    def model_limits(self, flight: LevelFlight, tas, stall_margin, air):
        """Limit bits of the wing's own model: stall margin, polar and Reynolds range.

        Parameters
        ----------
        flight : LevelFlight
            Level flight at the points.
        tas : array_like
            True airspeed [m/s].
        stall_margin : float
            Minimum TAS over stall speed [-].
        air : AirState
            Air at the points.

        Returns
        -------
        numpy.ndarray
            :data:`~cruiseplan.limits.LIMIT_DTYPE` :class:`~cruiseplan.limits.Limit` bits:
            ``STALL`` below the stall margin, ``BEYOND_CLMAX`` (with ``STALL``) for CL above
            CLmax, ``POLAR_RANGE`` and ``REYNOLDS_RANGE`` outside the polar's range.
        """
        cl = flight.cl
        # Bits set in place (set_flag): no array of bits per condition on a large grid.
        # Limit.STALL is 1: the comparison's 0 or 1 is the bit.
        threshold = self.cl_max / stall_margin**2
        shape = (np.shape(cl) if type(threshold) is float
                 else np.broadcast_shapes(np.shape(cl), np.shape(threshold)))
        bits = np.empty(shape, dtype=LIMIT_DTYPE)
        np.greater(cl, threshold, out=bits)
        # CL above CLmax is TAS below the stall speed itself, beyond the margin.
        set_flag(bits, np.greater(cl, self.cl_max), _BEYOND_CLMAX)
        if self.polar.bounded:
            set_flag(bits, self.polar.outside(cl), _POLAR_RANGE)
        if hasattr(self.polar, "reynolds_outside"):
            set_flag(bits, self.polar.reynolds_outside(tas, air), _REYNOLDS_RANGE)
        return bits

    def stall_speed_ratio(self, flight: LevelFlight):
        """TAS over stall speed at each point [-].

        Parameters
        ----------
        flight : LevelFlight
            Level flight at the points.

        Returns
        -------
        numpy.ndarray
            sqrt(CLmax / CL) [-].
        """
        return np.sqrt(self.cl_max / flight.cl)

    def sampled(self, factors: dict):
        """The airframe with its toleranced parameters as arrays over samples.

        Parameters
        ----------
        factors : dict
            Parameter name (of :attr:`tolerance_keys`) to an array of factors [-].

        Returns
        -------
        FixedWing
            Every model function then broadcasts over the sample axis.

        Raises
        ------
        CruiseplanError
            If cd0 or oswald_e is toleranced on a polar that cannot be scaled (tabulated),
            or a tolerance does not fit the propulsion kind.
        """
        changes = {}
        if "cd0" in factors or "oswald_e" in factors:
            if not hasattr(self.polar, "scaled"):
                raise CruiseplanError(f"{self.name}: tolerances on cd0 and oswald_e need a "
                                      "parabolic or build-up polar")
            changes["polar"] = self.polar.scaled(factors.get("cd0", 1.0),
                                                 factors.get("oswald_e", 1.0))
        changes["propulsion"] = self.propulsion.sampled(self.name, factors)
        return replace(self, **changes)
