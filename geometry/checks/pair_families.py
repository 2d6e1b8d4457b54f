"""The families of checks over pairs of lines: line separations and overlapping centerlines.

An item is a pair of lines close enough to matter (:class:`.near_pairs.NearPairs`), keyed by the
two ids in input order. A run redoes the pairs that came, the pairs of a line that is not the
previous run's object, and the pairs whose shared junctions changed; of these, a pair that had no
finding keeps its outcome when only one of its lines changed and every changed piece of that line
(before and after, :func:`.changes.changed_line`) stays farther from the other line's bounding
box than the check looks (the reach of the separation rule, twice the overlap distance): what
either check finds lies within that distance of both lines, and there nothing changed. Junctions
shared by the pair must keep their shape (where they are and their legs). An overlap kept so had
a shared stretch shorter than the overlap length by more than rounding can change.

A pair of lines evaluated again whose nearby pieces have no two within the parallel tolerance of
each other (two lines crossing, the usual case) has no separation finding; when its rule can be
looked up it is not measured at all (:func:`parallel_possible`).
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable, Hashable, Iterable, Iterator
from functools import partial

import numpy as np

from geometry.checks.changes import Bounds, boxes_meet
from geometry.checks.common import CheckContext
from geometry.checks.family_items import NOTHING, Frame, Item, Outcome, Plan, SameRules, Signature
from geometry.checks.inputs import LineInfo
from geometry.checks.near_pairs import IdPair, NearPairs
from geometry.checks.overlaps import OVERLAP_DISTANCE_M, OVERLAP_LENGTH_M, overlap_findings, shared_stretch
from geometry.checks.pair_memory import PairPieceMemory
from geometry.checks.parallel_pieces import (
    PARALLEL_TOLERANCE_RAD,
    Pieces,
    joined_pieces,
    pieces_near,
    segments_at_junctions,
)
from geometry.checks.separations import pair_rule_found, pair_separation_findings, separation_reach_m
from geometry.findings import Finding
from geometry.network import Junction

MakeItem = Callable[[LineInfo, LineInfo], Item]
# Sines this much above the parallel tolerance's still count as parallel here, so that rounding
# can never hide a pair :func:`.parallel_pieces.parallel_pairs` would look at (no source needed).
_SINE_MARGIN = 1e-9
# Below this overlap the decision "no finding" cannot flip by rounding (common practice, no source).
_OVERLAP_MARGIN_M = 1e-6


def pair_plan(frame: Frame, pairs: NearPairs, came_went: tuple[set[IdPair], set[IdPair]], key: Signature,
              make: MakeItem, kept: Callable[[Outcome, LineInfo, LineInfo], bool],
              signature: Callable[[LineInfo, LineInfo], Signature]) -> Plan:
    """The plan of a family over the near pairs: ``make`` an item of two lines (with that
    ``signature``); ``kept``: whether a remembered outcome of a pair still holds for them."""
    infos = frame.context.inputs.lines
    position = {info.line.id: index for index, info in enumerate(infos)}

    def oriented(pair: IdPair) -> tuple[LineInfo, LineInfo]:
        first, second = (infos[position[line_id]] for line_id in pair)
        return (first, second) if position[pair[0]] < position[pair[1]] else (second, first)

    def every(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        ordered = sorted((min(position[a], position[b]), max(position[a], position[b]))
                         for a in position for b in pairs.partners(a) if a < b and b in position)
        for i, j in ordered:
            item = make(infos[i], infos[j])
            known = memory.get(item.key)
            yield known if known is not None and known.signature == item.signature else item

    def changed(memory: dict[Hashable, Outcome]) -> tuple[Iterable[Item | Outcome], Iterable[Hashable]]:
        came, went = came_went
        dirty = set(came)
        for line_id in frame.line_changes:
            dirty.update((line_id, other) if line_id < other else (other, line_id)
                         for other in pairs.partners(line_id))
        for old, new in frame.junction_changes:
            for junction in (old, new):
                if junction is not None:
                    dirty.update(pair for pair in itertools.combinations(junction.line_ids, 2)
                                 if pair[1] in pairs.partners(pair[0]))
        found: list[Item | Outcome] = []
        for pair in dirty:
            first, second = oriented(pair)
            known = memory.get((first.line.id, second.line.id))
            if known is not None and kept(known, first, second):
                found.append(Outcome(known.key, signature(first, second), (), (), None, known.extra))
            else:
                found.append(make(first, second))
        return found, [(first.line.id, second.line.id) for first, second in map(oriented, went)]
    return Plan(key, every, changed)


def changed_regions(frame: Frame) -> dict[str, tuple[Bounds, ...] | None]:
    """For each changed line, the boxes of what changed on it (None: the whole line)."""
    return {line_id: change.regions for line_id, change in frame.line_changes.items()}


def parallel_possible(pieces: Pieces) -> bool:
    """Whether a piece of the first line and one of the second run within the parallel tolerance
    of each other: without such a pair :func:`.parallel_pieces.parallel_pairs` finds nothing."""
    vectors = pieces.end - pieces.start
    lengths = np.hypot(vectors[:, 0], vectors[:, 1])
    usable = lengths > 0.0
    units = vectors[usable] / lengths[usable, None]
    owners = pieces.owner[usable]
    first, second = units[owners == 0], units[owners == 1]
    if not len(first) or not len(second):
        return False
    sines = np.abs(np.outer(first[:, 0], second[:, 1]) - np.outer(first[:, 1], second[:, 0]))
    return bool((sines <= math.sin(PARALLEL_TOLERANCE_RAD) + _SINE_MARGIN).any())


def kept_apart(frame: Frame, known: Outcome, first: LineInfo, second: LineInfo, gap_m: float,
               junctions: tuple[Junction, ...]) -> bool:
    """Whether a pair without findings keeps them: one line changed, only far from the other."""
    if known.findings or known.special or len(known.signature) < 2:
        return False
    old_first, old_second = known.signature[0], known.signature[1]
    if len(known.signature) > 2 and not _same_shapes(frame, known.signature[2], junctions):
        return False
    moved = [(frame.line_changes.get(info.line.id), old, other)
             for info, old, other in ((first, old_first, second), (second, old_second, first))
             if old is not info]
    if len(moved) != 1:
        return not moved
    change, old, other = moved[0]
    if change is None or change.previous is not old or change.regions is None:
        return False
    other_box = frame.bounds_of(other.line.id)
    return not any(boxes_meet(region, other_box, gap_m) for region in change.regions)


def _same_shapes(frame: Frame, old: object, new: tuple[Junction, ...]) -> bool:
    if not isinstance(old, tuple) or len(old) != len(new):
        return False
    return all(a is b or frame.shape_of(a) == frame.shape_of(b) for a, b in zip(old, new, strict=True))


class LineSeparations:
    """E-SEP-* between pairs of lines, with the findings of each pair by its pieces remembered."""

    def __init__(self) -> None:
        self._pair_pieces = PairPieceMemory()
        self._pairs = NearPairs()
        self._reach: float | None = None
        self._same_rules = SameRules()
        self._rules_found: dict[tuple[object, ...], bool] = {}

    def forget_pair_pieces_beyond(self, count: int) -> None:
        self._pair_pieces.forget_beyond(count)

    def __call__(self, frame: Frame, _: object) -> Plan:
        context = frame.context
        infos = context.inputs.lines
        if len(infos) < 2:
            return NOTHING
        reach_m = self._reach_m(frame)
        came_went = self._pairs.update([info.line.id for info in infos],
                                       frame.geometries(), reach_m,
                                       changed_regions(frame))

        def evaluate(a: LineInfo, b: LineInfo, junctions: tuple[Junction, ...]) -> tuple[list[Finding], None]:
            pieces = joined_pieces(pieces_near(frame.pieces_of(a.line), frame.bounds_of(b.line.id), reach_m),
                                   pieces_near(frame.pieces_of(b.line), frame.bounds_of(a.line.id), reach_m))
            if not parallel_possible(pieces) and self._rule_found(context, a, b):
                return [], None  # what pair_separation_findings finds without any parallel pair
            excluded = segments_at_junctions((a.line, b.line), junctions)
            compute = partial(pair_separation_findings, context, pieces, reach_m, excluded)
            return self._pair_pieces.findings(context, a, b, pieces, excluded, compute), None

        def shared(a: LineInfo, b: LineInfo) -> tuple[Junction, ...]:
            ids = (a.line.id, b.line.id) if a.line.id < b.line.id else (b.line.id, a.line.id)
            return frame.shared.get(ids, ())

        def make(a: LineInfo, b: LineInfo) -> Item:
            junctions = shared(a, b)
            return Item((a.line.id, b.line.id), (a, b, junctions), partial(evaluate, a, b, junctions))

        def kept(known: Outcome, a: LineInfo, b: LineInfo) -> bool:
            return kept_apart(frame, known, a, b, reach_m, shared(a, b))
        return pair_plan(frame, self._pairs, came_went, (reach_m,), make, kept,
                         lambda a, b: (a, b, shared(a, b)))

    def _rule_found(self, context: CheckContext, a: LineInfo, b: LineInfo) -> bool:
        """:func:`pair_rule_found`, remembered by everything the look-up reads."""
        key = (a.line.kind, b.line.kind, a.design_aircraft, b.design_aircraft, a.instrument, b.instrument)
        if key not in self._rules_found:
            if len(self._rules_found) > 1024:
                self._rules_found.clear()
            self._rules_found[key] = pair_rule_found(context, a, b)
        return self._rules_found[key]

    def _reach_m(self, frame: Frame) -> float:
        """:func:`separation_reach_m`, looked up again only for other rules or design aircraft."""
        if not self._same_rules(frame.context.inputs) or self._reach is None:
            self._reach = separation_reach_m(frame.context)
            self._rules_found.clear()  # the rule set may be another
        return self._reach


class Overlaps:
    """E-OVERLAP between pairs of lines within the overlap distance."""

    def __init__(self) -> None:
        self._pairs = NearPairs()

    def __call__(self, frame: Frame, _: object) -> Plan:
        context = frame.context
        infos = context.inputs.lines
        if len(infos) < 2:
            return NOTHING
        came_went = self._pairs.update([info.line.id for info in infos],
                                       frame.geometries(), OVERLAP_DISTANCE_M,
                                       changed_regions(frame))

        def evaluate(a: LineInfo, b: LineInfo) -> tuple[list[Finding], float]:
            geometry_a, geometry_b = context.geometry(a.line.id), context.geometry(b.line.id)
            shared = shared_stretch(geometry_a, geometry_b)
            return overlap_findings(a, b, geometry_a, geometry_b, shared), shared.length

        def make(a: LineInfo, b: LineInfo) -> Item:
            return Item((a.line.id, b.line.id), (a, b), partial(evaluate, a, b))

        def kept(known: Outcome, a: LineInfo, b: LineInfo) -> bool:
            short = isinstance(known.extra, float) and known.extra < OVERLAP_LENGTH_M - _OVERLAP_MARGIN_M
            return short and kept_apart(frame, known, a, b, 2.0 * OVERLAP_DISTANCE_M, ())
        return pair_plan(frame, self._pairs, came_went, ("overlaps",), make, kept, lambda a, b: (a, b))
