"""Values remembered by everything they are computed from, so that a junction whose other legs
moved does not compute its unchanged turns and fillets again.

A drag that moves one vertex changes one leg of each neighbouring junction; the turns between its
other legs, and the fillets of the corners those turns alone sweep, have inputs equal to the last
frame's. :func:`turn_key` is everything a swept turn (its paths and required pavement) is computed
from: the junction point, the two legs' headings, lengths and first straights, the centerline
radius, the fleet and the rule set. :func:`corner_key` is everything a fitted fillet is computed
from: the corner's geometry and the required pavement the straights leave uncovered (compared
through their well-known binary form, so equal means bit-identical). Equal keys give equal
results. :class:`RecentValues` keeps the most recently used :data:`VALUES_KEPT` (a swept turn holds
a few tens of kilobytes of arrays).
"""

from __future__ import annotations

from collections.abc import Hashable
from typing import Generic, TypeVar

import numpy as np
import numpy.typing as npt
from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.movements import Movement
from geometry.network import Junction

VALUES_KEPT = 256

Value = TypeVar("Value")


def turn_key(movement: Movement, junction: Junction, radius_m: float, fleet: tuple[DesignAircraft, ...],
             rule_set_name: str) -> Hashable:
    """Everything a swept turn and its required pavement are computed from."""
    legs = tuple((leg.heading_rad, leg.length_m, leg.straight_length_m)
                 for leg in (movement.from_leg, movement.to_leg))
    return (junction.point, legs, movement.turn_rad, movement.kind, radius_m, fleet, rule_set_name)


def corner_key(key: str, corner: tuple[object, ...], required: BaseGeometry,
               uncovered: npt.NDArray[np.object_]) -> Hashable:
    """Everything a corner's fillet is computed from: its key, its geometry (junction point, leg
    headings and widths, turn arc), the corner's required pavement and the parts of it the
    straights leave uncovered."""
    return (key, corner, required.wkb, tuple(part.wkb for part in uncovered))


class RecentValues(Generic[Value]):
    """The last :data:`VALUES_KEPT` values stored, by key; a value read is kept as if stored again."""

    def __init__(self, kept: int = VALUES_KEPT) -> None:
        self._kept = kept
        self._values: dict[Hashable, Value] = {}
        self.hits = 0  # answered from memory since created (tests and benchmarks)

    def get(self, key: Hashable) -> Value | None:
        value = self._values.pop(key, None)
        if value is not None:
            self._values[key] = value
            self.hits += 1
        return value

    def put(self, key: Hashable, value: Value) -> None:
        self._values.pop(key, None)
        self._values[key] = value
        while len(self._values) > self._kept:
            del self._values[next(iter(self._values))]

    def __len__(self) -> int:
        return len(self._values)
