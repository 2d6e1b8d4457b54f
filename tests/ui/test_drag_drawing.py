"""What a drag redraws (issue 7): only the recomputed junctions' parts, a quick look for the costly
dashed outlines while it previews, and at its end the same drawing as the layout shown afresh."""

from __future__ import annotations

import numpy as np
from PySide6 import QtCore, QtGui, QtWidgets

from app.model.analysis import LayoutAnalyzer
from app.model.document import Document
from app.model.edits import move_vertex
from app.model.elements import Centerline, Vertex
from app.ui import style
from app.ui.launch import settle
from app.ui.main_window import MainWindow
from tests.ui.conftest import shown_window
from tests.ui.test_with_analysis import fleet_layout

DRAFTED = ("pavement", ("pavement.required", False))


def two_tees() -> list[Centerline]:
    return [Centerline("twy-1", "A", (Vertex(-400.0, 0.0), Vertex(400.0, 0.0))),
            Centerline("twy-2", "B", (Vertex(-200.0, 0.0), Vertex(-200.0, 300.0))),
            Centerline("twy-3", "C", (Vertex(200.0, 0.0), Vertex(200.0, 300.0)))]


def live_window(qtbot, settings: QtCore.QSettings) -> MainWindow:  # type: ignore[no-untyped-def]
    analyzer = LayoutAnalyzer()
    return shown_window(qtbot, settings, Document(fleet_layout(*two_tees())), analyzer.analyze,
                        analyze_live=analyzer.analyze_live)


def preview_frame(window: MainWindow, x_m: float) -> None:
    start = window.document.layout if not window.document.is_previewing else window._drag_start  # type: ignore[attr-defined]
    window.document.preview(move_vertex(start, "twy-3", 1, x_m, 300.0))
    window.refresh_now()


def begin_drag(window: MainWindow) -> None:
    window._drag_start = window.document.layout  # type: ignore[attr-defined]
    window.document.begin_preview()


def image(window: MainWindow) -> np.ndarray:
    grabbed = window.canvas.grab().toImage().convertToFormat(QtGui.QImage.Format.Format_RGB32)
    return np.array(grabbed.constBits(), dtype=np.uint8).reshape(grabbed.height(), -1).copy()


def test_a_drag_rereads_only_the_parts_of_the_recomputed_junction(qtbot, settings) -> None:  # type: ignore[no-untyped-def]
    window = live_window(qtbot, settings)
    begin_drag(window)
    preview_frame(window, 210.0)
    before = window.canvas.layers["gear_tracks"]._curves[("track.gear", False)].parts
    preview_frame(window, 220.0)
    after = window.canvas.layers["gear_tracks"]._curves[("track.gear", False)].parts
    assert len(before) == len(after) == 2  # identity: one part per junction (two tees)
    kept = [a is b for a, b in zip(before, after, strict=True)]
    assert kept.count(True) == 1  # identity: the tee of the other connector is not recomputed
    window.document.cancel_preview()


def test_dashed_outlines_take_their_quick_look_only_while_a_drag_previews(qtbot, settings) -> None:  # type: ignore[no-untyped-def]
    window = live_window(qtbot, settings)
    layer, key = DRAFTED
    required = window.canvas.layers[layer]._curves[key]
    full_width = style.pen(key[0], window.canvas.theme).widthF()
    assert full_width > 1.0 and required._pen.widthF() == full_width  # identity: the style's own pen
    begin_drag(window)
    preview_frame(window, 230.0)
    assert required._pen.widthF() == 1.0  # identity: style.draft_pen
    # identity: the dashes keep their length on screen (pattern in pen widths, scaled by the width)
    assert required._pen.dashPattern() == [length * full_width for length in style.LOOKS[key[0]].dash or ()]
    window.document.end_preview("Move point")
    # check value: identity
    assert settle(window)
    # check value: identity
    assert required._pen.widthF() == full_width


def test_the_drawing_at_the_end_of_a_drag_is_the_drawing_of_the_layout_shown_afresh(  # type: ignore[no-untyped-def]
        qtbot, settings) -> None:
    window = live_window(qtbot, settings)
    begin_drag(window)
    for x_m in (210.0, 225.0, 240.0):
        preview_frame(window, x_m)
        window.canvas.viewport().repaint()
    window.document.end_preview("Move point")
    # check value: identity
    assert settle(window)
    window.tools.set_selection(window.tools.selection.__class__())
    # check value: identity
    assert settle(window)
    fresh = live_window(qtbot, settings)
    fresh.document.execute("Same layout", window.document.layout)
    # check value: identity
    assert settle(fresh)
    fresh.canvas.view_box.setRange(rect=window.canvas.visible_rect_m(), padding=0.0)
    # check value: identity
    assert settle(fresh)
    # check value: identity
    assert window.canvas.view_box.viewRange() == fresh.canvas.view_box.viewRange()
    assert np.array_equal(image(window), image(fresh))  # identity: the same layout, the same view


def test_a_frame_leaves_an_unchanged_selection_outline_alone(qtbot, settings) -> None:  # type: ignore[no-untyped-def]
    window = live_window(qtbot, settings)
    overlay = window.canvas.overlay
    outline = np.array([[0.0, 0.0], [10.0, 0.0], [10.0, 5.0]])
    overlay.set_selection(outline, (0.0, 0.0))
    shown = overlay.selection.xData
    overlay.set_selection(outline.copy(), (0.0, 0.0))
    assert overlay.selection.xData is shown  # identity: an equal outline is not set again
    overlay.set_selection(outline[:2], None)
    assert len(overlay.selection.xData) == 2  # identity: a changed outline is shown


def test_the_plan_view_repaints_one_rectangle_around_what_changed(qtbot, settings) -> None:  # type: ignore[no-untyped-def]
    window = live_window(qtbot, settings)
    mode = QtWidgets.QGraphicsView.ViewportUpdateMode.BoundingRectViewportUpdate
    assert window.canvas.viewportUpdateMode() == mode  # identity: the mode set in canvas.py
