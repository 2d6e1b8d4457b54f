"""Bends: corners of one centerline are analysed like two-leg junctions."""

from __future__ import annotations

import math

import pytest

from app.fileio.aircraft_library import load_demo_library
from app.model.analysis import analyze
from app.model.bends import BendFinder, line_bends
from app.model.elements import Centerline, Layout, Vertex
from geometry.pavement import containment_gap

FLEET = tuple(a for a in load_demo_library() if a.name == "Ostrander 240")  # fictional demo aircraft


def l_shaped(radius_m: float | None = None, corner_deg: float = 90.0) -> Layout:
    end = (300.0 + 300.0 * math.cos(math.radians(corner_deg)), 300.0 * math.sin(math.radians(corner_deg)))
    return Layout(units="m", fleet=FLEET, centerlines=(
        Centerline("twy-1", "A", (Vertex(0.0, 0.0), Vertex(300.0, 0.0, radius_m), Vertex(*end))),))


def test_a_sharp_corner_is_a_bend_with_two_turns_and_a_fillet() -> None:
    result = analyze(l_shaped())
    (bend,) = result.junctions.values()
    assert bend.kind == "bend" and bend.junction_id == "B:twy-1#1"
    turns = [m for m in bend.movements if m.kind == "turn"]
    assert sorted(round(m.turn_deg) for m in turns) == [-90, 90]  # both directions (identity)
    assert len(bend.fillets) == 1  # the inside of the corner (identity)
    gap = containment_gap(bend.required_area, bend.buildable_area)
    assert gap.area_m2 < 1e-3  # identity: the fillet contains the required pavement
    for movement in turns:
        assert movement.max_steering_deg <= 50.0 + 1e-6  # Horonjeff pp. 86, 287: 50-degree criterion


def test_a_corner_radius_is_the_radius_of_the_bend_turns() -> None:
    result = analyze(l_shaped(radius_m=70.0))
    (bend,) = result.junctions.values()
    assert {m.radius_m for m in bend.movements if m.kind == "turn"} == {70.0}  # the planner's radius


def test_a_corner_no_aircraft_can_follow_is_an_error() -> None:
    result = analyze(l_shaped(radius_m=2.0))  # far below the CMG of the aircraft (identity)
    codes = {f.code for f in result.findings}
    assert codes & {"E-TURN-FIT", "E-STEERING"}


def test_a_line_doubling_back_is_reported() -> None:
    layout = Layout(units="m", fleet=FLEET, centerlines=(
        Centerline("twy-1", "A", (Vertex(0.0, 0.0), Vertex(300.0, 0.0), Vertex(0.0, 0.0))),))
    findings = [f for f in analyze(layout).findings if f.code == "E-CENTERLINE-REVERSAL"]
    assert len(findings) == 1 and "vertex 2" in findings[0].message


@pytest.mark.parametrize("corner_deg", [0.5, 0.0])
def test_an_almost_straight_vertex_is_no_bend(corner_deg: float) -> None:
    bends, reversals = line_bends(l_shaped(corner_deg=corner_deg).centerlines[0], [], 0.5)
    assert bends == [] and reversals == []  # under a degree: straight on (geometry/movements.py)


def test_a_corner_at_a_junction_is_left_to_the_junction() -> None:
    bends, _ = line_bends(l_shaped().centerlines[0], [(300.0, 0.2)], 0.5)
    assert bends == []  # within the snap tolerance of a junction point (identity)


def test_the_bend_finder_keeps_the_bends_of_unchanged_lines_and_equals_a_fresh_search() -> None:
    zigzag = Centerline("twy-2", "B", (Vertex(0.0, 100.0), Vertex(200.0, 150.0), Vertex(400.0, 100.0),
                                       Vertex(600.0, 160.0)))
    corner = l_shaped().centerlines[0]
    finder = BendFinder()
    first, _ = finder.find([corner, zigzag], [], 0.5)
    moved = Centerline("twy-2", "B", (*zigzag.vertices[:2], Vertex(410.0, 95.0), zigzag.vertices[3]))
    junction_points = [(200.0, 150.3)]  # within the snap tolerance of the zigzag's first vertex
    again, reversals = finder.find([corner, moved], junction_points, 0.5)
    fresh = [line_bends(line, junction_points, 0.5) for line in (corner, moved)]
    assert again == [bend for found, _ in fresh for bend in found] and reversals == []  # identity
    assert again[0] is first[0]  # identity: the unchanged line's bend is the very same object
    assert [bend.junction.id for bend in again] == ["B:twy-1#1", "B:twy-2#2"]  # identity
