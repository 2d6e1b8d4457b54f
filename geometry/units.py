"""Length units and conversions. Internally everything is in metres and radians."""

from __future__ import annotations

import math
from typing import Literal

LengthUnit = Literal["ft", "m"]
LENGTH_UNITS: tuple[LengthUnit, ...] = ("ft", "m")

METRES_PER_FOOT = 0.3048  # exact by definition (international foot, 1959)


def check_unit(unit: str) -> LengthUnit:
    """Return ``unit`` if it is a known length unit, else raise ``ValueError``."""
    if unit == "ft":
        return "ft"
    if unit == "m":
        return "m"
    raise ValueError(f"unknown length unit {unit!r}: use 'ft' or 'm'")


def to_metres(value: float, unit: str) -> float:
    """Convert ``value`` given in ``unit`` to metres."""
    return value * METRES_PER_FOOT if check_unit(unit) == "ft" else float(value)


def from_metres(value_m: float, unit: str) -> float:
    """Convert ``value_m`` (metres) to ``unit``."""
    return value_m / METRES_PER_FOOT if check_unit(unit) == "ft" else float(value_m)


def deg(angle_rad: float) -> float:
    return math.degrees(angle_rad)


def rad(angle_deg: float) -> float:
    return math.radians(angle_deg)
