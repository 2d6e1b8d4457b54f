"""Centerline geometry: a sketched polyline becomes exact straights joined by tangent arcs.

A planner sketches a centerline as a polyline. An interior vertex may carry a corner radius;
that corner is then rounded by a true circular arc tangent to both adjacent straights, whose
tangent length (vertex to arc end, along each straight) is ``R * tan(|deflection| / 2)``.
A vertex without a radius (``None`` or ``0``) stays a sharp corner; the radii of the first and
last vertices are ignored (there is no corner there), and so is the radius of a vertex whose
straights are collinear.

Vertices are numbered from 1 in messages, in the order the planner gave them.

This module also holds the exact queries on single segments that the junction finder needs
(closest point, intersections), so that junctions are found on the true arcs, not on chords.
"""

from __future__ import annotations

import math
from bisect import bisect_left, bisect_right
from collections.abc import Sequence
from dataclasses import dataclass
from itertools import pairwise

import numpy as np

from geometry.errors import InvalidPathError, NonFiniteInputError, TurnDoesNotFitError
from geometry.path import HEADING_TOLERANCE_RAD, CenterlinePath
from geometry.primitives import Arc, FloatArray, Point, Segment, Straight

DUPLICATE_VERTEX_TOLERANCE_M = 1e-6   # closer vertices are one vertex (a double click, a snap)
FIT_TOLERANCE_M = 1e-7                # a straight this short between two corners is left out
ZERO_DEFLECTION_RAD = 1e-9            # a vertex turning less than this has no corner
ON_SEGMENT_TOLERANCE_M = 1e-7         # an intersection this far past a segment end still counts
STATION_EPSILON_M = 1e-9              # decides which of two touching segments a station belongs to


def wrap_angle(angle_rad: float) -> float:
    """Angle wrapped into (-pi, pi]."""
    wrapped = math.remainder(angle_rad, 2.0 * math.pi)
    return math.pi if wrapped == -math.pi else wrapped


def start_heading_rad(segment: Segment) -> float:
    """Heading at the start of a straight or an arc."""
    return segment.heading_rad if isinstance(segment, Straight) else segment.start_heading_rad


@dataclass(frozen=True, slots=True)
class _Polyline:
    """Distinct vertices with their corners worked out, before any segment is built."""

    points: tuple[Point, ...]
    labels: tuple[int, ...]            # 1-based vertex numbers as the planner gave them
    radii_m: tuple[float, ...]         # 0.0 where the corner is sharp or absent
    headings_rad: tuple[float, ...]    # one per straight between vertices
    lengths_m: tuple[float, ...]
    deflections_rad: tuple[float, ...]  # one per vertex, 0.0 at both ends
    tangents_m: tuple[float, ...]       # one per vertex, 0.0 where there is no arc


def _distinct_vertices(points_m: Sequence[tuple[float, float]],
                       corner_radii_m: Sequence[float | None]
                       ) -> tuple[list[Point], list[float], list[int]]:
    if len(points_m) != len(corner_radii_m):
        raise InvalidPathError(f"{len(points_m)} vertices but {len(corner_radii_m)} corner radii: "
                               f"give one radius (or None) per vertex")
    points: list[Point] = []
    radii: list[float] = []
    labels: list[int] = []
    for number, ((x, y), radius) in enumerate(zip(points_m, corner_radii_m, strict=True), start=1):
        if not (math.isfinite(x) and math.isfinite(y)):
            raise NonFiniteInputError(f"vertex {number} has a coordinate that is not a finite number")
        if radius is not None and (not math.isfinite(radius) or radius < 0.0):
            raise InvalidPathError(f"the corner radius at vertex {number} must be a positive number "
                                   f"of metres, got {radius!r}")
        if points and math.dist(points[-1], (x, y)) <= DUPLICATE_VERTEX_TOLERANCE_M:
            # A repeated vertex keeps the first radius given, so a double click loses nothing.
            radii[-1] = radii[-1] or float(radius or 0.0)
            continue
        points.append((float(x), float(y)))
        radii.append(float(radius or 0.0))
        labels.append(number)
    if len(points) < 2:
        raise InvalidPathError("a centerline needs at least two distinct vertices")
    return points, radii, labels


def _polyline(points_m: Sequence[tuple[float, float]],
              corner_radii_m: Sequence[float | None]) -> _Polyline:
    points, radii, labels = _distinct_vertices(points_m, corner_radii_m)
    headings = [math.atan2(b[1] - a[1], b[0] - a[0]) for a, b in pairwise(points)]
    lengths = [math.dist(a, b) for a, b in pairwise(points)]
    deflections = [0.0] + [wrap_angle(after - before)
                           for before, after in pairwise(headings)] + [0.0]
    tangents = []
    for index, deflection in enumerate(deflections):
        if abs(deflection) <= ZERO_DEFLECTION_RAD or radii[index] == 0.0:
            radii[index] = 0.0
            tangents.append(0.0)
        else:
            tangents.append(radii[index] * math.tan(abs(deflection) / 2.0))
    polyline = _Polyline(tuple(points), tuple(labels), tuple(radii), tuple(headings),
                         tuple(lengths), tuple(deflections), tuple(tangents))
    _check_corners_fit(polyline)
    return polyline


def _check_corners_fit(polyline: _Polyline) -> None:
    """Raise when the arcs at the two ends of a straight overlap (or run past the line's end)."""
    for index, length in enumerate(polyline.lengths_m):
        before, after = polyline.tangents_m[index], polyline.tangents_m[index + 1]
        if before + after <= length + FIT_TOLERANCE_M:
            continue
        first, second = polyline.labels[index], polyline.labels[index + 1]
        if before > 0.0 and after > 0.0:
            raise TurnDoesNotFitError(
                f"the corner radii at vertices {first} and {second} need {before:.1f} m + {after:.1f} m "
                f"of straight between them, but the vertices are only {length:.1f} m apart: "
                f"reduce a radius or move the vertices apart")
        vertex, radius, needed = ((first, polyline.radii_m[index], before) if before > 0.0
                                  else (second, polyline.radii_m[index + 1], after))
        raise TurnDoesNotFitError(
            f"the {radius:.1f} m corner radius at vertex {vertex} needs {needed:.1f} m of straight on "
            f"each side, but the neighbouring vertex is only {length:.1f} m away: reduce the radius")


def centerline_segments(points_m: Sequence[tuple[float, float]],
                        corner_radii_m: Sequence[float | None]) -> tuple[Segment, ...]:
    """Exact straights and corner arcs of a sketched centerline.

    Parameters
    ----------
    points_m : the vertices (x, y) in metres; consecutive duplicates are dropped.
    corner_radii_m : one entry per vertex: the corner radius, or ``None``/``0`` for a sharp corner.

    Raises
    ------
    TurnDoesNotFitError : a corner's tangent length does not fit its adjacent straights.
    InvalidPathError : fewer than two distinct vertices, a negative radius, mismatched lengths.

    Examples
    --------
    >>> pieces = centerline_segments([(0, 0), (100, 0), (100, 100)], [None, 30.0, None])
    >>> [type(piece).__name__ for piece in pieces]
    ['Straight', 'Arc', 'Straight']
    """
    polyline = _polyline(points_m, corner_radii_m)
    pieces: list[Segment] = []
    cursor = polyline.points[0]
    for index, heading in enumerate(polyline.headings_rad):
        straight_m = (polyline.lengths_m[index] - polyline.tangents_m[index]
                      - polyline.tangents_m[index + 1])
        if straight_m > FIT_TOLERANCE_M:
            pieces.append(Straight(cursor, heading, straight_m))
            cursor = pieces[-1].end
        if polyline.tangents_m[index + 1] > 0.0:
            arc = Arc(cursor, heading, polyline.radii_m[index + 1], polyline.deflections_rad[index + 1])
            pieces.append(arc)
            cursor = arc.end
        else:
            cursor = polyline.points[index + 1]  # sharp corner: restart exactly on the vertex
    return tuple(pieces)


def centerline_path(points_m: Sequence[tuple[float, float]],
                    corner_radii_m: Sequence[float | None]) -> CenterlinePath:
    """The centerline as a path an aircraft can follow: every corner must carry a radius.

    Raises
    ------
    InvalidPathError : a vertex is a sharp corner (no radius) that turns the line.
    """
    polyline = _polyline(points_m, corner_radii_m)
    for label, deflection, tangent in zip(polyline.labels, polyline.deflections_rad,
                                          polyline.tangents_m, strict=True):
        if tangent == 0.0 and abs(deflection) > HEADING_TOLERANCE_RAD:
            raise InvalidPathError(f"vertex {label} is a sharp corner of {math.degrees(abs(deflection)):.1f} "
                                   f"degrees: give it a corner radius so an aircraft can follow it")
    return CenterlinePath(centerline_segments(points_m, corner_radii_m))


def _arc_piece_count(arc: Arc, chord_tolerance_m: float) -> int:
    """Fewest equal chords whose sagitta R (1 - cos(theta / 2)) stays within the tolerance."""
    if chord_tolerance_m >= arc.radius_m:
        max_piece_rad = math.pi / 2.0  # any quarter circle is within tolerance; keep chords sensible
    else:
        max_piece_rad = min(math.pi / 2.0, 2.0 * math.acos(1.0 - chord_tolerance_m / arc.radius_m))
    return max(1, math.ceil(abs(arc.turn_rad) / max_piece_rad - 1e-12))


def flatten(segments: Sequence[Segment], chord_tolerance_m: float) -> FloatArray:
    """Points (n, 2) along the segments, arcs replaced by chords of sagitta <= ``chord_tolerance_m``.

    Straights contribute their end points only; points shared by consecutive segments appear once.
    """
    if not math.isfinite(chord_tolerance_m) or chord_tolerance_m <= 0.0:
        raise InvalidPathError(f"the chord tolerance must be a positive number of metres, "
                               f"got {chord_tolerance_m!r}")
    if not segments:
        raise InvalidPathError("there is nothing to flatten: no segments")
    rows: list[FloatArray] = [np.array([segments[0].start], dtype=float)]
    for segment in segments:
        if isinstance(segment, Straight):
            rows.append(np.array([segment.end], dtype=float))
        else:
            count = _arc_piece_count(segment, chord_tolerance_m)
            rows.append(segment.points_at(np.linspace(0.0, segment.length_m, count + 1)[1:]))
    points = np.vstack(rows)
    steps = np.hypot(*np.diff(points, axis=0).T)
    keep = np.concatenate(([True], steps > 1e-12))
    return points[keep]


def _arc_local_station_m(arc: Arc, point: Point) -> float:
    """Arc length from the arc's start to the radial through ``point``; negative before the start
    (the radial lies nearer the start than the end, going round the missing part of the circle)."""
    cx, cy = arc.center
    polar = math.atan2(point[1] - cy, point[0] - cx)
    start_polar = arc.start_heading_rad - arc.side * math.pi / 2.0
    progress = (arc.side * (polar - start_polar)) % (2.0 * math.pi)
    sweep = abs(arc.turn_rad)
    if progress > sweep + (2.0 * math.pi - sweep) / 2.0:
        progress -= 2.0 * math.pi
    return progress * arc.radius_m


def closest_point_on_segment(segment: Segment, point: Point) -> tuple[float, Point, float]:
    """The point of ``segment`` nearest ``point``: (distance from the segment's start along it,
    that point, the distance to it)."""
    if isinstance(segment, Straight):
        cos_h, sin_h = math.cos(segment.heading_rad), math.sin(segment.heading_rad)
        along = (point[0] - segment.start[0]) * cos_h + (point[1] - segment.start[1]) * sin_h
        station = min(max(along, 0.0), segment.length_m)
    else:
        station = min(max(_arc_local_station_m(segment, point), 0.0), segment.length_m)
    x, y = segment.points_at(np.array([station]))[0]
    nearest = (float(x), float(y))
    return station, nearest, math.dist(nearest, point)


def _station_on(segment: Segment, point: Point) -> float | None:
    """Station of ``point`` (known to lie on the segment's line or circle) if it is on the piece."""
    if isinstance(segment, Straight):
        station = ((point[0] - segment.start[0]) * math.cos(segment.heading_rad)
                   + (point[1] - segment.start[1]) * math.sin(segment.heading_rad))
    else:
        station = _arc_local_station_m(segment, point)
    if -ON_SEGMENT_TOLERANCE_M <= station <= segment.length_m + ON_SEGMENT_TOLERANCE_M:
        return min(max(station, 0.0), segment.length_m)
    return None


def _line_line_points(a: Straight, b: Straight) -> list[Point]:
    ax, ay = math.cos(a.heading_rad), math.sin(a.heading_rad)
    bx, by = math.cos(b.heading_rad), math.sin(b.heading_rad)
    cross = ax * by - ay * bx
    if abs(cross) < 1e-12:
        return []  # parallel: overlaps are found from the line ends, not here
    dx, dy = b.start[0] - a.start[0], b.start[1] - a.start[1]
    along_a = (dx * by - dy * bx) / cross
    return [(a.start[0] + along_a * ax, a.start[1] + along_a * ay)]


def _line_circle_points(line: Straight, arc: Arc) -> list[Point]:
    ux, uy = math.cos(line.heading_rad), math.sin(line.heading_rad)
    cx, cy = arc.center
    px, py = line.start[0] - cx, line.start[1] - cy
    half_b = ux * px + uy * py
    discriminant = half_b * half_b - (px * px + py * py - arc.radius_m ** 2)
    if discriminant < 0.0:
        return []
    root = math.sqrt(discriminant)
    return [(line.start[0] + t * ux, line.start[1] + t * uy) for t in {-half_b - root, -half_b + root}]


def _circle_circle_points(a: Arc, b: Arc) -> list[Point]:
    (ax, ay), (bx, by) = a.center, b.center
    distance = math.hypot(bx - ax, by - ay)
    if (distance < 1e-12 or distance > a.radius_m + b.radius_m
            or distance < abs(a.radius_m - b.radius_m)):
        return []
    along = (a.radius_m ** 2 - b.radius_m ** 2 + distance ** 2) / (2.0 * distance)
    across = math.sqrt(max(a.radius_m ** 2 - along ** 2, 0.0))
    ex, ey = (bx - ax) / distance, (by - ay) / distance
    mx, my = ax + along * ex, ay + along * ey
    return list({(mx - across * ey, my + across * ex), (mx + across * ey, my - across * ex)})


def segment_intersections(a: Segment, b: Segment) -> tuple[tuple[float, float, Point], ...]:
    """Exact points where two segments cross or touch: (station on ``a``, station on ``b``, point).

    Stations are measured from each segment's start. Parallel overlapping straights give none.
    """
    if isinstance(a, Straight) and isinstance(b, Straight):
        candidates = _line_line_points(a, b)
    elif isinstance(a, Straight) and isinstance(b, Arc):
        candidates = _line_circle_points(a, b)
    elif isinstance(a, Arc) and isinstance(b, Straight):
        candidates = _line_circle_points(b, a)
    else:
        assert isinstance(a, Arc) and isinstance(b, Arc)
        candidates = _circle_circle_points(a, b)
    found = []
    for point in sorted(candidates):
        station_a, station_b = _station_on(a, point), _station_on(b, point)
        if station_a is not None and station_b is not None:
            found.append((station_a, station_b, point))
    return tuple(found)


@dataclass(frozen=True, slots=True, eq=False)
class SegmentStations:
    """Distances along a chain of segments (its *stations*), and what lies at a station.

    ``starts_m[k]`` is the station where segment ``k`` starts.
    """

    segments: tuple[Segment, ...]
    starts_m: tuple[float, ...]
    length_m: float

    @classmethod
    def of(cls, segments: Sequence[Segment]) -> SegmentStations:
        lengths = [segment.length_m for segment in segments]
        starts = tuple(float(value) for value in np.concatenate(([0.0], np.cumsum(lengths)[:-1])))
        return cls(tuple(segments), starts, float(sum(lengths)))

    def segment_index(self, station_m: float, direction: int) -> int | None:
        """The segment leaving ``station_m`` forward (``direction`` +1) or backward (-1);
        None when the chain ends there."""
        if direction > 0:
            if station_m >= self.length_m - STATION_EPSILON_M:
                return None
            return bisect_right(self.starts_m, station_m + STATION_EPSILON_M) - 1
        if station_m <= STATION_EPSILON_M:
            return None
        return bisect_left(self.starts_m, station_m - STATION_EPSILON_M) - 1

    def heading_rad(self, index: int, station_m: float) -> float:
        """Heading (along the chain's direction) of segment ``index`` at ``station_m``."""
        segment = self.segments[index]
        if isinstance(segment, Straight):
            return segment.heading_rad
        local = min(max(station_m - self.starts_m[index], 0.0), segment.length_m)
        return segment.start_heading_rad + local * segment.curvature_per_m

    def straight_run_m(self, index: int, station_m: float, direction: int, limit_m: float) -> float:
        """Straight length from ``station_m`` in ``direction`` (starting on segment ``index``)
        until the first corner, arc or sharp, or the station ``limit_m``."""
        first = self.segments[index]
        if not isinstance(first, Straight):
            return 0.0
        last = index
        while 0 <= last + direction < len(self.segments):
            following = self.segments[last + direction]
            if (not isinstance(following, Straight)
                    or abs(wrap_angle(following.heading_rad - first.heading_rad)) > ZERO_DEFLECTION_RAD):
                break
            last += direction
        if direction > 0:
            return max(0.0, min(self.starts_m[last] + self.segments[last].length_m, limit_m) - station_m)
        return max(0.0, station_m - max(self.starts_m[last], limit_m))
