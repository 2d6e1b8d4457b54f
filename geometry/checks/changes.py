"""What changed between two runs of the checks, told by the identity of the input objects.

The analysis hands the checks the very same junction, line and movement objects for everything an
edit did not touch. A scan of ``is`` tests over the previous run's tuples finds the few that are
new; the indexes here are then patched for those only, so a drag costs what it changed rather
than the size of the layout:

* :class:`JunctionIndex`: the junctions on each line and those two lines share, in input order;
* :class:`GroupIndex`: each junction's movements, their signatures (the very same tuples while
  neither the movements nor the junction's shape change) and every aircraft with a track;
* :func:`changed_line`: what changed on one line, down to the boxes of its changed pieces.

Whenever the structure changes (junctions added, removed, reordered or joining other lines) the
indexes are rebuilt from scratch, which is what a first run does.
"""

from __future__ import annotations

import itertools
import operator
from collections import Counter, defaultdict
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

from geometry.aircraft import DesignAircraft
from geometry.checks.inputs import LineInfo, MovementInfo
from geometry.checks.parallel_pieces import Pieces
from geometry.network import Junction, NetworkLine

Signature = tuple[object, ...]
Group = tuple[MovementInfo, ...]
Bounds = tuple[float, float, float, float]  # x min, y min, x max, y max
JunctionChange = tuple[Junction | None, Junction | None]  # (previous, current); None: absent


def changed_positions(current: Sequence[object], previous: Sequence[object]) -> list[int] | None:
    """Positions whose objects are not the previous run's; None when the lengths differ."""
    if len(current) != len(previous):
        return None
    return list(itertools.compress(range(len(current)), map(operator.is_not, current, previous)))


class JunctionIndex:
    """The junctions on each line and those two lines share, in input order, patched per run."""

    def __init__(self) -> None:
        self._junctions: tuple[Junction, ...] = ()
        self.by_line: dict[str, tuple[Junction, ...]] = {}
        self.shared: dict[tuple[str, str], tuple[Junction, ...]] = {}
        self.by_id: dict[str, Junction] = {}

    def update(self, junctions: tuple[Junction, ...]) -> list[JunctionChange]:
        """Bring the maps up to date; the junctions that are not the previous run's objects."""
        positions = changed_positions(junctions, self._junctions)
        previous, self._junctions = self._junctions, junctions
        if positions is not None and all(
                junctions[index].id == previous[index].id
                and junctions[index].line_ids == previous[index].line_ids for index in positions):
            changes: list[JunctionChange] = [(previous[index], junctions[index]) for index in positions]
            for old, new in changes:
                assert old is not None and new is not None  # same positions, same ids
                self._replace(old, new)
            return changes
        return self._rebuild(previous)

    def _replace(self, old: Junction, new: Junction) -> None:
        self.by_id[new.id] = new
        line_ids = new.line_ids
        for line_id in line_ids:
            self.by_line[line_id] = _swapped(self.by_line[line_id], old, new)
        for pair in itertools.combinations(line_ids, 2):
            self.shared[pair] = _swapped(self.shared[pair], old, new)

    def _rebuild(self, previous: tuple[Junction, ...]) -> list[JunctionChange]:
        by_line: dict[str, list[Junction]] = defaultdict(list)
        shared: dict[tuple[str, str], list[Junction]] = defaultdict(list)
        for junction in self._junctions:
            line_ids = junction.line_ids
            for line_id in line_ids:
                by_line[line_id].append(junction)
            for pair in itertools.combinations(line_ids, 2):
                shared[pair].append(junction)
        self.by_line = {key: tuple(value) for key, value in by_line.items()}
        self.shared = {key: tuple(value) for key, value in shared.items()}
        old_by_id, self.by_id = {junction.id: junction for junction in previous}, {
            junction.id: junction for junction in self._junctions}
        return [(old_by_id.get(key), self.by_id.get(key)) for key in old_by_id.keys() | self.by_id.keys()
                if old_by_id.get(key) is not self.by_id.get(key)]


def _swapped(members: tuple[Junction, ...], old: Junction, new: Junction) -> tuple[Junction, ...]:
    index = next(index for index, member in enumerate(members) if member is old)
    return (*members[:index], new, *members[index + 1:])


class GroupIndex:
    """Each junction's movements with their signatures, patched for the groups and junctions that
    changed. A signature pair is (the movements) and (the movements, the junction's shape)."""

    def __init__(self, shape_of: Callable[[Junction | None], Signature]) -> None:
        self._shape_of = shape_of
        self._groups: tuple[tuple[str, Group], ...] = ()
        self._members: list[Group] = []
        self.by_id: dict[str, Group] = {}
        self.signatures: dict[str, tuple[Signature, Signature]] = {}
        self._aircraft: dict[str, frozenset[DesignAircraft]] = {}
        self._aircraft_count: Counter[DesignAircraft] = Counter()
        self._aircraft_set: frozenset[DesignAircraft] | None = None

    def update(self, groups: tuple[tuple[str, Group], ...], junctions: dict[str, Junction],
               junction_changes: list[JunctionChange]) -> set[str]:
        """Bring the index up to date; the ids whose signatures are not the previous run's."""
        previous, self._groups = self._groups, groups
        members, self._members = self._members, list(map(operator.itemgetter(1), groups))
        positions = changed_positions(self._members, members)
        if positions is None or any(groups[index][0] != previous[index][0] for index in positions):
            return self._rebuild(junctions)
        changed = {groups[index][0] for index in positions}
        changed.update(new.id for _, new in junction_changes if new is not None and new.id in self.by_id)
        for junction_id in changed:
            group = self._group_of(junction_id, groups, positions)
            self._refresh(junction_id, group, junctions.get(junction_id))
        return changed

    def track_aircraft(self) -> frozenset[DesignAircraft]:
        if self._aircraft_set is None:
            self._aircraft_set = frozenset(self._aircraft_count)
        return self._aircraft_set

    def _group_of(self, junction_id: str, groups: tuple[tuple[str, Group], ...],
                  positions: list[int]) -> Group:
        for index in positions:
            if groups[index][0] == junction_id:
                return groups[index][1]
        return self.by_id[junction_id]

    def _refresh(self, junction_id: str, group: Group, junction: Junction | None) -> None:
        """The signatures of one group, keeping the previous tuples for whatever did not change."""
        old = self.signatures.get(junction_id)
        shape = self._shape_of(junction)
        if old is None or old[0][0] is not group:
            signatures: tuple[Signature, Signature] = ((group,), (group, shape))
        elif old[1][1] == shape:
            signatures = old
        else:
            signatures = (old[0], (group, shape))
        self.signatures[junction_id] = signatures
        self.by_id[junction_id] = group
        aircraft = frozenset(track.aircraft for movement in group for track in movement.tracks)
        before = self._aircraft.get(junction_id, frozenset())
        if aircraft != before:
            self._aircraft_count.subtract(before)
            self._aircraft_count.update(aircraft)
            self._aircraft_count = +self._aircraft_count  # drop the aircraft no group has any more
            self._aircraft_set = None
        self._aircraft[junction_id] = aircraft

    def _rebuild(self, junctions: dict[str, Junction]) -> set[str]:
        old_signatures = self.signatures
        self.by_id, self.signatures, self._aircraft, self._aircraft_count = {}, {}, {}, Counter()
        self._aircraft_set = None
        for junction_id, group in self._groups:
            old = old_signatures.get(junction_id)
            if old is not None:
                self.signatures[junction_id] = old
            self._refresh(junction_id, group, junctions.get(junction_id))
        return {junction_id for junction_id in old_signatures.keys() | self.signatures.keys()
                if old_signatures.get(junction_id) is not self.signatures.get(junction_id)}


@dataclass(frozen=True, slots=True, eq=False)
class LineChange:
    """A line whose record is not the previous run's object. ``regions``: the boxes of its pieces
    that changed (before and after), or None when anything else about the line changed (its
    segment count, design aircraft, width...) and the whole line counts as changed."""

    previous: LineInfo
    current: LineInfo
    regions: tuple[Bounds, ...] | None


def changed_line(previous: LineInfo, current: LineInfo, pieces_of: Callable[[NetworkLine], Pieces]
                 ) -> LineChange:
    """What changed on one line, comparing its segments by value."""
    old, new = previous.line.segments, current.line.segments
    if ((previous.line.id, previous.line.kind, previous.name, previous.width_m, previous.design_aircraft,
         previous.width_overridden, previous.instrument)
            != (current.line.id, current.line.kind, current.name, current.width_m, current.design_aircraft,
                current.width_overridden, current.instrument)) or len(old) != len(new):
        return LineChange(previous, current, None)
    indices = [index for index, (a, b) in enumerate(zip(old, new, strict=True)) if a != b]
    if not indices:
        return LineChange(previous, current, ())
    boxes = (_pieces_box(pieces_of(info.line), indices) for info in (previous, current))
    regions = tuple(box for box in boxes if box is not None)
    return LineChange(previous, current, regions)


def _pieces_box(pieces: Pieces, segment_indices: list[int]) -> Bounds | None:
    chosen = np.zeros(int(pieces.segment.max()) + 1 if pieces.count else 0, dtype=bool)
    chosen[[index for index in segment_indices if index < len(chosen)]] = True
    rows = chosen[pieces.segment]
    if not rows.any():
        return None
    points = np.vstack((pieces.start[rows], pieces.end[rows]))
    (low_x, low_y), (high_x, high_y) = points.min(axis=0), points.max(axis=0)
    return (float(low_x), float(low_y), float(high_x), float(high_y))


def boxes_meet(first: Bounds, second: Bounds, gap_m: float) -> bool:
    """True when the boxes come within ``gap_m`` of each other (or a coordinate is not finite)."""
    apart = (first[0] > second[2] + gap_m or second[0] > first[2] + gap_m
             or first[1] > second[3] + gap_m or second[1] > first[3] + gap_m)
    return not apart
