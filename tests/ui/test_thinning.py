"""The drawn copy of an outline (app/ui/items/thinning.py): thinned within its tolerance, pieces
kept apart. Qt-free."""

from __future__ import annotations

import numpy as np
import pytest
import shapely

from app.model.scene import join_pieces
from app.ui.items.thinning import FEW_POINTS, detail_tolerance_m, thinned_polylines


def drawn_pieces(points: np.ndarray, connect: np.ndarray) -> list[np.ndarray]:
    ends = np.flatnonzero(~connect)
    return [points[start:end + 1] for start, end in zip(np.r_[0, ends[:-1] + 1], ends, strict=True)]


def test_every_exact_point_stays_within_the_tolerance_of_the_drawn_line() -> None:
    rng = np.random.default_rng(7)
    sizes = rng.integers(2, 400, size=25)
    pieces = [np.cumsum(rng.normal(scale=0.3, size=(int(size), 2)), axis=0) for size in sizes]
    points, connect = thinned_polylines(join_pieces(pieces), 0.5)
    drawn = drawn_pieces(points, connect)
    assert len(drawn) == len(pieces)  # identity: one drawn piece per piece, none joined to the next
    assert len(points) < sum(len(piece) for piece in pieces) / 2  # common practice, no source: it thins
    for exact, thinned in zip(pieces, drawn, strict=True):
        # identity: Douglas-Peucker keeps the ends and every left-out point within the tolerance
        assert np.array_equal(thinned[[0, -1]], exact[[0, -1]])
        # check value: identity (the thinning rule of app/ui/items/thinning.py)
        assert shapely.distance(shapely.LineString(thinned), shapely.points(exact)).max() <= 0.5 + 1e-9


def test_a_zero_tolerance_keeps_every_point_and_drops_only_the_gaps() -> None:
    nan = [np.nan, np.nan]
    xy = np.array([[0.0, 0.0], [1.0, 0.001], [2.0, 0.0], nan, [5.0, 5.0], nan, [0.0, 1.0], [1.0, 1.5]])
    points, connect = thinned_polylines(xy, 0.0)
    assert np.array_equal(points, xy[~np.isnan(xy[:, 0])])  # identity
    # identity: the lone point joins nothing, and nothing joins across a gap
    assert connect.tolist() == [True, True, False, False, True, False]


def test_a_long_polyline_with_a_lone_point_drops_the_point() -> None:
    line = np.column_stack((np.linspace(0.0, 100.0, 4 * FEW_POINTS), np.zeros(4 * FEW_POINTS)))
    xy = join_pieces([line, [[50.0, 50.0]], line + np.array([0.0, 10.0])])
    points, connect = thinned_polylines(xy, 0.01)
    # identity: a straight line thins to its two ends; the one-point piece draws nothing
    assert points.tolist() == [[0.0, 0.0], [100.0, 0.0], [0.0, 10.0], [100.0, 10.0]]
    # check value: identity (the thinning rule of app/ui/items/thinning.py)
    assert connect.tolist() == [True, False, True, False]


def test_empty_and_single_point_inputs_draw_nothing() -> None:
    for xy in (np.empty((0, 2)), np.array([[1.0, 2.0]]), np.array([[np.nan, np.nan]])):
        points, connect = thinned_polylines(xy, 0.5)
        # check value: identity (the thinning rule of app/ui/items/thinning.py)
        assert len(points) == len(connect) and not connect.any()


@pytest.mark.parametrize("pixel_m", [0.003, 0.19, 1.0, 1.7, 4.47, 250.0])
def test_the_tolerance_is_a_fraction_of_a_pixel_in_steps_of_two(pixel_m: float) -> None:
    tolerance_m = detail_tolerance_m(pixel_m, 0.2)
    # identity: rounded down to a power of two of the pixel, so between half and all of 0.2 px
    assert 0.1 * pixel_m < tolerance_m <= 0.2 * pixel_m
    # check value: identity (the thinning rule of app/ui/items/thinning.py)
    assert detail_tolerance_m(pixel_m * 1.01, 0.2) in (tolerance_m, 2.0 * tolerance_m)
    # check value: identity (the thinning rule of app/ui/items/thinning.py)
    assert detail_tolerance_m(0.0, 0.2) == 0.0 and detail_tolerance_m(float("nan"), 0.2) == 0.0
