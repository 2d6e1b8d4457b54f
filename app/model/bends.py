"""Bends: the corners of one centerline, analysed like junctions of two legs.

An aircraft following a centerline through a corner sweeps the same way as at a junction: the
cockpit stays on the arc (the vertex's corner radius, or the house default radius where the planner
drew a sharp corner), the main gear cuts inside, and the inside of the bend needs a fillet. Each
interior vertex that turns the line by at least a degree, away from any junction, becomes a
``Junction`` of kind ``"bend"`` with two legs, so the junction analysis, the fillets and the checks
treat it exactly like a junction. A vertex where the line doubles back is reported instead.
"""

from __future__ import annotations

import itertools
import math
from collections import defaultdict
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass

from app.model.elements import Centerline
from geometry.centerline import wrap_angle
from geometry.movements import junction_corners
from geometry.network import Junction, Leg

BEND_MIN_DEFLECTION_RAD = math.radians(1.0)   # a gentler vertex is straight on (as at a junction)
REVERSAL_DEFLECTION_RAD = math.radians(179.0)  # sharper than this, the line doubles back
DUPLICATE_TOLERANCE_M = 1e-6


@dataclass(frozen=True, slots=True)
class Bend:
    junction: Junction
    corner_radius_m: float | None       # the planner's corner radius, used for the bend's turns
    corner_key: str


@dataclass(frozen=True, slots=True)
class Reversal:
    line_id: str
    vertex_number: int                  # 1-based, as the planner counts vertices
    point_m: tuple[float, float]


def _distinct(line: Centerline) -> list[tuple[int, tuple[float, float], float | None]]:
    kept: list[tuple[int, tuple[float, float], float | None]] = []
    for index, vertex in enumerate(line.vertices):
        if kept and math.dist(kept[-1][1], vertex.xy) <= DUPLICATE_TOLERANCE_M:
            continue
        kept.append((index, vertex.xy, vertex.corner_radius_m))
    return kept


def _tangent_m(radius_m: float | None, deflection_rad: float) -> float:
    return 0.0 if not radius_m else radius_m * math.tan(abs(deflection_rad) / 2.0)


def _candidates(line: Centerline) -> list[tuple[tuple[float, float], Bend | Reversal]]:
    """Every bend and reversal of ``line`` with its vertex, whatever junctions lie near."""
    points = _distinct(line)
    headings = [math.atan2(b[1][1] - a[1][1], b[1][0] - a[1][0]) for a, b in itertools.pairwise(points)]
    lengths = [math.dist(a[1], b[1]) for a, b in itertools.pairwise(points)]
    deflections = [0.0, *(wrap_angle(after - before) for before, after in itertools.pairwise(headings)), 0.0]
    tangents = [_tangent_m(radius, deflection)
                for (_, _, radius), deflection in zip(points, deflections, strict=True)]
    found: list[tuple[tuple[float, float], Bend | Reversal]] = []
    for k in range(1, len(points) - 1):
        index, xy, radius = points[k]
        if abs(deflections[k]) < BEND_MIN_DEFLECTION_RAD:
            continue
        if abs(deflections[k]) > REVERSAL_DEFLECTION_RAD:
            found.append((xy, Reversal(line.id, index + 1, xy)))
            continue
        junction_id = f"B:{line.id}#{index}"
        back = Leg(f"{junction_id}|{line.id}-", line.id, line.kind, wrap_angle(headings[k - 1] + math.pi),
                   lengths[k - 1], max(0.0, lengths[k - 1] - tangents[k - 1]), -1)
        ahead = Leg(f"{junction_id}|{line.id}+", line.id, line.kind, headings[k],
                    lengths[k], max(0.0, lengths[k] - tangents[k + 1]), 1)
        junction = Junction(junction_id, xy, (back, ahead), "bend")
        (corner,) = junction_corners(junction)
        found.append((xy, Bend(junction, radius if radius else None, corner.key)))
    return found


class _NearJunction:
    """Whether a point lies within ``snap_m`` of a junction point (a grid of snap-sized cells,
    made on first use)."""

    def __init__(self, junction_points: Sequence[tuple[float, float]], snap_m: float) -> None:
        self._points, self._snap_m = junction_points, snap_m
        self._cells: dict[tuple[int, int], list[tuple[float, float]]] | None = None

    def __call__(self, xy: tuple[float, float]) -> bool:
        if self._cells is None:
            self._cells = defaultdict(list)
            for point in self._points:
                self._cells[self._cell(point)].append(point)
        x, y = self._cell(xy)
        nearby = (self._cells.get((x + dx, y + dy), ()) for dx in (-1, 0, 1) for dy in (-1, 0, 1))
        return any(math.dist(xy, point) <= self._snap_m for points in nearby for point in points)

    def _cell(self, point: tuple[float, float]) -> tuple[int, int]:
        return math.floor(point[0] / self._snap_m), math.floor(point[1] / self._snap_m)


def _kept(candidates: Iterable[tuple[tuple[float, float], Bend | Reversal]],
          near_junction: Callable[[tuple[float, float]], bool]) -> tuple[list[Bend], list[Reversal]]:
    bends, reversals = [], []
    for xy, found in candidates:
        if near_junction(xy):
            continue
        if isinstance(found, Bend):
            bends.append(found)
        else:
            reversals.append(found)
    return bends, reversals


def line_bends(line: Centerline, junction_points: Sequence[tuple[float, float]], snap_m: float
               ) -> tuple[list[Bend], list[Reversal]]:
    """The bends of ``line`` that lie farther than ``snap_m`` from every junction point."""
    return _kept(_candidates(line),
                 lambda xy: any(math.dist(xy, point) <= snap_m for point in junction_points))


def find_bends(lines: Iterable[Centerline], junction_points: Sequence[tuple[float, float]],
               snap_m: float) -> tuple[list[Bend], list[Reversal]]:
    return BendFinder().find(lines, junction_points, snap_m)


class BendFinder:
    """:func:`find_bends` over successive layouts: each line's bends are found again only when the
    line changed, and an unchanged bend is the very same object (the analysis caches by it)."""

    def __init__(self) -> None:
        self._by_line: dict[str, tuple[Centerline, list[tuple[tuple[float, float], Bend | Reversal]]]] = {}

    def find(self, lines: Iterable[Centerline], junction_points: Sequence[tuple[float, float]],
             snap_m: float) -> tuple[list[Bend], list[Reversal]]:
        known, self._by_line = self._by_line, {}
        near_junction = _NearJunction(junction_points, snap_m)
        bends, reversals = [], []
        for line in lines:
            entry = known.get(line.id)
            if entry is None or (entry[0] is not line and entry[0] != line):
                entry = (line, _candidates(line))
            self._by_line[line.id] = entry
            if entry[1]:
                found, doubled = _kept(entry[1], near_junction)
                bends.extend(found)
                reversals.extend(doubled)
        return bends, reversals
