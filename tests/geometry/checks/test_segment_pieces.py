"""Pieces put together per segment equal the pieces of the whole line, to the last bit."""

from __future__ import annotations

import numpy as np

from geometry.checks.parallel_pieces import line_pieces
from geometry.checks.segment_pieces import SegmentPieces
from geometry.network import NetworkLine
from geometry.primitives import Arc, Straight


def _same(first: object, second: object) -> bool:
    return all(np.array_equal(getattr(first, name), getattr(second, name))
               and np.asarray(getattr(first, name)).tobytes() == np.asarray(getattr(second, name)).tobytes()
               for name in ("owner", "segment", "start", "end", "start_station_m"))


def _line(bend_rad: float) -> NetworkLine:
    first = Straight((0.0, 0.0), 0.0, 100.3)
    arc = Arc(first.end, 0.0, 50.0, bend_rad)
    last = Straight(arc.end, arc.end_heading_rad, 77.7)
    return NetworkLine("twy", "taxiway", (first, arc, last, Straight(last.end, last.heading_rad + 0.1, 12.0)))


def test_pieces_per_segment_equal_the_whole_line_pieces() -> None:
    memo = SegmentPieces()
    for bend_rad in (0.3, 0.31, -0.2, 0.3):  # revisits a remembered line
        line = _line(bend_rad)
        found, expected = memo.of(line), line_pieces([line])
        assert found.line_ids == expected.line_ids  # identity
        assert _same(found, expected)  # identity: the same arrays, bit for bit


def test_a_zero_of_the_other_sign_is_not_taken_for_a_remembered_one() -> None:
    memo = SegmentPieces()
    positive = NetworkLine("a", "taxiway", (Straight((0.0, 5.0), 0.0, 10.0),))
    negative = NetworkLine("a", "taxiway", (Straight((-0.0, 5.0), 0.0, 10.0),))
    memo.of(positive)
    assert _same(memo.of(negative), line_pieces([negative]))  # identity: signs of zeros kept
