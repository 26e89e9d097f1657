r"""Battery packs as an equivalent circuit: voltage sag, cut-off, current limit, cold packs.

The model is the first-order **internal-resistance (Rint) equivalent circuit**: an ideal
source whose open-circuit voltage depends on the state of charge, in series with one
resistance,

.. math:: V = U(s) - I R,

with :math:`U(s)` the open-circuit voltage (OCV) at state of charge :math:`s` (a table per
cell, interpolated by a monotone cubic), :math:`R` the pack's internal resistance and
:math:`I` the current drawn. It is the zero-order member of the Thevenin family (no
RC branch: no relaxation after a change of load) and has the resistive term of Shepherd's
discharge model without its polarisation term; the OCV table takes the place of Shepherd's
closed-form voltage curve. A pack is ``cells_series`` cells in series times
``cells_parallel`` strings: :math:`U = n_s U_{cell}`, :math:`R = n_s R_{cell} / n_p`,
capacity :math:`Q = n_p Q_{cell}`, cut-off :math:`V_{cut} = n_s V_{cut,cell}`.

At a constant battery power :math:`P = V I` the current solves :math:`R I^2 - U I + P = 0`;
the root of the working branch (the smaller, high-voltage one) is

.. math:: I = \frac{U - \sqrt{U^2 - 4 R P}}{2 R} = \frac{2 P}{U + \sqrt{U^2 - 4 R P}},

evaluated in the second form, which has no cancellation and holds at :math:`R = 0`
(:math:`I = P / U`). No current gives more than :math:`P_{max} = U^2 / (4 R)` (at
:math:`V = U / 2`); beyond it the point carries :attr:`~cruiseplan.limits.Limit.PACK_POWER`,
never a NaN.

**The store.** What the pack's store counts is the energy at the open-circuit voltage,
:math:`E(s) = Q \int_0^s U(u)\,du`, between the state of charge on board and the state where
the terminal voltage reaches cut-off with no load (:attr:`EquivalentCircuit.soc_floor`).
It is used at the rate :math:`U I = P + I^2 R` [W]: the battery power plus the heat in the
resistance, so the store falls by exactly :math:`E(s_0) - E(s_1)` between two states.
Under load the terminal voltage reaches cut-off sooner, at the state where
:math:`U(s) = V_{end} + R P / V_{end}`, with :math:`V_{end} = \max(V_{cut}, P / I_{max})`
(the discharge also ends where the current would pass the maximum continuous current);
what lies below it cannot be used at that power. A constant-power discharge from
:math:`s_0` lasts

.. math:: t = \frac{1}{P}\left[E(s_0) - E(s_{end}) - R Q \int_{s_{end}}^{s_0} I\,ds\right]

(the terminal energy over the power), the integral by 3-point Gauss-Legendre (within
3e-5 of adaptive quadrature on the demo pack).

**Temperature.** Capacity and resistance are multiplied by factors interpolated in a table
against the pack temperature (:class:`PackTemperature`; the airframe file's, or
:data:`DEFAULT_TEMPERATURE`, common practice, no source). The OCV table is kept as a
function of the state of charge of the derated capacity. Below the table's range the pack
is not modelled: :meth:`PackTemperature.factors` raises a
:class:`~cruiseplan.errors.CruiseplanError` naming the range; above it the warmest factors
hold (a warm pack gains no capacity the table does not give).

References
----------
.. [1] C. M. Shepherd, "Design of Primary and Secondary Cells: II. An Equation Describing
   Battery Discharge", *J. Electrochem. Soc.* 112(7), 1965, pp. 657-664 (from memory).
.. [2] H. He, R. Xiong and J. Fan, "Evaluation of Lithium-Ion Battery Equivalent Circuit
   Models for State of Charge Estimation by an Experimental Approach", *Energies* 4(4),
   2011, pp. 582-598 (the Rint, Thevenin and PNGV circuits compared; from memory).
.. [3] F. N. Fritsch and R. E. Carlson, "Monotone Piecewise Cubic Interpolation",
   *SIAM J. Numer. Anal.* 17(2), 1980, pp. 238-246.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from cruiseplan._numerics import monotone_slopes
from cruiseplan.errors import CruiseplanError
from cruiseplan.limits import LIMIT_DTYPE, Limit

#: Points of the fine table the OCV curve and its integral are sampled on [-], besides the
#: table's own: the monotone cubic is evaluated once, then linear interpolation between
#: them (within 1e-6 of the voltage, relative, for the demo tables) keeps every call a C
#: loop.
FINE_POINTS = 2049
#: Reference pack temperature [degC]: an airframe read from its file holds its pack here
#: until a temperature is set (:meth:`EquivalentCircuit.at_temperature`).
REFERENCE_CELSIUS = 25.0
#: Least share of the store a discharge is counted to deliver [-]: where a pack cannot
#: give a power at all its mean rate is the power over this, huge but finite and rising.
MIN_SHARE = 1e-12
#: Three-point Gauss-Legendre nodes and weights on [-1, 1] for the resistive loss of a
#: discharge (the closed form; numpy.polynomial's leggauss(3) gives the same to 1 ulp).
_GAUSS_X = np.array([-np.sqrt(0.6), 0.0, np.sqrt(0.6)])
_GAUSS_W = np.array([5.0, 8.0, 5.0]) / 9.0


@dataclass(frozen=True)
class PackTemperature:
    """Capacity and resistance factors against pack temperature, from a table.

    Parameters
    ----------
    celsius : tuple of float
        Pack temperatures [degC], increasing.
    capacity : tuple of float
        Capacity over the rated capacity [-] at each temperature.
    resistance : tuple of float
        Internal resistance over the rated resistance [-] at each temperature.
    source : str
        Where the table comes from, for the outputs.
    """

    celsius: tuple
    capacity: tuple
    resistance: tuple
    source: str = ""

    def factors(self, celsius):
        """Capacity and resistance factors [-] at a pack temperature.

        Linear between the table's points (so each point is reproduced exactly); above
        the warmest point its factors hold; below the coldest the pack is not modelled.

        Parameters
        ----------
        celsius : float
            Pack temperature [degC].

        Returns
        -------
        capacity, resistance : float
            Factors [-].

        Raises
        ------
        CruiseplanError
            Below the table's range, naming it.
        """
        t = float(celsius)
        lo = self.celsius[0]
        if not t >= lo - 1e-9:
            raise CruiseplanError(
                f"pack temperature {t:.1f} degC is below the battery temperature table "
                f"({lo:g} to {self.celsius[-1]:g} degC, {self.source}): warm the pack, or "
                f"give a [battery.temperature] table that reaches {t:.0f} degC")
        return (float(np.interp(t, self.celsius, self.capacity)),
                float(np.interp(t, self.celsius, self.resistance)))


#: Capacity and resistance factors of a lithium-ion or lithium-polymer pack against its
#: temperature, used when an airframe file gives a circuit but no table (common practice,
#: no source: planning values of the usual size, not a measurement of any cell).
DEFAULT_TEMPERATURE = PackTemperature(
    celsius=(-20.0, -10.0, 0.0, 10.0, 25.0, 40.0),
    capacity=(0.60, 0.72, 0.83, 0.92, 1.00, 1.00),
    resistance=(4.0, 2.6, 1.8, 1.3, 1.00, 0.85),
    source="default table, common practice, no source")


@dataclass(frozen=True)
class PackLoad:
    """The pack at a load and state of charge (SI arrays of the broadcast shape).

    Attributes
    ----------
    current : numpy.ndarray
        Current drawn [A] (at the pack's maximum power where the power is beyond it).
    voltage : numpy.ndarray
        Terminal voltage under load [V].
    ocv : numpy.ndarray
        Open-circuit voltage [V].
    limits : numpy.ndarray
        :class:`~cruiseplan.limits.Limit` bits: PACK_POWER, CURRENT, CUTOFF.
    """

    current: np.ndarray
    voltage: np.ndarray
    ocv: np.ndarray
    limits: np.ndarray


@dataclass(frozen=True)
class Discharge:
    """A constant-power discharge from a state of charge to an end (SI arrays).

    Attributes
    ----------
    time : numpy.ndarray
        Duration [s] (0 where the pack cannot start it).
    energy : numpy.ndarray
        Energy delivered at the terminals [J], power x time.
    store_used : numpy.ndarray
        Store used, energy at the open-circuit voltage [J].
    soc_end : numpy.ndarray
        State of charge at the end [-].
    voltage_end : numpy.ndarray
        Terminal voltage under load at the end [V].
    current_end : numpy.ndarray
        Current at the end [A], the largest of the discharge.
    cut_off : numpy.ndarray of bool
        True where the end is the loaded cut-off (or the current limit), not the state
        asked for.
    """

    time: np.ndarray
    energy: np.ndarray
    store_used: np.ndarray
    soc_end: np.ndarray
    voltage_end: np.ndarray
    current_end: np.ndarray
    cut_off: np.ndarray


@dataclass(frozen=True)
class EquivalentCircuit:
    """A battery pack as an internal-resistance (Rint) equivalent circuit.

    Parameters
    ----------
    soc : tuple of float
        States of charge of the OCV table [-], increasing from 0 to 1.
    cell_ocv : tuple of float
        Open-circuit voltage of one cell at those states [V], non-decreasing.
    cells_series, cells_parallel : int
        Cells in series, and parallel strings of them [-].
    cell_capacity : float
        Rated capacity of one cell [A s].
    cell_resistance : float
        Internal resistance of one cell at the reference temperature [ohm], >= 0.
    cell_cutoff : float
        Cut-off voltage of one cell under load [V].
    max_current : float or None
        Maximum continuous pack current [A]; None for no limit.
    temperature_table : PackTemperature
        Capacity and resistance factors against pack temperature.
    celsius : float
        Pack temperature [degC] the circuit holds for.
    capacity_factor : float or numpy.ndarray
        Multiplies the capacity (1; arrays over Monte Carlo samples).

    References
    ----------
    .. [1] He, Xiong and Fan (2011), the Rint model (from memory).
    .. [2] Shepherd (1965), the resistive term of the discharge equation (from memory).
    """

    soc: tuple
    cell_ocv: tuple
    cells_series: int
    cells_parallel: int
    cell_capacity: float
    cell_resistance: float
    cell_cutoff: float
    max_current: float | None = None
    temperature_table: PackTemperature = DEFAULT_TEMPERATURE
    celsius: float = REFERENCE_CELSIUS
    capacity_factor: object = 1.0
    _fine: tuple = field(default=(), init=False, repr=False, compare=False)

    def __post_init__(self):
        x = np.asarray(self.soc, dtype=float)
        y = self.cells_series * np.asarray(self.cell_ocv, dtype=float)
        if x.size < 2 or x[0] != 0.0 or x[-1] != 1.0 or np.any(np.diff(x) <= 0):
            raise CruiseplanError("the OCV table's states of charge must increase from 0 to 1")
        if np.any(np.diff(y) < 0) or np.any(y <= 0):
            raise CruiseplanError("the OCV table's voltages must be positive and must not "
                                  "fall as the state of charge rises")
        # The table's own points are among the fine ones, so it is reproduced exactly.
        s = np.union1d(np.linspace(0.0, 1.0, FINE_POINTS), x)
        u = _monotone_cubic(x, y, s)
        # Energy per coulomb of capacity at OCV, E/Q = int_0^s U ds: trapezoids of the
        # linear interpolant of the fine table, so it is the exact integral of the OCV
        # the model evaluates.
        e = np.concatenate(([0.0], np.cumsum(0.5 * (u[1:] + u[:-1]) * np.diff(s))))
        cap_f, res_f = self.temperature_table.factors(self.celsius)
        v_cut = self.cells_series * self.cell_cutoff
        floor = float(np.interp(v_cut, u, s)) if v_cut > u[0] else 0.0
        e_floor = float(np.interp(floor, s, e))
        object.__setattr__(self, "_fine", (s, u, e, cap_f, res_f, floor, e_floor))

    # --- pack figures ------------------------------------------------------------------

    @property
    def capacity(self):
        """Pack capacity at this temperature [A s]."""
        return self.cells_parallel * self.cell_capacity * self._fine[3] * self.capacity_factor

    @property
    def resistance(self) -> float:
        """Pack internal resistance at this temperature [ohm]."""
        return self.cells_series * self.cell_resistance / self.cells_parallel * self._fine[4]

    @property
    def cutoff(self) -> float:
        """Pack cut-off voltage [V]."""
        return self.cells_series * self.cell_cutoff

    @property
    def nominal_voltage(self) -> float:
        """Mean open-circuit voltage over a full discharge [V], E(1)/Q."""
        return float(self._fine[2][-1])

    @property
    def soc_floor(self) -> float:
        """State of charge where the OCV reaches cut-off, the store's empty [-]."""
        return self._fine[5]

    @property
    def store_capacity(self):
        """Store of a full pack [J]: energy at OCV from the no-load cut-off to full."""
        return self.capacity * (self._fine[2][-1] - self._fine[6])

    def at_temperature(self, celsius: float) -> EquivalentCircuit:
        """The same pack at another temperature.

        Parameters
        ----------
        celsius : float
            Pack temperature [degC].

        Returns
        -------
        EquivalentCircuit
            Capacity and resistance derated by the temperature table.

        Raises
        ------
        CruiseplanError
            Below the table's range.
        """
        return replace(self, celsius=float(celsius))

    def scaled(self, factor) -> EquivalentCircuit:
        """The same pack with its capacity multiplied by ``factor`` [-] (samples)."""
        return replace(self, capacity_factor=self.capacity_factor * factor)

    # --- states -------------------------------------------------------------------------

    def ocv(self, soc):
        """Pack open-circuit voltage [V] at state of charge ``soc`` [-].

        Parameters
        ----------
        soc : array_like
            State of charge [-]; held at 0 and 1 beyond them.

        Returns
        -------
        numpy.ndarray
            OCV [V] (monotone cubic of the cell table x cells in series).
        """
        s, u = self._fine[0], self._fine[1]
        return np.interp(soc, s, u)

    def soc_of_store(self, store):
        """State of charge [-] at which the store [J] is on board.

        Parameters
        ----------
        store : array_like
            Store on board [J], energy at OCV above the no-load cut-off.

        Returns
        -------
        numpy.ndarray
            State of charge [-], the inverse of :meth:`store_at`.
        """
        s, e, e_floor = self._fine[0], self._fine[2], self._fine[6]
        return np.interp(np.asarray(store, dtype=float) / self.capacity + e_floor, e, s)

    def store_at(self, soc):
        """Store on board [J] at state of charge ``soc`` [-].

        Parameters
        ----------
        soc : array_like
            State of charge [-].

        Returns
        -------
        numpy.ndarray
            Energy at OCV above the no-load cut-off [J] (negative below it).
        """
        s, e, e_floor = self._fine[0], self._fine[2], self._fine[6]
        return self.capacity * (np.interp(soc, s, e) - e_floor)

    def max_power(self, soc):
        """Largest battery power any current gives, U^2 / (4 R) [W] (inf with R = 0).

        Parameters
        ----------
        soc : array_like
            State of charge [-].

        Returns
        -------
        numpy.ndarray
            Maximum power [W].
        """
        u = self.ocv(soc)
        with np.errstate(divide="ignore"):
            return u * u / (4.0 * self.resistance)

    def power_limit(self, soc):
        """Largest battery power within every pack limit at ``soc``, and the one that binds.

        The least of :math:`U^2/(4R)` (PACK_POWER), :math:`V_{cut}(U - V_{cut})/R` (the
        power at which the terminal voltage is the cut-off; CUTOFF) and
        :math:`(U - I_{max} R) I_{max}` (the power at the maximum continuous current;
        CURRENT).

        Parameters
        ----------
        soc : float
            State of charge [-].

        Returns
        -------
        power : float
            Battery power [W] (inf when nothing limits it; negative below cut-off).
        bit : int
            The :class:`~cruiseplan.limits.Limit` bit of the limit that binds (0: none).
        """
        u = float(np.max(self.ocv(soc)))
        r = float(self.resistance)
        v = self.cutoff
        caps = [(u * u / (4.0 * r) if r > 0 else np.inf, int(Limit.PACK_POWER)),
                (v * (u - v) / r if r > 0 else (np.inf if u >= v else -1.0),
                 int(Limit.CUTOFF))]
        if self.max_current is not None:
            caps.append(((u - self.max_current * r) * self.max_current, int(Limit.CURRENT)))
        power, bit = min(caps, key=lambda c: c[0])
        return power, (bit if np.isfinite(power) else 0)

    def current(self, power, soc):
        r"""Current [A] at battery power ``power`` [W] and state of charge ``soc``.

        :math:`I = 2P / (U + \sqrt{U^2 - 4RP})`, the working root of
        :math:`R I^2 - U I + P = 0`; beyond :math:`U^2/(4R)` the current of the maximum
        power, :math:`U / (2R)` (the point is flagged by :meth:`load`).

        Parameters
        ----------
        power : array_like
            Battery power [W], >= 0.
        soc : array_like
            State of charge [-].

        Returns
        -------
        numpy.ndarray
            Current [A].
        """
        return _current(power, self.ocv(soc), self.resistance)

    def terminal_voltage(self, power, soc):
        """Terminal voltage under load [V], V = OCV - I R.

        Parameters
        ----------
        power : array_like
            Battery power [W].
        soc : array_like
            State of charge [-].

        Returns
        -------
        numpy.ndarray
            Terminal voltage [V].
        """
        u = self.ocv(soc)
        return u - _current(power, u, self.resistance) * self.resistance

    def rate(self, power, soc):
        """Rate the store is used [W] at battery power and state of charge: U I = P + I^2 R.

        Parameters
        ----------
        power : array_like
            Battery power [W].
        soc : array_like
            State of charge [-].

        Returns
        -------
        numpy.ndarray
            Rate [W]; exactly ``power`` when the resistance is 0.
        """
        i = self.current(power, soc)
        return power + i * i * self.resistance

    def load(self, power, soc) -> PackLoad:
        """Current, voltage and the limits they breach at a power and state of charge.

        Parameters
        ----------
        power : array_like
            Battery power [W].
        soc : array_like
            State of charge [-].

        Returns
        -------
        PackLoad
            PACK_POWER beyond U^2/(4R) (then no other pack bit); otherwise CURRENT above
            the maximum continuous current and CUTOFF below the cut-off voltage (or at or
            below the store's empty).
        """
        u = self.ocv(soc)
        r = self.resistance
        i = _current(power, u, r)
        v = u - i * r
        beyond = 4.0 * r * np.asarray(power) > u * u
        amps = (np.asarray(i) > self.max_current * (1 + 1e-12)
                if self.max_current is not None else np.zeros(np.shape(i), dtype=bool))
        volts = (v < self.cutoff * (1 - 1e-12)) | (np.asarray(soc) <= self.soc_floor - 1e-12)
        bits = (np.where(beyond, LIMIT_DTYPE(Limit.PACK_POWER), LIMIT_DTYPE(0))
                | np.where(~beyond & amps, LIMIT_DTYPE(Limit.CURRENT), LIMIT_DTYPE(0))
                | np.where(~beyond & volts, LIMIT_DTYPE(Limit.CUTOFF), LIMIT_DTYPE(0)))
        return PackLoad(i, v, u, bits.astype(LIMIT_DTYPE))

    # --- discharges ---------------------------------------------------------------------

    def discharge(self, power, store, keep=None) -> Discharge:
        """Constant-power discharge of ``store`` down to ``keep`` or the loaded cut-off.

        Parameters
        ----------
        power : array_like
            Battery power [W], > 0.
        store : array_like
            Store on board at the start [J].
        keep : array_like, optional
            Store to stop at [J] (a reserve); the loaded cut-off by default, and whichever
            comes first otherwise.

        Returns
        -------
        Discharge
            Time, store used and the end state.
        """
        p = np.asarray(power, dtype=float)
        energy, used, s_end, cut = self._delivered(p, store, keep)
        with np.errstate(divide="ignore", invalid="ignore"):
            time = np.where(p > 0, energy / p, 0.0)
        r = self.resistance
        u_end = np.interp(s_end, self._fine[0], self._fine[1])
        i_end = _current(p, u_end, r)
        return Discharge(time=time, energy=energy, store_used=used, soc_end=s_end,
                         voltage_end=u_end - i_end * r, current_end=i_end, cut_off=cut)

    def _delivered(self, p, store, keep):
        """Terminal energy [J], store used [J], end state [-] and whether it is the cut-off."""
        s, u_f, e_f, _, _, floor, e_floor = self._fine
        q, r = self.capacity, self.resistance
        store = np.asarray(store, dtype=float)
        s0 = self.soc_of_store(store)
        v_end = self.cutoff if self.max_current is None else np.maximum(
            self.cutoff, p / self.max_current)
        # The loaded cut-off: U(s) = V_end + R P / V_end (there V = V_end, I = P / V_end).
        s_cut = np.interp(v_end + r * p / v_end, u_f, s)
        if keep is None:
            s_end, cut = s_cut, True
        else:
            s_end = np.maximum(s_cut, self.soc_of_store(keep))
            cut = s_end <= s_cut
        s_end = np.minimum(s_end, s0)
        # Store used: written from the store itself, so that without resistance, sag or
        # limit (s_end at the floor) it is the store exactly, bit for bit.
        used = store + q * (e_floor - np.interp(s_end, s, e_f))
        if np.all(r == 0):
            return np.maximum(used, 0.0), used, s_end, cut
        # Heat in the resistance, R Q int I ds, by Gauss-Legendre; between the start and
        # the loaded cut-off U^2 >= 4 R P, so the working root needs no clipping there.
        half = 0.5 * (s0 - s_end)
        mid = 0.5 * (s0 + s_end)
        four_rp = 4.0 * r * p
        acc = 0.0
        for x, w in zip(_GAUSS_X, _GAUSS_W):
            u = np.interp(mid + half * x, s, u_f)
            acc = acc + w / (u + np.sqrt(np.maximum(u * u - four_rp, 0.0)))
        loss = (2.0 * r * q) * half * p * acc
        return np.maximum(used - loss, 0.0), used, s_end, cut

    def mean_rate(self, power, store=None):
        """Rate the store is used over a discharge to the loaded cut-off [W].

        Store over the time a constant-power discharge from ``store`` to the loaded
        cut-off lasts, so that endurance is store / rate: the energy that cut-off leaves
        in the pack at this power, and the heat in the resistance, raise the rate as
        Peukert's law does.

        Parameters
        ----------
        power : array_like
            Battery power [W], > 0.
        store : array_like, optional
            Store on board [J]; a full pack by default.

        Returns
        -------
        numpy.ndarray
            Rate [W]: exactly ``power`` without resistance, sag or limit; ``power`` /
            :data:`MIN_SHARE` where the pack cannot give the power at all (it is flagged).
        """
        store = self.store_capacity if store is None else store
        p = np.asarray(power, dtype=float)
        energy = self._delivered(p, store, None)[0]
        # rate = store / t written as P / (P t / store), which is P itself when the
        # terminal energy P t is the store. Where the pack cannot start the discharge (it
        # is flagged) the share is floored, not zero: the rate then still rises with the
        # power, so that searches over speed see no flat plateau there.
        with np.errstate(divide="ignore", invalid="ignore"):
            share = np.where(store > 0, energy / store, 1.0)
        return p / np.maximum(share, MIN_SHARE)


def _current(power, u, r):
    """Working root of R I^2 - U I + P = 0 [A], clipped at the maximum-power current."""
    p = np.asarray(power)
    disc = u * u - 4.0 * r * p
    beyond = disc < 0
    if np.any(beyond):
        # Beyond U^2/(4R) (only with R > 0): the current of the maximum power, U/(2R).
        with np.errstate(divide="ignore", invalid="ignore"):
            p = np.where(beyond, u * u / (4.0 * r), p)
        disc = np.maximum(disc, 0.0)
    return 2.0 * p / (u + np.sqrt(disc))


def _monotone_cubic(x, y, s):
    """The Fritsch-Carlson monotone cubic through (x, y), at ``s`` in [x0, x-1]."""
    d = monotone_slopes(x, y)
    k = np.clip(np.searchsorted(x, s, side="right") - 1, 0, x.size - 2)
    h = x[k + 1] - x[k]
    t = (s - x[k]) / h
    h00, h10 = (1 + 2 * t) * (1 - t) ** 2, t * (1 - t) ** 2
    h01, h11 = t * t * (3 - 2 * t), t * t * (t - 1)
    return h00 * y[k] + h10 * h * d[k] + h01 * y[k + 1] + h11 * h * d[k + 1]

