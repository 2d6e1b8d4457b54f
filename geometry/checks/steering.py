"""Movement checks: the nose-gear steering angle along each movement (E-STEERING) and the
movements that could not be computed at all (E-TURN-FIT)."""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, field

from geometry.aircraft import DesignAircraft
from geometry.checks.common import (
    ANGLE_TOLERANCE_DEG,
    CheckContext,
    angle_text,
    finite_point,
    length_text,
    movement_ids,
    movement_label,
    sentence,
)
from geometry.checks.inputs import MovementInfo, TrackInfo
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity
from geometry.sweep import min_radius_for_steering_limit

TURN_FIT_SOURCE = ("identity: a turn arc of radius R through a junction needs R tan(|turn| / 2) of "
                   "straight leg on each side (geometry/turns.py)")


@dataclass(slots=True)
class SteeringRadii:
    """:func:`min_radius_for_steering_limit`, remembered per aircraft and turn for one run of the
    checks (a bisection of swept turns: worth not repeating for every movement)."""

    _known: dict[tuple[DesignAircraft, float], float | None] = field(default_factory=dict)

    def radius_m(self, aircraft: DesignAircraft, turn_rad: float) -> float | None:
        """The smallest radius keeping the steering within the aircraft's limit, or None when
        the turn angle cannot be used (zero, not finite)."""
        key = (aircraft, round(abs(turn_rad), 9))
        if key not in self._known:
            try:
                self._known[key] = min_radius_for_steering_limit(aircraft, turn_rad)
            except GeometryError:
                self._known[key] = None
        return self._known[key]


def steering_exceeds(max_steering_rad: float, aircraft: DesignAircraft) -> bool:
    """True when ``max_steering_rad`` is above the aircraft's limit by more than rounding."""
    return (math.isfinite(max_steering_rad)
            and math.degrees(max_steering_rad) > aircraft.max_steering_deg + ANGLE_TOLERANCE_DEG)


def steering_source(context: CheckContext, aircraft: DesignAircraft) -> str:
    """The aircraft's own limit, with the rule set's design criterion it defaults to."""
    try:
        criterion = context.inputs.rule_set.max_steering(aircraft).describe()
    except GeometryError:
        criterion = "50 deg design criterion (Horonjeff et al., pp. 86 and 287; published)"
    return (f"the aircraft's nose-gear steering limit {aircraft.max_steering_deg:g} deg; "
            f"design criterion {criterion}")


def check_steering(context: CheckContext, radii: SteeringRadii) -> list[Finding]:
    """E-STEERING: a movement whose largest nose-gear steering angle exceeds the aircraft's limit,
    with the centerline radius that would keep it within the limit."""
    return steering_findings(context, radii, context.offered_movements())


def steering_findings(context: CheckContext, radii: SteeringRadii,
                      movements: Iterable[MovementInfo]) -> list[Finding]:
    """E-STEERING along ``movements`` (offered ones)."""
    findings = []
    for movement in movements:
        if movement.problem is not None:
            continue
        for track in movement.tracks:
            if steering_exceeds(track.max_steering_rad, track.aircraft):
                findings.append(_steering_finding(context, radii, movement, track))
    return findings


def _steering_finding(context: CheckContext, radii: SteeringRadii, movement: MovementInfo,
                      track: TrackInfo) -> Finding:
    aircraft = track.aircraft
    message = (f"In {movement_label(context, movement)}, {aircraft.name} needs a nose-gear steering "
               f"angle of {angle_text(track.max_steering_rad)}, above its limit of "
               f"{aircraft.max_steering_deg:.1f} degrees.")
    fix_m = (radii.radius_m(aircraft, movement.turn_rad)
             if movement.radius_m is not None and math.isfinite(movement.turn_rad) else None)
    if fix_m is not None and movement.radius_m is not None and math.isfinite(movement.radius_m):
        message += (f" Increase the centerline radius from {length_text(movement.radius_m)} to at "
                    f"least {length_text(fix_m)}.")
    elif fix_m is not None:
        message += f" A centerline radius of at least {length_text(fix_m)} keeps it within the limit."
    return Finding("E-STEERING", Severity.ERROR, message, movement_ids(movement),
                   finite_point(track.max_steering_point_m, movement.location_m),
                   f"maximum nose-gear steering angle, {aircraft.name}", steering_source(context, aircraft))


def check_turn_fit(context: CheckContext) -> list[Finding]:
    """E-TURN-FIT: a movement the analysis could not compute, with its reason."""
    return turn_fit_findings(context, context.offered_movements())


def turn_fit_findings(context: CheckContext, movements: Iterable[MovementInfo]) -> list[Finding]:
    """E-TURN-FIT among ``movements`` (offered ones)."""
    findings = []
    for movement in movements:
        if movement.problem is None:
            continue
        message = (f"{sentence(movement_label(context, movement))} could not be computed: "
                   f"{movement.problem.rstrip('.')}. Lengthen the legs, move the neighbouring "
                   f"junction, or change the turn radius.")
        findings.append(Finding("E-TURN-FIT", Severity.ERROR, message, movement_ids(movement),
                                finite_point(movement.location_m), "turn fit", TURN_FIT_SOURCE))
    return findings
