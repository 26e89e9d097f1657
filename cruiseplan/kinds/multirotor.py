"""Multirotor drones: lift from rotors, body drag, an electric chain (SI, no file handling).

The rotor physics (momentum theory, Glauert's inflow, profile power) is in
:mod:`cruiseplan.physics.rotor`; this kind carries a weight against its body drag with it.

References
----------
.. [1] J. G. Leishman, *Principles of Helicopter Aerodynamics*, 2nd ed., Cambridge
   University Press, 2006, chs. 2 and 5.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import ClassVar

import numpy as np

from cruiseplan.constants import G0, RHO0
from cruiseplan.kinds.base import AirframeBase, LevelFlight, RotorState
from cruiseplan.limits import Limit, flag_if
from cruiseplan.physics.rotor import MAX_ADVANCE_RATIO, MAX_TILT_DEG, Rotors, rotor_power


@dataclass(frozen=True, kw_only=True)
class Multirotor(AirframeBase):
    """A multirotor drone: masses, rotors, body drag and an electric chain (SI).

    Parameters
    ----------
    rotors : Rotors
        The rotor set.
    body : BodyDrag
        Drag of the frame and attached bodies.
    **common
        The fields of :class:`~cruiseplan.kinds.base.AirframeBase`.
    """

    kind: ClassVar[str] = "multirotor"
    has_wing: ClassVar[bool] = False
    hovers: ClassVar[bool] = True
    tolerance_keys: ClassVar[tuple] = ("cd0", "induced_factor", "motor_efficiency",
                                       "battery_energy")

    rotors: Rotors
    body: object

    @property
    def model_speed_limit(self) -> float:
        """Fastest TAS the rotor model is trusted to, at its advance-ratio limit [m/s]."""
        return MAX_ADVANCE_RATIO * self.rotors.hover_tip_speed

    @property
    def thrust_coefficient(self) -> float:
        """C_T = T / (rho A (Omega R)^2) of one rotor, from hover at MTOM, sea level [-]."""
        r = self.rotors
        thrust = self.max_takeoff_mass * G0 / r.count
        return thrust / (RHO0 * r.disk_area * r.hover_tip_speed**2)

    def stall_speed(self, mass, density):
        """A multirotor hovers: no stall speed (zeros [m/s]).

        Parameters
        ----------
        mass : array_like
            Mass [kg].
        density : array_like
            Air density [kg/m^3].

        Returns
        -------
        numpy.ndarray
            Zeros of the broadcast shape [m/s].
        """
        return np.zeros(np.broadcast_shapes(np.shape(mass), np.shape(density)))

    def level_flight(self, mass, air, tas) -> LevelFlight:
        """Drag, shaft power and rotor terms in level flight (momentum theory).

        Parameters
        ----------
        mass : array_like
            Mass [kg].
        air : AirState
            Air, broadcastable against ``tas``.
        tas : array_like
            True airspeed [m/s] (0: hover).

        Returns
        -------
        LevelFlight
            ``drag`` [N], ``shaft`` [W] and ``rotor`` terms; no ``cl`` or ``cd``.

        References
        ----------
        .. [1] Leishman (2006), chs. 2 and 5.
        """
        tas = np.asarray(tas, dtype=float)
        rho = air.density
        weight = mass * G0
        area, re_outside = self.body.area_and_range(tas, air)
        drag = 0.5 * rho * tas * tas * area
        induced, profile, mu = rotor_power(self.rotors, self.thrust_coefficient, weight, drag,
                                           tas, rho)
        parasite = drag * tas
        shaft = induced + profile + parasite
        return LevelFlight(drag=drag, shaft=shaft, rotor=RotorState(
            induced=induced, profile=profile, parasite=parasite, advance_ratio=mu,
            tilt_tangent=drag / weight, reynolds_outside=re_outside))

    def model_limits(self, flight: LevelFlight, tas, stall_margin, air):
        """Limit bits: rotor model range (advance ratio, tilt) and bodies' Reynolds range.

        Parameters
        ----------
        flight : LevelFlight
            Level flight at the points.
        tas : array_like
            True airspeed [m/s].
        stall_margin : float
            Not used: a multirotor does not stall [-].
        air : AirState
            Air at the points.

        Returns
        -------
        numpy.ndarray
            :data:`~cruiseplan.limits.LIMIT_DTYPE` :class:`~cruiseplan.limits.Limit` bits.
        """
        rot = flight.rotor
        beyond = ((rot.advance_ratio > MAX_ADVANCE_RATIO)
                  | (rot.tilt_tangent > np.tan(np.radians(MAX_TILT_DEG))))
        # At the hover the bodies' Reynolds number is zero, but so is their drag.
        outside = rot.reynolds_outside & (np.asarray(tas) > 0)
        return flag_if(beyond, Limit.ROTOR_RANGE) | flag_if(outside, Limit.REYNOLDS_RANGE)

    def stall_speed_ratio(self, flight: LevelFlight):
        """No stall for a multirotor: NaN [-].

        Parameters
        ----------
        flight : LevelFlight
            Level flight at the points.

        Returns
        -------
        numpy.ndarray
            NaN of the points' shape.
        """
        return np.full(np.shape(flight.shaft), np.nan)

    def hover_power(self, mass, air):
        """Shaft power to hover [W] (all rotors).

        Parameters
        ----------
        mass : array_like
            Mass [kg].
        air : AirState
            Air.

        Returns
        -------
        numpy.ndarray
            Shaft power [W].

        References
        ----------
        .. [1] Leishman, *Principles of Helicopter Aerodynamics*, ch. 2 (momentum theory
           in hover).
        """
        return self.level_flight(mass, air, 0.0).shaft

    def hover_endurance(self, mass, air, store=None):
        """Hover endurance [s] on ``store`` joules (full usable energy by default).

        Parameters
        ----------
        mass : array_like
            Mass [kg].
        air : AirState
            Air.
        store : float, optional
            Usable energy [J].

        Returns
        -------
        numpy.ndarray
            Endurance [s].

        References
        ----------
        .. [1] Leishman, *Principles of Helicopter Aerodynamics*, ch. 2 (hover power);
           the battery's endurance law is the propulsion's (see
           :meth:`cruiseplan.physics.propulsion.ElectricPropeller.endurance`).
        """
        prop = self.propulsion
        store = prop.store_capacity if store is None else store
        return prop.endurance(store, self.hover_power(mass, air))

    def sampled(self, factors: dict):
        """The airframe with its toleranced parameters as arrays over samples.

        Parameters
        ----------
        factors : dict
            Parameter name (of :attr:`tolerance_keys`) to an array of factors [-].

        Returns
        -------
        Multirotor
            Every model function then broadcasts over the sample axis.

        Raises
        ------
        CruiseplanError
            If a tolerance does not fit the propulsion kind (a BSFC tolerance on a battery).
        """
        changes = {"propulsion": self.propulsion.sampled(self.name, factors)}
        if "cd0" in factors:
            changes["body"] = replace(self.body, scale=factors["cd0"])
        if "induced_factor" in factors:
            changes["rotors"] = replace(self.rotors, induced_factor=self.rotors.induced_factor
                                        * factors["induced_factor"])
        return replace(self, **changes)
