"""Centerline paths: a tangent-continuous sequence of straights and arcs, followed by the cockpit.

A path keeps its segments' parameters as arrays (:class:`SegmentArrays`, built once with the path)
so that evaluating stations or measuring offsets costs a fixed number of numpy operations, not a
Python loop over segments for every call.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from itertools import pairwise

import numpy as np
import numpy.typing as npt

from geometry.errors import InvalidPathError
from geometry.primitives import Arc, FloatArray, Point, Segment, Straight

JOIN_TOLERANCE_M = 1e-6
HEADING_TOLERANCE_RAD = 1e-6


def _wrap_angle(angle_rad: float) -> float:
    """Angle wrapped into (-pi, pi]."""
    wrapped = math.remainder(angle_rad, 2.0 * math.pi)
    return math.pi if wrapped == -math.pi else wrapped


@dataclass(frozen=True, slots=True, eq=False)
class SegmentArrays:
    """Every segment's parameters, one array entry per segment, in path order (read-only arrays).

    For a straight, ``center_*`` and ``radius_m`` are 0, ``side`` is +1 and ``turn_abs_rad`` is 0;
    its heading is ``start_heading_rad`` throughout. ``start_cos``/``start_sin`` are the cosine and
    sine of ``start_heading_rad`` (the same for ``end_*``), computed once.
    """

    starts_m: FloatArray
    lengths_m: FloatArray
    is_arc: npt.NDArray[np.bool_]
    start_x: FloatArray
    start_y: FloatArray
    start_heading_rad: FloatArray
    start_cos: FloatArray
    start_sin: FloatArray
    curvature_per_m: FloatArray
    center_x: FloatArray
    center_y: FloatArray
    radius_m: FloatArray
    side: FloatArray
    turn_abs_rad: FloatArray
    end_x: FloatArray
    end_y: FloatArray
    end_cos: FloatArray
    end_sin: FloatArray


def _segment_arrays(segments: tuple[Segment, ...]) -> SegmentArrays:
    # One (segments x 16) matrix, read-only; every field but the first two is a column view of it.
    matrix = np.array([_segment_row(segment) for segment in segments], dtype=float)
    matrix.flags.writeable = False
    starts = np.concatenate(([0.0], np.cumsum(matrix[:, 0])[:-1]))
    is_arc = np.array([isinstance(segment, Arc) for segment in segments])
    starts.flags.writeable = is_arc.flags.writeable = False
    return SegmentArrays(starts, matrix[:, 0], is_arc, *matrix[:, 1:].T)


def _segment_row(segment: Segment) -> tuple[float, ...]:
    """length, start x, y, heading, cos, sin, curvature, centre x, y, radius, side, |turn|, end x, y,
    end cos, sin: the scalars are those the segment's own methods use, so results agree exactly."""
    end_x, end_y = segment.end
    if isinstance(segment, Straight):
        cos_h, sin_h = math.cos(segment.heading_rad), math.sin(segment.heading_rad)
        return (segment.length_m, *segment.start, segment.heading_rad, cos_h, sin_h, 0.0, 0.0, 0.0, 0.0,
                1.0, 0.0, end_x, end_y, cos_h, sin_h)
    heading, end_heading = segment.start_heading_rad, segment.end_heading_rad
    return (segment.length_m, *segment.start, heading, math.cos(heading), math.sin(heading),
            segment.curvature_per_m, *segment.center, segment.radius_m, segment.side, abs(segment.turn_rad),
            end_x, end_y, math.cos(end_heading), math.sin(end_heading))


@dataclass(frozen=True, slots=True)
class CenterlinePath:
    """Straights and arcs joined end to start with continuous heading."""

    segments: tuple[Segment, ...]
    # Derived from ``segments`` (not compared, not part of the constructor): the length at once,
    # the arrays on first use (many paths are built and never evaluated).
    length_m: float = field(init=False, repr=False, compare=False)
    _arrays: list[SegmentArrays] = field(init=False, repr=False, compare=False, default_factory=list)

    def __post_init__(self) -> None:
        if not self.segments:
            raise InvalidPathError("a centerline path needs at least one segment")
        for index, (before, after) in enumerate(pairwise(self.segments), start=1):
            gap = math.dist(before.end, after.start)
            if gap > JOIN_TOLERANCE_M:
                raise InvalidPathError(f"segment {index} does not start where segment {index - 1} "
                                       f"ends (gap {gap:.6g} m)")
            start_heading = after.heading_rad if isinstance(after, Straight) else after.start_heading_rad
            kink = _wrap_angle(start_heading - before.end_heading_rad)
            if abs(kink) > HEADING_TOLERANCE_RAD:
                raise InvalidPathError(f"segment {index} is not tangent to segment {index - 1} "
                                       f"(kink of {math.degrees(kink):.4g} degrees)")
        object.__setattr__(self, "length_m", float(sum(segment.length_m for segment in self.segments)))

    @property
    def arrays(self) -> SegmentArrays:
        """Every segment's parameters as read-only arrays (built once, on first use)."""
        if not self._arrays:
            self._arrays.append(_segment_arrays(self.segments))
        return self._arrays[0]

    @property
    def start(self) -> Point:
        return self.segments[0].start

    @property
    def end(self) -> Point:
        return self.segments[-1].end

    def segment_starts_m(self) -> FloatArray:
        """Distance along the path at which each segment starts (a new, writable array)."""
        return self.arrays.starts_m.copy()

    def evaluate(self, s_m: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        """Points (n, 2), headings (n,) and curvatures (n,) at path distances ``s_m``.

        Distances outside ``[0, length]`` are clamped to the ends. A distance at a segment's start
        belongs to that segment. Sorted distances (the usual case: stations along the path) are
        evaluated segment by segment on slices; any other order through a mask per segment.
        """
        s = np.minimum(np.maximum(np.asarray(s_m, dtype=float).ravel(), 0.0), self.length_m)
        points = np.empty((s.size, 2))
        headings = np.empty(s.size)
        curvatures = np.empty(s.size)
        table = self.arrays
        if s.size < 2 or bool(np.all(s[1:] >= s[:-1])):
            bounds = [0, *np.searchsorted(s, table.starts_m[1:], side="left").tolist(), s.size]
            for index, (low, high) in enumerate(pairwise(bounds)):
                if high > low:
                    points[low:high, 0], points[low:high, 1], headings[low:high] = _segment_values(
                        table, index, s[low:high])
                    curvatures[low:high] = table.curvature_per_m[index]
            return points, headings, curvatures
        which = np.searchsorted(table.starts_m, s, side="right") - 1
        for index in range(len(self.segments)):
            mask = which == index
            if mask.any():
                points[mask, 0], points[mask, 1], headings[mask] = _segment_values(table, index, s[mask])
                curvatures[mask] = table.curvature_per_m[index]
        return points, headings, curvatures


def _segment_values(table: SegmentArrays, index: int, s_m: FloatArray) -> tuple[FloatArray, FloatArray,
                                                                                  FloatArray]:
    """x, y and heading at path distances ``s_m`` on segment ``index``, by the formulas of
    :meth:`Straight.points_at` and :meth:`Arc.points_at` (so the values agree exactly)."""
    local = np.minimum(s_m - table.starts_m[index], table.lengths_m[index])
    if not table.is_arc[index]:
        heading = float(table.start_heading_rad[index])
        return (table.start_x[index] + local * table.start_cos[index],
                table.start_y[index] + local * table.start_sin[index], np.full(local.shape, heading))
    headings = table.start_heading_rad[index] + local * table.curvature_per_m[index]
    # The radius vector from the centre points to the right of the heading for a left arc.
    polar = headings - table.side[index] * math.pi / 2.0
    radius = table.radius_m[index]
    return (table.center_x[index] + radius * np.cos(polar), table.center_y[index] + radius * np.sin(polar),
            headings)


def standard_turn_path(radius_m: float, turn_rad: float, lead_in_m: float, lead_out_m: float,
                       start: Point = (0.0, 0.0), heading_rad: float = 0.0) -> CenterlinePath:
    """Lead-in straight, an arc turning ``turn_rad`` (positive = left), and a lead-out straight."""
    lead_in = Straight(start, heading_rad, lead_in_m)
    arc = Arc(lead_in.end, heading_rad, radius_m, turn_rad)
    lead_out = Straight(arc.end, arc.end_heading_rad, lead_out_m)
    return CenterlinePath((lead_in, arc, lead_out))
