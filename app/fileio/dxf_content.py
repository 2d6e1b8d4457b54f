"""What the DXF export draws, as plain arrays in drawing units: no ezdxf here.

Pure functions from the layout and its results to rows a DXF entity takes: polyline points
(simplified within a tolerance), polygon rings, LWPOLYLINE bulge rows for exact centerline
arcs, the taper parts of a fillet edge, and stable orders of junctions, movements and arcs.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from app.model.elements import Centerline, Layout
from app.model.results import AircraftTracks, ArcRecord, LayoutResult, MovementResult
from app.model.scene import clearance_half_widths_m
from geometry.centerline import centerline_segments, flatten
from geometry.errors import GeometryError
from geometry.primitives import Arc, Segment

FloatArray = npt.NDArray[np.float64]
BoolArray = npt.NDArray[np.bool_]
Ring = FloatArray                             # (n, 2), the first point not repeated at the end
PolygonRings = tuple[Ring, tuple[Ring, ...]]  # exterior, holes
ARC_KEY_DECIMALS = 6                          # arcs equal to a micrometre are one arc
ROUNDING_SHARE = 50.0  # rounding moves a point by at most sqrt(2) / 2 / 50 (1/70) of the simplification


def finite_runs(xy: FloatArray) -> list[FloatArray]:
    """Pieces of a polyline between non-finite rows, each of at least two points."""
    rows = np.asarray(xy, dtype=float).reshape(-1, 2)
    finite = np.isfinite(rows)
    if finite.all():  # the usual case, a third of the time of splitting
        return [rows] if len(rows) >= 2 else []
    breaks = np.flatnonzero(~np.all(finite, axis=1))
    runs = [piece[np.all(np.isfinite(piece), axis=1)] for piece in np.split(rows, breaks)]
    return [run for run in runs if len(run) >= 2]


def coordinate_decimals(tolerance: float) -> int:
    """Decimals a simplified polyline is written with: the power of ten at most
    1 / :data:`ROUNDING_SHARE` of ``tolerance``, so rounding moves a point far less than the
    simplification may (and the file holds ``1234.5678``, not ``1234.567812345678``)."""
    return max(0, math.ceil(round(-math.log10(tolerance / ROUNDING_SHARE), 9)))  # 1e-4 is 4, not 5


def simplified(xy: FloatArray, tolerance: float) -> FloatArray | None:
    """Douglas-Peucker: every dropped point lies within ``tolerance`` of the result, whose
    coordinates are rounded to :func:`coordinate_decimals`; None when fewer than two distinct
    points remain."""
    line = shapely.simplify(shapely.linestrings(xy), tolerance, preserve_topology=False)
    coords = np.round(shapely.get_coordinates(line), coordinate_decimals(tolerance))
    return coords if len(coords) >= 2 else None


def polygons_of(geometry: BaseGeometry | None) -> list[BaseGeometry]:
    """The polygons in any geometry (polygon, multipolygon, collection); lines and points skipped."""
    if geometry is None or geometry.is_empty:
        return []
    if geometry.geom_type == "Polygon":
        return [geometry]
    return [polygon for part in getattr(geometry, "geoms", ()) for polygon in polygons_of(part)]


def _ring(ring: BaseGeometry, units_per_m: float, tolerance: float) -> Ring | None:
    closed = simplified(shapely.get_coordinates(ring) * units_per_m, tolerance)
    if closed is None or len(closed) < 4:
        return None
    return closed[:-1]


def polygon_rings(geometry: BaseGeometry | None, units_per_m: float, tolerance: float) -> list[PolygonRings]:
    """Exterior and holes of every polygon in ``geometry``, in drawing units, simplified."""
    found: list[PolygonRings] = []
    for polygon in polygons_of(geometry):
        exterior = _ring(polygon.exterior, units_per_m, tolerance)
        if exterior is not None:
            holes = (_ring(hole, units_per_m, tolerance) for hole in polygon.interiors)
            found.append((exterior, tuple(hole for hole in holes if hole is not None)))
    return found


def existing_polygons(layout: Layout) -> list[BaseGeometry]:
    """The layout's existing pavement outlines (with holes) as polygons."""
    polygons = []
    for pavement in layout.existing_pavements:
        if len(pavement.outline) >= 3:
            holes = [hole for hole in pavement.holes if len(hole) >= 3]
            polygons.append(shapely.Polygon(pavement.outline, holes))
    return polygons


def bulge_rows(segments: tuple[Segment, ...], units_per_m: float) -> FloatArray:
    """LWPOLYLINE rows (x, y, bulge). A bulge of tan(turn / 4) makes the piece that follows a
    true arc, counter-clockwise when positive (the DXF convention)."""
    rows = [(s.start[0], s.start[1], math.tan(s.turn_rad / 4.0) if isinstance(s, Arc) else 0.0)
            for s in segments]
    rows.append((segments[-1].end[0], segments[-1].end[1], 0.0))
    table = np.array(rows, dtype=float)
    table[:, :2] *= units_per_m
    return table


def centerline_rows(centerline: Centerline, units_per_m: float) -> tuple[FloatArray | None, str | None]:
    """Bulge rows of a centerline with its corner arcs, and a warning when a corner does not fit
    (the line is then drawn through its vertices, so the drafter still gets it)."""
    vertices = centerline.vertices
    try:
        segments = centerline_segments([v.xy for v in vertices], [v.corner_radius_m for v in vertices])
    except GeometryError as error:
        warning = f"centerline {centerline.name}: {error} (drawn through its vertices)"
        runs = finite_runs(np.array([v.xy for v in vertices], dtype=float) * units_per_m)
        return (np.column_stack((runs[0], np.zeros(len(runs[0])))) if runs else None), warning
    return bulge_rows(segments, units_per_m), None


def arc_span_rad(arc: ArcRecord) -> float:
    """Counter-clockwise angle from the arc's start to its end, in (0, 2 pi]."""
    return (arc.end_angle_rad - arc.start_angle_rad) % (2.0 * math.pi) or 2.0 * math.pi


def on_arc(xy_m: FloatArray, arc: ArcRecord, tolerance_m: float) -> BoolArray:
    """Which points lie on ``arc`` (its circle, within its angles), within ``tolerance_m``."""
    offset = xy_m - np.asarray(arc.center_m)
    radial = np.abs(np.hypot(offset[:, 0], offset[:, 1]) - arc.radius_m)
    slack = tolerance_m / arc.radius_m
    along = (np.arctan2(offset[:, 1], offset[:, 0]) - arc.start_angle_rad + slack) % (2.0 * math.pi)
    mask: BoolArray = (radial <= tolerance_m) & (along <= arc_span_rad(arc) + 2.0 * slack)
    return mask


def off_arc_runs(edge_xy_m: FloatArray, arc: ArcRecord, tolerance_m: float) -> list[FloatArray]:
    """The parts of a fillet edge that are not on its arc (the tapers), each extended to the arc
    point next to it so the linework stays connected to the ARC drawn for the rest."""
    off = np.flatnonzero(~on_arc(edge_xy_m, arc, tolerance_m))
    if off.size == 0:
        return []
    groups = np.split(off, np.flatnonzero(np.diff(off) > 1) + 1)
    last = len(edge_xy_m) - 1
    runs = [edge_xy_m[max(g[0] - 1, 0):min(g[-1] + 1, last) + 1] for g in groups]
    return [run for run in runs if len(run) >= 2]


def junction_ids(result: LayoutResult) -> list[str]:
    return sorted(result.junctions)


def design_movements(result: LayoutResult) -> Iterator[MovementResult]:
    """Movements that are part of the design (not excluded), junctions and keys sorted."""
    for junction_id in junction_ids(result):
        for movement in sorted(result.junctions[junction_id].movements, key=lambda m: m.key):
            if not movement.excluded:
                yield movement


def turn_arcs(result: LayoutResult) -> list[ArcRecord]:
    """Each movement turn arc once: both directions through a corner share one arc."""
    unique: dict[tuple[float, ...], ArcRecord] = {}
    for movement in design_movements(result):
        arc = movement.centerline_arc
        if arc is not None:
            key = (*arc.center_m, arc.radius_m, arc.start_angle_rad % math.tau, arc.end_angle_rad % math.tau)
            unique.setdefault(tuple(round(value, ARC_KEY_DECIMALS) for value in key), arc)
    return list(unique.values())


def fillet_arcs(result: LayoutResult) -> list[ArcRecord]:
    return [fillet.arc for junction_id in junction_ids(result)
            for fillet in sorted(result.junctions[junction_id].fillets, key=lambda f: f.corner_key)
            if fillet.arc is not None]


def aircraft_names(layout: Layout, result: LayoutResult) -> list[str]:
    """Fleet order first, then any other aircraft the tracks name."""
    names = [aircraft.name for aircraft in layout.fleet]
    return names + [tracks.aircraft_name for m in design_movements(result) for tracks in m.tracks]


def tracks_of(result: LayoutResult, aircraft_name: str) -> Iterator[AircraftTracks]:
    for movement in design_movements(result):
        yield from (tracks for tracks in movement.tracks if tracks.aircraft_name == aircraft_name)


def model_extent_size_m(layout: Layout, result: LayoutResult) -> float:
    """The larger side of the box around the layout and its results, metres (0 when empty)."""
    corners: list[tuple[float, float]] = []
    for geometry in (result.total_pavement, result.straight_pavement, result.shoulders,
                     clearance_zones(layout, 1.0)):
        if geometry is not None and not geometry.is_empty:
            xmin, ymin, xmax, ymax = geometry.bounds
            corners += [(xmin, ymin), (xmax, ymax)]
    corners += [v.xy for centerline in layout.centerlines for v in centerline.vertices]
    corners += [v.xy for runway in layout.runways for v in runway.vertices]
    corners += [xy for fixed_object in layout.objects for xy in fixed_object.outline]
    corners += [xy for pavement in layout.existing_pavements for xy in pavement.outline]
    tracks = [t for movement in design_movements(result) for t in movement.tracks]
    arrays = [np.asarray(a, dtype=float).reshape(-1, 2)
              for t in tracks for a in (t.wingtip_left_xy, t.wingtip_right_xy)]
    points = np.vstack([np.asarray(corners, dtype=float).reshape(-1, 2), *arrays])
    points = points[np.all(np.isfinite(points), axis=1)]
    return float(np.ptp(points, axis=0).max()) if len(points) else 0.0


def label_anchor(points_m: list[tuple[float, float]], avoid_m: list[tuple[float, float]],
                 clearance_m: float) -> tuple[tuple[float, float], float] | None:
    """Where to label a line: the middle of its longest stretch that keeps ``clearance_m`` from
    the ``avoid_m`` points (junctions, where linework crowds), and the line's heading there."""
    finite = [xy for xy in points_m if all(map(math.isfinite, xy))]
    if len(finite) < 2 or shapely.LineString(finite).length == 0.0:
        return None
    line = shapely.LineString(finite)
    # Only the points within reach can cut the line; a large layout has thousands of others.
    gaps_m = shapely.distance(shapely.points(np.asarray(avoid_m, dtype=float).reshape(-1, 2)), line)
    near = [xy for xy, gap_m in zip(avoid_m, gaps_m, strict=True) if gap_m <= clearance_m]
    free = line.difference(shapely.MultiPoint(near).buffer(clearance_m)) if near else line
    stretches = [part for part in getattr(free, "geoms", [free]) if part.geom_type == "LineString"]
    stretches = [part for part in stretches if part.length > 0.0] or [line]
    longest = max(stretches, key=lambda part: part.length)
    middle = longest.interpolate(0.5, normalized=True)
    step = longest.interpolate(min(longest.length, 0.5 * longest.length + 1e-3))
    before = longest.interpolate(max(0.0, 0.5 * longest.length - 1e-3))
    heading = math.atan2(step.y - before.y, step.x - before.x)
    return (middle.x, middle.y), heading


def _round_join_segments(radius_m: float, tolerance_m: float) -> int:
    """Segments per quarter circle whose sagitta R (1 - cos(step / 2)) stays within the tolerance."""
    if tolerance_m >= radius_m:
        return 1
    step_rad = 2.0 * math.acos(1.0 - tolerance_m / radius_m)
    return max(1, math.ceil(math.pi / 2.0 / step_rad))


def clearance_zones(layout: Layout, tolerance_m: float) -> BaseGeometry | None:
    """Where objects must not stand, as the canvas shows it (app/model/scene.py): each centerline
    widened on both sides by the rule set's centerline-to-object separation for the fleet's
    governing aircraft, flat at the ends; None without a fleet. Curves within ``tolerance_m``."""
    bands = []
    half_widths_m = clearance_half_widths_m(layout)
    for centerline in layout.centerlines:
        half_width_m = half_widths_m.get(centerline.kind)
        vertices = centerline.vertices
        try:
            segments = centerline_segments([v.xy for v in vertices], [v.corner_radius_m for v in vertices])
        except GeometryError:
            continue  # the centerline itself is reported (a warning of its own); no zone to draw
        if half_width_m is not None and half_width_m > 0.0:
            line = shapely.LineString(flatten(segments, tolerance_m))
            bands.append(line.buffer(half_width_m, cap_style="flat", join_style="round",
                                     quad_segs=_round_join_segments(half_width_m, tolerance_m)))
    return shapely.union_all(bands) if bands else None
