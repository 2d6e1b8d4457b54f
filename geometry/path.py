"""Centerline paths: a tangent-continuous sequence of straights and arcs, followed by the cockpit."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from geometry.errors import InvalidPathError
from geometry.primitives import Arc, FloatArray, Point, Segment, Straight

JOIN_TOLERANCE_M = 1e-6
HEADING_TOLERANCE_RAD = 1e-6


def _wrap_angle(angle_rad: float) -> float:
    """Angle wrapped into (-pi, pi]."""
    wrapped = math.remainder(angle_rad, 2.0 * math.pi)
    return math.pi if wrapped == -math.pi else wrapped


@dataclass(frozen=True, slots=True)
class CenterlinePath:
    """Straights and arcs joined end to start with continuous heading."""

    segments: tuple[Segment, ...]

    def __post_init__(self) -> None:
        if not self.segments:
            raise InvalidPathError("a centerline path needs at least one segment")
        for index, (before, after) in enumerate(zip(self.segments, self.segments[1:]), start=1):
            gap = math.dist(before.end, after.start)
            if gap > JOIN_TOLERANCE_M:
                raise InvalidPathError(f"segment {index} does not start where segment {index - 1} "
                                       f"ends (gap {gap:.6g} m)")
            start_heading = after.heading_rad if isinstance(after, Straight) else after.start_heading_rad
            kink = _wrap_angle(start_heading - before.end_heading_rad)
            if abs(kink) > HEADING_TOLERANCE_RAD:
                raise InvalidPathError(f"segment {index} is not tangent to segment {index - 1} "
                                       f"(kink of {math.degrees(kink):.4g} degrees)")

    @property
    def length_m(self) -> float:
        return float(sum(segment.length_m for segment in self.segments))

    @property
    def start(self) -> Point:
        return self.segments[0].start

    @property
    def end(self) -> Point:
        return self.segments[-1].end

    def segment_starts_m(self) -> FloatArray:
        """Distance along the path at which each segment starts."""
        lengths = np.array([segment.length_m for segment in self.segments])
        return np.concatenate(([0.0], np.cumsum(lengths)[:-1]))

    def evaluate(self, s_m: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        """Points (n, 2), headings (n,) and curvatures (n,) at path distances ``s_m``.

        Distances outside ``[0, length]`` are clamped to the ends.
        """
        s = np.clip(np.asarray(s_m, dtype=float), 0.0, self.length_m)
        starts = self.segment_starts_m()
        which = np.clip(np.searchsorted(starts, s, side="right") - 1, 0, len(self.segments) - 1)
        points = np.empty((s.size, 2))
        headings = np.empty(s.size)
        curvatures = np.empty(s.size)
        for index, segment in enumerate(self.segments):
            mask = which == index
            if not mask.any():
                continue
            local = np.minimum(s[mask] - starts[index], segment.length_m)
            points[mask] = segment.points_at(local)
            headings[mask] = segment.headings_at(local)
            curvatures[mask] = segment.curvature_per_m
        return points, headings, curvatures


def standard_turn_path(radius_m: float, turn_rad: float, lead_in_m: float, lead_out_m: float,
                       start: Point = (0.0, 0.0), heading_rad: float = 0.0) -> CenterlinePath:
    """Lead-in straight, an arc turning ``turn_rad`` (positive = left), and a lead-out straight."""
    lead_in = Straight(start, heading_rad, lead_in_m)
    arc = Arc(lead_in.end, heading_rad, radius_m, turn_rad)
    lead_out = Straight(arc.end, arc.end_heading_rad, lead_out_m)
    return CenterlinePath((lead_in, arc, lead_out))
