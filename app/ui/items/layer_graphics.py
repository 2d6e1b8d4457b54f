"""One scene layer on the plan view: ONE path item per style (NaN-separated pieces, see
:mod:`app.ui.items.shape_item`), one scatter per point style, a few text labels. Filled styles
are filled without antialiasing (shared/ECOSYSTEM.md: about 7 times faster, and edges are drawn
by a stroke style). A point set or label equal to the one shown is left alone: a drag changes
one vertex and the junction markers near it, not the labels or the findings. Which labels show,
and on which side of their point, the canvas decides over all layers (:meth:`place_labels`);
``label_revision`` tells it when the labels of a layer changed.
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg
from PySide6 import QtCore, QtWidgets

from app.model.scene import LayerData, PointSet, Shape
from app.ui import style
from app.ui.items.label_layout import ABOVE_RIGHT, Anchor
from app.ui.items.shape_item import ShapeItem
from app.ui.style import Theme

# Labels sit above every layer's lines and fills (a runway's name is not hidden under a taxiway's
# pavement), in layer order among themselves, and below the editing overlay (overlay.OVERLAY_Z).
LABEL_Z = 500.0


class PassiveScatter(pg.ScatterPlotItem):
    """Symbols that never take a click, so clicks on them reach the tools."""

    _bounds_memo: tuple[tuple[object, ...], QtCore.QRectF] | None = None

    def mouseClickEvent(self, ev: object) -> None:
        ev.ignore()  # type: ignore[attr-defined]

    def boundingRect(self) -> QtCore.QRectF:
        """pyqtgraph's bounds, kept while its data-bounds cache (a new list whenever the points, the
        symbol sizes or the view change), the largest symbol and the transforms stay: pyqtgraph works
        them out in Python (~70 us) and Qt asks each scatter several times a repaint."""
        scene = self.scene()
        views = scene.views() if scene is not None else []
        if not views:
            return super().boundingRect()
        key = (self.bounds, self._maxSpotPxWidth, self.sceneTransform(), views[0].viewportTransform())
        memo = self._bounds_memo
        if memo is not None and memo[0][0] is key[0] and memo[0][1:] == key[1:]:
            return QtCore.QRectF(memo[1])
        rect = super().boundingRect()
        self._bounds_memo = (key, QtCore.QRectF(rect))
        return rect


# Symbols and labels are painted from a pixmap while they do not change: repainting them took
# pyqtgraph about a millisecond a scatter (culling and placing every symbol in Python).
_PIXMAP_CACHE = QtWidgets.QGraphicsItem.CacheMode.DeviceCoordinateCache


def _show(item: pg.GraphicsObject, visible: bool) -> None:
    """``setVisible`` only on a change: pyqtgraph runs Python callbacks on every call (about
    0.05 ms an item, every item of a layer every frame of a drag)."""
    if item.isVisible() != visible:
        item.setVisible(visible)


def _same_points(a: PointSet | None, b: PointSet) -> bool:
    return a is b or (a is not None and a.labels == b.labels and a.keys == b.keys
                      and a.xy.shape == b.xy.shape and bool(np.array_equal(a.xy, b.xy)))


class LayerGraphics:
    """The graphics of one layer inside ``view_box``; ``revision`` counts redraws (for tests and
    for knowing that an unchanged layer was left alone)."""

    def __init__(self, view_box: pg.ViewBox, name: str, z_value: float, theme: Theme,
                 routed_points: frozenset[str] = frozenset()) -> None:
        self.name = name
        self.revision = 0
        self._view_box = view_box
        self._z = z_value
        self._theme = theme
        self._routed = routed_points  # point styles another item draws (vertex handles)
        self._curves: dict[tuple[str, bool], ShapeItem] = {}
        self._scatters: dict[str, PassiveScatter] = {}
        self._shown_points: dict[str, PointSet] = {}  # what each scatter or label run shows
        self._labels: list[pg.TextItem] = []
        self._label_texts: list[tuple[str, float, float]] = []
        self._label_count = 0
        self._label_anchors: list[Anchor | None] = []  # None: hidden, it would run into another label
        self.label_revision = 0  # counts changes of the labels' texts, points, number or visibility
        self._visible = True
        self._draft = False  # a drag previews: see style.DRAFT_STYLES
        self._data: LayerData | None = None

    @property
    def data(self) -> LayerData | None:
        return self._data

    def graphics_items(self) -> list[pg.GraphicsObject]:
        return [*self._curves.values(), *self._scatters.values(), *self._labels]

    def set_visible(self, visible: bool) -> None:
        if visible != self._visible:
            self.label_revision += 1
        self._visible = visible
        for item in self.graphics_items():
            item.setVisible(visible and self._has_content(item))

    def is_visible(self) -> bool:
        return self._visible

    def set_draft(self, draft: bool) -> None:
        """Draw the styles of ``style.DRAFT_STYLES`` in their quick look (while a drag previews)."""
        if draft == self._draft:
            return
        self._draft = draft
        for key, curve in self._curves.items():
            if key[0] in style.DRAFT_STYLES:
                self._style_curve(curve, *key)

    def set_theme(self, theme: Theme) -> None:
        self._theme = theme
        if self._data is not None:
            for key, curve in self._curves.items():
                self._style_curve(curve, *key)
            self._shown_points.clear()
            self._label_texts = [("", math.nan, math.nan)] * len(self._labels)
            self._show_points(self._data.points)

    def set_data(self, layer: LayerData) -> None:
        self._data = layer
        self.revision += 1
        for shape in layer.shapes:
            self._show_shape(shape)
        drawn = {(shape.style, shape.filled) for shape in layer.shapes}
        for key, curve in self._curves.items():
            if key not in drawn:
                curve.set_parts(())
                curve.setVisible(False)
        self._show_points(layer.points)

    def _show_shape(self, shape: Shape) -> None:
        key = (shape.style, shape.filled)
        curve = self._curves.get(key)
        if curve is None:
            curve = ShapeItem(shape.filled)
            curve.setZValue(self._z + (0.0 if shape.filled else 1.0))
            self._style_curve(curve, *key)
            self._view_box.addItem(curve, ignoreBounds=True)
            self._curves[key] = curve
        parts = shape.drawn_parts
        if len(parts) != len(curve.parts) or any(a is not b for a, b in zip(parts, curve.parts, strict=True)):
            curve.set_parts(parts)
        _show(curve, self._visible and curve.has_content())

    def _style_curve(self, curve: ShapeItem, style_key: str, filled: bool) -> None:
        if filled:
            curve.set_look(None, style.brush(style_key, self._theme))
        elif self._draft and style_key in style.DRAFT_STYLES:
            curve.set_look(style.draft_pen(style_key, self._theme), None)
        else:
            curve.set_look(style.pen(style_key, self._theme), None)

    def _show_points(self, point_sets: tuple[PointSet, ...]) -> None:
        label_index = 0
        for points in point_sets:
            if points.style in self._routed:
                continue
            if points.labels and points.style.endswith(".label"):
                label_index = self._show_labels(points, label_index)
                continue
            if _same_points(self._shown_points.get(points.style), points):
                continue
            self._shown_points[points.style] = points
            self._scatter(points.style).setData(
                pos=points.xy, symbol=style.look(points.style).symbol, size=style.look(points.style).size,
                pen=style.shared_pen(points.style, self._theme),
                brush=style.shared_brush(points.style, self._theme),
                pxMode=True)
            _show(self._scatters[points.style], self._visible and len(points.xy) > 0)
        for extra in self._labels[label_index:]:
            _show(extra, False)
        if label_index != self._label_count:
            self.label_revision += 1
        self._label_count = label_index

    def _scatter(self, style_key: str) -> PassiveScatter:
        scatter = self._scatters.get(style_key)
        if scatter is None:
            scatter = PassiveScatter()
            scatter.setCacheMode(_PIXMAP_CACHE)
            scatter.setZValue(self._z + 2.0)
            self._view_box.addItem(scatter, ignoreBounds=True)
            self._scatters[style_key] = scatter
        return scatter

    def _show_labels(self, points: PointSet, start: int) -> int:
        colour = style.text_colour(points.style, self._theme)
        for offset, (xy, text) in enumerate(zip(points.xy, points.labels, strict=True)):
            index = start + offset
            if index == len(self._labels):
                label = pg.TextItem(anchor=(0.0, 1.0))
                label.setCacheMode(_PIXMAP_CACHE)
                label.setZValue(LABEL_Z + self._z / 100.0)  # above every layer's lines and fills
                self._view_box.addItem(label, ignoreBounds=True)
                self._labels.append(label)
                self._label_texts.append(("", math.nan, math.nan))
                self._label_anchors.append(ABOVE_RIGHT)
            label = self._labels[index]
            shown = (text, float(xy[0]), float(xy[1]))
            before = self._label_texts[index]
            if before[0] != text:
                label.setText(text, color=colour)  # lays the text out again: only when it changed
            if before[1:] != shown[1:]:
                label.setPos(shown[1], shown[2])
            if before != shown:
                self.label_revision += 1
            self._label_texts[index] = shown
            _show(label, self._visible and self._label_anchors[index] is not None)
        return start + len(points.labels)

    def label_boxes(self) -> list[tuple[float, float, float, float]]:
        """(x_m, y_m, width_px, height_px) of each label this layer shows when nothing hides it: its
        point in plan metres and the size of its text box on the screen; none while the layer is hidden."""
        if not self._visible:
            return []
        boxes = []
        for label, (_, x_m, y_m) in zip(self._labels[:self._label_count], self._label_texts, strict=False):
            size = label.textItem.boundingRect()
            boxes.append((x_m, y_m, float(size.width()), float(size.height())))
        return boxes

    def place_labels(self, anchors: list[Anchor | None]) -> None:
        """Show the labels of :meth:`label_boxes` at these anchors (see label_layout), or hide those
        given None."""
        for index, (label, anchor) in enumerate(zip(self._labels, anchors, strict=False)):
            if anchor is not None and anchor != self._label_anchors[index]:
                label.setAnchor(anchor)
            self._label_anchors[index] = anchor
            _show(label, self._visible and anchor is not None)

    def _has_content(self, item: pg.GraphicsObject) -> bool:
        if isinstance(item, ShapeItem):
            return item.has_content()
        if isinstance(item, pg.ScatterPlotItem):
            return len(item.data) > 0
        in_use = self._labels[:self._label_count]
        return item in in_use and self._label_anchors[in_use.index(item)] is not None
