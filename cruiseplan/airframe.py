"""The airframe: masses, wing, drag polar, propulsion (SI floats, no file handling).

Loading from TOML files is in :mod:`cruiseplan.airframe_files`; this module holds the
validated description and resolves a loading (mass and fuel or energy on board).
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np

from .aerodynamics import lift_coefficient, speed_for_lift_coefficient
from .constants import G0
from .errors import CruiseplanError, CruiseplanWarning


@dataclass(frozen=True)
class Loading:
    """Mass and store on board for one calculation.

    Attributes
    ----------
    mass : float
        Aircraft mass [kg].
    store : float
        Fuel mass [kg] (piston) or usable battery energy [J] (electric).
    """

    mass: float
    store: float


@dataclass(frozen=True)
class Airframe:
    """A fixed-wing airframe in SI units.

    Parameters
    ----------
    name : str
        Short name (the file stem for bundled airframes).
    description : str
        One line for listings.
    empty_mass, max_takeoff_mass, payload : float
        Masses [kg]; ``payload`` is the default crew and payload.
    wing_area : float
        Reference wing area [m^2].
    span : float
        Wing span [m].
    cl_max : float
        Maximum lift coefficient in the cruise configuration [-].
    polar : object
        A drag polar from :data:`cruiseplan.aerodynamics.POLAR_KINDS`.
    propulsion : object
        A propulsion kind from :data:`cruiseplan.propulsion.PROPULSION_KINDS`.
    source : str
        File the airframe was read from.
    checksum : str
        SHA-256 of that file's bytes.
    tolerances : tuple
        (parameter, :class:`~cruiseplan.uncertainty.Tolerance`) pairs for Monte Carlo.
    """

    name: str
    description: str
    empty_mass: float
    max_takeoff_mass: float
    payload: float
    wing_area: float
    span: float
    cl_max: float
    polar: object
    propulsion: object
    source: str = ""
    checksum: str = ""
    tolerances: tuple = ()
    kind: str = field(default="fixed-wing", init=False)

    @property
    def aspect_ratio(self) -> float:
        """Aspect ratio b^2 / S [-]."""
        return self.span**2 / self.wing_area

    def stall_speed(self, mass, density):
        """Stall TAS at CLmax [m/s] for mass [kg] and density [kg/m^3]."""
        return speed_for_lift_coefficient(mass, density, self.wing_area, self.cl_max)

    def level_flight(self, mass, air, tas):
        """Lift and drag coefficients, drag [N] and shaft power [W] in level flight.

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
        dict
            ``cl``, ``cd`` [-], ``drag`` [N], ``shaft`` [W].

        References
        ----------
        .. [1] J. D. Anderson, *Aircraft Performance and Design*, 1999, sec. 5.3.
        """
        tas = np.asarray(tas, dtype=float)
        cl = lift_coefficient(mass, air.density, tas, self.wing_area)
        cd = self.polar.drag_coefficient(cl, tas, air)
        drag = mass * G0 * cd / cl  # lift = weight, drag = lift / (L/D)
        return dict(cl=cl, cd=cd, drag=drag, shaft=drag * tas / self.propulsion.propeller(tas))

    def model_limits(self, flight, tas, stall_margin, air=None):
        """Limit bits of the airframe's own model: stall margin, polar and Reynolds range."""
        from .performance import Limit

        cl = flight["cl"]
        bits = np.where(cl > self.cl_max / stall_margin**2, np.uint16(Limit.STALL), 0)
        bits = bits | np.where(self.polar.outside(cl), np.uint16(Limit.POLAR_RANGE), 0)
        if air is not None and hasattr(self.polar, "reynolds_outside"):
            bits = bits | np.where(self.polar.reynolds_outside(tas, air),
                                   np.uint16(Limit.REYNOLDS_RANGE), 0)
        return bits.astype(np.uint16)

    def stall_speed_ratio(self, flight):
        """TAS over stall speed at each point [-]."""
        return np.sqrt(self.cl_max / flight["cl"])

    def loading(self, mass=None, store=None, payload=None) -> Loading:
        """Resolve the mass and the fuel or energy on board.

        Parameters
        ----------
        mass : float, optional
            Aircraft mass [kg]. For a piston airframe without ``store``, the fuel on board
            is what the mass leaves above empty mass and payload, up to full tanks.
        store : float, optional
            Fuel on board [kg] or usable energy [J]; full when neither is given.
        payload : float, optional
            Crew and payload [kg]; the airframe's default when not given.

        Returns
        -------
        Loading
            Mass [kg] and store [kg or J].

        Raises
        ------
        CruiseplanError
            When the fuel or energy exceeds capacity or the mass cannot hold the payload.
        """
        prop = self.propulsion
        cap = prop.store_capacity
        unit = "kg of fuel" if prop.store_name == "fuel" else "J of usable energy"
        short = "kg" if prop.store_name == "fuel" else "J"
        payload = self.payload if payload is None else float(payload)
        if store is not None and not (0.0 <= store <= cap * (1 + 1e-9)):
            raise CruiseplanError(f"{prop.store_name} on board {store:.4g} {short} is outside 0 "
                                  f"to the "
                                  f"capacity of {self.name}, {cap:.4g} {unit}")
        fuel_counts = prop.store_name == "fuel"
        if mass is None:
            store = cap if store is None else float(store)
            mass = self.empty_mass + payload + (store if fuel_counts else 0.0)
        else:
            mass = float(mass)
            if mass <= 0:
                raise CruiseplanError(f"mass must be positive, got {mass:.4g} kg")
            if store is None:
                if fuel_counts:
                    spare = mass - self.empty_mass - payload
                    if spare < 0:
                        raise CruiseplanError(
                            f"mass {mass:.1f} kg is below empty mass {self.empty_mass:.1f} kg "
                            f"plus payload {payload:.1f} kg of {self.name}")
                    store = min(cap, spare)
                else:
                    store = cap
        if mass > self.max_takeoff_mass * (1 + 1e-9):
            warnings.warn(f"mass {mass:.1f} kg exceeds the maximum take-off mass "
                          f"{self.max_takeoff_mass:.1f} kg of {self.name}",
                          CruiseplanWarning, stacklevel=2)
        return Loading(float(mass), float(store))
