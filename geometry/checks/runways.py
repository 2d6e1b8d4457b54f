"""Runway connections: wide throats (W-WIDE-THROAT), the right-angle and acute-angled connections
recognised (I-RUNWAY-CONNECTION) and acute exits outside the rapid-exit angles
(W-ACUTE-EXIT-ANGLE)."""

from __future__ import annotations

import math

from geometry.checks.common import (
    ANGLE_TOLERANCE_DEG,
    LENGTH_TOLERANCE_M,
    CheckContext,
    angle_text,
    finite_point,
    length_text,
    line_label,
)
from geometry.checks.inputs import pavement_near
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity
from geometry.network import Junction
from geometry.primitives import Point
from geometry.special_cases import THROAT_PROBE_OFFSET_M, AcuteExit, ThroatExtent, throat_extents
from geometry.standards import ANNEX_14, RuleValue

_RAPID_EXIT = (f"{ANNEX_14}, rapid exit taxiways: intersection angle not less than 25 nor more "
               "than 45 degrees, preferably 30")
RAPID_EXIT_MIN_ANGLE = RuleValue(25.0, "deg", _RAPID_EXIT, "published")
RAPID_EXIT_MAX_ANGLE = RuleValue(45.0, "deg", _RAPID_EXIT, "published")
RAPID_EXIT_PREFERRED_ANGLE = RuleValue(30.0, "deg", _RAPID_EXIT, "published")
WIDE_THROAT_SOURCE = ("FAA taxiway design principles: avoid wide expanses of pavement and wide-throat "
                      "entrances, since signs end up far from the pilot's eye (AC 150/5300-13A and FAA "
                      "Engineering Brief 75, read in a published airport development plan summarising "
                      "them); the runway width as the limit is common practice, no source")
THROAT_BOUNDS_MARGIN_M = 1.0  # around the probes: they lie inside the rectangle, not on its sides
CONNECTION_SOURCE = ("recognised by geometry/special_cases.py: right angle within 5 degrees of 90; "
                     "acute exit 20 to 60 degrees from the direction of travel (house definitions)")


def _runway_width_m(context: CheckContext, runway_id: str) -> float | None:
    width = context.inputs.runway_widths_m.get(runway_id)
    if width is None and runway_id in context.lines:
        width = context.lines[runway_id].width_m
    if width is None or not math.isfinite(width) or width <= 0.0:
        return None
    return float(width)


def check_wide_throats(context: CheckContext) -> list[Finding]:
    """W-WIDE-THROAT: a junction's pavement opens onto a runway edge over more than the runway's
    width (crossovers, entrances and right-angle exits). An acute-angled exit is left out: leaving
    the runway at 25 to 45 degrees opens a long stretch of edge by its geometry alone, and the
    wide-throat guidance is about entrances and crossings (common practice, no source)."""
    findings: list[Finding] = []
    acute = {exit_.junction_id for exit_ in context.inputs.acute_exits}
    for junction in context.inputs.junctions:
        if junction.kind != "taxiway_runway" or junction.id in acute:
            continue
        for runway_id in sorted({leg.line_id for leg in junction.legs if leg.line_kind == "runway"}):
            width_m = _runway_width_m(context, runway_id)
            if width_m is None:
                continue
            try:
                bounds_m = _throat_bounds_m(junction, runway_id, width_m)
                pavement = pavement_near(context.inputs.pavement, bounds_m)
                extents = throat_extents(junction, runway_id, width_m, pavement)
            except GeometryError as error:
                context.skip("wide throat", str(error), (junction.id, runway_id), junction.point)
                continue
            findings.extend(_throat_finding(context, junction, extent, width_m)
                            for extent in extents if extent.extent_m > width_m + LENGTH_TOLERANCE_M)
    return findings


def _throat_bounds_m(junction: Junction, runway_id: str, width_m: float) -> tuple[float, float, float, float]:
    """A rectangle around both edge probes of :func:`throat_extents` (the same stretch of each
    runway edge), with a margin, so the pavement within it is all the probes can meet."""
    legs = [leg for leg in junction.legs if leg.line_id == runway_id]
    if not legs:
        return (-math.inf, -math.inf, math.inf, math.inf)
    heading = next((leg.heading_rad for leg in legs if leg.direction == 1), legs[0].heading_rad + math.pi)
    behind_m = sum(leg.length_m for leg in legs if leg.direction == -1)
    ahead_m = sum(leg.length_m for leg in legs if leg.direction == 1)
    across_m = width_m / 2.0 + THROAT_PROBE_OFFSET_M
    corners = [(junction.point[0] + s * math.cos(heading) - a * math.sin(heading),
                junction.point[1] + s * math.sin(heading) + a * math.cos(heading))
               for s in (-behind_m, ahead_m) for a in (-across_m, across_m)]
    xs, ys = [x for x, _ in corners], [y for _, y in corners]
    return (min(xs) - THROAT_BOUNDS_MARGIN_M, min(ys) - THROAT_BOUNDS_MARGIN_M,
            max(xs) + THROAT_BOUNDS_MARGIN_M, max(ys) + THROAT_BOUNDS_MARGIN_M)


def _edge_point(junction: Junction, extent: ThroatExtent, width_m: float) -> Point:
    legs = [leg for leg in junction.legs if leg.line_id == extent.runway_id]
    heading = next((leg.heading_rad for leg in legs if leg.direction == 1), legs[0].heading_rad + math.pi)
    along_m = (extent.start_station_m + extent.end_station_m) / 2.0
    across_m = extent.side * width_m / 2.0
    return finite_point((junction.point[0] + along_m * math.cos(heading) - across_m * math.sin(heading),
                         junction.point[1] + along_m * math.sin(heading) + across_m * math.cos(heading)),
                        junction.point)


def _throat_finding(context: CheckContext, junction: Junction, extent: ThroatExtent,
                    width_m: float) -> Finding:
    runway = context.lines.get(extent.runway_id)
    name = line_label(runway) if runway is not None else f"runway {extent.runway_id}"
    edge = "left" if extent.side == 1 else "right"
    message = (f"At {junction.id}, the pavement opens {length_text(extent.extent_m)} onto the {edge} "
               f"edge of {name}, wider than the runway itself ({length_text(width_m)}). Signs end up "
               f"far from the pilot's eye: narrow the throat, or coordinate the signs with the "
               f"control tower.")
    return Finding("W-WIDE-THROAT", Severity.WARNING, message, (junction.id, extent.runway_id),
                   _edge_point(junction, extent, width_m), "wide throat at a runway", WIDE_THROAT_SOURCE)


def check_runway_connections(context: CheckContext) -> list[Finding]:
    """I-RUNWAY-CONNECTION for each right-angle connection and acute-angled exit recognised;
    W-ACUTE-EXIT-ANGLE for an acute exit outside 25 to 45 degrees."""
    findings = []
    for connection in context.inputs.right_angle_connections:
        junction = context.junctions.get(connection.junction_id)
        message = (f"Right-angle runway entrance/exit at {connection.junction_id}: "
                   f"{_name(context, connection.taxiway_id)} meets {_name(context, connection.runway_id)} "
                   f"at {angle_text(connection.angle_rad)}.")
        findings.append(Finding("I-RUNWAY-CONNECTION", Severity.INFO, message,
                                (connection.junction_id, connection.runway_id, connection.taxiway_id),
                                _where(junction), "right-angle runway connection", CONNECTION_SOURCE))
    for exit_ in context.inputs.acute_exits:
        findings.extend(_acute_exit_findings(context, exit_))
    return findings


def _name(context: CheckContext, line_id: str) -> str:
    info = context.lines.get(line_id)
    return line_label(info) if info is not None else line_id


def _where(junction: Junction | None) -> Point:
    return finite_point(junction.point) if junction is not None else (0.0, 0.0)


def _acute_exit_findings(context: CheckContext, exit_: AcuteExit) -> list[Finding]:
    where = _where(context.junctions.get(exit_.junction_id))
    ids = (exit_.junction_id, exit_.runway_id, exit_.taxiway_id, exit_.movement_key)
    side = "left" if exit_.side == 1 else "right"
    found = [Finding("I-RUNWAY-CONNECTION", Severity.INFO,
                     f"Acute-angled exit at {exit_.junction_id}: from {_name(context, exit_.runway_id)} "
                     f"onto {_name(context, exit_.taxiway_id)}, turning {side} "
                     f"{angle_text(exit_.exit_angle_rad)} from the direction of travel.",
                     ids, where, "acute-angled runway exit", CONNECTION_SOURCE)]
    angle_deg = math.degrees(exit_.exit_angle_rad)
    low, high = RAPID_EXIT_MIN_ANGLE.value, RAPID_EXIT_MAX_ANGLE.value
    if math.isfinite(angle_deg) and not low - ANGLE_TOLERANCE_DEG <= angle_deg <= high + ANGLE_TOLERANCE_DEG:
        found.append(Finding(
            "W-ACUTE-EXIT-ANGLE", Severity.WARNING,
            f"The acute-angled exit from {_name(context, exit_.runway_id)} onto "
            f"{_name(context, exit_.taxiway_id)} at {exit_.junction_id} leaves at "
            f"{angle_text(exit_.exit_angle_rad)}; rapid exit taxiways meet the runway at {low:g} to "
            f"{high:g} degrees, preferably {RAPID_EXIT_PREFERRED_ANGLE.value:g}. Turn the exit.",
            ids, where, "rapid exit taxiway angle", RAPID_EXIT_MIN_ANGLE.describe()))
    return found
