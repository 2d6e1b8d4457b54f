"""Swept turns remembered by what they are computed from, so a junction whose other legs moved
does not sweep its unchanged turns again.

A turn's swept paths and required pavement depend only on the junction point, the two legs' headings,
lengths and first straights, the centerline radius, the fleet and the rule set (the edge margin);
:func:`turn_key` is that tuple, and a turn with an equal key has equal results. A drag that moves
one vertex changes one leg of each neighbouring junction: the turns between their other legs are
answered from here. The memory keeps the most recent :data:`TURNS_KEPT` turns (a swept path holds
a few tens of kilobytes of arrays).
"""

from __future__ import annotations

from collections.abc import Hashable
from typing import Generic, TypeVar

from geometry.aircraft import DesignAircraft
from geometry.movements import Movement
from geometry.network import Junction

TURNS_KEPT = 256

Value = TypeVar("Value")


def turn_key(movement: Movement, junction: Junction, radius_m: float, fleet: tuple[DesignAircraft, ...],
             rule_set_name: str) -> Hashable:
    """Everything a swept turn and its required pavement are computed from."""
    legs = tuple((leg.heading_rad, leg.length_m, leg.straight_length_m)
                 for leg in (movement.from_leg, movement.to_leg))
    return (junction.point, legs, movement.turn_rad, movement.kind, radius_m, fleet, rule_set_name)


class TurnMemory(Generic[Value]):
    """The last :data:`TURNS_KEPT` values stored, by key; a value read is kept as if stored again."""

    def __init__(self, kept: int = TURNS_KEPT) -> None:
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
