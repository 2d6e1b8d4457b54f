"""Turn arcs tangent to two legs, movement paths, and the default turn radius rule."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geometry.centerline import centerline_segments, wrap_angle
from geometry.errors import InvalidPathError, TurnDoesNotFitError
from geometry.movements import Movement, junction_movements, movement_between
from geometry.network import Junction, NetworkLine, find_junctions
from geometry.turns import (
    STANDARD_TURN_ANGLES_DEG,
    default_turn_radius_m,
    movement_path,
    nearest_standard_angle_deg,
    speed_radius_m,
    turn_arc,
)


def _offset_from_line(point: tuple[float, float], origin: tuple[float, float], heading_rad: float) -> float:
    """Signed distance of ``point`` to the left of the line through ``origin`` along ``heading_rad``."""
    return (math.cos(heading_rad) * (point[1] - origin[1]) - math.sin(heading_rad) * (point[0] - origin[0]))


def _along_line(point: tuple[float, float], origin: tuple[float, float], heading_rad: float) -> float:
    return math.cos(heading_rad) * (point[0] - origin[0]) + math.sin(heading_rad) * (point[1] - origin[1])


@pytest.mark.parametrize("angle_deg", [30.0, 45.0, 60.0, 90.0, 120.0, 135.0, 150.0])
def test_tangent_length_at_the_standard_angles(angle_deg: float) -> None:
    turn = turn_arc((0.0, 0.0), 0.0, math.radians(angle_deg), 50.0)
    assert turn.tangent_length_m == pytest.approx(50.0 * math.tan(math.radians(angle_deg) / 2))  # identity
    assert turn.arc.length_m == pytest.approx(50.0 * math.radians(angle_deg))  # identity: R * delta


def test_a_right_angle_turn_has_its_centre_on_the_inside() -> None:
    turn = turn_arc((10.0, 5.0), 0.0, -math.pi / 2, 30.0)  # heading east, turning right to the south
    assert turn.start_point == pytest.approx((-20.0, 5.0))  # identity: R tan(45 deg) = R before P
    assert turn.end_point == pytest.approx((10.0, -25.0))  # identity
    assert turn.center == pytest.approx((-20.0, -25.0))  # identity
    assert turn.arc.end == pytest.approx(turn.end_point)


@settings(max_examples=80, deadline=None)
@given(angle_deg=st.floats(5.0, 175.0), left=st.booleans(), radius_m=st.floats(1.0, 3000.0),
       arrival_rad=st.floats(-math.pi, math.pi), x=st.floats(-1e4, 1e4), y=st.floats(-1e4, 1e4))
def test_turn_arc_is_tangent_to_both_legs(angle_deg: float, left: bool, radius_m: float, arrival_rad: float,
                                          x: float, y: float) -> None:
    departure_rad = arrival_rad + (1 if left else -1) * math.radians(angle_deg)
    turn = turn_arc((x, y), arrival_rad, departure_rad, radius_m)
    tolerance = 1e-9 * max(radius_m * 60.0, 1e4)
    tangent = radius_m * math.tan(math.radians(angle_deg) / 2)
    assert turn.tangent_length_m == pytest.approx(tangent)  # identity: R tan(|delta| / 2)
    # The arc starts on the arrival leg, tangent length before the point, heading along it ...
    assert abs(_offset_from_line(turn.arc.start, (x, y), arrival_rad)) < tolerance
    assert _along_line(turn.arc.start, (x, y), arrival_rad) == pytest.approx(-tangent, abs=tolerance)
    assert turn.arc.start_heading_rad == arrival_rad
    # ... and ends on the departure leg, tangent length after the point, heading along it.
    assert abs(_offset_from_line(turn.arc.end, (x, y), departure_rad)) < tolerance
    assert _along_line(turn.arc.end, (x, y), departure_rad) == pytest.approx(tangent, abs=tolerance)
    assert wrap_angle(turn.arc.end_heading_rad - departure_rad) == pytest.approx(0.0, abs=1e-12)
    # The centre lies R from both legs, on the inside of the turn (identity).
    assert _offset_from_line(turn.center, (x, y), arrival_rad) == pytest.approx(
        radius_m if left else -radius_m, abs=tolerance)


@settings(max_examples=40, deadline=None)
@given(angle_deg=st.floats(5.0, 175.0), radius_m=st.floats(1.0, 500.0), arrival_rad=st.floats(-3.0, 3.0))
def test_mirror_image_turns_are_mirror_images(angle_deg: float, radius_m: float, arrival_rad: float) -> None:
    left = turn_arc((3.0, 7.0), arrival_rad, arrival_rad + math.radians(angle_deg), radius_m)
    right = turn_arc((3.0, -7.0), -arrival_rad, -arrival_rad - math.radians(angle_deg), radius_m)
    # Mirroring in the x axis flips y and the sign of headings and turns (identity).
    assert right.arc.turn_rad == pytest.approx(-left.arc.turn_rad)
    assert right.center == pytest.approx((left.center[0], -left.center[1]), abs=1e-9)
    assert right.end_point == pytest.approx((left.end_point[0], -left.end_point[1]), abs=1e-9)


def test_near_reversals_and_no_turn_are_refused() -> None:
    with pytest.raises(TurnDoesNotFitError, match="reverses direction"):
        turn_arc((0.0, 0.0), 0.0, math.radians(179.5), 30.0)
    with pytest.raises(InvalidPathError, match="no turn"):
        turn_arc((0.0, 0.0), 1.0, 1.0, 30.0)
    with pytest.raises(InvalidPathError):
        turn_arc((0.0, 0.0), 0.0, 1.0, 0.0)


def tee_with_short_branch(branch_m: float) -> Junction:
    (junction,) = find_junctions([
        NetworkLine("twy-1", "taxiway", centerline_segments([(-200, 0), (200, 0)], [None, None])),
        NetworkLine("twy-2", "taxiway", centerline_segments([(0, 0), (0, branch_m)], [None, None]))])
    return junction


def _turn_onto_branch(junction: Junction) -> Movement:
    movement = movement_between(junction, junction.leg(f"{junction.id}|twy-1-"),
                                junction.leg(f"{junction.id}|twy-2+"))
    assert movement is not None
    return movement


def test_movement_path_is_lead_in_arc_lead_out() -> None:
    junction = tee_with_short_branch(150.0)
    path = movement_path(_turn_onto_branch(junction), junction.point, 45.0, 60.0, 30.0)
    assert path.length_m == pytest.approx(60.0 + 45.0 * math.pi / 2 + 30.0)  # identity
    assert path.start == pytest.approx((-45.0 - 60.0, 0.0))  # identity: tangent 45 m + lead-in
    assert path.end == pytest.approx((0.0, 45.0 + 30.0))  # identity: tangent 45 m + lead-out


def test_movement_path_refuses_a_leg_shorter_than_the_tangent_length() -> None:
    junction = tee_with_short_branch(20.0)
    expected = "legs too short for a 45 m radius: needs 45.0 m of straight leg, has 20.0 m on twy-2"
    with pytest.raises(TurnDoesNotFitError, match=expected):
        movement_path(_turn_onto_branch(junction), junction.point, 45.0, 60.0, 30.0)


def test_straight_movement_path_runs_through_the_junction() -> None:
    junction = tee_with_short_branch(150.0)
    (straight,) = [movement for movement in junction_movements(junction)
                   if movement.kind == "straight" and movement.to_leg.direction == 1]
    path = movement_path(straight, junction.point, 45.0, 50.0, 70.0)
    assert len(path.segments) == 1 and path.length_m == pytest.approx(120.0)  # identity
    assert path.start == pytest.approx((-50.0, 0.0)) and path.end == pytest.approx((70.0, 0.0))


@pytest.mark.parametrize(("speed_kmh", "table_radius_m"), [
    (16.0, 15.0), (32.0, 60.0), (48.0, 135.0), (64.0, 240.0), (80.0, 375.0), (96.0, 540.0),
])
def test_speed_radius_matches_the_published_table(speed_kmh: float, table_radius_m: float) -> None:
    # Horonjeff et al., Planning and Design of Airports, Table 6-22 (citing ICAO ADM Part 2): the
    # table rounds V^2 / 17.07 to 5 m steps or so, hence the 0.2 m slack.
    assert speed_radius_m(speed_kmh) == pytest.approx(table_radius_m, abs=0.2)


def test_default_radius_rule() -> None:
    # House rule (documented in geometry/turns.py): 90 degrees and more take the steering radius;
    # smaller turns the larger of the steering and speed radii.
    assert default_turn_radius_m(math.radians(90.0), 40.0, 60.0) == 40.0
    assert default_turn_radius_m(math.radians(-135.0), 40.0, 60.0) == 40.0
    assert default_turn_radius_m(math.radians(45.0), 40.0, 60.0) == 60.0
    assert default_turn_radius_m(math.radians(-30.0), 70.0, 60.0) == 70.0
    with pytest.raises(InvalidPathError):
        default_turn_radius_m(1.0, -4.0, 60.0)


def test_standard_angles_of_the_trade() -> None:
    # The angles a layout is usually drawn with: common practice, no source.
    assert STANDARD_TURN_ANGLES_DEG == (30.0, 45.0, 60.0, 90.0, 120.0, 135.0, 150.0, 180.0)
    assert nearest_standard_angle_deg(math.radians(-88.0)) == 90.0
    assert nearest_standard_angle_deg(math.radians(178.0)) == 180.0
