"""A line's straight pieces (:func:`.parallel_pieces.line_pieces`), put together from the pieces of
each of its segments, remembered by the segment's value.

Dragging a vertex changes a few segments of a long line; the pieces of the others are the very
arrays of the previous run. Each segment is cut on its own (a line of that one segment, whose
stations start at 0) and its stations are shifted by the segment's start station, summed in the
same order as :func:`.parallel_pieces.line_pieces` sums them, so the pieces are equal to the last
bit (tests/geometry/checks/test_segment_pieces.py).
"""

from __future__ import annotations

import math

import numpy as np

from geometry.checks.parallel_pieces import Pieces, line_pieces
from geometry.network import NetworkLine
from geometry.primitives import Segment, Straight


def _signs(segment: Segment) -> tuple[bool, ...]:
    """The signs of the segment's zeros: equal segments differ at most in the sign of a zero,
    which would show in the pieces (a "-0.0" in a message)."""
    numbers: tuple[float, ...]
    if isinstance(segment, Straight):
        numbers = (*segment.start, segment.heading_rad, segment.length_m)
    else:
        numbers = (*segment.start, segment.start_heading_rad, segment.radius_m, segment.turn_rad)
    if 0.0 not in numbers:
        return ()
    return tuple(math.copysign(1.0, number) < 0.0 for number in numbers if number == 0.0)


class SegmentPieces:
    """:func:`line_pieces` of one line at a time, from the remembered pieces of its segments."""

    def __init__(self) -> None:
        self._known: dict[Segment, tuple[Segment, Pieces]] = {}

    def of(self, line: NetworkLine) -> Pieces:
        if not line.segments:
            return line_pieces([line])
        parts = [self._of_segment(line, segment) for segment in line.segments]
        station_m, stations = 0.0, []
        for part, segment in zip(parts, line.segments, strict=True):
            stations.append(station_m + part.start_station_m)
            station_m += segment.length_m
        counts = [part.count for part in parts]
        return Pieces((line.id,), np.zeros(sum(counts), dtype=np.int64),
                      np.repeat(np.arange(len(parts), dtype=np.int64), counts),
                      np.vstack([part.start for part in parts]), np.vstack([part.end for part in parts]),
                      np.concatenate(stations))

    def _of_segment(self, line: NetworkLine, segment: Segment) -> Pieces:
        known = self._known.get(segment)
        if known is None or (known[0] is not segment and _signs(known[0]) != _signs(segment)):
            pieces = line_pieces([NetworkLine(line.id, line.kind, (segment,))])
            known = self._known[segment] = (segment, pieces)
        return known[1]

    def __len__(self) -> int:
        return len(self._known)

    def forget_beyond(self, count: int) -> None:
        """Forget every segment once more than ``count`` are remembered (lines long gone)."""
        if len(self._known) > count:
            self._known.clear()
