"""The union of many keyed pieces, kept so that changing a few pieces does not redo the rest.

A drag changes the same few pieces (a line's straight pavement, the junctions on it) frame after
frame. ``TiledUnion`` keeps the union per square tile, clips a changed piece again only where its
edges changed and re-unites only the tiles where a piece's clipped part changed, so a frame's cost
does not grow with the layout (nor with the length of a dragged line); areas are sums over tiles,
and the whole geometry is united only when something asks for it (``LazyGeometry``). The result
always equals the plain union of all pieces (tests/app/test_tiled_union.py).
"""

from __future__ import annotations

import itertools
import math
import operator
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from app.model.tile_clips import CHANGE_MARGIN_M, FEW_TILES, changed_boxes, clipped_parts

FloatArray = npt.NDArray[np.float64]


# -- the tiled union ---------------------------------------------------------------------------
# A fixed grid of square tiles. A drag changes a few pieces near one place; their clipped parts
# change in a few tiles, and only those tiles are united again, however large the layout.
TILE_SIZE_M = 250.0
# The tile lines sit at odd coordinates, so no edge a planner draws on round numbers (a grid line,
# an axis, a square outline) runs along a tile border: a border segment of a tile's union is then
# a seam between tiles, never a real pavement edge.
TILE_ORIGIN_M = (-113.27194, -71.94133)
# A layout far larger than an airfield (a stray vertex 10^7 ft away) would need millions of tiles:
# the tiles double in size until the pieces span at most this many a side, and the union starts over.
MAX_TILES_PER_SIDE = 64
BORDER_TOLERANCE_M = 1e-6  # a vertex this close to a tile line lies on it (clipping puts it there)

Tile = tuple[int, int]
Bounds = tuple[float, float, float, float]


class LazyGeometry:
    """A geometry computed on first use and kept."""

    __slots__ = ("_make", "_value")

    def __init__(self, make: Callable[[], BaseGeometry]) -> None:
        self._make: Callable[[], BaseGeometry] | None = make
        self._value: BaseGeometry | None = None

    def get(self) -> BaseGeometry:
        if self._value is None:
            assert self._make is not None
            self._value, self._make = self._make(), None
        return self._value


class TiledGeometry:
    """One frame's union, held as the union of its pieces within each tile (tiles do not overlap).

    The whole geometry is united on first use; areas are sums over tiles; :meth:`near` unites only
    the tiles around a rectangle. ``TiledGeometry.whole_of(g)`` holds a plain geometry as one tile.
    """

    __slots__ = ("_areas", "_drawing", "_grid", "_tiles", "_whole")

    def __init__(self, tiles: dict[Tile, BaseGeometry], areas_m2: dict[Tile, float],
                 grid: TileGrid | None, drawing: TileDrawing | None = None) -> None:
        self._tiles = tiles
        self._areas = areas_m2
        self._grid = grid
        self._drawing = drawing if drawing is not None else TileDrawing()
        self._whole: BaseGeometry | None = None

    @classmethod
    def whole_of(cls, geometry: BaseGeometry) -> TiledGeometry:
        tiles = {} if geometry.is_empty else {(0, 0): geometry}
        tiled = cls(tiles, {tile: float(g.area) for tile, g in tiles.items()}, None)
        tiled._whole = geometry
        return tiled

    @property
    def area_m2(self) -> float:
        return float(math.fsum(self._areas.values()))

    def whole(self) -> BaseGeometry:
        """The union of every tile (computed once)."""
        if self._whole is None:
            self._whole = shapely.union_all(list(self._tiles.values())) if self._tiles else Polygon()
        return self._whole

    def near(self, bounds_m: Bounds) -> BaseGeometry:
        """Exactly the geometry within the rectangle ``bounds_m`` (xmin, ymin, xmax, ymax)."""
        if self._grid is None:
            return shapely.clip_by_rect(self.whole(), *bounds_m)
        tiles = [self._tiles[tile] for tile in self._grid.tiles_of(bounds_m) if tile in self._tiles]
        return shapely.clip_by_rect(shapely.union_all(tiles), *bounds_m) if tiles else Polygon()

    def edge_parts_xy(self) -> tuple[FloatArray, ...]:
        """The boundary lines, one (n, 2) array per tile (NaN rows between lines), without the seams
        between tiles. A tile that did not change gives back the very array of the last frame."""
        return tuple(self._drawing.edges(tile, geometry, self._grid)
                     for tile, geometry in self._tiles.items())

    def fill_parts_xy(self) -> tuple[FloatArray, ...]:
        """Every ring (exteriors and holes), one array per tile, to fill by the even-odd rule."""
        return tuple(self._drawing.rings(tile, geometry) for tile, geometry in self._tiles.items())


@dataclass(frozen=True, slots=True)
class TileGrid:
    size_m: float = TILE_SIZE_M
    origin_m: tuple[float, float] = TILE_ORIGIN_M

    def tiles_of(self, bounds_m: Bounds) -> list[Tile]:
        xmin, ymin, xmax, ymax = bounds_m
        x0, y0 = self.origin_m
        columns = range(math.floor((xmin - x0) / self.size_m), math.floor((xmax - x0) / self.size_m) + 1)
        rows = range(math.floor((ymin - y0) / self.size_m), math.floor((ymax - y0) / self.size_m) + 1)
        return [(column, row) for column in columns for row in rows]

    def tiles_of_boxes(self, boxes_m: FloatArray) -> set[Tile]:
        """The tiles each row (xmin, ymin, xmax, ymax) of ``boxes_m`` reaches into."""
        x0, y0 = self.origin_m
        spans = np.floor((boxes_m - (x0, y0, x0, y0)) / self.size_m).astype(np.int64)
        within_one = (spans[:, 0] == spans[:, 2]) & (spans[:, 1] == spans[:, 3])
        tiles = set(zip(spans[within_one, 0].tolist(), spans[within_one, 1].tolist(), strict=True))
        for column_0, row_0, column_1, row_1 in set(map(tuple, spans[~within_one].tolist())):
            tiles.update(itertools.product(range(column_0, column_1 + 1), range(row_0, row_1 + 1)))
        return tiles

    def box(self, tile: Tile) -> Bounds:
        x0, y0 = self.origin_m[0] + tile[0] * self.size_m, self.origin_m[1] + tile[1] * self.size_m
        return (x0, y0, x0 + self.size_m, y0 + self.size_m)


class TileDrawing:
    """Drawing arrays of tile geometries, kept while a tile's geometry is the same object."""

    def __init__(self) -> None:
        self._edges: dict[Tile | None, tuple[BaseGeometry, FloatArray]] = {}
        self._rings: dict[Tile | None, tuple[BaseGeometry, FloatArray]] = {}

    def edges(self, tile: Tile, geometry: BaseGeometry, grid: TileGrid | None) -> FloatArray:
        found = self._edges.get(tile)
        if found is None or found[0] is not geometry:
            found = self._edges[tile] = (geometry, _edges_xy(geometry, grid.box(tile) if grid else None))
        return found[1]

    def rings(self, tile: Tile, geometry: BaseGeometry) -> FloatArray:
        found = self._rings.get(tile)
        if found is None or found[0] is not geometry:
            found = self._rings[tile] = (geometry, _edges_xy(geometry, None))
        return found[1]

    def forget(self, tiles: Iterable[Tile]) -> None:
        for tile in tiles:
            self._edges.pop(tile, None)
            self._rings.pop(tile, None)


def _edges_xy(geometry: BaseGeometry, box: Bounds | None) -> FloatArray:
    """Every ring of ``geometry``'s polygons, NaN rows between rings, less (with ``box``) the
    segments along the box's sides: there the lines break with a NaN row as well."""
    parts = shapely.get_parts(geometry)
    rings = shapely.get_rings(parts[shapely.get_type_id(parts) == POLYGON_TYPE_ID])
    xy, ring_of = shapely.get_coordinates(rings, return_index=True)
    if len(xy) < 2:
        return np.empty((0, 2))
    new_ring = ring_of[1:] != ring_of[:-1]     # no segment joins the last point of a ring to the next
    if box is not None:
        # which of the box's sides (xmin, ymin, xmax, ymax) each point lies on
        on_side = np.abs(xy[:, (0, 1, 0, 1)] - box) <= BORDER_TOLERANCE_M
        on_border = (on_side[:-1] & on_side[1:]).any(axis=1) & ~new_ring
        if on_border.any():
            return _without_border(xy, on_border | new_ring)
    drawn, _ = with_gap_rows(xy, new_ring)
    return drawn


def with_gap_rows(xy: FloatArray, breaks: npt.NDArray[np.bool_]) -> tuple[FloatArray, npt.NDArray[np.intp]]:
    """``xy`` with a NaN row after each point ``i`` where ``breaks[i]`` (one fewer than the points),
    and the rows the points went to (what ``np.insert`` does, in a fraction of its time)."""
    if not len(xy):
        return np.empty((0, 2)), np.empty(0, dtype=np.intp)
    shift = np.zeros(len(xy), dtype=np.intp)
    np.cumsum(breaks, out=shift[1:])
    rows = np.arange(len(xy)) + shift
    drawn = np.full((len(xy) + int(shift[-1]), 2), np.nan)
    drawn[rows] = xy
    return drawn, rows


def _without_border(xy: FloatArray, breaks: npt.NDArray[np.bool_]) -> FloatArray:
    """:func:`with_gap_rows` less the points between two breaks (or a break and a ring's end), which
    draw nothing, and less doubled, leading and trailing NaN rows."""
    lonely = np.concatenate(([True], breaks)) & np.concatenate((breaks, [True]))
    drawn, rows = with_gap_rows(xy, breaks)
    kept = np.ones(len(drawn), dtype=bool)
    kept[rows] = ~lonely
    drawn = np.compress(kept, drawn, axis=0)
    gap = np.isnan(drawn[:, 0])
    repeated = np.concatenate(([True], gap[1:] & gap[:-1])) & gap  # leading and doubled NaN rows
    drawn = np.compress(~repeated, drawn, axis=0)
    trimmed: FloatArray = drawn[:-1] if len(drawn) and np.isnan(drawn[-1, 0]) else drawn
    return trimmed


POLYGON_TYPE_ID = 3  # shapely.GeometryType.POLYGON


class TiledUnion:
    """The union of keyed pieces, kept per tile: a call re-unites only the tiles where the clipped
    part of a piece changed (a changed, added or removed piece, where it was and where it is).

    A changed piece is clipped again only in the tiles its change can reach (:func:`changed_boxes`),
    or everywhere when it is not built like the piece it replaces.

    ``update(pieces, subtract)`` returns this frame's union and the union less ``subtract`` (the
    existing pavement: new pavement), both as :class:`TiledGeometry`.
    """

    def __init__(self, grid: TileGrid | None = None) -> None:
        self.grid = grid if grid is not None else TileGrid()
        self._fixed_grid = grid is not None
        self._reset()

    def _reset(self) -> None:
        self._pieces: dict[str, BaseGeometry] = {}
        self._tiles_of: dict[str, tuple[Tile, ...]] = {}
        self._parts: dict[Tile, dict[str, BaseGeometry]] = {}
        self._union: dict[Tile, BaseGeometry] = {}
        self._areas: dict[Tile, float] = {}
        self._less: dict[Tile, BaseGeometry] = {}
        self._less_areas: dict[Tile, float] = {}
        self._subtract: BaseGeometry | None = None
        self._drawing = TileDrawing()
        self._less_drawing = TileDrawing()
        self._extent: Bounds | None = None
        self._exactly_clipped: set[str] = set()  # pieces with a part from the exact fallback clip
        self.last_united_tiles = 0  # tiles united again by the last call (for tests and benchmarks)
        self.last_clipped_tiles = 0  # tiles a piece was clipped to by the last call (idem)

    def update(self, pieces: Mapping[str, BaseGeometry],
               subtract: BaseGeometry | None = None) -> tuple[TiledGeometry, TiledGeometry]:
        previous = self._pieces
        changed = _changed_keys(previous, pieces)
        if changed and not self._fixed_grid and self._fit_grid([pieces[key] for key in changed]):
            previous, changed = self._pieces, list(pieces)  # coarser tiles: everything placed again
        self.last_clipped_tiles = 0
        dirty = self._remove_missing(pieces, changed)
        for key in changed:
            dirty |= self._place(key, pieces[key], previous.get(key))
        self._pieces = dict(pieces)
        for tile in dirty:
            self._unite(tile)
        if subtract is not self._subtract:
            self._subtract = subtract
            dirty = set(self._union)
            self._less.clear()
            self._less_areas.clear()
        for tile in dirty:
            self._subtract_in(tile)
        self.last_united_tiles = len(dirty)
        total = TiledGeometry(dict(self._union), dict(self._areas), self.grid, self._drawing)
        if subtract is None:
            return total, total
        return total, TiledGeometry(dict(self._less), dict(self._less_areas), self.grid, self._less_drawing)

    def _remove_missing(self, pieces: Mapping[str, BaseGeometry], changed: list[str]) -> set[Tile]:
        """Takes out the pieces that are gone; the tiles they were in."""
        previous = self._pieces
        added = sum(1 for key in changed if key not in previous)
        dirty: set[Tile] = set()
        if len(previous) == len(pieces) - added:  # every previous key is still there
            return dirty
        for key in previous.keys() - pieces.keys():
            self._exactly_clipped.discard(key)
            for tile in self._tiles_of.pop(key):
                self._parts.get(tile, {}).pop(key, None)
                dirty.add(tile)
        return dirty

    def _fit_grid(self, changed: list[BaseGeometry]) -> bool:
        """Coarser tiles (and a fresh start: True) when the changed pieces reach beyond what this tile
        size covers in MAX_TILES_PER_SIDE tiles a side."""
        low_x, low_y, high_x, high_y = shapely.total_bounds(np.array(changed, dtype=object))
        if self._extent is not None:
            low_x, low_y = min(low_x, self._extent[0]), min(low_y, self._extent[1])
            high_x, high_y = max(high_x, self._extent[2]), max(high_y, self._extent[3])
        if not np.isfinite([low_x, low_y, high_x, high_y]).all():
            return False  # only empty pieces changed
        self._extent = (float(low_x), float(low_y), float(high_x), float(high_y))
        size_m = self.grid.size_m
        while max(high_x - low_x, high_y - low_y) > MAX_TILES_PER_SIDE * size_m:
            size_m *= 2.0
        if size_m == self.grid.size_m:
            return False
        self.grid = TileGrid(size_m, self.grid.origin_m)
        extent = self._extent
        self._reset()
        self._extent = extent
        return True

    def _place(self, key: str, piece: BaseGeometry, before: BaseGeometry | None) -> set[Tile]:
        """Clip ``piece`` (replacing ``before``) to the tiles where it may have changed; the tiles
        whose part of it changed."""
        old_tiles = self._tiles_of.get(key, ())
        candidates = [] if piece.is_empty else self.grid.tiles_of(piece.bounds)
        boxes = (None if before is None or key in self._exactly_clipped or len(candidates) <= FEW_TILES
                 else changed_boxes(before, piece, CHANGE_MARGIN_M))
        if boxes is None:  # clip it everywhere
            looked_at = {*candidates, *old_tiles}
        else:
            looked_at = self.grid.tiles_of_boxes(boxes)
            candidates = list(looked_at)
        new_parts = self._clip_to(key, piece, candidates)
        changed: set[Tile] = set()
        for tile in looked_at:
            old, part = self._parts.get(tile, {}).get(key), new_parts.get(tile)
            if part is None and old is not None:
                del self._parts[tile][key]
                changed.add(tile)
            elif part is not None and (old is None or not shapely.equals_exact(old, part, tolerance=0.0)):
                self._parts.setdefault(tile, {})[key] = part
                changed.add(tile)
        self._tiles_of[key] = (*(tile for tile in old_tiles if tile not in looked_at), *new_parts)
        return changed

    def _clip_to(self, key: str, piece: BaseGeometry, candidates: list[Tile]) -> dict[Tile, BaseGeometry]:
        """``piece``'s non-empty parts in the ``candidates`` tiles."""
        self.last_clipped_tiles += len(candidates)
        boxes = np.array([self.grid.box(tile) for tile in candidates]).reshape(-1, 4)
        if len(candidates) > 4:  # a long diagonal piece: clip only the tiles it meets
            meets = shapely.intersects(piece, shapely.box(boxes[:, 0], boxes[:, 1], boxes[:, 2], boxes[:, 3]))
            candidates = [tile for tile, hit in zip(candidates, meets, strict=True) if hit]
            boxes = boxes[meets]
        clipped, exact = clipped_parts(piece, boxes)
        # A part from the exact clip may depend on the whole piece: such a piece is clipped everywhere.
        (self._exactly_clipped.add if exact else self._exactly_clipped.discard)(key)
        return {tile: part for tile, part in zip(candidates, clipped, strict=True) if not part.is_empty}

    def _unite(self, tile: Tile) -> None:
        parts = list(self._parts.get(tile, {}).values())
        united = shapely.union_all(parts) if parts else None
        if united is None or united.is_empty:
            self._union.pop(tile, None)
            self._areas.pop(tile, None)
            self._parts.pop(tile, None)
        else:
            self._union[tile] = united
            self._areas[tile] = float(united.area)

    def _subtract_in(self, tile: Tile) -> None:
        united = self._union.get(tile)
        if united is None or self._subtract is None:
            self._less.pop(tile, None)
            self._less_areas.pop(tile, None)
            return
        less = (shapely.difference(united, self._subtract)
                if shapely.intersects(self._subtract, shapely.box(*self.grid.box(tile))) else united)
        if less.is_empty:
            self._less.pop(tile, None)
            self._less_areas.pop(tile, None)
        else:
            self._less[tile] = less
            self._less_areas[tile] = float(less.area)


def _changed_keys(previous: Mapping[str, BaseGeometry], pieces: Mapping[str, BaseGeometry]) -> list[str]:
    """The keys whose piece is not the previous object (scans in C when the keys are the same)."""
    if len(previous) == len(pieces) and list(previous) == list(pieces):
        return list(itertools.compress(pieces, map(operator.is_not, pieces.values(), previous.values())))
    return [key for key, piece in pieces.items() if previous.get(key) is not piece]
