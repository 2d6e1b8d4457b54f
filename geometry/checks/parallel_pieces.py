"""Near-parallel stretches of two lines, and how far apart they run.

Every line is cut into straight *pieces*: its straights, and the chords of its arcs (sagitta
within :data:`~geometry.checks.common.CENTERLINE_CHORD_TOLERANCE_M`). Two pieces of different lines
form a *parallel pair* when

* their directions differ by at most :data:`PARALLEL_TOLERANCE_RAD` (10 degrees, either sense),
* they overlap along their length: projected onto the first piece, the second covers part of it
  (more than :data:`MIN_OVERLAP_M`),
* they do not meet at a junction of the two lines: pairs of segments that both reach a junction
  shared by the two lines are ignored, since lines converge there by design.

The spacing of a pair is the least distance between the two pieces over the overlapping stretch
only. A shapely STRtree picks the candidate pairs within reach, so the work grows with the
number of close pieces, not with the square of the number of lines.
"""

from __future__ import annotations

import math
from collections import defaultdict
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely

from geometry.centerline import closest_point_on_segment, flatten
from geometry.checks.common import CENTERLINE_CHORD_TOLERANCE_M, LENGTH_TOLERANCE_M
from geometry.network import Junction, NetworkLine
from geometry.primitives import FloatArray, Point

PARALLEL_TOLERANCE_RAD = math.radians(10.0)
MIN_OVERLAP_M = 1e-3
JUNCTION_REACH_M = 1.0  # a segment ending this close to a junction's station reaches the junction

IntArray = npt.NDArray[np.int64]
SegmentKey = tuple[str, int]


@dataclass(frozen=True, slots=True, eq=False)
class Pieces:
    """Straight pieces of several lines, one row each."""

    line_ids: tuple[str, ...]
    owner: IntArray              # index into line_ids
    segment: IntArray            # index of the segment of its line the piece belongs to
    start: FloatArray            # (n, 2)
    end: FloatArray              # (n, 2)
    start_station_m: FloatArray  # along its line

    @property
    def count(self) -> int:
        return len(self.owner)


@dataclass(frozen=True, slots=True)
class ParallelPair:
    """Two lines running near-parallel: the closest spacing found over their overlapping pieces,
    where (midway between the two pieces), and how long a stretch of the first line it covers."""

    line_a: str
    line_b: str
    spacing_m: float
    location_m: Point
    stretch_m: float


def line_pieces(lines: Sequence[NetworkLine]) -> Pieces:
    owners, segments, starts, ends, stations = [], [], [], [], []
    for number, line in enumerate(lines):
        station_m = 0.0
        for index, segment in enumerate(line.segments):
            points = flatten([segment], CENTERLINE_CHORD_TOLERANCE_M)
            lengths = np.hypot(*np.diff(points, axis=0).T)
            offsets = np.concatenate(([0.0], np.cumsum(lengths)[:-1]))
            owners.append(np.full(len(lengths), number))
            segments.append(np.full(len(lengths), index))
            starts.append(points[:-1])
            ends.append(points[1:])
            stations.append(station_m + offsets)
            station_m += segment.length_m
    if not owners:
        empty = np.empty((0, 2))
        return Pieces((), np.empty(0, np.int64), np.empty(0, np.int64), empty, empty, np.empty(0))
    return Pieces(tuple(line.id for line in lines), np.concatenate(owners).astype(np.int64),
                  np.concatenate(segments).astype(np.int64), np.vstack(starts), np.vstack(ends),
                  np.concatenate(stations))


def joined_pieces(first: Pieces, second: Pieces) -> Pieces:
    """The pieces of both, ``first``'s lines first (as :func:`line_pieces` of their lines would give)."""
    return Pieces((*first.line_ids, *second.line_ids),
                  np.concatenate((first.owner, second.owner + len(first.line_ids))).astype(np.int64),
                  np.concatenate((first.segment, second.segment)).astype(np.int64),
                  np.vstack((first.start, second.start)), np.vstack((first.end, second.end)),
                  np.concatenate((first.start_station_m, second.start_station_m)))


def pieces_near(pieces: Pieces, bounds: tuple[float, float, float, float], reach_m: float) -> Pieces:
    """The pieces whose bounding boxes come within ``reach_m`` of ``bounds`` (x min, y min, x max,
    y max): for a pair of lines, no piece farther from the other line's box can form a pair."""
    low = np.minimum(pieces.start, pieces.end)
    high = np.maximum(pieces.start, pieces.end)
    keep = ((low[:, 0] <= bounds[2] + reach_m) & (high[:, 0] >= bounds[0] - reach_m)
            & (low[:, 1] <= bounds[3] + reach_m) & (high[:, 1] >= bounds[1] - reach_m))
    if keep.all():
        return pieces
    return Pieces(pieces.line_ids, pieces.owner[keep], pieces.segment[keep], pieces.start[keep],
                  pieces.end[keep], pieces.start_station_m[keep])


def segments_at_junctions(lines: Sequence[NetworkLine], junctions: Sequence[Junction]
                          ) -> set[tuple[SegmentKey, SegmentKey]]:
    """Pairs of segments (of two different lines) that both reach a junction of those lines."""
    by_id = {line.id: line for line in lines}
    bounds = {line.id: _segment_bounds(line) for line in lines}
    excluded: set[tuple[SegmentKey, SegmentKey]] = set()
    for junction in junctions:
        touching: dict[str, set[int]] = {}
        for line_id in {leg.line_id for leg in junction.legs}:
            if line_id in by_id:
                stations = _stations_near(by_id[line_id], bounds[line_id], junction.point)
                touching[line_id] = {index for station_m in stations
                                     for index, (first_m, last_m) in enumerate(bounds[line_id])
                                     if first_m - JUNCTION_REACH_M <= station_m <= last_m + JUNCTION_REACH_M}
        for line_a, indices_a in touching.items():
            for line_b, indices_b in touching.items():
                if line_a != line_b:
                    excluded.update(((line_a, a), (line_b, b)) for a in indices_a for b in indices_b)
    return excluded


def _stations_near(line: NetworkLine, bounds: list[tuple[float, float]], point: Point) -> list[float]:
    """Where along ``line`` it passes within :data:`JUNCTION_REACH_M` of ``point`` (a junction's
    point): the station of the nearest point of each segment that comes that close. The junction's
    own station along the line is among them (the line passes through its junction, or within the
    snap tolerance of it); a line passing the junction twice gives both."""
    found = []
    for segment, (first_m, _) in zip(line.segments, bounds, strict=True):
        if (math.dist(segment.start, point) > segment.length_m + JUNCTION_REACH_M
                and math.dist(segment.end, point) > segment.length_m + JUNCTION_REACH_M):
            continue  # too far for any of its points to come within reach
        local_m, _, distance_m = closest_point_on_segment(segment, point)
        if distance_m <= JUNCTION_REACH_M:
            found.append(first_m + local_m)
    return found


def _segment_bounds(line: NetworkLine) -> list[tuple[float, float]]:
    bounds, station_m = [], 0.0
    for segment in line.segments:
        bounds.append((station_m, station_m + segment.length_m))
        station_m += segment.length_m
    return bounds


def parallel_pairs(pieces: Pieces, reach_m: float, required_m: Callable[[str, str], float | None],
                   excluded: set[tuple[SegmentKey, SegmentKey]]) -> list[ParallelPair]:
    """Pairs of lines (ids in :attr:`Pieces.line_ids` order) whose near-parallel overlapping pieces
    run closer than ``required_m(line_a, line_b)`` (None: the pair is not checked), with the
    closest spacing and the length of the stretch that is too close. Pieces farther apart than
    ``reach_m`` are not looked at, so ``reach_m`` must be at least every required spacing."""
    if pieces.count < 2 or not math.isfinite(reach_m) or reach_m <= 0.0:
        return []
    geometries = shapely.linestrings(np.stack((pieces.start, pieces.end), axis=1))
    left, right = shapely.STRtree(geometries).query(geometries, predicate="dwithin", distance=reach_m)
    keep = pieces.owner[left] < pieces.owner[right]
    left, right = left[keep], right[keep]
    required = np.array([_required(pieces, i, j, required_m, excluded)
                         for i, j in zip(left.tolist(), right.tolist(), strict=True)], dtype=float)
    keep = np.isfinite(required)
    rows = _overlaps(pieces, left[keep], right[keep])
    too_close = rows[2] < required[keep][rows[6]] - LENGTH_TOLERANCE_M
    return _closest_by_line_pair(pieces, *(column[too_close] for column in rows[:6]))


def _required(pieces: Pieces, i: int, j: int, required_m: Callable[[str, str], float | None],
              excluded: set[tuple[SegmentKey, SegmentKey]]) -> float:
    """The spacing two pieces need, or NaN when they are not checked."""
    line_a, line_b = pieces.line_ids[pieces.owner[i]], pieces.line_ids[pieces.owner[j]]
    if ((line_a, int(pieces.segment[i])), (line_b, int(pieces.segment[j]))) in excluded:
        return math.nan
    value = required_m(line_a, line_b)
    return math.nan if value is None else value


def _overlaps(pieces: Pieces, left: IntArray, right: IntArray
              ) -> tuple[IntArray, IntArray, FloatArray, FloatArray, FloatArray, FloatArray, IntArray]:
    """Near-parallel overlapping pairs: (left, right, spacing, station from, station to, midpoint,
    row of each among the pairs given)."""
    a0, a1, b0, b1 = pieces.start[left], pieces.end[left], pieces.start[right], pieces.end[right]
    length_a = np.hypot(*(a1 - a0).T)
    length_b = np.hypot(*(b1 - b0).T)
    usable = (length_a > 0.0) & (length_b > 0.0)
    unit_a = (a1 - a0) / np.where(usable, length_a, 1.0)[:, None]
    unit_b = (b1 - b0) / np.where(usable, length_b, 1.0)[:, None]
    sine = np.abs(unit_a[:, 0] * unit_b[:, 1] - unit_a[:, 1] * unit_b[:, 0])
    along_b0 = np.einsum("ij,ij->i", b0 - a0, unit_a)
    along_b1 = np.einsum("ij,ij->i", b1 - a0, unit_a)
    low = np.maximum(0.0, np.minimum(along_b0, along_b1))
    high = np.minimum(length_a, np.maximum(along_b0, along_b1))
    good = usable & (sine <= math.sin(PARALLEL_TOLERANCE_RAD)) & (high - low > MIN_OVERLAP_M)
    good &= np.abs(along_b1 - along_b0) > 0.0
    a0, b0, b1, unit_a = a0[good], b0[good], b1[good], unit_a[good]
    low, high, along_b0, along_b1 = low[good], high[good], along_b0[good], along_b1[good]
    span = along_b1 - along_b0
    from_b = np.clip((low - along_b0) / span, 0.0, 1.0)[:, None]
    to_b = np.clip((high - along_b0) / span, 0.0, 1.0)[:, None]
    clipped_a = np.stack((a0 + low[:, None] * unit_a, a0 + high[:, None] * unit_a), axis=1)
    clipped_b = np.stack((b0 + from_b * (b1 - b0), b0 + to_b * (b1 - b0)), axis=1)
    spacing = np.asarray(shapely.distance(shapely.linestrings(clipped_a), shapely.linestrings(clipped_b)),
                         dtype=float)
    middle = (clipped_a.mean(axis=1) + clipped_b.mean(axis=1)) / 2.0
    stations = pieces.start_station_m[left[good]]
    return (left[good], right[good], spacing, stations + low, stations + high, middle,
            np.flatnonzero(good).astype(np.int64))


def _closest_by_line_pair(pieces: Pieces, left: IntArray, right: IntArray, spacing: FloatArray,
                          station_from: FloatArray, station_to: FloatArray,
                          middle: FloatArray) -> list[ParallelPair]:
    by_pair: dict[tuple[str, str], list[int]] = defaultdict(list)
    for row, (i, j) in enumerate(zip(left.tolist(), right.tolist(), strict=True)):
        by_pair[(pieces.line_ids[pieces.owner[i]], pieces.line_ids[pieces.owner[j]])].append(row)
    found = []
    for (line_a, line_b), rows in sorted(by_pair.items()):
        closest = min(rows, key=lambda row: spacing[row])
        stretch = _union_length(sorted(zip(station_from[rows].tolist(), station_to[rows].tolist(),
                                           strict=True)))
        found.append(ParallelPair(line_a, line_b, float(spacing[closest]),
                                  (float(middle[closest, 0]), float(middle[closest, 1])), stretch))
    return found


def _union_length(intervals: list[tuple[float, float]]) -> float:
    total, current_from, current_to = 0.0, -math.inf, -math.inf
    for start, stop in intervals:
        if start > current_to:
            total += max(0.0, current_to - current_from) if math.isfinite(current_from) else 0.0
            current_from, current_to = start, stop
        else:
            current_to = max(current_to, stop)
    if math.isfinite(current_from):
        total += current_to - current_from
    return total
