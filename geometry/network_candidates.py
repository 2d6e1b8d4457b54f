"""Candidate pieces for the junction finder (geometry/network.py), kept between updates.

Two lines can meet only where a segment of one lies within reach (the snap tolerance plus the
chord tolerance) of a segment of the other, or where an end of one lies within reach of a segment
of the other. Segments are flattened into chords for an STRtree; the exact contacts are found
afterwards on the exact segments.

:class:`CandidateIndex` holds trees of every line's segments and ends as they were when it was
built (a line whose segments are still those very objects is *current* in it), plus small trees
of the lines that differ from it. :func:`candidates_of` asks for the candidates of a few lines
only, so an update after a drag costs in proportion to the lines that changed; the index is
rebuilt when too many lines have left it.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass

import shapely

from geometry import centerline
from geometry.primitives import Point, Segment

CANDIDATE_CHORD_TOLERANCE_M = 0.05  # chords only pick candidate pairs; contacts use exact pieces
REBUILD_SHARE = 0.125               # rebuild the trees once this share of the lines left them
REBUILD_MINIMUM = 16

Pair = tuple[str, str]
Chords = Mapping[int, tuple[Segment, shapely.Geometry]]


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
    since (by the segment's identity), and the trees of the lines that are not current in them."""

    base: _Trees
    chords: Chords
    others: _Trees | None


def end_points(segments: tuple[Segment, ...]) -> tuple[Point, Point]:
    return segments[0].start, segments[-1].end


def _chords(segment: Segment, known: Chords, kept: dict[int, tuple[Segment, shapely.Geometry]]
            ) -> shapely.Geometry:
    found = known.get(id(segment))
    if found is None or found[0] is not segment:
        found = (segment, shapely.linestrings(centerline.flatten([segment], CANDIDATE_CHORD_TOLERANCE_M)))
    kept[id(segment)] = found
    return found[1]


def _trees(segments_by_line: Mapping[str, tuple[Segment, ...]], chords: Chords,
           kept: dict[int, tuple[Segment, shapely.Geometry]]) -> _Trees:
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


def _index(segments_by_line: Mapping[str, tuple[Segment, ...]], previous: CandidateIndex | None
           ) -> CandidateIndex:
    """The previous index with the lines that left it in a small tree of their own, or a new one."""
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
            others = _trees(leaving, kept, kept) if leaving else None
            return CandidateIndex(base, kept, others)
    known = previous.chords if previous is not None else {}
    chords: dict[int, tuple[Segment, shapely.Geometry]] = {}
    return CandidateIndex(_trees(segments_by_line, known, chords), chords, None)


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


def candidates_of(query_ids: Iterable[str], segments_by_line: Mapping[str, tuple[Segment, ...]],
                  previous: CandidateIndex | None, reach_m: float
                  ) -> tuple[dict[Pair, Candidates], CandidateIndex]:
    """The candidates of every pair of lines that holds one of ``query_ids`` (the lines of
    ``segments_by_line``, whose other lines may have changed since ``previous`` too), and the
    index to pass next time."""
    index = _index(segments_by_line, previous)
    owners, numbers, geometries = [], [], []
    query_ends: list[tuple[str, bool]] = []
    ends: list[Point] = []
    for line_id in query_ids:
        segments = segments_by_line.get(line_id)
        if segments is None:
            continue
        for number, segment in enumerate(segments):
            owners.append(line_id)
            numbers.append(number)
            geometries.append(index.chords[id(segment)][1])
        for at_start, point in zip((True, False), end_points(segments), strict=True):
            query_ends.append((line_id, at_start))
            ends.append(point)
    found: dict[Pair, Candidates] = defaultdict(lambda: Candidates(set(), set()))
    end_geometries = list(shapely.points(ends)) if ends else []
    for trees in (index.base, index.others):
        if trees is not None:
            _query_tree(trees, segments_by_line, owners, numbers, geometries, query_ends, end_geometries,
                        reach_m, found)
    return dict(found), index
