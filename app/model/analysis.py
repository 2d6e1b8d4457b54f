"""From a Layout to a LayoutResult, cached by inputs so that a drag recomputes only what it touches.

``LayoutAnalyzer.analyze(layout)`` keeps, between calls: the exact segments of each line (by its
vertices), the junction network (updated incrementally), each line's straight pavement (by its
segments and width) and each junction's result (by the junction, the design context, its lines'
widths, its exclusions and radius overrides). Everything it returns is in metres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from app.model.bends import Bend, BendFinder, Reversal
from app.model.check_inputs import CheckInputsBuilder
from app.model.design_context import DesignContext, context_for, default_radius_m, line_width_m, rules_problem
from app.model.elements import Centerline, Layout, Runway
from app.model.junction_analysis import (
    LEAD_IN_IN_CMG,
    LEAD_OUT_IN_CMG,
    CornerFit,
    JunctionInputs,
    SweptTurn,
    analyze_junction,
)
from app.model.recent_values import RecentValues
from app.model.results import JunctionResult, LayoutResult
from app.model.unions import LazyGeometry, TiledUnion
from geometry.centerline import centerline_segments, flatten
from geometry.checks import IncrementalChecks
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity
from geometry.movements import junction_movements
from geometry.network import Junction, JunctionNetwork, NetworkLine, build_network, update_network
from geometry.pavement import straight_pavement
from geometry.primitives import Segment

DRAWING_CHORD_TOLERANCE_M = 0.01


@dataclass(frozen=True, slots=True)
class LineGeometry:
    """A line's exact segments, or the problem that forced its corners to be drawn sharp."""

    segments: tuple[Segment, ...]
    problem: str | None


def _line_geometry(points: tuple[tuple[float, float], ...], radii: tuple[float | None, ...]) -> LineGeometry:
    try:
        return LineGeometry(centerline_segments(points, radii), None)
    except GeometryError as error:
        return LineGeometry(centerline_segments(points, [None] * len(points)), str(error))


def _finding(code: str, message: str, ids: tuple[str, ...], where: tuple[float, float], rule: str) -> Finding:
    return Finding(code, Severity.ERROR, message, ids, where, rule, "taxiwright geometry (identity)")


class LayoutAnalyzer:
    """Derived results of successive layouts, reusing whatever did not change."""

    def __init__(self) -> None:
        self._geometry: dict[tuple[object, ...], LineGeometry] = {}
        self._straights: dict[tuple[object, ...], BaseGeometry] = {}
        self._polylines: dict[tuple[object, ...], np.ndarray] = {}
        self._junctions: dict[tuple[object, ...], tuple[JunctionResult, tuple[str, ...]]] = {}
        self._network: JunctionNetwork | None = None
        self._last_findings: tuple[Finding, ...] | None = None
        self._key_memo: dict[tuple[object, ...], tuple[Junction, tuple[object, ...]]] = {}
        self._cap_memo: dict[tuple[object, ...], float] = {}
        # The last pass's settings and each junction's (object, result): while the settings hold, a
        # junction the network handed back unchanged (the very same object) keeps its result.
        self._last_settings: tuple[object, ...] | None = None
        self._last_found: dict[str, tuple[Junction, tuple[JunctionResult, tuple[str, ...]]]] = {}
        self._lines: dict[tuple[object, ...], NetworkLine] = {}
        self._bends = BendFinder()
        self._check_inputs = CheckInputsBuilder()
        self._checks = IncrementalChecks()
        self._turns: RecentValues[SweptTurn] = RecentValues()
        self._fillets: RecentValues[CornerFit] = RecentValues()
        self._total_union = TiledUnion()
        self._existing: tuple[tuple[object, ...], BaseGeometry] | None = None
        self.last_recomputed_junctions = 0

    # -- lines -----------------------------------------------------------------------------
    def _geometry_of(self, element: Centerline | Runway) -> LineGeometry:
        points = tuple(vertex.xy for vertex in element.vertices)
        radii = tuple(vertex.corner_radius_m for vertex in element.vertices)
        key = (points, radii)
        found = self._geometry.get(key)
        if found is None:
            found = self._geometry[key] = _line_geometry(points, radii)
        return found

    def _straight_of(self, segments: tuple[Segment, ...], width_m: float) -> BaseGeometry:
        key = (segments, width_m)
        found = self._straights.get(key)
        if found is None:
            found = self._straights[key] = straight_pavement(segments, width_m)
        return found

    def _network_line(self, line_id: str, kind: str, segments: tuple[Segment, ...]) -> NetworkLine:
        """The same object for an unchanged line, so the network and the checks see it unchanged."""
        key = (line_id, kind, id(segments))
        found = self._lines.get(key)
        if found is None or found.segments is not segments:
            found = self._lines[key] = NetworkLine(line_id, kind, segments)  # type: ignore[arg-type]
        return found

    def _polyline_of(self, segments: tuple[Segment, ...]) -> np.ndarray:
        found = self._polylines.get(segments)  # type: ignore[call-overload]
        if found is None:
            found = self._polylines[segments] = flatten(segments, DRAWING_CHORD_TOLERANCE_M)  # type: ignore[index]
        return found

    def _key_of(self, junction: Junction, context: DesignContext,
                overrides: tuple[tuple[str, float], ...]) -> tuple[object, ...]:
        """:func:`_junction_key`, remembered per junction object: the network hands back the very
        same object for every junction a drag did not touch."""
        memo_key = (id(junction), context, overrides)
        found = self._key_memo.get(memo_key)
        if found is None or found[0] is not junction:
            # The length cap depends on the legs' headings and kinds only: junctions of the same shape
            # (a grid's crossings, or one rebuilt after an undo) share it.
            shape = (tuple((leg.heading_rad, leg.line_kind) for leg in junction.legs), context, overrides)
            cap_m = self._cap_memo.get(shape)
            if cap_m is None:
                cap_m = self._cap_memo[shape] = _relevant_length_m(junction, context, dict(overrides))
            found = self._key_memo[memo_key] = (junction, _junction_key(junction, cap_m))
        return found[1]

    def _prune(self, limit: int = 20000) -> None:
        for cache in (self._geometry, self._straights, self._polylines, self._junctions, self._key_memo,
                      self._cap_memo, self._lines):
            if len(cache) > limit:
                cache.clear()

    @property
    def turns_from_memory(self) -> int:
        """Swept turns answered from memory since this analyzer was made (tests, benchmarks)."""
        return self._turns.hits

    @property
    def fillets_from_memory(self) -> int:
        """Fitted corners answered from memory since this analyzer was made (tests, benchmarks)."""
        return self._fillets.hits

    # -- the whole layout ------------------------------------------------------------------
    def analyze_live(self, layout: Layout) -> LayoutResult:
        """The pass used while a drag previews: everything but the design checks, whose findings are
        those of the last full pass (they are brought up to date when the drag ends)."""
        return self.analyze(layout, with_findings=False)

    def analyze(self, layout: Layout, *, with_findings: bool = True) -> LayoutResult:
        """The layout's results. ``with_findings=False`` is the live pass of a drag: no checks (the
        last findings are kept) and no edge margins (NaN), so the pavement follows the pointer."""
        self._prune()
        context = context_for(layout)
        problem = rules_problem(context)
        findings: list[Finding] = []
        lines, widths, geometries = [], {}, {}
        for element in (*layout.centerlines, *layout.runways):
            geometry = self._geometry_of(element)
            geometries[element.id] = geometry
            kind = element.kind if isinstance(element, Centerline) else "runway"
            lines.append(self._network_line(element.id, kind, geometry.segments))
            if geometry.problem:
                findings.append(_finding("E-CORNER-FIT", geometry.problem, (element.id,),
                                         element.vertices[0].xy, "corner radius fits the centerline"))
        if problem is not None:
            return self._without_rules(layout, geometries, problem, findings)
        for centerline in layout.centerlines:
            widths[centerline.id] = line_width_m(centerline, context)
        for runway in layout.runways:
            widths[runway.id] = runway.width_m
        network = (build_network(lines) if self._network is None
                   else update_network(self._network, lines))
        self._network = network
        straights = {line.id: self._straight_of(line.segments, widths[line.id]) for line in lines}
        bends, reversals = self._bends.find(layout.centerlines, [j.point for j in network.junctions],
                                            network.snap_tolerance_m)
        findings.extend(_reversal_finding(reversal) for reversal in reversals)
        junctions, problems = self._junction_results(layout, network, bends, context, widths, straights,
                                                     with_findings)
        for junction_id, texts in problems.items():
            point = junctions[junction_id].point_m
            findings.extend(Finding("W-FILLET-FORM", Severity.WARNING,
                                    f"No fillet of the usual form (radius and straight tapers) fits here, so "
                                    f"the exact required pavement is shown as the pavement to build: {text}",
                                    (junction_id,), point, "buildable fillet", "docs/pavement.md")
                            for text in texts)
        return self._assemble(layout, context, network, geometries, widths, straights, junctions, findings,
                              with_findings, bends)

    def _junction_results(self, layout: Layout, network: JunctionNetwork, bends: list[Bend],
                          context: DesignContext, widths: dict[str, float],
                          straights: dict[str, BaseGeometry],
                          full: bool) -> tuple[dict[str, JunctionResult], dict[str, tuple[str, ...]]]:
        results: dict[str, JunctionResult] = {}
        problems: dict[str, tuple[str, ...]] = {}
        recomputed = 0
        # A bend turns on the planner's corner radius (unless overridden like any corner).
        overrides = {bend.corner_key: bend.corner_radius_m for bend in bends if bend.corner_radius_m}
        overrides.update(layout.turn_radius_overrides_m)
        settings = (context, layout.excluded_movements, overrides, widths, full)
        unchanged = self._last_settings is not None and self._last_settings == settings
        last_found, self._last_found, self._last_settings = self._last_found, {}, settings
        for junction in (*network.junctions, *(bend.junction for bend in bends)):
            last = last_found.get(junction.id)
            if unchanged and last is not None and last[0] is junction:
                results[junction.id], problems[junction.id] = last[1]
                self._last_found[junction.id] = last
                continue
            prefix = junction.id + "|"
            excluded = frozenset(k for k in layout.excluded_movements if k.startswith(prefix))
            own_overrides = tuple(sorted((k, v) for k, v in overrides.items() if k.startswith(prefix)))
            own_widths = tuple((line_id, widths[line_id]) for line_id in junction.line_ids)
            base = (self._key_of(junction, context, own_overrides), context, own_widths, excluded,
                    own_overrides)
            key = (*base, full)
            # A full result serves the live pass as well; a live one (no margins) never serves a full pass.
            found = self._junctions.get((*base, True)) or self._junctions.get(key)
            if found is None:
                straight = shapely.union_all([straights[line_id] for line_id in junction.line_ids])
                found = analyze_junction(JunctionInputs(junction, context, own_widths, straight, excluded,
                                                        own_overrides, with_margins=full, turns=self._turns,
                                                        fillets=self._fillets))
                self._junctions[key] = found
                recomputed += 1
            results[junction.id], problems[junction.id] = found
            self._last_found[junction.id] = (junction, found)
        self.last_recomputed_junctions = recomputed
        return results, {k: v for k, v in problems.items() if v}

    def _assemble(self, layout: Layout, context: DesignContext, network: JunctionNetwork,
                  geometries: dict[str, LineGeometry], widths: dict[str, float],
                  straights: dict[str, BaseGeometry], junctions: dict[str, JunctionResult],
                  findings: list[Finding], with_findings: bool, bends: list[Bend]) -> LayoutResult:
        # A junction's buildable area holds its local straights and fillets (and any required
        # pavement no fillet form fits): with every line's straight it is all the pavement.
        pieces = {**{f"line:{k}": v for k, v in straights.items()},
                  **{f"junction:{k}": r.buildable_area for k, r in junctions.items()}}
        total, new = self._total_union.update(pieces, self._existing_union(layout))
        if with_findings or self._last_findings is None:
            inputs = self._check_inputs.build(layout, context, network, widths, junctions, total, bends)
            findings.extend(self._checks.run(inputs))
            self._last_findings = tuple(sorted(findings, key=_finding_order))
        polylines = {line_id: self._polyline_of(g.segments) for line_id, g in geometries.items()}
        lines = list(straights.values())
        straight = LazyGeometry(lambda: shapely.union_all(lines) if lines else Polygon())
        return LayoutResult(junctions, straight, total, new, total.area_m2, new.area_m2,
                            self._last_findings, polylines)

    def _existing_union(self, layout: Layout) -> BaseGeometry | None:
        """The existing pavement as one geometry, the same object while it does not change."""
        pavements = layout.existing_pavements
        if not pavements:
            return None
        if self._existing is None or self._existing[0] != pavements:
            self._existing = (pavements, shapely.union_all([Polygon(p.outline, p.holes) for p in pavements]))
        return self._existing[1]

    def _without_rules(self, layout: Layout, geometries: dict[str, LineGeometry], problem: str,
                       findings: list[Finding]) -> LayoutResult:
        findings.append(Finding("E-RULES", Severity.ERROR, problem, (), (0.0, 0.0),
                                f"{layout.rule_set} rule set", "geometry/rulesets.py"))
        polylines = {line_id: self._polyline_of(g.segments) for line_id, g in geometries.items()}
        empty = Polygon()
        return LayoutResult({}, empty, empty, empty, 0.0, 0.0, tuple(findings), polylines)


def _relevant_length_m(junction: Junction, context: DesignContext, overrides: dict[str, float]) -> float:
    """Leg lengths beyond this do not change the junction's result: every turn's tangent length plus
    the longest lead the movements use (junction_analysis caps leads at a few CMG)."""
    tangent_m = 0.0
    for movement in junction_movements(junction):
        if movement.kind == "turn":
            radius_m = max([default_radius_m(movement.turn_rad, context), *overrides.values()])
            tangent_m = max(tangent_m, radius_m * math.tan(abs(movement.turn_rad) / 2.0))
    cmg_m = max(aircraft.cmg_m for aircraft in context.fleet)
    return tangent_m + max(LEAD_IN_IN_CMG, LEAD_OUT_IN_CMG) * cmg_m + 1.0


def _junction_key(junction: Junction, cap_m: float) -> tuple[object, ...]:
    """What of a junction its result depends on: not the stations along its lines, and leg lengths
    only up to what its movements use (``cap_m``, :func:`_relevant_length_m`), so that moving a
    distant vertex does not recompute it."""
    legs = tuple((leg.id, leg.line_id, leg.line_kind, leg.heading_rad, min(leg.length_m, cap_m),
                  min(leg.straight_length_m, cap_m), leg.direction) for leg in junction.legs)
    return (junction.id, junction.point, junction.kind, legs)


def _reversal_finding(reversal: Reversal) -> Finding:
    return Finding("E-CENTERLINE-REVERSAL", Severity.ERROR,
                   f"Centerline {reversal.line_id} doubles back on itself at vertex "
                   f"{reversal.vertex_number}: "
                   f"no aircraft can follow it. Remove the vertex or draw the turn with a radius.",
                   (reversal.line_id,), reversal.point_m, "a centerline an aircraft can follow",
                   "identity (the pursuit model of docs/kinematics.md)")


def _finding_order(finding: Finding) -> tuple[int, str, float, float]:
    x, y = finding.location_m
    return (-int(finding.severity), finding.code, x if math.isfinite(x) else 0.0,
            y if math.isfinite(y) else 0.0)


def analyze(layout: Layout) -> LayoutResult:
    """A one-off analysis (no cache kept between calls)."""
    return LayoutAnalyzer().analyze(layout)
