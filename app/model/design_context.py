"""What the analysis needs besides geometry: the fleet, the rule set, and each line's width.

A ``DesignContext`` is a frozen value built once per layout settings; it is part of the cache
keys of the derived results, so changing the fleet or the rule set recomputes everything and a
drag recomputes nothing of it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

from app.model.elements import Centerline, Layout
from geometry.aircraft import DesignAircraft
from geometry.classify import tdg_of_aircraft
from geometry.errors import GeometryError
from geometry.rulesets import RuleSet, get_rule_set, governing_aircraft
from geometry.sweep import min_radius_for_steering_limit
from geometry.theoretical import theoretical_airplane
from geometry.turns import default_turn_radius_m, speed_radius_m

DEFAULT_TDG = "3"
# Turns under 90 degrees get at least the radius for this taxiing speed (R = V^2 / 17.07:
# Horonjeff Table 6-22, citing the ICAO Aerodrome Design Manual Part 2). 32 km/h gives 60 m.
DESIGN_TAXI_SPEED_KMH = 32.0
RADIUS_ROUNDING_M = 0.5  # default radii are rounded up to this step, as a planner would


@dataclass(frozen=True, slots=True)
class DesignContext:
    rule_set_name: str
    fleet: tuple[DesignAircraft, ...]

    @property
    def rule_set(self) -> RuleSet:
        return get_rule_set(self.rule_set_name)  # type: ignore[arg-type]

    @property
    def governing(self) -> DesignAircraft:
        return governing_aircraft(self.fleet, self.rule_set)

    @property
    def radius_aircraft(self) -> tuple[DesignAircraft, ...]:
        """Whose steering limit sets default radii: the fleet and, under FAA rules, the theoretical
        airplane of the governing aircraft's TDG (the standard's design basis for turns)."""
        return _radius_aircraft(self)


@lru_cache(maxsize=64)
def _radius_aircraft(context: DesignContext) -> tuple[DesignAircraft, ...]:
    if context.rule_set_name != "FAA":
        return context.fleet
    return (*context.fleet, theoretical_airplane(tdg_of_aircraft(context.governing)))


def context_for(layout: Layout) -> DesignContext:
    """The layout's fleet, or the theoretical airplane of the largest TDG its lines name."""
    fleet = layout.fleet
    if not fleet:
        tdgs = sorted({line.group.tdg for line in layout.centerlines if line.group.tdg} or {DEFAULT_TDG})
        fleet = (theoretical_airplane(tdgs[-1]),)
    return DesignContext(layout.rule_set, fleet)


def line_design_aircraft(line: Centerline, context: DesignContext) -> DesignAircraft:
    """The aircraft a centerline's widths and separations are read for: its own TDG's theoretical
    airplane when the planner set one (FAA), else the fleet's governing aircraft."""
    if line.group.tdg and context.rule_set_name == "FAA":
        return theoretical_airplane(line.group.tdg)
    return context.governing


def line_width_m(line: Centerline, context: DesignContext) -> float:
    if line.width_override_m is not None:
        return line.width_override_m
    return straight_width_m(line_design_aircraft(line, context), context.rule_set_name)


@lru_cache(maxsize=256)
def straight_width_m(aircraft: DesignAircraft, rule_set_name: str) -> float:
    return get_rule_set(rule_set_name).straight_width(aircraft).value_m  # type: ignore[arg-type]


@lru_cache(maxsize=256)
def edge_margin_m(aircraft: DesignAircraft, rule_set_name: str) -> float:
    return get_rule_set(rule_set_name).edge_margin(aircraft, on_curve=True).value_m  # type: ignore[arg-type]


# The steering-limited radius grows with the turn angle, so evaluating it at the turn angle rounded
# UP to this step is conservative, and lets a drag reuse it from frame to frame.
STEERING_ANGLE_STEP_DEG = 1.0


@lru_cache(maxsize=4096)
def _steering_radius_m(aircraft: DesignAircraft, turn_steps: int) -> float:
    turn_deg = min(180.0, turn_steps * STEERING_ANGLE_STEP_DEG)
    return min_radius_for_steering_limit(aircraft, math.radians(turn_deg))


def default_radius_m(turn_rad: float, context: DesignContext) -> float:
    """The house default centerline radius (geometry/turns.py): steering-limited for the fleet's
    most demanding aircraft, and at least the design-speed radius under 90 degrees; rounded up."""
    turn_steps = math.ceil(abs(math.degrees(turn_rad)) / STEERING_ANGLE_STEP_DEG - 1e-9)
    radius = default_turn_radius_m(turn_rad, _fleet_steering_radius_m(turn_steps, context), SPEED_RADIUS_M)
    return math.ceil(radius / RADIUS_ROUNDING_M - 1e-9) * RADIUS_ROUNDING_M


SPEED_RADIUS_M = speed_radius_m(DESIGN_TAXI_SPEED_KMH)


@lru_cache(maxsize=4096)
def _fleet_steering_radius_m(turn_steps: int, context: DesignContext) -> float:
    return max(_steering_radius_m(aircraft, turn_steps) for aircraft in context.radius_aircraft)


def rules_problem(context: DesignContext) -> str | None:
    """Why the rule set cannot be applied to the fleet, or None."""
    try:
        for aircraft in context.fleet:
            edge_margin_m(aircraft, context.rule_set_name)
            straight_width_m(aircraft, context.rule_set_name)
        context.governing  # noqa: B018 - raises for a fleet the rule set cannot classify
    except GeometryError as error:
        return str(error)
    return None
