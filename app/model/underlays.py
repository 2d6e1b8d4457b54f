"""Underlays: the existing airfield drawn under the layout (a DXF base drawing, an aerial image).

Qt-free values and the placement math. A :class:`Underlay` is what the layout stores and saves:
the file's path, how it is shown and, for an image, its :class:`Placement`. The file's content
(:class:`BaseDrawing` linework, image pixels) is never stored in the layout; it is read again
from the file (``app.fileio.underlay_dxf``, the Qt layer for pixels).

Image pixel coordinates follow the world-file convention: ``(col, row)`` with ``(0, 0)`` the
CENTRE of the upper-left pixel, columns to the right, rows downward; the image's outer edge is
at ``col = -0.5`` and ``col = width - 0.5`` (likewise for rows). Plan coordinates are metres, x
east and y north (see ``geometry``).
"""

from __future__ import annotations

import math
from collections.abc import Collection, Iterable, Sequence
from dataclasses import dataclass, field
from typing import Literal

import numpy as np
import numpy.typing as npt
import shapely

from app.model.elements import MAX_COORDINATE_M, XY, Layout
from geometry.units import LENGTH_UNITS, LengthUnit

FloatArray = npt.NDArray[np.float64]
UnderlayKind = Literal["drawing", "image"]
UNDERLAY_KINDS: tuple[UnderlayKind, ...] = ("drawing", "image")
UNDERLAY_PREFIX = "ulay"
DEFAULT_OPACITY = {"drawing": 0.6, "image": 0.7}  # dimmed so the layout stays readable
# A ring must enclose at least this much to become pavement (a smaller one is a drafting slip).
MIN_PAVEMENT_AREA_M2 = 0.01


class UnderlayError(ValueError):
    """An underlay cannot be made or placed as asked."""


class PlacementError(UnderlayError):
    """An image placement is degenerate (zero pixel size, the same point twice) or not finite."""


class UnderlayFileError(UnderlayError):
    """An underlay file is missing, unreadable, or not of a kind taxiwright reads."""


# --- image placement -----------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
class Placement:
    """The affine map from image pixels to plan metres, in the terms of a world file.

    ``x = x_per_col_m * col + x_per_row_m * row + x0_m`` and
    ``y = y_per_col_m * col + y_per_row_m * row + y0_m``; (x0_m, y0_m) is the centre of the
    upper-left pixel. A north-up image has ``x_per_row_m = y_per_col_m = 0`` and a negative
    ``y_per_row_m``.
    """

    x_per_col_m: float
    y_per_col_m: float
    x_per_row_m: float
    y_per_row_m: float
    x0_m: float
    y0_m: float

    def __post_init__(self) -> None:
        terms = self.terms()
        if not all(math.isfinite(term) for term in terms):
            raise PlacementError(f"the image placement has a term that is not a number: {terms}")
        if max(abs(self.x0_m), abs(self.y0_m)) > MAX_COORDINATE_M:
            raise PlacementError(f"the image origin ({self.x0_m:g}, {self.y0_m:g}) m is beyond the "
                                 f"{MAX_COORDINATE_M:g} m limit")
        if self.determinant == 0.0 or not math.isfinite(1.0 / self.determinant):
            raise PlacementError("the image placement has zero pixel size: its pixels would "
                                 "collapse onto a line or a point")

    def terms(self) -> tuple[float, float, float, float, float, float]:
        """The six terms in world-file order (A, D, B, E, C, F), in metres."""
        return (self.x_per_col_m, self.y_per_col_m, self.x_per_row_m, self.y_per_row_m,
                self.x0_m, self.y0_m)

    @property
    def determinant(self) -> float:
        return self.x_per_col_m * self.y_per_row_m - self.x_per_row_m * self.y_per_col_m

    def plan_xy(self, col: float, row: float) -> XY:
        """The plan point (metres) of pixel position (col, row)."""
        return (self.x_per_col_m * col + self.x_per_row_m * row + self.x0_m,
                self.y_per_col_m * col + self.y_per_row_m * row + self.y0_m)

    def pixel_at(self, x_m: float, y_m: float) -> XY:
        """The pixel position (col, row) shown at plan point (x_m, y_m)."""
        dx, dy = x_m - self.x0_m, y_m - self.y0_m
        det = self.determinant
        return ((self.y_per_row_m * dx - self.x_per_row_m * dy) / det,
                (self.x_per_col_m * dy - self.y_per_col_m * dx) / det)

    def corners_xy(self, width_px: int, height_px: int) -> tuple[XY, XY, XY, XY]:
        """The image's outer corners on the plan: upper-left, upper-right, lower-right, lower-left.

        Pixel centres sit half a pixel inside the outer edge, hence the -0.5 offsets.
        """
        left, top, right, bottom = -0.5, -0.5, width_px - 0.5, height_px - 0.5
        return (self.plan_xy(left, top), self.plan_xy(right, top), self.plan_xy(right, bottom),
                self.plan_xy(left, bottom))


def placement_from_two_points(pixel_1: XY, pixel_2: XY, plan_1_m: XY, plan_2_m: XY) -> Placement:
    """The similarity (scale, rotation, translation; no shear) putting two picked pixels on two
    plan points. Rows grow downward and y upward, so the map also flips the image's row axis.

    Examples
    --------
    >>> placement_from_two_points((0, 0), (10, 0), (100.0, 200.0), (120.0, 200.0)).terms()
    (2.0, 0.0, 0.0, -2.0, 100.0, 200.0)
    """
    values = (*pixel_1, *pixel_2, *plan_1_m, *plan_2_m)
    if not all(isinstance(v, (int, float)) and math.isfinite(v) for v in values):
        raise PlacementError(f"the two placement points must be finite numbers, got {values}")
    # As complex numbers w = col - i*row (image, y up) and z = x + i*y (plan): z = m*w + t.
    w1, w2 = complex(pixel_1[0], -pixel_1[1]), complex(pixel_2[0], -pixel_2[1])
    z1, z2 = complex(*plan_1_m), complex(*plan_2_m)
    if w1 == w2:
        raise PlacementError("the two image points are the same pixel: pick two points far apart")
    if z1 == z2:
        raise PlacementError("the two plan points are the same: type two different coordinates")
    m = (z2 - z1) / (w2 - w1)
    t = z1 - m * w1
    # x = Re(m) col + Im(m) row + Re(t);  y = Im(m) col - Re(m) row + Im(t)
    return Placement(m.real, m.imag, m.imag, -m.real, t.real, t.imag)


# --- the underlay value --------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
class Underlay:
    """A base drawing or an image under the layout.

    ``path`` is absolute while the layout is in memory (the layout file stores it relative to
    itself when it can). The drawing order is the order in ``Layout.underlays``, first lowest.
    ``locked`` protects the underlay: it cannot be moved on the plan (placement) or removed
    until it is unlocked; its file may still be relinked. ``hidden_layers`` (drawings) names
    the DXF layers not shown; layers not named are shown, so layers added to the file later
    appear. ``assumed_units`` (drawings) is the unit used when the file states none.
    ``placement`` is required for an image.
    """

    id: str
    name: str
    kind: UnderlayKind
    path: str
    visible: bool = True
    locked: bool = True
    opacity: float = 0.6
    hidden_layers: frozenset[str] = frozenset()
    assumed_units: LengthUnit | None = None
    placement: Placement | None = None


def underlay_problem(underlay: object) -> str | None:
    """What is wrong with ``underlay`` (a sentence for the planner), or None when it is valid."""
    if not isinstance(underlay, Underlay):
        return f"not an underlay: {underlay!r}"
    owner = f"underlay {underlay.id!r}"
    checks: tuple[tuple[bool, str], ...] = (
        (isinstance(underlay.id, str) and bool(underlay.id.strip()), "an underlay needs a non-empty id"),
        (isinstance(underlay.name, str), f"{owner}: the name must be text"),
        (underlay.kind in UNDERLAY_KINDS, f"{owner}: the kind must be 'drawing' or 'image'"),
        (isinstance(underlay.path, str) and bool(underlay.path.strip()), f"{owner}: the file path is empty"),
        (isinstance(underlay.visible, bool), f"{owner}: visible must be True or False"),
        (isinstance(underlay.locked, bool), f"{owner}: locked must be True or False"),
        (_is_fraction(underlay.opacity), f"{owner}: opacity must be between 0 and 1, "
                                         f"got {underlay.opacity!r}"),
        (isinstance(underlay.hidden_layers, frozenset)
         and all(isinstance(name, str) for name in underlay.hidden_layers),
         f"{owner}: hidden layers must be a frozenset of layer names"),
        (underlay.assumed_units is None or underlay.assumed_units in LENGTH_UNITS,
         f"{owner}: assumed units must be 'ft', 'm' or None"),
        (underlay.placement is None or isinstance(underlay.placement, Placement),
         f"{owner}: the placement must be a Placement"),
        (underlay.kind != "image" or underlay.placement is not None,
         f"{owner}: an image needs a placement (a world file, or two points picked on it)"),
    )
    return next((message for ok, message in checks if not ok), None)


def _is_fraction(value: object) -> bool:
    return (isinstance(value, (int, float)) and not isinstance(value, bool)
            and math.isfinite(value) and 0.0 <= value <= 1.0)


def new_underlay_id(layout: Layout) -> str:
    """``"ulay-<n>"``, one more than the highest number in use."""
    highest = 0
    for underlay in layout.underlays:
        head, _, tail = underlay.id.rpartition("-")
        if head == UNDERLAY_PREFIX and tail.isascii() and tail.isdigit():
            highest = max(highest, int(tail))
    return f"{UNDERLAY_PREFIX}-{highest + 1}"


def underlay_by_id(layout: Layout, underlay_id: str) -> Underlay | None:
    return next((u for u in layout.underlays if u.id == underlay_id), None)


# --- base drawing content ------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
class DrawingText:
    """A TEXT or MTEXT of a base drawing: its insertion point and plain string."""

    x_m: float
    y_m: float
    text: str
    height_m: float
    rotation_rad: float = 0.0


@dataclass(frozen=True, slots=True, eq=False)
class LayerLinework:
    """The linework of one DXF layer in plan metres.

    ``polylines`` holds every drawn piece (closed outlines too) as ONE (n, 2) array with a NaN
    row between pieces, so a view draws the layer as one curve. ``closed_outlines`` holds each
    closed ring on its own (first point not repeated), for picking pavement.
    """

    polylines: FloatArray
    closed_outlines: tuple[FloatArray, ...] = ()
    texts: tuple[DrawingText, ...] = ()
    entity_count: int = 0


@dataclass(frozen=True, slots=True, eq=False)
class BaseDrawing:
    """What a DXF base drawing holds, ready to draw: linework per layer, in metres.

    ``units_note`` says which units were used and why; ``partial_note`` is set when the file was
    damaged and read only in part. ``skipped_count`` counts entities of kinds not drawn.
    """

    layers: dict[str, LayerLinework]
    units_note: str
    entity_count: int
    skipped_count: int
    metres_per_unit: float = 1.0
    partial_note: str | None = None
    hidden_in_file: frozenset[str] = field(default_factory=frozenset)

    def bounds_m(self) -> tuple[float, float, float, float] | None:
        """(xmin, ymin, xmax, ymax) of all linework, or None when there is none."""
        arrays = [layer.polylines for layer in self.layers.values() if len(layer.polylines)]
        if not arrays:
            return None
        xy = np.vstack(arrays)
        xy = xy[np.isfinite(xy).all(axis=1)]
        if not len(xy):
            return None
        low, high = xy.min(axis=0), xy.max(axis=0)
        return (float(low[0]), float(low[1]), float(high[0]), float(high[1]))


def join_pieces(pieces: Sequence[FloatArray]) -> FloatArray:
    """Pieces of (n, 2) points as one array with a NaN row between pieces."""
    if not pieces:
        return np.empty((0, 2))
    gap = np.full((1, 2), np.nan)
    parts: list[FloatArray] = []
    for piece in pieces:
        parts += [np.asarray(piece, dtype=float), gap]
    return np.vstack(parts[:-1])


# --- picking outlines and turning them into pavement ---------------------------------------------

@dataclass(frozen=True, slots=True)
class OutlineRef:
    """One closed outline of a base drawing: the layer and its index in ``closed_outlines``."""

    layer: str
    index: int


@dataclass(frozen=True, slots=True, eq=False)
class OutlinePicker:
    """Finds the closed outline under a point; build once per drawing with :func:`outline_picker`."""

    refs: tuple[OutlineRef, ...]
    polygons: npt.NDArray[np.object_]
    areas_m2: FloatArray

    def pick(self, x_m: float, y_m: float, layers: Collection[str]) -> OutlineRef | None:
        """The smallest outline on one of ``layers`` that contains (x_m, y_m), or None."""
        if not self.refs:
            return None
        inside = shapely.contains_xy(self.polygons, x_m, y_m)
        candidates = [i for i in np.flatnonzero(inside) if self.refs[i].layer in layers]
        if not candidates:
            return None
        return self.refs[min(candidates, key=lambda i: self.areas_m2[i])]


def outline_picker(drawing: BaseDrawing) -> OutlinePicker:
    refs = tuple(OutlineRef(name, index) for name, layer in drawing.layers.items()
                 for index in range(len(layer.closed_outlines)))
    rings = [drawing.layers[ref.layer].closed_outlines[ref.index] for ref in refs]
    polygons = np.array([shapely.Polygon(ring) for ring in rings], dtype=object)
    areas = shapely.area(polygons) if len(polygons) else np.empty(0)
    return OutlinePicker(refs, polygons, np.asarray(areas, dtype=float))


def outline_xy(drawing: BaseDrawing, ref: OutlineRef) -> FloatArray:
    return drawing.layers[ref.layer].closed_outlines[ref.index]


@dataclass(frozen=True, slots=True)
class PavementPart:
    """An outline and its holes, ready to become an ``ExistingPavement``."""

    outline: tuple[XY, ...]
    holes: tuple[tuple[XY, ...], ...] = ()


def pavement_parts(rings: Iterable[FloatArray | Sequence[XY]]) -> tuple[tuple[PavementPart, ...], int]:
    """Closed rings as pavement: a ring inside another becomes its hole (even-odd nesting, like a
    hatch: a ring inside a hole is pavement again). Returns the parts and how many rings were
    left out (fewer than 3 points, self-crossing, no area, or a duplicate)."""
    polygons: list[shapely.Polygon] = []
    skipped = 0
    for ring in rings:
        polygon = _polygon(ring)
        if polygon is None:
            skipped += 1
        else:
            polygons.append(polygon)
    polygons, duplicates = _without_duplicates(polygons)
    containers = _containers(polygons)
    parts = []
    for index, polygon in enumerate(polygons):
        if len(containers[index]) % 2:
            continue  # a hole: collected by its shell below
        holes = tuple(_ring_points(polygons[j]) for j, inner in enumerate(containers)
                      if len(inner) == len(containers[index]) + 1 and index in inner)
        parts.append(PavementPart(_ring_points(polygon), holes))
    return tuple(parts), skipped + duplicates


def _polygon(ring: FloatArray | Sequence[XY]) -> shapely.Polygon | None:
    xy = np.asarray(ring, dtype=float).reshape(-1, 2)
    if len(xy) and np.array_equal(xy[0], xy[-1]):
        xy = xy[:-1]
    if len(xy) < 3 or not np.isfinite(xy).all():
        return None
    polygon = shapely.Polygon(xy)
    return polygon if polygon.is_valid and polygon.area >= MIN_PAVEMENT_AREA_M2 else None


def _without_duplicates(polygons: list[shapely.Polygon]) -> tuple[list[shapely.Polygon], int]:
    kept: list[shapely.Polygon] = []
    for polygon in polygons:
        if not any(polygon.equals(other) for other in kept if abs(other.area - polygon.area) < 1e-9):
            kept.append(polygon)
    return kept, len(polygons) - len(kept)


def _containers(polygons: list[shapely.Polygon]) -> list[set[int]]:
    """For each polygon, the indices of the polygons that contain it."""
    containers: list[set[int]] = [set() for _ in polygons]
    if not polygons:
        return containers
    tree = shapely.STRtree(polygons)
    inner, outer = tree.query(polygons, predicate="within")
    for i, j in zip(inner.tolist(), outer.tolist(), strict=True):
        if i != j:
            containers[i].add(j)
    return containers


def _ring_points(polygon: shapely.Polygon) -> tuple[XY, ...]:
    coords = np.asarray(polygon.exterior.coords)[:-1]
    return tuple((float(x), float(y)) for x, y in coords)
