"""Pavement width checks: the straight width of each line (E-WIDTH) and the edge margin left
between the outer main-gear tyres and the pavement edge along each movement (E-EDGE-MARGIN)."""

from __future__ import annotations

import math
from collections.abc import Iterable

from geometry.checks.common import (
    LENGTH_TOLERANCE_M,
    CheckContext,
    finite_point,
    length_text,
    line_label,
    line_midpoint,
    movement_ids,
    movement_label,
    sentence,
)
from geometry.checks.inputs import LineInfo, MovementInfo, TrackInfo
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity


def check_widths(context: CheckContext) -> list[Finding]:
    """E-WIDTH: a taxiway or taxilane drawn narrower than its design group's straight width.

    Only a width override can make a line narrower than the rule, so the message points at it."""
    return [finding for info in context.inputs.lines for finding in width_findings(context, info)]


def width_findings(context: CheckContext, info: LineInfo) -> list[Finding]:
    """E-WIDTH for one line (none for a runway)."""
    if info.line.kind == "runway":
        return []
    finding = _width_finding(context, info)
    return [] if finding is None else [finding]


def _width_finding(context: CheckContext, info: LineInfo) -> Finding | None:
    location = line_midpoint(info.line)
    ids = (info.line.id,)
    if not math.isfinite(info.width_m):
        context.skip("straight width", f"{line_label(info)} has no valid width", ids, location)
        return None
    aircraft = info.design_aircraft
    rule = context.rule("straight width", lambda: context.inputs.rule_set.straight_width(aircraft),
                        ids, location)
    if rule is None or info.width_m >= rule.value_m - LENGTH_TOLERANCE_M:
        return None
    group = context.group_label(aircraft)
    how = "by a width override" if info.width_overridden else "the width of the design group chosen for it"
    message = (f"{sentence(line_label(info))} is {length_text(info.width_m)} wide ({how}), "
               f"narrower than the {length_text(rule.value_m)} that {group} needs on straights "
               f"(design aircraft {aircraft.name}). Remove the override or widen the line.")
    return Finding("E-WIDTH", Severity.ERROR, message, ids, location,
                   f"straight taxiway width, {group}", rule.describe())


def check_edge_margins(context: CheckContext) -> list[Finding]:
    """E-EDGE-MARGIN: along a movement, an outer main-gear tyre comes closer to the pavement edge
    (as drawn, or as it exists) than the required edge margin (TESM or ICAO clearance)."""
    return edge_margin_findings(context, context.offered_movements())


def edge_margin_findings(context: CheckContext, movements: Iterable[MovementInfo]) -> list[Finding]:
    """E-EDGE-MARGIN along ``movements`` (offered ones)."""
    findings = []
    for movement in movements:
        for track in movement.tracks:
            margin_m, required_m = track.min_edge_margin_m, track.required_edge_margin_m
            if not (math.isfinite(margin_m) and math.isfinite(required_m)):
                continue
            if margin_m < required_m - LENGTH_TOLERANCE_M:
                findings.append(_edge_finding(context, movement, track))
    return findings


def _edge_finding(context: CheckContext, movement: MovementInfo, track: TrackInfo) -> Finding:
    margin_m, required_m = track.min_edge_margin_m, track.required_edge_margin_m
    if margin_m < 0.0:
        where = f"runs {length_text(-margin_m)} off the pavement"
    else:
        where = f"passes {length_text(margin_m)} from the pavement edge"
    message = (f"In {movement_label(context, movement)}, the outer main-gear tyre of "
               f"{track.aircraft.name} {where}; the edge margin must be at least "
               f"{length_text(required_m)}. Widen the fillet or the pavement there (existing "
               f"pavement may be too narrow), or use a larger turn radius.")
    rule, source = _edge_rule(context, movement, track)
    return Finding("E-EDGE-MARGIN", Severity.ERROR, message, movement_ids(movement),
                   finite_point(track.min_edge_margin_point_m, movement.location_m), rule, source)


def _edge_rule(context: CheckContext, movement: MovementInfo, track: TrackInfo) -> tuple[str, str]:
    """The rule's name and source; the margin itself comes with the track from the analysis."""
    rule_set = context.inputs.rule_set
    name = "taxiway edge safety margin" if rule_set.name == "FAA" else "main wheel to taxiway edge clearance"
    try:
        rule = rule_set.edge_margin(track.aircraft, on_curve=movement.radius_m is not None)
    except GeometryError:
        return name, "the margin required by the layout analysis (no design group for this aircraft)"
    return f"{name}, {context.group_label(track.aircraft)}", rule.describe()
