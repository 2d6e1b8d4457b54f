"""Separation checks between centerlines, and between centerlines and objects.

* Line to line (E-SEP-TWY-TWY, E-SEP-TXL-TXL, E-SEP-RWY-TWY): near-parallel overlapping pieces of
  two lines (see :mod:`geometry.checks.parallel_pieces`) closer than the rule set's separation for
  the more demanding of the two lines' design aircraft. Two taxilanes use the taxilane/taxilane
  value; a taxiway next to a taxiway or a taxilane uses the taxiway/taxiway value (the more
  demanding; the FAA table's row reads "taxiway centerline to parallel taxiway/taxilane
  centerline", from memory); a runway next to either uses the runway/taxiway value for that
  runway's ``instrument`` flag (ICAO: code number 4 assumed, the widest strip).
* Line to object (E-SEP-TWY-OBJ, E-SEP-TXL-OBJ): any point of a taxiway or taxilane centerline
  closer to an object than the taxiway/object (taxilane/object) separation of its design aircraft.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import shapely
from shapely.geometry.base import BaseGeometry

from geometry.checks.common import (
    LENGTH_TOLERANCE_M,
    CheckContext,
    length_text,
    line_label,
    nearest_midpoint,
    sentence,
    usable_objects,
)
from geometry.checks.inputs import LineInfo, ObjectInfo
from geometry.checks.parallel_pieces import (
    ParallelPair,
    Pieces,
    SegmentKey,
    line_pieces,
    parallel_pairs,
    segments_at_junctions,
)
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity
from geometry.rulesets import SeparationKind
from geometry.standards import RuleValue

CODES: dict[SeparationKind, str] = {
    "taxiway_taxiway": "E-SEP-TWY-TWY", "taxilane_taxilane": "E-SEP-TXL-TXL",
    "runway_taxiway": "E-SEP-RWY-TWY", "taxiway_object": "E-SEP-TWY-OBJ",
    "taxilane_object": "E-SEP-TXL-OBJ"}
RULE_NAMES: dict[SeparationKind, str] = {
    "taxiway_taxiway": "taxiway/taxiway separation", "taxilane_taxilane": "taxilane/taxilane separation",
    "runway_taxiway": "runway/taxiway separation", "taxiway_object": "taxiway/object separation",
    "taxilane_object": "taxilane/object separation"}
_REACH_KINDS: tuple[SeparationKind, ...] = ("taxiway_taxiway", "runway_taxiway")


def pair_kind(info_a: LineInfo, info_b: LineInfo) -> SeparationKind | None:
    """Which separation applies between two lines; None for two runways."""
    kinds = {info_a.line.kind, info_b.line.kind}
    if kinds == {"runway"}:
        return None
    if "runway" in kinds:
        return "runway_taxiway"
    return "taxilane_taxilane" if kinds == {"taxilane"} else "taxiway_taxiway"


@dataclass(frozen=True, slots=True)
class PairRule:
    kind: SeparationKind
    rule: RuleValue
    label: str          # rule name with the design group, e.g. "taxiway/taxiway separation, ADG III"
    phrase: str         # the same for a sentence: "taxiway/taxiway separation for ADG III"


@dataclass(slots=True)
class _PairRules:
    """The rule of each pair of lines, looked up once."""

    context: CheckContext
    known: dict[tuple[str, str], PairRule | None] = field(default_factory=dict)

    def get(self, line_a: str, line_b: str) -> PairRule | None:
        if (line_a, line_b) not in self.known:
            lines = self.context.lines
            self.known[(line_a, line_b)] = self._look_up(lines[line_a], lines[line_b])
        return self.known[(line_a, line_b)]

    def required_m(self, line_a: str, line_b: str) -> float | None:
        found = self.get(line_a, line_b)
        return None if found is None else found.rule.value_m

    def _look_up(self, info_a: LineInfo, info_b: LineInfo) -> PairRule | None:
        kind = pair_kind(info_a, info_b)
        if kind is None:
            return None
        ids, where = (info_a.line.id, info_b.line.id), info_a.line.segments[0].start
        aircraft = self.context.governing((info_a.design_aircraft, info_b.design_aircraft),
                                          RULE_NAMES[kind], ids, where)
        if aircraft is None:
            return None
        runway = info_a if info_a.line.kind == "runway" else info_b
        rule_set = self.context.inputs.rule_set
        rule = self.context.rule(RULE_NAMES[kind], lambda: rule_set.separation(
            kind, aircraft, instrument_runway=runway.instrument), ids, where)
        if rule is None:
            return None
        group = self.context.group_label(aircraft)
        label, phrase = f"{RULE_NAMES[kind]}, {group}", f"{RULE_NAMES[kind]} for {group}"
        if kind == "runway_taxiway":
            runway_kind = "an instrument" if runway.instrument else "a non-instrument"
            label += f", {runway_kind.split()[1]} runway"
            phrase += f" and {runway_kind} runway"
        return PairRule(kind, rule, label, phrase)


def separation_reach_m(context: CheckContext) -> float:
    """The largest line-to-line separation any pair of these lines can need."""
    reach = 0.0
    for aircraft in dict.fromkeys(info.design_aircraft for info in context.inputs.lines):
        for kind in _REACH_KINDS:
            try:
                value = context.inputs.rule_set.separation(kind, aircraft).value_m
            except GeometryError:
                continue
            reach = max(reach, value)
    return reach + 1.0


def pair_rule_found(context: CheckContext, info_a: LineInfo, info_b: LineInfo) -> bool:
    """Whether the separation rule of two lines (if any applies) can be looked up without a
    ``W-CHECK-SKIPPED`` (nothing is noted either way)."""
    saved, context.skipped = context.skipped, {}
    try:
        _PairRules(context).get(info_a.line.id, info_b.line.id)
        return not context.skipped
    finally:
        context.skipped = saved


def check_line_separations(context: CheckContext) -> list[Finding]:
    """E-SEP-TWY-TWY, E-SEP-TXL-TXL, E-SEP-RWY-TWY."""
    lines = [info.line for info in context.inputs.lines]
    if len(lines) < 2:
        return []
    rules = _PairRules(context)
    pairs = parallel_pairs(line_pieces(lines), separation_reach_m(context), rules.required_m,
                           segments_at_junctions(lines, context.inputs.junctions))
    findings = []
    for pair in pairs:
        found = rules.get(pair.line_a, pair.line_b)
        if found is not None and math.isfinite(pair.spacing_m):
            findings.append(_pair_finding(context, pair, found))
    return findings


def pair_separation_findings(context: CheckContext, pieces: Pieces, reach_m: float,
                             excluded: set[tuple[SegmentKey, SegmentKey]]) -> list[Finding]:
    """:func:`check_line_separations` for the lines of ``pieces`` only (two, in practice), with
    ``excluded`` the segment pairs meeting at their shared junctions (``segments_at_junctions``)."""
    rules = _PairRules(context)
    findings = []
    for pair in parallel_pairs(pieces, reach_m, rules.required_m, excluded):
        found = rules.get(pair.line_a, pair.line_b)
        if found is not None and math.isfinite(pair.spacing_m):
            findings.append(_pair_finding(context, pair, found))
    return findings


def _pair_finding(context: CheckContext, pair: ParallelPair, found: PairRule) -> Finding:
    info_a, info_b = context.lines[pair.line_a], context.lines[pair.line_b]
    if info_b.line.kind == "runway":
        info_a, info_b = info_b, info_a
    required_m = found.rule.value_m
    message = (f"{sentence(line_label(info_a))} and {line_label(info_b)} run parallel "
               f"{length_text(pair.spacing_m)} apart (centerline to centerline) over "
               f"{length_text(pair.stretch_m)}; the {found.phrase} is {length_text(required_m)}. "
               f"Move them at least {length_text(required_m - pair.spacing_m)} further apart.")
    return Finding(CODES[found.kind], Severity.ERROR, message, (info_a.line.id, info_b.line.id),
                   pair.location_m, found.label, found.rule.describe())


def check_object_separations(context: CheckContext) -> list[Finding]:
    """E-SEP-TWY-OBJ, E-SEP-TXL-OBJ."""
    objects = usable_objects(context.inputs.objects)
    if not objects:
        return []
    tree = shapely.STRtree([item.geometry for item in objects])
    return [finding for info in context.inputs.lines
            for finding in object_separation_findings(context, info, objects, tree)]


def object_separation_findings(context: CheckContext, info: LineInfo, objects: list[ObjectInfo],
                               tree: shapely.STRtree) -> list[Finding]:
    """E-SEP-TWY-OBJ, E-SEP-TXL-OBJ along one line (``tree`` holds the geometries of ``objects``)."""
    if info.line.kind == "runway":
        return []
    kind: SeparationKind = "taxiway_object" if info.line.kind == "taxiway" else "taxilane_object"
    rule = _object_rule(context, info, kind)
    if rule is None:
        return []
    findings = []
    centerline = context.geometry(info.line.id)
    for index in tree.query(centerline, predicate="dwithin", distance=rule.value_m).tolist():
        finding = _object_finding(context, info, kind, rule, centerline, objects[index])
        if finding is not None:
            findings.append(finding)
    return findings


def _object_rule(context: CheckContext, info: LineInfo, kind: SeparationKind) -> RuleValue | None:
    aircraft = info.design_aircraft
    return context.rule(RULE_NAMES[kind], lambda: context.inputs.rule_set.separation(kind, aircraft),
                        (info.line.id,), info.line.segments[0].start)


def _object_finding(context: CheckContext, info: LineInfo, kind: SeparationKind, rule: RuleValue,
                    centerline: BaseGeometry, item: ObjectInfo) -> Finding | None:
    distance_m = float(shapely.distance(centerline, item.geometry))
    if not math.isfinite(distance_m) or distance_m >= rule.value_m - LENGTH_TOLERANCE_M:
        return None
    group = context.group_label(info.design_aircraft)
    label = f"{RULE_NAMES[kind]}, {group}"
    message = (f"Object {item.name or item.id} is {length_text(distance_m)} from the centerline of "
               f"{line_label(info)}; the {RULE_NAMES[kind]} for {group} is {length_text(rule.value_m)}. "
               f"Move the object "
               f"or the {info.line.kind} at least {length_text(rule.value_m - distance_m)} further apart.")
    return Finding(CODES[kind], Severity.ERROR, message, (info.line.id, item.id),
                   nearest_midpoint(centerline, item.geometry), label, rule.describe())
