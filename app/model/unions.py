"""The union of many keyed pieces, kept so that changing a few pieces does not redo the rest.

A drag changes the same few pieces (a line's straight pavement, the junctions on it) frame after
frame. ``IncrementalUnion`` keeps the union of every other piece as a base and unites only the
changing ones with it; it rebuilds the base when a piece outside that set changes or one is
removed. The result always equals the union of all pieces.
"""

from __future__ import annotations

from collections.abc import Mapping

import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry


class IncrementalUnion:
    def __init__(self) -> None:
        self._pieces: dict[str, BaseGeometry] = {}
        self._base: BaseGeometry | None = None
        self._loose: frozenset[str] = frozenset()
        self.rebuilt = False  # whether the last call rebuilt the base (for tests and benchmarks)

    def union(self, pieces: Mapping[str, BaseGeometry]) -> BaseGeometry:
        changed = {key for key, piece in pieces.items() if self._pieces.get(key) is not piece}
        removed = self._pieces.keys() - pieces.keys()
        self.rebuilt = self._base is None or bool(removed) or not changed <= self._loose
        if self.rebuilt:
            self._loose = frozenset(changed) if self._base is not None and not removed else frozenset()
            stable = [piece for key, piece in pieces.items() if key not in self._loose]
            self._base = shapely.union_all(stable) if stable else Polygon()
        self._pieces = dict(pieces)
        loose = [pieces[key] for key in self._loose if key in pieces]
        assert self._base is not None
        return shapely.union_all([self._base, *loose]) if loose else self._base
