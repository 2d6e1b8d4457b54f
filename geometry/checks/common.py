"""What every family of checks shares: number formatting, rule look-ups that never raise, lookups
of lines, junctions and movements by id, and centerlines as shapely lines.

Messages give lengths in metres and feet (``"45.2 m (148.3 ft)"``) since the engine does not know
the layout's display unit. A number that is not finite is never printed: checks skip such inputs,
and the formatters fall back to words should one slip through.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.centerline import flatten
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo, ObjectInfo
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity
from geometry.movements import junction_movements
from geometry.network import Junction, Leg, NetworkLine
from geometry.primitives import FloatArray, Point
from geometry.rulesets import governing_aircraft
from geometry.standards import RuleValue
from geometry.units import from_metres

LENGTH_TOLERANCE_M = 1e-3        # shortfalls smaller than a millimetre are rounding, not findings
ANGLE_TOLERANCE_DEG = 0.01       # steering excesses smaller than this are rounding
CENTERLINE_CHORD_TOLERANCE_M = 0.05  # centerlines as polylines for distance checks: 5 cm sagitta
SKIPPED = "W-CHECK-SKIPPED"


def length_text(value_m: float) -> str:
    """``"45.2 m (148.3 ft)"``; a non-finite value becomes ``"an unknown length"``."""
    if not math.isfinite(value_m):
        return "an unknown length"
    return f"{value_m:.1f} m ({from_metres(value_m, 'ft'):.1f} ft)"


def angle_text(angle_rad: float) -> str:
    """``"52.3 degrees"``; a non-finite value becomes ``"an unknown angle"``."""
    if not math.isfinite(angle_rad):
        return "an unknown angle"
    return f"{math.degrees(angle_rad):.1f} degrees"


def finite_point(point: Iterable[float], fallback: Point = (0.0, 0.0)) -> Point:
    """``point`` as a float pair if finite, else ``fallback`` (never a NaN location)."""
    values = tuple(float(value) for value in point)
    if len(values) == 2 and all(math.isfinite(value) for value in values):
        return (values[0], values[1])
    return fallback


def track_geometry(xy: FloatArray) -> BaseGeometry | None:
    """A swept track as a shapely line (a point if it has one station); None if it has no
    finite station. Rows with a NaN or infinite coordinate are dropped."""
    points = np.asarray(xy, dtype=float).reshape(-1, 2) if np.size(xy) else np.empty((0, 2))
    points = points[np.isfinite(points).all(axis=1)]
    if len(points) == 0:
        return None
    if len(points) == 1:
        return shapely.points(points[0])
    return shapely.linestrings(points)


_last_centerline: list[tuple[object, BaseGeometry]] = []  # the last one made, by its segments


def centerline_geometry(line: NetworkLine) -> BaseGeometry:
    """The exact centerline flattened to a polyline within :data:`CENTERLINE_CHORD_TOLERANCE_M`.

    The last one made is remembered by the identity of the (immutable) segments: a run of the
    checks asks for the centerline of the line that changed more than once."""
    if _last_centerline and _last_centerline[0][0] is line.segments:
        return _last_centerline[0][1]
    geometry = shapely.linestrings(flatten(line.segments, CENTERLINE_CHORD_TOLERANCE_M))
    _last_centerline[:] = [(line.segments, geometry)]
    return geometry


def nearest_midpoint(a: BaseGeometry, b: BaseGeometry) -> Point:
    """Middle of the shortest line between two geometries: where to zoom to see both."""
    shortest = shapely.shortest_line(a, b)
    if shortest is None or shortest.is_empty:
        return finite_point(a.centroid.coords[0]) if not a.is_empty else (0.0, 0.0)
    (x0, y0), (x1, y1) = shortest.coords
    return finite_point(((x0 + x1) / 2.0, (y0 + y1) / 2.0))


@dataclass(slots=True)
class CheckContext:
    """One run of the checks: the inputs indexed by id, and the look-ups that could not be made.

    A rule look-up that fails (an aircraft beyond the largest design group, say) does not stop
    the run: the failure is kept once per rule and aircraft and reported as ``W-CHECK-SKIPPED``.
    """

    inputs: CheckInputs
    lines: dict[str, LineInfo] = field(init=False)
    skipped: dict[tuple[str, str], Finding] = field(init=False, default_factory=dict)
    # Centerline polylines by the identity of a line's segments, for a caller that keeps them
    # between runs (an unchanged line keeps its very segments).
    centerlines: dict[int, tuple[object, BaseGeometry]] = field(default_factory=dict)
    # The junctions by id, for a caller that keeps them up to date between runs; None: built here.
    junction_map: dict[str, Junction] | None = None
    junctions: dict[str, Junction] = field(init=False)
    _movements: dict[str, MovementInfo] | None = field(init=False, default=None)
    _geometries: dict[str, BaseGeometry] = field(init=False, default_factory=dict)
    _legs: dict[str, dict[str, tuple[Leg, Leg]]] = field(init=False, default_factory=dict)

    def __post_init__(self) -> None:
        self.lines = {info.line.id: info for info in self.inputs.lines}
        self.junctions = self.junction_map if self.junction_map is not None else {
            junction.id: junction for junction in self.inputs.junctions}

    @property
    def movements(self) -> dict[str, MovementInfo]:
        """The movements by key (built on first use: few checks look movements up)."""
        if self._movements is None:
            self._movements = {movement.key: movement for movement in self.inputs.movements}
        return self._movements

    def offered_movements(self) -> tuple[MovementInfo, ...]:
        """The movements the planner has not excluded."""
        excluded = self.inputs.excluded_movement_keys
        return tuple(movement for movement in self.inputs.movements if movement.key not in excluded)

    def geometry(self, line_id: str) -> BaseGeometry:
        if line_id not in self._geometries:
            line = self.lines[line_id].line
            known = self.centerlines.get(id(line.segments))
            if known is None or known[0] is not line.segments:
                known = self.centerlines[id(line.segments)] = (line.segments, centerline_geometry(line))
            self._geometries[line_id] = known[1]
        return self._geometries[line_id]

    def movement_legs(self, movement_key: str, junction_id: str) -> tuple[Leg, Leg] | None:
        """The arrival and departure legs of a movement, or None if the junction has no such
        movement."""
        if junction_id not in self._legs:
            junction = self.junctions.get(junction_id)
            movements = junction_movements(junction) if junction is not None else ()
            self._legs[junction_id] = {m.key: (m.from_leg, m.to_leg) for m in movements}
        return self._legs[junction_id].get(movement_key)

    def rule(self, rule_name: str, lookup: Callable[[], RuleValue], element_ids: tuple[str, ...],
             location_m: Point) -> RuleValue | None:
        """``lookup()``, or None after noting why the rule could not be looked up."""
        try:
            return lookup()
        except GeometryError as error:
            self.skip(rule_name, str(error), element_ids, location_m)
            return None

    def governing(self, aircraft: Iterable[DesignAircraft], rule_name: str,
                  element_ids: tuple[str, ...], location_m: Point) -> DesignAircraft | None:
        """The more demanding of ``aircraft`` under the rule set, or None (noted) if they cannot
        be ranked."""
        try:
            return governing_aircraft(tuple(aircraft), self.inputs.rule_set)
        except GeometryError as error:
            self.skip(rule_name, str(error), element_ids, location_m)
            return None

    def group_label(self, aircraft: DesignAircraft) -> str:
        try:
            return self.inputs.rule_set.group_label(aircraft)
        except GeometryError:
            return "no design group"

    def skip(self, rule_name: str, reason: str, element_ids: tuple[str, ...], location_m: Point) -> None:
        key = (rule_name, reason)
        if key not in self.skipped:
            self.skipped[key] = Finding(
                SKIPPED, Severity.WARNING,
                f"The {rule_name} check was skipped here: {reason}",
                element_ids, finite_point(location_m), rule_name, "no rule value could be looked up")

    def skipped_findings(self) -> tuple[Finding, ...]:
        return tuple(self.skipped.values())


def line_midpoint(line: NetworkLine) -> Point:
    """The point halfway along a line (where to zoom for a finding about the whole line)."""
    point = shapely.line_interpolate_point(centerline_geometry(line), 0.5, normalized=True)
    return finite_point(point.coords[0])


def sentence(text: str) -> str:
    """``text`` with its first letter in upper case (unlike ``str.capitalize``, keeps the rest)."""
    return text[:1].upper() + text[1:]


def line_label(info: LineInfo) -> str:
    """``"taxiway A (twy-1)"``: the kind, the planner's name, and the id when they differ."""
    if info.name and info.name != info.line.id:
        return f"{info.line.kind} {info.name} ({info.line.id})"
    return f"{info.line.kind} {info.line.id}"


def movement_label(context: CheckContext, movement: MovementInfo) -> str:
    """``"the 90.0-degree left turn from taxiway A onto taxiway B at J:a/b#0"``."""
    names = [line_label(context.lines[line_id]) if line_id in context.lines else line_id
             for line_id in movement.line_ids]
    if movement.radius_m is None or not math.isfinite(movement.turn_rad) or movement.turn_rad == 0.0:
        return f"the movement from {names[0]} onto {names[1]} at {movement.junction_id}"
    side = "left" if movement.turn_rad > 0.0 else "right"
    return (f"the {math.degrees(abs(movement.turn_rad)):.1f}-degree {side} turn from {names[0]} "
            f"onto {names[1]} at {movement.junction_id}")


def movement_ids(movement: MovementInfo) -> tuple[str, ...]:
    """The movement key, its junction and its lines (each once) as a finding's element ids."""
    return tuple(dict.fromkeys((movement.key, movement.junction_id, *movement.line_ids)))


def usable_objects(objects: Iterable[ObjectInfo]) -> list[ObjectInfo]:
    """The objects with a non-empty geometry of finite coordinates."""
    usable = []
    for item in objects:
        geometry = item.geometry
        if geometry is None or geometry.is_empty or not np.isfinite(shapely.bounds(geometry)).all():
            continue
        usable.append(item)
    return usable
