"""What the view draws on top of the layers: the line being drawn, the snap cue, the selection
and the movement picked in the junction inspector."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pyqtgraph as pg

from app.model.snapping import Snap
from app.ui import style
from app.ui.items.layer_graphics import PassiveScatter
from app.ui.style import Theme

OVERLAY_Z = 1000.0
ANGLE_RAY_PX = 140.0  # length of the dashed angle-snap ray on screen


class Overlay:
    def __init__(self, view_box: pg.ViewBox, theme: Theme) -> None:
        self._view_box = view_box
        self._theme = theme
        self._shown: dict[int, tuple[np.ndarray, str | None]] = {}  # by item id: what it shows
        self.selection = self._curve(OVERLAY_Z - 2)
        self.movement = self._curve(OVERLAY_Z - 1)
        self.sketch = self._curve(OVERLAY_Z)
        self.sketch_points = self._scatter(OVERLAY_Z + 1)
        self.selection_vertex = self._scatter(OVERLAY_Z + 2)
        self.snap_ray = self._curve(OVERLAY_Z + 3)
        self.snap_mark = self._scatter(OVERLAY_Z + 4)
        self.snap_text = pg.TextItem(anchor=(0.0, 1.0))
        self.snap_text.setZValue(OVERLAY_Z + 5)
        view_box.addItem(self.snap_text, ignoreBounds=True)
        self.last_snap: Snap | None = None
        self.set_theme(theme)

    def _curve(self, z: float) -> pg.PlotCurveItem:
        curve = pg.PlotCurveItem(connect="finite")
        curve.setZValue(z)
        self._view_box.addItem(curve, ignoreBounds=True)
        return curve

    def _scatter(self, z: float) -> PassiveScatter:
        scatter = PassiveScatter(pxMode=True)
        scatter.setZValue(z)
        scatter.setVisible(False)  # until it has marks: an empty scatter still cost ~0.3 ms a paint
        self._view_box.addItem(scatter, ignoreBounds=True)
        return scatter

    def set_theme(self, theme: Theme) -> None:
        self._theme = theme
        self._shown.clear()  # marks take the theme's pens when next set
        for curve, key in ((self.selection, "selection"), (self.movement, "movement"),
                           (self.sketch, "sketch")):
            curve.setPen(style.pen(key, theme))
        self.snap_text.setColor(style.text_colour("snap.angle", theme))

    def _set_curve(self, curve: pg.PlotCurveItem, xy: np.ndarray) -> None:
        xy = np.asarray(xy, dtype=float).reshape(-1, 2)
        if self._unchanged(curve, xy, None):
            return  # the window sets the selection every frame of a drag, mostly the same
        curve.setData(x=xy[:, 0].copy(), y=xy[:, 1].copy(), connect="finite")
        curve.setVisible(len(xy) > 0)

    def _set_marks(self, scatter: PassiveScatter, xy: np.ndarray, style_key: str) -> None:
        xy = np.asarray(xy, dtype=float).reshape(-1, 2)
        if self._unchanged(scatter, xy, style_key):
            return
        spec = style.look(style_key)
        scatter.setData(pos=xy, symbol=spec.symbol, size=spec.size,
                        pen=style.shared_pen(style_key, self._theme),
                        brush=style.shared_brush(style_key, self._theme))
        scatter.setVisible(len(xy) > 0)

    def _unchanged(self, item: pg.GraphicsObject, xy: np.ndarray, style_key: str | None) -> bool:
        """True if ``item`` already shows ``xy`` (in ``style_key``); else remembers them."""
        shown = self._shown.get(id(item))
        if (shown is not None and shown[1] == style_key and shown[0].shape == xy.shape
                and bool(np.array_equal(shown[0], xy, equal_nan=True))):
            return True
        self._shown[id(item)] = (xy.copy(), style_key)
        return False

    def set_sketch(self, points: Sequence[tuple[float, float]]) -> None:
        xy = np.asarray(points, dtype=float).reshape(-1, 2)
        self._set_curve(self.sketch, xy)
        self._set_marks(self.sketch_points, xy, "sketch.point")

    def set_snap(self, snap: Snap | None) -> None:
        """A cue of what the pointer snapped to: a square (vertex), a diamond (point on a line), a
        cross with a dashed ray and the angle (15-degree step); nothing when free."""
        self.last_snap = snap
        kind = snap.kind if snap is not None else "free"
        if snap is None or kind == "free":
            self._set_marks(self.snap_mark, np.empty((0, 2)), "snap.vertex")
            self._set_curve(self.snap_ray, np.empty((0, 2)))
            self.snap_text.setVisible(False)
            return
        self._set_marks(self.snap_mark, np.array([snap.xy]), f"snap.{kind}")
        if kind == "angle" and snap.origin is not None:
            self.snap_ray.setPen(style.pen("snap.angle", self._theme))
            self._set_curve(self.snap_ray, self._ray(snap))
            self.snap_text.setText(f"{snap.angle_deg:+.0f}°")
            self.snap_text.setPos(*snap.xy)
            self.snap_text.setVisible(True)
        else:
            self._set_curve(self.snap_ray, np.empty((0, 2)))
            self.snap_text.setVisible(False)

    def _ray(self, snap: Snap) -> np.ndarray:
        assert snap.origin is not None
        origin, end = np.array(snap.origin), np.array(snap.xy)
        direction = end - origin
        length = float(np.hypot(*direction)) or 1.0
        pixel_m = max(self._view_box.viewPixelSize())
        return np.array([origin, origin + direction / length * max(length, ANGLE_RAY_PX * pixel_m)])

    def set_selection(self, xy: np.ndarray, vertex_xy: tuple[float, float] | None) -> None:
        self._set_curve(self.selection, xy)
        marks = np.array([vertex_xy]) if vertex_xy is not None else np.empty((0, 2))
        self._set_marks(self.selection_vertex, marks, "selection.vertex")

    def set_movement(self, xy: np.ndarray) -> None:
        self._set_curve(self.movement, xy)
