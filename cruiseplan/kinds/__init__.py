"""Airframe kinds as siblings behind one protocol; a kind is one registry entry.

To add a kind, write a frozen dataclass that extends
:class:`~cruiseplan.kinds.base.AirframeBase` and meets
:class:`~cruiseplan.kinds.base.Airframe`, and add it to :data:`KINDS`; its file sections
are read by the entry of the same name in :data:`cruiseplan.io.airframe_file.KIND_READERS`.
"""

from cruiseplan.kinds.base import Airframe, AirframeBase, LevelFlight, Loading, RotorState
from cruiseplan.kinds.fixed_wing import FixedWing
from cruiseplan.kinds.multirotor import Multirotor

#: Airframe kinds by the name used in airframe files.
KINDS = {cls.kind: cls for cls in (FixedWing, Multirotor)}

__all__ = ["KINDS", "Airframe", "AirframeBase", "FixedWing", "LevelFlight", "Loading",
           "Multirotor", "RotorState"]
