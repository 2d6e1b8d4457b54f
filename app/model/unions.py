"""The union of many keyed pieces, kept so that changing a few pieces does not redo the rest.

A drag changes the same few pieces (a line's straight pavement, the junctions on it) frame after
frame. ``TiledUnion`` keeps the union per square tile and re-unites only the tiles where a piece's
clipped part changed, so a frame's cost does not grow with the layout; areas are sums over tiles,
and the whole geometry is united only when something asks for it (``LazyGeometry``). The result
always equals the plain union of all pieces (tests/app/test_tiled_union.py).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

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
    on_border = np.zeros(len(xy) - 1, dtype=bool)
    if box is not None:
        sides = np.zeros(len(xy), dtype=np.int8)  # a bit for each side of the box a point lies on
        for bit, (axis, value) in enumerate(((0, box[0]), (1, box[1]), (0, box[2]), (1, box[3]))):
            sides |= (np.abs(xy[:, axis] - value) <= BORDER_TOLERANCE_M).astype(np.int8) << bit
        on_border = ((sides[:-1] & sides[1:]) != 0) & ~new_ring
    breaks = on_border | new_ring
    if not on_border.any():
        return np.insert(xy, np.flatnonzero(breaks) + 1, np.nan, axis=0)
    # A point between two breaks (or a break and a ring's end) draws nothing: leave it out.
    lonely = np.concatenate(([True], breaks)) & np.concatenate((breaks, [True]))
    kept = np.insert(~lonely, np.flatnonzero(breaks) + 1, True)
    drawn = np.insert(xy, np.flatnonzero(breaks) + 1, np.nan, axis=0)[kept]
    gap = np.isnan(drawn[:, 0])
    repeated = np.concatenate(([True], gap[1:] & gap[:-1])) & gap  # leading and doubled NaN rows
    drawn = drawn[~repeated]
    return drawn[:-1] if len(drawn) and np.isnan(drawn[-1, 0]) else drawn


POLYGON_TYPE_ID = 3  # shapely.GeometryType.POLYGON


class TiledUnion:
    """The union of keyed pieces, kept per tile: a call re-unites only the tiles where the clipped
    part of a piece changed (a changed, added or removed piece, where it was and where it is).

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
        self.last_united_tiles = 0  # tiles united again by the last call (for tests and benchmarks)

    def update(self, pieces: Mapping[str, BaseGeometry],
               subtract: BaseGeometry | None = None) -> tuple[TiledGeometry, TiledGeometry]:
        if not self._fixed_grid:
            self._fit_grid(pieces)
        dirty: set[Tile] = set()
        for key in self._pieces.keys() - pieces.keys():
            for tile in self._tiles_of.pop(key):
                self._parts[tile].pop(key, None)
                dirty.add(tile)
        for key, piece in pieces.items():
            if self._pieces.get(key) is not piece:
                dirty |= self._place(key, piece)
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

    def _fit_grid(self, pieces: Mapping[str, BaseGeometry]) -> None:
        """Coarser tiles (and a fresh start) when the changed pieces reach beyond what this tile size
        covers in MAX_TILES_PER_SIDE tiles a side."""
        changed = [piece for key, piece in pieces.items() if self._pieces.get(key) is not piece]
        if not changed:
            return
        low_x, low_y, high_x, high_y = shapely.total_bounds(np.array(changed, dtype=object))
        if self._extent is not None:
            low_x, low_y = min(low_x, self._extent[0]), min(low_y, self._extent[1])
            high_x, high_y = max(high_x, self._extent[2]), max(high_y, self._extent[3])
        if not np.isfinite([low_x, low_y, high_x, high_y]).all():
            return  # only empty pieces changed
        self._extent = (float(low_x), float(low_y), float(high_x), float(high_y))
        size_m = self.grid.size_m
        while max(high_x - low_x, high_y - low_y) > MAX_TILES_PER_SIDE * size_m:
            size_m *= 2.0
        if size_m != self.grid.size_m:
            self.grid = TileGrid(size_m, self.grid.origin_m)
            extent = self._extent
            self._reset()
            self._extent = extent

    def _place(self, key: str, piece: BaseGeometry) -> set[Tile]:
        """Clip ``piece`` to its tiles; the tiles whose part of it changed."""
        old_tiles = self._tiles_of.get(key, ())
        candidates = [] if piece.is_empty else self.grid.tiles_of(piece.bounds)
        boxes = np.array([self.grid.box(tile) for tile in candidates]).reshape(-1, 4)
        if len(candidates) > 4:  # a long diagonal piece: clip only the tiles it meets
            meets = shapely.intersects(piece, shapely.box(boxes[:, 0], boxes[:, 1], boxes[:, 2], boxes[:, 3]))
            candidates = [tile for tile, hit in zip(candidates, meets, strict=True) if hit]
            boxes = boxes[meets]
        new_tiles = tuple(candidates)
        clipped = _clipped(piece, boxes)
        changed = {tile for tile in old_tiles if tile not in set(new_tiles)}
        kept = []
        for tile, part in zip(new_tiles, clipped, strict=True):
            parts = self._parts.setdefault(tile, {})
            old = parts.get(key)
            if part.is_empty:
                if old is not None:
                    del parts[key]
                    changed.add(tile)
                continue
            kept.append(tile)
            if old is None or not shapely.equals_exact(old, part, tolerance=0.0):
                parts[key] = part
                changed.add(tile)
        for tile in old_tiles:
            if tile not in new_tiles:
                self._parts[tile].pop(key, None)
        self._tiles_of[key] = tuple(kept)
        return changed

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


def _clipped(piece: BaseGeometry, boxes: npt.NDArray[np.float64]) -> list[BaseGeometry]:
    """``piece`` within each box, normalised so that an unchanged part compares equal. A fast clip
    that comes out invalid is redone as an exact intersection."""
    if not len(boxes):
        return []
    parts = np.array([shapely.clip_by_rect(piece, *box) for box in boxes.tolist()], dtype=object)
    invalid = ~shapely.is_valid(parts)
    if invalid.any():
        rectangles = shapely.box(boxes[invalid, 0], boxes[invalid, 1], boxes[invalid, 2], boxes[invalid, 3])
        parts[invalid] = shapely.intersection(piece, rectangles)
    return [part if part.is_empty or part.geom_type in _POLYGONAL else _polygons_in(part)
            for part in shapely.normalize(parts)]


_POLYGONAL = ("Polygon", "MultiPolygon")


def _polygons_in(geometry: BaseGeometry) -> BaseGeometry:
    """The polygons of a clip that also kept lines or points where the piece touches the box."""
    polygons = [part for part in shapely.get_parts(geometry) if part.geom_type == "Polygon"]
    return shapely.multipolygons(polygons) if polygons else Polygon()
