"""Pairs of centerlines within a distance of each other, kept between runs.

The pairwise checks (line separations, overlapping centerlines) start from the pairs of lines
close enough to matter. A drag changes one line; :class:`NearPairs` keeps the pairs among
unchanged lines (the very same geometry objects) and queries only the changed lines against the
others, so the query costs what changed, not the layout's size. The pairs equal a fresh query's
(tests/geometry/checks/test_near_pairs.py).
"""

from __future__ import annotations

from collections.abc import Sequence

import shapely
from shapely.geometry.base import BaseGeometry

Pair = tuple[int, int]


class NearPairs:
    def __init__(self) -> None:
        self._distance_m: float | None = None
        self._ids: tuple[str, ...] = ()
        self._geometries: tuple[BaseGeometry, ...] = ()
        self._pairs: frozenset[tuple[str, str]] = frozenset()

    def pairs(self, ids: Sequence[str], geometries: Sequence[BaseGeometry], distance_m: float) -> list[Pair]:
        """Index pairs (first < second) of ``geometries`` within ``distance_m``, sorted."""
        if len(geometries) < 2:
            return []
        known = dict(zip(self._ids, self._geometries, strict=True))
        same_distance = distance_m == self._distance_m
        changed = [index for index, (line_id, geometry) in enumerate(zip(ids, geometries, strict=True))
                   if not same_distance or known.get(line_id) is not geometry]
        changed_ids = {ids[index] for index in changed} | (set(self._ids) - set(ids))
        kept = {pair for pair in self._pairs if pair[0] not in changed_ids and pair[1] not in changed_ids}
        if changed:
            tree = shapely.STRtree(list(geometries))
            queried, found = tree.query([geometries[index] for index in changed], predicate="dwithin",
                                        distance=distance_m)
            for query, other in zip(queried.tolist(), found.tolist(), strict=True):
                first, second = ids[changed[query]], ids[other]
                if first != second:
                    kept.add((first, second) if first < second else (second, first))
        self._distance_m, self._ids, self._geometries = distance_m, tuple(ids), tuple(geometries)
        self._pairs = frozenset(kept)
        position = {line_id: index for index, line_id in enumerate(ids)}
        return sorted((min(position[a], position[b]), max(position[a], position[b])) for a, b in kept)
