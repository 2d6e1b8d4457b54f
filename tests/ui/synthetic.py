"""A synthetic LayoutResult for view tests: plausible shapes in the places a real analysis puts
them (junctions where centerlines share a vertex, tracks along each turn, pavement around the
lines), so the views can be exercised before and independently of the analysis. Not a design
computation: no number here is a check value."""

from __future__ import annotations

import math
from itertools import permutations

import numpy as np
import shapely

from app.model.elements import Layout
from app.model.results import AircraftTracks, FilletResult, JunctionResult, LayoutResult, MovementResult
from app.model.scene import centerline_xy, corner_arc_xy, runway_outline_xy
from geometry.findings import Finding, Severity

LEG_M = 60.0
HALF_WIDTH_M = 11.5


def _junction_points(layout: Layout) -> dict[tuple[float, float], list[tuple[float, float]]]:
    """Shared vertices and the far points of the legs meeting there."""
    legs: dict[tuple[float, float], list[tuple[float, float]]] = {}
    for line in layout.centerlines:
        points = [v.xy for v in line.vertices]
        for index, point in enumerate(points):
            for neighbour in (index - 1, index + 1):
                if 0 <= neighbour < len(points):
                    legs.setdefault(point, []).append(points[neighbour])
    return {point: ends for point, ends in legs.items() if len(ends) >= 3}


def _toward(a: tuple[float, float], b: tuple[float, float], distance: float) -> np.ndarray:
    direction = np.subtract(b, a)
    return np.asarray(a) + direction / np.hypot(*direction) * min(distance, float(np.hypot(*direction)))


def _movement(junction_id: str, point, start, end, index: int) -> MovementResult | None:
    a, b = _toward(point, start, LEG_M), _toward(point, end, LEG_M)
    arc = corner_arc_xy(a, point, b, 30.0, LEG_M)
    if arc is None:
        return None
    path = np.vstack([a, arc, b])
    line = shapely.LineString(path)
    edge = lambda d: shapely.get_coordinates(line.offset_curve(d))  # noqa: E731
    stations = np.linspace(0.0, line.length, len(path))
    tracks = AircraftTracks("Aircraft 1", edge(4.0), edge(-4.0), path, edge(18.0), edge(-18.0), stations,
                            30.0 * np.sin(np.linspace(0, math.pi, len(path))),
                            3.0 + np.cos(np.linspace(0, math.pi, len(path))), 30.0, 2.0)
    u1, u2 = np.asarray(point) - a, b - np.asarray(point)
    turn = math.degrees(math.atan2(u1[0] * u2[1] - u1[1] * u2[0], float(u1 @ u2)))
    area = line.buffer(7.0)
    return MovementResult(f"{junction_id}|m{index}", junction_id, f"{junction_id}|{index}a",
                          f"{junction_id}|{index}b", turn, "turn", False, 30.0, None, (tracks,), area,
                          area.area, 30.0, 2.0)


def synthetic_result(layout: Layout) -> LayoutResult:
    straight = shapely.union_all(
        [shapely.LineString(centerline_xy(c.vertices)).buffer(HALF_WIDTH_M, cap_style="flat")
         for c in layout.centerlines] + [shapely.Polygon(runway_outline_xy(r)) for r in layout.runways])
    junctions: dict[str, JunctionResult] = {}
    for number, (point, ends) in enumerate(_junction_points(layout).items(), start=1):
        junction_id = f"J{number}"
        found = [_movement(junction_id, point, s, e, i) for i, (s, e) in enumerate(permutations(ends, 2))]
        movements = tuple(m for m in found if m is not None)
        required = shapely.union_all([m.required_area for m in movements])
        outline = required.difference(straight)
        fillet = FilletResult(f"{junction_id}|0a~0b", 25.0, 30.0, 30.0, None,
                              shapely.get_coordinates(outline.boundary), outline, outline.area)
        junctions[junction_id] = JunctionResult(junction_id, point, "tee", (), movements, (fillet,), required,
                                                straight.union(outline), required.area, outline.area)
    total = shapely.union_all([straight, *(f.outline for j in junctions.values() for f in j.fillets)])
    existing = shapely.union_all([shapely.Polygon(p.outline) for p in layout.existing_pavements])
    new = total.difference(existing)
    kinds = [("E-1", Severity.ERROR), ("W-1", Severity.WARNING), ("I-1", Severity.INFO)] * 10
    findings = tuple(
        Finding(code, severity, f"synthetic {code}", (junction.junction_id,), junction.point_m, "r", "none")
        for junction, (code, severity) in zip(junctions.values(), kinds[:len(junctions)], strict=True))
    return LayoutResult(junctions, straight, total, new, total.area, new.area, findings,
                        {c.id: centerline_xy(c.vertices) for c in layout.centerlines})
