"""The sweep's piecewise closed form and station sampling (geometry.sweep_pieces). Demo aircraft
and paths are fictional."""

from __future__ import annotations

import math

import numpy as np
import pytest

from geometry.errors import RadiusTooSmallError
from geometry.path import CenterlinePath, standard_turn_path
from geometry.primitives import Arc, Straight
from geometry.sweep_pieces import (
    at_stations,
    chain_pieces,
    peak_alpha_on_segments_rad,
    peak_alpha_rad,
    sample_stations,
    stations_on_pieces,
)

CMG_M = 20.0


def _never(segment: object) -> Exception:
    return AssertionError(f"the gear should not roll backwards on {segment}")


def s_curve() -> CenterlinePath:
    """Straight, tight left arc (R < d: the circular family), wide right arc, straight."""
    first = Straight((0.0, 0.0), 0.3, 50.0)
    tight = Arc(first.end, first.heading_rad, 15.0, 1.2)
    wide = Arc(tight.end, tight.end_heading_rad, 60.0, -1.5)
    return CenterlinePath((first, tight, wide, Straight(wide.end, wide.end_heading_rad, 120.0)))


@pytest.mark.parametrize("path", [standard_turn_path(45.0, math.pi, 40.0, 200.0), s_curve()])
def test_cockpit_and_heading_are_the_paths_own(path: CenterlinePath) -> None:
    pieces = chain_pieces(path, CMG_M, 0.0, _never)
    stations, which, local = sample_stations(pieces, 30.0, 0.003)
    _alpha, cockpit, heading = at_stations(pieces, which, local)
    expected_xy, expected_heading, _ = path.evaluate(stations)
    # identity: the chord of a piece ends where the path's own formulas put the point
    assert np.max(np.abs(cockpit - expected_xy)) < 1e-9
    assert np.max(np.abs(heading - expected_heading)) < 1e-12


@pytest.mark.parametrize("path", [standard_turn_path(45.0, math.pi, 40.0, 200.0), s_curve()])
def test_stations_start_every_piece_and_end_at_the_path_end(path: CenterlinePath) -> None:
    pieces = chain_pieces(path, CMG_M, 0.1, _never)
    stations, which, local = sample_stations(pieces, 30.0, 0.003)
    assert stations[0] == 0.0 and stations[-1] == path.length_m  # identity
    assert np.all(np.diff(stations) > 0.0)  # identity: strictly increasing
    assert set(np.round(pieces.starts_m, 9)) <= set(np.round(stations, 9))  # identity
    again_which, again_local = stations_on_pieces(pieces, stations[:-1])
    # identity: a station built on a piece is found on that piece again
    assert np.array_equal(again_which, which[:-1]) and np.allclose(again_local, local[:-1], atol=1e-9)


def test_alpha_at_piece_ends_continues_the_chain() -> None:
    pieces = chain_pieces(s_curve(), CMG_M, 0.2, _never)
    which = np.arange(len(pieces.starts_m))
    alpha, _, _ = at_stations(pieces, which, np.array(pieces.lengths_m))
    # identity: the closed form at a piece's end is the next piece's start angle
    assert np.max(np.abs(alpha - np.array(pieces.alphas_rad[1:]))) < 1e-12
    assert not pieces.all_hyperbolic  # the 15 m arc is tighter than d = 20 m (identity)


def test_a_radius_too_tight_calls_the_planner_message() -> None:
    # identity of the model: on a 180-degree arc of a quarter of the CMG the body angle passes 90 degrees
    path = standard_turn_path(5.0, math.pi, 10.0, 10.0)
    with pytest.raises(RadiusTooSmallError):
        chain_pieces(path, CMG_M, 0.0, lambda segment: RadiusTooSmallError(str(segment)))


@pytest.mark.parametrize("path", [standard_turn_path(45.0, math.pi, 40.0, 200.0),
                                  standard_turn_path(12.0, -math.pi / 3, 200.0, 200.0), s_curve()])
def test_the_peak_alpha_is_the_chained_pieces_own(path: CenterlinePath) -> None:
    pieces = chain_pieces(path, CMG_M, 0.0, _never)
    # identity: the same pieces and arithmetic, so the very same largest |alpha|
    assert peak_alpha_rad(path, CMG_M) == max(abs(alpha) for alpha in pieces.alphas_rad)
    segments = [(segment.curvature_per_m, segment.length_m) for segment in path.segments]
    # identity: all peak_alpha_rad reads of a path
    assert peak_alpha_on_segments_rad(segments, CMG_M) == peak_alpha_rad(path, CMG_M)


def test_no_peak_alpha_where_the_gear_would_roll_backwards() -> None:
    path = standard_turn_path(3.0, math.pi, 40.0, 40.0)  # R far below d
    with pytest.raises(RadiusTooSmallError):
        chain_pieces(path, CMG_M, 0.0, RadiusTooSmallError)
    assert peak_alpha_rad(path, CMG_M) is None  # identity: where chain_pieces raises
