"""Underlays in the main window: the import actions, the panel's requests as undoable edits, the
graphics kept in step with the document, and picking closed outlines to make pavement.

:func:`install_underlays` is the one entry point: it adds the Underlays panel, the graphics under
the plan view and "Import base drawing…" / "Import aerial image…" to the File menu. It uses the
main window's ``document``, ``canvas`` (``view_box``, ``pointer``, ``zoom_to_fit``) and
``messages``, and nothing else of it. Every question to the planner goes through an ``ask_*``
method, so a test replaces that method instead of facing a modal dialog.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable
from dataclasses import replace
from pathlib import Path
from typing import Any

import numpy as np
from PySide6 import QtCore, QtGui, QtWidgets

from app.fileio.raster_image import ImageInfo, probe_image
from app.fileio.world_file import placement_for_image
from app.model import edits
from app.model.document import LayoutChange
from app.model.edits import EditError
from app.model.elements import Layout
from app.model.tools import PointerEvent
from app.model.underlays import (
    DEFAULT_OPACITY,
    BaseDrawing,
    OutlineRef,
    Placement,
    Underlay,
    UnderlayError,
    join_pieces,
    new_underlay_id,
    outline_xy,
    pavement_parts,
    underlay_by_id,
)
from app.ui.panels.underlay_panel import UnderlayPanel
from app.ui.placement_dialog import TwoPointDialog
from app.ui.underlay_items import ContentKey, ImagePixels, UnderlayView, content_key

DRAWING_FILTER = "DXF drawings (*.dxf *.DXF);;All files (*)"
IMAGE_FILTER = "Images (*.png *.jpg *.jpeg *.tif *.tiff *.PNG *.JPG *.JPEG *.TIF *.TIFF);;All files (*)"
PAVEMENT_NAME = "Existing pavement"


class UnderlayController(QtCore.QObject):
    def __init__(self, window: Any) -> None:
        super().__init__(window)
        self._window = window
        self._document = window.document
        self._messages = window.messages
        self._canvas = window.canvas
        self.view = UnderlayView(self._canvas.view_box)
        self.panel = UnderlayPanel(window)
        self.picking = False
        self.picked: list[tuple[str, OutlineRef]] = []
        self._importing: dict[ContentKey, Underlay] = {}
        self._warned: set[tuple[str, str]] = set()
        self._connect_panel()
        self.view.changed.connect(self._show_panel)
        self.view.content.loaded.connect(self._finish_import)
        self._canvas.pointer.connect(self._on_pointer)
        self._unsubscribe = unsubscribe = self._document.subscribe(self._on_change)
        window.destroyed.connect(lambda *_: unsubscribe())  # the document may outlive the window
        self.refresh()

    def _connect_panel(self) -> None:
        p = self.panel
        p.import_drawing_requested.connect(lambda: self.import_drawing())
        p.import_image_requested.connect(lambda: self.import_image())
        p.visibility_toggled.connect(lambda i, on: self._update(i, "Show underlay" if on else "Hide underlay",
                                                                 visible=on))
        p.locked_toggled.connect(lambda i, on: self._update(i, "Lock underlay" if on else "Unlock underlay",
                                                             locked=on))
        p.opacity_previewed.connect(self.view.set_opacity_preview)
        p.opacity_chosen.connect(lambda i, value: self._update(i, "Underlay opacity", opacity=value,
                                                                merge_key=("underlay-opacity", i)))
        p.move_requested.connect(self.move)
        p.remove_requested.connect(self.remove)
        p.locate_requested.connect(lambda i: self.locate(i))
        p.layer_toggled.connect(self.set_layer_shown)
        p.pick_toggled.connect(self.set_picking)
        p.pavement_from_picked_requested.connect(self.pavement_from_picked)
        p.pavement_from_layer_requested.connect(self.pavement_from_layer)

    # --- questions (tests replace these) -------------------------------------------------------------

    def _start_dir(self) -> str:
        path = self._document.path
        return str(path.parent) if path is not None else ""

    def ask_drawing_path(self) -> Path | None:
        path, _ = QtWidgets.QFileDialog.getOpenFileName(self._window, "Import base drawing",
                                                        self._start_dir(), DRAWING_FILTER)
        return Path(path) if path else None

    def ask_image_path(self) -> Path | None:
        path, _ = QtWidgets.QFileDialog.getOpenFileName(self._window, "Import aerial image",
                                                        self._start_dir(), IMAGE_FILTER)
        return Path(path) if path else None

    def ask_two_points(self, path: Path, info: ImageInfo, units: str) -> Placement | None:
        dialog = TwoPointDialog(path, info, units, self._window)
        return dialog.placement if dialog.exec() == QtWidgets.QDialog.DialogCode.Accepted else None

    # --- edits ---------------------------------------------------------------------------------------

    def _edit(self, label: str, build: Callable[[Layout], Layout], merge_key: Hashable | None = None) -> bool:
        """One undoable change; a refused one goes to the status line. True if it was made."""
        if self._document.is_previewing:
            self._document.cancel_preview()
        try:
            after = build(self._document.layout)
        except EditError as error:
            self._messages.warn(str(error))
            return False
        self._document.execute(label, after, merge_key)
        return True

    def _update(self, underlay_id: str, label: str, merge_key: Hashable | None = None, **fields: Any) -> bool:
        return self._edit(label, lambda lay: edits.update_underlay(lay, underlay_id, **fields), merge_key)

    def remove(self, underlay_id: str) -> None:
        self._edit("Remove underlay", lambda lay: edits.remove_underlay(lay, underlay_id))

    def move(self, underlay_id: str, step: int) -> None:
        order = [u.id for u in self._document.layout.underlays]
        if underlay_id in order and 0 <= order.index(underlay_id) + step < len(order):
            index = order.index(underlay_id) + step
            self._edit("Reorder underlays", lambda lay: edits.move_underlay(lay, underlay_id, index))

    def set_layer_shown(self, underlay_id: str, layer: str, shown: bool) -> None:
        underlay = underlay_by_id(self._document.layout, underlay_id)
        if underlay is not None:
            hidden = underlay.hidden_layers - {layer} if shown else underlay.hidden_layers | {layer}
            self._update(underlay_id, f"{'Show' if shown else 'Hide'} layer {layer}", hidden_layers=hidden)

    def locate(self, underlay_id: str, path: Path | None = None) -> None:
        underlay = underlay_by_id(self._document.layout, underlay_id)
        if underlay is None:
            return
        path = path or (self.ask_drawing_path() if underlay.kind == "drawing" else self.ask_image_path())
        if path is not None:
            self._update(underlay_id, "Locate underlay file", path=str(Path(path).absolute()))

    # --- importing -----------------------------------------------------------------------------------

    def import_drawing(self, path: Path | None = None) -> None:
        """Read a DXF in the background; it becomes an underlay once read (see _finish_import)."""
        path = path or self.ask_drawing_path()
        if path is None:
            return
        layout = self._document.layout
        draft = Underlay(new_underlay_id(layout), Path(path).name, "drawing", str(Path(path).absolute()),
                         opacity=DEFAULT_OPACITY["drawing"], assumed_units=layout.units)
        key = content_key(draft)
        if isinstance(key, str):
            self._messages.error("Cannot import the base drawing", key)
            return
        self._importing[key] = draft
        self.view.content.held.add(key)
        self._messages.note(f"Reading {draft.name} …")
        if self.view.content.get(key) is not None:
            self._finish_import(key)

    def _finish_import(self, key: ContentKey) -> None:
        draft = self._importing.pop(key, None)
        if draft is None:
            return
        self.view.content.held.discard(key)
        content = self.view.content.get(key)
        if not isinstance(content, BaseDrawing):
            self._messages.error("Cannot import the base drawing", str(content))
            return
        underlay = replace(draft, id=new_underlay_id(self._document.layout),
                           hidden_layers=content.hidden_in_file)
        if self._edit(f"Import base drawing {draft.name}", lambda lay: edits.add_underlay(lay, underlay)):
            self.panel.raise_()
            self.panel.select(underlay.id)
            self._messages.note(content.units_note)
            if content.partial_note:
                self._messages.warn(content.partial_note)
            self._canvas.zoom_to_fit(content.bounds_m())

    def import_image(self, path: Path | None = None) -> None:
        """Place an image by its world file, or else by two points the planner picks on it."""
        path = path or self.ask_image_path()
        if path is None:
            return
        units = self._document.layout.units
        try:
            info = probe_image(path)
            found = placement_for_image(path, units)
        except UnderlayError as error:
            self._messages.error("Cannot import the image", str(error))
            return
        placement = found[0] if found is not None else self.ask_two_points(Path(path), info, units)
        if placement is None:
            self._messages.warn(f"{Path(path).name} was not imported: it has no world file and "
                                f"was not placed by two points")
            return
        layout = self._document.layout
        underlay = Underlay(new_underlay_id(layout), Path(path).name, "image", str(Path(path).absolute()),
                            opacity=DEFAULT_OPACITY["image"], placement=placement)
        if self._edit(f"Import aerial image {underlay.name}", lambda lay: edits.add_underlay(lay, underlay)):
            self.panel.raise_()
            self.panel.select(underlay.id)
            where = f"placed by {found[1].name}" if found is not None else "placed by two points"
            self._messages.note(f"{underlay.name}: {info.width_px} x {info.height_px} pixels, {where}")
            corners = np.array(placement.corners_xy(info.width_px, info.height_px))
            self._canvas.zoom_to_fit((*corners.min(axis=0).tolist(), *corners.max(axis=0).tolist()))

    def bounds_m(self) -> tuple[float, float, float, float] | None:
        """(xmin, ymin, xmax, ymax) on the plan of what the shown underlays draw (a drawing's shown
        layers, an image's placed corners), or None when nothing is shown or loaded yet."""
        boxes = [box for underlay in self._document.layout.underlays if underlay.visible
                 for box in (_shown_extent(underlay, self.view.status(underlay)),) if box is not None]
        if not boxes:
            return None
        low, high = np.min(np.array(boxes)[:, :2], axis=0), np.max(np.array(boxes)[:, 2:], axis=0)
        return (float(low[0]), float(low[1]), float(high[0]), float(high[1]))

    # --- keeping in step -----------------------------------------------------------------------------

    def _on_change(self, change: LayoutChange) -> None:
        if change.before.underlays is not change.after.underlays or change.reason == "replace":
            self.refresh()

    def refresh(self) -> None:
        self.view.show(self._document.layout.underlays)

    def _show_panel(self) -> None:
        underlays = self._document.layout.underlays
        statuses = {u.id: self.view.status(u) for u in underlays}
        self.panel.show_underlays(underlays, statuses)
        for underlay in underlays:
            status = statuses[underlay.id]
            if isinstance(status, str) and (underlay.id, underlay.path) not in self._warned:
                self._warned.add((underlay.id, underlay.path))
                self._messages.warn(f"Underlay {underlay.name!r} is not shown: {status}. The layout is "
                                    f"not affected; use Locate file… in the Underlays panel.")
        self._prune_picks()

    def close(self) -> None:
        self._unsubscribe()

    # --- picking outlines ----------------------------------------------------------------------------

    def set_picking(self, on: bool) -> None:
        self.picking = on
        if on:
            tools = getattr(self._window, "tools", None)
            if tools is not None:
                tools.set_tool("select")  # a click must not also draw something
            self._messages.hint("Click inside closed outlines of the base drawing; Esc ends picking")
        if self.panel.pick.isChecked() != on:
            self.panel.pick.setChecked(on)

    def _on_pointer(self, event: PointerEvent) -> None:
        if not self.picking:
            return
        if event.kind == "key" and event.key == "Escape":
            self.set_picking(False)
        elif event.kind == "press" and event.button == "left":
            self.toggle_pick_at(event.x_m, event.y_m)

    def toggle_pick_at(self, x_m: float, y_m: float) -> OutlineRef | None:
        """Pick (or unpick) the smallest shown closed outline around the point, topmost drawing first."""
        for underlay in reversed(self._document.layout.underlays):
            key = content_key(underlay)
            picker = None if isinstance(key, str) or not underlay.visible else self.view.content.picker(key)
            if picker is None:
                continue
            drawing = self.view.status(underlay)
            assert isinstance(drawing, BaseDrawing)
            ref = picker.pick(x_m, y_m, drawing.layers.keys() - underlay.hidden_layers)
            if ref is not None:
                entry = (underlay.id, ref)
                if entry in self.picked:
                    self.picked.remove(entry)
                else:
                    self.picked.append(entry)
                self._show_picks()
                return ref
        return None

    def _picked_rings(self) -> list[np.ndarray]:
        rings = []
        for underlay_id, ref in self.picked:
            underlay = underlay_by_id(self._document.layout, underlay_id)
            drawing = None if underlay is None else self.view.status(underlay)
            if isinstance(drawing, BaseDrawing) and ref.layer in drawing.layers:
                rings.append(outline_xy(drawing, ref))
        return rings

    def _prune_picks(self) -> None:
        alive = {u.id for u in self._document.layout.underlays}
        kept = [entry for entry in self.picked if entry[0] in alive]
        if kept != self.picked:
            self.picked = kept
            self._show_picks()

    def _show_picks(self) -> None:
        rings = self._picked_rings()
        self.view.set_picked(join_pieces([np.vstack((ring, ring[:1])) for ring in rings]))
        self.panel.set_picked_count(len(rings))

    def pavement_from_picked(self) -> bool:
        made = self._make_pavement(self._picked_rings(), "Existing pavement from picked outlines")
        if made:
            self.picked = []
            self._show_picks()
            self.set_picking(False)
        return made

    def pavement_from_layer(self, underlay_id: str, layer: str) -> bool:
        underlay = underlay_by_id(self._document.layout, underlay_id)
        drawing = None if underlay is None else self.view.status(underlay)
        if not isinstance(drawing, BaseDrawing) or layer not in drawing.layers:
            return False
        return self._make_pavement(list(drawing.layers[layer].closed_outlines),
                                   f"Existing pavement from layer {layer}")

    def _make_pavement(self, rings: list[np.ndarray], label: str) -> bool:
        parts, skipped = pavement_parts(rings)
        if not parts:
            self._messages.warn("No closed outline that encloses an area was found to make pavement of")
            return False
        if not self._edit(label, lambda lay: edits.add_pavement_parts(lay, parts, PAVEMENT_NAME)):
            return False
        left_out = f"; {skipped} outline(s) left out (self-crossing, tiny or repeated)" if skipped else ""
        self._messages.note(f"{len(parts)} existing pavement element(s) added{left_out}")
        return True


def _menu(window: QtWidgets.QMainWindow, title: str) -> QtWidgets.QMenu | None:
    for action in window.menuBar().actions():
        if action.menu() is not None and action.text().replace("&", "") == title:
            menu = action.menu()
            return menu if isinstance(menu, QtWidgets.QMenu) else None
    return None


def _shown_extent(underlay: Underlay, content: object) -> tuple[float, float, float, float] | None:
    """The plan extent of one underlay's loaded content, or None."""
    if isinstance(content, ImagePixels) and underlay.placement is not None:
        corners = np.array(underlay.placement.corners_xy(content.width_px, content.height_px))
        xy = corners
    elif isinstance(content, BaseDrawing):
        arrays = [layer.polylines for name, layer in content.layers.items()
                  if name not in underlay.hidden_layers and len(layer.polylines)]
        xy = np.vstack(arrays) if arrays else np.empty((0, 2))
        xy = xy[np.isfinite(xy).all(axis=1)]
    else:
        return None
    if not len(xy):
        return None
    low, high = xy.min(axis=0), xy.max(axis=0)
    return (float(low[0]), float(low[1]), float(high[0]), float(high[1]))


def install_underlays(main_window: Any) -> None:
    """Add the Underlays panel, the underlay graphics and the two import actions to the window."""
    controller = UnderlayController(main_window)
    main_window.addDockWidget(QtCore.Qt.DockWidgetArea.RightDockWidgetArea, controller.panel)
    # A tab beside the inspector panels, which have the height its lists need.
    neighbour = getattr(main_window, "junction_panel", None)
    if isinstance(neighbour, QtWidgets.QDockWidget):
        main_window.tabifyDockWidget(neighbour, controller.panel)
    first_tab = getattr(main_window, "properties_panel", None)
    if isinstance(first_tab, QtWidgets.QDockWidget):
        first_tab.raise_()
    drawing = QtGui.QAction("Import base &drawing…", main_window)
    drawing.setStatusTip("Show a DXF drawing of the existing airfield under the layout")
    drawing.triggered.connect(lambda: controller.import_drawing())
    image = QtGui.QAction("Import aerial &image…", main_window)
    image.setStatusTip("Show an aerial photograph (PNG, JPEG, TIFF) under the layout")
    image.triggered.connect(lambda: controller.import_image())
    file_menu = _menu(main_window, "File") or main_window.menuBar().addMenu("&Underlays")
    quit_action = next((a for a in file_menu.actions() if "Quit" in a.text()), None)
    if quit_action is not None:
        separator = file_menu.insertSeparator(quit_action)
    else:
        separator = file_menu.addSeparator()
    file_menu.insertActions(separator, [drawing, image])
    view_menu = _menu(main_window, "View")
    if view_menu is not None:
        view_menu.addAction(controller.panel.toggleViewAction())
