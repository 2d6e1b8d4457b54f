"""Movements through junctions, corners between legs, and the corners a turn sweeps."""

from __future__ import annotations

import math

import pytest

from geometry.centerline import centerline_segments
from geometry.errors import NetworkError
from geometry.movements import (
    corner_key,
    corner_of,
    junction_corners,
    junction_movements,
    movement_between,
    paths_from_approach,
)
from geometry.network import Junction, LineKind, NetworkLine, find_junctions


def ray_junction(headings_deg: list[float], kinds: list[LineKind] | None = None) -> Junction:
    """A junction at the origin where one line per heading leaves (each line ends there)."""
    lines = []
    for number, heading in enumerate(headings_deg):
        far = (200 * math.cos(math.radians(heading)), 200 * math.sin(math.radians(heading)))
        kind = kinds[number] if kinds else "taxiway"
        lines.append(NetworkLine(f"l{number}", kind, centerline_segments([(0.0, 0.0), far], [None, None])))
    (junction,) = find_junctions(lines)
    return junction


def crossing() -> Junction:
    (junction,) = find_junctions([
        NetworkLine("a", "taxiway", centerline_segments([(-100, 0), (100, 0)], [None, None])),
        NetworkLine("b", "taxiway", centerline_segments([(0, -100), (0, 100)], [None, None]))])
    return junction


def test_a_four_way_crossing_has_8_turns_and_4_straight_movements() -> None:
    movements = junction_movements(crossing())
    # 4 legs give 4 x 3 = 12 ordered pairs of distinct legs (identity); none is a reversal.
    assert len(movements) == 12
    assert sum(1 for m in movements if m.kind == "straight") == 4  # each leg straight on (identity)
    turns = [m for m in movements if m.kind == "turn"]
    assert sorted(round(math.degrees(m.turn_rad), 9) for m in turns) == [-90.0] * 4 + [90.0] * 4  # identity


def test_movement_keys_and_headings() -> None:
    junction = crossing()
    west, north = junction.leg(f"{junction.id}|a-"), junction.leg(f"{junction.id}|b+")
    movement = movement_between(junction, west, north)
    assert movement is not None
    assert movement.key == f"{junction.id}|a->{junction.id}|b+"
    # Arriving from the west heads east (0 degrees); departing north is a left turn of +90 (identity).
    assert movement.arrival_heading_rad == pytest.approx(0.0)
    assert movement.turn_rad == pytest.approx(math.pi / 2)


@pytest.mark.parametrize("angle_deg", [30.0, 45.0, 60.0, 90.0, 120.0, 135.0, 150.0])
def test_turn_angles_at_the_standard_angles(angle_deg: float) -> None:
    # A line arriving from the west (leg pointing west, 180 degrees) and one leaving at
    # angle_deg to the left of straight on: the turn is +angle_deg (identity); the reverse is -angle_deg.
    junction = ray_junction([180.0, angle_deg])
    arrive, depart = junction.legs[0], junction.legs[1]
    forward = movement_between(junction, arrive, depart)
    backward = movement_between(junction, depart, arrive)
    assert forward is not None and backward is not None
    assert math.degrees(forward.turn_rad) == pytest.approx(angle_deg)
    assert math.degrees(backward.turn_rad) == pytest.approx(-angle_deg)
    assert forward.kind == "turn"


def test_mirrored_junction_mirrors_turns() -> None:
    left = ray_junction([180.0, 40.0, -75.0])
    right = ray_junction([180.0, -40.0, 75.0])
    turns_left = sorted(round(m.turn_rad, 9) for m in junction_movements(left))
    turns_right = sorted(round(-m.turn_rad, 9) for m in junction_movements(right))
    assert turns_left == turns_right  # identity: a mirror image turns the other way


def test_reversals_and_runway_to_runway_pairs_are_not_movements() -> None:
    # Two legs leaving 0.5 degrees apart: from one to the other is a 179.5-degree reversal.
    junction = ray_junction([0.0, 0.5, 180.0])
    keys = {(m.from_leg.line_id, m.to_leg.line_id) for m in junction_movements(junction)}
    assert ("l0", "l1") not in keys and ("l1", "l0") not in keys
    assert {("l0", "l2"), ("l2", "l0"), ("l1", "l2"), ("l2", "l1")} == keys
    runway = ray_junction([0.0, 180.0, 90.0], ["runway", "runway", "taxiway"])
    pairs = {(m.from_leg.line_id, m.to_leg.line_id) for m in junction_movements(runway)}
    assert pairs == {("l0", "l2"), ("l2", "l0"), ("l1", "l2"), ("l2", "l1")}


def test_a_runway_runway_junction_has_no_movements() -> None:
    (junction,) = find_junctions([
        NetworkLine("r1", "runway", centerline_segments([(-900, 0), (900, 0)], [None, None])),
        NetworkLine("r2", "runway", centerline_segments([(0, -900), (0, 900)], [None, None]))])
    assert junction.kind == "runway_runway" and junction_movements(junction) == ()


def test_paths_from_approach_count_turns_and_straight_on() -> None:
    junction = crossing()
    assert all(paths_from_approach(junction, leg) == 3 for leg in junction.legs)  # identity: 4 - 1
    five = ray_junction([180.0, 0.0, 45.0, 90.0, -90.0])
    assert paths_from_approach(five, five.legs[0]) == 4  # identity: 5 - 1, none a reversal


def test_corners_of_a_tee_and_their_keys() -> None:
    junction = ray_junction([0.0, 180.0, 90.0])  # a through line and a branch to the north
    corners = junction_corners(junction)
    # Two 90-degree corners either side of the branch; the straight side (180 degrees) is none.
    assert sorted(round(math.degrees(c.angle_rad), 9) for c in corners) == [90.0, 90.0]  # identity
    east, west, north = junction.legs
    assert corner_key(junction, north, east) == corner_key(junction, east, north)
    assert corner_key(junction, east, north) == f"{junction.id}|l0+~l2+"
    with pytest.raises(NetworkError, match="do not bound a corner"):
        corner_key(junction, east, west)


def test_corner_of_a_turn_reports_the_legs_it_passes_over() -> None:
    # Arrive from the west (leg at 180 degrees) and turn right onto the leg going south (-90):
    # the inside of the turn is the south-west sector, crossed by a leg at -135 degrees.
    junction = ray_junction([180.0, -90.0, -135.0, 0.0])
    west, south, south_west, _ = junction.legs
    movement = movement_between(junction, west, south)
    assert movement is not None and movement.turn_rad == pytest.approx(-math.pi / 2)
    swept = corner_of(movement, junction)
    assert swept.inner_legs == (south_west,)
    assert swept.legs == (west, south_west, south)
    assert swept.angle_rad == pytest.approx(math.pi / 2)  # identity: pi - |turn|
    assert swept.corner_keys == (corner_key(junction, west, south_west),
                                 corner_key(junction, south_west, south))


def test_corner_of_a_left_turn_runs_from_the_departure_leg() -> None:
    junction = crossing()
    west, north = junction.leg(f"{junction.id}|a-"), junction.leg(f"{junction.id}|b+")
    movement = movement_between(junction, west, north)
    assert movement is not None
    swept = corner_of(movement, junction)
    assert swept.legs == (north, west) and swept.inner_legs == ()
    straight = movement_between(junction, west, junction.leg(f"{junction.id}|a+"))
    assert straight is not None and straight.kind == "straight"
    with pytest.raises(NetworkError, match="straight on"):
        corner_of(straight, junction)


def test_legs_of_another_junction_are_refused() -> None:
    junction, other = crossing(), ray_junction([0.0, 90.0])
    with pytest.raises(NetworkError, match="does not belong"):
        paths_from_approach(junction, other.legs[0])
