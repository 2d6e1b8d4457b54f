"""One scene layer on the plan view: ONE curve item per style (NaN-separated pieces), one scatter
per point style, a few text labels. Filled styles use ``fillLevel="enclosed"`` without
antialiasing (shared/ECOSYSTEM.md: about 7 times faster, and edges are drawn by a stroke style).
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg

from app.model.scene import LayerData, PointSet, Shape
from app.ui import style
from app.ui.style import Theme


class PassiveScatter(pg.ScatterPlotItem):
    """Symbols that never take a click, so clicks on them reach the tools."""

    def mouseClickEvent(self, ev: object) -> None:
        ev.ignore()  # type: ignore[attr-defined]


def _xy_columns(xy: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    return (np.ascontiguousarray(xy[:, 0]), np.ascontiguousarray(xy[:, 1])) if len(xy) else (
        np.empty(0), np.empty(0))


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
        self._curves: dict[tuple[str, bool], pg.PlotCurveItem] = {}
        self._scatters: dict[str, PassiveScatter] = {}
        self._labels: list[pg.TextItem] = []
        self._label_count = 0
        self._visible = True
        self._data: LayerData | None = None

    @property
    def data(self) -> LayerData | None:
        return self._data

    def graphics_items(self) -> list[pg.GraphicsObject]:
        return [*self._curves.values(), *self._scatters.values(), *self._labels]

    def set_visible(self, visible: bool) -> None:
        self._visible = visible
        for item in self.graphics_items():
            item.setVisible(visible and self._has_content(item))

    def is_visible(self) -> bool:
        return self._visible

    def set_theme(self, theme: Theme) -> None:
        self._theme = theme
        if self._data is not None:
            for key, curve in self._curves.items():
                self._style_curve(curve, *key)
            self._show_points(self._data.points)

    def set_data(self, layer: LayerData) -> None:
        self._data = layer
        self.revision += 1
        for shape in layer.shapes:
            self._show_shape(shape)
        drawn = {(shape.style, shape.filled) for shape in layer.shapes}
        for key, curve in self._curves.items():
            if key not in drawn:
                curve.setData(x=np.empty(0), y=np.empty(0))
                curve.setVisible(False)
        self._show_points(layer.points)

    def _show_shape(self, shape: Shape) -> None:
        key = (shape.style, shape.filled)
        curve = self._curves.get(key)
        if curve is None:
            curve = pg.PlotCurveItem(connect="finite", skipFiniteCheck=False)
            curve.setZValue(self._z + (0.0 if shape.filled else 1.0))
            self._style_curve(curve, *key)
            self._view_box.addItem(curve, ignoreBounds=True)
            self._curves[key] = curve
        x, y = _xy_columns(shape.xy)
        curve.setData(x=x, y=y, connect="finite")
        curve.setVisible(self._visible and len(x) > 0)

    def _style_curve(self, curve: pg.PlotCurveItem, style_key: str, filled: bool) -> None:
        if filled:
            curve.setPen(None)
            curve.setBrush(style.brush(style_key, self._theme))
            curve.setFillLevel("enclosed")
            curve.opts["antialias"] = False
        else:
            curve.setPen(style.pen(style_key, self._theme))
            curve.setBrush(None)
            curve.setFillLevel(None)
            curve.opts["antialias"] = True
        curve.update()

    def _show_points(self, point_sets: tuple[PointSet, ...]) -> None:
        label_index = 0
        for points in point_sets:
            if points.style in self._routed:
                continue
            if points.labels and points.style.endswith(".label"):
                label_index = self._show_labels(points, label_index)
                continue
            self._scatter(points.style).setData(
                pos=points.xy, symbol=style.look(points.style).symbol, size=style.look(points.style).size,
                pen=style.pen(points.style, self._theme), brush=style.brush(points.style, self._theme),
                pxMode=True)
            self._scatters[points.style].setVisible(self._visible and len(points.xy) > 0)
        for extra in self._labels[label_index:]:
            extra.setVisible(False)
        self._label_count = label_index

    def _scatter(self, style_key: str) -> PassiveScatter:
        scatter = self._scatters.get(style_key)
        if scatter is None:
            scatter = PassiveScatter()
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
                label.setZValue(self._z + 3.0)
                self._view_box.addItem(label, ignoreBounds=True)
                self._labels.append(label)
            label = self._labels[index]
            label.setText(text, color=colour)
            label.setPos(float(xy[0]), float(xy[1]))
            label.setVisible(self._visible)
        return start + len(points.labels)

    def _has_content(self, item: pg.GraphicsObject) -> bool:
        if isinstance(item, pg.PlotCurveItem):
            return item.xData is not None and len(item.xData) > 0
        if isinstance(item, pg.ScatterPlotItem):
            return len(item.data) > 0
        return item in self._labels[:self._label_count]
