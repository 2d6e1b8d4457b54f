"""Clipping a piece of pavement to tiles, and where two versions of a piece can clip differently.

Used by :class:`app.model.unions.TiledUnion`: a changed piece is clipped again only inside the
rectangles :func:`changed_boxes` returns; :func:`clipped_parts` gives the parts of a piece in boxes,
normalised so that an unchanged part compares equal to its previous clip.
"""

from __future__ import annotations

import functools

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

FloatArray = npt.NDArray[np.float64]

# A piece within this many tiles is clipped again everywhere: finding where it changed (a few dozen
# numpy calls) costs more than clipping it to these few tiles.
FEW_TILES = 9
# A changed edge reaching to within this of a tile line counts as reaching into the tile beyond (a
# margin against rounding in the tile look-up; looking at one tile more only costs a clip).
CHANGE_MARGIN_M = 1e-3


def changed_boxes(before: BaseGeometry, after: BaseGeometry, margin_m: float) -> FloatArray | None:
    """Rectangles (rows of xmin, ymin, xmax, ymax) outside of which the polygonal ``before`` and
    ``after`` give the very same clip to any tile; None when they are not built alike (other
    types, rings or vertex counts) or share no vertex.

    Why: the edges that differ run between vertices the two share, so ``after`` less ``before``
    (and the reverse) is covered by the quadrilaterals each changed edge sweeps from its old to its
    new place, each within the box of its four corners; a tile no box reaches meets the same edges
    in the same order. An edge that only slides along one axis-parallel line (a mitre point moving
    along a straight) needs boxes only where its ends moved: between them it crosses tile sides at
    the same exact coordinate, whatever its ends.
    """
    alike = _alike_coordinates(before, after)
    if alike is None:
        return None
    xy_before, xy_after, edge_of_ring = alike
    moved = (xy_before[:, 0] != xy_after[:, 0]) | (xy_before[:, 1] != xy_after[:, 1])
    if moved.all():
        return None
    starts = np.flatnonzero((moved[:-1] | moved[1:]) & edge_of_ring)
    # x and y of each changed edge's old start, old end, new start and new end (1-d: fast in numpy)
    xs, ys = ([xy[starts + end, axis] for xy in (xy_before, xy_after) for end in (0, 1)] for axis in (0, 1))
    sliding = (((ys[0] == ys[1]) & (ys[0] == ys[2]) & (ys[0] == ys[3]))
               | ((xs[0] == xs[1]) & (xs[0] == xs[2]) & (xs[0] == xs[3])))
    slid_start, slid_end = sliding & moved[starts], sliding & moved[starts + 1]
    groups = (((0, 1, 2, 3), ~sliding),  # the quadrilateral the edge sweeps
              ((0, 2), slid_start),       # a sliding edge: its old and new start
              ((1, 3), slid_end))         # and its old and new end
    (x_low, x_high), (y_low, y_high) = (_spans(values, groups) for values in (xs, ys))
    return np.column_stack((x_low - margin_m, y_low - margin_m, x_high + margin_m, y_high + margin_m))


def _spans(values: list[FloatArray], groups: tuple[tuple[tuple[int, ...], npt.NDArray[np.bool_]], ...]
           ) -> tuple[FloatArray, FloatArray]:
    """The least and greatest of the ``values`` of each group's corners, in its rows, one group
    after the other."""
    picked = [[values[corner][rows] for corner in corners] for corners, rows in groups]
    return (np.concatenate([functools.reduce(np.minimum, group) for group in picked]),
            np.concatenate([functools.reduce(np.maximum, group) for group in picked]))


def _alike_coordinates(before: BaseGeometry, after: BaseGeometry
                       ) -> tuple[FloatArray, FloatArray, npt.NDArray[np.bool_]] | None:
    """Both geometries' coordinates and, for each pair of consecutive ones, whether they are an edge
    (not the step from one ring to the next); None unless both have rings of the same lengths."""
    kind = before.geom_type
    if kind != after.geom_type or kind not in _POLYGONAL:
        return None
    one_ring_each = not shapely.get_num_interior_rings(np.array([before, after], dtype=object)).any()
    if kind == "Polygon" and one_ring_each:
        xy_before, xy_after = shapely.get_coordinates(before), shapely.get_coordinates(after)
        if len(xy_before) != len(xy_after):
            return None
        return xy_before, xy_after, np.ones(max(len(xy_before) - 1, 0), dtype=bool)
    rings = [shapely.get_rings(shapely.get_parts(geometry)) for geometry in (before, after)]
    if not np.array_equal(*(shapely.get_num_coordinates(each) for each in rings)):
        return None
    xy_before, ring_of = shapely.get_coordinates(rings[0], return_index=True)
    return xy_before, shapely.get_coordinates(rings[1]), ring_of[:-1] == ring_of[1:]


def clipped_parts(piece: BaseGeometry, boxes: npt.NDArray[np.float64]) -> tuple[list[BaseGeometry], bool]:
    """``piece`` within each box, normalised so that an unchanged part compares equal, and whether
    a part needed the exact clip: a fast clip that comes out invalid is redone as an exact
    intersection."""
    if not len(boxes):
        return [], False
    parts = np.array([shapely.clip_by_rect(piece, *box) for box in boxes.tolist()], dtype=object)
    invalid = ~shapely.is_valid(parts)
    if invalid.any():
        rectangles = shapely.box(boxes[invalid, 0], boxes[invalid, 1], boxes[invalid, 2], boxes[invalid, 3])
        parts[invalid] = shapely.intersection(piece, rectangles)
    return [part if part.is_empty or part.geom_type in _POLYGONAL else _polygons_in(part)
            for part in shapely.normalize(parts)], bool(invalid.any())


_POLYGONAL = ("Polygon", "MultiPolygon")


def _polygons_in(geometry: BaseGeometry) -> BaseGeometry:
    """The polygons of a clip that also kept lines or points where the piece touches the box."""
    polygons = [part for part in shapely.get_parts(geometry) if part.geom_type == "Polygon"]
    return shapely.multipolygons(polygons) if polygons else Polygon()
