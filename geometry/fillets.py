"""The fillet a contractor can build at the inside corner between two legs of a junction.

Corner: junction point J, legs A and B leaving J along headings ``h_a`` and ``h_b`` (less than
180 degrees apart), straight pavement half-widths ``w_a``, ``w_b``, and the turn's centerline arc
of radius R about C0, tangent to both leg centerlines. The legs' inner edges meet at P.

Fillet form: the edge leaves leg A's inner edge at Q_a, L_a from J measured along leg A, runs
straight (the taper) to touch the circle of radius F about C0, follows it, and runs straight to
leg B's inner edge at Q_b (L_b from J). No taper (the circle meets the edge directly) and no
fillet at all are the degenerate forms.

Method (docs/pavement.md): seen from C0, a required point at polar angle w and distance rho sticks
out of the circle over the directions w +/- acos(F / rho); it stays paved exactly when that window
overlaps the arc's directions [phi_a, turn - phi_b] (phi: where each taper touches the circle).
For a fixed F the steepest tapers (shortest L) and the added area are closed forms; nested grids
over F in [0, largest admissible F] find the least area (:mod:`geometry.fillet_search`). Only the
points that can set a steepest taper take part, and the search stops once all that is left rounds
to the same centimetre. F is rounded down and L up to 0.01 m,
which keeps containment, and shapely checks the result (a prepared ``covers``; the tolerant
measure only when it says no). The work is done in a local frame: origin
J, x along leg A, y toward leg B (mirrored when B is clockwise of A), so C0 = (R / tan(theta/2), R).
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace
from typing import cast

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry import LineString, Polygon
from shapely.geometry.base import BaseGeometry

from geometry.errors import FilletDoesNotFitError, InvalidCornerError, NonFiniteInputError
from geometry.fillet_search import (
    STEPS_PER_M,
    CornerFrame,
    SearchPoints,
    added_area_m2,
    least_area_radius_m,
    least_of,
    search_points,
    spaced,
    taper_angles,
    taper_start_m,
)
from geometry.pavement import ARC_SAGITTA_M, containment_gap
from geometry.primitives import FloatArray, Point

COVER_TOLERANCE_M = 1e-5       # required pavement within 10 micrometres of the straights is covered
AREA_TOLERANCE_M2 = 1e-6       # less uncovered area than this is none
MIN_CORNER_RAD = math.radians(1.0)
CENTRE_TOLERANCE_M = 1e-3
# The outline reaches this far into the straights: edges shared exactly with them make GEOS unions
# drop the fillet now and then (libgeos/geos issues 965 and 1344); an overlap is robust.
OVERLAP_M = 0.001


@dataclass(frozen=True, slots=True)
class FilletArc:
    """The fillet's circular arc, exact: counter-clockwise from start to end angle."""

    center: Point
    radius_m: float
    start_angle_rad: float
    end_angle_rad: float


@dataclass(frozen=True, slots=True, eq=False)
class Fillet:
    """A buildable fillet at one corner.

    fillet_radius_m: F (rounded down to 0.01 m). taper_a_m, taper_b_m: L_a, L_b, distances from
    the junction point along each leg's centerline to where the fillet edge leaves the straight
    edge (rounded up to 0.01 m). taper_*_length_m: length of each straight taper (0: none).
    outline: the added pavement between the straight edges and the fillet edge, reaching
    :data:`OVERLAP_M` into the straights so that unions with them are robust; area_m2 is the
    exact added area (true arc, no overlap).
    edge: the fillet edge from leg A to leg B; arc: its exact arc (None when it has no length).
    max_width_from_centerline_m: largest distance from the turn's centerline to the fillet edge,
    R - F. uncovered_area_m2: required area (m^2) left outside the straights and the fillet
    (beyond the fillet's reach, e.g. past the end of a straight), 0 when all is covered.
    """

    corner_key: str
    fillet_radius_m: float
    taper_a_m: float
    taper_b_m: float
    center: Point
    outline: Polygon
    edge: LineString
    arc: FilletArc | None
    area_m2: float
    max_width_from_centerline_m: float
    taper_a_length_m: float
    taper_b_length_m: float
    uncovered_area_m2: float


_Parts = npt.NDArray[np.object_]  # shapely geometries (the parts of the target)


def _corner_frame(junction_point: Point, heading_a_rad: float, heading_b_rad: float, width_a_m: float,
                  width_b_m: float, arc_center: Point, radius_m: float) -> CornerFrame:
    values = (*junction_point, heading_a_rad, heading_b_rad, width_a_m, width_b_m, *arc_center, radius_m)
    if not all(math.isfinite(value) for value in values):
        raise NonFiniteInputError(f"a corner coordinate, heading, width or radius is not finite: {values}")
    if min(width_a_m, width_b_m, radius_m) <= 0.0:
        raise InvalidCornerError("pavement widths and the turn radius must be positive")
    signed = math.remainder(heading_b_rad - heading_a_rad, 2.0 * math.pi)
    if not MIN_CORNER_RAD <= abs(signed) <= math.pi - MIN_CORNER_RAD:
        raise InvalidCornerError(f"the legs are {math.degrees(abs(signed)):.1f} degrees apart: a corner "
                                 f"needs legs between 1 and 179 degrees apart")
    frame = CornerFrame((float(junction_point[0]), float(junction_point[1])), heading_a_rad,
                        1.0 if signed > 0.0 else -1.0, abs(signed), width_a_m / 2.0, width_b_m / 2.0,
                        radius_m)
    if radius_m <= max(frame.half_a_m, frame.half_b_m):
        raise InvalidCornerError(f"the turn radius {radius_m:.2f} m is not larger than half the pavement "
                                 f"width ({max(width_a_m, width_b_m) / 2.0:.2f} m): use a larger radius")
    expected = frame.point_to_world(frame.tangent_m, frame.radius_m)
    if math.dist(expected, arc_center) > max(CENTRE_TOLERANCE_M, 1e-6 * radius_m):
        raise InvalidCornerError(f"the turn arc centre ({arc_center[0]:.3f}, {arc_center[1]:.3f}) is not at "
                                 f"radius {radius_m:.2f} m from both leg centerlines")
    return frame


def _reach_m(frame: CornerFrame, required: BaseGeometry) -> float:
    """How far the corner's wedge reaches along each inner edge: past all of ``required``."""
    corner_x, corner_y = frame.corner_point()
    minx, miny, maxx, maxy = required.bounds
    return 2.0 * max(math.dist(frame.junction, xy) for xy in ((minx, miny), (maxx, maxy))) \
        + 2.0 * frame.radius_m + math.hypot(corner_x, corner_y)


def _wedge(frame: CornerFrame, reach_m: float) -> Polygon:
    """The region beyond both inner edges (apex P), a parallelogram ``reach_m`` along each edge."""
    corner = frame.corner_point()
    a, b = np.array([1.0, 0.0]), np.array([math.cos(frame.angle_rad), math.sin(frame.angle_rad)])
    return Polygon(frame.to_world(np.array([corner, corner + reach_m * a, corner + reach_m * (a + b),
                                            corner + reach_m * b])))


@dataclass(frozen=True, slots=True)
class _Target:
    """The required area off the straights and inside the corner: its parts, and their vertices
    in the corner's local frame, x and y apart."""

    parts: _Parts
    x_m: FloatArray
    y_m: FloatArray


def _target(frame: CornerFrame, required: BaseGeometry, off_straights: _Parts) -> _Target:
    """The parts of the required area off the straights that lie inside the corner, beyond both
    inner edges. A part whose vertices all lie in the (convex) wedge is inside it as it is; only
    the others are clipped by shapely."""
    if len(off_straights) == 0:
        return _Target(off_straights, np.empty(0), np.empty(0))
    coordinates, index = shapely.get_coordinates(off_straights, return_index=True)
    x_m, y_m = frame.local_xy(coordinates)
    corner_x, corner_y = frame.corner_point()
    along_b = (y_m - corner_y) / math.sin(frame.angle_rad)
    along_a = (x_m - corner_x) - along_b * math.cos(frame.angle_rad)
    reach_m = _reach_m(frame, required)
    outside = (np.minimum(along_a, along_b) < 0.0) | (np.maximum(along_a, along_b) > reach_m)
    if not np.count_nonzero(outside):
        return _Target(off_straights, x_m, y_m)
    whole = np.bincount(index, weights=outside, minlength=len(off_straights)) == 0
    clipped = shapely.get_parts(shapely.intersection(off_straights[~whole], _wedge(frame, reach_m)))
    clipped = clipped[~shapely.is_empty(clipped)]
    clipped_x, clipped_y = frame.local_xy(shapely.get_coordinates(clipped))
    kept = whole[index]
    return _Target(np.concatenate((off_straights[whole], clipped)), np.concatenate((x_m[kept], clipped_x)),
                   np.concatenate((y_m[kept], clipped_y)))


def _points(frame: CornerFrame, target: _Target) -> SearchPoints:
    """The target's vertices and the edges' corner as seen from C0, for the search."""
    corner = frame.corner_point()
    to_centre_x = frame.tangent_m - np.concatenate((target.x_m, corner[:1]))
    to_centre_y = frame.radius_m - np.concatenate((target.y_m, corner[1:]))
    polar = np.arctan2(to_centre_x, to_centre_y)
    half_turn = frame.turn_rad / 2.0
    polar = half_turn + np.remainder(polar - half_turn + math.pi, 2.0 * math.pi) - math.pi
    distance = np.hypot(to_centre_x, to_centre_y)
    centre = shapely.points(frame.point_to_world(frame.tangent_m, frame.radius_m))
    max_radius_m = min(least_of(shapely.distance(centre, target.parts)), float(distance[-1]))
    return search_points(polar, np.maximum(distance, 1e-12), frame.turn_rad, max_radius_m)


@dataclass(frozen=True, slots=True)
class _Side:
    """One side of the fillet edge in leg A's local frame: taper angle, where the edge leaves the
    straight edge (point and distance from J) and where it meets the circle."""

    phi_rad: float
    leaves: tuple[float, float]
    touches: tuple[float, float]
    start_m: float


def _side(frame: CornerFrame, half_m: float, radius_m: float, start_m: float) -> _Side:
    """The taper from the edge point at ``start_m`` (leg A's frame) tangent to the circle."""
    clearance_m = frame.radius_m - half_m
    offset_x, offset_y = start_m - frame.tangent_m, half_m - frame.radius_m
    distance_m = math.hypot(offset_x, offset_y)
    least = math.acos(min(clearance_m / radius_m, 1.0)) if radius_m > 0.0 else 0.0
    phi = least
    if distance_m > radius_m:
        phi = max(least, math.atan2(-offset_x, -offset_y) + math.acos(radius_m / distance_m))
    touches = (frame.tangent_m - radius_m * math.sin(phi), frame.radius_m - radius_m * math.cos(phi))
    if phi <= least and radius_m > clearance_m:  # the circle meets the edge directly: no taper
        return _Side(phi, touches, touches, touches[0])
    return _Side(phi, (start_m, half_m), touches, start_m)


def _arc_xy(frame: CornerFrame, radius_m: float, first_rad: float,
            last_rad: float) -> tuple[FloatArray, FloatArray]:
    """Points on the circle (chords inside it, so the outline holds a little more pavement), x
    and y apart."""
    count = 1
    if radius_m > ARC_SAGITTA_M and last_rad > first_rad:
        count = math.ceil((last_rad - first_rad) / (2.0 * math.acos(1.0 - ARC_SAGITTA_M / radius_m)))
    psi = spaced(first_rad, last_rad, count + 1)
    return frame.tangent_m - radius_m * np.sin(psi), frame.radius_m - radius_m * np.cos(psi)


def _edge_xy(frame: CornerFrame, radius_m: float, side_a: _Side, leaves_b: tuple[float, float],
             last_rad: float) -> tuple[FloatArray, FloatArray]:
    """The fillet edge from leg A to leg B in leg A's frame, x and y apart, without points within
    1e-9 m of the one before: a straight chamfer when the tapers meet before the circle, otherwise
    taper, arc, taper."""
    (start_x, start_y), (end_x, end_y) = side_a.leaves, leaves_b
    arc_x, arc_y = (np.empty(0), np.empty(0)) if last_rad < side_a.phi_rad else \
        _arc_xy(frame, radius_m, side_a.phi_rad, last_rad)
    x_m, y_m = np.concatenate(([start_x], arc_x, [end_x])), np.concatenate(([start_y], arc_y, [end_y]))
    keep = np.concatenate(([True], np.hypot(x_m[1:] - x_m[:-1], y_m[1:] - y_m[:-1]) > 1e-9))
    return x_m[keep], y_m[keep]


def _world_arc(frame: CornerFrame, radius_m: float, touch_a: tuple[float, float],
               touch_b: tuple[float, float]) -> FilletArc:
    centre = frame.point_to_world(frame.tangent_m, frame.radius_m)
    end_a, end_b = frame.point_to_world(*touch_a), frame.point_to_world(*touch_b)
    angle_a = math.atan2(end_a[1] - centre[1], end_a[0] - centre[0])
    angle_b = math.atan2(end_b[1] - centre[1], end_b[0] - centre[0])
    # In the local frame the arc runs clockwise from leg A to leg B; mirroring reverses that.
    start, end = (angle_b, angle_a) if frame.side > 0.0 else (angle_a, angle_b)
    return FilletArc(centre, radius_m, start, start + (end - start) % (2.0 * math.pi))


def _build(frame: CornerFrame, corner_key: str, radius_m: float, start_a_m: float,
           start_b_m: float) -> Fillet:
    side_a = _side(frame, frame.half_a_m, radius_m, start_a_m)
    side_b = _side(frame, frame.half_b_m, radius_m, start_b_m)  # in leg B's mirror image
    leaves_b, touches_b = frame.mirror_point(*side_b.leaves), frame.mirror_point(*side_b.touches)
    last_rad = frame.turn_rad - side_b.phi_rad
    crossing = last_rad < side_a.phi_rad  # the tapers meet before the circle: a straight chamfer
    edge_x, edge_y = _edge_xy(frame, radius_m, side_a, leaves_b, last_rad)
    corner_x, corner_y = frame.corner_point(OVERLAP_M)
    inset_b = frame.mirror_point(side_b.leaves[0], frame.half_b_m - OVERLAP_M)
    world = frame.world_of(np.concatenate(([corner_x, edge_x[0]], edge_x, [inset_b[0]])),
                           np.concatenate(([corner_y, frame.half_a_m - OVERLAP_M], edge_y, [inset_b[1]])))
    outline = cast(Polygon, shapely.polygons(world))
    area_m2 = float(outline.area) if crossing else float(added_area_m2(
        frame, radius_m, np.array([[side_a.phi_rad], [side_b.phi_rad]]))[0])
    has_arc = radius_m > 0.0 and last_rad > side_a.phi_rad
    return Fillet(
        corner_key=corner_key, fillet_radius_m=radius_m, taper_a_m=side_a.start_m, taper_b_m=side_b.start_m,
        center=frame.point_to_world(frame.tangent_m, frame.radius_m), outline=outline,
        edge=cast(LineString, shapely.linestrings(world[2:2 + len(edge_x)])),
        arc=_world_arc(frame, radius_m, side_a.touches, touches_b) if has_arc else None,
        area_m2=area_m2, max_width_from_centerline_m=frame.radius_m - radius_m,
        taper_a_length_m=math.dist(side_a.leaves, side_a.touches),
        taper_b_length_m=math.dist(side_b.leaves, side_b.touches), uncovered_area_m2=0.0)


def _rounded(frame: CornerFrame, points: SearchPoints, corner_key: str, radius_m: float) -> Fillet:
    """The fillet at F rounded down, with each L from the steepest taper there, rounded up."""
    radius_m = max(0.0, math.floor(radius_m * STEPS_PER_M) / STEPS_PER_M)
    phi_rad = taper_angles(frame, points, np.array([radius_m]))
    start_a, start_b = (float(start) for start in taper_start_m(frame, phi_rad, radius_m)[:, 0])
    return _build(frame, corner_key, radius_m, math.ceil(start_a * STEPS_PER_M) / STEPS_PER_M,
                  math.ceil(start_b * STEPS_PER_M) / STEPS_PER_M)


def build_fillet(junction_point: Point, heading_a_rad: float, heading_b_rad: float, width_a_m: float,
                 width_b_m: float, arc_center: Point, centerline_radius_m: float, corner_key: str,
                 fillet_radius_m: float, taper_a_m: float, taper_b_m: float) -> Fillet:
    """The fillet of given dimensions F, L_a, L_b at a corner given as to :func:`fit_fillet`
    (a planner's own dimensions, or a check of a fitted fillet). A taper start inside the circle
    gives no taper on that side; ``uncovered_area_m2`` is 0 (nothing is required of it).

    Raises
    ------
    FilletDoesNotFitError : F is negative or reaches past the corner of the straight edges, or
        a taper starts nearer the junction than that corner.
    """
    frame = _corner_frame(junction_point, heading_a_rad, heading_b_rad, width_a_m, width_b_m, arc_center,
                          centerline_radius_m)
    if not all(math.isfinite(value) for value in (fillet_radius_m, taper_a_m, taper_b_m)):
        raise NonFiniteInputError(f"fillet dimensions must be finite: F {fillet_radius_m!r}, "
                                  f"L_a {taper_a_m!r}, L_b {taper_b_m!r}")
    corner = frame.corner_point()
    largest_m = float(np.hypot(*(corner - frame.center)))
    if not 0.0 <= fillet_radius_m <= largest_m:
        raise FilletDoesNotFitError(f"a fillet radius must lie between 0 and {largest_m:.2f} m (the circle "
                                    f"through the corner of the straight edges), got {fillet_radius_m}")
    corner_b = frame.mirror_b_to_a(corner)[0]
    if taper_a_m < corner[0] or taper_b_m < corner_b[0]:
        raise FilletDoesNotFitError(f"a taper must start at least {corner[0]:.2f} m (leg A) and "
                                    f"{corner_b[0]:.2f} m (leg B) from the junction, at the edges' corner")
    return _build(frame, corner_key, fillet_radius_m, taper_a_m, taper_b_m)


def _left_out_m2(outline: Polygon, target: _Parts) -> float | None:
    """The area of the target left outside the outline, or None when more is left out than the
    tolerances allow (AREA_TOLERANCE_M2, COVER_TOLERANCE_M). Shapely's covers (prepared) first;
    the tolerant measure only when it says no."""
    shapely.prepare(outline)
    if np.count_nonzero(shapely.covers(outline, target)) == len(target):
        return 0.0
    gap = containment_gap(shapely.union_all(target), outline)
    held = gap.area_m2 < AREA_TOLERANCE_M2 and gap.max_distance_m <= COVER_TOLERANCE_M
    return gap.area_m2 if held else None


def _uncovered_area_m2(off_straights: _Parts, outline: Polygon) -> float:
    """The area of the required area off the straights left outside the (prepared) outline."""
    if np.count_nonzero(shapely.covers(outline, off_straights)) == len(off_straights):
        return 0.0
    return float(shapely.union_all(off_straights).difference(outline).area)


def straights_cover(straights: BaseGeometry | Sequence[BaseGeometry]) -> BaseGeometry:
    """The straights grown by :data:`COVER_TOLERANCE_M`: what :func:`uncovered_parts` takes away.
    A caller fitting several corners against the same straights grows them once with this."""
    paved = straights if isinstance(straights, BaseGeometry) else shapely.union_all(list(straights))
    return paved.buffer(COVER_TOLERANCE_M, join_style="mitre")


def uncovered_parts(required: BaseGeometry, straights: BaseGeometry | Sequence[BaseGeometry], *,
                    cover: BaseGeometry | None = None) -> _Parts:
    """The parts of the required area that the straights, grown by :data:`COVER_TOLERANCE_M`, leave
    uncovered: all :func:`fit_fillet` reads of the straights. ``cover``: :func:`straights_cover`
    of ``straights``, when the caller has it (the corners of a junction all read the same)."""
    grown = straights_cover(straights) if cover is None else cover
    parts: _Parts = shapely.get_parts(required.difference(grown))
    return parts


def fit_fillet(required: BaseGeometry, straights: BaseGeometry | Sequence[BaseGeometry],
               junction_point: Point, heading_a_rad: float, heading_b_rad: float, width_a_m: float,
               width_b_m: float, arc_center: Point, centerline_radius_m: float,
               corner_key: str, *, off_straights: _Parts | None = None) -> Fillet | None:
    """The least-area fillet of the usual form that contains the required pavement at a corner.

    Parameters
    ----------
    required : union of the required areas of every movement through the corner, every aircraft.
    straights : the legs' straight pavement at design width (a geometry or a list of them).
    junction_point, heading_a_rad, heading_b_rad : the junction and the legs' headings away from it.
    width_a_m, width_b_m : the legs' design widths.
    arc_center, centerline_radius_m : the turn's centerline arc, tangent to both legs.
    corner_key : carried into the result.
    off_straights : :func:`uncovered_parts` of ``required`` and ``straights``, when the caller has
        it already (the fillet depends on the straights through it alone).

    Returns
    -------
    Fillet, or None when the straight pavement holds the required area.

    Raises
    ------
    InvalidCornerError : legs in line, radius not above half the width, centre not tangent.
    FilletDoesNotFitError : no fillet of this form can hold the required area.

    Examples
    --------
    >>> import shapely
    >>> legs = [shapely.box(0, -5, 100, 5), shapely.box(-5, 0, 5, 100)]
    >>> needed = shapely.Point(8, 8).buffer(4.0)
    >>> fillet = fit_fillet(needed, legs, (0, 0), 0.0, math.pi / 2, 10.0, 10.0, (30, 30), 30.0, "J1")
    >>> fillet.outline.union(shapely.union_all(legs)).contains(needed)
    True
    """
    frame = _corner_frame(junction_point, heading_a_rad, heading_b_rad, width_a_m, width_b_m, arc_center,
                          centerline_radius_m)
    if required.is_empty:
        return None
    if off_straights is None:
        off_straights = uncovered_parts(required, straights)
    target = _target(frame, required, off_straights)
    if float(shapely.area(target.parts).sum()) < AREA_TOLERANCE_M2:
        return None
    points = _points(frame, target)
    radius_m = least_area_radius_m(frame, points)
    for attempt in range(3):  # a safeguard: the closed form already keeps the check
        fillet = _rounded(frame, points, corner_key, radius_m - attempt / STEPS_PER_M)
        left_out_m2 = _left_out_m2(fillet.outline, target.parts)
        if left_out_m2 is not None:
            break
    else:
        raise FilletDoesNotFitError(f"corner {corner_key}: the fitted fillet does not contain the "
                                    f"required pavement; check the corner's geometry")
    if target.parts is not off_straights:  # some required area lies outside the corner
        left_out_m2 = _uncovered_area_m2(off_straights, fillet.outline)
    return replace(fillet, uncovered_area_m2=left_out_m2) if left_out_m2 else fillet
