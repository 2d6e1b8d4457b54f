"""E-WINGTIP-OBJECT and E-WINGTIP-TAXIWAY along swept wingtip tracks."""

from __future__ import annotations

import numpy as np
import pytest
import shapely

from geometry.checks import LineInfo, MovementInfo, ObjectInfo, TrackInfo, run_checks
from geometry.checks.wingtip_tracks import TrackBounds, cockpit_xy, track_bounds
from geometry.findings import Finding
from geometry.movements import junction_movements
from geometry.network import Junction
from geometry.sweep import sweep
from geometry.theoretical import theoretical_airplane
from geometry.turns import movement_path
from geometry.units import to_metres
from tests.geometry.checks.builders import (
    adg3,
    find_movement,
    info,
    junctions_of,
    line,
    make_inputs,
    swept_movement,
)

# Theoretical TDG 3 airplane: 117 ft span (1 ft below the ADG III edge of 118 ft, AC 150/5300-13B
# Table 1-1, published; geometry/theoretical.py), so half span 58.5 ft (identity).
HALF_SPAN_M = to_metres(58.5, "ft")
# Taxiway wingtip clearance ADG III: 34 ft, AC 150/5300-13A Table 4-1 (0.2 WS + 10 ft; the 0.2 WS
# part published, Horonjeff p. 230; the value from memory, verify against AC 150/5300-13B Table 4-1).
CLEARANCE_M = to_metres(34.0, "ft")


def layout(extra: list[LineInfo]) -> tuple[list[LineInfo], Junction]:
    """Taxiway A east-west; E crosses it at the origin and stops short of anything south."""
    lines = [info(line("A", [(-600, 0), (600, 0)]), adg3()), info(line("E", [(0, 100), (0, -10)]), adg3()),
             *extra]
    junction = next(j for j in junctions_of(lines) if set(j.line_ids) == {"A", "E"})
    return lines, junction


def eastbound(junction: Junction, lead_m: float = 60.0) -> MovementInfo:
    """Straight on along A eastward: aligned all the way, so the wingtips run exactly half a span
    either side of the centerline (identity)."""
    (straight,) = [m for m in junction_movements(junction)
                   if m.kind == "straight" and m.from_leg.line_id == "A" and m.from_leg.direction == -1]
    return swept_movement(junction, straight, [adg3()], 30.0, lead_m=lead_m)


def wingtip_findings(lines: list[LineInfo], movement: MovementInfo, code: str,
                     objects: tuple[ObjectInfo, ...] = ()) -> list[Finding]:
    inputs = make_inputs(lines, movements=[movement], objects=objects)
    return [f for f in run_checks(inputs) if f.code == code]


@pytest.mark.parametrize(("offset_m", "fires"), [(-0.1, True), (0.1, False)])
def test_wingtip_to_object_at_the_clearance_minus_and_plus_a_decimetre(offset_m: float, fires: bool) -> None:
    lines, junction = layout([])
    movement = eastbound(junction)
    pole = ObjectInfo("pole", "Demo pole", shapely.Point(20.0, -(HALF_SPAN_M + CLEARANCE_M + offset_m)), 8.0)
    found = wingtip_findings(lines, movement, "E-WINGTIP-OBJECT", (pole,))
    assert bool(found) is fires
    if fires:
        assert "right wingtip" in found[0].message and "Demo pole" in found[0].message
        assert found[0].element_ids[-1] == "pole" and "ADG III" in found[0].rule


@pytest.mark.parametrize(("offset_m", "fires"), [(-0.1, True), (0.1, False)])
def test_wingtip_to_a_parallel_taxiway_minus_and_plus_a_decimetre(offset_m: float, fires: bool) -> None:
    # An aircraft on D needs its half span plus the clearance from the passing wingtip, which
    # itself runs half a span off A: D must be 2 x 58.5 + 34 = 151 ft from A (identity).
    spacing_m = 2.0 * HALF_SPAN_M + CLEARANCE_M + offset_m
    lines, junction = layout([info(line("D", [(-600, -spacing_m), (600, -spacing_m)]), adg3())])
    found = wingtip_findings(lines, eastbound(junction), "E-WINGTIP-TAXIWAY")
    assert bool(found) is fires
    if fires:
        assert found[0].element_ids[-1] == "D" and "right wingtip" in found[0].message
        assert f"{HALF_SPAN_M + CLEARANCE_M:.1f} m" in found[0].message


def test_lines_crossed_at_this_or_a_neighbouring_junction_are_left_out() -> None:
    # E meets the movement's junction; F crosses A 100 m on, where the movement's leg ends: the
    # trailing wingtips come within 25 m of F's centerline, but only near that junction.
    lines, junction = layout([info(line("F", [(100, 30), (100, -20)]), adg3())])
    assert not wingtip_findings(lines, eastbound(junction, lead_m=120.0), "E-WINGTIP-TAXIWAY")


def test_a_turn_swings_its_wingtip_and_is_checked_too() -> None:
    lines = [info(line("A", [(-600, 0), (600, 0)]), adg3()), info(line("B", [(0, 0), (0, 300)]), adg3()),
             info(line("D", [(-600, -30), (600, -30)]), adg3())]
    junction = next(j for j in junctions_of(lines) if set(j.line_ids) == {"A", "B"})
    turn = swept_movement(junction, find_movement(junction, "B", "A", turn_sign=1), [adg3()], 30.0)
    found = wingtip_findings(lines, turn, "E-WINGTIP-TAXIWAY")
    assert [f.element_ids[-1] for f in found] == ["D"]


def test_cockpits_are_rebuilt_exactly_from_the_two_wingtips() -> None:
    lines = [info(line("A", [(-300, 0), (300, 0)]), adg3()), info(line("B", [(0, 0), (0, 300)]), adg3())]
    (junction,) = junctions_of(lines)
    movement = find_movement(junction, "A", "B", turn_sign=1)
    swept = sweep(movement_path(movement, junction.point, 30.0, 60.0, 60.0), adg3())
    track = TrackInfo(adg3(), 0.0, (0.0, 0.0), 0.0, (0.0, 0.0), 0.0, swept.wingtip_left_xy,
                      swept.wingtip_right_xy)
    rebuilt = cockpit_xy(track)
    assert rebuilt is not None
    np.testing.assert_allclose(rebuilt, swept.cockpit_xy, atol=1e-9)  # identity of the body frame


def test_a_lead_in_running_past_the_leg_s_far_end_is_not_held_against_the_movement() -> None:
    # C joins P1 to P2 (50 m). The sweep's 60 m lead-in starts 30 m below P1, where C does not
    # go, and its wingtips would reach P0; only the part on C itself counts.
    lines = [info(line(f"P{k}", [(-600, 50 * k), (600, 50 * k)]), adg3()) for k in range(3)]
    lines.append(info(line("C", [(0, 50), (0, 100)]), adg3()))
    junction = next(j for j in junctions_of(lines) if set(j.line_ids) == {"C", "P2"})
    turn = swept_movement(junction, find_movement(junction, "C", "P2", turn_sign=-1), [adg3()], 20.0,
                          lead_m=60.0)
    raw = shapely.linestrings(turn.tracks[0].wingtip_left_xy)
    assert shapely.distance(raw, shapely.LineString([(-600, 0), (600, 0)])) < 5.0  # it would reach P0
    assert not wingtip_findings(lines, turn, "E-WINGTIP-TAXIWAY")


def test_track_bounds_worked_out_together_equal_those_of_each_track() -> None:
    rng = np.random.default_rng(7)
    aircraft = theoretical_airplane("3")

    def track(left: np.ndarray, right: np.ndarray) -> TrackInfo:
        return TrackInfo(aircraft, 0.0, (0.0, 0.0), 1.0, (0.0, 0.0), 1.0, left, right)
    tracks = [track(rng.uniform(-500.0, 500.0, (count, 2)), rng.uniform(-500.0, 500.0, (count, 2)))
              for count in (1, 5, 17)]
    broken = np.array([[np.nan, 1.0], [2.0, 3.0]])
    tracks.append(track(broken, broken))
    together = TrackBounds()
    together.prepare(tracks)
    for track in tracks:
        assert together(track) == track_bounds(track)  # identity: the least and greatest coordinates
