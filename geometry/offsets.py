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

Speed: each candidate (every segment in path order, then the start and end rays) is measured for
all points at once with a few whole-array operations on contiguous coordinate columns (there is no
loop per point), and the nearest so far is kept in place; the first of equal distances wins.
Distances are plain square roots of sums of squares and angles are wrapped with a floor, which
agree with ``hypot`` and ``mod`` to rounding and cost a fraction of them. Two kinds of candidate
are never nearer than another one, so they are not computed:

* an arc's end point where a straight joins the arc: that straight's own distance already counts
  the (shared) end point, so off the arc's angular range the arc offers nothing nearer;
* with ``extend_ends``, a ray continuing a straight end: it is folded into that straight, which
  is then measured as unbounded at that end (the same distance and sign as the ray's).
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from geometry.errors import GeometryError, NonFiniteInputError
from geometry.path import CenterlinePath, SegmentArrays
from geometry.primitives import FloatArray

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
    candidates = _candidates(path, x, y, extend_ends)
    best_distance, best_offset = next(candidates)
    for distance, offset in candidates:
        closer = distance < best_distance
        np.copyto(best_distance, distance, where=closer)
        np.copyto(best_offset, offset, where=closer)
    return best_offset


def _as_points(points: FloatArray) -> tuple[FloatArray, FloatArray]:
    xy = np.asarray(points, dtype=float)
    if xy.ndim != 2 or xy.shape[1] != 2:
        raise GeometryError(f"points must be an array of shape (n, 2), got shape {xy.shape}")
    if not np.isfinite(xy).all():
        raise NonFiniteInputError("a point coordinate is NaN or infinite")
    # Contiguous coordinate columns: every candidate below reads them several times.
    return np.ascontiguousarray(xy[:, 0]), np.ascontiguousarray(xy[:, 1])


def _candidates(path: CenterlinePath, x: FloatArray, y: FloatArray,
                extend_ends: bool) -> Iterator[tuple[FloatArray, FloatArray]]:
    """(distance, signed offset) of every point to each candidate, in tie-breaking order.
    Together they reach every point of the (extended) path, so every distance is finite."""
    table = path.arrays
    arcs = table.is_arc.tolist()
    last = len(arcs) - 1
    for index, is_arc in enumerate(arcs):
        if is_arc:
            keep_start = index == 0 or arcs[index - 1]
            keep_end = index == last or arcs[index + 1]
            yield _arc_offsets(table, index, x, y, keep_start, keep_end)
        else:
            yield _straight_offsets(table, index, x, y, open_start=extend_ends and index == 0,
                                    open_end=extend_ends and index == last)
    if extend_ends and arcs[0]:
        yield _ray_offsets(float(table.start_x[0]), float(table.start_y[0]), float(table.start_cos[0]),
                           float(table.start_sin[0]), x, y, backwards=True)
    if extend_ends and arcs[last]:
        yield _ray_offsets(float(table.end_x[last]), float(table.end_y[last]), float(table.end_cos[last]),
                           float(table.end_sin[last]), x, y, backwards=False)


def _signed(distance: FloatArray, cross: FloatArray) -> FloatArray:
    """``distance`` negated where ``cross < 0``; adding +0.0 turns a -0.0 cross into +0.0, so a
    point exactly on the tangent line counts as left."""
    return np.copysign(distance, cross + 0.0)


def _straight_offsets(table: SegmentArrays, index: int, x: FloatArray, y: FloatArray, *,
                      open_start: bool, open_end: bool) -> tuple[FloatArray, FloatArray]:
    # Beyond either end the nearest point is that end; the tangent there is the line itself. An
    # open end continues the line (a ray folded in): there the distance is the cross distance.
    cos_h, sin_h = float(table.start_cos[index]), float(table.start_sin[index])
    dx, dy = x - float(table.start_x[index]), y - float(table.start_y[index])
    along = dx * cos_h + dy * sin_h
    cross = cos_h * dy - sin_h * dx
    lower, upper = (-np.inf if open_start else 0.0), (np.inf if open_end else float(table.lengths_m[index]))
    if open_start and open_end:
        distance = np.abs(cross)
    else:
        beyond = along - np.clip(along, lower, upper)
        distance = np.sqrt(beyond * beyond + cross * cross)
    return distance, _signed(distance, cross)


def _arc_offsets(table: SegmentArrays, index: int, x: FloatArray, y: FloatArray, keep_start: bool,
                 keep_end: bool) -> tuple[FloatArray, FloatArray]:
    side = float(table.side[index])
    dx, dy = x - float(table.center_x[index]), y - float(table.center_y[index])
    start_polar_rad = float(table.start_heading_rad[index]) - side * math.pi / 2.0
    swept_rad = side * (np.arctan2(dy, dx) - start_polar_rad)
    swept_rad -= _FULL_TURN_RAD * np.floor(swept_rad / _FULL_TURN_RAD)
    within = swept_rad <= float(table.turn_abs_rad[index])
    # The centre lies on the inside of the bend: to the left of travel for a left arc.
    radial_offset = side * (float(table.radius_m[index]) - np.sqrt(dx * dx + dy * dy))
    if not (keep_start or keep_end):
        return np.where(within, np.abs(radial_offset), np.inf), radial_offset
    # Off the arc's angular range the nearer kept end point counts, signed by the tangent there.
    if keep_start and keep_end:
        start_squared, start_cross = _end_point(table, index, x, y, at_start=True)
        end_squared, end_cross = _end_point(table, index, x, y, at_start=False)
        squared = np.minimum(start_squared, end_squared)
        cross = np.where(start_squared <= end_squared, start_cross, end_cross)
    else:
        squared, cross = _end_point(table, index, x, y, at_start=keep_start)
    end_distance = np.sqrt(squared)
    return (np.where(within, np.abs(radial_offset), end_distance),
            np.where(within, radial_offset, _signed(end_distance, cross)))


def _end_point(table: SegmentArrays, index: int, x: FloatArray, y: FloatArray, *,
               at_start: bool) -> tuple[FloatArray, FloatArray]:
    """Squared distance to a segment's start or end point, and the cross coordinate to the tangent
    there."""
    if at_start:
        end_x, end_y, cos_h, sin_h = table.start_x, table.start_y, table.start_cos, table.start_sin
    else:
        end_x, end_y, cos_h, sin_h = table.end_x, table.end_y, table.end_cos, table.end_sin
    dx, dy = x - float(end_x[index]), y - float(end_y[index])
    return dx * dx + dy * dy, float(cos_h[index]) * dy - float(sin_h[index]) * dx


def _ray_offsets(origin_x: float, origin_y: float, cos_h: float, sin_h: float, x: FloatArray,
                 y: FloatArray, *, backwards: bool) -> tuple[FloatArray, FloatArray]:
    """Offsets from the tangent line continuing a path end; only points beyond that end count."""
    dx, dy = x - origin_x, y - origin_y
    along = dx * cos_h + dy * sin_h
    cross = cos_h * dy - sin_h * dx
    beyond = along < 0.0 if backwards else along > 0.0
    return np.where(beyond, np.abs(cross), np.inf), cross
