"""W-PATHS: at most three paths per approach."""

from __future__ import annotations

import math

from geometry.checks import LineInfo, run_checks
from geometry.movements import junction_movements
from tests.geometry.checks.builders import adg3, info, junctions_of, line, make_inputs


def star(headings_deg: list[float]) -> list[LineInfo]:
    """Lines through the origin, one per heading, each 300 m either side."""
    lines = []
    for number, heading in enumerate(headings_deg):
        dx, dy = 300 * math.cos(math.radians(heading)), 300 * math.sin(math.radians(heading))
        lines.append(info(line(f"L{number}", [(-dx, -dy), (dx, dy)]), adg3()))
    return lines


def test_three_lines_through_one_point_offer_five_paths_per_approach() -> None:
    lines = star([0.0, 60.0, 120.0])
    findings = [f for f in run_checks(make_inputs(lines)) if f.code == "W-PATHS"]
    # Six legs, none reversing onto another: 5 paths from each of the 6 approaches (identity);
    # more than three is the warning (common practice, no source; the FAA "three-node concept").
    assert len(findings) == 6
    assert all("can choose 5 paths" in f.message and "straight on along" in f.message for f in findings)
    assert all(f.location_m == (0.0, 0.0) for f in findings)


def test_a_four_way_crossing_offers_three_paths_per_approach() -> None:
    assert not [f for f in run_checks(make_inputs(star([0.0, 90.0]))) if f.code == "W-PATHS"]


def test_excluding_movements_brings_an_approach_back_to_three_paths() -> None:
    lines = star([0.0, 60.0, 120.0])
    (junction,) = junctions_of(lines)
    approach = junction.legs[0]
    two_of_five = [m.key for m in junction_movements(junction) if m.from_leg == approach][:2]
    inputs = make_inputs(lines, excluded=frozenset(two_of_five))
    findings = [f for f in run_checks(inputs) if f.code == "W-PATHS"]
    assert len(findings) == 5 and all(approach.id not in f.element_ids for f in findings)
