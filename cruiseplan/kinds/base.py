"""What every airframe kind shares: the protocol, the level-flight result and the loading.

A kind (fixed wing, multirotor, ...) is a frozen dataclass that meets :class:`Airframe`:
it returns a :class:`LevelFlight` from :meth:`Airframe.level_flight`, so the grid, the
optimiser, the planner, the tables and the plots work with any kind without asking which
it is. The common fields (masses, propulsion, file) and the loading rules live in
:class:`AirframeBase`, which each kind extends with its own geometry.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, replace
from typing import ClassVar, Protocol, runtime_checkable

import numpy as np

from cruiseplan.errors import CruiseplanError, CruiseplanWarning


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
class RotorState:
    """Rotor terms of a multirotor's level flight (arrays of the points' shape).

    Attributes
    ----------
    induced, profile, parasite : numpy.ndarray
        Induced, profile (all rotors) and parasite power [W].
    advance_ratio : numpy.ndarray
        Advance ratio mu [-].
    tilt_tangent : numpy.ndarray
        Tangent of the rotor plane's forward tilt, D/W [-].
    reynolds_outside : numpy.ndarray
        True where a body's Reynolds number leaves its drag correlation's range.
    """

    induced: np.ndarray
    profile: np.ndarray
    parasite: np.ndarray
    advance_ratio: np.ndarray
    tilt_tangent: np.ndarray
    reynolds_outside: np.ndarray


@dataclass(frozen=True)
class LevelFlight:
    """Level flight at points, for every airframe kind (SI arrays of the points' shape).

    Attributes
    ----------
    drag : numpy.ndarray
        Drag [N].
    shaft : numpy.ndarray
        Shaft power required [W].
    cl, cd : numpy.ndarray or None
        Lift and drag coefficients [-]; None for a kind without a wing.
    rotor : RotorState or None
        Rotor terms; None for a kind without lifting rotors.
    """

    drag: np.ndarray
    shaft: np.ndarray
    cl: np.ndarray | None = None
    cd: np.ndarray | None = None
    rotor: RotorState | None = None


@runtime_checkable
class Airframe(Protocol):
    """What the planner asks of an airframe kind (all SI).

    Attributes
    ----------
    kind : str
        The kind's registry name (``"fixed-wing"``, ``"multirotor"``).
    has_wing : bool
        Lift from a wing: CL, L/D and a stall speed exist.
    hovers : bool
        Can hold position at zero airspeed.
    model_speed_limit : float
        Fastest TAS the kind's model is trusted to [m/s] (inf: no limit of its own).
    tolerance_keys : tuple of str
        Parameters a Monte Carlo may vary.
    name, description : str
        Identification.
    empty_mass, max_takeoff_mass, payload : float
        Masses [kg].
    propulsion : object
        A propulsion kind from :data:`cruiseplan.physics.propulsion.PROPULSION_KINDS`.
    """

    kind: ClassVar[str]
    has_wing: ClassVar[bool]
    hovers: ClassVar[bool]
    model_speed_limit: float
    tolerance_keys: ClassVar[tuple]
    name: str
    description: str
    empty_mass: float
    max_takeoff_mass: float
    payload: float
    propulsion: object

    def stall_speed(self, mass, density):
        """Stall TAS [m/s] (zero for a kind that hovers).

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
        """

    def level_flight(self, mass, air, tas) -> LevelFlight:
        """Drag and shaft power in level flight at TAS ``tas`` [m/s].

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
            ``drag`` [N], ``shaft`` [W] and the kind's own terms.
        """

    def model_limits(self, flight: LevelFlight, tas, stall_margin, air):
        """:class:`~cruiseplan.limits.Limit` bits of the kind's own model.

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
            :data:`~cruiseplan.limits.LIMIT_DTYPE` :class:`~cruiseplan.limits.Limit` bits.
        """

    def stall_speed_ratio(self, flight: LevelFlight):
        """TAS over stall speed [-] (NaN for a kind without a wing).

        Parameters
        ----------
        flight : LevelFlight
            Level flight at the points.

        Returns
        -------
        numpy.ndarray
            TAS over stall speed [-].
        """

    def sampled(self, factors: dict):
        """The same airframe with toleranced parameters as arrays over samples.

        Parameters
        ----------
        factors : dict
            Parameter name (of ``tolerance_keys``) to an array of factors [-].

        Returns
        -------
        Airframe
            The same kind; its model functions broadcast over the sample axis.
        """

    def loading(self, mass=None, store=None, payload=None) -> Loading:
        """Mass and store on board.

        Parameters
        ----------
        mass : float, optional
            Aircraft mass [kg].
        store : float, optional
            Fuel on board [kg] or usable energy [J].
        payload : float, optional
            Crew and payload [kg].

        Returns
        -------
        Loading
            Mass [kg] and store [kg or J].
        """


@dataclass(frozen=True, kw_only=True)
class AirframeBase:
    """Fields and loading rules common to every airframe kind (SI).

    Parameters
    ----------
    name : str
        Short name (the file stem for bundled airframes).
    description : str
        One line for listings.
    empty_mass, max_takeoff_mass, payload : float
        Masses [kg]; ``payload`` is the default crew and payload.
    propulsion : object
        A propulsion kind from :data:`cruiseplan.physics.propulsion.PROPULSION_KINDS`.
    source : str
        File the airframe was read from.
    checksum : str
        SHA-256 of that file's bytes.
    tolerances : tuple
        (parameter, :class:`~cruiseplan.model.tolerance.Tolerance`) pairs for Monte Carlo.
    tolerance_correlation : ToleranceCorrelation or None
        Correlation of some of those parameters
        (:class:`~cruiseplan.model.tolerance.ToleranceCorrelation`); None: independent.
    """

    name: str
    description: str
    empty_mass: float
    max_takeoff_mass: float
    payload: float
    propulsion: object
    source: str = ""
    checksum: str = ""
    tolerances: tuple = ()
    tolerance_correlation: object = None

    def at_pack_temperature(self, celsius: float):
        """The same airframe with its battery pack at ``celsius`` [degC].

        Only a pack given as an equivalent circuit changes (capacity and resistance by its
        temperature table); any other airframe is returned as it is.

        Parameters
        ----------
        celsius : float
            Pack temperature [degC].

        Returns
        -------
        Airframe
            The airframe with its propulsion at that pack temperature.

        Raises
        ------
        CruiseplanError
            Below the pack's temperature table.
        """
        prop = self.propulsion.at_pack_temperature(celsius)
        return self if prop is self.propulsion else replace(self, propulsion=prop)

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
        kind = prop.store
        cap = prop.store_capacity
        payload = self.payload if payload is None else float(payload)
        if store is not None and not (0.0 <= store <= cap * (1 + 1e-9)):
            raise CruiseplanError(f"{kind.name} on board {store:.4g} {kind.unit} is outside 0 "
                                  f"to the capacity of {self.name}, {cap:.4g} "
                                  f"{kind.unit_text}")
        if mass is None:
            store = cap if store is None else float(store)
            mass = self.empty_mass + payload + (store if kind.burns_mass else 0.0)
        else:
            mass = float(mass)
            if mass <= 0:
                raise CruiseplanError(f"mass must be positive, got {mass:.4g} kg")
            if store is None:
                if kind.burns_mass:
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
