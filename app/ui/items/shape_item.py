"""One style of a scene layer as one pre-built QPainterPath (strokes thinned to the screen).

The item holds the shape's parts (a part per junction for the analysis layers; unchanged
junctions hand over the very same arrays between frames), keeps the thinned copy of each part
by identity, and joins the thinned copies into one path only when a part or the zoom changed.
Painting is then one ``fillPath`` or ``drawPath`` of a few thousand points, where drawing the
exact arrays with a dashed pen took tens of milliseconds a frame.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pyqtgraph as pg
from pyqtgraph.functions import create_qpolygonf, ndarray_from_qpolygonf
from PySide6 import QtCore, QtGui, QtWidgets

from app.ui.items.thinning import BoolArray, FloatArray, detail_tolerance_m, thinned_polylines

# Strokes are drawn within a fifth of a pixel of the exact outline: the same drawing at the
# screen's resolution. Fills are drawn exact (without antialiasing an edge pixel could flip).
STROKE_DETAIL_PX = 0.2
BOUNDS_PAD_PX = 4.0  # beyond half the pen width: room for antialiasing and the pen's joins


@dataclass(frozen=True, slots=True, eq=False)
class _Drawn:
    """One part as drawn at one tolerance."""

    part: FloatArray
    tolerance_m: float
    path: QtGui.QPainterPath


class ShapeItem(pg.GraphicsObject):
    """Draws the NaN-separated pieces of its parts; filled shapes by the even-odd rule."""

    def __init__(self, filled: bool) -> None:
        super().__init__()
        self.filled = filled
        self._pen = QtGui.QPen(QtCore.Qt.PenStyle.NoPen)
        self._brush = QtGui.QBrush(QtCore.Qt.BrushStyle.NoBrush)
        self._parts: tuple[FloatArray, ...] = ()
        self._drawn: dict[int, _Drawn] = {}
        self._tolerance_m = 0.0
        self._path: QtGui.QPainterPath | None = None
        self._pad_m = 0.0
        self._bounds: tuple[QtGui.QPainterPath, float, QtCore.QRectF] | None = None  # path, pad, rect

    # --- content ---------------------------------------------------------------------------------

    @property
    def parts(self) -> tuple[FloatArray, ...]:
        return self._parts

    def has_content(self) -> bool:
        return bool(self._parts)

    def set_parts(self, parts: tuple[FloatArray, ...]) -> None:
        """Show ``parts``; a part that is the very array shown before keeps its drawn copy, and
        parts equal to those shown change nothing."""
        parts = tuple(part for part in parts if len(part))
        if _same_parts(parts, self._parts):
            return
        self.prepareGeometryChange()
        self._parts = parts
        kept = {id(part) for part in parts}
        self._drawn = {key: entry for key, entry in self._drawn.items() if key in kept}
        self._path = None
        self.update()

    def set_look(self, pen: QtGui.QPen | None, brush: QtGui.QBrush | None) -> None:
        self.prepareGeometryChange()  # the bounds leave room for the pen
        self._pen = pen if pen is not None else QtGui.QPen(QtCore.Qt.PenStyle.NoPen)
        self._brush = brush if brush is not None else QtGui.QBrush(QtCore.Qt.BrushStyle.NoBrush)
        self._pad_m = self._pad_for(self._pixel_m())
        self.update()

    def _stroke_tolerance_m(self) -> float:
        return 0.0 if self.filled else self._tolerance_m

    def path(self) -> QtGui.QPainterPath:
        """The path as drawn at the current zoom."""
        if self._path is None:
            self._path = self._build_path()
        return self._path

    def _build_path(self) -> QtGui.QPainterPath:
        tolerance_m = self._stroke_tolerance_m()
        paths = [self._drawn_part(part, tolerance_m).path for part in self._parts]
        if len(paths) == 1:
            return paths[0]
        joined = QtGui.QPainterPath()
        for path in paths:
            joined.addPath(path)  # appends the elements, starting with a move: nothing is closed
        return joined

    def _drawn_part(self, part: FloatArray, tolerance_m: float) -> _Drawn:
        entry = self._drawn.get(id(part))
        if entry is not None and entry.part is part and entry.tolerance_m == tolerance_m:
            return entry
        entry = _Drawn(part, tolerance_m, _path_of(*thinned_polylines(part, tolerance_m)))
        self._drawn[id(part)] = entry
        return entry

    # --- the view --------------------------------------------------------------------------------

    def viewTransformChanged(self) -> None:
        pixel_m = self._pixel_m()
        view = self.getViewWidget()
        device_pixel_m = pixel_m / (view.devicePixelRatioF() if view is not None else 1.0)
        tolerance_m = detail_tolerance_m(device_pixel_m, STROKE_DETAIL_PX)  # a screen's own pixels
        pad_m = self._pad_for(pixel_m)
        if tolerance_m != self._tolerance_m or pad_m != self._pad_m:
            self.prepareGeometryChange()
            if not self.filled and tolerance_m != self._tolerance_m:
                self._path = None
            self._tolerance_m = tolerance_m
            self._pad_m = pad_m
        self.update()

    def _pad_for(self, pixel_m: float) -> float:
        return (self._pen.widthF() / 2.0 + BOUNDS_PAD_PX) * pixel_m

    def _pixel_m(self) -> float:
        view = self.getViewBox()
        if (not isinstance(view, pg.ViewBox) or view.getViewWidget() is None
                or view.width() <= 0.0 or view.height() <= 0.0):
            return 0.0
        width_m, height_m = view.viewPixelSize()
        return float(min(abs(width_m), abs(height_m)))

    # --- painting --------------------------------------------------------------------------------

    def boundingRect(self) -> QtCore.QRectF:
        """The drawn points' extent (a thinned path stays within a fraction of a pixel of the exact
        one) with room for the pen."""
        if not self._parts:
            return QtCore.QRectF()
        path, pad = self.path(), self._pad_m
        known = self._bounds
        if known is None or known[0] is not path or known[1] != pad:  # Qt asks several times a frame
            known = self._bounds = (path, pad, path.controlPointRect().adjusted(-pad, -pad, pad, pad))
        return QtCore.QRectF(known[2])

    def paint(self, painter: QtGui.QPainter, option: QtWidgets.QStyleOptionGraphicsItem,
              widget: QtWidgets.QWidget | None = None) -> None:
        if not self._parts:
            return
        path = self.path()
        if self.filled:
            painter.setRenderHint(QtGui.QPainter.RenderHint.Antialiasing, False)
            painter.fillPath(path, self._brush)
        else:
            painter.setRenderHint(QtGui.QPainter.RenderHint.Antialiasing, True)
            painter.setPen(self._pen)
            painter.drawPath(path)



# Pieces at least this long on average are added as polygons, one per piece; shorter ones go
# through pyqtgraph's arrayToQPath (a QDataStream read: ~0.3 us a point, but no cost per piece).
POLYGON_PIECE_POINTS = 48


def _path_of(points: FloatArray, connect: BoolArray) -> QtGui.QPainterPath:
    if len(points) == 0:
        return QtGui.QPainterPath()
    ends = np.flatnonzero(~connect) + 1
    starts = np.concatenate(([0], ends[:-1]))
    if len(points) >= POLYGON_PIECE_POINTS * len(ends) and bool((ends - starts > 1).all()):
        return _polygons_path(points, starts.tolist(), ends.tolist())
    return pg.arrayToQPath(np.ascontiguousarray(points[:, 0]), np.ascontiguousarray(points[:, 1]),
                           connect=connect.astype(np.int32), finiteCheck=False)


def _polygons_path(points: FloatArray, starts: list[int], ends: list[int]) -> QtGui.QPainterPath:
    """The very elements arrayToQPath gives (a move, then lines, per piece) when no piece is a lone
    point: ``addPolygon`` moves to a piece's first point and draws lines to the others."""
    path = QtGui.QPainterPath()
    for start, end in zip(starts, ends, strict=True):
        polygon = create_qpolygonf(end - start)
        ndarray_from_qpolygonf(polygon)[:] = points[start:end]
        path.addPolygon(polygon)
    return path


def _same_parts(a: tuple[FloatArray, ...], b: tuple[FloatArray, ...]) -> bool:
    """The same arrays, or arrays of equal points (a layer rebuilt around an unchanged shape)."""
    return len(a) == len(b) and all(
        x is y or (x.shape == y.shape and bool(np.array_equal(x, y, equal_nan=True)))
        for x, y in zip(a, b, strict=True))
