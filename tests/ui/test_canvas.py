"""The plan view inside the window: simulated mouse on the viewport, zoom to fit, layers."""

from __future__ import annotations

from PySide6 import QtCore

from app.model.edits import move_vertex
from app.model.scene import LAYER_ORDER, layout_bounds
from app.ui.launch import settle
from app.ui.main_window import MainWindow
from tests.ui.conftest import demo_layout
from tests.ui.synthetic import synthetic_result

LEFT = QtCore.Qt.MouseButton.LeftButton


def pixel(window: MainWindow, x_m: float, y_m: float) -> QtCore.QPoint:
    """Where the plan point (x_m, y_m) is on the canvas viewport."""
    scene_point = window.canvas.view_box.mapViewToScene(QtCore.QPointF(x_m, y_m))
    return window.canvas.mapFromScene(scene_point)


def plan(window: MainWindow, point: QtCore.QPoint) -> tuple[float, float]:
    view = window.canvas.view_box.mapSceneToView(window.canvas.mapToScene(point))
    return (view.x(), view.y())


def click(qtbot, window: MainWindow, x_m: float, y_m: float) -> None:  # type: ignore[no-untyped-def]
    qtbot.mouseClick(window.canvas.viewport(), LEFT, pos=pixel(window, x_m, y_m))
    settle(window)


def drag(qtbot, window: MainWindow, start: tuple[float, float], end: tuple[float, float],  # type: ignore[no-untyped-def]
         button: QtCore.Qt.MouseButton = LEFT) -> None:
    viewport = window.canvas.viewport()
    a, b = pixel(window, *start), pixel(window, *end)
    qtbot.mousePress(viewport, button, pos=a)
    for step in range(1, 4):
        qtbot.mouseMove(viewport, a + (b - a) * step / 3)
        settle(window)
    qtbot.mouseRelease(viewport, button, pos=b)
    settle(window)


def contains(window: MainWindow, bounds: tuple[float, float, float, float]) -> bool:
    (xmin, xmax), (ymin, ymax) = window.canvas.view_box.viewRange()
    return xmin <= bounds[0] and ymin <= bounds[1] and xmax >= bounds[2] and ymax >= bounds[3]


def test_the_layout_is_fitted_on_open_and_zoom_to_fit_brings_it_back(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    bounds = layout_bounds(window.document.layout)
    assert bounds is not None and contains(window, bounds)
    window.canvas.zoom_to(0.0, 0.0, 50.0)
    assert not contains(window, bounds)
    window.actions_.zoom_fit.trigger()
    assert contains(window, bounds)
    (xmin, xmax), (ymin, ymax) = window.canvas.view_box.viewRange()
    assert max(xmax - xmin, ymax - ymin) < 3.0 * (bounds[2] - bounds[0])  # fitted, not lost in space


def test_layer_checkboxes_hide_and_show_their_layer(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout(), analyze=synthetic_result)
    for name in LAYER_ORDER:
        items = window.canvas.layers[name].graphics_items()
        assert any(item.isVisible() for item in items), name
        window.layers_panel.boxes[name].setChecked(False)
        assert not any(item.isVisible() for item in items), name
        window.layers_panel.boxes[name].setChecked(True)
        assert any(item.isVisible() for item in items), name
    window.layers_panel.boxes["centerlines"].setChecked(False)
    assert not window.canvas.handles.isVisible()


def test_only_changed_layers_are_redrawn(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    revisions = {name: layer.revision for name, layer in window.canvas.layers.items()}
    window.document.execute("Move point", move_vertex(window.document.layout, "twy-4", 2, 320.0, 400.0))
    assert settle(window)
    redrawn = {name for name, layer in window.canvas.layers.items() if layer.revision != revisions[name]}
    assert redrawn == {"centerlines", "objects"}  # objects: the clearance zones follow the lines


def test_symbol_sets_without_points_are_hidden(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    handles, overlay = window.canvas.handles, window.canvas.overlay
    for scatter in handles._scatters.values():
        # invariant: a handle style is shown exactly when it has points (an empty one only costs a paint)
        assert scatter.isVisibleTo(handles) == (len(scatter.data) > 0)
    for scatter in (overlay.sketch_points, overlay.selection_vertex, overlay.snap_mark):
        # invariant: no overlay marks before anything is drawn, selected or snapped
        assert not scatter.isVisible()


def test_middle_button_pans_without_editing(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    before = window.canvas.view_box.viewRange()
    drag(qtbot, window, (0.0, 190.0), (100.0, 190.0), QtCore.Qt.MouseButton.MiddleButton)
    after = window.canvas.view_box.viewRange()
    assert after[0][0] < before[0][0] - 50.0  # the view moved left by about the drag
    assert window.document.stack.can_undo is False


def test_hovering_near_a_vertex_while_drawing_shows_a_snap_cue(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.actions_.tools["taxiway"].trigger()
    target = pixel(window, 400.0, 190.0)
    qtbot.mouseMove(window.canvas.viewport(), target + QtCore.QPoint(3, 2))
    settle(window)
    cue = window.canvas.overlay.last_snap
    assert cue is not None and cue.kind == "vertex" and cue.xy == (400.0, 190.0)
    assert window.canvas.overlay.snap_mark.isVisible()


def test_cursor_position_is_shown_in_the_layout_units(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    point = pixel(window, 100.0, 50.0)
    qtbot.mouseMove(window.canvas.viewport(), point)
    settle(window)
    x_m, y_m = plan(window, point)
    assert window.coords_label.text() == f"E {x_m:,.1f} m   N {y_m:,.1f} m"


def test_space_and_drag_pans_instead_of_using_the_tool(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.canvas.zoom_to(-400.0, 150.0, 300.0)
    before = window.canvas.view_box.viewRange()
    qtbot.keyPress(window.canvas, QtCore.Qt.Key.Key_Space)
    drag(qtbot, window, (-400.0, 190.0), (-350.0, 190.0))  # starts on a junction: no move while panning
    qtbot.keyRelease(window.canvas, QtCore.Qt.Key.Key_Space)
    after = window.canvas.view_box.viewRange()
    assert after[0][0] < before[0][0] - 25.0
    assert window.document.stack.can_undo is False


def test_wheel_zooms_about_the_cursor(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    from PySide6 import QtGui

    window = make_window(demo_layout())
    viewport = window.canvas.viewport()
    at = pixel(window, 300.0, 420.0)
    width_before = window.canvas.visible_rect_m().width()
    wheel = QtGui.QWheelEvent(
        QtCore.QPointF(at), QtCore.QPointF(viewport.mapToGlobal(at)), QtCore.QPoint(0, 0),
        QtCore.QPoint(0, 240), QtCore.Qt.MouseButton.NoButton, QtCore.Qt.KeyboardModifier.NoModifier,
        QtCore.Qt.ScrollPhase.NoScrollPhase, False)
    QtCore.QCoreApplication.sendEvent(viewport, wheel)
    settle(window)
    assert window.canvas.visible_rect_m().width() < 0.9 * width_before
    x_m, y_m = plan(window, at)
    pixel_m = window.canvas.pick_radius_m() / 8.0
    assert abs(x_m - 300.0) <= 2 * pixel_m and abs(y_m - 420.0) <= 2 * pixel_m  # the point stayed put
