"""Crossover checks: reversing through a crossover (E-REVERSAL-STEERING), and the centerline spacing
of its parallels (I-CROSSOVER-SPACING, E-CROSSOVER-SPACING).

Two things set how far apart the parallels of a crossover must be:

* the turn (our derivation): the smallest spacing at which a reversal through a connector at 90
  degrees keeps the nose-gear steering within the limit. The reversal is two 90-degree turns the
  same way; with radius R each and no straight between them they are one 180-degree turn, and the
  parallels are 2 R apart. The gentlest reversal between parallels s apart is that semicircle of
  radius s / 2 (a smaller radius with a straight between steers harder, as the sweep shows), so
  the spacing is 2 R180, R180 being the steering-limited radius of a 180-degree turn
  (:func:`geometry.sweep.min_radius_for_steering_limit`). Twice the 90-degree radius is not
  enough: the second turn starts before the body has realigned with the connector (at 2 R90 the
  sweep gives about 75 degrees of steering for an aircraft whose limit is 50);
* the wingtips: the rule set's taxiway/taxiway separation (taxilane/taxilane for two taxilanes).

The larger governs. Both use the more demanding of the two parallels' design aircraft.

The reversal check sweeps each reversal the crossover offers, with every fleet aircraft, along
the path of :func:`geometry.special_cases.reversal_path` at the turn radii the layout gives the
two movements. Where the connector is too short for those radii, both are scaled down until the
turns fit (that is what an aircraft would have to fly). The body angle is monotone on each
straight or arc (the pursuit equation is autonomous there), and the steering angle grows with it,
so the largest steering angle lies at a segment end: the sweep is evaluated there only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Literal

import numpy as np

from geometry.aircraft import DesignAircraft
from geometry.checks.common import (
    LENGTH_TOLERANCE_M,
    CheckContext,
    angle_text,
    finite_point,
    length_text,
    line_label,
)
from geometry.checks.steering import SteeringRadii, steering_exceeds, steering_source
from geometry.errors import GeometryError, RadiusTooSmallError
from geometry.findings import Finding, Severity
from geometry.primitives import Point
from geometry.rulesets import RuleSet, SeparationKind
from geometry.special_cases import Crossover, reversal_path
from geometry.standards import RuleValue
from geometry.sweep import sweep_at_stations

REVERSAL_TURN_RAD = math.pi     # two 90-degree turns back to back
GEAR_ROLLS_BACK_RAD = math.pi / 2.0  # reported steering where the main gear would roll backwards
LEAD_LENGTH_CMG = 2.0          # straight before and after a reversal, in CMG: the peak lies on the turns
FIT_MARGIN = 1.0 - 1e-9        # scale radii a hair below the exact fit, so rounding cannot reject it
TURN_SOURCE = ("identity (our derivation, docs/checks.md): a reversal through a 90-degree connector "
               "is at gentlest a 180-degree turn of radius spacing / 2, so the spacing is twice the "
               "steering-limited radius of a 180-degree turn (geometry.sweep.min_radius_for_steering_limit)")


@dataclass(frozen=True, slots=True)
class CrossoverSpacing:
    """What sets the spacing of a crossover's parallels (see the module docstring).

    turn_radius_m: the steering-limited radius of a 180-degree turn for ``aircraft``.
    """

    aircraft: DesignAircraft
    turn_radius_m: float
    separation: RuleValue
    separation_label: str

    @property
    def turn_spacing_m(self) -> float:
        return 2.0 * self.turn_radius_m

    @property
    def governing(self) -> Literal["turn", "wingtip"]:
        return "turn" if self.turn_spacing_m > self.separation.value_m else "wingtip"

    @property
    def governing_m(self) -> float:
        return max(self.turn_spacing_m, self.separation.value_m)


def crossover_spacing(aircraft: DesignAircraft, rule_set: RuleSet, kind: SeparationKind,
                      radii: SteeringRadii | None = None) -> CrossoverSpacing | None:
    """The spacing requirement of a crossover for ``aircraft``; None if a rule cannot be looked up
    (an aircraft outside the design groups)."""
    turn_m = (radii or SteeringRadii()).radius_m(aircraft, REVERSAL_TURN_RAD)
    try:
        separation = rule_set.separation(kind, aircraft)
        label = f"{kind.replace('_', '/')} separation for {rule_set.group_label(aircraft)}"
    except GeometryError:
        return None
    return None if turn_m is None else CrossoverSpacing(aircraft, turn_m, separation, label)


def _parallel_kind(context: CheckContext, crossover: Crossover) -> SeparationKind:
    kinds = {context.lines[line_id].line.kind for line_id in crossover.parallel_ids}
    return "taxilane_taxilane" if kinds == {"taxilane"} else "taxiway_taxiway"


def _middle(crossover: Crossover) -> Point:
    (ax, ay), (bx, by) = crossover.junction_points
    return finite_point(((ax + bx) / 2.0, (ay + by) / 2.0))


def _ids(crossover: Crossover) -> tuple[str, ...]:
    return (crossover.connector_id, *crossover.junction_ids, *crossover.parallel_ids)


def check_crossover_spacing(context: CheckContext, radii: SteeringRadii) -> list[Finding]:
    """I-CROSSOVER-SPACING for every crossover; E-CROSSOVER-SPACING when its parallels are closer
    than the governing spacing."""
    findings = []
    for crossover in context.inputs.crossovers:
        if not all(line_id in context.lines for line_id in crossover.parallel_ids):
            continue
        ids, middle = _ids(crossover), _middle(crossover)
        aircraft = context.governing(
            (context.lines[line_id].design_aircraft for line_id in crossover.parallel_ids),
            "crossover spacing", ids, middle)
        if aircraft is None:
            continue
        kind = _parallel_kind(context, crossover)
        spacing = crossover_spacing(aircraft, context.inputs.rule_set, kind, radii)
        if spacing is None:
            context.skip("crossover spacing", f"no rule for {aircraft.name}", ids, middle)
            continue
        findings.append(_spacing_info(context, crossover, spacing))
        if crossover.spacing_m < spacing.governing_m - LENGTH_TOLERANCE_M:
            findings.append(_spacing_error(context, crossover, spacing))
    return findings


def _governing_text(spacing: CrossoverSpacing) -> str:
    turn = (f"a reversal through a 90-degree connector needs 2 x {length_text(spacing.turn_radius_m)} = "
            f"{length_text(spacing.turn_spacing_m)} for {spacing.aircraft.name}")
    wingtip = f"the {spacing.separation_label} is {length_text(spacing.separation.value_m)}"
    if spacing.governing == "turn":
        return f"set by the turn ({turn}; {wingtip})"
    return f"set by the wingtip clearance ({wingtip}; {turn})"


def _spacing_source(spacing: CrossoverSpacing) -> str:
    return f"turn: {TURN_SOURCE}; wingtip: {spacing.separation.describe()}"


def _spacing_info(context: CheckContext, crossover: Crossover, spacing: CrossoverSpacing) -> Finding:
    first, second = (line_label(context.lines[line_id]) for line_id in crossover.parallel_ids)
    message = (f"Crossover {crossover.connector_id} between {first} and {second}: the parallels are "
               f"{length_text(crossover.spacing_m)} apart; the governing spacing is "
               f"{length_text(spacing.governing_m)}, {_governing_text(spacing)}.")
    return Finding("I-CROSSOVER-SPACING", Severity.INFO, message, _ids(crossover), _middle(crossover),
                   f"crossover spacing ({spacing.governing} governs)", _spacing_source(spacing))


def _spacing_error(context: CheckContext, crossover: Crossover, spacing: CrossoverSpacing) -> Finding:
    first, second = (line_label(context.lines[line_id]) for line_id in crossover.parallel_ids)
    message = (f"The parallels of crossover {crossover.connector_id} ({first} and {second}) are "
               f"{length_text(crossover.spacing_m)} apart, less than the governing "
               f"{length_text(spacing.governing_m)} {_governing_text(spacing)}. Move them at least "
               f"{length_text(spacing.governing_m - crossover.spacing_m)} further apart.")
    return Finding("E-CROSSOVER-SPACING", Severity.ERROR, message, _ids(crossover), _middle(crossover),
                   f"crossover spacing ({spacing.governing} governs)", _spacing_source(spacing))


@dataclass(frozen=True, slots=True)
class ReversalPeak:
    """The largest steering angle of one reversal, where the cockpit is then, and the radii flown."""

    reversal_index: int
    steering_rad: float
    point_m: Point
    radii_m: tuple[float, float]
    scaled: bool                  # the layout's radii did not fit the connector and were reduced


def _between_m(crossover: Crossover, index: int) -> float:
    """Distance between the two junction points along the connector, in the reversal's direction."""
    reversal = crossover.reversals[index]
    points = dict(zip(crossover.junction_ids, crossover.junction_points, strict=True))
    along = reversal.first.departure_heading_rad
    (ax, ay), (bx, by) = points[reversal.first.junction_id], points[reversal.second.junction_id]
    return (bx - ax) * math.cos(along) + (by - ay) * math.sin(along)


def _fitted_radii(crossover: Crossover, index: int, radii_m: tuple[float, float]
                  ) -> tuple[tuple[float, float], bool] | None:
    """The radii, scaled down together if the two turns overlap on the connector; None when the
    connector runs the wrong way for this reversal."""
    reversal = crossover.reversals[index]
    between_m = _between_m(crossover, index)
    needed_m = (radii_m[0] * math.tan(abs(reversal.first.turn_rad) / 2.0)
                + radii_m[1] * math.tan(abs(reversal.second.turn_rad) / 2.0))
    if not (math.isfinite(between_m) and math.isfinite(needed_m)) or between_m <= 0.0 or needed_m <= 0.0:
        return None
    if needed_m <= between_m:
        return radii_m, False
    factor = between_m / needed_m * FIT_MARGIN
    return (radii_m[0] * factor, radii_m[1] * factor), True


def reversal_peak(crossover: Crossover, index: int, aircraft: DesignAircraft,
                  radii_m: tuple[float, float]) -> ReversalPeak | None:
    """The largest nose-gear steering angle of reversal ``index`` of ``crossover`` flown by
    ``aircraft`` with the given turn radii; None if no such path can be built (a bent connector,
    legs too short)."""
    fitted = _fitted_radii(crossover, index, radii_m)
    if fitted is None:
        return None
    (first_m, second_m), scaled = fitted
    lead_m = LEAD_LENGTH_CMG * aircraft.cmg_m
    try:
        path = reversal_path(crossover, first_m, lead_m, lead_m, reversal_index=index,
                             second_radius_m=second_m)
    except GeometryError:
        return None
    stations = np.append(path.segment_starts_m(), path.length_m)
    try:
        swept = sweep_at_stations(path, aircraft, stations)
    except RadiusTooSmallError:
        # The main gear would have to roll backwards: beyond any steering limit.
        start = crossover.reversals[index].first.junction_id
        point = dict(zip(crossover.junction_ids, crossover.junction_points, strict=True))[start]
        return ReversalPeak(index, GEAR_ROLLS_BACK_RAD, finite_point(point), (first_m, second_m), scaled)
    peak = int(np.argmax(np.abs(swept.steering_rad)))
    point = finite_point(swept.cockpit_xy[peak].tolist(), _middle(crossover))
    return ReversalPeak(index, float(abs(swept.steering_rad[peak])), point, (first_m, second_m), scaled)


def _layout_radii(context: CheckContext, crossover: Crossover, index: int) -> tuple[float, float] | None:
    """The turn radii the layout gives the two movements of a reversal (None if either is
    excluded, missing or was not computed)."""
    radii = []
    reversal = crossover.reversals[index]
    for key in (reversal.first.key, reversal.second.key):
        movement = context.movements.get(key)
        if (key in context.inputs.excluded_movement_keys or movement is None or movement.radius_m is None
                or not math.isfinite(movement.radius_m) or movement.radius_m <= 0.0):
            return None
        radii.append(movement.radius_m)
    return radii[0], radii[1]


def _reversing_fleet(context: CheckContext, crossover: Crossover) -> tuple[DesignAircraft, ...]:
    if context.inputs.fleet:
        return context.inputs.fleet
    return tuple(dict.fromkeys(context.lines[line_id].design_aircraft for line_id in crossover.parallel_ids
                               if line_id in context.lines))


_Shape = tuple[DesignAircraft, float, float, float, float, float, float, float]


@dataclass(slots=True)
class ReversalSteering:
    """Peak steering of reversals, remembered by their shape (aircraft, radii, turn angles,
    junction spacing along the connector, straight legs): crossovers alike in shape steer alike
    wherever they are."""

    known: dict[_Shape, float | None] = field(default_factory=dict)

    def steering_rad(self, crossover: Crossover, index: int, aircraft: DesignAircraft,
                     radii_m: tuple[float, float]) -> float | None:
        reversal = crossover.reversals[index]
        key = (aircraft, round(radii_m[0], 6), round(radii_m[1], 6), round(abs(reversal.first.turn_rad), 9),
               round(abs(reversal.second.turn_rad), 9), round(_between_m(crossover, index), 6),
               round(reversal.first.from_leg.straight_length_m, 3),
               round(reversal.second.to_leg.straight_length_m, 3))
        if key not in self.known:
            peak = reversal_peak(crossover, index, aircraft, radii_m)
            self.known[key] = None if peak is None else peak.steering_rad
        return self.known[key]


def check_reversal_steering(context: CheckContext, radii: SteeringRadii,
                            steering: ReversalSteering | None = None) -> list[Finding]:
    """E-REVERSAL-STEERING: per crossover and aircraft, the worst reversal if its steering angle
    exceeds the aircraft's limit. ``steering`` may carry the peaks known from earlier runs (they
    depend on the reversal's shape only)."""
    findings = []
    steering = steering if steering is not None else ReversalSteering()
    for crossover in context.inputs.crossovers:
        if not crossover.connector_is_straight:
            continue
        for aircraft in _reversing_fleet(context, crossover):
            peaks = []
            for index in range(len(crossover.reversals)):
                layout_radii = _layout_radii(context, crossover, index)
                peak_rad = None if layout_radii is None else steering.steering_rad(
                    crossover, index, aircraft, layout_radii)
                if peak_rad is not None and layout_radii is not None:
                    peaks.append((peak_rad, index, layout_radii))
            if not peaks or not steering_exceeds(max(peaks)[0], aircraft):
                continue
            _, index, layout_radii = max(peaks)
            worst = reversal_peak(crossover, index, aircraft, layout_radii)
            if worst is not None:
                findings.append(_reversal_finding(context, crossover, aircraft, worst, radii))
    return findings


def _reversal_finding(context: CheckContext, crossover: Crossover, aircraft: DesignAircraft,
                      peak: ReversalPeak, radii: SteeringRadii) -> Finding:
    reversal = crossover.reversals[peak.reversal_index]
    names = [line_label(context.lines[line_id]) if line_id in context.lines else line_id
             for line_id in (reversal.first.from_leg.line_id, reversal.second.to_leg.line_id)]
    flown = f"turn radii of {length_text(peak.radii_m[0])} and {length_text(peak.radii_m[1])}"
    if peak.scaled:
        flown += " (reduced so that both turns fit on the connector)"
    message = (f"Reversing through crossover {crossover.connector_id} from {names[0]} onto {names[1]}, "
               f"{aircraft.name} needs a nose-gear steering angle of {angle_text(peak.steering_rad)}, "
               f"above its limit of {aircraft.max_steering_deg:.1f} degrees, with {flown}.")
    needed_m = radii.radius_m(aircraft, REVERSAL_TURN_RAD)
    if needed_m is not None:
        message += (f" Back to back, the two turns keep within the limit at radii of at least "
                    f"{length_text(needed_m)} (with a connector at 90 degrees, parallels "
                    f"{length_text(2.0 * needed_m)} apart): enlarge the turn radii and the spacing.")
    ids = (*_ids(crossover), reversal.first.key, reversal.second.key)
    return Finding("E-REVERSAL-STEERING", Severity.ERROR, message, ids, peak.point_m,
                   f"maximum nose-gear steering angle in a reversal, {aircraft.name}",
                   steering_source(context, aircraft))
