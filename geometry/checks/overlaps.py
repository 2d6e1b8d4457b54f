"""E-OVERLAP: two centerlines that lie on each other.

Two lines drawn over each other (a duplicate, or a stretch sketched twice) make no junction and
no separation finding, yet the planner almost certainly did not mean them: report every pair
whose centerlines run within OVERLAP_DISTANCE_M of each other for more than OVERLAP_LENGTH_M.
"""

from __future__ import annotations

import shapely
from shapely.geometry.base import BaseGeometry

from geometry.checks.common import CheckContext
from geometry.checks.inputs import LineInfo
from geometry.findings import Finding, Severity
from geometry.units import from_metres

OVERLAP_DISTANCE_M = 0.05   # closer than this is "on each other" (well inside any drawing precision)
OVERLAP_LENGTH_M = 1.0      # shorter contacts are crossings and touching ends, not overlaps
RULE = "centerlines drawn on each other"
SOURCE = "identity (a line cannot carry two centerlines; common practice, no source)"


def check_overlaps(context: CheckContext) -> list[Finding]:
    infos = list(context.lines.values())
    if len(infos) < 2:
        return []
    geometries = [context.geometry(info.line.id) for info in infos]
    findings = []
    for first, second in overlap_candidates(geometries):
        findings.extend(overlap_findings(infos[first], infos[second], geometries[first], geometries[second]))
    return findings


def overlap_candidates(geometries: list[BaseGeometry]) -> list[tuple[int, int]]:
    """Index pairs (first < second) of centerlines close enough to lie on each other."""
    pairs = shapely.STRtree(geometries).query(geometries, predicate="dwithin", distance=OVERLAP_DISTANCE_M)
    return [(first, second) for first, second in zip(pairs[0].tolist(), pairs[1].tolist(), strict=True)
            if first < second]


def shared_stretch(geometry_a: BaseGeometry, geometry_b: BaseGeometry) -> BaseGeometry:
    """The part of the first centerline within OVERLAP_DISTANCE_M of the second."""
    return geometry_a.intersection(geometry_b.buffer(OVERLAP_DISTANCE_M, cap_style="flat"))


def overlap_findings(a: LineInfo, b: LineInfo, geometry_a: BaseGeometry, geometry_b: BaseGeometry,
                     shared: BaseGeometry | None = None) -> list[Finding]:
    """E-OVERLAP for one pair of lines (their centerlines as polylines; ``shared``: their
    :func:`shared_stretch` when the caller has it)."""
    if shared is None:
        shared = shared_stretch(geometry_a, geometry_b)
    if shared.is_empty or shared.length <= OVERLAP_LENGTH_M:
        return []
    where = shared.interpolate(0.5, normalized=True)
    return [Finding(
        "E-OVERLAP", Severity.ERROR,
        f"{a.name} ({a.line.id}) and {b.name} ({b.line.id}) lie on each other over {shared.length:.1f} m "
        f"({from_metres(shared.length, 'ft'):.1f} ft): delete one, or join them into one line.",
        (a.line.id, b.line.id), (float(where.x), float(where.y)), RULE, SOURCE)]
