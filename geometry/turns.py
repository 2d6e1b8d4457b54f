"""Turn arcs through junctions, and the centerline path the cockpit follows for a movement.

A turn from arrival heading ``a`` to departure heading ``b`` at a junction point P is the circular
arc of radius R tangent to both leg centerlines (straight lines through P along ``a`` and ``b``).
With ``delta = wrap(b - a)`` its tangent length, from P back along the arrival leg to the arc's
start and from P out along the departure leg to the arc's end, is ``R * tan(|delta| / 2)``; it
grows without bound as ``|delta|`` nears 180 degrees, so such reversals are refused here.

House rule for the default centerline radius of a turn (:func:`default_turn_radius_m`):

* turns of 90 degrees or more: the steering-limited radius, the smallest at which the design
  aircraft keeps its nose-gear steering angle within the design limit (50 degrees, Horonjeff,
  Planning and Design of Airports, pp. 86 and 287), computed by
  ``geometry.sweep.min_radius_for_steering_limit`` and passed in by the caller;
* smaller turns are taken at speed: the larger of that radius and the speed radius
  ``R = V^2 / 17.07`` (V in km/h, R in m; Horonjeff Table 6-22, citing the ICAO Aerodrome Design
  Manual Part 2), see :func:`speed_radius_m`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from geometry.centerline import start_heading_rad, wrap_angle
from geometry.errors import InvalidPathError, NonFiniteInputError, TurnDoesNotFitError
from geometry.movements import REVERSAL_TOLERANCE_RAD, Movement
from geometry.network import Leg
from geometry.path import CenterlinePath
from geometry.primitives import Arc, Point, Segment, Straight
from geometry.validate import checked_length_m

STANDARD_TURN_ANGLES_DEG: tuple[float, ...] = (30.0, 45.0, 60.0, 90.0, 120.0, 135.0, 150.0, 180.0)
SPEED_RADIUS_DIVISOR = 17.07          # R [m] = V^2 / 17.07, V [km/h]: Horonjeff Table 6-22 (ICAO ADM)
STEERING_RADIUS_FROM_RAD = math.pi / 2.0  # turns this sharp and sharper use the steering radius
FIT_TOLERANCE_M = 1e-7


@dataclass(frozen=True, slots=True)
class TurnArc:
    """The arc of one turn, with its tangent length and its start, end and centre points."""

    arc: Arc
    tangent_length_m: float
    start_point: Point
    end_point: Point
    center: Point


def _positive(name: str, value_m: float, allow_zero: bool = False) -> float:
    return checked_length_m(name, value_m, allow_zero=allow_zero, error=InvalidPathError)


def _along(point: Point, heading_rad: float, distance_m: float) -> Point:
    return (point[0] + distance_m * math.cos(heading_rad), point[1] + distance_m * math.sin(heading_rad))


def turn_arc(point: Point, arrival_heading_rad: float, departure_heading_rad: float,
             radius_m: float) -> TurnArc:
    """The arc of radius ``radius_m`` tangent to the straight legs through ``point``.

    Raises
    ------
    TurnDoesNotFitError : the turn is within 1 degree of a 180-degree reversal.
    InvalidPathError : the headings are equal (there is no turn) or the radius is not positive.

    Examples
    --------
    >>> turn = turn_arc((0.0, 0.0), 0.0, math.pi / 2, 30.0)
    >>> round(turn.tangent_length_m, 6), [round(value, 6) for value in turn.center]
    (30.0, [-30.0, 30.0])
    """
    _positive("the turn radius", radius_m)
    delta = wrap_angle(departure_heading_rad - arrival_heading_rad)
    if abs(delta) < 1e-12:
        raise InvalidPathError("the arrival and departure headings are the same: there is no turn")
    if abs(delta) >= math.pi - REVERSAL_TOLERANCE_RAD:
        raise TurnDoesNotFitError(
            f"a turn of {math.degrees(abs(delta)):.1f} degrees reverses direction: no arc through one "
            f"junction can make it; reverse through a crossover between parallel taxiways instead")
    tangent = radius_m * math.tan(abs(delta) / 2.0)
    start = _along(point, arrival_heading_rad, -tangent)
    arc = Arc(start, arrival_heading_rad, radius_m, delta)
    return TurnArc(arc, tangent, start, _along(point, departure_heading_rad, tangent), arc.center)


def check_leg_fits(leg: Leg, tangent_m: float, radius_m: float) -> None:
    """Raise when ``leg``'s first straight is shorter than a turn's tangent length."""
    if tangent_m > leg.straight_length_m + FIT_TOLERANCE_M:
        raise TurnDoesNotFitError(
            f"legs too short for a {round(radius_m, 1):g} m radius: needs {tangent_m:.1f} m of straight "
            f"leg, has {leg.straight_length_m:.1f} m on {leg.line_id}")


def path_with_leads(middle: Sequence[Segment], lead_in_m: float, lead_out_m: float) -> CenterlinePath:
    """``middle`` with a straight lead-in ending where it starts (along its start heading) and a
    straight lead-out from its end (along its end heading); a zero lead is left out."""
    lead_in_m = _positive("the lead-in length", lead_in_m, allow_zero=True)
    lead_out_m = _positive("the lead-out length", lead_out_m, allow_zero=True)
    if not middle:
        raise InvalidPathError("there is no turn to add lead-in and lead-out straights to")
    pieces = list(middle)
    if lead_in_m > 0.0:
        heading = start_heading_rad(middle[0])
        pieces.insert(0, Straight(_along(middle[0].start, heading, -lead_in_m), heading, lead_in_m))
    if lead_out_m > 0.0:
        pieces.append(Straight(middle[-1].end, middle[-1].end_heading_rad, lead_out_m))
    return CenterlinePath(tuple(pieces))


def movement_path(movement: Movement, junction_point: Point, radius_m: float, lead_in_m: float,
                  lead_out_m: float) -> CenterlinePath:
    """The path the cockpit follows: a lead-in straight along the from-leg ending where the arc
    starts, the turn arc, and a lead-out straight along the to-leg.

    The leads run straight along each leg's heading at the junction (the sweep needs an aligned
    approach); they are not clipped to the legs. A straight-on movement is one straight through
    the junction point along the arrival heading, ``lead_in_m`` before it and ``lead_out_m`` after.

    Raises
    ------
    TurnDoesNotFitError : a leg's first straight is shorter than the arc's tangent length.
    """
    arrival = movement.arrival_heading_rad
    if movement.kind == "straight":
        total_m = _positive("the lead-in length", lead_in_m, allow_zero=True) + _positive(
            "the lead-out length", lead_out_m, allow_zero=True)
        if total_m == 0.0:
            raise InvalidPathError("a straight-on movement needs a lead-in or a lead-out length")
        return CenterlinePath((Straight(_along(junction_point, arrival, -lead_in_m), arrival, total_m),))
    turn = turn_arc(junction_point, arrival, movement.departure_heading_rad, radius_m)
    check_leg_fits(movement.from_leg, turn.tangent_length_m, radius_m)
    check_leg_fits(movement.to_leg, turn.tangent_length_m, radius_m)
    return path_with_leads([turn.arc], lead_in_m, lead_out_m)


def speed_radius_m(speed_kmh: float) -> float:
    """Centerline radius for taxiing at ``speed_kmh``: R = V^2 / 17.07 (Horonjeff Table 6-22,
    citing the ICAO Aerodrome Design Manual Part 2)."""
    return _positive("the taxiing speed", speed_kmh) ** 2 / SPEED_RADIUS_DIVISOR


def default_turn_radius_m(turn_rad: float, steering_radius_m: float, speed_radius_m: float) -> float:
    """The house default centerline radius for a turn of ``turn_rad`` (see the module docstring):
    the steering-limited radius for turns of 90 degrees or more, else the larger of the
    steering-limited and the speed radius."""
    if not math.isfinite(turn_rad):
        raise NonFiniteInputError(f"the turn angle must be a finite number, got {turn_rad!r}")
    steering = _positive("the steering-limited radius", steering_radius_m)
    speed = _positive("the speed radius", speed_radius_m)
    if abs(wrap_angle(turn_rad)) >= STEERING_RADIUS_FROM_RAD - 1e-9:
        return steering
    return max(steering, speed)


def nearest_standard_angle_deg(turn_rad: float) -> float:
    """The standard turn angle of the trade (30, 45, 60, 90, 120, 135, 150, 180) nearest ``|turn|``."""
    turn_deg = abs(math.degrees(wrap_angle(turn_rad)))
    return min(STANDARD_TURN_ANGLES_DEG, key=lambda angle: abs(angle - turn_deg))
