"""Edge margins measured with numpy against shapely's own distance, and their signs."""

from __future__ import annotations

import math

import numpy as np
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.geometry import LineString, MultiLineString, Polygon

from app.model.edge_margins import (
    MARGIN_REACH_M,
    TREE_ABOVE_SEGMENTS,
    EdgeSegments,
    edge_distances_m,
    edge_segments,
    signed_margins,
)

FAST = settings(max_examples=40, deadline=None)


def _reference_m(points: np.ndarray, edge: shapely.Geometry) -> np.ndarray:
    """shapely's distance of each point to the edge, capped like the margins (identity)."""
    capped_m: np.ndarray = np.minimum(shapely.distance(edge, shapely.points(points)), MARGIN_REACH_M)
    return capped_m


def _track(seed: int, count: int, step_m: float = 1.0) -> np.ndarray:
    """A wandering track of ``count`` points about ``step_m`` apart (like the plot stations)."""
    rng = np.random.default_rng(seed)
    heading = np.cumsum(rng.normal(0.0, 0.15, count))
    steps = step_m * np.column_stack((np.cos(heading), np.sin(heading)))
    return np.cumsum(steps, axis=0) + rng.uniform(-40.0, 40.0, 2)


@FAST
@given(st.integers(0, 10_000), st.integers(1, 300), st.floats(3.0, 80.0))
def test_distances_equal_shapely_on_a_polygon_edge(seed: int, count: int, size_m: float) -> None:
    rng = np.random.default_rng(seed)
    angles = np.sort(rng.uniform(0.0, 2.0 * math.pi, 40))
    radii = size_m * rng.uniform(0.5, 1.0, 40)
    pavement = shapely.make_valid(Polygon(np.column_stack((radii * np.cos(angles), radii * np.sin(angles)))))
    edge = pavement.boundary
    points = _track(seed, count)
    distances = edge_distances_m(points, edge_segments(edge))
    assert np.allclose(distances, _reference_m(points, edge), rtol=0.0, atol=1e-9)  # identity


def test_distances_to_a_dense_curved_edge_with_several_parts() -> None:
    theta = np.linspace(0.0, 1.5 * math.pi, 2000)  # many short segments, like a flattened fillet arc
    arc = np.column_stack((30.0 * np.cos(theta), 30.0 * np.sin(theta)))
    edge = MultiLineString([arc, [(-50.0, -50.0), (50.0, -45.0)], [(5.0, 5.0), (5.0, 5.0 + 1e-12)]])
    points = np.vstack((_track(3, 500, 0.7), _track(4, 37, 2.0), [[0.0, 0.0], [500.0, 500.0]]))
    distances = edge_distances_m(points, edge_segments(edge))
    assert np.allclose(distances, _reference_m(points, edge), rtol=0.0, atol=1e-9)  # identity
    assert distances[-1] == MARGIN_REACH_M  # far from every edge: capped (identity)


def test_zero_length_segments_act_as_points() -> None:
    edge = LineString([(0.0, 0.0), (0.0, 0.0), (10.0, 0.0), (10.0, 0.0)])
    points = np.array([[-3.0, 4.0], [5.0, 2.0], [13.0, -4.0]])
    assert np.allclose(edge_distances_m(points, edge_segments(edge)), [5.0, 2.0, 5.0])  # identity: 3-4-5


def test_no_edge_or_no_points() -> None:
    # check value: identity
    assert np.array_equal(edge_distances_m(np.array([[1.0, 2.0]]), edge_segments(LineString())),
                          [MARGIN_REACH_M])  # identity: nothing to measure to
    assert edge_distances_m(np.empty((0, 2)), edge_segments(LineString([(0, 0), (1, 0)]))).shape == (0,)


def test_margins_are_positive_inside_and_negative_outside() -> None:
    pavement = shapely.box(0.0, 0.0, 20.0, 10.0)
    shapely.prepare(pavement)
    points = np.array([[5.0, 3.0], [25.0, 5.0], [10.0, 9.5]])
    margins = signed_margins(points, pavement, edge_segments(pavement.boundary))
    assert np.allclose(margins, [3.0, -5.0, 0.5])  # identity: distances to the box's sides


def test_the_tree_search_for_large_edges_gives_the_block_distances() -> None:
    # A long wavy edge of 3,000 segments (above TREE_ABOVE_SEGMENTS), points near and far from it.
    t = np.linspace(0.0, 60.0, 3001)
    edge = shapely.LineString(np.column_stack((20.0 * t, 15.0 * np.sin(t))))
    segments = edge_segments(edge)
    assert segments.count > TREE_ABOVE_SEGMENTS  # identity (the case under test)
    rng = np.random.default_rng(3)
    points = np.column_stack((rng.uniform(-50.0, 1250.0, 900), rng.uniform(-120.0, 120.0, 900)))
    by_tree = edge_distances_m(points, segments)
    exact = np.minimum(shapely.distance(edge, shapely.points(points)), MARGIN_REACH_M)
    assert np.abs(by_tree - exact).max() < 1e-9  # identity (the same Euclidean distance)


@FAST
@given(st.integers(0, 10_000), st.lists(st.integers(0, 90), min_size=1, max_size=6))
def test_tracks_measured_together_give_each_points_own_distance(seed: int, lengths: list[int]) -> None:
    # Several tracks in one call, blocks kept within each track: every point still gets its exact distance.
    tracks = [_track(seed + number, length) if length else np.empty((0, 2))
              for number, length in enumerate(lengths)]
    points = np.concatenate(tracks)
    ring = Polygon([(-30, -30), (35, -25), (40, 30), (-5, 10), (-35, 25)]).exterior
    together = edge_distances_m(points, edge_segments(ring), [len(track) for track in tracks])
    assert together.shape == (len(points),)  # identity (one distance per point)
    assert np.allclose(together, _reference_m(points, ring), rtol=0.0, atol=1e-9)  # identity (Euclidean)


def _brute_force_m(points: np.ndarray, segments: EdgeSegments) -> np.ndarray:
    """Every point against every segment through the same formula, one array operation per step."""
    count, every = len(points), segments.count
    start_x, start_y, delta_x, delta_y, inverse = (row[None, :] for row in segments.table)
    rel_x, rel_y = points[:, :1] - start_x, points[:, 1:] - start_y
    along = np.clip((rel_x * delta_x + rel_y * delta_y) * inverse, 0.0, 1.0)
    squared = (rel_x - along * delta_x) ** 2 + (rel_y - along * delta_y) ** 2
    assert squared.shape == (count, every)  # identity (one distance per pair)
    nearest_m: np.ndarray = np.minimum(np.sqrt(squared.min(axis=1)), MARGIN_REACH_M)
    return nearest_m


@FAST
@given(st.integers(0, 10_000), st.lists(st.integers(0, 70), min_size=1, max_size=5), st.floats(3.0, 80.0))
def test_the_block_prune_gives_the_brute_force_minimum_bit_for_bit(seed: int, lengths: list[int],
                                                                    size_m: float) -> None:
    # A dense wavy ring (many short segments, like flattened fillet arcs) and tracks near and across it.
    angles = np.linspace(0.0, 2.0 * math.pi, 400)
    radii = size_m * (1.0 + 0.2 * np.sin(7.0 * angles + seed))
    ring = Polygon(np.column_stack((radii * np.cos(angles), radii * np.sin(angles)))).exterior
    tracks = [_track(seed + number, length) if length else np.empty((0, 2))
              for number, length in enumerate(lengths)]
    points = np.concatenate(tracks)
    segments = edge_segments(ring)
    measured = edge_distances_m(points, segments, [len(track) for track in tracks])
    # invariant: the prune only skips segments that cannot be nearest, and every kept pair goes
    # through the same operations as the brute force, so the minimum is the same double
    assert np.array_equal(measured, _brute_force_m(points, segments))
