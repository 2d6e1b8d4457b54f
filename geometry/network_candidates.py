"""Candidate pieces for the junction finder (geometry/network.py), kept between updates, and
places along a line.

Places along a line are :data:`Position` values, (segment index, distance from that segment's
start), not distances from the line's start (:class:`IndexedLine` converts): a contact, a site and
a junction's legs then depend only on the segments around them, so they stay the same values when
the line changes elsewhere (a dragged vertex shifts every station after it, but no position on
the unchanged segments).

Two lines can meet only where a segment of one lies within reach (the snap tolerance plus the
chord tolerance) of a segment of the other, or where an end of one lies within reach of a segment
of the other. Segments are flattened into chords for an STRtree; the exact contacts are found
afterwards on the exact segments.

:class:`CandidateIndex` holds trees of every line's segments and ends as they were when it was
built (a line whose segments are still those very objects is *current* in it), plus small trees
of the lines that differ from it. :func:`candidates_of` asks for the candidates of the segments
that changed only (:func:`changed_pieces`), so an update after a drag costs in proportion to what
changed; the index is rebuilt when too many lines have left it.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
import numpy.typing as npt
import shapely

from geometry import centerline
from geometry.errors import NetworkError
from geometry.primitives import Point, Segment, Straight

if TYPE_CHECKING:  # geometry.network imports this module
    from geometry.network import NetworkLine

END_TOLERANCE_M = 1e-6              # a station this close to a line's end is that end
CANDIDATE_CHORD_TOLERANCE_M = 0.05  # chords only pick candidate pairs; contacts use exact pieces
REBUILD_SHARE = 0.125               # rebuild the trees once this share of the lines left them
REBUILD_MINIMUM = 16

Pair = tuple[str, str]
Position = tuple[int, float]        # (segment index, distance from that segment's start)
ChangedPieces = Mapping[str, frozenset[int] | None]  # of each changed line; None: all of it
Chords = Mapping[Segment, shapely.Geometry]  # by the segment's value
ObjectArray = npt.NDArray[np.object_]
# A line as pair_candidates reads it: id, segments, and (its previous segments, the indices of
# those that changed since) when that is known.
LineSegments = tuple[str, tuple[Segment, ...], tuple[tuple[Segment, ...], frozenset[int]] | None]


@dataclass(slots=True)
class Candidates:
    """Pieces of two lines close enough to meet: segment pairs and (end, segment) pairs."""

    segment_pairs: set[tuple[int, int]]
    ends_near: set[tuple[bool, bool, int]]  # (the end belongs to line a, at its start, other segment)


@dataclass(frozen=True, slots=True, eq=False)
class _Trees:
    segments_by_line: Mapping[str, tuple[Segment, ...]]  # the lines the trees hold
    pieces: shapely.STRtree
    piece_owners: tuple[str, ...]
    piece_numbers: tuple[int, ...]
    ends: shapely.STRtree
    end_owners: tuple[str, ...]
    end_at_start: tuple[bool, ...]


@dataclass(frozen=True, slots=True, eq=False)
class CandidateIndex:
    """The trees of the lines as they were at the last rebuild, the chords of every segment seen
    since (by the segment's value: a changed line mostly keeps equal segments), and the trees of
    the lines that are not current in them."""

    base: _Trees
    chords: Chords
    others: _Trees | None
    # A memo shared by successive indexes: each line's segments, chords and end points as arrays.
    arrays: dict[str, tuple[tuple[Segment, ...], ObjectArray, ObjectArray]]


@dataclass(frozen=True, slots=True, eq=False)
class IndexedLine:
    """A line with its segments' lengths, and what lies at a :data:`Position` along it."""

    line: NetworkLine
    along: centerline.SegmentStations
    lengths_m: tuple[float, ...]

    @classmethod
    def of(cls, line: NetworkLine) -> IndexedLine:
        along = centerline.SegmentStations.of(line.segments)
        return cls(line, along, tuple(segment.length_m for segment in line.segments))

    def is_end(self, at: Position) -> bool:
        piece, local_m = at
        return ((piece == 0 and local_m <= END_TOLERANCE_M)
                or (piece == len(self.lengths_m) - 1 and local_m >= self.lengths_m[-1] - END_TOLERANCE_M))

    def end(self, at_start: bool) -> Position:
        return (0, 0.0) if at_start else (len(self.lengths_m) - 1, self.lengths_m[-1])

    def point_at_end(self, at_start: bool) -> Point:
        return self.line.segments[0].start if at_start else self.line.segments[-1].end

    def station_m(self, at: Position) -> float:
        return self.along.starts_m[at[0]] + at[1]

    def distance_m(self, start: Position, stop: Position) -> float:
        """Along the line from ``start`` to ``stop`` (not before it), summed over the segments
        between them only."""
        return sum(self.lengths_m[start[0]:stop[0]], 0.0) + stop[1] - start[1]

    def normalised(self, at: Position) -> Position:
        """The same place on the segment that holds it (distance in [0, length) but at the line's
        end); a place within ``STATION_EPSILON_M`` of a segment's start is that start exactly, so
        that a junction at a vertex is placed by the segment after the vertex alone."""
        piece, local_m = at
        epsilon = centerline.STATION_EPSILON_M
        while local_m >= self.lengths_m[piece] - epsilon and piece + 1 < len(self.lengths_m):
            local_m -= self.lengths_m[piece]
            piece += 1
        while local_m < -epsilon and piece > 0:
            piece -= 1
            local_m += self.lengths_m[piece]
        return (piece, 0.0) if abs(local_m) <= epsilon else (piece, local_m)

    def leaving(self, at: Position, direction: int) -> Position | None:
        """The segment leaving ``at`` forward (``direction`` +1) or backward (-1), with ``at``
        measured on it; None where the line ends (as ``SegmentStations.segment_index``)."""
        piece, local_m = at
        epsilon, last = centerline.STATION_EPSILON_M, len(self.lengths_m) - 1
        if direction > 0:
            while piece < last and local_m + epsilon >= self.lengths_m[piece]:
                local_m -= self.lengths_m[piece]
                piece += 1
            return None if piece == last and local_m >= self.lengths_m[last] - epsilon else (piece, local_m)
        while piece > 0 and local_m - epsilon <= 0.0:
            piece -= 1
            local_m += self.lengths_m[piece]
        return None if piece == 0 and local_m <= epsilon else (piece, local_m)

    def heading_rad(self, at: Position) -> float:
        """Heading (along the line) of the segment of ``at``, at ``at``."""
        segment = self.line.segments[at[0]]
        if isinstance(segment, Straight):
            return segment.heading_rad
        return segment.start_heading_rad + min(max(at[1], 0.0), segment.length_m) * segment.curvature_per_m

    def straight_run_m(self, at: Position, direction: int, limit_m: float) -> float:
        """Straight length from ``at`` in ``direction`` until the first corner, arc or sharp, or
        ``limit_m`` away (as ``SegmentStations.straight_run_m``); reads no segment past the limit."""
        segments, (piece, local_m) = self.line.segments, at
        first = segments[piece]
        if not isinstance(first, Straight):
            return 0.0
        last, run_m = piece, (self.lengths_m[piece] - local_m if direction > 0 else local_m)
        while run_m < limit_m and 0 <= last + direction < len(segments):
            following = segments[last + direction]
            if (not isinstance(following, Straight)
                    or abs(centerline.wrap_angle(following.heading_rad - first.heading_rad))
                    > centerline.ZERO_DEFLECTION_RAD):
                break
            last += direction
            run_m += self.lengths_m[last]
        return max(0.0, min(run_m, limit_m))


def index_lines(lines: Sequence[NetworkLine], known: Mapping[str, IndexedLine]) -> dict[str, IndexedLine]:
    """The lines by id (in id order), with their segment lengths; ``known`` lends those of
    unchanged lines."""
    indexed: dict[str, IndexedLine] = {}
    for line in sorted(lines, key=lambda line: line.id):
        if line.id in indexed:
            raise NetworkError(f"two lines share the id {line.id}: every line needs its own id")
        item = known.get(line.id)
        if item is None or item.line is not line:
            item = IndexedLine.of(line)
        indexed[line.id] = item
    return indexed


def end_points(segments: tuple[Segment, ...]) -> tuple[Point, Point]:
    return segments[0].start, segments[-1].end


def _chords(segment: Segment, known: Chords, kept: dict[Segment, shapely.Geometry]) -> shapely.Geometry:
    found = known.get(segment)
    if found is None:
        found = shapely.linestrings(centerline.flatten([segment], CANDIDATE_CHORD_TOLERANCE_M))
    kept[segment] = found
    return found


def _trees(segments_by_line: Mapping[str, tuple[Segment, ...]], chords: Chords,
           kept: dict[Segment, shapely.Geometry]) -> _Trees:
    owners, numbers, geometries = [], [], []
    end_owners, at_start, ends = [], [], []
    for line_id, segments in segments_by_line.items():
        for number, segment in enumerate(segments):
            owners.append(line_id)
            numbers.append(number)
            geometries.append(_chords(segment, chords, kept))
        for start, point in zip((True, False), end_points(segments), strict=True):
            end_owners.append(line_id)
            at_start.append(start)
            ends.append(point)
    return _Trees(dict(segments_by_line), shapely.STRtree(geometries), tuple(owners), tuple(numbers),
                  shapely.STRtree(shapely.points(ends) if ends else []), tuple(end_owners), tuple(at_start))


def _index(segments_by_line: Mapping[str, tuple[Segment, ...]], previous: CandidateIndex | None,
           query: ChangedPieces) -> CandidateIndex:
    """The previous index with the lines that left it in a small tree of their own (unless that
    would hold the one queried line only, which meets no other line in it), or a new one."""
    if previous is not None:
        base = previous.base
        leaving = {line_id: segments for line_id, segments in segments_by_line.items()
                   if base.segments_by_line.get(line_id) is not segments}
        limit = max(REBUILD_MINIMUM, REBUILD_SHARE * len(segments_by_line))
        if len(leaving) <= limit:
            kept = dict(previous.chords)
            piece_count = sum(len(segments) for segments in segments_by_line.values())
            if len(kept) > 2 * piece_count + 1024:  # chords of segments long gone
                kept = {}
                for segments in segments_by_line.values():
                    for segment in segments:
                        _chords(segment, previous.chords, kept)
            if leaving.keys() == query.keys() and len(leaving) == 1:
                # Chords of unchanged segments are known already (by value), only the changed ones are new.
                (line_id, segments), = leaving.items()
                wanted = query[line_id]
                for number in range(len(segments)) if wanted is None else wanted:
                    _chords(segments[number], kept, kept)
                return CandidateIndex(base, kept, None, previous.arrays)
            others = _trees(leaving, kept, kept) if leaving else None
            return CandidateIndex(base, kept, others, previous.arrays)
    known = previous.chords if previous is not None else {}
    chords: dict[Segment, shapely.Geometry] = {}
    return CandidateIndex(_trees(segments_by_line, known, chords), chords, None, {})


def _pair(line_a: str, line_b: str) -> tuple[Pair, bool]:
    """The pair in id order, and whether ``line_a`` comes first."""
    return ((line_a, line_b), True) if line_a < line_b else ((line_b, line_a), False)


def _query_tree(trees: _Trees, current: Mapping[str, tuple[Segment, ...]], query_owners: Sequence[str],
                query_numbers: Sequence[int], query_geometries: Sequence[shapely.Geometry],
                query_ends: Sequence[tuple[str, bool]], end_geometries: Sequence[shapely.Geometry],
                reach_m: float, found: dict[Pair, Candidates]) -> None:
    def holds(line_id: str) -> bool:
        return trees.segments_by_line.get(line_id) is current.get(line_id, ())

    if query_geometries:
        left, right = trees.pieces.query(query_geometries, predicate="dwithin", distance=reach_m)
        for i, j in zip(left.tolist(), right.tolist(), strict=True):
            owner = trees.piece_owners[j]
            if owner != query_owners[i] and holds(owner):
                pair, first = _pair(query_owners[i], owner)
                pieces = (query_numbers[i], trees.piece_numbers[j])
                found[pair].segment_pairs.add(pieces if first else pieces[::-1])
        left, right = trees.ends.query(query_geometries, predicate="dwithin", distance=reach_m)
        for i, e in zip(left.tolist(), right.tolist(), strict=True):
            owner = trees.end_owners[e]
            if owner != query_owners[i] and holds(owner):
                pair, first = _pair(query_owners[i], owner)
                found[pair].ends_near.add((not first, trees.end_at_start[e], query_numbers[i]))
    if end_geometries:
        left, right = trees.pieces.query(end_geometries, predicate="dwithin", distance=reach_m)
        for e, j in zip(left.tolist(), right.tolist(), strict=True):
            line_id, at_start = query_ends[e]
            owner = trees.piece_owners[j]
            if owner != line_id and holds(owner):
                pair, first = _pair(line_id, owner)
                found[pair].ends_near.add((first, at_start, trees.piece_numbers[j]))


def changed_pieces(before: Mapping[str, IndexedLine], after: Mapping[str, IndexedLine], changed: set[str],
                   snap_m: float) -> dict[str, frozenset[int] | None]:
    """The segments of each changed line that differ from before; a short one (one pass of a line
    through a junction can span twice the snap tolerance) with the segments within that reach of
    it. None for a line that is new, gone, of another kind or of another number of segments."""
    found: dict[str, frozenset[int] | None] = {}
    for line_id in changed:
        old, new = before.get(line_id), after.get(line_id)
        if (old is None or new is None or old.line.kind != new.line.kind
                or len(old.lengths_m) != len(new.lengths_m)):
            found[line_id] = None
            continue
        pairs = zip(old.line.segments, new.line.segments, strict=True)
        differing = [index for index, (a, b) in enumerate(pairs) if a is not b and a != b]
        near: set[int] = set()
        for index in differing:
            if min(old.lengths_m[index], new.lengths_m[index]) > 2.0 * snap_m:
                continue  # no pass spans it, so no pass beside it changed with it
            for step in (-1, 1):
                gap_m, other = 0.0, index + step
                while 0 <= other < len(new.lengths_m) and gap_m <= 2.0 * snap_m:
                    near.add(other)
                    gap_m += min(old.lengths_m[other], new.lengths_m[other])
                    other += step
        found[line_id] = frozenset(differing) | near
    return found


def candidates_of(query: ChangedPieces, segments_by_line: Mapping[str, tuple[Segment, ...]],
                  previous: CandidateIndex | None, reach_m: float
                  ) -> tuple[dict[Pair, Candidates], CandidateIndex]:
    """The candidates that involve the queried segments (by line: the indices of some of its
    segments, None for all) or the queried lines' ends (an end goes with its segment), among the
    lines of ``segments_by_line`` (any of which may have changed since ``previous``); and the
    index to pass next time."""
    index = _index(segments_by_line, previous, query)
    owners, numbers, geometries = [], [], []
    query_ends: list[tuple[str, bool]] = []
    ends: list[Point] = []
    for line_id, wanted in query.items():
        segments = segments_by_line.get(line_id)
        if segments is None:
            continue
        for number in range(len(segments)) if wanted is None else sorted(wanted):
            owners.append(line_id)
            numbers.append(number)
            geometries.append(index.chords[segments[number]])
        for at_start, point in zip((True, False), end_points(segments), strict=True):
            if wanted is None or (0 if at_start else len(segments) - 1) in wanted:
                query_ends.append((line_id, at_start))
                ends.append(point)
    found: dict[Pair, Candidates] = defaultdict(lambda: Candidates(set(), set()))
    end_geometries = list(shapely.points(ends)) if ends else []
    for trees in (index.base, index.others):
        if trees is not None:
            _query_tree(trees, segments_by_line, owners, numbers, geometries, query_ends, end_geometries,
                        reach_m, found)
    return dict(found), index


def pair_candidates(line_a: LineSegments, line_b: LineSegments, index: CandidateIndex, reach_m: float
                    ) -> Candidates:
    """All the candidates of two lines (the same as :func:`candidates_of` finds for them querying
    every segment of one), from their chords in ``index``."""
    (chords_a, ends_a), (chords_b, ends_b) = (_line_arrays(line, index) for line in (line_a, line_b))
    pieces_a, pieces_b = np.nonzero(shapely.dwithin(chords_a[:, None], chords_b[None, :], reach_m))
    found = Candidates(set(zip(pieces_a.tolist(), pieces_b.tolist(), strict=True)), set())
    for end_on_a, ends, chords in ((True, ends_a, chords_b), (False, ends_b, chords_a)):
        end_numbers, pieces = np.nonzero(shapely.dwithin(ends[:, None], chords[None, :], reach_m))
        found.ends_near.update((end_on_a, number == 0, piece)
                               for number, piece in zip(end_numbers.tolist(), pieces.tolist(), strict=True))
    return found


def _line_arrays(line: LineSegments, index: CandidateIndex) -> tuple[ObjectArray, ObjectArray]:
    """The chords and end points of a line as arrays: remembered, or the remembered ones of its
    previous segments with the changed ones replaced, or made afresh."""
    line_id, segments, prior = line
    known = index.arrays.get(line_id)
    if known is not None and known[0] is segments:
        return known[1], known[2]
    if known is not None and prior is not None and known[0] is prior[0] and len(prior[0]) == len(segments):
        chords = known[1].copy()
        for number in prior[1]:
            chords[number] = index.chords[segments[number]]
        ends_changed = 0 in prior[1] or len(segments) - 1 in prior[1]
        ends = shapely.points(end_points(segments)) if ends_changed else known[2]
    else:
        chords = np.array([index.chords[segment] for segment in segments], dtype=object)
        ends = shapely.points(end_points(segments))
    index.arrays[line_id] = (segments, chords, ends)
    return chords, ends
