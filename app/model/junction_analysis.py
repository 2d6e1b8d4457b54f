"""One junction's derived results: turn arcs, swept tracks, required pavement, fillets, margins.

Pure computation over frozen inputs; app/model/analysis.py caches the results by those inputs.
"""

from __future__ import annotations

import math
from collections import defaultdict
from collections.abc import Hashable, Sequence
from dataclasses import dataclass, replace

import numpy as np
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from app.model.design_context import DesignContext, default_radius_m, edge_margin_m
from app.model.edge_margins import EdgeSegments, edge_segments
from app.model.junction_tracks import junction_tracks
from app.model.recent_values import RecentValues, corner_key, turn_key
from app.model.results import AircraftTracks, ArcRecord, FilletResult, JunctionResult, MovementResult
from geometry.errors import GeometryError
from geometry.fillets import Fillet, fit_fillet, straights_cover, uncovered_parts
from geometry.movements import Movement, corner_of, junction_movements
from geometry.network import Junction
from geometry.pavement import Polygonal, required_movement_areas
from geometry.primitives import Arc
from geometry.sweep import SweepPlan, SweptPath, plan_sweep, swept_paths
from geometry.turns import movement_path, turn_arc

LEAD_IN_IN_CMG = 1.5      # the aircraft arrives aligned this far before the arc (or the leg's length)
LEAD_OUT_IN_CMG = 8.0     # the gear settles to within 0.04 % of its offset over 8 CMG (exp(-8))
CLIP_MARGIN_M = 5.0
WELD_M = 1e-6


@dataclass(frozen=True, slots=True, eq=False)
class SweptTurn:
    """One turn of a junction: its radius and arc, swept paths and required area (or the problem met)."""

    movement: Movement
    corner_key: str | None          # the one corner the turn sweeps; None when it crosses a leg
    radius_m: float | None
    arc: Arc | None
    swept: tuple[SweptPath, ...]
    area: BaseGeometry | None
    problem: str | None


CornerFit = tuple[FilletResult | None, str | None]  # the fillet (None: none needed), the problem met
PlannedTurn = tuple[SweptTurn, tuple[SweepPlan, ...]]  # a turn before its sweeps are evaluated, and them


@dataclass(frozen=True, slots=True, eq=False)
class JunctionInputs:
    """Everything one junction's result depends on (the cache key is built from it)."""

    junction: Junction
    context: DesignContext
    widths_m: tuple[tuple[str, float], ...]          # line id -> straight width, for the junction's lines
    straights: BaseGeometry                          # straight pavement of the junction's lines
    excluded: frozenset[str]
    overrides_m: tuple[tuple[str, float], ...]       # corner key -> radius
    with_margins: bool = True                        # False for the live pass of a drag preview
    turns: RecentValues[SweptTurn] | None = None     # swept turns of earlier junctions, by their inputs
    fillets: RecentValues[CornerFit] | None = None   # fitted corners of earlier junctions, likewise


def _arc_record(arc: Arc) -> ArcRecord:
    cx, cy = arc.center
    start = math.atan2(arc.start[1] - cy, arc.start[0] - cx)
    end = start + arc.turn_rad
    if arc.turn_rad < 0.0:
        start, end = end, start
    return ArcRecord((cx, cy), arc.radius_m, start, end)


def _once_gear_is_on_path(plan: SweepPlan) -> SweepPlan:
    """The stations from which the main gear, CMG behind the cockpit, has reached the path's start.

    Before that the gear rolls straight, aligned, on whatever pavement leads to this movement (the
    previous junction, or the leg's continuation), which is not this junction's to provide."""
    return plan.from_station(min(plan.aircraft.cmg_m, plan.station_m[-1]))


def _single_corner(movement: Movement, junction: Junction) -> str | None:
    keys = corner_of(movement, junction).corner_keys
    return keys[0] if len(keys) == 1 else None


def _radius_for(movement: Movement, corner_key: str | None, inputs: JunctionInputs) -> float:
    overrides = dict(inputs.overrides_m)
    if corner_key is not None and corner_key in overrides:
        return overrides[corner_key]
    return default_radius_m(movement.turn_rad, inputs.context)


def _planned_turn(movement: Movement, inputs: JunctionInputs, corner_key: str | None,
                  radius_m: float) -> PlannedTurn:
    """The turn without its swept paths yet, and the sweeps that give them (none for a problem)."""
    junction = inputs.junction
    try:
        arc = turn_arc(junction.point, movement.arrival_heading_rad, movement.departure_heading_rad, radius_m)
        cmg_m = max(aircraft.cmg_m for aircraft in inputs.context.fleet)
        lead_in = max(0.0, min(movement.from_leg.length_m - arc.tangent_length_m, LEAD_IN_IN_CMG * cmg_m))
        lead_out = max(0.0, min(movement.to_leg.length_m - arc.tangent_length_m, LEAD_OUT_IN_CMG * cmg_m))
        path = movement_path(movement, junction.point, radius_m, lead_in, lead_out)
        plans = tuple(_once_gear_is_on_path(plan_sweep(path, aircraft)) for aircraft in inputs.context.fleet)
    except GeometryError as error:
        return SweptTurn(movement, corner_key, radius_m, None, (), None, str(error)), ()
    return SweptTurn(movement, corner_key, radius_m, arc.arc, (), None, None), plans


def _with_swept_paths(planned: Sequence[PlannedTurn]) -> list[SweptTurn]:
    """The planned turns with their swept paths, the sweeps of all of them evaluated together."""
    paths = iter(swept_paths([plan for _, plans in planned for plan in plans]))
    return [replace(turn, swept=tuple(next(paths) for _ in plans)) if plans else turn
            for turn, plans in planned]


def _swept_turns(turns: Sequence[Movement], inputs: JunctionInputs) -> list[SweptTurn]:
    """Every turn swept with its required area; turns remembered in ``inputs.turns`` (equal
    inputs, see app/model/recent_values.py) are taken from there, the others computed together."""
    memory, context = inputs.turns, inputs.context
    found: list[SweptTurn | None] = []
    missing: list[tuple[int, Hashable, PlannedTurn]] = []
    for movement in turns:
        corner_key = _single_corner(movement, inputs.junction)
        radius_m = _radius_for(movement, corner_key, inputs)
        key = turn_key(movement, inputs.junction, radius_m, context.fleet, context.rule_set_name)
        known = memory.get(key) if memory is not None else None
        if known is not None:
            found.append(replace(known, movement=movement, corner_key=corner_key))
            continue
        missing.append((len(found), key, _planned_turn(movement, inputs, corner_key, radius_m)))
        found.append(None)
    paved = _with_areas(_with_swept_paths([one for _, _, one in missing]), inputs)
    for (index, key, _), one in zip(missing, paved, strict=True):
        found[index] = one
        if memory is not None:
            memory.put(key, one)
    return [one for one in found if one is not None]


def _margins_m(paths: Sequence[SweptPath], rules: str) -> list[float]:
    return [edge_margin_m(path.aircraft, rules) for path in paths]


def _paved(one: SweptTurn, areas: list[Polygonal]) -> SweptTurn:
    return replace(one, area=areas[0] if len(areas) == 1 else shapely.union_all(areas))


def _with_areas(computed: list[SweptTurn], inputs: JunctionInputs) -> list[SweptTurn]:
    """The swept turns with their required areas, computed for all of them together."""
    rules = inputs.context.rule_set_name
    swept = [one for one in computed if one.problem is None]
    paths = [path for one in swept for path in one.swept]
    try:
        areas = iter(required_movement_areas(paths, _margins_m(paths, rules)))
    except GeometryError:
        return [_with_own_area(one, rules) for one in computed]  # find the turn the error belongs to
    by_turn = {id(one): _paved(one, [next(areas) for _ in one.swept]) for one in swept}
    return [by_turn.get(id(one), one) for one in computed]


def _with_own_area(one: SweptTurn, rules: str) -> SweptTurn:
    if one.problem is not None:
        return one
    try:
        areas = required_movement_areas(one.swept, _margins_m(one.swept, rules))
    except GeometryError as error:
        return SweptTurn(one.movement, one.corner_key, one.radius_m, None, (), None, str(error))
    return _paved(one, areas)


def _fit_corner(key: str, computed: list[SweptTurn], required: BaseGeometry, inputs: JunctionInputs,
                local_straights: BaseGeometry, cover: BaseGeometry) -> CornerFit:
    """The corner's fillet for ``required``, the union of its turns' required areas; a corner
    remembered in ``inputs.fillets`` with equal inputs is taken from there. ``cover``:
    ``straights_cover(local_straights)``, grown once for all the junction's corners."""
    first = computed[0]
    corner = corner_of(first.movement, inputs.junction)
    leg_a, leg_b = corner.legs[0], corner.legs[-1]
    widths = dict(inputs.widths_m)
    assert first.arc is not None
    geometry = (inputs.junction.point, leg_a.heading_rad, leg_b.heading_rad, widths[leg_a.line_id],
                widths[leg_b.line_id], first.arc.center, first.arc.radius_m)
    try:
        uncovered = uncovered_parts(required, local_straights, cover=cover)
        memory_key = corner_key(key, geometry, required, uncovered)
        known = inputs.fillets.get(memory_key) if inputs.fillets is not None else None
        if known is not None:
            return known
        fillet = fit_fillet(required, local_straights, *geometry, key, off_straights=uncovered)
    except GeometryError as error:
        return None, f"corner {key}: {error}"
    fit = _fillet_result(key, fillet), None
    if inputs.fillets is not None:
        inputs.fillets.put(memory_key, fit)
    return fit


def _fillet_result(key: str, fillet: Fillet | None) -> FilletResult | None:
    if fillet is None:
        return None
    arc = None
    if fillet.arc is not None:
        arc = ArcRecord(fillet.arc.center, fillet.arc.radius_m, fillet.arc.start_angle_rad,
                        fillet.arc.end_angle_rad)
    edge = np.asarray(fillet.edge.coords, dtype=float)
    return FilletResult(key, fillet.fillet_radius_m, fillet.taper_a_m, fillet.taper_b_m, arc, edge,
                        fillet.outline, fillet.area_m2)


MARGIN_EDGE_SIMPLIFY_M = 0.001  # the pavement edge is simplified this much before measuring margins


def _movement_result(one: SweptTurn, inputs: JunctionInputs,
                     tracks: tuple[AircraftTracks, ...]) -> MovementResult:
    movement = one.movement
    return MovementResult(
        key=movement.key, junction_id=movement.junction_id, from_leg_id=movement.from_leg.id,
        to_leg_id=movement.to_leg.id, turn_deg=math.degrees(movement.turn_rad), kind=movement.kind,
        excluded=movement.key in inputs.excluded, radius_m=one.radius_m,
        centerline_arc=_arc_record(one.arc) if one.arc is not None else None, tracks=tracks,
        required_area=one.area, required_area_m2=float(one.area.area) if one.area is not None else 0.0,
        max_steering_deg=max((t.max_steering_deg for t in tracks), default=0.0),
        min_edge_margin_m=min((t.min_edge_margin_m for t in tracks), default=math.inf),
        problem=one.problem, corner_key=one.corner_key)


def _movement_results(computed: list[SweptTurn], inputs: JunctionInputs, pavement: BaseGeometry,
                      segments: EdgeSegments | None) -> dict[str, MovementResult]:
    """Every computed turn's result; the tracks of all of them are measured together."""
    rules = inputs.context.rule_set_name
    swept = [path for one in computed for path in one.swept]
    tracks = iter(junction_tracks(swept, [edge_margin_m(path.aircraft, rules) for path in swept],
                                  pavement, segments))
    return {one.movement.key: _movement_result(one, inputs, tuple(next(tracks) for _ in one.swept))
            for one in computed}


def _straight_movement(movement: Movement, inputs: JunctionInputs) -> MovementResult:
    return MovementResult(movement.key, movement.junction_id, movement.from_leg.id, movement.to_leg.id,
                          math.degrees(movement.turn_rad), movement.kind, movement.key in inputs.excluded,
                          None, None, (), None, 0.0, 0.0, math.inf)


def _edge_of(buildable: BaseGeometry) -> EdgeSegments:
    """The pavement edge the margins are measured to. Plain Douglas-Peucker: the simplified edge is
    only measured against, so it needs no protection of its topology."""
    edge = shapely.simplify(buildable.boundary, MARGIN_EDGE_SIMPLIFY_M, preserve_topology=False)
    return edge_segments(edge)


def analyze_junction(inputs: JunctionInputs) -> tuple[JunctionResult, tuple[str, ...]]:
    """The junction's result and the problems met (corners whose fillet could not be fitted)."""
    junction = inputs.junction
    movements = junction_movements(junction)
    turns = [movement for movement in movements
             if movement.kind == "turn" and movement.key not in inputs.excluded]
    computed = _swept_turns(turns, inputs)
    usable = [one for one in computed if one.area is not None]
    by_corner: dict[str, list[SweptTurn]] = defaultdict(list)
    loose: list[BaseGeometry] = []
    for one in usable:
        if one.corner_key is not None:
            by_corner[one.corner_key].append(one)
        else:
            loose.append(one.area)  # a turn across another leg: no fillet of the usual form
    # Each corner's union serves its fillet, and the junction's union is the union of those.
    corner_required = {key: shapely.union_all([one.area for one in by_corner[key]])
                       for key in sorted(by_corner)}
    required = shapely.union_all([*corner_required.values(), *loose]) if usable else Polygon()
    bounds = required.buffer(CLIP_MARGIN_M).envelope if usable else Polygon()
    local_straights = inputs.straights.intersection(bounds) if usable else Polygon()
    fillets, problems = [], []
    cover = straights_cover(local_straights) if corner_required else Polygon()
    for key, corner_area in corner_required.items():
        fillet, problem = _fit_corner(key, by_corner[key], corner_area, inputs, local_straights, cover)
        if fillet is not None:
            fillets.append(fillet)
        if problem is not None:  # no fillet of the usual form: the exact required area is what to build
            problems.append(problem)
            loose.append(corner_area)
    # A fillet meets the straight edge exactly; grow it by a micrometre so the union closes up.
    grown = list(shapely.buffer([f.outline for f in fillets], WELD_M, join_style="mitre"))
    buildable = shapely.union_all([local_straights, *grown, *loose])
    segments = None
    if inputs.with_margins:
        shapely.prepare(buildable)  # every tyre-edge point is tested for being inside it
        segments = _edge_of(buildable)
    by_key = _movement_results(computed, inputs, buildable, segments)
    all_results = tuple(by_key.get(m.key) or _straight_movement(m, inputs) for m in movements)
    result = JunctionResult(junction.id, junction.point, junction.kind, junction.line_ids, all_results,
                            tuple(fillets), required, buildable, float(required.area), float(buildable.area))
    return result, tuple(problems)
