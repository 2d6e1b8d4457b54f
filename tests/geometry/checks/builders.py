"""Hand-made CheckInputs for the checks' tests: lines from points, junctions and special cases from
the engine, movements swept with the engine. All aircraft and places are fictional."""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.centerline import centerline_segments, flatten
from geometry.checks import CheckInputs, LineInfo, MovementInfo, ObjectInfo, TrackInfo
from geometry.movements import Movement, junction_movements
from geometry.network import Junction, LineKind, NetworkLine, build_network
from geometry.primitives import FloatArray
from geometry.rulesets import RuleSetName, get_rule_set
from geometry.special_cases import find_crossovers, find_runway_connections
from geometry.sweep import sweep
from geometry.theoretical import theoretical_airplane
from geometry.turns import movement_path

RUNWAY_WIDTH_M = 45.0  # a demo runway width (common practice, no source: a usual wide-body runway)


def demo_aircraft(name: str = "Demo twin", *, cmg_m: float = 20.0, wheelbase_m: float | None = None,
                  mgw_m: float = 9.0, wingspan_m: float = 35.0, tail_height_m: float = 12.0,
                  max_steering_deg: float = 50.0) -> DesignAircraft:
    """A fictional aircraft; tyre, nose and tail positions follow from the main dimensions."""
    return DesignAircraft(name=name, cmg_m=cmg_m, wheelbase_m=wheelbase_m or 0.9 * cmg_m, mgw_m=mgw_m,
                          tyre_width_m=min(1.0, mgw_m / 4.0), wingspan_m=wingspan_m,
                          wingtip_x_m=-0.1 * wingspan_m, nose_x_m=cmg_m + 2.0, tail_x_m=-1.2 * cmg_m,
                          tail_height_m=tail_height_m, max_steering_deg=max_steering_deg)


def adg3() -> DesignAircraft:
    """The theoretical TDG 3 airplane: ADG III, ICAO code C (117 ft span, 1 ft below the ADG III
    edge; geometry/theoretical.py)."""
    return theoretical_airplane("3")


def line(line_id: str, points: Sequence[tuple[float, float]], kind: LineKind = "taxiway",
         radii: Sequence[float | None] | None = None) -> NetworkLine:
    corner_radii = list(radii) if radii is not None else [None] * len(points)
    return NetworkLine(line_id, kind, centerline_segments(list(points), corner_radii))


def info(network_line: NetworkLine, aircraft: DesignAircraft, *, rule_set: RuleSetName = "FAA",
         width_m: float | None = None, name: str | None = None, instrument: bool = True) -> LineInfo:
    """A line at its design width (runways at :data:`RUNWAY_WIDTH_M`) unless ``width_m`` overrides it."""
    if width_m is None:
        design_m = (RUNWAY_WIDTH_M if network_line.kind == "runway"
                    else get_rule_set(rule_set).straight_width(aircraft).value_m)
        return LineInfo(network_line, name or network_line.id, design_m, aircraft, False, instrument)
    return LineInfo(network_line, name or network_line.id, width_m, aircraft, True, instrument)


def straight_pavement(infos: Sequence[LineInfo]) -> BaseGeometry:
    """Every line buffered to half its width with flat ends."""
    pieces = [shapely.buffer(shapely.linestrings(flatten(item.line.segments, 0.01)), item.width_m / 2.0,
                             cap_style="flat", join_style="round") for item in infos]
    return shapely.union_all(pieces) if pieces else shapely.Polygon()


def obstacle(object_id: str, geometry: BaseGeometry, height_m: float = 10.0) -> ObjectInfo:
    return ObjectInfo(object_id, f"Demo object {object_id}", geometry, height_m)


def make_inputs(infos: Sequence[LineInfo], *, rule_set: RuleSetName = "FAA",
                fleet: Sequence[DesignAircraft] | None = None, objects: Sequence[ObjectInfo] = (),
                movements: Sequence[MovementInfo] = (), pavement: BaseGeometry | None = None,
                excluded: frozenset[str] = frozenset()) -> CheckInputs:
    network = build_network([item.line for item in infos])
    right_angles, acute_exits = find_runway_connections(network.junctions)
    return CheckInputs(
        rule_set=get_rule_set(rule_set),
        fleet=tuple(fleet) if fleet is not None else tuple(dict.fromkeys(i.design_aircraft for i in infos)),
        lines=tuple(infos), junctions=network.junctions, movements=tuple(movements),
        crossovers=find_crossovers(network.junctions, excluded), right_angle_connections=right_angles,
        acute_exits=acute_exits, objects=tuple(objects),
        pavement=straight_pavement(infos) if pavement is None else pavement,
        runway_widths_m={i.line.id: i.width_m for i in infos if i.line.kind == "runway"},
        excluded_movement_keys=excluded)


def junctions_of(infos: Sequence[LineInfo]) -> tuple[Junction, ...]:
    return build_network([item.line for item in infos]).junctions


def find_movement(junction: Junction, from_line: str, to_line: str, *, turn_sign: int = 0,
                  kind: str | None = None) -> Movement:
    """The one movement of ``junction`` from ``from_line`` onto ``to_line`` (left: +1, right: -1)."""
    found = [m for m in junction_movements(junction)
             if m.from_leg.line_id == from_line and m.to_leg.line_id == to_line
             and (turn_sign == 0 or m.turn_rad * turn_sign > 0.0) and (kind is None or m.kind == kind)]
    assert len(found) == 1, [m.key for m in found]
    return found[0]


def edge_margins_m(points: FloatArray, pavement: BaseGeometry) -> FloatArray:
    """Distance of each point to the pavement edge, negative outside the pavement."""
    geometries = shapely.points(points)
    to_edge = shapely.distance(geometries, pavement.boundary)
    return np.asarray(np.where(shapely.within(geometries, pavement), to_edge, -to_edge), dtype=float)


def swept_movement(junction: Junction, movement: Movement, aircraft: Sequence[DesignAircraft],
                   radius_m: float, *, lead_m: float = 60.0, pavement: BaseGeometry | None = None,
                   required_edge_margin_m: float = 3.0) -> MovementInfo:
    """A movement swept by the engine, with one track per aircraft. Without ``pavement`` the edge
    margin is reported as exactly the required one."""
    path = movement_path(movement, junction.point, radius_m, lead_m, lead_m)
    tracks = []
    for plane in aircraft:
        swept = sweep(path, plane, chord_tolerance_m=0.02)
        peak = int(np.argmax(np.abs(swept.steering_rad)))
        margins = (np.full(2, required_edge_margin_m) if pavement is None else
                   edge_margins_m(np.vstack((swept.gear_left_edge_xy, swept.gear_right_edge_xy)), pavement))
        worst = int(np.argmin(margins))
        edges = np.vstack((swept.gear_left_edge_xy, swept.gear_right_edge_xy))
        tracks.append(TrackInfo(plane, swept.max_steering_rad, tuple(swept.cockpit_xy[peak].tolist()),
                                float(margins[worst]), tuple(edges[min(worst, len(edges) - 1)].tolist()),
                                required_edge_margin_m, swept.wingtip_left_xy, swept.wingtip_right_xy))
    radius = None if movement.kind == "straight" else radius_m
    return MovementInfo(movement.key, junction.id, (movement.from_leg.line_id, movement.to_leg.line_id),
                        movement.turn_rad, radius, tuple(tracks), None, junction.point)


def plain_movement(junction: Junction, movement: Movement, radius_m: float | None, *,
                   tracks: Sequence[TrackInfo] = (), problem: str | None = None) -> MovementInfo:
    """A movement with given tracks (none by default), as the analysis would hand it over."""
    return MovementInfo(movement.key, junction.id, (movement.from_leg.line_id, movement.to_leg.line_id),
                        movement.turn_rad, radius_m, tuple(tracks), problem, junction.point)


def degrees_to_unit(angle_deg: float) -> tuple[float, float]:
    return (math.cos(math.radians(angle_deg)), math.sin(math.radians(angle_deg)))
