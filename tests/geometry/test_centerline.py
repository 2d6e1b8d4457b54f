"""Centerline geometry: polylines with corner radii, flattening, exact segment queries."""

from __future__ import annotations

import math
from itertools import pairwise

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geometry.centerline import (
    SegmentStations,
    centerline_path,
    centerline_segments,
    closest_point_on_segment,
    flatten,
    segment_intersections,
    start_heading_rad,
    wrap_angle,
)
from geometry.errors import InvalidPathError, NonFiniteInputError, TurnDoesNotFitError
from geometry.primitives import Arc, Straight


def test_right_angle_corner_becomes_straight_arc_straight() -> None:
    pieces = centerline_segments([(0, 0), (100, 0), (100, 100)], [None, 30.0, None])
    assert [type(piece) for piece in pieces] == [Straight, Arc, Straight]
    first, arc, last = pieces
    assert isinstance(arc, Arc)
    # Tangent length R tan(90 deg / 2) = R = 30 m (identity), so each straight is 100 - 30 m.
    assert first.length_m == pytest.approx(70.0)  # identity
    assert last.length_m == pytest.approx(70.0)  # identity
    assert arc.turn_rad == pytest.approx(math.pi / 2)  # identity: left turn of 90 degrees
    assert arc.center == pytest.approx((70.0, 30.0))  # identity: R to the left of the arc start
    assert last.end == pytest.approx((100.0, 100.0))  # identity: the line ends on its last vertex


def test_corner_arc_is_tangent_to_both_straights() -> None:
    pieces = centerline_segments([(0, 0), (80, 10), (120, -60), (200, -60)], [None, 25.0, 40.0, None])
    path = centerline_path([(0, 0), (80, 10), (120, -60), (200, -60)], [None, 25.0, 40.0, None])
    assert path.segments == pieces
    for before, after in pairwise(pieces):
        assert math.dist(before.end, after.start) < 1e-9  # identity: pieces join
        assert wrap_angle(start_heading_rad(after) - before.end_heading_rad) == pytest.approx(0.0, abs=1e-12)


def test_tangent_length_of_a_60_degree_corner() -> None:
    heading = math.radians(60.0)
    pieces = centerline_segments([(0, 0), (100, 0), (100 + 100 * math.cos(heading), 100 * math.sin(heading))],
                                 [None, 50.0, None])
    # Tangent length R tan(60 deg / 2) = 50 / sqrt(3) = 28.868 m (identity).
    assert pieces[0].length_m == pytest.approx(100.0 - 50.0 / math.sqrt(3.0))


def test_corner_that_does_not_fit_names_the_vertex() -> None:
    with pytest.raises(TurnDoesNotFitError, match="vertex 2"):
        centerline_segments([(0, 0), (20, 0), (20, 100)], [None, 45.0, None])


def test_two_corners_that_overlap_name_both_vertices() -> None:
    with pytest.raises(TurnDoesNotFitError, match="vertices 2 and 3"):
        centerline_segments([(0, 0), (100, 0), (100, 50), (200, 50)], [None, 40.0, 40.0, None])


def test_corners_that_exactly_share_a_straight_leave_no_zero_length_piece() -> None:
    # Two 90-degree corners of radius 25 m 50 m apart: tangent lengths 25 + 25 = 50 m (identity).
    pieces = centerline_segments([(0, 0), (100, 0), (100, 50), (200, 50)], [None, 25.0, 25.0, None])
    assert [type(piece) for piece in pieces] == [Straight, Arc, Arc, Straight]
    assert all(piece.length_m > 0.0 for piece in pieces)


def test_duplicate_vertices_are_dropped_and_keep_their_radius() -> None:
    clean = centerline_segments([(0, 0), (100, 0), (100, 100)], [None, 30.0, None])
    doubled = centerline_segments([(0, 0), (0, 0), (100, 0), (100, 0), (100, 100)],
                                  [None, None, 30.0, None, None])
    assert doubled == clean


def test_zero_deflection_vertex_ignores_its_radius() -> None:
    pieces = centerline_segments([(0, 0), (50, 0), (100, 0)], [None, 30.0, None])
    assert all(isinstance(piece, Straight) for piece in pieces)
    assert sum(piece.length_m for piece in pieces) == pytest.approx(100.0)  # identity


def test_sharp_corner_is_allowed_in_segments_but_not_in_a_path() -> None:
    pieces = centerline_segments([(0, 0), (100, 0), (100, 100)], [None, None, None])
    assert [type(piece) for piece in pieces] == [Straight, Straight]
    with pytest.raises(InvalidPathError, match=r"vertex 2 is a sharp corner of 90\.0 degrees"):
        centerline_path([(0, 0), (100, 0), (100, 100)], [None, 0.0, None])


@pytest.mark.parametrize(("points", "radii", "error"), [
    ([(0, 0)], [None], InvalidPathError),
    ([(0, 0), (0, 0)], [None, None], InvalidPathError),
    ([(0, 0), (1, 1)], [None], InvalidPathError),
    ([(0, 0), (math.nan, 1)], [None, None], NonFiniteInputError),
    ([(0, 0), (10, 0), (10, 10)], [None, -5.0, None], InvalidPathError),
])
def test_bad_polylines_raise_a_specific_error(points: list[tuple[float, float]],
                                              radii: list[float | None], error: type[Exception]) -> None:
    with pytest.raises(error):
        centerline_segments(points, radii)


def _sagittas(points: np.ndarray, arc: Arc) -> np.ndarray:
    middles = (points[1:] + points[:-1]) / 2.0
    return arc.radius_m - np.hypot(middles[:, 0] - arc.center[0], middles[:, 1] - arc.center[1])


@settings(max_examples=60, deadline=None)
@given(radius_m=st.floats(5.0, 2000.0), turn_deg=st.floats(-179.0, 179.0).filter(lambda v: abs(v) > 0.5),
       tolerance_m=st.floats(0.001, 2.0))
def test_flatten_honours_the_chord_tolerance(radius_m: float, turn_deg: float, tolerance_m: float) -> None:
    arc = Arc((3.0, -4.0), 0.7, radius_m, math.radians(turn_deg))
    points = flatten([arc], tolerance_m)
    on_circle = np.hypot(points[:, 0] - arc.center[0], points[:, 1] - arc.center[1])
    assert np.allclose(on_circle, radius_m)  # identity: chord ends lie on the arc
    assert np.all(_sagittas(points, arc) <= tolerance_m + 1e-9)  # sagitta <= tolerance (the contract)
    assert points[0] == pytest.approx(arc.start) and points[-1] == pytest.approx(arc.end)


def test_flatten_keeps_straights_as_end_points_and_shares_joins() -> None:
    pieces = centerline_segments([(0, 0), (100, 0), (100, 100)], [None, 30.0, None])
    points = flatten(pieces, 0.01)
    assert points[0] == pytest.approx((0.0, 0.0)) and points[-1] == pytest.approx((100.0, 100.0))
    assert np.all(np.hypot(*np.diff(points, axis=0).T) > 1e-9)  # no repeated points
    # Sagitta of one chord over theta: R (1 - cos(theta / 2)) (identity); 90 degrees at 0.01 m, R 30 m.
    pieces_needed = math.ceil((math.pi / 2) / (2 * math.acos(1 - 0.01 / 30.0)))
    assert len(points) == 3 + pieces_needed  # start, straight end, arc chords, end


def test_flatten_rejects_a_non_positive_tolerance() -> None:
    with pytest.raises(InvalidPathError):
        flatten([Straight((0, 0), 0.0, 10.0)], 0.0)


def test_intersections_of_straights_and_arcs_are_exact() -> None:
    east = Straight((-50.0, 0.0), 0.0, 100.0)
    north = Straight((10.0, -50.0), math.pi / 2, 100.0)
    ((station_a, station_b, point),) = segment_intersections(east, north)
    assert point == pytest.approx((10.0, 0.0)) and station_a == pytest.approx(60.0)  # identity
    assert station_b == pytest.approx(50.0)  # identity
    # A half circle of radius 20 m about the origin, starting at (0, -20) heading east (left arc).
    half = Arc((0.0, -20.0), 0.0, 20.0, math.pi)
    ((station_a, station_arc, point),) = segment_intersections(east, half)
    assert point == pytest.approx((20.0, 0.0))  # identity: the circle's east point
    assert station_arc == pytest.approx(20.0 * math.pi / 2)  # identity: a quarter of the way round
    other = Arc((20.0, -20.0), math.pi / 2, 20.0, math.pi / 2)  # centre (0, -20), from east to north
    crossings = segment_intersections(half, other)
    # Circles of radius 20 m with centres 20 m apart meet at 60 degrees from the line of centres (identity).
    assert [round(p[2][0], 9) for p in crossings] == [pytest.approx(10.0 * math.sqrt(3.0))]


def test_parallel_straights_do_not_intersect() -> None:
    assert segment_intersections(Straight((0, 0), 0.0, 10.0), Straight((0, 1), 0.0, 10.0)) == ()


def test_closest_point_on_arc_and_straight() -> None:
    arc = Arc((0.0, -20.0), 0.0, 20.0, math.pi / 2)  # centre (0, 0), from south to east
    station, point, distance = closest_point_on_segment(arc, (30.0, -30.0))
    assert point == pytest.approx((20 * math.cos(-math.pi / 4), 20 * math.sin(-math.pi / 4)))  # identity
    assert station == pytest.approx(20.0 * math.pi / 4)  # identity
    assert distance == pytest.approx(30.0 * math.sqrt(2.0) - 20.0)  # identity
    station, point, distance = closest_point_on_segment(arc, (-5.0, -40.0))
    assert station == 0.0 and point == pytest.approx(arc.start)  # before the start: the start
    station, point, distance = closest_point_on_segment(Straight((0, 0), 0.0, 10.0), (4.0, 3.0))
    assert (station, distance) == pytest.approx((4.0, 3.0))  # identity


def test_segment_stations_find_straight_runs_up_to_corners() -> None:
    pieces = centerline_segments([(0, 0), (50, 0), (100, 0), (100, 100)], [None, None, 30.0, None])
    along = SegmentStations.of(pieces)
    assert along.length_m == pytest.approx(70.0 + 15 * math.pi + 70.0)  # identity
    forward = along.segment_index(10.0, 1)
    assert forward == 0
    # Two collinear straights (0-50, 50-70) form one run up to the arc at station 70 (identity).
    assert along.straight_run_m(forward, 10.0, 1, 1000.0) == pytest.approx(60.0)
    assert along.straight_run_m(forward, 10.0, 1, 40.0) == pytest.approx(30.0)  # next junction first
    on_arc = along.segment_index(75.0, 1)
    assert on_arc is not None and along.straight_run_m(on_arc, 75.0, 1, 1000.0) == 0.0
    backward = along.segment_index(70.0, -1)
    assert backward == 1 and along.straight_run_m(backward, 70.0, -1, 0.0) == pytest.approx(70.0)
    assert along.segment_index(along.length_m, 1) is None and along.segment_index(0.0, -1) is None


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.floats(-500, 500), st.floats(-500, 500)), min_size=3, max_size=7),
       st.floats(1.0, 80.0))
def test_any_polyline_whose_corners_fit_is_a_continuous_path(points: list[tuple[float, float]],
                                                              radius_m: float) -> None:
    radii: list[float | None] = [None] + [radius_m] * (len(points) - 2) + [None]
    try:
        pieces = centerline_segments(points, radii)
    except (TurnDoesNotFitError, InvalidPathError):
        return  # corners too tight for the drawn lengths, or too few distinct vertices
    distinct = [p for i, p in enumerate(points) if i == 0 or math.dist(p, points[i - 1]) > 1e-6]
    assert pieces[0].start == pytest.approx(distinct[0])  # identity
    assert pieces[-1].end == pytest.approx(distinct[-1], abs=1e-6)  # identity
    for before, after in pairwise(pieces):
        assert math.dist(before.end, after.start) < 1e-6
