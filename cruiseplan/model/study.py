"""A study: one base mission or airframe, the axes it is swept over, and what to record.

A study is data, read from a study file by :func:`cruiseplan.io.study_file.read_study` and
run by :func:`cruiseplan.studies.run_study`. Its points are every combination of its axes'
values (an outer product); each point is planned exactly as one ``cruiseplan plan`` (or
``best``) with those values would be.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Axes of a mission study, with the unit their coordinate is held in.
MISSION_AXES = {
    "isa_dev": "K", "oat": "K", "payload": "kg", "fuel": None,
    "wind_speed": "m/s", "wind_direction": "deg", "departure": "s",
}
#: Axes a forecast replaces (it gives the winds and the day's temperature).
FORECAST_REPLACES = ("isa_dev", "oat", "wind_speed", "wind_direction")
#: Axes of an airframe (best cruise) study.
AIRFRAME_AXES = {"isa_dev": "K", "payload": "kg", "fuel": None, "headwind": "m/s"}
#: Prefix of an axis that replaces a field of the airframe file (``airframe.polar.cd0``).
AIRFRAME_FIELD = "airframe."

#: What a mission study can record at each point, with units (None: the store's unit,
#: kg of fuel or J of usable energy) and whether it runs along the mission's legs.
MISSION_RECORDS = {
    "verdict": ("1", False), "used": (None, False), "remaining": (None, False),
    "reserve_required": (None, False), "reserve_margin": (None, False), "time": ("s", False),
    "leg_altitude": ("m", True), "leg_tas": ("m/s", True), "reserve_probability": ("1", False),
}
#: What an airframe (best cruise) study can record at each point.
AIRFRAME_RECORDS = {
    "verdict": ("1", False), "best_altitude": ("m", False), "best_tas": ("m/s", False),
    "best_value": (None, False), "range": ("m", False), "endurance": ("s", False),
}
#: Verdict codes stored at each point. NOT_RUN marks a point whose chunk is not done yet.
GO, NO_GO, BAD_INPUT, NOT_RUN = 1, 0, 2, -1
VERDICT_MEANINGS = {NOT_RUN: "not-run", NO_GO: "NO-GO", GO: "GO",
                    BAD_INPUT: "not-planned:bad-input"}


@dataclass(frozen=True)
class Axis:
    """One axis of a study.

    Parameters
    ----------
    name : str
        ``"isa_dev"``, ``"payload"``, ..., or ``"airframe.TABLE.FIELD"``.
    values : tuple of float
        The coordinate values, in ``unit`` (``departure``: seconds since
        1970-01-01T00:00Z).
    unit : str
        Unit of ``values``: SI for the physical axes; as written in the study file for
        ``fuel`` (``"%"``, or kg / J after conversion) and airframe fields (``"1"`` for a
        bare number).
    """

    name: str
    values: tuple
    unit: str

    def __len__(self) -> int:
        return len(self.values)

    @property
    def dim(self) -> str:
        """Its dimension name in a Dataset (dots are not valid in every store)."""
        return self.name.replace(".", "__")


@dataclass(frozen=True)
class Study:
    """A sweep over axes of one base mission (``plan``) or airframe (``best``).

    Parameters
    ----------
    name : str
        The study's name.
    description : str
        One line about it.
    kind : {"mission", "airframe"}
        What each point runs: a mission plan, or a best-cruise search.
    base : str
        Path of the mission or airframe file.
    axes : tuple of Axis
        The axes, in the file's order (the Dataset's dimension order).
    records : tuple of str
        What is recorded at each point (keys of :data:`MISSION_RECORDS` or
        :data:`AIRFRAME_RECORDS`).
    chunk : int
        Points per chunk [-]: the unit of work, of progress and of ``--resume``.
    monte_carlo : int
        Monte Carlo samples per point for ``reserve_probability`` [-] (0: none).
    seed : int
        Seed of the Monte Carlo [-].
    altitudes : tuple of float
        Candidate pressure altitudes of an airframe study [m].
    objective : str
        Best-cruise objective of an airframe study.
    forecast : str or None
        Path of a gridded forecast file (a ``departure`` axis needs one): each point is then
        planned with :func:`cruiseplan.planning.forecast.plan_with_forecast`.
    source : str
        The study file.
    checksum : str
        SHA-256 of the study file (a store made from another study is not resumed).
    """

    name: str
    description: str
    kind: str
    base: str
    axes: tuple
    records: tuple
    chunk: int = 16
    monte_carlo: int = 0
    seed: int = 0
    altitudes: tuple = ()
    objective: str = "range"
    forecast: str | None = None
    source: str = ""
    checksum: str = ""

    @property
    def shape(self) -> tuple:
        """Points along each axis [-]."""
        return tuple(len(a) for a in self.axes)

    @property
    def size(self) -> int:
        """Number of points [-]."""
        return math.prod(self.shape)

    def block_shape(self) -> tuple:
        """Shape of one chunk: the last axes whole as far as ``chunk`` points allow.

        Returns
        -------
        tuple of int
            Points per chunk along each axis [-].
        """
        block, room = [], max(1, self.chunk)
        for n in reversed(self.shape):
            take = max(1, min(n, room))
            block.append(take)
            room = max(1, room // take)
        return tuple(reversed(block))

    def blocks(self) -> tuple:
        """Chunks along each axis [-] (ceiling of shape over block shape)."""
        return tuple(-(-n // b) for n, b in zip(self.shape, self.block_shape()))

    def block_slices(self, index) -> tuple:
        """The index slices of chunk ``index`` (a tuple, one entry per axis).

        Parameters
        ----------
        index : tuple of int
            The chunk's position along each axis [-].

        Returns
        -------
        tuple of slice
        """
        return tuple(slice(i * b, min((i + 1) * b, n))
                     for i, b, n in zip(index, self.block_shape(), self.shape))

    def all_blocks(self) -> list:
        """Every chunk's index, in C order."""
        return [tuple(int(i) for i in ix) for ix in np.ndindex(*self.blocks())]

    def point(self, index) -> dict:
        """The axis values of point ``index``, by axis name.

        Parameters
        ----------
        index : tuple of int
            Position along each axis [-].

        Returns
        -------
        dict
            Axis name to value [the axis's unit].
        """
        return {a.name: a.values[i] for a, i in zip(self.axes, index)}
