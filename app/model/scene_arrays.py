"""Arrays the plan view draws, and what each junction result adds to them (Qt-free): centerlines
with their corner arcs, runway outlines, polygon rings, pieces joined by NaN rows.

Pieces of one style are joined into one (n, 2) array with a NaN row between pieces. What one
junction contributes (fillets, required pavement, tracks) is kept in :class:`JunctionParts`
while its result is the very same object: the analysis hands back the same object for every
junction a change did not touch, so a drag rebuilds the arrays of 2 or 3 junctions, not all.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from app.model.elements import Runway, Vertex
from app.model.results import JunctionResult, LayoutResult
from app.model.unions import POLYGON_TYPE_ID, with_gap_rows

FloatArray = npt.NDArray[np.float64]


# A drawn corner arc stays within this distance of the true arc; finer than any screen needs
# at plan scales and far coarser than the analysis' own chord tolerance.
DRAW_CHORD_TOLERANCE_M = 0.05


def corner_arc_xy(before: Sequence[float], corner: Sequence[float], after: Sequence[float],
                  radius_m: float, max_tangent_m: float) -> FloatArray | None:
    """Points of the arc of ``radius_m`` rounding ``corner`` between the legs from ``before`` and to
    ``after``; the tangent length is shortened to ``max_tangent_m`` (a smaller radius) where the legs
    are too short, since a sketch must still draw. None for a straight-through or folded vertex."""
    p0, p1, p2 = (np.asarray(p, dtype=float) for p in (before, corner, after))
    u1, u2 = p1 - p0, p2 - p1
    n1, n2 = float(np.hypot(*u1)), float(np.hypot(*u2))
    if n1 == 0.0 or n2 == 0.0:
        return None
    u1, u2 = u1 / n1, u2 / n2
    turn_rad = math.atan2(u1[0] * u2[1] - u1[1] * u2[0], float(u1 @ u2))
    if abs(turn_rad) < 1e-9 or abs(turn_rad) > math.pi - 1e-6:
        return None
    half_tan = math.tan(abs(turn_rad) / 2.0)
    radius = min(radius_m, max_tangent_m / half_tan)
    start = p1 - u1 * radius * half_tan
    side = 1.0 if turn_rad > 0.0 else -1.0
    centre = start + side * radius * np.array([-u1[1], u1[0]])
    step = 2.0 * math.acos(max(-1.0, 1.0 - DRAW_CHORD_TOLERANCE_M / radius)) if radius > 0 else math.pi
    count = max(2, math.ceil(abs(turn_rad) / max(step, 1e-3)) + 1)
    start_angle = math.atan2(start[1] - centre[1], start[0] - centre[0])
    angles = start_angle + np.linspace(0.0, turn_rad, count)
    return np.column_stack((centre[0] + radius * np.cos(angles), centre[1] + radius * np.sin(angles)))


@lru_cache(maxsize=4096)
def centerline_xy(vertices: tuple[Vertex, ...]) -> FloatArray:
    """The centerline as drawn: straights between vertices, true arcs (flattened) at rounded corners.
    Two rounded corners on one leg share it half and half. Cached by the (immutable) vertices and
    returned read-only, since a drag redraws every line but changes one."""
    points = _centerline_points(vertices)
    points.flags.writeable = False
    return points


def _centerline_points(vertices: Sequence[Vertex]) -> FloatArray:
    points = [np.array([[v.x_m, v.y_m]]) for v in vertices[:1]]
    for index in range(1, len(vertices) - 1):
        before, vertex, after = vertices[index - 1], vertices[index], vertices[index + 1]
        arc = None
        if vertex.corner_radius_m is not None:
            leg_in = math.dist(before.xy, vertex.xy) * (0.5 if before.corner_radius_m else 1.0)
            leg_out = math.dist(vertex.xy, after.xy) * (0.5 if after.corner_radius_m else 1.0)
            arc = corner_arc_xy(before.xy, vertex.xy, after.xy, vertex.corner_radius_m,
                                min(leg_in, leg_out))
        points.append(arc if arc is not None else np.array([vertex.xy]))
    if len(vertices) > 1:
        points.append(np.array([vertices[-1].xy]))
    return np.concatenate(points) if points else np.empty((0, 2))


def runway_outline_xy(runway: Runway) -> FloatArray:
    """The runway's rectangle (closed ring) from its thresholds and width."""
    (x0, y0), (x1, y1) = runway.vertices[0].xy, runway.vertices[1].xy
    length = math.hypot(x1 - x0, y1 - y0) or 1.0
    nx, ny = -(y1 - y0) / length * runway.width_m / 2.0, (x1 - x0) / length * runway.width_m / 2.0
    return np.array([[x0 + nx, y0 + ny], [x1 + nx, y1 + ny], [x1 - nx, y1 - ny],
                     [x0 - nx, y0 - ny], [x0 + nx, y0 + ny]])


def join_pieces(pieces: Iterable[npt.ArrayLike]) -> FloatArray:
    """One (n, 2) array of all ``pieces`` with a NaN row between consecutive pieces."""
    arrays = [array for array in map(_as_xy, pieces) if len(array)]
    if not arrays:
        return np.empty((0, 2))
    parts = [_GAP] * (2 * len(arrays) - 1)
    parts[::2] = arrays
    return np.concatenate(parts)


_GAP = np.full((1, 2), np.nan)


def _as_xy(piece: npt.ArrayLike) -> FloatArray:
    if isinstance(piece, np.ndarray) and piece.dtype == np.float64 and piece.shape[1:] == (2,):
        return piece
    return np.asarray(piece, dtype=float).reshape(-1, 2)


def rings_xy(geometry: BaseGeometry | None) -> FloatArray:
    """Every polygon ring (exteriors and holes) of ``geometry`` joined by NaN rows."""
    if geometry is None or geometry.is_empty:
        return np.empty((0, 2))
    parts = shapely.get_parts(geometry)
    rings = shapely.get_rings(parts[shapely.get_type_id(parts) == POLYGON_TYPE_ID])
    xy, ring_of = shapely.get_coordinates(rings, return_index=True)
    if not len(xy):
        return np.empty((0, 2))
    joined, _ = with_gap_rows(xy, ring_of[1:] != ring_of[:-1])
    return joined


@dataclass(frozen=True, slots=True, eq=False)
class JunctionParts:
    """The arrays one junction result adds to the scene, kept while the result is the same object."""

    source: JunctionResult
    fillets: FloatArray
    required: FloatArray
    tracks: dict[str, FloatArray]  # by track style ("track.gear", "track.wingtip.excluded"...)


TRACK_FIELDS: dict[str, tuple[str, str]] = {
    "track.gear": ("gear_left_edge_xy", "gear_right_edge_xy"),
    "track.wingtip": ("wingtip_left_xy", "wingtip_right_xy")}


def junction_parts(junction: JunctionResult) -> JunctionParts:
    """The fillets, required pavement and tracks (kept and excluded movements apart) of ``junction``."""
    tracks: dict[str, FloatArray] = {}
    for style, fields in TRACK_FIELDS.items():
        for excluded, suffix in ((False, ""), (True, ".excluded")):
            tracks[style + suffix] = join_pieces(
                getattr(track, f) for movement in junction.movements if movement.excluded == excluded
                for track in movement.tracks for f in fields)
    return JunctionParts(junction, join_pieces(rings_xy(f.outline) for f in junction.fillets),
                         rings_xy(junction.required_area), tracks)


def all_junction_parts(result: LayoutResult | None,
                       known: dict[str, JunctionParts]) -> dict[str, JunctionParts]:
    """Each junction's parts, taken over from ``known`` where its result is the very same object."""
    if result is None:
        return {}
    parts = {}
    for junction_id, junction in result.junctions.items():
        before = known.get(junction_id)
        parts[junction_id] = before if before is not None and before.source is junction else (
            junction_parts(junction))
    return parts
