"""The plan view: a locked-aspect pyqtgraph view with a scale-aware grid, pan (middle button, or
Space + drag), wheel zoom to the cursor, zoom to fit, and pointer events for the tools.

Mouse and key events leave here as :class:`app.model.tools.PointerEvent` records in plan metres
through the ``pointer`` signal; the canvas itself never edits anything.

Labels keep their size on the screen, so zoomed out they would run into each other: after every
change of the labels or of the scale, one pass over the labels of all shown layers moves a label
that would overlap one placed before it to another side of its point, or hides it
(:mod:`app.ui.items.label_layout`).
"""

from __future__ import annotations

import math

import pyqtgraph as pg
from PySide6 import QtCore, QtGui, QtWidgets

from app.model.scene import LAYER_ORDER, Scene
from app.model.tools import PointerEvent
from app.ui.items.label_layout import LABEL_ANCHORS, anchored_rect, place_labels
from app.ui.items.layer_graphics import LayerGraphics
from app.ui.items.overlay import Overlay
from app.ui.items.vertex_handles import VertexHandles
from app.ui.style import LIGHT, Theme
from geometry.units import METRES_PER_FOOT, LengthUnit

PICK_RADIUS_PX = 8.0
EMPTY_VIEW_HALF_SIZE_M = 500.0
HANDLE_STYLES = frozenset({"vertex", "vertex.rounded"})
KEY_NAMES = {QtCore.Qt.Key.Key_Return: "Enter", QtCore.Qt.Key.Key_Enter: "Enter",
             QtCore.Qt.Key.Key_Escape: "Escape", QtCore.Qt.Key.Key_Backspace: "Backspace"}
BUTTON_NAMES = {QtCore.Qt.MouseButton.LeftButton: "left", QtCore.Qt.MouseButton.RightButton: "right",
                QtCore.Qt.MouseButton.MiddleButton: "middle"}
# Which labels win where they would overlap: runway designations, then taxiway names, then object
# names (common practice, no source: the names a reader finds their way by come first).
_FIRST_LABELS = ("runways", "centerlines", "objects")
LABEL_PRIORITY = (*_FIRST_LABELS, *(name for name in LAYER_ORDER if name not in _FIRST_LABELS))
LABEL_GAP_PX = 1.0  # labels closer than this count as overlapping (rounding of the text boxes)


class PlanViewBox(pg.ViewBox):
    """Left button: tools. Middle button, or left with Space held: pan. Wheel: zoom at cursor."""

    def __init__(self) -> None:
        super().__init__(lockAspect=True, enableMenu=False, invertY=False)
        self.setMouseMode(pg.ViewBox.PanMode)
        self.canvas: PlanCanvas | None = None
        self._tool_drag = False

    def _send(self, kind: str, pos: QtCore.QPointF, button: str,
              modifiers: QtCore.Qt.KeyboardModifier) -> None:
        if self.canvas is not None:
            self.canvas.send_pointer(kind, self.mapToView(pos), button, modifiers)

    def mouseClickEvent(self, ev: pg.GraphicsScene.mouseEvents.MouseClickEvent) -> None:
        button = BUTTON_NAMES.get(ev.button())
        if button is None or button == "middle":
            ev.ignore()
            return
        ev.accept()
        if ev.double():
            self._send("double", ev.pos(), button, ev.modifiers())
        else:
            self._send("press", ev.pos(), button, ev.modifiers())
            self._send("release", ev.pos(), button, ev.modifiers())

    def mouseDragEvent(self, ev: pg.GraphicsScene.mouseEvents.MouseDragEvent,
                       axis: int | None = None) -> None:
        panning = ev.button() == QtCore.Qt.MouseButton.MiddleButton or (
            ev.button() == QtCore.Qt.MouseButton.LeftButton and self.canvas is not None
            and self.canvas.space_held and not self._tool_drag)
        if panning:
            super().mouseDragEvent(ev, axis)
            return
        ev.accept()
        if ev.button() != QtCore.Qt.MouseButton.LeftButton:
            return
        if ev.isStart():
            self._tool_drag = True
            self._send("press", ev.buttonDownPos(), "left", ev.modifiers())
        if self._tool_drag:
            self._send("move", ev.pos(), "left", ev.modifiers())
        if ev.isFinish() and self._tool_drag:
            self._tool_drag = False
            self._send("release", ev.pos(), "left", ev.modifiers())

    def hoverEvent(self, ev: pg.GraphicsScene.mouseEvents.HoverEvent) -> None:
        if ev.isExit() or self._tool_drag or ev.buttons() != QtCore.Qt.MouseButton.NoButton:
            return
        self._send("move", ev.pos(), "none", ev.modifiers())


LEFT_AXIS_WIDTH_PX = 84  # room for "10,000,000" and the axis title


class PlainNumberAxis(pg.AxisItem):
    """Tick labels as plain numbers with thousands separators: survey coordinates (millions of
    feet) read as 2,108,000, never as 2.108e+06."""

    def tickStrings(self, values: list[float], scale: float, spacing: float) -> list[str]:
        decimals = max(0, -math.floor(math.log10(spacing * scale))) if spacing * scale > 0 else 0
        return [f"{value * scale:,.{min(decimals, 6)}f}" for value in values]


class PlanCanvas(pg.PlotWidget):
    pointer = QtCore.Signal(object)            # PointerEvent
    cursor_moved = QtCore.Signal(float, float)  # plan metres

    def __init__(self, parent: QtWidgets.QWidget | None = None, theme: Theme = LIGHT) -> None:
        view_box = PlanViewBox()
        super().__init__(parent, viewBox=view_box,
                         axisItems={side: PlainNumberAxis(side) for side in ("bottom", "left")})
        view_box.canvas = self
        self.view_box = view_box
        self.theme = theme
        self.space_held = False
        self.drag_enabled = True  # whether a drag on a vertex goes to the tool (select/move tools)
        self.setFocusPolicy(QtCore.Qt.FocusPolicy.StrongFocus)
        # One rectangle around what changed is repainted, not pyqtgraph's region of many small ones:
        # clipped to a complex region Qt's raster engine strokes every path about twice as slowly
        # (a drag frame's repaint: ~35 ms CPU with the region, ~15 ms with its bounding rectangle).
        self.setViewportUpdateMode(QtWidgets.QGraphicsView.ViewportUpdateMode.BoundingRectViewportUpdate)
        self.plotItem.hideButtons()
        for axis in ("bottom", "left"):
            self.plotItem.getAxis(axis).enableAutoSIPrefix(False)
            # The grid and ticks change only with the view range: painted from a pixmap otherwise
            # (replaying their picture took longer than drawing the whole plan).
            self.plotItem.getAxis(axis).setCacheMode(
                QtWidgets.QGraphicsItem.CacheMode.DeviceCoordinateCache)
        # A fixed width: labels of changing length must not shift the plan under the cursor.
        self.plotItem.getAxis("left").setWidth(LEFT_AXIS_WIDTH_PX)
        self.layers = {name: LayerGraphics(view_box, name, 10.0 * index, theme,
                                           HANDLE_STYLES if name == "centerlines" else frozenset())
                       for index, name in enumerate(LAYER_ORDER)}
        self.handles = VertexHandles(self._handle_drag, lambda: self.drag_enabled and not self.space_held)
        self.handles.setZValue(10.0 * LAYER_ORDER.index("centerlines") + 5.0)
        view_box.addItem(self.handles, ignoreBounds=True)
        self.overlay = Overlay(view_box, theme)
        self._shown: Scene | None = None
        self._label_inputs: tuple[object, ...] | None = None  # of the last label pass
        view_box.sigRangeChanged.connect(self._arrange_labels)
        view_box.sigResized.connect(self._arrange_labels)
        self.scene().sigMouseMoved.connect(self._report_cursor)
        self.set_units("ft")
        self.set_theme(theme)
        self.zoom_to_fit(None)

    # --- events ----------------------------------------------------------------------------------

    def send_pointer(self, kind: str, view_pos: QtCore.QPointF, button: str,
                     modifiers: QtCore.Qt.KeyboardModifier) -> None:
        self.pointer.emit(PointerEvent(
            kind, float(view_pos.x()), float(view_pos.y()), button,  # type: ignore[arg-type]
            shift=bool(modifiers & QtCore.Qt.KeyboardModifier.ShiftModifier),
            alt=bool(modifiers & QtCore.Qt.KeyboardModifier.AltModifier)))

    def _handle_drag(self, kind: str, pos: QtCore.QPointF, modifiers: QtCore.Qt.KeyboardModifier) -> None:
        self.send_pointer(kind, pos, "left", modifiers)

    def keyPressEvent(self, ev: QtGui.QKeyEvent) -> None:
        if ev.key() == QtCore.Qt.Key.Key_Space and not ev.isAutoRepeat():
            self.space_held = True
            self.viewport().setCursor(QtCore.Qt.CursorShape.OpenHandCursor)
            return
        name = KEY_NAMES.get(QtCore.Qt.Key(ev.key()))
        if name is not None:
            self.pointer.emit(PointerEvent("key", key=name))
            return
        super().keyPressEvent(ev)

    def keyReleaseEvent(self, ev: QtGui.QKeyEvent) -> None:
        if ev.key() == QtCore.Qt.Key.Key_Space and not ev.isAutoRepeat():
            self.space_held = False
            self.viewport().unsetCursor()
            return
        super().keyReleaseEvent(ev)

    def mousePressEvent(self, ev: QtGui.QMouseEvent) -> None:
        self.setFocus(QtCore.Qt.FocusReason.MouseFocusReason)
        super().mousePressEvent(ev)

    def _report_cursor(self, scene_pos: QtCore.QPointF) -> None:
        point = self.view_box.mapSceneToView(scene_pos)
        self.cursor_moved.emit(float(point.x()), float(point.y()))

    # --- content ---------------------------------------------------------------------------------

    def show_scene(self, scene: Scene, draft: bool = False) -> list[str]:
        """Redraw the layers that differ from those shown; returns their names. ``draft`` while a
        drag previews: a few costly styles take a quicker look (style.DRAFT_STYLES)."""
        redrawn = []
        for name in LAYER_ORDER:
            self.layers[name].set_draft(draft)
            layer = scene.layers[name]
            if self._shown is None or self._shown.layers[name] is not layer:
                self.layers[name].set_data(layer)
                redrawn.append(name)
        if "centerlines" in redrawn:
            centerlines = scene.layers["centerlines"]
            self.handles.set_points([p for p in centerlines.points if p.style in HANDLE_STYLES], self.theme)
        self._shown = scene
        self._arrange_labels()
        return redrawn

    def set_layer_visible(self, name: str, visible: bool) -> None:
        self.layers[name].set_visible(visible)
        if name == "centerlines":
            self.handles.setVisible(visible)
        self._arrange_labels()

    def _arrange_labels(self, *_signal_args: object) -> None:
        """The label pass over every shown layer; nothing when neither the labels nor the scale
        changed since the last one (a pan, or a drag frame that moved no label)."""
        (xmin, xmax), (ymin, ymax) = self.view_box.viewRange()
        size = self.view_box.rect()
        if not (size.width() > 0 and size.height() > 0 and xmax > xmin and ymax > ymin):
            return
        px_per_m = (size.width() / (xmax - xmin), size.height() / (ymax - ymin))
        layers = [self.layers[name] for name in LABEL_PRIORITY]
        # the scale to 9 digits: a pan changes the span by a rounding error, not the labels' places
        scale_key = tuple(float(f"{scale:.9g}") for scale in px_per_m)
        inputs = (scale_key, tuple(layer.label_revision for layer in layers))
        if inputs == self._label_inputs:
            return
        self._label_inputs = inputs
        boxes = [layer.label_boxes() for layer in layers]
        # screen pixels up to a shift: y down, and a pan moves every label alike
        candidates = [[anchored_rect(x_m * px_per_m[0], -y_m * px_per_m[1], width, height, anchor)
                       .grown(LABEL_GAP_PX / 2.0) for anchor in LABEL_ANCHORS]
                      for layer_boxes in boxes for x_m, y_m, width, height in layer_boxes]
        placed = iter(place_labels(candidates))
        for layer, layer_boxes in zip(layers, boxes, strict=True):
            choices = [next(placed) for _ in layer_boxes]
            layer.place_labels([None if choice is None else LABEL_ANCHORS[choice] for choice in choices])

    def set_theme(self, theme: Theme) -> None:
        self.theme = theme
        self.setBackground(theme.background)
        for axis in ("bottom", "left"):
            item = self.plotItem.getAxis(axis)
            item.setPen(pg.mkPen(theme.foreground))
            item.setTextPen(pg.mkPen(theme.foreground))
        self.plotItem.showGrid(x=True, y=True, alpha=theme.grid_alpha)
        for layer in self.layers.values():
            layer.set_theme(theme)
        if self._shown is not None:
            centerlines = self._shown.layers["centerlines"]
            self.handles.set_points([p for p in centerlines.points if p.style in HANDLE_STYLES], theme)
        self.overlay.set_theme(theme)

    def set_units(self, units: LengthUnit) -> None:
        """Axis labels and tick values in the display units; the view stays in metres."""
        scale = 1.0 / METRES_PER_FOOT if units == "ft" else 1.0
        for axis, label in (("bottom", "East"), ("left", "North")):
            item = self.plotItem.getAxis(axis)
            item.setScale(scale)
            item.setLabel(f"{label} ({units})")

    # --- view range ------------------------------------------------------------------------------

    def pick_radius_m(self) -> float:
        size = self.view_box.viewPixelSize()
        return PICK_RADIUS_PX * max(abs(size[0]), abs(size[1]))

    def zoom_to_fit(self, bounds: tuple[float, float, float, float] | None) -> None:
        if bounds is None:
            half = EMPTY_VIEW_HALF_SIZE_M
            bounds = (-half, -half, half, half)
        xmin, ymin, xmax, ymax = bounds
        margin = max(xmax - xmin, ymax - ymin, 50.0) * 0.08
        self.view_box.setRange(QtCore.QRectF(xmin - margin, ymin - margin, xmax - xmin + 2 * margin,
                                             ymax - ymin + 2 * margin), padding=0.0)

    def zoom_to(self, x_m: float, y_m: float, span_m: float) -> None:
        self.view_box.setRange(QtCore.QRectF(x_m - span_m / 2, y_m - span_m / 2, span_m, span_m),
                               padding=0.0)

    def visible_rect_m(self) -> QtCore.QRectF:
        (xmin, xmax), (ymin, ymax) = self.view_box.viewRange()
        return QtCore.QRectF(xmin, ymin, xmax - xmin, ymax - ymin)
