"""Picking and snapping on a layout (Qt-free): which vertex, centerline or element lies under the
pointer, and where a click lands (an existing vertex, a point on a centerline, a 15-degree step).

Distances are plan metres; a caller passes the pick radius (a few screen pixels at its zoom).
Segment ``i`` of a centerline runs from vertex ``i`` to vertex ``i + 1``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt
import shapely

from app.model.elements import XY, Centerline, Layout, Runway, iter_elements

SnapKind = Literal["free", "vertex", "line", "angle"]
PointRef = tuple[str, int]  # (element id, vertex index)
FloatArray = npt.NDArray[np.float64]

ANGLE_STEP_DEG = 15.0
COINCIDENT_M = 1e-3  # vertices closer than this are one point (a junction) for moves and picks


@dataclass(frozen=True, slots=True)
class Snap:
    kind: SnapKind
    xy: XY
    element_id: str = ""
    origin: XY | None = None  # angle snaps: the point the ray starts from
    angle_deg: float = 0.0


@dataclass(frozen=True, slots=True, eq=False)
class _PickIndex:
    """Every vertex and centerline segment of one layout as arrays, for fast nearest queries."""

    layout: Layout
    points: FloatArray            # (n, 2)
    point_refs: tuple[PointRef, ...]
    point_rows: dict[PointRef, int]
    starts: FloatArray            # (m, 2) segment starts
    ends: FloatArray              # (m, 2) segment ends
    segment_refs: tuple[PointRef, ...]  # (centerline id, segment index)
    segment_rows: dict[PointRef, int]


# Pointer events ask about the same layout many times in a row (every hover and drag move), so
# the index of the layout asked last is kept; layouts are immutable, so identity is enough.
_last_index: list[_PickIndex] = []


def _pick_index(layout: Layout) -> _PickIndex:
    if _last_index and _last_index[0].layout is layout:
        return _last_index[0]
    refs: list[PointRef] = []
    points: list[XY] = []
    for element in iter_elements(layout):
        xys = (tuple(v.xy for v in element.vertices) if isinstance(element, (Centerline, Runway))
               else element.outline)
        refs.extend((element.id, index) for index in range(len(xys)))
        points.extend(xys)
    segment_refs = [(line.id, i) for line in layout.centerlines for i in range(len(line.vertices) - 1)]
    starts = [line.vertices[i].xy for line in layout.centerlines for i in range(len(line.vertices) - 1)]
    ends = [line.vertices[i + 1].xy for line in layout.centerlines for i in range(len(line.vertices) - 1)]
    index = _PickIndex(layout, _array(points), tuple(refs), {r: k for k, r in enumerate(refs)},
                       _array(starts), _array(ends), tuple(segment_refs),
                       {r: k for k, r in enumerate(segment_refs)})
    _last_index[:] = [index]
    return index


def _array(points: list[XY]) -> FloatArray:
    return np.asarray(points, dtype=float).reshape(-1, 2)


def _without(distances: FloatArray, rows: dict[PointRef, int], skip: frozenset[PointRef]) -> FloatArray:
    skipped = [rows[ref] for ref in skip if ref in rows]
    if skipped:
        distances = distances.copy()
        distances[skipped] = np.inf
    return distances


def point_at(layout: Layout, xy: XY, radius_m: float,
             skip: frozenset[PointRef] = frozenset()) -> tuple[XY, tuple[PointRef, ...]] | None:
    """The vertex nearest ``xy`` within ``radius_m`` and every vertex that coincides with it."""
    index = _pick_index(layout)
    if not len(index.points):
        return None
    distances = _without(np.hypot(index.points[:, 0] - xy[0], index.points[:, 1] - xy[1]),
                         index.point_rows, skip)
    nearest = int(np.argmin(distances))
    if distances[nearest] > radius_m:
        return None
    where = index.points[nearest]
    together = _without(np.hypot(*(index.points - where).T), index.point_rows, skip) <= COINCIDENT_M
    refs = tuple(index.point_refs[row] for row in np.flatnonzero(together))
    return (float(where[0]), float(where[1])), refs


def segment_at(layout: Layout, xy: XY, radius_m: float,
               skip: frozenset[PointRef] = frozenset()) -> tuple[str, int, XY] | None:
    """(centerline id, segment index, nearest point) of the centerline segment nearest ``xy``
    within ``radius_m``; segment i runs from vertex i to vertex i + 1."""
    index = _pick_index(layout)
    if not len(index.starts):
        return None
    along = index.ends - index.starts
    length2 = np.einsum("ij,ij->i", along, along)
    offset = np.asarray(xy, dtype=float) - index.starts
    with np.errstate(invalid="ignore", divide="ignore"):
        t = np.clip(np.where(length2 > 0.0, np.einsum("ij,ij->i", offset, along) / length2, 0.0), 0.0, 1.0)
    feet = index.starts + t[:, None] * along
    distances = _without(np.hypot(feet[:, 0] - xy[0], feet[:, 1] - xy[1]), index.segment_rows, skip)
    nearest = int(np.argmin(distances))
    if distances[nearest] > radius_m:
        return None
    line_id, segment = index.segment_refs[nearest]
    return line_id, segment, (float(feet[nearest, 0]), float(feet[nearest, 1]))


def _angle_snap(xy: XY, anchor: XY, reference_deg: float, radius_m: float) -> Snap | None:
    dx, dy = xy[0] - anchor[0], xy[1] - anchor[1]
    length = math.hypot(dx, dy)
    if length <= radius_m:
        return None
    heading = math.degrees(math.atan2(dy, dx))
    steps = round((heading - reference_deg) / ANGLE_STEP_DEG)
    snapped = math.radians(reference_deg + steps * ANGLE_STEP_DEG)
    along = length * math.cos(math.radians(heading) - snapped)
    if length * abs(math.sin(math.radians(heading) - snapped)) > radius_m:
        return None
    point = (anchor[0] + along * math.cos(snapped), anchor[1] + along * math.sin(snapped))
    relative = ((steps * ANGLE_STEP_DEG + 180.0) % 360.0) - 180.0
    return Snap("angle", point, origin=anchor, angle_deg=relative)


def snap(xy: XY, layout: Layout, radius_m: float, *, free: bool = False, anchor: XY | None = None,
         reference_deg: float = 0.0, skip_points: frozenset[PointRef] = frozenset(),
         skip_segments: frozenset[PointRef] = frozenset()) -> Snap:
    """Where a click at ``xy`` lands: an existing vertex, else a point on a centerline, else (with
    an ``anchor``) a 15-degree step from ``reference_deg``, else ``xy`` itself."""
    if free:
        return Snap("free", xy)
    vertex = point_at(layout, xy, radius_m, skip_points)
    if vertex is not None:
        return Snap("vertex", vertex[0], element_id=vertex[1][0][0])
    segment = segment_at(layout, xy, radius_m, skip_segments)
    if segment is not None:
        return Snap("line", segment[2], element_id=segment[0])
    angled = _angle_snap(xy, anchor, reference_deg, radius_m) if anchor is not None else None
    return angled if angled is not None else Snap("free", xy)


def element_at(layout: Layout, xy: XY, radius_m: float) -> str | None:
    """Id of the element drawn nearest the top under ``xy``: centerlines, objects, runways."""
    segment = segment_at(layout, xy, radius_m)
    if segment is not None:
        return segment[0]
    point = shapely.Point(xy)
    for obj in layout.objects:
        shape = shapely.Polygon(obj.outline) if len(obj.outline) >= 3 else shapely.LineString(
            obj.outline * 2 if len(obj.outline) == 1 else obj.outline)
        if shape.distance(point) <= radius_m:
            return obj.id
    for runway in layout.runways:
        axis = shapely.LineString([v.xy for v in runway.vertices])
        if axis.distance(point) <= max(radius_m, runway.width_m / 2.0):
            return runway.id
    for pavement in layout.existing_pavements:
        if shapely.Polygon(pavement.outline, pavement.holes).distance(point) <= radius_m:
            return pavement.id
    return None
