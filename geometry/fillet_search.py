"""The least-area search behind :func:`geometry.fillets.fit_fillet`: the corner's local frame and the
search over the fillet radius F.

Internal to :mod:`geometry.fillets` (its module docstring states the fillet form, the frame and the
method). Seen from the turn centre C0, a required point at polar angle w and distance rho stays
paved exactly when its window w +/- acos(F / rho) overlaps the arc's directions; for each F of a
grid the steepest tapers, feasibility and the added area are closed forms, evaluated as a few
whole-array numpy operations, both sides of the corner at once (a row per side: A, then B). Only
the points that can set a steepest taper take part (:func:`search_points` for every F of the
search, then :func:`_binding` once the bracket is narrowed), and the search stops once all that is
left rounds down to the same centimetre (:data:`STEPS_PER_M`).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

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


@dataclass(frozen=True, slots=True, eq=False)
class CornerFrame:
    """The corner in its local frame (see the notes of :mod:`geometry.fillets`), with what the
    search's formulas read of it worked out once: the turn Delta, the tangent length t, the
    clearances c = R - w/2 (a column, a row per side), c^2, 2 c, and the area formula's constant
    part, c (t - p) of both sides (:func:`added_area_m2`)."""

    junction: Point
    heading_a_rad: float
    side: float            # +1 when leg B is counter-clockwise of leg A, -1 when clockwise
    angle_rad: float       # theta, between the legs
    half_a_m: float
    half_b_m: float
    radius_m: float
    turn_rad: float = field(init=False)
    tangent_m: float = field(init=False)
    clearance_m: FloatArray = field(init=False)
    clearance_squared_m2: FloatArray = field(init=False)
    twice_clearance_m: FloatArray = field(init=False)
    corners_m2: float = field(init=False)

    def __post_init__(self) -> None:
        tangent_m = self.radius_m / math.tan(self.angle_rad / 2.0)
        clearance_a_m, clearance_b_m = self.radius_m - self.half_a_m, self.radius_m - self.half_b_m
        clearance_m = np.array([[clearance_a_m], [clearance_b_m]])
        sin_t, cos_t = math.sin(self.angle_rad), math.cos(self.angle_rad)
        corners_m2 = (clearance_a_m * (tangent_m - (self.half_b_m + self.half_a_m * cos_t) / sin_t)
                      + clearance_b_m * (tangent_m - (self.half_a_m + self.half_b_m * cos_t) / sin_t))
        for name, value in (("turn_rad", math.pi - self.angle_rad), ("tangent_m", tangent_m),
                            ("clearance_m", clearance_m), ("clearance_squared_m2", clearance_m * clearance_m),
                            ("twice_clearance_m", 2.0 * clearance_m), ("corners_m2", corners_m2)):
            object.__setattr__(self, name, value)

    @property
    def center(self) -> FloatArray:
        return np.array([self.tangent_m, self.radius_m])

    def corner_point(self, inset_m: float = 0.0) -> FloatArray:
        """Where the inner edges meet (moved ``inset_m`` into both straights)."""
        half_a, half_b = self.half_a_m - inset_m, self.half_b_m - inset_m
        return np.array([(half_b + half_a * math.cos(self.angle_rad)) / math.sin(self.angle_rad), half_a])

    def local_xy(self, xy: FloatArray) -> tuple[FloatArray, FloatArray]:
        """World points into the local frame, x and y apart."""
        world = np.asarray(xy, dtype=float).reshape(-1, 2)
        dx, dy = world[:, 0] - self.junction[0], world[:, 1] - self.junction[1]
        c, s = math.cos(self.heading_a_rad), math.sin(self.heading_a_rad)
        return c * dx + s * dy, self.side * (c * dy - s * dx)

    def to_world(self, xy: FloatArray) -> FloatArray:
        local = np.asarray(xy, dtype=float).reshape(-1, 2)
        return self.world_of(local[:, 0], local[:, 1])

    def world_of(self, x_m: FloatArray, y_m: FloatArray) -> FloatArray:
        """:meth:`to_world` of points given as x and y apart."""
        y_m = self.side * y_m
        c, s = math.cos(self.heading_a_rad), math.sin(self.heading_a_rad)
        world = np.empty((len(x_m), 2))
        world[:, 0] = self.junction[0] + c * x_m - s * y_m
        world[:, 1] = self.junction[1] + s * x_m + c * y_m
        return world

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
    and distance, a row per point, only those that can set a steepest taper for some F of the
    search (:func:`search_points`). Side A's rows first, with the polar angle from the foot of C0
    on leg A, positive toward J and leg B; then side B's, with the same angle measured from leg B
    (Delta - polar); ``row_starts`` = (0, number of side A's rows). Each a column, against the F
    of a search along the row."""

    polar_rad: FloatArray
    distance_m: FloatArray
    row_starts: npt.NDArray[np.intp]
    max_radius_m: float    # the disc of radius F must not reach into the required area


_Values = FloatArray | float      # one value, or one per F of a search
_Flags = npt.NDArray[np.bool_]
_WINDOW_AT_ZERO_RAD = float(np.arccos(np.zeros(1))[0])  # acos(F / rho) at F = 0, as numpy gives it


def search_points(polar_rad: FloatArray, distance_m: FloatArray, turn_rad: float,
                  max_radius_m: float) -> SearchPoints:
    """The points that can set a steepest taper on either side for some F in [0, max_radius_m]:
    the test of :func:`_binding` over that whole range. At F = 0 every window is acos(0), so the
    least term there is that of the least polar angle from each leg (rounding is monotonic)."""
    polar = np.concatenate((polar_rad, turn_rad - polar_rad)).reshape(2, -1)
    window_at_largest = np.arccos(np.minimum(max_radius_m / distance_m, 1.0))
    greatest_polar_rad = polar_rad[polar_rad.argmax()]
    limit = np.array([[least_of(polar_rad) + _WINDOW_AT_ZERO_RAD + TERM_SLACK_RAD],
                      [(turn_rad - greatest_polar_rad) + _WINDOW_AT_ZERO_RAD + TERM_SLACK_RAD]])
    keep = polar + window_at_largest <= limit
    _, columns = keep.nonzero()
    return SearchPoints(polar[keep][:, None], distance_m[columns][:, None],
                        np.array([0, np.count_nonzero(keep[0])]), max_radius_m)


def least_of(values: FloatArray) -> float:
    """values.min(), found by argmin: on arrays this small a numpy reduction costs several times
    more (and so do any() and all(): np.count_nonzero stands in for them)."""
    return float(values[values.argmin()])


def _both(flags: _Flags) -> _Flags:
    """flags.all(axis=0) of a row per side."""
    return np.asarray(flags[0] & flags[1], dtype=np.bool_)


def _terms(points: SearchPoints, radius_m: FloatArray) -> FloatArray:
    """polar + acos(F / distance): each point's steepest taper angle (rows) at each F (columns)."""
    return np.asarray(points.polar_rad + np.arccos(np.minimum(radius_m / points.distance_m, 1.0)),
                      dtype=float)


def _steepest(points: SearchPoints, terms: FloatArray) -> FloatArray:
    """For each F, the steepest taper angles that keep every point paved (the window above): the
    least of side A's terms and of side B's, a row per side."""
    return np.asarray(np.minimum.reduceat(terms, points.row_starts, axis=0), dtype=float)


def _least_angles(frame: CornerFrame, radius_m: FloatArray) -> FloatArray:
    """Taper angle at which the tangent meets the edge on the circle (no taper), for F > clearance;
    0 for F = 0 (no circle). A row per side."""
    return np.asarray(np.arccos(np.minimum(frame.clearance_m / np.maximum(radius_m, _TINY_M), 1.0)),
                      dtype=float)


def _feasible(points: SearchPoints, radius_m: FloatArray, steepest: FloatArray, least: FloatArray) -> _Flags:
    """Whether the steepest tapers at each F keep every point paved and can be built."""
    return np.asarray((radius_m <= points.max_radius_m)
                      & _both(steepest >= np.maximum(least, MIN_TAPER_ANGLE_RAD)), dtype=np.bool_)


def _shared(frame: CornerFrame, steepest: FloatArray, least: FloatArray, crossing: _Flags) -> FloatArray:
    """The steepest taper angles, shared out where the two tapers would meet before the circle
    (any split between the two limits is admissible; the middle is taken)."""
    turn = frame.turn_rad
    shared = (np.maximum(least[0], turn - steepest[1]) + np.minimum(steepest[0], turn - least[1])) / 2.0
    return np.asarray(np.where(crossing, np.concatenate((shared, turn - shared)).reshape(2, -1), steepest),
                      dtype=float)


def taper_angles(frame: CornerFrame, points: SearchPoints, radius_m: FloatArray) -> FloatArray:
    """The steepest admissible taper angles for each F (a row per side, a column per F)."""
    steepest = _steepest(points, _terms(points, radius_m))
    crossing = steepest[0] + steepest[1] > frame.turn_rad
    if not np.count_nonzero(crossing):
        return steepest
    return _shared(frame, steepest, _least_angles(frame, radius_m), crossing)


def taper_start_m(frame: CornerFrame, phi_rad: FloatArray, radius_m: _Values) -> FloatArray:
    """L: where the tangent at angle phi meets each inner edge (clearance = R - w/2); phi and the
    result a row per side."""
    return np.asarray(frame.tangent_m + (frame.clearance_m * np.cos(phi_rad) - radius_m) / np.sin(phi_rad),
                      dtype=float)


def added_area_m2(frame: CornerFrame, radius_m: _Values, phi_rad: FloatArray) -> FloatArray:
    """Closed-form area of the fillet, summed from C0 (docs/pavement.md): triangles C0-P-Q_a and
    C0-Q_b-P, less the triangles C0-Q_a-T_a and C0-T_b-Q_b (right-angled at the tangent points)
    and the arc's sector. With c = R - w/2, L - t = (c cos phi - F) / sin phi and the taper length
    (c - F cos phi) / sin phi, each side gives c (t - p) + ((c^2 + F^2) cos phi - 2 c F) / sin phi,
    p the edges' corner from J along that leg. phi_rad: a row per side (phi_a, phi_b), a column
    per F (one column for one F)."""
    squared = radius_m * radius_m
    sides = ((frame.clearance_squared_m2 + squared) * np.cos(phi_rad) - frame.twice_clearance_m * radius_m) \
        / np.sin(phi_rad)
    return np.asarray(0.5 * (frame.corners_m2 + sides[0] + sides[1]
                             - squared * (frame.turn_rad - phi_rad[0] - phi_rad[1])), dtype=float)


def _area_at(frame: CornerFrame, points: SearchPoints, radius_m: FloatArray, steepest: FloatArray,
             least: FloatArray | None = None) -> FloatArray:
    """The added area at each F of a grid in [0, largest feasible F], where every F is feasible
    (feasibility only shrinks as F grows), with the steepest tapers there. ``least``: the least
    taper angles at each F, when they are known and every F is known to be feasible."""
    crossing = steepest[0] + steepest[1] > frame.turn_rad
    if not np.count_nonzero(crossing):
        return added_area_m2(frame, radius_m, steepest)
    # the tapers meet before the circle at some F (always at F = 0): share them out there
    if least is not None:
        return added_area_m2(frame, radius_m, _shared(frame, steepest, least, crossing))
    least = _least_angles(frame, radius_m)
    areas = added_area_m2(frame, radius_m, _shared(frame, steepest, least, crossing))
    return np.where(_feasible(points, radius_m, steepest, least), areas, np.inf)


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


def _largest_feasible_radius_m(frame: CornerFrame, points: SearchPoints, low: float, high: float) -> float:
    """Feasibility only shrinks as F grows (the windows narrow): nested grids find where it ends
    between a feasible ``low`` and an infeasible ``high``."""
    for _ in range(SEARCH_ROUNDS - 1):
        grid = _grid(low, high)
        steepest = _steepest(points, _terms(points, grid))
        feasible = _feasible(points, grid, steepest, _least_angles(frame, grid))
        if np.count_nonzero(feasible) == RADIUS_GRID_SIZE:
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
    terms = _terms(points, grid)
    steepest = _steepest(points, terms)
    least = _least_angles(frame, grid)
    feasible = _feasible(points, grid, steepest, least)
    if not feasible[0]:
        raise FilletDoesNotFitError("the required pavement reaches beyond the turn centre or along a leg "
                                    "past any taper: no fillet of the usual form can contain it; "
                                    "check the turn radius and the pavement widths")
    first: tuple[FloatArray, FloatArray, FloatArray | None] = (terms, steepest, least)
    if np.count_nonzero(feasible) < RADIUS_GRID_SIZE:
        last = int(np.argmin(feasible)) - 1
        grid = _grid(0.0, _largest_feasible_radius_m(frame, points, float(grid[last]), float(grid[last + 1])))
        terms = _terms(points, grid)
        first = (terms, _steepest(points, terms), None)
    return _refined_radius_m(frame, points, grid, first)


def _refined_radius_m(frame: CornerFrame, points: SearchPoints, grid: FloatArray,
                      first: tuple[FloatArray, FloatArray, FloatArray | None]) -> float:
    """The rounds of :func:`least_area_radius_m` from its first grid over [0, largest feasible F],
    with the points' terms, the steepest and (when all are feasible) the least taper angles there."""
    terms, steepest, least = first
    low, high = 0.0, float(grid[-1])
    best_area, best_radius = math.inf, high
    for round_index in range(SEARCH_ROUNDS):
        if _same_step(low, high) and low <= best_radius <= high:
            break
        if round_index > 0:
            terms = _terms(points, grid)
            steepest, least = _steepest(points, terms), None
        areas = _area_at(frame, points, grid, steepest, least)
        best = int(areas.argmin())
        if areas[best] < best_area:
            best_area, best_radius = float(areas[best]), float(grid[best])
        below, above = max(best - 1, 0), min(best + 1, RADIUS_GRID_SIZE - 1)
        low, high = float(grid[below]), float(grid[above])
        if round_index == 0:  # from here on only [low, high] is searched
            points = _binding(points, terms[:, below], terms[:, above])
        grid = _grid(low, high)
    return best_radius


def _binding(points: SearchPoints, at_low: FloatArray, at_high: FloatArray) -> SearchPoints:
    """Only the points that can set a steepest taper for some F in [low, high], given each point's
    term (polar + acos(F / rho), :func:`_terms`) at ``low`` and at ``high``. A term falls as F
    grows, so a point whose term at ``high`` is above the least term of its side at ``low`` is
    above that point's term all along [low, high]: it never sets the minimum."""
    rows_a = int(points.row_starts[1])
    keep = np.concatenate((at_high[:rows_a] <= least_of(at_low[:rows_a]) + TERM_SLACK_RAD,
                           at_high[rows_a:] <= least_of(at_low[rows_a:]) + TERM_SLACK_RAD))
    return SearchPoints(points.polar_rad[keep], points.distance_m[keep],
                        np.array([0, np.count_nonzero(keep[:rows_a])]), points.max_radius_m)


def _same_step(low_m: float, high_m: float) -> bool:
    """Whether every F in [low, high] rounds down to the same reported value (as
    geometry.fillets._rounded rounds it)."""
    return math.floor(low_m * STEPS_PER_M) == math.floor(high_m * STEPS_PER_M)
