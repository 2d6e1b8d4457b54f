"""Every centerline vertex as ONE graph item (shared/ECOSYSTEM.md: one item per vertex does not
scale). Like pyqtgraph's TargetItem habit, the item paints and forwards: a left drag that starts
on a vertex is passed on as press, moves and release in plan metres; the tool decides what moves
and the document changes; the item never edits its own data.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import pyqtgraph as pg
from PySide6 import QtCore

from app.model.scene import PointSet
from app.ui import style
from app.ui.items.layer_graphics import PassiveScatter
from app.ui.style import Theme

DragSink = Callable[[str, QtCore.QPointF, QtCore.Qt.KeyboardModifier], None]


class VertexHandles(pg.GraphItem):
    def __init__(self, on_drag: DragSink, can_drag: Callable[[], bool]) -> None:
        super().__init__()
        # GraphItem's own scatter would swallow clicks on vertices (drawing tools snap to them).
        self.scatter.setParentItem(None)
        self.scatter = PassiveScatter()
        self.scatter.setParentItem(self)
        self._on_drag = on_drag
        self._can_drag = can_drag
        self._dragging = False

    def set_points(self, point_sets: list[PointSet], theme: Theme) -> None:
        """Show the ``vertex`` and ``vertex.rounded`` point sets (square and round handles)."""
        shown = [points for points in point_sets if len(points.xy)]
        if not shown:
            self.setData(pos=np.empty((0, 2)), adj=None)
            return
        self.setData(
            pos=np.concatenate([points.xy for points in shown]), adj=None, pen=None, pxMode=True,
            symbol=[style.look(p.style).symbol for p in shown for _ in range(len(p.xy))],
            size=[style.look(p.style).size for p in shown for _ in range(len(p.xy))],
            symbolPen=[style.shared_pen(p.style, theme) for p in shown for _ in range(len(p.xy))],
            symbolBrush=[style.shared_brush(p.style, theme) for p in shown for _ in range(len(p.xy))])

    def count(self) -> int:
        return 0 if self.pos is None else len(self.pos)

    def is_on_vertex(self, pos: QtCore.QPointF) -> bool:
        return self.count() > 0 and len(self.scatter.pointsAt(pos)) > 0

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
