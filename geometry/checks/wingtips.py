"""Wingtip clearance along the swept wingtip tracks of every movement.

* E-WINGTIP-OBJECT: a wingtip track passes closer to an object than the wingtip clearance of the
  moving aircraft (taxilane clearance when the movement joins two taxilanes, else taxiway).
* E-WINGTIP-TAXIWAY: a wingtip track passes closer to the centerline of another taxiway or
  taxilane than half the span of that line's design aircraft plus the wingtip clearance (of the
  more demanding of the two aircraft): an aircraft standing on that centerline would be struck.
  The movement's own lines and every line meeting its junction are left out. Where another line
  meets one of the movement's lines at a different junction, its centerline is left out within
  ``(body reach + required distance) / sin(angle)`` of that junction: crossing there is a matter
  for the junction, not a clearance along the track. The body reach, the distance from the
  cockpit to a wingtip, bounds how far any wingtip can be from the centerline the cockpit
  follows, so beyond that stretch no wingtip on the movement's line comes within the required
  distance of the other centerline merely because the lines meet.
"""

from __future__ import annotations

import math
from collections import defaultdict
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field

import shapely
from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.centerline import wrap_angle
from geometry.checks.common import (
    LENGTH_TOLERANCE_M,
    CheckContext,
    length_text,
    line_label,
    movement_ids,
    movement_label,
    nearest_midpoint,
    usable_objects,
)
from geometry.checks.inputs import LineInfo, MovementInfo, ObjectInfo, TrackInfo
from geometry.checks.wingtip_tracks import TrackBounds, WingtipTrack, movement_wingtips, track_box
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity
from geometry.network import Junction
from geometry.rulesets import WingtipKind
from geometry.standards import RuleValue

SHALLOWEST_CROSSING_RAD = math.radians(10.0)  # below this, a crossing is treated as 10 degrees


def wingtip_kind(context: CheckContext, line_ids: tuple[str, ...]) -> WingtipKind:
    """Taxilane clearance only where every line involved is a taxilane."""
    kinds = {context.lines[line_id].line.kind for line_id in line_ids if line_id in context.lines}
    return "taxilane" if kinds == {"taxilane"} else "taxiway"


def _clearance(context: CheckContext, kind: WingtipKind, aircraft: DesignAircraft,
               ids: tuple[str, ...], location: tuple[float, float]) -> RuleValue | None:
    return context.rule(f"{kind} wingtip clearance",
                        lambda: context.inputs.rule_set.wingtip_clearance(kind, aircraft), ids, location)


def _closest_tip(tips: list[WingtipTrack], other: BaseGeometry) -> tuple[WingtipTrack, float]:
    distances = [(tip, float(shapely.distance(tip.geometry, other))) for tip in tips]
    return min(distances, key=lambda pair: pair[1])


def _near(tree: shapely.STRtree, tips: list[WingtipTrack], distance_m: float) -> list[int]:
    """Indices of the tree's geometries within ``distance_m`` of either wingtip track."""
    _, found = tree.query([tip.geometry for tip in tips], predicate="dwithin", distance=distance_m)
    return sorted(set(found.tolist()))


def check_wingtip_objects(context: CheckContext) -> list[Finding]:
    """E-WINGTIP-OBJECT."""
    objects = usable_objects(context.inputs.objects)
    if not objects:
        return []
    tree = shapely.STRtree([item.geometry for item in objects])
    return object_wingtip_findings(context, context.offered_movements(), objects, tree)


def object_wingtip_findings(context: CheckContext, movements: Iterable[MovementInfo],
                            objects: list[ObjectInfo], tree: shapely.STRtree) -> list[Finding]:
    """E-WINGTIP-OBJECT along ``movements`` (offered ones; ``tree`` holds the geometries of ``objects``)."""
    findings = []
    for movement in movements:
        kind = wingtip_kind(context, movement.line_ids)
        for track in movement.tracks:
            rule = _clearance(context, kind, track.aircraft, movement_ids(movement), movement.location_m)
            box = None if rule is None else track_box(track, rule.value_m)
            if rule is None or box is None or not len(tree.query(box)):
                continue
            tips = movement_wingtips(context, movement, track)
            for index in _near(tree, tips, rule.value_m) if tips else []:
                tip, distance_m = _closest_tip(tips, objects[index].geometry)
                if distance_m < rule.value_m - LENGTH_TOLERANCE_M:
                    findings.append(_object_finding(context, movement, track, tip, distance_m,
                                                    objects[index], rule, kind))
    return findings


def _object_finding(context: CheckContext, movement: MovementInfo, track: TrackInfo, tip: WingtipTrack,
                    distance_m: float, item: ObjectInfo, rule: RuleValue, kind: WingtipKind) -> Finding:
    group = context.group_label(track.aircraft)
    label = f"{kind} wingtip clearance, {group}"
    message = (f"In {movement_label(context, movement)}, the {tip.side} wingtip of "
               f"{track.aircraft.name} passes {length_text(distance_m)} from object "
               f"{item.name or item.id}; the {kind} wingtip clearance for {group} is "
               f"{length_text(rule.value_m)}. Move the object "
               f"or change the turn.")
    return Finding("E-WINGTIP-OBJECT", Severity.ERROR, message, (*movement_ids(movement), item.id),
                   nearest_midpoint(tip.geometry, item.geometry), label, rule.describe())


def _junctions_by_line(junctions: Iterable[Junction]) -> dict[str, list[Junction]]:
    found: dict[str, list[Junction]] = defaultdict(list)
    for junction in junctions:
        for line_id in junction.line_ids:
            found[line_id].append(junction)
    return found


def crossing_angle_rad(junction: Junction, line_a: str, line_b: str) -> float:
    """Smallest acute angle between the legs of two lines at a junction."""
    angles = [min(abs(wrap_angle(a.heading_rad - b.heading_rad)),
                  math.pi - abs(wrap_angle(a.heading_rad - b.heading_rad)))
              for a in junction.legs if a.line_id == line_a for b in junction.legs if b.line_id == line_b]
    return min(angles, default=math.pi / 2.0)


@dataclass(frozen=True, slots=True)
class _Requirement:
    kind: WingtipKind
    aircraft: DesignAircraft     # the more demanding of the two, whose clearance applies
    clearance: RuleValue
    half_span_m: float           # of the other line's design aircraft

    @property
    def required_m(self) -> float:
        return self.half_span_m + self.clearance.value_m


@dataclass(slots=True)
class _TaxiwayClearances:
    """Look-ups shared by every movement of one run: rules per aircraft pair, and each other
    line's centerline less the stretches near its junctions with a movement's lines."""

    context: CheckContext
    by_line: Mapping[str, Sequence[Junction]]
    _requirements: dict[tuple[DesignAircraft, str, WingtipKind], _Requirement | None] = field(
        default_factory=dict)
    _clipped: dict[tuple[str, frozenset[str], float], BaseGeometry] = field(default_factory=dict)

    def requirement(self, movement: MovementInfo, track: TrackInfo, other: LineInfo) -> _Requirement | None:
        kind = wingtip_kind(self.context, (*movement.line_ids, other.line.id))
        key = (track.aircraft, other.line.id, kind)
        if key not in self._requirements:
            self._requirements[key] = self._look_up(movement, track, other, kind)
        return self._requirements[key]

    def _look_up(self, movement: MovementInfo, track: TrackInfo, other: LineInfo,
                 kind: WingtipKind) -> _Requirement | None:
        ids = (*movement_ids(movement), other.line.id)
        aircraft = self.context.governing((track.aircraft, other.design_aircraft), "wingtip clearance",
                                          ids, movement.location_m)
        if aircraft is None:
            return None
        rule = _clearance(self.context, kind, aircraft, ids, movement.location_m)
        if rule is None:
            return None
        return _Requirement(kind, aircraft, rule, other.design_aircraft.wingspan_m / 2.0)

    def clipped(self, other_id: str, movement: MovementInfo, reach_m: float) -> BaseGeometry:
        """The other line's centerline without its stretches within ``reach_m / sin(angle)`` of a
        junction with one of the movement's lines."""
        key = (other_id, frozenset(movement.line_ids), round(reach_m, 3))
        if key not in self._clipped:
            discs = []
            for junction in self.by_line.get(other_id, []):
                for line_id in sorted(set(movement.line_ids) & set(junction.line_ids)):
                    angle = max(crossing_angle_rad(junction, other_id, line_id), SHALLOWEST_CROSSING_RAD)
                    discs.append(shapely.buffer(shapely.points(junction.point), reach_m / math.sin(angle)))
            centerline = self.context.geometry(other_id)
            if discs:
                centerline = shapely.difference(centerline, shapely.union_all(discs))
            self._clipped[key] = centerline
        return self._clipped[key]


def body_reach_m(aircraft: DesignAircraft) -> float:
    """Distance from the cockpit to a wingtip (identity of the body frame)."""
    return math.hypot(aircraft.wingspan_m / 2.0, aircraft.cmg_m - aircraft.wingtip_x_m)


def query_reach_m(context: CheckContext, others: list[LineInfo],
                   track_aircraft: Iterable[DesignAircraft] | None = None) -> float:
    """An upper bound of every required tip-to-centerline distance: the largest half span plus
    the largest taxiway wingtip clearance (taxilane clearances are smaller)."""
    aircraft = {info.design_aircraft for info in others}
    if track_aircraft is None:
        track_aircraft = (track.aircraft for movement in context.inputs.movements
                          for track in movement.tracks)
    aircraft.update(track_aircraft)
    clearances = [0.0]
    for member in aircraft:
        try:
            clearances.append(context.inputs.rule_set.wingtip_clearance("taxiway", member).value_m)
        except GeometryError:
            continue
    return max(info.design_aircraft.wingspan_m for info in others) / 2.0 + max(clearances) + 1.0


@dataclass(frozen=True, slots=True, eq=False)
class TaxiwayScene:
    """What the wingtip-to-taxiway check of every movement shares in one run: the taxiways and
    taxilanes (``others``) in an STRtree, the query reach, and the junctions of each line."""

    context: CheckContext
    others: tuple[LineInfo, ...]
    tree: shapely.STRtree
    reach_m: float
    by_line: Mapping[str, Sequence[Junction]]
    track_bounds: TrackBounds = field(default_factory=TrackBounds)


@dataclass(frozen=True, slots=True, eq=False)
class TaxiwayOutcome:
    """The findings of some movements, the other lines within the query reach of their wingtips
    (the findings read those lines' junctions, a change to them can change the findings) and the
    bounds (x min, y min, x max, y max) of their query boxes (a line changed inside them can change
    the findings; none outside can); None: no finite track."""

    findings: tuple[Finding, ...]
    reached_line_ids: frozenset[str]
    bounds: tuple[float, float, float, float] | None


def taxiway_scene(context: CheckContext, by_line: Mapping[str, Sequence[Junction]] | None = None,
                  track_aircraft: Iterable[DesignAircraft] | None = None,
                  track_bounds: TrackBounds | None = None, reach_m: float | None = None
                  ) -> TaxiwayScene | None:
    """The shared part of E-WINGTIP-TAXIWAY; None when there is no taxiway or taxilane.
    ``by_line``, ``track_aircraft`` (every aircraft with a track), the bounds of the tracks and
    the query reach (:func:`query_reach_m`) when the caller knows them."""
    others = tuple(info for info in context.inputs.lines if info.line.kind != "runway")
    if not others:
        return None
    tree = shapely.STRtree([context.geometry(info.line.id) for info in others])
    junctions = by_line if by_line is not None else _junctions_by_line(context.inputs.junctions)
    if reach_m is None:
        reach_m = query_reach_m(context, list(others), track_aircraft)
    return TaxiwayScene(context, others, tree, reach_m, junctions, track_bounds or TrackBounds())


def check_wingtip_taxiways(context: CheckContext) -> list[Finding]:
    """E-WINGTIP-TAXIWAY."""
    movements = context.offered_movements()
    scene = taxiway_scene(context) if movements else None
    return [] if scene is None else list(taxiway_wingtip_findings(scene, movements).findings)


def taxiway_wingtip_findings(scene: TaxiwayScene, movements: Iterable[MovementInfo]) -> TaxiwayOutcome:
    """E-WINGTIP-TAXIWAY along ``movements`` (offered ones). The rule look-ups are made afresh for
    each call, so the outcome does not depend on what was checked before."""
    context, others, tree = scene.context, scene.others, scene.tree
    clearances = _TaxiwayClearances(context, scene.by_line)
    findings: list[Finding] = []
    reached: set[str] = set()
    rows = _query_rows(scene, movements)
    boxes = [row[3] for row in rows]
    for (movement, left_out, track, _), near_lines in zip(rows, _box_hits(tree, boxes), strict=True):
        if not {others[index].line.id for index in near_lines} - left_out:
            continue
        tips = movement_wingtips(context, movement, track)
        for index in _near(tree, tips, scene.reach_m) if tips else []:
            if others[index].line.id not in left_out:
                reached.add(others[index].line.id)
                finding = _taxiway_finding(clearances, movement, track, tips, others[index])
                if finding is not None:
                    findings.append(finding)
    bounds = None
    if boxes:
        low_x, low_y, high_x, high_y = zip(*boxes, strict=True)
        bounds = (min(low_x), min(low_y), max(high_x), max(high_y))
    return TaxiwayOutcome(tuple(findings), frozenset(reached), bounds)


Bounds = tuple[float, float, float, float]


def _query_rows(scene: TaxiwayScene, movements: Iterable[MovementInfo]
                ) -> list[tuple[MovementInfo, set[str], TrackInfo, Bounds]]:
    """Each track with a query box (its :func:`track_box`): its movement, the lines the movement
    leaves out (its own and its junction's) and the box's bounds."""
    rows = []
    margin_m = scene.reach_m
    movements = list(movements)
    scene.track_bounds.prepare([track for movement in movements for track in movement.tracks])
    for movement in movements:
        junction = scene.context.junctions.get(movement.junction_id)
        left_out = set(movement.line_ids) | set(junction.line_ids if junction is not None else ())
        for track in movement.tracks:
            found = scene.track_bounds(track)
            if found is None or not math.isfinite(margin_m):
                continue
            low_x, low_y, high_x, high_y = found
            rows.append((movement, left_out, track,
                         (low_x - margin_m, low_y - margin_m, high_x + margin_m, high_y + margin_m)))
    return rows


def _box_hits(tree: shapely.STRtree, boxes: list[Bounds]) -> list[list[int]]:
    """The tree's geometries whose envelopes meet each box, in one query."""
    hits: list[list[int]] = [[] for _ in boxes]
    if boxes:
        low_x, low_y, high_x, high_y = zip(*boxes, strict=True)
        queried, found = tree.query(shapely.box(low_x, low_y, high_x, high_y))
        for row, index in zip(queried.tolist(), found.tolist(), strict=True):
            hits[row].append(index)
    return hits


def _taxiway_finding(clearances: _TaxiwayClearances, movement: MovementInfo, track: TrackInfo,
                     tips: list[WingtipTrack], other: LineInfo) -> Finding | None:
    need = clearances.requirement(movement, track, other)
    if need is None:
        return None
    clipped = clearances.clipped(other.line.id, movement, body_reach_m(track.aircraft) + need.required_m)
    if clipped.is_empty:
        return None
    tip, distance_m = _closest_tip(tips, clipped)
    if not math.isfinite(distance_m) or distance_m >= need.required_m - LENGTH_TOLERANCE_M:
        return None
    context = clearances.context
    group = context.group_label(need.aircraft)
    message = (f"In {movement_label(context, movement)}, the {tip.side} wingtip of {track.aircraft.name} "
               f"passes {length_text(distance_m)} from the centerline of {line_label(other)}; an "
               f"aircraft there ({other.design_aircraft.name}) needs half its span, "
               f"{length_text(need.half_span_m)}, plus the {need.kind} wingtip clearance for {group}, "
               f"{length_text(need.clearance.value_m)}: {length_text(need.required_m)}. Move the lines "
               f"apart or change the turn.")
    return Finding("E-WINGTIP-TAXIWAY", Severity.ERROR, message, (*movement_ids(movement), other.line.id),
                   nearest_midpoint(tip.geometry, clipped), f"{need.kind} wingtip clearance, {group}",
                   f"{need.clearance.describe()}; plus half the span of {other.design_aircraft.name} "
                   f"(identity)")
