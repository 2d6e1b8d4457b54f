"""Gathers what the design checks read (geometry/checks/inputs.py) from a layout and its results."""

from __future__ import annotations

import math
from collections.abc import Sequence

from shapely.geometry import Point, Polygon
from shapely.geometry.base import BaseGeometry

from app.model.bends import Bend
from app.model.design_context import DesignContext, line_design_aircraft
from app.model.elements import Layout
from app.model.results import JunctionResult, MovementResult
from geometry.aircraft import DesignAircraft
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo, ObjectInfo, TrackInfo
from geometry.network import JunctionNetwork, NetworkLine
from geometry.special_cases import find_crossovers, find_runway_connections


def _line_infos(layout: Layout, context: DesignContext, network: JunctionNetwork,
                widths: dict[str, float]) -> tuple[LineInfo, ...]:
    by_id: dict[str, NetworkLine] = {line.id: line for line in network.lines}
    infos = [LineInfo(by_id[c.id], c.name, widths[c.id], line_design_aircraft(c, context),
                      c.width_override_m is not None) for c in layout.centerlines]
    infos += [LineInfo(by_id[r.id], r.designation, widths[r.id], context.governing, False,
                       instrument=r.instrument) for r in layout.runways]
    return tuple(infos)


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
                       junctions: dict[str, JunctionResult], pavement: BaseGeometry,
                       bends: Sequence[Bend] = ()) -> CheckInputs:
    """``bends`` join the junctions, so their turns are checked like any junction's."""
    fleet_by_name = {aircraft.name: aircraft for aircraft in context.fleet}
    all_junctions = (*network.junctions, *(bend.junction for bend in bends))
    legs = {leg.id: leg.line_id for junction in all_junctions for leg in junction.legs}
    movements = tuple(_movement_info(m, result, (legs[m.from_leg_id], legs[m.to_leg_id]),
                                    fleet_by_name)
                      for result in junctions.values() for m in result.movements
                      if m.kind == "turn" and not m.excluded)
    right_angles, exits = find_runway_connections(network.junctions)
    return CheckInputs(
        rule_set=context.rule_set, fleet=context.fleet,
        lines=_line_infos(layout, context, network, widths), junctions=all_junctions,
        movements=movements, crossovers=find_crossovers(network.junctions, layout.excluded_movements),
        right_angle_connections=right_angles, acute_exits=exits, objects=_object_infos(layout),
        pavement=pavement, runway_widths_m={r.id: r.width_m for r in layout.runways},
        excluded_movement_keys=layout.excluded_movements)
