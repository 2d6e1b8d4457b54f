"""The Underlays panel: the base drawings and images under the layout, top of the list drawn on
top. Show, hide, lock, reorder, remove, opacity, which DXF layers to show, and turning closed
outlines of a base drawing into existing pavement. The panel only shows and asks: every change
goes out as a signal that :mod:`app.ui.underlay_controller` turns into an undoable edit.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from PySide6 import QtCore, QtWidgets

from app.model.underlays import BaseDrawing, Underlay
from app.ui.underlay_items import Content, ImagePixels

ID_ROLE = QtCore.Qt.ItemDataRole.UserRole
OPACITY_STEPS = 100


def status_text(status: Content | str | None) -> str:
    """A few words on the state of an underlay's file, for its row in the list."""
    if status is None:
        return "reading…"
    if isinstance(status, str):
        return "MISSING" if status.startswith("missing") else "cannot be read"
    return ""


def describe(underlay: Underlay, status: Content | str | None) -> str:
    """What the panel says about the current underlay: units, damage, size; or the problem."""
    if status is None:
        return f"Reading {underlay.path} …"
    if isinstance(status, str):
        return status
    if isinstance(status, BaseDrawing):
        notes = [status.units_note, status.partial_note or "",
                 f"{status.entity_count:,} entities drawn on {len(status.layers)} layers; "
                 f"{status.skipped_count:,} of other kinds not drawn."]
        return "\n".join(note for note in notes if note)
    assert isinstance(status, ImagePixels) and underlay.placement is not None
    a, d, b, e, _c, _f = underlay.placement.terms()
    return (f"{status.width_px:,} x {status.height_px:,} pixels; a pixel is "
            f"{math.hypot(a, d):.3g} m x {math.hypot(b, e):.3g} m on the plan.")


class UnderlayPanel(QtWidgets.QDockWidget):
    import_drawing_requested = QtCore.Signal()
    import_image_requested = QtCore.Signal()
    visibility_toggled = QtCore.Signal(str, bool)
    locked_toggled = QtCore.Signal(str, bool)
    opacity_previewed = QtCore.Signal(str, float)  # while the slider moves
    opacity_chosen = QtCore.Signal(str, float)     # when it is let go (one undoable change)
    move_requested = QtCore.Signal(str, int)       # +1: one place up (drawn higher), -1: down
    remove_requested = QtCore.Signal(str)
    locate_requested = QtCore.Signal(str)
    layer_toggled = QtCore.Signal(str, str, bool)  # underlay id, DXF layer, shown
    pick_toggled = QtCore.Signal(bool)
    pavement_from_picked_requested = QtCore.Signal()
    pavement_from_layer_requested = QtCore.Signal(str, str)  # underlay id, DXF layer

    def __init__(self, parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__("Underlays", parent)
        self.setObjectName("underlays")
        self._underlays: dict[str, Underlay] = {}
        self._statuses: Mapping[str, Content | str | None] = {}
        body = QtWidgets.QWidget()
        column = QtWidgets.QVBoxLayout(body)
        column.addLayout(self._buttons(("Import drawing…", self.import_drawing_requested.emit),
                                       ("Import image…", self.import_image_requested.emit)))
        self.list = QtWidgets.QListWidget()
        self.list.currentItemChanged.connect(lambda *_: self._show_current())
        self.list.itemChanged.connect(self._item_changed)
        column.addWidget(self.list, 2)
        self.up, self.down, self.remove, self.locate = (QtWidgets.QPushButton(text) for text in
                                                        ("Up", "Down", "Remove", "Locate file…"))
        self.up.clicked.connect(lambda: self._emit_current(self.move_requested, 1))
        self.down.clicked.connect(lambda: self._emit_current(self.move_requested, -1))
        self.remove.clicked.connect(lambda: self._emit_current(self.remove_requested))
        self.locate.clicked.connect(lambda: self._emit_current(self.locate_requested))
        row = QtWidgets.QHBoxLayout()
        for button in (self.up, self.down, self.remove, self.locate):
            row.addWidget(button)
        column.addLayout(row)
        column.addLayout(self._properties())
        self.info = QtWidgets.QLabel()
        self.info.setWordWrap(True)
        self.info.setTextInteractionFlags(QtCore.Qt.TextInteractionFlag.TextSelectableByMouse)
        column.addWidget(self.info)
        self.layers = QtWidgets.QListWidget()
        self.layers.itemChanged.connect(self._layer_changed)
        column.addWidget(self.layers, 3)
        column.addLayout(self._pavement_row())
        scroll = QtWidgets.QScrollArea()  # the dock may be short when it shares its column
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QtWidgets.QFrame.Shape.NoFrame)
        scroll.setWidget(body)
        self.setWidget(scroll)
        self._show_current()

    # --- building ----------------------------------------------------------------------------------

    @staticmethod
    def _buttons(*specs: tuple[str, object]) -> QtWidgets.QHBoxLayout:
        row = QtWidgets.QHBoxLayout()
        for text, slot in specs:
            button = QtWidgets.QPushButton(text)
            button.clicked.connect(slot)
            row.addWidget(button)
        return row

    def _properties(self) -> QtWidgets.QFormLayout:
        form = QtWidgets.QFormLayout()
        self.locked = QtWidgets.QCheckBox("Locked (placement and removal protected)")
        self.locked.toggled.connect(lambda on: self._emit_current(self.locked_toggled, on))
        self.opacity = QtWidgets.QSlider(QtCore.Qt.Orientation.Horizontal)
        self.opacity.setRange(0, OPACITY_STEPS)
        self.opacity.valueChanged.connect(self._opacity_moved)
        self.opacity.sliderReleased.connect(self._opacity_released)
        form.addRow(self.locked)
        form.addRow("Opacity", self.opacity)
        return form

    def _pavement_row(self) -> QtWidgets.QHBoxLayout:
        self.pick = QtWidgets.QPushButton("Pick outlines")
        self.pick.setCheckable(True)
        self.pick.setToolTip("Click inside closed outlines of the base drawing to pick them (Esc ends)")
        self.pick.toggled.connect(self.pick_toggled.emit)
        self.make_pavement = QtWidgets.QPushButton("Make pavement")
        self.make_pavement.setToolTip("The picked outlines become existing pavement of the layout")
        self.make_pavement.clicked.connect(self.pavement_from_picked_requested.emit)
        self.layer_pavement = QtWidgets.QPushButton("Layer to pavement")
        self.layer_pavement.setToolTip("Every closed outline of the selected layer becomes existing pavement")
        self.layer_pavement.clicked.connect(self._layer_to_pavement)
        row = QtWidgets.QHBoxLayout()
        for button in (self.pick, self.make_pavement, self.layer_pavement):
            row.addWidget(button)
        self.set_picked_count(0)
        return row

    # --- showing -----------------------------------------------------------------------------------

    def current_id(self) -> str | None:
        item = self.list.currentItem()
        return None if item is None else str(item.data(ID_ROLE))

    def show_underlays(self, underlays: tuple[Underlay, ...],
                       statuses: Mapping[str, Content | str | None]) -> None:
        """List ``underlays`` (the top one first) with the state of their files."""
        current = self.current_id()
        self._underlays = {u.id: u for u in underlays}
        self._statuses = statuses
        blocker = QtCore.QSignalBlocker(self.list)
        self.list.clear()
        for underlay in reversed(underlays):
            note = status_text(statuses.get(underlay.id))
            item = QtWidgets.QListWidgetItem(underlay.name + (f"  — {note}" if note else "")
                                             + ("  (locked)" if underlay.locked else ""))
            item.setData(ID_ROLE, underlay.id)
            item.setToolTip(underlay.path)
            item.setCheckState(QtCore.Qt.CheckState.Checked if underlay.visible
                               else QtCore.Qt.CheckState.Unchecked)
            self.list.addItem(item)
            if underlay.id == current or current is None:
                self.list.setCurrentItem(item)
                current = underlay.id
        blocker.unblock()
        self._show_current()

    def select(self, underlay_id: str) -> None:
        for row in range(self.list.count()):
            if self.list.item(row).data(ID_ROLE) == underlay_id:
                self.list.setCurrentRow(row)

    def row_texts(self) -> list[str]:
        return [self.list.item(row).text() for row in range(self.list.count())]

    def _show_current(self) -> None:
        underlay = self._underlays.get(self.current_id() or "")
        status = None if underlay is None else self._statuses.get(underlay.id)
        for widget in (self.up, self.down, self.remove, self.locate, self.locked, self.opacity):
            widget.setEnabled(underlay is not None)
        if underlay is not None:
            with QtCore.QSignalBlocker(self.locked), QtCore.QSignalBlocker(self.opacity):
                self.locked.setChecked(underlay.locked)
                self.opacity.setValue(round(underlay.opacity * OPACITY_STEPS))
            self.remove.setEnabled(not underlay.locked)
        self.info.setText("" if underlay is None else describe(underlay, status))
        self._show_layers(underlay, status)

    def _show_layers(self, underlay: Underlay | None, status: Content | str | None) -> None:
        with QtCore.QSignalBlocker(self.layers):
            self.layers.clear()
            if underlay is None or not isinstance(status, BaseDrawing):
                self.layers.setVisible(False)
                self.layer_pavement.setEnabled(False)
                return
            self.layers.setVisible(True)
            for name, layer in status.layers.items():
                outlines = f", {len(layer.closed_outlines)} closed" if layer.closed_outlines else ""
                item = QtWidgets.QListWidgetItem(f"{name}  ({layer.entity_count}{outlines})")
                item.setData(ID_ROLE, name)
                item.setCheckState(QtCore.Qt.CheckState.Unchecked if name in underlay.hidden_layers
                                   else QtCore.Qt.CheckState.Checked)
                self.layers.addItem(item)
            self.layers.setCurrentRow(0)
        self.layer_pavement.setEnabled(self.layers.count() > 0)

    def set_picked_count(self, count: int) -> None:
        self.make_pavement.setEnabled(count > 0)
        self.make_pavement.setText(f"Make pavement ({count})" if count else "Make pavement")

    # --- reacting ----------------------------------------------------------------------------------

    def _emit_current(self, signal: QtCore.SignalInstance, *args: object) -> None:
        underlay_id = self.current_id()
        if underlay_id is not None:
            signal.emit(underlay_id, *args)

    def _item_changed(self, item: QtWidgets.QListWidgetItem) -> None:
        shown = item.checkState() == QtCore.Qt.CheckState.Checked
        self.visibility_toggled.emit(str(item.data(ID_ROLE)), shown)

    def _layer_changed(self, item: QtWidgets.QListWidgetItem) -> None:
        shown = item.checkState() == QtCore.Qt.CheckState.Checked
        self._emit_current(self.layer_toggled, str(item.data(ID_ROLE)), shown)

    def _layer_to_pavement(self) -> None:
        item = self.layers.currentItem()
        if item is not None:
            self._emit_current(self.pavement_from_layer_requested, str(item.data(ID_ROLE)))

    def _opacity_moved(self, value: int) -> None:
        self._emit_current(self.opacity_previewed, value / OPACITY_STEPS)
        if not self.opacity.isSliderDown():  # keys and clicks on the groove: each is one change
            self._emit_current(self.opacity_chosen, value / OPACITY_STEPS)

    def _opacity_released(self) -> None:
        self._emit_current(self.opacity_chosen, self.opacity.value() / OPACITY_STEPS)
