"""Rules about a junction's layout as a whole: how many paths it offers from one approach (W-PATHS).

A pilot arriving at a junction should have at most three choices: straight ahead, one turn left
and one turn right. More choices invite a wrong turn. This is common practice with no published
value we could read; the FAA's taxiway design principles call it the "three-node concept".
"""

from __future__ import annotations

import math

from geometry.centerline import wrap_angle
from geometry.checks.common import CheckContext, finite_point, line_label
from geometry.findings import Finding, Severity
from geometry.movements import Movement, junction_movements
from geometry.network import Junction, Leg

MAX_PATHS_PER_APPROACH = 3
PATHS_SOURCE = ("common practice, no source: at most three choices per approach (straight ahead, "
                "one left, one right); the FAA's 'three-node concept' (AC 150/5300-13A taxiway "
                "design principles, read in a published airport development plan summarising them)")


def check_paths(context: CheckContext) -> list[Finding]:
    """W-PATHS: an approach to a junction that offers more than three movements (excluded
    movements do not count)."""
    return [finding for junction in context.inputs.junctions for finding in paths_findings(context, junction)]


def paths_findings(context: CheckContext, junction: Junction) -> list[Finding]:
    """W-PATHS at one junction."""
    excluded = context.inputs.excluded_movement_keys
    movements = [movement for movement in junction_movements(junction) if movement.key not in excluded]
    findings = []
    for leg in junction.legs:
        offered = [movement for movement in movements if movement.from_leg == leg]
        if len(offered) > MAX_PATHS_PER_APPROACH:
            findings.append(_paths_finding(context, junction, leg, offered))
    return findings


def _choice_text(context: CheckContext, movement: Movement) -> str:
    info = context.lines.get(movement.to_leg.line_id)
    name = line_label(info) if info is not None else movement.to_leg.line_id
    turn_deg = math.degrees(wrap_angle(movement.turn_rad))
    if movement.kind == "straight":
        return f"straight on along {name}"
    return f"{'left' if turn_deg > 0 else 'right'} {abs(turn_deg):.0f} degrees onto {name}"


def _paths_finding(context: CheckContext, junction: Junction, leg: Leg, offered: list[Movement]) -> Finding:
    info = context.lines.get(leg.line_id)
    arriving = line_label(info) if info is not None else leg.line_id
    choices = "; ".join(_choice_text(context, movement) for movement in offered)
    message = (f"At {junction.id}, an aircraft arriving along {arriving} can choose {len(offered)} "
               f"paths ({choices}). Keep at most {MAX_PATHS_PER_APPROACH}: straight ahead, one left "
               f"and one right. Exclude movements or split the junction into simpler ones.")
    ids = (junction.id, leg.id, *(movement.key for movement in offered))
    return Finding("W-PATHS", Severity.WARNING, message, ids, finite_point(junction.point),
                   "at most three paths per approach", PATHS_SOURCE)
