"""The least-area search behind :func:`geometry.fillets.fit_fillet`: the corner's local frame and the
search over the fillet radius F.

Internal to :mod:`geometry.fillets` (its module docstring states the fillet form, the frame and the
method). Seen from the turn centre C0, a required point at polar angle w and distance rho stays
paved exactly when its window w +/- acos(F / rho) overlaps the arc's directions; for each F of a
grid the steepest tapers, feasibility and the added area are closed forms, evaluated as a few
whole-array numpy operations. Only the points that can set a steepest taper take part
(:func:`front_points`, then :func:`_binding` once the bracket is narrowed), and the search stops
once all that is left rounds down to the same centimetre (:data:`STEPS_PER_M`).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from geometry.errors import FilletDoesNotFitError
from geometry.primitives import FloatArray, Point

STEPS_PER_M = 100.0            # reported F and L are whole centimetres
MIN_TAPER_ANGLE_RAD = 1e-3     # a taper flatter than 1 in 1000 never ends: treated as unbuildable
RADIUS_GRID_SIZE = 32          # F values per round of the search
SEARCH_ROUNDS = 4              # each round narrows the bracket 15-fold: 2e-5 of the range at the end
TERM_SLACK_RAD = 1e-12         # far above one arccos's rounding: a point dropped from a search never sets it
_TINY_M = 1e-200               # stands in for F = 0 in clearance / F (a ratio far above 1: angle 0)


@dataclass(frozen=True, slots=True)
class CornerFrame:
    """The corner in its local frame (see the notes of :mod:`geometry.fillets`)."""

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

    def point_to_world(self, x_m: float, y_m: float) -> tuple[float, float]:
        """:meth:`to_world` of one point, in plain floats."""
        c, s = math.cos(self.heading_a_rad), math.sin(self.heading_a_rad)
        y_m = self.side * y_m
        return self.junction[0] + c * x_m - s * y_m, self.junction[1] + s * x_m + c * y_m

    def mirror_point(self, x_m: float, y_m: float) -> tuple[float, float]:
        """:meth:`mirror_b_to_a` of one point, in plain floats."""
        mx, my = math.cos(self.angle_rad / 2.0), math.sin(self.angle_rad / 2.0)
        along = x_m * mx + y_m * my
        return 2.0 * along * mx - x_m, 2.0 * along * my - y_m

    def mirror_b_to_a(self, xy: FloatArray) -> FloatArray:
        """Reflection across the corner's bisector: leg B onto leg A (and back)."""
        m = np.array([math.cos(self.angle_rad / 2.0), math.sin(self.angle_rad / 2.0)])
        local = np.asarray(xy, dtype=float).reshape(-1, 2)
        return np.asarray(2.0 * np.outer(local @ m, m) - local, dtype=float)


@dataclass(frozen=True, slots=True)
class SearchPoints:
    """Boundary points of the required area outside the straights, as seen from C0: polar angle
    (from the foot of C0 on leg A, positive toward J and leg B) and distance, only those that can
    set the steepest taper on side A (``*_a``) and on side B (``*_b``), see :func:`front_points`; each
    a column, one row per point, against the F of a search along the row."""

    polar_a_rad: FloatArray
    distance_a_m: FloatArray
    polar_from_b_rad: FloatArray  # Delta - polar: the same angle measured from leg B
    distance_b_m: FloatArray
    max_radius_m: float    # the disc of radius F must not reach into the required area


_Values = FloatArray | float      # one value, or one per F of a search
_Flags = npt.NDArray[np.bool_]


def front_points(polar_rad: FloatArray, distance_m: FloatArray) -> tuple[FloatArray, FloatArray]:
    """The points that can set min(polar + acos(F / distance)) for some F. acos(F / rho) grows
    with rho, so a point with no smaller polar angle and no smaller distance than another is never
    below it: only the points nearer than every point of smaller polar angle remain."""
    order = np.lexsort((distance_m, polar_rad))
    distance = distance_m[order]
    nearest_before = np.minimum.accumulate(distance)
    keep = np.concatenate(([True], distance[1:] < nearest_before[:-1]))
    return polar_rad[order][keep], distance[keep]


def _least_angle(clearance_m: float, radius_m: _Values) -> FloatArray:
    """Taper angle at which the tangent meets the edge on the circle (no taper), for F > clearance;
    0 for F = 0 (no circle)."""
    return np.asarray(np.arccos(np.minimum(clearance_m / np.maximum(radius_m, _TINY_M), 1.0)), dtype=float)


@dataclass(frozen=True, slots=True)
class _Tapers:
    """For each F of a search: taper angles (phi_a, phi_b) and whether they keep every point paved."""

    phi_a: FloatArray
    phi_b: FloatArray
    feasible: _Flags


def _steepest(points: SearchPoints, radius_m: FloatArray) -> tuple[FloatArray, FloatArray]:
    """For each F, the steepest taper angles that keep every point paved (the window above)."""
    window_a = np.arccos(np.minimum(radius_m / points.distance_a_m, 1.0))
    window_b = np.arccos(np.minimum(radius_m / points.distance_b_m, 1.0))
    return (_column_minima(points.polar_a_rad + window_a), _column_minima(points.polar_from_b_rad + window_b))


def _column_minima(terms: FloatArray) -> FloatArray:
    """np.minimum.reduce(terms, axis=0), by np.minimum row after row when there are few rows
    (a reduction costs as much as several element-wise calls on arrays this small)."""
    if len(terms) > 8:
        return np.asarray(np.minimum.reduce(terms, axis=0), dtype=float)
    least: FloatArray = terms[0]
    for row in terms[1:]:
        least = np.minimum(least, row)
    return least


def taper_angles(frame: CornerFrame, points: SearchPoints, radius_m: FloatArray,
                 steepest: tuple[FloatArray, FloatArray] | None = None) -> _Tapers:
    """The steepest admissible taper angles for each F, shared out when the two tapers would meet
    before the circle (any split between the two limits is admissible; the middle is taken)."""
    steepest_a, steepest_b = _steepest(points, radius_m) if steepest is None else steepest
    least_a, least_b = _least_angles(frame, radius_m)
    feasible = _feasible(frame, points, radius_m, (steepest_a, steepest_b), (least_a, least_b))
    turn = frame.turn_rad
    crossing = steepest_a + steepest_b > turn
    if not crossing.any():
        return _Tapers(steepest_a, steepest_b, feasible)
    shared = (np.maximum(least_a, turn - steepest_b) + np.minimum(steepest_a, turn - least_b)) / 2.0
    return _Tapers(np.where(crossing, shared, steepest_a), np.where(crossing, turn - shared, steepest_b),
                   feasible)


def _least_angles(frame: CornerFrame, radius_m: FloatArray) -> tuple[FloatArray, FloatArray]:
    return (_least_angle(frame.radius_m - frame.half_a_m, radius_m),
            _least_angle(frame.radius_m - frame.half_b_m, radius_m))


def taper_start_m(frame: CornerFrame, clearance_m: float, phi: _Values, radius_m: _Values) -> FloatArray:
    """L: where the tangent at angle phi meets the inner edge (clearance = R - w/2)."""
    return np.asarray(frame.tangent_m + (clearance_m * np.cos(phi) - radius_m) / np.sin(phi), dtype=float)


def added_area_m2(frame: CornerFrame, radius_m: _Values, phi_a: _Values, phi_b: _Values) -> FloatArray:
    """Closed-form area of the fillet, summed from C0 (docs/pavement.md): triangles C0-P-Q_a and
    C0-Q_b-P, less the triangles C0-Q_a-T_a and C0-T_b-Q_b (right-angled at the tangent points)
    and the arc's sector. With c = R - w/2, L - t = (c cos phi - F) / sin phi and the taper length
    (c - F cos phi) / sin phi, each side gives c (t - p) + ((c^2 + F^2) cos phi - 2 c F) / sin phi,
    p the edges' corner from J along that leg. Floats or arrays alike."""
    clearance_a_m, clearance_b_m = frame.radius_m - frame.half_a_m, frame.radius_m - frame.half_b_m
    squared = radius_m * radius_m
    side_a = ((clearance_a_m * clearance_a_m + squared) * np.cos(phi_a) - 2.0 * clearance_a_m * radius_m) \
        / np.sin(phi_a)
    side_b = ((clearance_b_m * clearance_b_m + squared) * np.cos(phi_b) - 2.0 * clearance_b_m * radius_m) \
        / np.sin(phi_b)
    sin_t, cos_t = math.sin(frame.angle_rad), math.cos(frame.angle_rad)
    corners_m = (clearance_a_m * (frame.tangent_m - (frame.half_b_m + frame.half_a_m * cos_t) / sin_t)
                 + clearance_b_m * (frame.tangent_m - (frame.half_a_m + frame.half_b_m * cos_t) / sin_t))
    return np.asarray(0.5 * (corners_m + side_a + side_b - squared * (frame.turn_rad - phi_a - phi_b)),
                      dtype=float)


def _area_at(frame: CornerFrame, points: SearchPoints, radius_m: FloatArray,
             steepest: tuple[FloatArray, FloatArray] | None = None) -> FloatArray:
    """The added area at each F of a grid in [0, largest feasible F], where every F is feasible
    (feasibility only shrinks as F grows), with the steepest tapers there."""
    steepest_a, steepest_b = _steepest(points, radius_m) if steepest is None else steepest
    if not (steepest_a + steepest_b > frame.turn_rad).any():
        return added_area_m2(frame, radius_m, steepest_a, steepest_b)
    # the tapers meet before the circle at some F (always at F = 0): share them out there
    tapers = taper_angles(frame, points, radius_m, (steepest_a, steepest_b))
    areas = added_area_m2(frame, radius_m, tapers.phi_a, tapers.phi_b)
    return np.where(tapers.feasible, areas, np.inf)


def spaced(first: float, last: float, count: int) -> FloatArray:
    """np.linspace(first, last, count), the very same values, without its overhead (count >= 2)."""
    values = np.arange(float(count)) * ((last - first) / (count - 1)) + first
    values[-1] = last
    return values


_GRID_STEPS = np.arange(float(RADIUS_GRID_SIZE))


def _grid(low: float, high: float) -> FloatArray:
    """spaced(low, high, RADIUS_GRID_SIZE)."""
    grid = _GRID_STEPS * ((high - low) / (RADIUS_GRID_SIZE - 1)) + low
    grid[-1] = high
    return grid


def _feasible(frame: CornerFrame, points: SearchPoints, radius_m: FloatArray,
              steepest: tuple[FloatArray, FloatArray] | None = None,
              least: tuple[FloatArray, FloatArray] | None = None) -> _Flags:
    """Whether the steepest tapers at each F keep every point paved and can be built."""
    steepest_a, steepest_b = _steepest(points, radius_m) if steepest is None else steepest
    least_a, least_b = _least_angles(frame, radius_m) if least is None else least
    return np.asarray((radius_m <= points.max_radius_m)
                      & (steepest_a >= np.maximum(least_a, MIN_TAPER_ANGLE_RAD))
                      & (steepest_b >= np.maximum(least_b, MIN_TAPER_ANGLE_RAD)), dtype=np.bool_)


def _largest_feasible_radius_m(frame: CornerFrame, points: SearchPoints, low: float, high: float) -> float:
    """Feasibility only shrinks as F grows (the windows narrow): nested grids find where it ends
    between a feasible ``low`` and an infeasible ``high``."""
    for _ in range(SEARCH_ROUNDS - 1):
        grid = _grid(low, high)
        feasible = _feasible(frame, points, grid)
        if feasible.all():
            return float(grid[-1])
        last = int(np.argmin(feasible)) - 1
        low, high = float(grid[last]), float(grid[last + 1])
    return low


def least_area_radius_m(frame: CornerFrame, points: SearchPoints) -> float:
    """F of least added area over [0, largest feasible F]: a grid, refined round its best point
    until all that is left to try rounds down to the same whole centimetre as the best so far.
    The first grid over [0, the disc's limit] also tells whether F = 0 and the limit itself are
    feasible (usually the limit is: then its tapers serve the first round of areas too)."""
    grid = _grid(0.0, points.max_radius_m)
    steepest = _steepest(points, grid)
    feasible = _feasible(frame, points, grid, steepest)
    if not feasible[0]:
        raise FilletDoesNotFitError("the required pavement reaches beyond the turn centre or along a leg "
                                    "past any taper: no fillet of the usual form can contain it; "
                                    "check the turn radius and the pavement widths")
    first: FloatArray | None = None
    if feasible.all():
        first = _area_at(frame, points, grid, steepest)
    else:
        last = int(np.argmin(feasible)) - 1
        grid = _grid(0.0, _largest_feasible_radius_m(frame, points, float(grid[last]), float(grid[last + 1])))
    low, high = 0.0, float(grid[-1])
    best_area, best_radius = math.inf, high
    for round_index in range(SEARCH_ROUNDS):
        if _same_step(low, high) and low <= best_radius <= high:
            break
        areas = first if round_index == 0 and first is not None else _area_at(frame, points, grid)
        best = int(areas.argmin())
        if areas[best] < best_area:
            best_area, best_radius = float(areas[best]), float(grid[best])
        low, high = float(grid[max(best - 1, 0)]), float(grid[min(best + 1, RADIUS_GRID_SIZE - 1)])
        grid = _grid(low, high)
        if round_index == 0:  # from here on only [low, high] is searched
            points = _binding(points, low, high)
    return best_radius


def _binding(points: SearchPoints, low_m: float, high_m: float) -> SearchPoints:
    """Only the points that can set a steepest taper for some F in [low, high]. Each point's term
    (polar + acos(F / rho)) falls as F grows, so a point whose term at ``high`` is above the least
    term at ``low`` is above that point's term all along [low, high]: it never sets the minimum."""
    keep_a = _may_bind(points.polar_a_rad, points.distance_a_m, low_m, high_m)
    keep_b = _may_bind(points.polar_from_b_rad, points.distance_b_m, low_m, high_m)
    return SearchPoints(points.polar_a_rad[keep_a], points.distance_a_m[keep_a],
                        points.polar_from_b_rad[keep_b], points.distance_b_m[keep_b], points.max_radius_m)


def _may_bind(polar_rad: FloatArray, distance_m: FloatArray, low_m: float, high_m: float) -> _Flags:
    at_low = polar_rad + np.arccos(np.minimum(low_m / distance_m, 1.0))
    at_high = polar_rad + np.arccos(np.minimum(high_m / distance_m, 1.0))
    return np.asarray(at_high[:, 0] <= at_low.min() + TERM_SLACK_RAD, dtype=np.bool_)


def _same_step(low_m: float, high_m: float) -> bool:
    """Whether every F in [low, high] rounds down to the same reported value (as
    geometry.fillets._rounded rounds it)."""
    return math.floor(low_m * STEPS_PER_M) == math.floor(high_m * STEPS_PER_M)
