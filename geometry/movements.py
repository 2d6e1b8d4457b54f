"""Movements through a junction, and the corners between its legs.

A movement arrives along one leg (travelling toward the junction, so its arrival heading is the
leg's heading + pi) and departs along another. Its turn is ``wrap(departure - arrival)`` in
(-pi, pi], positive to the left.

Which ordered pairs of distinct legs are movements:

* a pair turning less than 1 degree is a ``"straight"`` movement (no arc): on a four-way crossing
  the 12 ordered pairs are 4 straight movements and 8 turns;
* a pair turning within 1 degree of 180 degrees is a reversal (two legs leaving side by side):
  no single arc through the junction can make it, so it is not a movement (a reversal between
  two parallel taxiways is a crossover, see geometry.special_cases);
* a pair of two runway legs is not a taxi movement: a runway-runway junction has no movements.

Corners: going counter-clockwise round the junction, two neighbouring legs bound a *corner* when
the angle from the first to the second is less than 180 degrees (less 1 degree); that sector is
the inside of the turns between them and is where a fillet goes. Corner keys are
``"<junction id>|<leg>~<leg>"`` with the two legs' ends (``"twy-1+"``) in sorted order.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from itertools import pairwise
from typing import Literal

from geometry.centerline import wrap_angle
from geometry.errors import NetworkError
from geometry.network import Junction, Leg

STRAIGHT_TOLERANCE_RAD = math.radians(1.0)   # a turn smaller than this is straight on
REVERSAL_TOLERANCE_RAD = math.radians(1.0)   # a turn this close to 180 degrees is a reversal
TWO_PI = 2.0 * math.pi

MovementKind = Literal["turn", "straight"]


@dataclass(frozen=True, slots=True)
class Movement:
    """Arrive along ``from_leg``, depart along ``to_leg``; ``turn_rad`` signed, + left."""

    key: str
    junction_id: str
    from_leg: Leg
    to_leg: Leg
    turn_rad: float
    kind: MovementKind

    @property
    def arrival_heading_rad(self) -> float:
        return wrap_angle(self.from_leg.heading_rad + math.pi)

    @property
    def departure_heading_rad(self) -> float:
        return self.to_leg.heading_rad


@dataclass(frozen=True, slots=True)
class Corner:
    """The sector from ``first_leg`` counter-clockwise to ``second_leg`` (angle < pi)."""

    key: str
    junction_id: str
    first_leg: Leg
    second_leg: Leg
    angle_rad: float


@dataclass(frozen=True, slots=True)
class TurnCorner:
    """What a turn sweeps over on its inside: the legs bounding and crossing that sector in
    counter-clockwise order, the legs strictly inside it, and the corners it spans."""

    movement_key: str
    legs: tuple[Leg, ...]
    inner_legs: tuple[Leg, ...]
    corner_keys: tuple[str, ...]
    angle_rad: float


def _leg_end(junction: Junction, leg: Leg) -> str:
    return leg.id.removeprefix(f"{junction.id}|")


def _own_leg(junction: Junction, leg: Leg) -> Leg:
    if leg not in junction.legs:
        raise NetworkError(f"leg {leg.id} does not belong to junction {junction.id}")
    return leg


def movement_between(junction: Junction, from_leg: Leg, to_leg: Leg) -> Movement | None:
    """The movement from ``from_leg`` to ``to_leg``, or None when that pair is not a movement."""
    _own_leg(junction, from_leg)
    _own_leg(junction, to_leg)
    if from_leg == to_leg or (from_leg.line_kind == "runway" and to_leg.line_kind == "runway"):
        return None
    turn = wrap_angle(to_leg.heading_rad - (from_leg.heading_rad + math.pi))
    if abs(turn) >= math.pi - REVERSAL_TOLERANCE_RAD:
        return None
    kind: MovementKind = "straight" if abs(turn) < STRAIGHT_TOLERANCE_RAD else "turn"
    return Movement(f"{from_leg.id}>{to_leg.id}", junction.id, from_leg, to_leg, turn, kind)


def junction_movements(junction: Junction) -> tuple[Movement, ...]:
    """Every movement of ``junction``, in the order of its legs (from, then to)."""
    found = (movement_between(junction, a, b) for a in junction.legs for b in junction.legs if a != b)
    return tuple(movement for movement in found if movement is not None)


def paths_from_approach(junction: Junction, leg: Leg) -> int:
    """How many movements (turns and straight on) an aircraft arriving along ``leg`` can choose."""
    _own_leg(junction, leg)
    return sum(1 for other in junction.legs
               if other != leg and movement_between(junction, leg, other) is not None)


def _counter_clockwise(junction: Junction) -> list[Leg]:
    return sorted(junction.legs, key=lambda leg: (leg.heading_rad % TWO_PI, leg.id))


def _sector_rad(first: Leg, second: Leg) -> float:
    """Angle from ``first`` counter-clockwise to ``second``, in [0, 2 pi)."""
    return (second.heading_rad - first.heading_rad) % TWO_PI


def junction_corners(junction: Junction) -> tuple[Corner, ...]:
    """The corners of ``junction``: neighbouring legs less than 180 degrees apart."""
    ordered = _counter_clockwise(junction)
    corners = []
    for index, first in enumerate(ordered):
        second = ordered[(index + 1) % len(ordered)]
        angle = _sector_rad(first, second)
        if len(ordered) > 1 and 0.0 < angle < math.pi - STRAIGHT_TOLERANCE_RAD:
            corners.append(Corner(_corner_key(junction, first, second), junction.id, first, second, angle))
    return tuple(corners)


def _corner_key(junction: Junction, leg_a: Leg, leg_b: Leg) -> str:
    first, second = sorted((_leg_end(junction, leg_a), _leg_end(junction, leg_b)))
    return f"{junction.id}|{first}~{second}"


def corner_key(junction: Junction, leg_a: Leg, leg_b: Leg) -> str:
    """Key of the corner between two neighbouring legs, in either order.

    Raises
    ------
    NetworkError : a leg is not the junction's, or the legs do not bound a corner.
    """
    for corner in junction_corners(junction):
        if {corner.first_leg, corner.second_leg} == {_own_leg(junction, leg_a), _own_leg(junction, leg_b)}:
            return corner.key
    raise NetworkError(f"legs {leg_a.id} and {leg_b.id} do not bound a corner of junction "
                       f"{junction.id}: they are not neighbours less than 180 degrees apart")


def corner_of(movement: Movement, junction: Junction) -> TurnCorner:
    """The sector on the inside of a turn: from the departure leg counter-clockwise to the
    arrival leg for a left turn, the other way round for a right turn.

    Raises
    ------
    NetworkError : the movement is straight on, or belongs to another junction.
    """
    if movement.junction_id != junction.id:
        raise NetworkError(f"movement {movement.key} does not belong to junction {junction.id}")
    if movement.kind != "turn":
        raise NetworkError(f"movement {movement.key} goes straight on: it sweeps no corner")
    first, last = ((movement.to_leg, movement.from_leg) if movement.turn_rad > 0.0
                   else (movement.from_leg, movement.to_leg))
    angle = _sector_rad(first, last)
    inner = tuple(sorted((leg for leg in junction.legs
                          if leg not in (first, last) and 0.0 < _sector_rad(first, leg) < angle),
                         key=lambda leg: _sector_rad(first, leg)))
    bounding = (first, *inner, last)
    keys = tuple(_corner_key(junction, a, b) for a, b in pairwise(bounding))
    return TurnCorner(movement.key, bounding, inner, keys, angle)
