"""Tests of exact signed lateral offsets from a centerline path."""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from geometry.errors import GeometryError, NonFiniteInputError
from geometry.offsets import lateral_offset_m
from geometry.path import CenterlinePath, standard_turn_path
from geometry.primitives import Arc, Straight


def offsets(path: CenterlinePath, *points: tuple[float, float], extend_ends: bool = False) -> list[float]:
    return [float(v) for v in lateral_offset_m(path, np.array(points, dtype=float), extend_ends=extend_ends)]


STRAIGHT = CenterlinePath((Straight((0.0, 0.0), 0.0, 100.0),))
LEFT_ARC = CenterlinePath((Arc((0.0, 0.0), 0.0, 50.0, math.pi / 2),))   # centre (0, 50), ends at (50, 50)
RIGHT_ARC = CenterlinePath((Arc((0.0, 0.0), 0.0, 50.0, -math.pi / 2),))  # centre (0, -50)


def test_straight_offsets_are_signed_left_positive() -> None:
    # identity: perpendicular distance to a line along +x, left (+y) positive.
    assert offsets(STRAIGHT, (30.0, 4.0), (30.0, -2.5), (0.0, 0.0)) == pytest.approx([4.0, -2.5, 0.0])


def test_beyond_a_path_end_the_distance_to_the_end_point_counts() -> None:
    # identity: distance to the end point, sign from the side of the end tangent.
    assert offsets(STRAIGHT, (103.0, 4.0), (-6.0, -8.0), (110.0, 0.0)) == pytest.approx([5.0, -10.0, 10.0])


def test_extended_ends_measure_square_to_the_end_tangents() -> None:
    # identity: perpendicular distance to the tangent line continuing each end.
    assert offsets(STRAIGHT, (103.0, 4.0), (-6.0, -8.0), extend_ends=True) == pytest.approx([4.0, -8.0])
    assert offsets(LEFT_ARC, (-20.0, 3.0), (50.0 + 3.0, 80.0), extend_ends=True) == pytest.approx([3.0, -3.0])


def test_arc_offsets_are_radial_and_signed_by_the_side_of_the_centre() -> None:
    # identity: the centre lies R to the left of a left arc and R to the right of a right arc.
    assert offsets(LEFT_ARC, (0.0, 50.0)) == pytest.approx([50.0])
    assert offsets(RIGHT_ARC, (0.0, -50.0)) == pytest.approx([-50.0])
    polar = math.radians(-60.0)  # a point on the radius at 30 degrees of turn, 6 m outside the arc
    outside = (56.0 * math.cos(polar), 50.0 + 56.0 * math.sin(polar))
    inside = (40.0 * math.cos(polar), 50.0 + 40.0 * math.sin(polar))
    assert offsets(LEFT_ARC, outside, inside) == pytest.approx([-6.0, 10.0])


def test_beyond_an_arc_end_the_nearest_end_point_counts() -> None:
    # identity: past the arc's end (50, 50), heading north: east of it is the right-hand side.
    assert offsets(LEFT_ARC, (53.0, 54.0), (-3.0, -4.0)) == pytest.approx([-5.0, -5.0])


def test_an_arc_of_more_than_a_full_turn_is_radial_everywhere() -> None:
    spiral = CenterlinePath((Arc((0.0, 0.0), 0.0, 20.0, 2.5 * math.pi),))
    # identity: every polar angle lies on the arc.
    assert offsets(spiral, (0.0, 20.0 + 5.0), (0.0, -3.0)) == pytest.approx([15.0, -3.0])


def test_the_nearest_segment_wins_on_a_turn_path() -> None:
    path = standard_turn_path(40.0, math.pi / 2, 30.0, 30.0)  # arc centre (30, 40), lead-out up x = 70
    # identity: near the lead-in, the arc and the lead-out in turn.
    assert offsets(path, (10.0, 2.0), (30.0 + 30.0 * math.cos(-0.5), 40.0 + 30.0 * math.sin(-0.5)),
                   (75.0, 60.0)) == pytest.approx([2.0, 10.0, -5.0])


@settings(max_examples=25, deadline=None)
@given(points=st.lists(st.tuples(st.floats(-150.0, 250.0), st.floats(-150.0, 250.0)), min_size=1,
                       max_size=30),
       turn=st.floats(-3.0, 3.0).filter(lambda t: abs(t) > 0.05), radius=st.floats(10.0, 120.0))
def test_magnitude_matches_a_fine_polyline(points: list[tuple[float, float]], turn: float,
                                           radius: float) -> None:
    path = standard_turn_path(radius, turn, 40.0, 60.0)
    stations = np.linspace(0.0, path.length_m, 20001)
    polyline = shapely.LineString(path.evaluate(stations)[0])
    step = path.length_m / 20000
    exact = np.abs(lateral_offset_m(path, np.array(points)))
    approximate = shapely.distance(polyline, shapely.points(np.array(points)))
    # identity: the polyline is inside the arc by at most its sagitta step^2 / (8 R).
    assert np.all(np.abs(exact - approximate) <= step**2 / (8.0 * radius) + 1e-9)


@pytest.mark.parametrize("points", [np.zeros((3, 3)), np.zeros(4)])
def test_bad_point_arrays_raise(points: np.ndarray) -> None:
    with pytest.raises(GeometryError):
        lateral_offset_m(STRAIGHT, points)


def test_non_finite_points_raise() -> None:
    with pytest.raises(NonFiniteInputError):
        lateral_offset_m(STRAIGHT, np.array([[0.0, math.nan]]))
