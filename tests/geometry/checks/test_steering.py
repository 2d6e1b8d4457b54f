"""E-STEERING and E-TURN-FIT."""

from __future__ import annotations

import math

import pytest

from geometry.checks import LineInfo, run_checks
from geometry.checks.common import length_text
from geometry.checks.steering import SteeringRadii, steering_exceeds
from geometry.sweep import min_radius_for_steering_limit
from tests.geometry.checks.builders import (
    adg3,
    demo_aircraft,
    find_movement,
    info,
    junctions_of,
    line,
    make_inputs,
    plain_movement,
    swept_movement,
)


def tee_lines() -> list[LineInfo]:
    return [info(line("A", [(-300, 0), (300, 0)]), adg3()), info(line("B", [(0, 0), (0, 300)]), adg3())]


def test_a_tight_turn_exceeds_the_steering_limit_and_the_finding_gives_the_radius_that_fixes_it() -> None:
    lines = tee_lines()
    (junction,) = junctions_of(lines)
    movement = swept_movement(junction, find_movement(junction, "A", "B", turn_sign=1), [adg3()], 10.0)
    (finding,) = [f for f in run_checks(make_inputs(lines, movements=[movement])) if f.code == "E-STEERING"]
    # The fix is the engine's steering-limited radius of a 90-degree turn (identity).
    fix_m = min_radius_for_steering_limit(adg3(), math.pi / 2)
    assert f"at least {length_text(fix_m)}" in finding.message
    assert "from 10.0 m (32.8 ft)" in finding.message
    # 50 deg design criterion: Horonjeff et al., Planning and Design of Airports, pp. 86 and 287.
    assert "limit of 50.0 degrees" in finding.message and "Horonjeff" in finding.source
    assert finding.element_ids[:2] == (movement.key, junction.id)


def test_a_turn_at_a_generous_radius_is_within_the_limit() -> None:
    lines = tee_lines()
    (junction,) = junctions_of(lines)
    movement = swept_movement(junction, find_movement(junction, "A", "B", turn_sign=1), [adg3()], 40.0)
    assert "E-STEERING" not in [f.code for f in run_checks(make_inputs(lines, movements=[movement]))]


def test_the_aircraft_s_own_lower_limit_is_used() -> None:
    stiff = demo_aircraft("Demo stiff", max_steering_deg=40.0)
    assert steering_exceeds(math.radians(45.0), stiff)
    assert not steering_exceeds(math.radians(45.0), demo_aircraft())  # 50 deg default (Horonjeff p. 86)
    assert not steering_exceeds(math.nan, stiff)


def test_steering_radii_are_remembered_and_a_zero_turn_has_none() -> None:
    radii = SteeringRadii()
    first = radii.radius_m(adg3(), math.pi / 2)
    assert first == radii.radius_m(adg3(), -math.pi / 2)  # identity: the sign does not matter
    assert radii.radius_m(adg3(), 0.0) is None


@pytest.mark.parametrize("problem", ["legs too short for a 60 m radius: needs 60.0 m of straight leg, "
                                     "has 20.0 m on B", None])
def test_a_movement_that_could_not_be_computed_is_reported_with_its_reason(problem: str | None) -> None:
    lines = tee_lines()
    (junction,) = junctions_of(lines)
    turn = find_movement(junction, "A", "B", turn_sign=-1)
    movement = plain_movement(junction, turn, None, problem=problem)
    findings = [f for f in run_checks(make_inputs(lines, movements=[movement])) if f.code == "E-TURN-FIT"]
    assert bool(findings) is (problem is not None)
    if problem is not None:
        assert problem in findings[0].message and findings[0].location_m == junction.point
        assert findings[0].message.startswith("The movement from taxiway A onto taxiway B")
