"""Every centerline vertex in ONE item, a symbol scatter per handle style (shared/ECOSYSTEM.md: one
item per vertex does not scale). Like pyqtgraph's TargetItem habit, the item paints and forwards:
a left drag that starts on a vertex is passed on as press, moves and release in plan metres; the
tool decides what moves and the document changes; the item never edits its own data.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import numpy.typing as npt
import pyqtgraph as pg
from PySide6 import QtCore, QtGui, QtWidgets

from app.model.scene import PointSet
from app.ui import style
from app.ui.items.layer_graphics import PassiveScatter
from app.ui.style import Theme

DragSink = Callable[[str, QtCore.QPointF, QtCore.Qt.KeyboardModifier], None]
FloatArray = npt.NDArray[np.float64]
HANDLE_ORDER = ("vertex", "vertex.rounded")
_NO_POINTS = np.empty((0, 2))


class VertexHandles(pg.GraphicsObject):
    """One symbol scatter per handle style ("vertex", "vertex.rounded"), painted by the scatters
    (children); this item only takes the drags. A scatter is set again only when its points
    changed: a drag moves one vertex, and setting one style's points takes pyqtgraph's quick path
    (one symbol, pen and brush for all) where a scatter of mixed styles rendered point by point."""

    def __init__(self, on_drag: DragSink, can_drag: Callable[[], bool]) -> None:
        super().__init__()
        self._scatters: dict[str, PassiveScatter] = {}
        self._shown: dict[str, tuple[FloatArray, Theme]] = {}
        self._on_drag = on_drag
        self._can_drag = can_drag
        self._dragging = False

    def set_points(self, point_sets: list[PointSet], theme: Theme) -> None:
        """Show the ``vertex`` and ``vertex.rounded`` point sets (square and round handles)."""
        wanted = {points.style: points.xy for points in point_sets}
        for style_key in {*wanted, *self._shown}:
            xy = wanted.get(style_key, _NO_POINTS)
            shown = self._shown.get(style_key)
            if shown is not None and shown[1] == theme and shown[0].shape == xy.shape and bool(
                    np.array_equal(shown[0], xy)):
                continue
            self.prepareGeometryChange()  # the bounds are the scatters'
            scatter = self._scatter(style_key)
            scatter.setData(
                pos=xy, pxMode=True, symbol=style.look(style_key).symbol, size=style.look(style_key).size,
                pen=style.shared_pen(style_key, theme), brush=style.shared_brush(style_key, theme))
            if scatter.isVisibleTo(self) != bool(len(xy)):
                scatter.setVisible(bool(len(xy)))  # an empty scatter still cost pyqtgraph ~0.3 ms a paint
            self._shown[style_key] = (xy.copy(), theme)

    def _scatter(self, style_key: str) -> PassiveScatter:
        scatter = self._scatters.get(style_key)
        if scatter is None:
            # squares first, then round handles: the order one scatter of both drew them in
            scatter = self._scatters[style_key] = PassiveScatter()
            scatter.setParentItem(self)
            scatter.setZValue(float(HANDLE_ORDER.index(style_key)) if style_key in HANDLE_ORDER else 0.0)
        return scatter

    def boundingRect(self) -> QtCore.QRectF:
        return self.childrenBoundingRect()

    def paint(self, painter: QtGui.QPainter, option: QtWidgets.QStyleOptionGraphicsItem,
              widget: QtWidgets.QWidget | None = None) -> None:
        pass  # the scatters paint

    def count(self) -> int:
        return sum(len(xy) for xy, _ in self._shown.values())

    def is_on_vertex(self, pos: QtCore.QPointF) -> bool:
        return any(len(scatter.data) and len(scatter.pointsAt(pos)) for scatter in self._scatters.values())

    def mouseDragEvent(self, ev: pg.GraphicsScene.mouseEvents.MouseDragEvent) -> None:
        if ev.button() != QtCore.Qt.MouseButton.LeftButton:
            ev.ignore()
            return
        if ev.isStart():
            if not self._can_drag() or not self.is_on_vertex(ev.buttonDownPos()):
                ev.ignore()
                return
            self._dragging = True
            self._on_drag("press", ev.buttonDownPos(), ev.modifiers())
        if not self._dragging:
            ev.ignore()
            return
        ev.accept()
        self._on_drag("move", ev.pos(), ev.modifiers())
        if ev.isFinish():
            self._dragging = False
            self._on_drag("release", ev.pos(), ev.modifiers())

    def hoverEvent(self, ev: pg.GraphicsScene.mouseEvents.HoverEvent) -> None:
        if not ev.isExit() and self._can_drag() and self.is_on_vertex(ev.pos()):
            self.setCursor(QtCore.Qt.CursorShape.SizeAllCursor)
        else:
            self.unsetCursor()
