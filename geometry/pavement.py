"""Required pavement: the tyre band of a movement, its required area, straight pavement, unions,
and the split of a pavement into new and existing parts.

Construction (docs/pavement.md):

* the *tyre band* of a movement is the region swept by the main-gear axle line between the outer
  edges of the outermost tyres: the polygon between the left and the right outer-edge tracks;
* the *required movement area* is the tyre band widened on every side by the edge margin (TESM
  in FAA terms, the wheel-to-edge clearance in ICAO terms): a Minkowski sum with a disc, which
  shapely's round buffer computes;
* *straight pavement* is a leg's centerline buffered by half the design width with flat caps.

Accuracy, stated once: tracks are simplified with :data:`SIMPLIFY_TOLERANCE_M` before buffering
and every round part of a buffer is a polygon inscribed in the true arc with a sagitta of at
most :data:`ARC_SAGITTA_M`. Straight edges are exact, so the required area of a settled straight
is exactly gear width + 2 margins wide. Together the required area lies within 1 mm inside the
exact one (never outside it by more than the simplification tolerance).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import TypeAlias, cast

import numpy as np
import shapely
from shapely.geometry import LineString, MultiPolygon, Polygon
from shapely.geometry.base import BaseGeometry

from geometry.centerline import flatten
from geometry.errors import GeometryError, NonFiniteInputError
from geometry.path import CenterlinePath
from geometry.primitives import Arc, FloatArray, Segment, Straight
from geometry.sweep import SweptPath
from geometry.validate import checked_length_m

SIMPLIFY_TOLERANCE_M = 0.0005  # Douglas-Peucker tolerance applied to the tyre tracks
ARC_SAGITTA_M = 0.00025        # largest gap between a buffer's polygonal arc and the true arc
CONTAINMENT_SAMPLE_M = 0.05    # spacing of the points at which a containment gap is measured
MITRE_LIMIT = 5.0              # straight pavement at a bend sharper than ~157 degrees is bevelled

Polygonal: TypeAlias = Polygon | MultiPolygon
CenterlineLike: TypeAlias = Segment | CenterlinePath | Sequence[Segment] | FloatArray | LineString


def quad_segs_for(radius_m: float, sagitta_m: float = ARC_SAGITTA_M) -> int:
    """Segments per quarter circle for which a buffer of ``radius_m`` keeps its arcs within
    ``sagitta_m`` of the true circle: r (1 - cos(pi / (4 q))) <= sagitta (identity)."""
    if radius_m <= sagitta_m:
        return 1
    return max(1, math.ceil(math.pi / (4.0 * math.acos(1.0 - sagitta_m / radius_m))))


def _as_polygonal(geometry: BaseGeometry) -> Polygonal:
    """The polygonal part of ``geometry`` (make_valid can return lines and points beside it)."""
    if isinstance(geometry, (Polygon, MultiPolygon)):
        return geometry
    parts = [part for part in shapely.get_parts(geometry) if isinstance(part, (Polygon, MultiPolygon))]
    merged = shapely.union_all(parts) if parts else Polygon()
    return cast(Polygonal, merged if isinstance(merged, (Polygon, MultiPolygon)) else Polygon())


def _track(xy: FloatArray, name: str) -> FloatArray:
    track = np.asarray(xy, dtype=float)
    if track.ndim != 2 or track.shape[1] != 2 or len(track) < 2:
        raise GeometryError(f"the {name} track needs at least two stations of (x, y)")
    if not np.isfinite(track).all():
        raise NonFiniteInputError(f"the {name} track has a NaN or infinite coordinate")
    return track


def simplified_tracks(tracks: Sequence[FloatArray], tolerance_m: float) -> list[FloatArray]:
    """Each (n, 2) track simplified (Douglas-Peucker) by ``tolerance_m``, all in one GEOS call.

    Plain Douglas-Peucker: a track that crosses itself is not protected; :func:`tyre_bands` checks
    the bands built from simplified tracks and rebuilds an invalid one piecewise.
    """
    if tolerance_m <= 0.0 or not tracks:
        return list(tracks)
    lengths = [len(track) for track in tracks]
    lines = shapely.linestrings(np.concatenate(tracks), indices=np.repeat(np.arange(len(tracks)), lengths))
    simple = shapely.simplify(lines, tolerance_m, preserve_topology=False)
    coordinates = np.asarray(shapely.get_coordinates(simple), dtype=float)
    ends = np.cumsum(shapely.get_num_coordinates(simple)).tolist()
    return [coordinates[start:end] for start, end in zip([0, *ends[:-1]], ends, strict=True)]


def _band_pieces(left: FloatArray, right: FloatArray, first: int, last: int) -> list[BaseGeometry]:
    """Valid polygons whose union is the band between stations ``first`` and ``last``.

    A band whose tracks cross themselves (a cusp of the inner wheel, a loop) gives an invalid
    ring; halving the station range until each part is valid keeps the parts few.
    """
    ring = np.vstack((left[first:last + 1], right[first:last + 1][::-1]))
    polygon = Polygon(ring)
    if polygon.is_valid:
        return [polygon]
    if last - first <= 1:
        return [_as_polygonal(shapely.make_valid(polygon))]
    middle = (first + last) // 2
    return _band_pieces(left, right, first, middle) + _band_pieces(left, right, middle, last)


def tyre_band(swept: SweptPath, simplify_tolerance_m: float = 0.0) -> Polygonal:
    """Area swept by the main-gear tyres over the whole movement.

    The region between the left and right outer tyre edge tracks, closed by the axle line at
    the first and last station. Robust when the tracks overlap themselves.

    Parameters
    ----------
    swept : SweptPath
        Tracks of one aircraft along one movement.
    simplify_tolerance_m : float
        Douglas-Peucker tolerance applied to each track first (0: use every station).

    Examples
    --------
    >>> import math
    >>> from geometry.aircraft import DesignAircraft
    >>> from geometry.path import standard_turn_path
    >>> from geometry.sweep import sweep
    >>> plane = DesignAircraft("Demo twin", 20.0, 18.0, 9.0, 1.0, 36.0, -4.0, 23.0, -22.0, 12.0)
    >>> band = tyre_band(sweep(standard_turn_path(40.0, math.pi / 2, 60.0, 60.0), plane))
    >>> band.is_valid and band.area > 0
    True
    """
    return tyre_bands([swept], simplify_tolerance_m)[0]


def _edge_tracks(swept: SweptPath) -> tuple[FloatArray, FloatArray]:
    left = _track(swept.gear_left_edge_xy, "left tyre edge")
    right = _track(swept.gear_right_edge_xy, "right tyre edge")
    if len(left) != len(right):
        raise GeometryError("the left and right tyre edge tracks need one row per station each")
    return left, right


def _band_from_pieces(left: FloatArray, right: FloatArray, simplify_tolerance_m: float) -> Polygonal:
    merged = shapely.union_all(_band_pieces(left, right, 0, len(left) - 1))
    if simplify_tolerance_m > 0.0:
        merged = shapely.simplify(merged, simplify_tolerance_m, preserve_topology=True)
    return _as_polygonal(merged)


def tyre_bands(swept_paths: Sequence[SweptPath], simplify_tolerance_m: float = 0.0) -> list[Polygonal]:
    """:func:`tyre_band` of each swept path, every step one GEOS call for all of them."""
    edges = [_edge_tracks(swept) for swept in swept_paths]
    if not edges:
        return []
    simple = simplified_tracks([track for pair in edges for track in pair], simplify_tolerance_m)
    rings = [np.vstack((left, right[::-1])) for left, right in zip(simple[0::2], simple[1::2], strict=True)]
    which = np.repeat(np.arange(len(rings)), [len(ring) for ring in rings])
    bands = shapely.polygons(shapely.linearrings(np.concatenate(rings), indices=which))
    valid = shapely.is_valid(bands)
    return [cast(Polygonal, band) if ok else _band_from_pieces(left, right, simplify_tolerance_m)
            for band, ok, (left, right) in zip(bands, valid, edges, strict=True)]




def required_movement_area(swept: SweptPath, edge_margin_m: float) -> Polygonal:
    """The tyre band widened by ``edge_margin_m`` on every side: the pavement one movement needs.

    Examples
    --------
    >>> from geometry.aircraft import DesignAircraft
    >>> from geometry.path import CenterlinePath
    >>> from geometry.primitives import Straight
    >>> from geometry.sweep import sweep
    >>> plane = DesignAircraft("Demo twin", 20.0, 18.0, 9.0, 1.0, 36.0, -4.0, 23.0, -22.0, 12.0)
    >>> area = required_movement_area(sweep(CenterlinePath((Straight((0, 0), 0.0, 100.0),)), plane), 3.0)
    >>> round(area.intersection(shapely.box(0.0, -20.0, 50.0, 20.0)).area, 6)  # 15 m wide
    750.0
    """
    return required_movement_areas([swept], [edge_margin_m])[0]


def required_movement_areas(swept_paths: Sequence[SweptPath],
                            edge_margins_m: Sequence[float]) -> list[Polygonal]:
    """:func:`required_movement_area` of each swept path with its own edge margin, every step one
    GEOS call for all of them (one per distinct margin for the buffer)."""
    margins_m = [checked_length_m("the edge margin", margin_m, allow_zero=True)
                 for margin_m in edge_margins_m]
    if len(margins_m) != len(swept_paths):
        raise GeometryError("every swept path needs its own edge margin")
    areas = tyre_bands(swept_paths, SIMPLIFY_TOLERANCE_M)
    for margin_m in sorted(set(margins_m) - {0.0}):
        which = [index for index, each_m in enumerate(margins_m) if each_m == margin_m]
        grown = shapely.buffer([areas[index] for index in which], margin_m, quad_segs=quad_segs_for(margin_m),
                               join_style="round")
        for index, area in zip(which, grown, strict=True):
            areas[index] = _as_polygonal(area)
    return areas


def _centerline_points(centerline: CenterlineLike) -> FloatArray:
    if isinstance(centerline, LineString):
        return np.asarray(shapely.get_coordinates(centerline), dtype=float)
    if isinstance(centerline, CenterlinePath):
        return flatten(centerline.segments, ARC_SAGITTA_M)
    if isinstance(centerline, (Straight, Arc)):
        return flatten((centerline,), ARC_SAGITTA_M)
    if isinstance(centerline, np.ndarray):
        return np.asarray(centerline, dtype=float)
    items = list(centerline)
    if items and all(isinstance(item, (Straight, Arc)) for item in items):
        return flatten(items, ARC_SAGITTA_M)
    return np.asarray(items, dtype=float)


def straight_pavement(centerline: CenterlineLike, width_m: float) -> Polygonal:
    """Pavement of ``width_m`` centred on a leg's centerline, cut square at both ends.

    ``centerline`` may be a straight or arc, a path, a sequence of segments, an (n, 2) array of
    points or a LineString. Arcs are flattened with chords of sagitta :data:`ARC_SAGITTA_M`.

    Examples
    --------
    >>> from geometry.primitives import Straight
    >>> round(straight_pavement(Straight((0.0, 0.0), 0.3, 120.0), 23.0).area, 6)  # 23 m x 120 m
    2760.0
    """
    half_width_m = checked_length_m("the pavement width", width_m, allow_zero=False) / 2.0
    points = _centerline_points(centerline)
    if points.ndim != 2 or points.shape[1] != 2 or len(points) < 2:
        raise GeometryError("a straight pavement needs a centerline of at least two points")
    if not np.isfinite(points).all():
        raise NonFiniteInputError("the centerline has a NaN or infinite coordinate")
    line = LineString(points)
    if line.length <= 0.0:
        raise GeometryError("a straight pavement needs a centerline of positive length")
    # GEOS divides by zero inside the mitre computation where a line exactly reverses; its result
    # stays finite and valid, so the floating-point warning is noise (tests/robustness).
    with np.errstate(divide="ignore", invalid="ignore"):
        return _as_polygonal(shapely.buffer(line, half_width_m, cap_style="flat", join_style="mitre",
                                            mitre_limit=MITRE_LIMIT))


def junction_required_area(movement_areas: Iterable[BaseGeometry],
                           leg_straights: Iterable[BaseGeometry]) -> BaseGeometry:
    """Union (one ``union_all``) of a junction's movement areas and its legs' straight pavement."""
    pieces = [geometry for geometry in (*movement_areas, *leg_straights) if not geometry.is_empty]
    return cast(BaseGeometry, shapely.union_all(pieces)) if pieces else Polygon()


@dataclass(frozen=True, slots=True, eq=False)
class PavementSummary:
    """Areas of a pavement split into what must be built and what exists already.

    new_area_m2: to be built. existing_area_m2: needed and already paved (reused).
    total_area_m2: their sum, the area of the whole pavement.
    """

    new_area_m2: float
    existing_area_m2: float
    total_area_m2: float
    new_geometry: BaseGeometry
    existing_geometry: BaseGeometry


def split_new_existing(required: BaseGeometry,
                       existing: Sequence[Polygon]) -> tuple[BaseGeometry, BaseGeometry]:
    """``(new, reused)``: the parts of ``required`` outside and inside the existing pavement."""
    paved = shapely.union_all([polygon for polygon in existing if not polygon.is_empty]) if existing \
        else Polygon()
    if paved.is_empty:
        return required, Polygon()
    return cast(BaseGeometry, required.difference(paved)), cast(BaseGeometry, required.intersection(paved))


def summarize_pavement(required: BaseGeometry, existing: Sequence[Polygon]) -> PavementSummary:
    """Areas (m^2) of ``required`` that are new and that reuse existing pavement."""
    new, reused = split_new_existing(required, existing)
    new_area, reused_area = float(new.area), float(reused.area)
    return PavementSummary(new_area_m2=new_area, existing_area_m2=reused_area,
                           total_area_m2=new_area + reused_area, new_geometry=new, existing_geometry=reused)


@dataclass(frozen=True, slots=True)
class ContainmentGap:
    """How much of one area lies outside another: the area (m^2) and the largest distance (m)
    of the uncovered part from the covering area (measured at boundary points spaced
    :data:`CONTAINMENT_SAMPLE_M` apart)."""

    area_m2: float
    max_distance_m: float


def containment_gap(required: BaseGeometry, covered: BaseGeometry) -> ContainmentGap:
    """What of ``required`` lies outside ``covered``."""
    uncovered = required.difference(covered)
    if uncovered.is_empty:
        return ContainmentGap(0.0, 0.0)
    samples = shapely.get_coordinates(shapely.segmentize(uncovered.boundary, CONTAINMENT_SAMPLE_M))
    distances = shapely.distance(covered, shapely.points(samples))
    return ContainmentGap(float(uncovered.area), float(np.max(distances)) if len(distances) else 0.0)
