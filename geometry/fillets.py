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
over F in [0, largest admissible F] find the least area. F is rounded down and L up to 0.01 m,
which keeps containment, and shapely checks the result. The work is done in a local frame: origin
J, x along leg A, y toward leg B (mirrored when B is clockwise of A), so C0 = (R / tan(theta/2), R).
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace
from typing import cast

import numpy as np
import shapely
from shapely.geometry import LineString, Polygon
from shapely.geometry.base import BaseGeometry

from geometry.errors import FilletDoesNotFitError, InvalidCornerError, NonFiniteInputError
from geometry.pavement import ARC_SAGITTA_M, containment_gap
from geometry.primitives import FloatArray, Point

COVER_TOLERANCE_M = 1e-5       # required pavement within 10 micrometres of the straights is covered
AREA_TOLERANCE_M2 = 1e-6       # less uncovered area than this is none
STEPS_PER_M = 100.0            # reported F and L are whole centimetres
MIN_TAPER_ANGLE_RAD = 1e-3     # a taper flatter than 1 in 1000 never ends: treated as unbuildable
MIN_CORNER_RAD = math.radians(1.0)
RADIUS_GRID_SIZE = 32          # F values per round of the search
SEARCH_ROUNDS = 4              # each round narrows the bracket 15-fold: 2e-5 of the range at the end
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


@dataclass(frozen=True, slots=True)
class _Frame:
    """The corner in its local frame (see the module notes)."""

    junction: Point
    heading_a_rad: float
    side: float            # +1 when leg B is counter-clockwise of leg A, -1 when clockwise
    angle_rad: float       # theta, between the legs
    half_a_m: float
    half_b_m: float
    radius_m: float

    @property
    def turn_rad(self) -> float:
        return math.pi - self.angle_rad

    @property
    def tangent_m(self) -> float:
        return self.radius_m / math.tan(self.angle_rad / 2.0)

    @property
    def center(self) -> FloatArray:
        return np.array([self.tangent_m, self.radius_m])

    def corner_point(self, inset_m: float = 0.0) -> FloatArray:
        """Where the inner edges meet (moved ``inset_m`` into both straights)."""
        half_a, half_b = self.half_a_m - inset_m, self.half_b_m - inset_m
        return np.array([(half_b + half_a * math.cos(self.angle_rad)) / math.sin(self.angle_rad), half_a])

    def to_local(self, xy: FloatArray) -> FloatArray:
        d = np.asarray(xy, dtype=float).reshape(-1, 2) - np.asarray(self.junction)
        c, s = math.cos(self.heading_a_rad), math.sin(self.heading_a_rad)
        return np.column_stack((c * d[:, 0] + s * d[:, 1], self.side * (c * d[:, 1] - s * d[:, 0])))

    def to_world(self, xy: FloatArray) -> FloatArray:
        local = np.asarray(xy, dtype=float).reshape(-1, 2)
        x, y = local[:, 0], self.side * local[:, 1]
        c, s = math.cos(self.heading_a_rad), math.sin(self.heading_a_rad)
        return np.column_stack((self.junction[0] + c * x - s * y, self.junction[1] + s * x + c * y))

    def mirror_b_to_a(self, xy: FloatArray) -> FloatArray:
        """Reflection across the corner's bisector: leg B onto leg A (and back)."""
        m = np.array([math.cos(self.angle_rad / 2.0), math.sin(self.angle_rad / 2.0)])
        local = np.asarray(xy, dtype=float).reshape(-1, 2)
        return np.asarray(2.0 * np.outer(local @ m, m) - local, dtype=float)


@dataclass(frozen=True, slots=True)
class _Points:
    """Boundary points of the required area outside the straights, as seen from C0."""

    polar_rad: FloatArray  # from the foot of C0 on leg A, positive toward J and leg B
    distance_m: FloatArray
    max_radius_m: float    # the disc of radius F must not reach into the required area


def _corner_frame(junction_point: Point, heading_a_rad: float, heading_b_rad: float, width_a_m: float,
                  width_b_m: float, arc_center: Point, radius_m: float) -> _Frame:
    values = (*junction_point, heading_a_rad, heading_b_rad, width_a_m, width_b_m, *arc_center, radius_m)
    if not all(math.isfinite(value) for value in values):
        raise NonFiniteInputError(f"a corner coordinate, heading, width or radius is not finite: {values}")
    if min(width_a_m, width_b_m, radius_m) <= 0.0:
        raise InvalidCornerError("pavement widths and the turn radius must be positive")
    signed = math.remainder(heading_b_rad - heading_a_rad, 2.0 * math.pi)
    if not MIN_CORNER_RAD <= abs(signed) <= math.pi - MIN_CORNER_RAD:
        raise InvalidCornerError(f"the legs are {math.degrees(abs(signed)):.1f} degrees apart: a corner "
                                 f"needs legs between 1 and 179 degrees apart")
    frame = _Frame((float(junction_point[0]), float(junction_point[1])), heading_a_rad,
                   1.0 if signed > 0.0 else -1.0, abs(signed), width_a_m / 2.0, width_b_m / 2.0, radius_m)
    if radius_m <= max(frame.half_a_m, frame.half_b_m):
        raise InvalidCornerError(f"the turn radius {radius_m:.2f} m is not larger than half the pavement "
                                 f"width ({max(width_a_m, width_b_m) / 2.0:.2f} m): use a larger radius")
    expected = frame.to_world(frame.center)[0]
    if math.dist(expected, arc_center) > max(CENTRE_TOLERANCE_M, 1e-6 * radius_m):
        raise InvalidCornerError(f"the turn arc centre ({arc_center[0]:.3f}, {arc_center[1]:.3f}) is not at "
                                 f"radius {radius_m:.2f} m from both leg centerlines")
    return frame


def _target(frame: _Frame, required: BaseGeometry, straights: BaseGeometry) -> BaseGeometry:
    """The part of ``required`` inside the corner (beyond both inner edges) and off the straights."""
    corner = frame.corner_point()
    minx, miny, maxx, maxy = required.bounds
    reach_m = 2.0 * max(math.dist(frame.junction, xy) for xy in ((minx, miny), (maxx, maxy))) \
        + 2.0 * frame.radius_m + np.linalg.norm(corner)
    a, b = np.array([1.0, 0.0]), np.array([math.cos(frame.angle_rad), math.sin(frame.angle_rad)])
    wedge = Polygon(frame.to_world(np.array([corner, corner + reach_m * a, corner + reach_m * (a + b),
                                             corner + reach_m * b])))
    covered = straights.buffer(COVER_TOLERANCE_M, join_style="mitre")
    return cast(BaseGeometry, required.intersection(wedge).difference(covered))


def _points(frame: _Frame, target: BaseGeometry) -> _Points:
    local = np.vstack((frame.to_local(shapely.get_coordinates(target)), frame.corner_point()))
    offset = local - frame.center
    polar = np.arctan2(-offset[:, 0], -offset[:, 1])
    half_turn = frame.turn_rad / 2.0
    polar = half_turn + np.remainder(polar - half_turn + math.pi, 2.0 * math.pi) - math.pi
    centre = shapely.points(frame.to_world(frame.center)[0])
    max_radius_m = min(float(shapely.distance(centre, target)), float(np.hypot(*offset[-1])))
    return _Points(polar, np.maximum(np.hypot(offset[:, 0], offset[:, 1]), 1e-12), max_radius_m)


def _least_angle(clearance_m: float, radius_m: FloatArray) -> FloatArray:
    """Taper angle at which the tangent meets the edge on the circle (no taper), for F > clearance."""
    ratio = np.divide(clearance_m, radius_m, out=np.full(radius_m.shape, 2.0), where=radius_m > 0.0)
    return np.asarray(np.arccos(np.minimum(ratio, 1.0)), dtype=float)


@dataclass(frozen=True, slots=True)
class _Tapers:
    """For each F of a search: taper angles (phi_a, phi_b) and whether they keep every point paved."""

    phi_a: FloatArray
    phi_b: FloatArray
    feasible: FloatArray


def _tapers(frame: _Frame, points: _Points, radius_m: FloatArray) -> _Tapers:
    """The steepest admissible taper angles for each F, shared out when the two tapers would meet
    before the circle (any split between the two limits is admissible; the middle is taken)."""
    window = np.arccos(np.minimum(radius_m[:, None] / points.distance_m[None, :], 1.0))
    steepest_a = np.min(points.polar_rad + window, axis=1)
    steepest_b = np.min((frame.turn_rad - points.polar_rad) + window, axis=1)
    least_a = _least_angle(frame.radius_m - frame.half_a_m, radius_m)
    least_b = _least_angle(frame.radius_m - frame.half_b_m, radius_m)
    feasible = ((radius_m <= points.max_radius_m) & (steepest_a >= np.maximum(least_a, MIN_TAPER_ANGLE_RAD))
                & (steepest_b >= np.maximum(least_b, MIN_TAPER_ANGLE_RAD)))
    turn = frame.turn_rad
    shared = (np.maximum(least_a, turn - steepest_b) + np.minimum(steepest_a, turn - least_b)) / 2.0
    crossing = steepest_a + steepest_b > turn
    return _Tapers(np.where(crossing, shared, steepest_a), np.where(crossing, turn - shared, steepest_b),
                   feasible)


def _start_m(frame: _Frame, clearance_m: float, phi: FloatArray, radius_m: FloatArray) -> FloatArray:
    """L: where the tangent at angle phi meets the inner edge (clearance = R - w/2)."""
    return np.asarray(frame.tangent_m + (clearance_m * np.cos(phi) - radius_m) / np.sin(phi), dtype=float)


def _unit(psi: FloatArray) -> FloatArray:
    return np.stack((-np.sin(psi), -np.cos(psi)), axis=-1)


def _added_area_m2(frame: _Frame, radius_m: FloatArray, phi_a: FloatArray, phi_b: FloatArray) -> FloatArray:
    """Closed-form area of the fillet: polygon P, Q_a, T_a, T_b, Q_b less the circular segment."""
    start_a = _start_m(frame, frame.radius_m - frame.half_a_m, phi_a, radius_m)
    start_b = _start_m(frame, frame.radius_m - frame.half_b_m, phi_b, radius_m)
    cos_t, sin_t = math.cos(frame.angle_rad), math.sin(frame.angle_rad)
    corner_x, corner_y = frame.corner_point()
    psi_b = frame.turn_rad - phi_b
    xs = (corner_x, start_a, frame.tangent_m - radius_m * np.sin(phi_a),
          frame.tangent_m - radius_m * np.sin(psi_b), start_b * cos_t + frame.half_b_m * sin_t)
    ys = (corner_y, frame.half_a_m, frame.radius_m - radius_m * np.cos(phi_a),
          frame.radius_m - radius_m * np.cos(psi_b), start_b * sin_t - frame.half_b_m * cos_t)
    twice = sum(xs[i] * ys[(i + 1) % 5] - xs[(i + 1) % 5] * ys[i] for i in range(5))
    arc_rad = psi_b - phi_a
    return np.asarray(np.abs(twice) / 2.0 - radius_m**2 / 2.0 * (arc_rad - np.sin(arc_rad)), dtype=float)


def _area_at(frame: _Frame, points: _Points, radius_m: FloatArray) -> FloatArray:
    tapers = _tapers(frame, points, radius_m)
    areas = _added_area_m2(frame, radius_m, tapers.phi_a, tapers.phi_b)
    return np.where(tapers.feasible, areas, np.inf)


def _largest_feasible_radius_m(frame: _Frame, points: _Points) -> float:
    """Feasibility only shrinks as F grows (the windows narrow): nested grids find where it ends."""
    if not _tapers(frame, points, np.zeros(1)).feasible[0]:
        raise FilletDoesNotFitError("the required pavement reaches beyond the turn centre or along a leg "
                                    "past any taper: no fillet of the usual form can contain it; "
                                    "check the turn radius and the pavement widths")
    low, high = 0.0, points.max_radius_m
    for _ in range(SEARCH_ROUNDS):
        grid = np.linspace(low, high, RADIUS_GRID_SIZE)
        feasible = _tapers(frame, points, grid).feasible
        last = int(np.argmin(feasible)) - 1 if not feasible.all() else len(grid) - 1
        if last == len(grid) - 1:
            return float(grid[-1])
        low, high = float(grid[last]), float(grid[last + 1])
    return low


def _least_area_radius_m(frame: _Frame, points: _Points) -> float:
    """F of least added area over [0, largest feasible F]: a grid, refined round its best point."""
    low, high = 0.0, _largest_feasible_radius_m(frame, points)
    best_area, best_radius = math.inf, high
    for _ in range(SEARCH_ROUNDS):
        grid = np.linspace(low, high, RADIUS_GRID_SIZE)
        areas = _area_at(frame, points, grid)
        best = int(np.argmin(areas))
        if areas[best] < best_area:
            best_area, best_radius = float(areas[best]), float(grid[best])
        low, high = float(grid[max(best - 1, 0)]), float(grid[min(best + 1, len(grid) - 1)])
    return best_radius


@dataclass(frozen=True, slots=True)
class _Side:
    """One side of the fillet edge in leg A's local frame: taper angle, where the edge leaves the
    straight edge (point and distance from J) and where it meets the circle."""

    phi_rad: float
    leaves: FloatArray
    touches: FloatArray
    start_m: float


def _side(frame: _Frame, half_m: float, radius_m: float, start_m: float) -> _Side:
    """The taper from the edge point at ``start_m`` (leg A's frame) tangent to the circle."""
    clearance_m = frame.radius_m - half_m
    leaves = np.array([start_m, half_m])
    offset = leaves - frame.center
    distance_m = float(np.hypot(*offset))
    least = float(_least_angle(clearance_m, np.array([radius_m]))[0])
    phi = least
    if distance_m > radius_m:
        phi = max(least, math.atan2(-offset[0], -offset[1]) + math.acos(radius_m / distance_m))
    touches = frame.center + radius_m * _unit(np.array(phi))
    if phi <= least and radius_m > clearance_m:  # the circle meets the edge directly: no taper
        return _Side(phi, touches, touches, float(touches[0]))
    return _Side(phi, leaves, touches, start_m)


def _arc_points(frame: _Frame, radius_m: float, first_rad: float, last_rad: float) -> FloatArray:
    """Points on the circle (chords inside it, so the outline holds a little more pavement)."""
    count = 1
    if radius_m > ARC_SAGITTA_M and last_rad > first_rad:
        count = math.ceil((last_rad - first_rad) / (2.0 * math.acos(1.0 - ARC_SAGITTA_M / radius_m)))
    return frame.center + radius_m * _unit(np.linspace(first_rad, last_rad, count + 1))


def _without_repeats(points: FloatArray) -> FloatArray:
    return points[np.concatenate(([True], np.hypot(*np.diff(points, axis=0).T) > 1e-9))]


def _world_arc(frame: _Frame, radius_m: float, touch_a: FloatArray, touch_b: FloatArray) -> FilletArc:
    centre, end_a, end_b = frame.to_world(np.vstack((frame.center, touch_a, touch_b)))
    angle_a = math.atan2(end_a[1] - centre[1], end_a[0] - centre[0])
    angle_b = math.atan2(end_b[1] - centre[1], end_b[0] - centre[0])
    # In the local frame the arc runs clockwise from leg A to leg B; mirroring reverses that.
    start, end = (angle_b, angle_a) if frame.side > 0.0 else (angle_a, angle_b)
    return FilletArc((float(centre[0]), float(centre[1])), radius_m, start,
                     start + (end - start) % (2.0 * math.pi))


def _build(frame: _Frame, corner_key: str, radius_m: float, start_a_m: float, start_b_m: float) -> Fillet:
    side_a = _side(frame, frame.half_a_m, radius_m, start_a_m)
    side_b = _side(frame, frame.half_b_m, radius_m, start_b_m)  # in leg B's mirror image
    leaves_b, touches_b = frame.mirror_b_to_a(np.vstack((side_b.leaves, side_b.touches)))
    last_rad = frame.turn_rad - side_b.phi_rad
    crossing = last_rad < side_a.phi_rad  # the tapers meet before the circle: a straight chamfer
    ends = (side_a.leaves, leaves_b) if crossing else \
        (side_a.leaves, _arc_points(frame, radius_m, side_a.phi_rad, last_rad), leaves_b)
    edge_local = _without_repeats(np.vstack(ends))
    inset_a = np.array([edge_local[0][0], frame.half_a_m - OVERLAP_M])
    inset_b = frame.mirror_b_to_a(np.array([side_b.leaves[0], frame.half_b_m - OVERLAP_M]))
    ring = np.vstack((frame.corner_point(OVERLAP_M), inset_a, edge_local, inset_b))
    outline = Polygon(frame.to_world(ring))
    area_m2 = float(outline.area) if crossing else float(_added_area_m2(
        frame, np.array([radius_m]), np.array([side_a.phi_rad]), np.array([side_b.phi_rad]))[0])
    has_arc = radius_m > 0.0 and last_rad > side_a.phi_rad
    return Fillet(
        corner_key=corner_key, fillet_radius_m=radius_m, taper_a_m=side_a.start_m, taper_b_m=side_b.start_m,
        center=cast(Point, tuple(float(v) for v in frame.to_world(frame.center)[0])), outline=outline,
        edge=LineString(frame.to_world(edge_local)),
        arc=_world_arc(frame, radius_m, side_a.touches, touches_b) if has_arc else None,
        area_m2=area_m2, max_width_from_centerline_m=frame.radius_m - radius_m,
        taper_a_length_m=float(np.hypot(*(side_a.leaves - side_a.touches))),
        taper_b_length_m=float(np.hypot(*(side_b.leaves - side_b.touches))), uncovered_area_m2=0.0)


def _rounded(frame: _Frame, points: _Points, corner_key: str, radius_m: float) -> Fillet:
    """The fillet at F rounded down, with each L from the steepest taper there, rounded up."""
    radius_m = max(0.0, math.floor(radius_m * STEPS_PER_M) / STEPS_PER_M)
    tapers = _tapers(frame, points, np.array([radius_m]))
    start_a = _start_m(frame, frame.radius_m - frame.half_a_m, tapers.phi_a, np.array([radius_m]))[0]
    start_b = _start_m(frame, frame.radius_m - frame.half_b_m, tapers.phi_b, np.array([radius_m]))[0]
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


def _contains(outline: Polygon, target: BaseGeometry) -> bool:
    gap = containment_gap(target, outline)
    return gap.area_m2 < AREA_TOLERANCE_M2 and gap.max_distance_m <= COVER_TOLERANCE_M


def fit_fillet(required: BaseGeometry, straights: BaseGeometry | Sequence[BaseGeometry],
               junction_point: Point, heading_a_rad: float, heading_b_rad: float, width_a_m: float,
               width_b_m: float, arc_center: Point, centerline_radius_m: float,
               corner_key: str) -> Fillet | None:
    """The least-area fillet of the usual form that contains the required pavement at a corner.

    Parameters
    ----------
    required : union of the required areas of every movement through the corner, every aircraft.
    straights : the legs' straight pavement at design width (a geometry or a list of them).
    junction_point, heading_a_rad, heading_b_rad : the junction and the legs' headings away from it.
    width_a_m, width_b_m : the legs' design widths.
    arc_center, centerline_radius_m : the turn's centerline arc, tangent to both legs.
    corner_key : carried into the result.

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
    paved = straights if isinstance(straights, BaseGeometry) else shapely.union_all(list(straights))
    target = Polygon() if required.is_empty else _target(frame, required, paved)
    if target.area < AREA_TOLERANCE_M2:
        return None
    points = _points(frame, target)
    radius_m = _least_area_radius_m(frame, points)
    for attempt in range(3):  # a safeguard: the closed form already keeps the check
        fillet = _rounded(frame, points, corner_key, radius_m - attempt / STEPS_PER_M)
        if _contains(fillet.outline, target):
            break
    else:
        raise FilletDoesNotFitError(f"corner {corner_key}: the fitted fillet does not contain the "
                                    f"required pavement; check the corner's geometry")
    covered = shapely.union_all([paved.buffer(COVER_TOLERANCE_M, join_style="mitre"), fillet.outline])
    return replace(fillet, uncovered_area_m2=containment_gap(required, covered).area_m2)
