"""Checks of single input values shared by the engine's modules (one message, one place)."""

from __future__ import annotations

import math

from geometry.errors import GeometryError, NonFiniteInputError


def checked_length_m(name: str, value_m: float, *, allow_zero: bool = False,
                     error: type[GeometryError] = GeometryError) -> float:
    """``value_m`` as a float if it is a finite length (positive, or zero when allowed); else the
    planner reads which length is wrong and why (``error`` for a negative or zero value)."""
    if not math.isfinite(value_m):
        raise NonFiniteInputError(f"{name} must be a finite number of metres, got {value_m!r}")
    if value_m < 0.0 or (value_m == 0.0 and not allow_zero):
        raise error(f"{name} must be {'zero or more' if allow_zero else 'positive'}, got {value_m} m")
    return float(value_m)
