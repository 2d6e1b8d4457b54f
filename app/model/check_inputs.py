"""Gathers what the design checks read (geometry/checks/inputs.py) from a layout and its results."""

from __future__ import annotations

import itertools
import math
import operator
from collections.abc import Sequence

import numpy as np
import numpy.typing as npt
from shapely.geometry import Point, Polygon
from shapely.geometry.base import BaseGeometry

from app.model.bends import Bend
from app.model.design_context import DesignContext, line_design_aircraft
from app.model.elements import Centerline, Layout, Runway
from app.model.results import JunctionResult, MovementResult
from geometry.aircraft import DesignAircraft
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo, ObjectInfo, PavementNear, TrackInfo
from geometry.network import Junction, JunctionNetwork, NetworkLine
from geometry.special_cases import (
    AcuteExit,
    Crossover,
    CrossoverFinder,
    RightAngleConnection,
    find_runway_connections,
)


def _object_infos(layout: Layout) -> tuple[ObjectInfo, ...]:
    infos = []
    for obj in layout.objects:
        geometry: BaseGeometry = Point(obj.outline[0]) if len(obj.outline) < 3 else Polygon(obj.outline)
        infos.append(ObjectInfo(obj.id, obj.name, geometry, obj.height_m))
    return tuple(infos)


def _movement_info(movement: MovementResult, junction: JunctionResult, turn_line_ids: tuple[str, str],
                   fleet_by_name: dict[str, DesignAircraft]) -> MovementInfo:
    tracks = tuple(TrackInfo(fleet_by_name[t.aircraft_name], math.radians(t.max_steering_deg),
                             t.max_steering_xy, t.min_edge_margin_m, t.min_edge_margin_xy,
                             t.required_edge_margin_m, t.wingtip_left_xy, t.wingtip_right_xy)
                   for t in movement.tracks)
    return MovementInfo(movement.key, movement.junction_id, turn_line_ids, math.radians(movement.turn_deg),
                        movement.radius_m, tracks, movement.problem, junction.point_m)


def build_check_inputs(layout: Layout, context: DesignContext, network: JunctionNetwork,
                       widths: dict[str, float],
                       junctions: dict[str, JunctionResult], pavement: BaseGeometry | PavementNear,
                       bends: Sequence[Bend] = ()) -> CheckInputs:
    """``bends`` join the junctions, so their turns are checked like any junction's."""
    return CheckInputsBuilder().build(layout, context, network, widths, junctions, pavement, bends)


def changed_positions(previous: Sequence[object], current: Sequence[object]) -> list[int] | None:
    """The positions where ``current`` holds another object than ``previous`` (a scan in C); None
    when their lengths differ."""
    if len(previous) != len(current):
        return None
    return list(itertools.compress(range(len(current)), map(operator.is_not, current, previous)))


Group = tuple[MovementInfo, ...]


class CheckInputsBuilder:
    """:func:`build_check_inputs` over successive layouts, handing back the very same line, object
    and movement records for whatever did not change, so that the checks can tell what did
    (geometry/checks/incremental.py). Each part is patched where its inputs are not the previous
    call's objects, so a drag costs a few scans in C plus the work on what it changed."""

    def __init__(self) -> None:
        self._groups = _MovementGroups()
        self._lines = _LineInfos()
        self._runway_connections = _RunwayConnections()
        self._objects: tuple[object, tuple[ObjectInfo, ...]] | None = None
        self._runway_widths: tuple[object, dict[str, float]] | None = None
        self._crossovers = CrossoverFinder()
        self._crossings: tuple[tuple[Junction, ...], frozenset[str], tuple[Crossover, ...]] | None = None

    def build(self, layout: Layout, context: DesignContext, network: JunctionNetwork,
              widths: dict[str, float], junctions: dict[str, JunctionResult],
              pavement: BaseGeometry | PavementNear,
              bends: Sequence[Bend] = ()) -> CheckInputs:
        all_junctions = (*network.junctions, *(bend.junction for bend in bends))
        groups, movements = self._groups.update(junctions, all_junctions, context)
        right_angles, exits = self._runway_connections.update(network.junctions)
        return CheckInputs(
            rule_set=context.rule_set, fleet=context.fleet,
            lines=self._lines.update(layout, context, network, widths), junctions=all_junctions,
            movements=movements, crossovers=self._crossovers_of(network.junctions, layout.excluded_movements),
            right_angle_connections=right_angles, acute_exits=exits, objects=self._object_infos(layout),
            pavement=pavement, runway_widths_m=self._runway_widths_of(layout),
            excluded_movement_keys=layout.excluded_movements, movement_groups=groups)

    def _crossovers_of(self, junctions: tuple[Junction, ...],
                       excluded: frozenset[str]) -> tuple[Crossover, ...]:
        """The crossovers, looked for again only when a junction is not the previous object."""
        last = self._crossings
        if last is None or last[1] != excluded or changed_positions(last[0], junctions) != []:
            last = self._crossings = (junctions, excluded, self._crossovers.find(junctions, excluded))
        return last[2]

    def _object_infos(self, layout: Layout) -> tuple[ObjectInfo, ...]:
        if self._objects is None or self._objects[0] is not layout.objects:
            self._objects = (layout.objects, _object_infos(layout))
        return self._objects[1]

    def _runway_widths_of(self, layout: Layout) -> dict[str, float]:
        if self._runway_widths is None or self._runway_widths[0] is not layout.runways:
            self._runway_widths = (layout.runways, {r.id: r.width_m for r in layout.runways})
        return dict(self._runway_widths[1])


class _MovementGroups:
    """Each junction result's turns (``MovementInfo``), grouped by junction in the results' order;
    a result that is the previous call's object keeps its very group."""

    def __init__(self) -> None:
        self._known: dict[int, tuple[JunctionResult, DesignContext, Group]] = {}
        self._context: DesignContext | None = None
        self._ids: list[str] = []
        self._results: list[JunctionResult] = []
        self._entries: list[tuple[str, Group] | None] = []
        self._lengths = np.zeros(0, dtype=np.int64)  # of each position's group
        self._last: tuple[tuple[tuple[str, Group], ...], Group] = ((), ())

    def update(self, junctions: dict[str, JunctionResult], all_junctions: tuple[Junction, ...],
               context: DesignContext) -> tuple[tuple[tuple[str, Group], ...], Group]:
        """(junction id, its turns) for every result with turns, and all the turns in that order."""
        ids, results = list(junctions), list(junctions.values())
        positions = (changed_positions(self._results, results)
                     if context == self._context and ids == self._ids else None)
        if positions == []:
            return self._last
        fresh = positions is None
        if positions is None:
            positions, self._entries = list(range(len(results))), [None] * len(results)
            self._lengths = np.zeros(len(results), dtype=np.int64)
        by_id: dict[str, Junction] = {}
        replaced: dict[int, Group] = {}
        for position in positions:
            junction_id = ids[position]
            junction = all_junctions[position] if position < len(all_junctions) else None
            if junction is None or junction.id != junction_id:  # not in the results' order: look it up
                by_id = by_id or {j.id: j for j in all_junctions}
                junction = by_id.get(junction_id)
            replaced[position] = infos = self._infos(results[position], junction, context)
            self._entries[position] = (junction_id, infos) if infos else None
        groups = tuple(filter(None, self._entries))
        movements = (tuple(itertools.chain.from_iterable(map(operator.itemgetter(1), groups))) if fresh
                     else _spliced(self._last[1], self._lengths, replaced))
        self._lengths[positions] = [len(infos) for infos in replaced.values()]
        self._ids, self._results, self._context, self._last = ids, results, context, (groups, movements)
        self._forget_old_results()
        return self._last

    def _infos(self, result: JunctionResult, junction: Junction | None, context: DesignContext) -> Group:
        """A junction result's turns; a result reused by the analysis is the same object."""
        known = self._known.get(id(result))
        if known is not None and known[0] is result and known[1] == context:
            return known[2]
        fleet_by_name = {aircraft.name: aircraft for aircraft in context.fleet}
        legs = {leg.id: leg.line_id for leg in junction.legs} if junction is not None else {}
        infos = tuple(_movement_info(m, result, (legs[m.from_leg_id], legs[m.to_leg_id]), fleet_by_name)
                      for m in result.movements if m.kind == "turn" and not m.excluded)
        self._known[id(result)] = (result, context, infos)
        return infos

    def _forget_old_results(self) -> None:
        if len(self._known) > 2 * len(self._results) + 64:  # results of earlier layouts
            current = {id(result) for result in self._results}
            self._known = {key: value for key, value in self._known.items() if key in current}


def _spliced(flat: Group, lengths: npt.NDArray[np.int64], blocks: dict[int, Group]) -> Group:
    """``flat``, blocks of ``lengths`` one after the other, with the blocks at ``blocks``' positions
    replaced (a copy and a few slice assignments, not a walk over every block)."""
    starts = np.cumsum(lengths) - lengths
    items = list(flat)
    for position in sorted(blocks, reverse=True):  # from the end, so that the earlier starts hold
        start = int(starts[position])
        items[start:start + int(lengths[position])] = blocks[position]
    return tuple(items)


class _LineInfos:
    """A ``LineInfo`` per centerline and runway, the previous record while its element, network
    line, width and the design context are equal; only positions whose objects changed are looked at."""

    def __init__(self) -> None:
        self._known: dict[str, tuple[tuple[object, ...], LineInfo]] = {}
        self._elements: tuple[Centerline | Runway, ...] = ()
        self._lines: tuple[NetworkLine, ...] = ()
        self._widths: dict[str, float] = {}
        self._context: DesignContext | None = None
        self._infos: list[LineInfo] = []
        self._last: tuple[LineInfo, ...] = ()

    def update(self, layout: Layout, context: DesignContext, network: JunctionNetwork,
               widths: dict[str, float]) -> tuple[LineInfo, ...]:
        elements: tuple[Centerline | Runway, ...] = (*layout.centerlines, *layout.runways)
        lines = network.lines
        if len(lines) != len(elements) or any(map(operator.ne, map(_ID, lines), map(_ID, elements))):
            by_id = {line.id: line for line in network.lines}
            lines = tuple(by_id[element.id] for element in elements)
        positions = self._changed(elements, lines, widths, context)
        if positions == []:
            return self._last
        if positions is None:
            self._infos = [self._info(*pair, widths, context) for pair in zip(elements, lines, strict=True)]
        for position in positions or ():
            self._infos[position] = self._info(elements[position], lines[position], widths, context)
        self._elements, self._lines, self._widths, self._context = elements, lines, widths, context
        self._last = tuple(self._infos)
        return self._last

    def _changed(self, elements: tuple[Centerline | Runway, ...], lines: tuple[NetworkLine, ...],
                 widths: dict[str, float], context: DesignContext) -> list[int] | None:
        """The positions to look at again; None: all of them."""
        moved = changed_positions(self._elements, elements)
        moved_lines = changed_positions(self._lines, lines)
        if context != self._context or moved is None or moved_lines is None:
            return None
        positions = {*moved, *moved_lines}
        if widths != self._widths:
            positions.update(i for i, e in enumerate(elements) if widths[e.id] != self._widths.get(e.id))
        return sorted(positions)

    def _info(self, element: Centerline | Runway, line: NetworkLine, widths: dict[str, float],
              context: DesignContext) -> LineInfo:
        key = (element, line, widths[element.id], context)
        known = self._known.get(element.id)
        if known is None or known[0] != key:  # an equal element (an undone rename) keeps its record
            known = self._known[element.id] = (key, _line_info(element, line, widths[element.id], context))
        return known[1]


_ID = operator.attrgetter("id")


class _RunwayConnections:
    """:func:`find_runway_connections`, looked for again only at junctions that are not the
    previous call's objects (each junction's connections depend on it alone)."""

    def __init__(self) -> None:
        self._junctions: tuple[Junction, ...] = ()
        self._found: list[tuple[tuple[RightAngleConnection, ...], tuple[AcuteExit, ...]] | None] = []
        self._last: tuple[tuple[RightAngleConnection, ...], tuple[AcuteExit, ...]] = ((), ())

    def update(self, junctions: tuple[Junction, ...]
               ) -> tuple[tuple[RightAngleConnection, ...], tuple[AcuteExit, ...]]:
        positions = changed_positions(self._junctions, junctions)
        if positions == []:
            return self._last
        touched = positions is None  # or a junction at a runway, before or now
        if positions is None:
            positions, self._found = list(range(len(junctions))), [None] * len(junctions)
        for position in positions:
            junction = junctions[position]
            entry = find_runway_connections((junction,)) if junction.kind == "taxiway_runway" else None
            touched = touched or entry is not None or self._found[position] is not None
            self._found[position] = entry
        self._junctions = junctions
        if touched:
            found = list(filter(None, self._found))
            self._last = (tuple(itertools.chain.from_iterable(entry[0] for entry in found)),
                          tuple(itertools.chain.from_iterable(entry[1] for entry in found)))
        return self._last


def _line_info(element: Centerline | Runway, line: NetworkLine, width_m: float,
               context: DesignContext) -> LineInfo:
    if isinstance(element, Runway):
        return LineInfo(line, element.designation, width_m, context.governing, False,
                        instrument=element.instrument)
    return LineInfo(line, element.name, width_m, line_design_aircraft(element, context),
                    element.width_override_m is not None)
