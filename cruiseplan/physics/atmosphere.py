r"""The day's air: ISA from ``ambiance``, temperature deviation, density altitude.

Altitude reference
------------------
cruiseplan's altitude is the **pressure altitude** :math:`H_p`, the altitude an altimeter
set to 1013.25 hPa reads. By definition it is the *geopotential* altitude at which the ISA
pressure equals the ambient pressure. ``ambiance`` takes *geometric* height :math:`h`, so
each pressure altitude is mapped to :math:`h = r_0 H_p / (r_0 - H_p)` (``r_0`` = 6 356 766 m,
the 1976 standard's Earth radius) before the standard atmosphere is evaluated; the ISA
pressure and temperature found there are those of the pressure altitude.

A non-standard day keeps that pressure and changes the temperature,
:math:`T = T_{ISA}(H_p) + \Delta T`; density follows from the gas law,
:math:`\rho = p / (R T)`, and viscosity from Sutherland's law at :math:`T`.

The standard atmosphere is evaluated once per altitude vector; everything else is numpy
broadcasting, so a (n_alt, 1) altitude column with an (n_alt, 1) or scalar deviation
gives states that broadcast against a (1, n_tas) airspeed row.

References
----------
.. [1] ICAO, *Manual of the ICAO Standard Atmosphere*, Doc 7488/3, 1993.
.. [2] NOAA/NASA/USAF, *U.S. Standard Atmosphere, 1976*, NOAA-S/T 76-1562.
"""

from __future__ import annotations

import functools
import importlib
import sys
import types
from dataclasses import dataclass

import numpy as np

from cruiseplan.constants import BETA_S, FT, G0, GAMMA, LAPSE, P0, R_AIR, RHO0, S_SUTH, T0
from cruiseplan.errors import AtmosphereRangeError, CruiseplanError

#: Valid pressure-altitude range [m] (ambiance: -5004 m to 81 020 m geometric).
ALTITUDE_MIN = -5000.0
ALTITUDE_MAX = 80000.0
#: Density-altitude inversion covers the troposphere and the isothermal layer to 20 km.
_DA_MAX = 20000.0


class _DeferredModule(types.ModuleType):
    """Stand-in that imports the real module on first attribute access."""

    def __getattr__(self, attr):
        return getattr(importlib.import_module(self.__name__), attr)


@functools.lru_cache(maxsize=1)
def _ambiance():
    # ambiance imports scipy.optimize at import time (0.3 s) but uses it only to invert
    # pressure or density, which cruiseplan does in closed form. A stand-in defers that
    # import until ambiance really needs it; the real module is untouched.
    name = "scipy.optimize"
    stub = None
    if name not in sys.modules:
        stub = _DeferredModule(name)
        sys.modules[name] = stub
    try:
        import ambiance
    finally:
        if stub is not None and sys.modules.get(name) is stub:
            del sys.modules[name]
    return ambiance


@functools.lru_cache(maxsize=1)
def _atmosphere_class():
    """The ``Atmosphere`` class of ambiance, its layer parameters and temperature kept per call.

    ambiance works out each point's layer parameters again for every quantity read
    (temperature, and pressure, which reads the temperature again); here they are worked
    out once per call. The same arithmetic on the same arrays: the figures are ambiance's.
    """
    base = _ambiance().Atmosphere

    class Atmosphere(base):
        def _get_layer_params(self):
            if "_layer_params" not in self.__dict__:
                self.__dict__["_layer_params"] = super()._get_layer_params()
            return self.__dict__["_layer_params"]

        @property
        def temperature(self):
            if "_temperature" not in self.__dict__:
                self.__dict__["_temperature"] = base.temperature.fget(self)
            return self.__dict__["_temperature"]

    return Atmosphere


def check_altitude(pressure_altitude, what: str = "altitude") -> np.ndarray:
    """Return ``pressure_altitude`` as a float array, or raise if any lies out of range.

    Parameters
    ----------
    pressure_altitude : array_like
        Pressure altitude [m].
    what : str
        Name used in the error message.

    Returns
    -------
    numpy.ndarray
        The altitudes as floats.

    Raises
    ------
    AtmosphereRangeError
        Naming the offending value and the valid range.
    """
    h = np.asarray(pressure_altitude, dtype=float)
    inside = (h >= ALTITUDE_MIN) & (h <= ALTITUDE_MAX)
    if not inside.all():
        bad = ~inside
        v = h[bad].flat[0]
        raise AtmosphereRangeError(
            f"{what} {v:.{0 if abs(v) < 1e12 else 3}{'f' if abs(v) < 1e12 else 'g'}} m "
            f"({v / FT:.{0 if abs(v) < 1e12 else 3}{'f' if abs(v) < 1e12 else 'g'}} ft) "
            "is outside the atmosphere model's range "
            f"{ALTITUDE_MIN:.0f} to {ALTITUDE_MAX:.0f} m pressure altitude")
    return h


def isa_temperature_pressure(pressure_altitude):
    """ISA temperature and pressure at a pressure altitude, from ``ambiance``.

    Parameters
    ----------
    pressure_altitude : array_like
        Pressure (geopotential) altitude [m], -5000 to 80 000 m.

    Returns
    -------
    temperature : numpy.ndarray
        ISA temperature [K].
    pressure : numpy.ndarray
        Pressure [Pa].

    References
    ----------
    .. [1] ICAO Doc 7488/3 (1993); U.S. Standard Atmosphere 1976, evaluated by the
       ``ambiance`` package.
    """
    H = check_altitude(pressure_altitude)
    if H.size > _ISA_CACHE_SIZE:
        return _isa_from_ambiance(H)
    # The same altitudes come back call after call (a table's rows, a plan's legs, a
    # search's air): ambiance evaluates each distinct set once.
    key = (H.shape, H.tobytes())
    found = _ISA_CACHE.get(key)
    if found is None:
        found = _isa_from_ambiance(H)
        for a in found:
            a.flags.writeable = False  # shared between callers
        if len(_ISA_CACHE) >= _ISA_CACHE_ENTRIES:
            _ISA_CACHE.pop(next(iter(_ISA_CACHE)))
        _ISA_CACHE[key] = found
    return found


#: Most altitudes in one cached set, and most sets kept (the oldest dropped first): about
#: 50 MB at most, however long a process runs.
_ISA_CACHE_SIZE = 4096
_ISA_CACHE_ENTRIES = 128
_ISA_CACHE: dict = {}


def _isa_from_ambiance(H):
    """ISA temperature [K] and pressure [Pa] at geopotential altitudes ``H`` [m]."""
    amb = _ambiance()
    flat = H.ravel()
    h_geometric = amb.Atmosphere.geop2geom_height(flat)
    atm = _atmosphere_class()(h_geometric)
    return atm.temperature.reshape(H.shape), atm.pressure.reshape(H.shape)


def sutherland_viscosity(temperature):
    r"""Dynamic viscosity of air by Sutherland's law.

    .. math:: \mu = \beta_s T^{3/2} / (T + S), \quad \beta_s = 1.458\times10^{-6}, S = 110.4 K

    Parameters
    ----------
    temperature : array_like
        Static temperature [K].

    Returns
    -------
    numpy.ndarray
        Dynamic viscosity [Pa s].

    References
    ----------
    .. [1] U.S. Standard Atmosphere 1976, eq. 51.
    """
    T = np.asarray(temperature, dtype=float)
    return BETA_S * T**1.5 / (T + S_SUTH)


@dataclass(frozen=True)
class AirState:
    """State of the air at pressure altitudes on a given day (SI arrays, broadcastable).

    Attributes
    ----------
    pressure_altitude : numpy.ndarray
        Pressure altitude [m].
    isa_dev : numpy.ndarray
        Temperature deviation from ISA [K].
    temperature : numpy.ndarray
        Static (outside air) temperature [K].
    pressure : numpy.ndarray
        Static pressure [Pa].
    density : numpy.ndarray
        Density [kg/m^3].
    speed_of_sound : numpy.ndarray
        Speed of sound [m/s].
    viscosity : numpy.ndarray
        Dynamic viscosity [Pa s].
    """

    pressure_altitude: np.ndarray
    isa_dev: np.ndarray
    temperature: np.ndarray
    pressure: np.ndarray
    density: np.ndarray
    speed_of_sound: np.ndarray
    viscosity: np.ndarray

    @property
    def sigma(self):
        """Density ratio rho / rho0 [-] (computed once per state, read-only)."""
        sigma = self.__dict__.get("_sigma")
        if sigma is None:
            sigma = self.density / RHO0
            if isinstance(sigma, np.ndarray):
                sigma.flags.writeable = False  # kept, and shared with the state's users
            self.__dict__["_sigma"] = sigma
        return sigma

    @property
    def kinematic_viscosity(self):
        """Kinematic viscosity mu / rho [m^2/s]."""
        return self.viscosity / self.density

    @property
    def density_altitude(self):
        """Density altitude [m] (see :func:`density_altitude`).

        NaN where the density lies outside the ISA densities at -5 and 20 km: a row never
        aborts a table.
        """
        return density_altitude(self.density, strict=False)

    def row(self, i):
        """The state at index ``i`` of the first axis.

        Parameters
        ----------
        i : int or slice
            Index along the first (altitude) axis [-].

        Returns
        -------
        AirState
            The selected state, fields in SI as in this one.
        """
        return AirState(*(np.asarray(getattr(self, f))[i] for f in _FIELDS))

    def column(self):
        """Return the state reshaped to a column (n, 1), to broadcast against a row."""
        return AirState(*(np.reshape(getattr(self, f), (-1, 1)) for f in _FIELDS))


_FIELDS = ("pressure_altitude", "isa_dev", "temperature", "pressure", "density",
           "speed_of_sound", "viscosity")


def air_state(pressure_altitude, isa_dev=0.0, *, oat=None) -> AirState:
    r"""Air state at pressure altitudes on an ISA + deviation (or given OAT) day.

    Parameters
    ----------
    pressure_altitude : array_like
        Pressure altitude [m].
    isa_dev : array_like, optional
        Temperature deviation from ISA [K]; broadcast against the altitudes.
    oat : array_like, optional
        Outside air temperature [K] at each altitude; when given, ``isa_dev`` is ignored
        and the deviation is derived.

    Returns
    -------
    AirState
        Temperature, pressure, density (:math:`p / (R T)`), speed of sound
        (:math:`\sqrt{\gamma R T}`) and viscosity (Sutherland) as broadcast arrays.

    Raises
    ------
    AtmosphereRangeError
        If a pressure altitude lies outside -5000 to 80 000 m.
    CruiseplanError
        If the resulting temperature is not above 0 K.

    References
    ----------
    .. [1] ICAO Doc 7488/3 (1993), via ``ambiance``, for the ISA pressure.
    """
    H = np.asarray(pressure_altitude, dtype=float)
    key = None
    if oat is None and H.size <= _ISA_CACHE_SIZE:
        # The same air is asked for again and again (a search's altitudes, a plan's
        # legs): computed once per distinct altitudes and deviation, shared read-only.
        dev = np.asarray(isa_dev, dtype=float)
        if dev.size <= _ISA_CACHE_SIZE:
            key = (H.shape, H.tobytes(), dev.shape, dev.tobytes())
            found = _AIR_CACHE.get(key)
            if found is not None:
                return found
    air = _air_state(H.copy() if key is not None else H, isa_dev, oat)
    if key is not None:
        for f in _FIELDS:
            v = getattr(air, f)
            if isinstance(v, np.ndarray) and v.flags.writeable:
                v.flags.writeable = False
        if len(_AIR_CACHE) >= _ISA_CACHE_ENTRIES:
            _AIR_CACHE.pop(next(iter(_AIR_CACHE)))
        _AIR_CACHE[key] = air
    return air


_AIR_CACHE: dict = {}


def _air_state(H, isa_dev, oat) -> AirState:
    """The air state of :func:`air_state`, computed."""
    T_isa, p = isa_temperature_pressure(H)
    if oat is not None:
        T = np.asarray(oat, dtype=float) + 0.0 * T_isa
        dT = T - T_isa
    else:
        dT = np.asarray(isa_dev, dtype=float) + 0.0 * T_isa
        T = T_isa + dT
    if (T <= 0).any():
        raise CruiseplanError(f"temperature {np.min(T):.1f} K is not physical: "
                              "check the ISA deviation or OAT")
    if np.shape(p) != T.shape:
        p = np.broadcast_to(p, T.shape)
    rho = p / (R_AIR * T)
    return AirState(np.broadcast_to(H, T.shape), dT, T, p, rho,
                    np.sqrt(GAMMA * R_AIR * T), sutherland_viscosity(T))


#: Layers inverted for density altitude: (base geopotential altitude [m], base ISA
#: temperature [K], lapse rate [K/m]); ambiance evaluates -5 to 0 km as its own layer.
_DA_LAYERS = ((-5000.0, T0 + LAPSE * 5000.0, LAPSE), (0.0, T0, LAPSE),
              (11000.0, T0 - LAPSE * 11000.0, 0.0))


@functools.lru_cache(maxsize=1)
def _layer_base_densities() -> tuple:
    """Each layer's base density on its own curve, as ambiance evaluates it.

    ambiance's layer base pressures are rounded to six digits, so neighbouring layers'
    curves differ by up to 3e-6 at a boundary; inverting each layer with its own base
    (read at the layer's middle) keeps the inverse exact to rounding.
    """
    tops = [layer[0] for layer in _DA_LAYERS[1:]] + [_DA_MAX]
    out = []
    for (h_b, T_b, lapse), top in zip(_DA_LAYERS, tops):
        h = 0.5 * (h_b + top)
        rho = float(air_state(h).density)
        if lapse:
            n = G0 / (R_AIR * lapse) - 1.0
            out.append(rho / ((T_b - lapse * (h - h_b)) / T_b) ** n)
        else:
            out.append(rho * np.exp(G0 * (h - h_b) / (R_AIR * T_b)))
    return tuple(out)


def density_altitude(density, *, strict: bool = True):
    r"""Density altitude: the ISA pressure altitude with the given density (exact).

    In a layer with lapse rate :math:`L` and base :math:`(H_b, T_b, \rho_b)`,
    :math:`H_\rho = H_b + (T_b/L)\,[1 - (\rho/\rho_b)^{1/(g_0/(R L) - 1)}]`; in the
    isothermal layer from 11 to 20 km
    :math:`H_\rho = 11000 - (R T_{11}/g_0) \ln(\rho/\rho_{11})`.

    Parameters
    ----------
    density : array_like
        Air density [kg/m^3], between the ISA values at 20 km and -5 km.
    strict : bool, optional
        Raise for a density outside that span (default); when False, NaN there.

    Returns
    -------
    numpy.ndarray
        Density altitude [m].

    Raises
    ------
    AtmosphereRangeError
        If a density lies outside the ISA densities at 20 km and -5 km.

    References
    ----------
    .. [1] ICAO Doc 7488/3 (1993), defining equations of the troposphere and
       lower stratosphere.
    """
    rho = np.asarray(density, dtype=float)
    rho_lo = float(air_state(_DA_MAX).density)
    rho_hi = float(air_state(ALTITUDE_MIN).density)
    inside = (rho >= rho_lo * (1 - 1e-12)) & (rho <= rho_hi * (1 + 1e-12))
    if not strict:
        da = density_altitude(np.where(inside, rho, rho_hi))
        return np.where(inside, da, np.nan)
    if np.any(~inside):
        raise AtmosphereRangeError(
            f"density outside {rho_lo:.4f}..{rho_hi:.4f} kg/m^3: density altitude is "
            f"computed from -5000 m to {_DA_MAX:.0f} m")
    r = np.clip(rho, 1e-12, None)
    bases = _layer_base_densities()
    choices = []
    for (h_b, T_b, lapse), rho_b in zip(_DA_LAYERS, bases):
        if lapse:
            exponent = 1.0 / (G0 / (R_AIR * lapse) - 1.0)
            choices.append(h_b + (T_b / lapse) * (1.0 - (r / rho_b) ** exponent))
        else:
            choices.append(h_b - (R_AIR * T_b / G0) * np.log(r / rho_b))
    # A density above the next layer's base density lies below that layer.
    return np.select([rho > bases[1], rho > bases[2]], choices[:2], choices[2])


def pressure_altitude_from_altimeter(altitude, altimeter_setting):
    r"""Pressure altitude from an altitude read with the altimeter set to QNH.

    The altimeter is calibrated to the ISA troposphere with its sub-scale pressure in place
    of :math:`p_0`, so the ambient pressure where it reads :math:`A` is
    :math:`p = Q (1 - L A / T_0)^{g_0/(R L)}`, and the pressure altitude
    :math:`H_p = (T_0/L)[1 - (p/p_0)^{R L/g_0}]`.

    Parameters
    ----------
    altitude : array_like
        Altitude read on the altimeter set to QNH, i.e. altitude above mean sea level [m].
    altimeter_setting : array_like
        QNH [Pa].

    Returns
    -------
    numpy.ndarray
        Pressure altitude [m] (troposphere).

    References
    ----------
    .. [1] ICAO Doc 7488/3 (1993), troposphere pressure-altitude relation; the altimeter
       calibration follows it with QNH as the datum pressure.
    """
    n = G0 / (R_AIR * LAPSE)
    A = np.asarray(altitude, dtype=float)
    p = np.asarray(altimeter_setting, dtype=float) * (1.0 - LAPSE * A / T0) ** n
    return (T0 / LAPSE) * (1.0 - (p / P0) ** (1.0 / n))


def indicated_altitude(pressure_altitude, altimeter_setting):
    r"""Altitude an altimeter set to QNH reads at a pressure altitude.

    The inverse of :func:`pressure_altitude_from_altimeter`, on the same ISA troposphere
    pressure–height relation: the ambient pressure at the pressure altitude is
    :math:`p = p_0 (1 - L H_p / T_0)^{g_0/(R L)}`, and the altimeter, calibrated to that
    relation with its sub-scale pressure :math:`Q` in place of :math:`p_0`, reads
    :math:`A = (T_0/L)[1 - (p/Q)^{R L/g_0}]`. With :math:`Q = p_0` it reads the pressure
    altitude. No temperature correction: on a day colder than ISA the aircraft is lower
    than the altimeter reads.

    Parameters
    ----------
    pressure_altitude : array_like
        Pressure altitude [m] (troposphere).
    altimeter_setting : array_like
        QNH, the altimeter's sub-scale setting [Pa].

    Returns
    -------
    numpy.ndarray
        Indicated altitude: the altitude above mean sea level the altimeter shows on QNH
        [m].

    References
    ----------
    .. [1] ICAO Doc 7488/3 (1993), troposphere pressure-altitude relation; the altimeter
       calibration follows it with QNH as the datum pressure.
    """
    n = G0 / (R_AIR * LAPSE)
    H = np.asarray(pressure_altitude, dtype=float)
    p = P0 * (1.0 - LAPSE * H / T0) ** n
    return (T0 / LAPSE) * (1.0 - (p / np.asarray(altimeter_setting, dtype=float)) ** (1.0 / n))


#: ISA layers for the pressure inversion: (base geopotential altitude [m], lapse rate [K/m],
#: temperature falling with height positive), from -5 km to the model's 80 km
#: (ICAO Doc 7488/3, table A; U.S. Standard Atmosphere 1976, table 4).
_P_LAYERS = ((-5000.0, LAPSE), (0.0, LAPSE), (11000.0, 0.0), (20000.0, -0.001),
             (32000.0, -0.0028), (47000.0, 0.0), (51000.0, 0.0028), (71000.0, 0.002))


@functools.lru_cache(maxsize=1)
def _layer_bases() -> tuple:
    """Each layer's base (altitude, temperature, pressure) on its own curve, as ambiance has it.

    As for density, ambiance's layer base pressures are rounded to six digits; each layer is
    inverted with the base pressure read at the layer's middle and carried down its own
    curve, so the inverse matches the forward model to rounding.
    """
    tops = [layer[0] for layer in _P_LAYERS[1:]] + [ALTITUDE_MAX]
    out = []
    for (h_b, lapse), top in zip(_P_LAYERS, tops):
        T_b = float(isa_temperature_pressure(h_b)[0])
        h = 0.5 * (h_b + top)
        p = float(isa_temperature_pressure(h)[1])
        if lapse:
            p_b = p / ((T_b - lapse * (h - h_b)) / T_b) ** (G0 / (R_AIR * lapse))
        else:
            p_b = p * np.exp(G0 * (h - h_b) / (R_AIR * T_b))
        out.append((h_b, T_b, lapse, p_b))
    return tuple(out)


def pressure_altitude_from_pressure(pressure):
    r"""Pressure altitude of a static pressure: the ISA altitude with that pressure (exact).

    The hydrostatic ISA relation inverted in closed form, layer by layer: with base
    :math:`(H_b, T_b, p_b)` and lapse rate :math:`L`,
    :math:`H = H_b + (T_b/L)\,[1 - (p/p_b)^{R L/g_0}]`, and in an isothermal layer
    :math:`H = H_b - (R T_b/g_0) \ln(p/p_b)`.

    Parameters
    ----------
    pressure : array_like
        Static pressure [Pa], between the ISA pressures at 80 km and -5 km.

    Returns
    -------
    numpy.ndarray
        Pressure (geopotential) altitude [m].

    Raises
    ------
    AtmosphereRangeError
        If a pressure is not finite or lies outside the ISA pressures at 80 km and -5 km.

    References
    ----------
    .. [1] ICAO Doc 7488/3 (1993), the hydrostatic equation integrated over each layer of
       constant lapse rate; U.S. Standard Atmosphere 1976, eqs. 33a and 33b.
    """
    p = np.asarray(pressure, dtype=float)
    p_lo = float(isa_temperature_pressure(ALTITUDE_MAX)[1])
    p_hi = float(isa_temperature_pressure(ALTITUDE_MIN)[1])
    ok = (p >= p_lo * (1 - 1e-12)) & (p <= p_hi * (1 + 1e-12))
    if not np.all(ok):
        v = p[~ok].flat[0]
        raise AtmosphereRangeError(
            f"pressure {v:g} Pa is outside the atmosphere model's range {p_lo:.3g} to "
            f"{p_hi:.0f} Pa (80 km to -5 km pressure altitude)")
    bases = _layer_bases()
    r = np.clip(p, 1e-300, None)
    choices = []
    for h_b, T_b, lapse, p_b in bases:
        if lapse:
            choices.append(h_b + (T_b / lapse) * (1.0 - (r / p_b) ** (R_AIR * lapse / G0)))
        else:
            choices.append(h_b - (R_AIR * T_b / G0) * np.log(r / p_b))
    # A pressure above the next layer's base pressure lies below that layer.
    conds = [p > b[3] for b in bases[1:]]
    return np.select(conds, choices[:-1], choices[-1])
