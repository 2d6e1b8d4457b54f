"""Pairs of centerlines within a distance of each other, kept between runs.

The pairwise checks (line separations, overlapping centerlines) start from the pairs of lines
close enough to matter. A drag changes one line; :class:`NearPairs` keeps the pairs among
unchanged lines (the very same geometry objects) and queries only the changed lines against the
others, so the query costs what changed, not the layout's size. When the caller knows which
parts of a changed line moved (boxes round its changed pieces, before and after), only the lines
whose bounding boxes come within the distance of those boxes are measured again: for any other
line the distance is that of the unchanged part, which was measured before.
:meth:`NearPairs.update` says which pairs came and went; :meth:`NearPairs.pairs` lists them all.
The pairs equal a fresh query's (tests/geometry/checks/test_near_pairs.py).
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Mapping, Sequence

import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

Pair = tuple[int, int]
IdPair = tuple[str, str]  # (first, second) with first < second
Bounds = tuple[float, float, float, float]


def _ordered(first: str, second: str) -> IdPair:
    return (first, second) if first < second else (second, first)


class NearPairs:
    def __init__(self) -> None:
        self._distance_m: float | None = None
        self._geometries: dict[str, BaseGeometry] = {}
        self._bounds: dict[str, Bounds] = {}
        self._partners: dict[str, set[str]] = defaultdict(set)

    def update(self, ids: Sequence[str], geometries: Sequence[BaseGeometry], distance_m: float,
               regions: Mapping[str, tuple[Bounds, ...] | None] | None = None
               ) -> tuple[set[IdPair], set[IdPair]]:
        """Bring the pairs up to date: (the pairs that came, the pairs that went). ``regions``:
        for a changed line, the boxes of what changed on it (None: the whole line)."""
        known = self._geometries
        same = distance_m == self._distance_m and len(ids) == len(known)
        changed = [index for index, (line_id, geometry) in enumerate(zip(ids, geometries, strict=True))
                   if not same or known.get(line_id) is not geometry]
        if not changed and same:
            return set(), set()
        self._distance_m = distance_m
        self._geometries = dict(zip(ids, geometries, strict=True))
        for index in changed:
            low_x, low_y, high_x, high_y = shapely.bounds(geometries[index]).tolist()
            self._bounds[ids[index]] = (low_x, low_y, high_x, high_y)
        local = [] if not same or regions is None else [
            index for index in changed if regions.get(ids[index]) is not None]
        whole = [index for index in changed if index not in set(local)]
        came, went = self._requery(ids, geometries, whole, distance_m)
        changed_ids = {ids[index] for index in changed}
        for index in local:
            line_regions = regions[ids[index]] if regions is not None else None
            assert line_regions is not None
            self._measure_near(ids, geometries, index, line_regions, changed_ids, came, went)
        return came - went, went - came

    def _requery(self, ids: Sequence[str], geometries: Sequence[BaseGeometry], changed: list[int],
                 distance_m: float) -> tuple[set[IdPair], set[IdPair]]:
        """Every pair of the changed lines measured again."""
        went = {_ordered(ids[index], partner)
                for index in changed for partner in self._partners.get(ids[index], ())}
        if not changed:
            return set(), went
        if len(changed) == len(ids):
            went = {(first, second) for first, partners in self._partners.items() for second in partners
                    if first < second}
            self._partners.clear()
        for first, second in went:
            self._partners[first].discard(second)
            self._partners[second].discard(first)
        came: set[IdPair] = set()
        if len(geometries) >= 2:
            tree = shapely.STRtree(list(geometries))
            queried, found = tree.query([geometries[index] for index in changed], predicate="dwithin",
                                        distance=distance_m)
            for query, other in zip(queried.tolist(), found.tolist(), strict=True):
                first, second = ids[changed[query]], ids[other]
                if first != second:
                    came.add(_ordered(first, second))
        self._add(came)
        return came, went

    def _measure_near(self, ids: Sequence[str], geometries: Sequence[BaseGeometry], index: int,
                      regions: tuple[Bounds, ...], changed_ids: set[str],
                      came: set[IdPair], went: set[IdPair]) -> None:
        """The pairs of one changed line with the lines near what changed on it (or changed too)."""
        line_id, distance_m = ids[index], self._distance_m
        assert distance_m is not None
        others = [other for other, other_id in enumerate(ids) if other_id != line_id and (
            other_id in changed_ids
            or any(_meet(region, self._bounds[other_id], distance_m) for region in regions))]
        if not others:
            return
        candidates = np.asarray([geometries[other] for other in others])
        near = shapely.dwithin(geometries[index], candidates, distance_m)
        for other, is_near in zip(others, np.atleast_1d(near).tolist(), strict=True):
            pair = _ordered(line_id, ids[other])
            if is_near and ids[other] not in self._partners[line_id]:
                self._add({pair})
                came.add(pair)
            elif not is_near and ids[other] in self._partners[line_id]:
                self._partners[pair[0]].discard(pair[1])
                self._partners[pair[1]].discard(pair[0])
                went.add(pair)

    def _add(self, pairs: set[IdPair]) -> None:
        for first, second in pairs:
            self._partners[first].add(second)
            self._partners[second].add(first)

    def partners(self, line_id: str) -> set[str]:
        """The lines near ``line_id``."""
        return self._partners.get(line_id, set())

    def pairs(self, ids: Sequence[str], geometries: Sequence[BaseGeometry], distance_m: float) -> list[Pair]:
        """Index pairs (first < second) of ``geometries`` within ``distance_m``, sorted."""
        self.update(ids, geometries, distance_m)
        position = {line_id: index for index, line_id in enumerate(ids)}
        return sorted((min(position[a], position[b]), max(position[a], position[b]))
                      for a, partners in self._partners.items() if a in position
                      for b in partners if a < b and b in position)


def _meet(first: Bounds, second: Bounds, gap_m: float) -> bool:
    """True when the boxes come within ``gap_m`` (or a coordinate is not finite)."""
    return not (first[0] > second[2] + gap_m or second[0] > first[2] + gap_m
                or first[1] > second[3] + gap_m or second[1] > first[3] + gap_m)
