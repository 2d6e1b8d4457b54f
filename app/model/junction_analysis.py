"""One junction's derived results: turn arcs, swept tracks, required pavement, fillets, margins.

Pure computation over frozen inputs; app/model/analysis.py caches the results by those inputs.
"""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass, replace

import numpy as np
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from app.model.design_context import DesignContext, default_radius_m, edge_margin_m
from app.model.results import AircraftTracks, ArcRecord, FilletResult, JunctionResult, MovementResult
from geometry.errors import GeometryError
from geometry.fillets import fit_fillet
from geometry.movements import Movement, corner_of, junction_movements
from geometry.network import Junction
from geometry.pavement import required_movement_area
from geometry.primitives import Arc
from geometry.sweep import SweptPath, sweep
from geometry.turns import movement_path, turn_arc

LEAD_IN_IN_CMG = 1.5      # the aircraft arrives aligned this far before the arc (or the leg's length)
LEAD_OUT_IN_CMG = 8.0     # the gear settles to within 0.04 % of its offset over 8 CMG (exp(-8))
TRACK_SIMPLIFY_M = 0.003  # stored tracks stay within 3 mm of the computed ones
CLIP_MARGIN_M = 5.0
WELD_M = 1e-6


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


@dataclass(frozen=True, slots=True, eq=False)
class _Computed:
    movement: Movement
    corner_key: str | None          # the one corner the turn sweeps; None when it crosses a leg
    radius_m: float | None
    arc: Arc | None
    swept: tuple[SweptPath, ...]
    area: BaseGeometry | None
    problem: str | None


def _arc_record(arc: Arc) -> ArcRecord:
    cx, cy = arc.center
    start = math.atan2(arc.start[1] - cy, arc.start[0] - cx)
    end = start + arc.turn_rad
    if arc.turn_rad < 0.0:
        start, end = end, start
    return ArcRecord((cx, cy), arc.radius_m, start, end)


def _once_gear_is_on_path(swept: SweptPath) -> SweptPath:
    """The stations from which the main gear, CMG behind the cockpit, has reached the path's start.

    Before that the gear rolls straight, aligned, on whatever pavement leads to this movement (the
    previous junction, or the leg's continuation), which is not this junction's to provide."""
    keep = swept.station_m >= min(swept.aircraft.cmg_m, swept.station_m[-1])
    if keep.all():
        return swept
    arrays = {name: getattr(swept, name)[keep] for name in SweptPath.__dataclass_fields__
              if isinstance(getattr(swept, name), np.ndarray)}
    return replace(swept, **arrays)


def _single_corner(movement: Movement, junction: Junction) -> str | None:
    keys = corner_of(movement, junction).corner_keys
    return keys[0] if len(keys) == 1 else None


def _radius_for(movement: Movement, corner_key: str | None, inputs: JunctionInputs) -> float:
    overrides = dict(inputs.overrides_m)
    if corner_key is not None and corner_key in overrides:
        return overrides[corner_key]
    return default_radius_m(movement.turn_rad, inputs.context)


def _compute_turn(movement: Movement, inputs: JunctionInputs) -> _Computed:
    junction = inputs.junction
    corner_key = _single_corner(movement, junction)
    radius_m = _radius_for(movement, corner_key, inputs)
    try:
        arc = turn_arc(junction.point, movement.arrival_heading_rad, movement.departure_heading_rad, radius_m)
        cmg_m = max(aircraft.cmg_m for aircraft in inputs.context.fleet)
        lead_in = max(0.0, min(movement.from_leg.length_m - arc.tangent_length_m, LEAD_IN_IN_CMG * cmg_m))
        lead_out = max(0.0, min(movement.to_leg.length_m - arc.tangent_length_m, LEAD_OUT_IN_CMG * cmg_m))
        path = movement_path(movement, junction.point, radius_m, lead_in, lead_out)
        swept = tuple(_once_gear_is_on_path(sweep(path, aircraft)) for aircraft in inputs.context.fleet)
        areas = [required_movement_area(one, edge_margin_m(one.aircraft, inputs.context.rule_set_name))
                 for one in swept]
    except GeometryError as error:
        return _Computed(movement, corner_key, radius_m, None, (), None, str(error))
    return _Computed(movement, corner_key, radius_m, arc.arc, swept, shapely.union_all(areas), None)


def _fit_corner(key: str, computed: list[_Computed], inputs: JunctionInputs,
                local_straights: BaseGeometry) -> tuple[FilletResult | None, str | None]:
    first = computed[0]
    corner = corner_of(first.movement, inputs.junction)
    leg_a, leg_b = corner.legs[0], corner.legs[-1]
    widths = dict(inputs.widths_m)
    required = shapely.union_all([one.area for one in computed])
    assert first.arc is not None
    try:
        fillet = fit_fillet(required, local_straights, inputs.junction.point, leg_a.heading_rad,
                            leg_b.heading_rad, widths[leg_a.line_id], widths[leg_b.line_id],
                            first.arc.center, first.arc.radius_m, key)
    except GeometryError as error:
        return None, f"corner {key}: {error}"
    if fillet is None:
        return None, None
    arc = None
    if fillet.arc is not None:
        arc = ArcRecord(fillet.arc.center, fillet.arc.radius_m, fillet.arc.start_angle_rad,
                        fillet.arc.end_angle_rad)
    edge = np.asarray(fillet.edge.coords, dtype=float)
    return FilletResult(key, fillet.fillet_radius_m, fillet.taper_a_m, fillet.taper_b_m, arc, edge,
                        fillet.outline, fillet.area_m2), None


MARGIN_EDGE_SIMPLIFY_M = 0.001  # the pavement edge is simplified this much before measuring margins
# Margins and plotted values every metre of cockpit travel: the tyre edges bend gently (radius of
# 10 m or more), so the least margin between samples is missed by at most 1 / (8 x 10) m ~ 1 cm.
PLOT_STEP_M = 1.0
MARGIN_REACH_M = 60.0           # pavement edges farther than this from a track do not set its margin


def _signed_margins(points: np.ndarray, pavement: BaseGeometry, edge: BaseGeometry) -> np.ndarray:
    """Distance from each point to the pavement edge: positive inside, negative outside."""
    if edge.is_empty:
        distance = np.full(len(points), MARGIN_REACH_M)
    else:
        distance = np.minimum(shapely.distance(edge, shapely.points(points)), MARGIN_REACH_M)
    inside = shapely.contains_xy(pavement, points[:, 0], points[:, 1])
    return np.where(inside, distance, -distance)


def _simplified(xy: np.ndarray) -> np.ndarray:
    line = shapely.simplify(shapely.linestrings(xy), TRACK_SIMPLIFY_M, preserve_topology=False)
    return np.asarray(shapely.get_coordinates(line), dtype=float)


def _plot_stations(station_m: np.ndarray) -> np.ndarray:
    """Indices of the stations kept for the per-station plots and margins: about one per
    PLOT_STEP_M, always including the first and the last."""
    wanted = np.arange(station_m[0], station_m[-1], PLOT_STEP_M)
    picked = np.unique(np.concatenate((np.searchsorted(station_m, wanted), [len(station_m) - 1])))
    return picked[picked < len(station_m)]


def _nearby_edge(edge: BaseGeometry, points: np.ndarray) -> BaseGeometry:
    """The part of the pavement edge that can be nearest to ``points`` (within MARGIN_REACH_M)."""
    low, high = points.min(axis=0) - MARGIN_REACH_M, points.max(axis=0) + MARGIN_REACH_M
    return shapely.clip_by_rect(edge, low[0], low[1], high[0], high[1])


def _tracks(swept: SweptPath, pavement: BaseGeometry, edges: BaseGeometry | None,
            required_margin_m: float) -> AircraftTracks:
    """The tracks to keep; without ``edges`` (the live pass) the margins are left unmeasured (NaN)."""
    kept = _plot_stations(swept.station_m)
    left_xy, right_xy = swept.gear_left_edge_xy[kept], swept.gear_right_edge_xy[kept]
    if edges is None:
        left = right = np.full(len(kept), np.nan)
    else:
        nearby = _nearby_edge(edges, np.concatenate((left_xy, right_xy)))
        left = _signed_margins(left_xy, pavement, nearby)
        right = _signed_margins(right_xy, pavement, nearby)
    margins = np.minimum(left, right)
    steering_deg = np.degrees(np.abs(swept.steering_rad))
    peak = int(np.argmax(steering_deg))
    least = int(np.argmin(margins)) if edges is not None else 0
    edge = left_xy if left[least] <= right[least] else right_xy
    return AircraftTracks(swept.aircraft.name, _simplified(swept.gear_left_edge_xy),
                          _simplified(swept.gear_right_edge_xy), _simplified(swept.main_gear_xy),
                          _simplified(swept.wingtip_left_xy), _simplified(swept.wingtip_right_xy),
                          swept.station_m[kept], steering_deg[kept], margins,
                          float(steering_deg[peak]), float(margins[least]),
                          (float(swept.cockpit_xy[peak, 0]), float(swept.cockpit_xy[peak, 1])),
                          (float(edge[least, 0]), float(edge[least, 1])), required_margin_m)


def _movement_result(one: _Computed, inputs: JunctionInputs, pavement: BaseGeometry,
                     edges: BaseGeometry | None) -> MovementResult:
    movement = one.movement
    rules = inputs.context.rule_set_name
    tracks = tuple(_tracks(swept, pavement, edges, edge_margin_m(swept.aircraft, rules))
                   for swept in one.swept)
    return MovementResult(
        key=movement.key, junction_id=movement.junction_id, from_leg_id=movement.from_leg.id,
        to_leg_id=movement.to_leg.id, turn_deg=math.degrees(movement.turn_rad), kind=movement.kind,
        excluded=movement.key in inputs.excluded, radius_m=one.radius_m,
        centerline_arc=_arc_record(one.arc) if one.arc is not None else None, tracks=tracks,
        required_area=one.area, required_area_m2=float(one.area.area) if one.area is not None else 0.0,
        max_steering_deg=max((t.max_steering_deg for t in tracks), default=0.0),
        min_edge_margin_m=min((t.min_edge_margin_m for t in tracks), default=math.inf),
        problem=one.problem, corner_key=one.corner_key)


def _straight_movement(movement: Movement, inputs: JunctionInputs) -> MovementResult:
    return MovementResult(movement.key, movement.junction_id, movement.from_leg.id, movement.to_leg.id,
                          math.degrees(movement.turn_rad), movement.kind, movement.key in inputs.excluded,
                          None, None, (), None, 0.0, 0.0, math.inf)


def analyze_junction(inputs: JunctionInputs) -> tuple[JunctionResult, tuple[str, ...]]:
    """The junction's result and the problems met (corners whose fillet could not be fitted)."""
    junction = inputs.junction
    turns = [movement for movement in junction_movements(junction)
             if movement.kind == "turn" and movement.key not in inputs.excluded]
    computed = [_compute_turn(movement, inputs) for movement in turns]
    usable = [one for one in computed if one.area is not None]
    required = shapely.union_all([one.area for one in usable]) if usable else Polygon()
    bounds = required.buffer(CLIP_MARGIN_M).envelope if usable else Polygon()
    local_straights = inputs.straights.intersection(bounds) if usable else Polygon()
    by_corner: dict[str, list[_Computed]] = defaultdict(list)
    loose: list[BaseGeometry] = []
    for one in usable:
        if one.corner_key is not None:
            by_corner[one.corner_key].append(one)
        else:
            loose.append(one.area)  # a turn across another leg: no fillet of the usual form
    fillets, problems = [], []
    for key in sorted(by_corner):
        fillet, problem = _fit_corner(key, by_corner[key], inputs, local_straights)
        if fillet is not None:
            fillets.append(fillet)
        if problem is not None:  # no fillet of the usual form: the exact required area is what to build
            problems.append(problem)
            loose.append(shapely.union_all([one.area for one in by_corner[key]]))
    # A fillet meets the straight edge exactly; grow it by a micrometre so the union closes up.
    grown = [shapely.buffer(f.outline, WELD_M, join_style="mitre") for f in fillets]
    buildable = shapely.union_all([local_straights, *grown, *loose])
    shapely.prepare(buildable)
    edges = shapely.simplify(buildable.boundary, MARGIN_EDGE_SIMPLIFY_M) if inputs.with_margins else None
    by_key = {one.movement.key: _movement_result(one, inputs, buildable, edges) for one in computed}
    all_results = tuple(by_key.get(m.key) or _straight_movement(m, inputs)
                        for m in junction_movements(junction))
    result = JunctionResult(junction.id, junction.point, junction.kind, junction.line_ids, all_results,
                            tuple(fillets), required, buildable, float(required.area), float(buildable.area))
    return result, tuple(problems)
