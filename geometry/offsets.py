"""Exact signed lateral offsets of points from a centerline path.

The offset of a point is its distance to the nearest point of the path, positive when the point
lies to the left of the direction of travel (the package convention). Straights and arcs are
treated analytically; nothing is flattened.

Where the nearest point of a segment is one of its ends, the distance to that end point is used,
and the sign comes from the side of the segment's tangent at that end on which the point lies
(a point exactly on that tangent line counts as left). With ``extend_ends=True`` the path is
taken to continue along its first and last tangents, so a point behind the start or beyond the
end is measured square to those tangent lines: this is how the sweep measures gear tracks,
because an aircraft's main gear trails the cockpit and starts behind the path's first point.
"""

from __future__ import annotations

import math

import numpy as np

from geometry.errors import GeometryError, NonFiniteInputError
from geometry.path import CenterlinePath
from geometry.primitives import Arc, FloatArray, Point, Straight

_FULL_TURN_RAD = 2.0 * math.pi


def lateral_offset_m(path: CenterlinePath, points: FloatArray, *,
                     extend_ends: bool = False) -> FloatArray:
    """Signed distance (m, + left of travel) of each point to the nearest point of ``path``.

    Parameters
    ----------
    path : CenterlinePath
        The centerline, straights and arcs.
    points : array of shape (n, 2)
        Plan coordinates in metres.
    extend_ends : bool
        Treat the path as continuing along its start and end tangents (see the module notes).

    Returns
    -------
    numpy.ndarray of shape (n,)

    Examples
    --------
    >>> from geometry.path import standard_turn_path
    >>> path = standard_turn_path(50.0, math.pi / 2, 20.0, 20.0)
    >>> lateral_offset_m(path, np.array([[10.0, 3.0], [10.0, -2.0]])).tolist()
    [3.0, -2.0]
    """
    x, y = _as_points(points)
    best_distance = np.full(len(x), np.inf)
    best_offset = np.zeros(len(x))
    candidates = [_segment_offsets(segment, x, y) for segment in path.segments]
    if extend_ends:
        candidates.append(_ray_offsets(path.start, _start_heading_rad(path), x, y, backwards=True))
        candidates.append(_ray_offsets(path.end, path.segments[-1].end_heading_rad, x, y, backwards=False))
    for distance, offset in candidates:
        closer = distance < best_distance
        best_distance = np.where(closer, distance, best_distance)
        best_offset = np.where(closer, offset, best_offset)
    return best_offset


def _as_points(points: FloatArray) -> tuple[FloatArray, FloatArray]:
    xy = np.asarray(points, dtype=float)
    if xy.ndim != 2 or xy.shape[1] != 2:
        raise GeometryError(f"points must be an array of shape (n, 2), got shape {xy.shape}")
    if not np.isfinite(xy).all():
        raise NonFiniteInputError("a point coordinate is NaN or infinite")
    # Contiguous coordinate columns: every candidate below reads them several times.
    return np.ascontiguousarray(xy[:, 0]), np.ascontiguousarray(xy[:, 1])


def _start_heading_rad(path: CenterlinePath) -> float:
    first = path.segments[0]
    return first.heading_rad if isinstance(first, Straight) else first.start_heading_rad


def _tangent_frame(origin: Point, heading_rad: float, x: FloatArray,
                   y: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Along-tangent and left-positive cross coordinates of points relative to a tangent."""
    dx, dy = x - origin[0], y - origin[1]
    cos_h, sin_h = math.cos(heading_rad), math.sin(heading_rad)
    return dx * cos_h + dy * sin_h, cos_h * dy - sin_h * dx


def _signed(distance: FloatArray, cross: FloatArray) -> FloatArray:
    return np.where(cross < 0.0, -distance, distance)


def _segment_offsets(segment: Straight | Arc, x: FloatArray, y: FloatArray) -> tuple[FloatArray, FloatArray]:
    if isinstance(segment, Straight):
        return _straight_offsets(segment, x, y)
    return _arc_offsets(segment, x, y)


def _straight_offsets(straight: Straight, x: FloatArray, y: FloatArray) -> tuple[FloatArray, FloatArray]:
    # Beyond either end the nearest point is that end; the tangent there is the line itself.
    along, cross = _tangent_frame(straight.start, straight.heading_rad, x, y)
    distance = np.hypot(along - np.clip(along, 0.0, straight.length_m), cross)
    return distance, _signed(distance, cross)


def _end_point_offsets(end: Point, heading_rad: float, x: FloatArray,
                       y: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Distance to an end point, signed by the side of the tangent at that end."""
    along, cross = _tangent_frame(end, heading_rad, x, y)
    distance = np.hypot(along, cross)
    return distance, _signed(distance, cross)


def _arc_offsets(arc: Arc, x: FloatArray, y: FloatArray) -> tuple[FloatArray, FloatArray]:
    cx, cy = arc.center
    radius_from_centre = np.hypot(x - cx, y - cy)
    start_polar_rad = arc.start_heading_rad - arc.side * math.pi / 2.0
    swept_rad = np.mod(arc.side * (np.arctan2(y - cy, x - cx) - start_polar_rad), _FULL_TURN_RAD)
    within = swept_rad <= abs(arc.turn_rad)
    # The centre lies on the inside of the bend: to the left of travel for a left arc.
    radial_offset = arc.side * (arc.radius_m - radius_from_centre)
    start_distance, start_offset = _end_point_offsets(arc.start, arc.start_heading_rad, x, y)
    end_distance, end_offset = _end_point_offsets(arc.end, arc.end_heading_rad, x, y)
    nearer_start = start_distance <= end_distance
    distance = np.where(within, np.abs(radial_offset), np.minimum(start_distance, end_distance))
    offset = np.where(within, radial_offset, np.where(nearer_start, start_offset, end_offset))
    return distance, offset


def _ray_offsets(origin: Point, heading_rad: float, x: FloatArray, y: FloatArray, *,
                 backwards: bool) -> tuple[FloatArray, FloatArray]:
    """Offsets from the tangent line continuing a path end; only points beyond that end count."""
    along, cross = _tangent_frame(origin, heading_rad, x, y)
    beyond = along < 0.0 if backwards else along > 0.0
    return np.where(beyond, np.abs(cross), np.inf), cross
