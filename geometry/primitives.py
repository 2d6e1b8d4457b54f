"""Exact centerline pieces: straights and circular arcs.

Both are frozen values described by their start point, start heading and length (plus radius
and signed turn for an arc). A positive ``turn_rad`` is a left (counter-clockwise) arc. They
evaluate points, headings and curvature exactly; flattening happens only where a caller
asks for samples.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from geometry.errors import InvalidPathError, NonFiniteInputError

FloatArray = npt.NDArray[np.float64]
Point = tuple[float, float]


def _require_finite(**values: float) -> None:
    for name, value in values.items():
        if not math.isfinite(value):
            raise NonFiniteInputError(f"{name} must be a finite number, got {value!r}")


@dataclass(frozen=True, slots=True)
class Straight:
    """A straight centerline piece from ``start`` along ``heading_rad`` for ``length_m``."""

    start: Point
    heading_rad: float
    length_m: float

    def __post_init__(self) -> None:
        _require_finite(x=self.start[0], y=self.start[1], heading_rad=self.heading_rad,
                        length_m=self.length_m)
        if self.length_m <= 0.0:
            raise InvalidPathError(f"a straight must have a positive length, got {self.length_m} m")

    @property
    def end(self) -> Point:
        return (self.start[0] + self.length_m * math.cos(self.heading_rad),
                self.start[1] + self.length_m * math.sin(self.heading_rad))

    @property
    def end_heading_rad(self) -> float:
        return self.heading_rad

    @property
    def curvature_per_m(self) -> float:
        return 0.0

    def points_at(self, s_m: FloatArray) -> FloatArray:
        """Points at distances ``s_m`` (0..length) from the start, shape (n, 2)."""
        s = np.asarray(s_m, dtype=float)
        return np.column_stack((self.start[0] + s * math.cos(self.heading_rad),
                                self.start[1] + s * math.sin(self.heading_rad)))

    def headings_at(self, s_m: FloatArray) -> FloatArray:
        return np.full(np.shape(s_m), self.heading_rad, dtype=float)


@dataclass(frozen=True, slots=True)
class Arc:
    """A circular arc from ``start`` with tangent ``start_heading_rad``.

    ``turn_rad`` is the signed change of heading: positive turns left (counter-clockwise).
    """

    start: Point
    start_heading_rad: float
    radius_m: float
    turn_rad: float

    def __post_init__(self) -> None:
        _require_finite(x=self.start[0], y=self.start[1], start_heading_rad=self.start_heading_rad,
                        radius_m=self.radius_m, turn_rad=self.turn_rad)
        if self.radius_m <= 0.0:
            raise InvalidPathError(f"an arc radius must be positive, got {self.radius_m} m")
        if self.turn_rad == 0.0:
            raise InvalidPathError("an arc must turn through a non-zero angle")

    @property
    def side(self) -> float:
        """+1.0 for a left arc, -1.0 for a right arc."""
        return 1.0 if self.turn_rad > 0.0 else -1.0

    @property
    def center(self) -> Point:
        normal = self.start_heading_rad + self.side * math.pi / 2.0
        return (self.start[0] + self.radius_m * math.cos(normal),
                self.start[1] + self.radius_m * math.sin(normal))

    @property
    def length_m(self) -> float:
        return self.radius_m * abs(self.turn_rad)

    @property
    def curvature_per_m(self) -> float:
        return self.side / self.radius_m

    @property
    def end_heading_rad(self) -> float:
        return self.start_heading_rad + self.turn_rad

    @property
    def end(self) -> Point:
        # points_at(length) for one point, without building arrays; numpy's cos and sin, as in
        # points_at, so the end point is the very value points_at gives.
        cx, cy = self.center
        polar = self.start_heading_rad + self.length_m * self.curvature_per_m - self.side * math.pi / 2.0
        return (float(cx + self.radius_m * np.cos(polar)), float(cy + self.radius_m * np.sin(polar)))

    def headings_at(self, s_m: FloatArray) -> FloatArray:
        return self.start_heading_rad + np.asarray(s_m, dtype=float) * self.curvature_per_m

    def points_at(self, s_m: FloatArray) -> FloatArray:
        """Points at arc lengths ``s_m`` from the start, shape (n, 2)."""
        cx, cy = self.center
        # The radius vector from the centre points to the right of the heading for a left arc.
        polar = self.headings_at(s_m) - self.side * math.pi / 2.0
        return np.column_stack((cx + self.radius_m * np.cos(polar),
                                cy + self.radius_m * np.sin(polar)))


Segment = Straight | Arc
