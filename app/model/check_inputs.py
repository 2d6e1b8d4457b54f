"""Gathers what the design checks read (geometry/checks/inputs.py) from a layout and its results."""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence

from shapely.geometry import Point, Polygon
from shapely.geometry.base import BaseGeometry

from app.model.bends import Bend
from app.model.design_context import DesignContext, line_design_aircraft
from app.model.elements import Centerline, Layout, Runway
from app.model.results import JunctionResult, MovementResult
from geometry.aircraft import DesignAircraft
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo, ObjectInfo, PavementNear, TrackInfo
from geometry.network import Junction, JunctionNetwork, NetworkLine
from geometry.special_cases import CrossoverFinder, find_runway_connections


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


class CheckInputsBuilder:
    """:func:`build_check_inputs` over successive layouts, handing back the very same line, object
    and movement records for whatever did not change, so that the checks can tell what did
    (geometry/checks/incremental.py)."""

    def __init__(self) -> None:
        self._movements: dict[int, tuple[JunctionResult, DesignContext, tuple[MovementInfo, ...]]] = {}
        self._lines: dict[str, tuple[tuple[object, ...], LineInfo]] = {}
        self._objects: tuple[object, tuple[ObjectInfo, ...]] | None = None
        self._crossovers = CrossoverFinder()

    def build(self, layout: Layout, context: DesignContext, network: JunctionNetwork,
              widths: dict[str, float], junctions: dict[str, JunctionResult],
              pavement: BaseGeometry | PavementNear,
              bends: Sequence[Bend] = ()) -> CheckInputs:
        all_junctions = (*network.junctions, *(bend.junction for bend in bends))
        by_id = {junction.id: junction for junction in all_junctions}
        groups = tuple((junction_id, infos) for junction_id, infos in (
            (junction_id, self._movement_infos(result, by_id.get(junction_id), context))
            for junction_id, result in junctions.items()) if infos)
        movements = tuple(itertools.chain.from_iterable(infos for _, infos in groups))
        if len(self._movements) > 2 * len(junctions) + 64:  # results of earlier layouts
            current = {id(result) for result in junctions.values()}
            self._movements = {key: value for key, value in self._movements.items() if key in current}
        right_angles, exits = find_runway_connections(network.junctions)
        return CheckInputs(
            rule_set=context.rule_set, fleet=context.fleet,
            lines=self._line_infos(layout, context, network, widths), junctions=all_junctions,
            movements=movements,
            crossovers=self._crossovers.find(network.junctions, layout.excluded_movements),
            right_angle_connections=right_angles, acute_exits=exits, objects=self._object_infos(layout),
            pavement=pavement, runway_widths_m={r.id: r.width_m for r in layout.runways},
            excluded_movement_keys=layout.excluded_movements, movement_groups=groups)

    def _movement_infos(self, result: JunctionResult, junction: Junction | None,
                        context: DesignContext) -> tuple[MovementInfo, ...]:
        """A junction result's turns; a result reused by the analysis is the same object."""
        known = self._movements.get(id(result))
        if known is not None and known[0] is result and known[1] == context:
            return known[2]
        fleet_by_name = {aircraft.name: aircraft for aircraft in context.fleet}
        legs = {leg.id: leg.line_id for leg in junction.legs} if junction is not None else {}
        infos = tuple(_movement_info(m, result, (legs[m.from_leg_id], legs[m.to_leg_id]), fleet_by_name)
                      for m in result.movements if m.kind == "turn" and not m.excluded)
        self._movements[id(result)] = (result, context, infos)
        return infos

    def _line_infos(self, layout: Layout, context: DesignContext, network: JunctionNetwork,
                    widths: dict[str, float]) -> tuple[LineInfo, ...]:
        by_id: dict[str, NetworkLine] = {line.id: line for line in network.lines}
        infos = []
        for element in (*layout.centerlines, *layout.runways):
            line = by_id[element.id]
            key = (element, line, widths[element.id], context)
            known = self._lines.get(element.id)
            if known is None or known[0] != key:
                info = _line_info(element, line, widths[element.id], context)
                known = self._lines[element.id] = (key, info)
            infos.append(known[1])
        return tuple(infos)

    def _object_infos(self, layout: Layout) -> tuple[ObjectInfo, ...]:
        if self._objects is None or self._objects[0] is not layout.objects:
            self._objects = (layout.objects, _object_infos(layout))
        return self._objects[1]


def _line_info(element: Centerline | Runway, line: NetworkLine, width_m: float,
               context: DesignContext) -> LineInfo:
    if isinstance(element, Runway):
        return LineInfo(line, element.designation, width_m, context.governing, False,
                        instrument=element.instrument)
    return LineInfo(line, element.name, width_m, line_design_aircraft(element, context),
                    element.width_override_m is not None)
