"""The main window: drawing and dragging with the mouse, undo, files, panels, the caution line."""

from __future__ import annotations

from pathlib import Path

import pytest
from PySide6 import QtCore

from app.fileio.layout_json import load_layout, save_layout
from app.fileio.recovery import find_recovery
from app.model.edits import move_vertex, set_title_notes
from app.model.elements import Layout
from app.model.tools import Selection
from app.ui.launch import settle
from app.ui.style import CAUTION
from tests.ui.conftest import demo_layout
from tests.ui.synthetic import synthetic_result
from tests.ui.test_canvas import click, drag

# The wording, word for word:
CAUTION_TEXT = ("Preliminary planning layout only — verify against the governing standard, local codes "
                "and aircraft manufacturers' data; final design by a licensed engineer.")


def test_the_caution_line_is_always_visible(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    assert CAUTION == CAUTION_TEXT and window.caution.text() == CAUTION_TEXT
    for panel in (window.layers_panel, window.fleet_panel, window.findings_panel, window.properties_panel,
                  window.junction_panel):
        panel.hide()
    window.resize(760, 560)  # narrow: the caution wraps onto more lines
    settle(window)
    assert window.caution.isVisible() and not window.caution.visibleRegion().isEmpty()
    assert window.caution.height() >= window.caution.heightForWidth(window.caution.width())  # not cut
    top_left = window.caution.mapTo(window, QtCore.QPoint(0, 0))
    assert window.rect().contains(QtCore.QRect(top_left, window.caution.size()))


def test_drawing_a_centerline_by_clicks(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(Layout(units="m"))
    window.canvas.zoom_to(0.0, 0.0, 400.0)
    window.actions_.tools["taxiway"].trigger()
    points = [(-100.0, -50.0), (60.0, -50.0), (60.0, 120.0)]  # square legs: no angle snap moves them
    for point in points:
        click(qtbot, window, *point)
    assert window.document.layout.centerlines == ()
    assert window.canvas.overlay.sketch.isVisible()
    qtbot.keyClick(window.canvas, QtCore.Qt.Key.Key_Return)
    settle(window)
    (drawn,) = window.document.layout.centerlines
    pixel_m = window.canvas.pick_radius_m() / 8.0
    for vertex, point in zip(drawn.vertices, points, strict=True):
        assert abs(vertex.x_m - point[0]) <= pixel_m and abs(vertex.y_m - point[1]) <= pixel_m
    assert window.actions_.undo.text() == "&Undo Draw taxiway"
    assert window.tools.selection == Selection((drawn.id,))
    assert not window.canvas.overlay.sketch.isVisible()


def test_dragging_a_vertex_moves_it_and_one_undo_restores_the_layout(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    before = demo_layout()
    window = make_window(before)
    window.canvas.zoom_to(250.0, 380.0, 300.0)
    drag(qtbot, window, (300.0, 420.0), (330.0, 470.0))
    end = window.document.layout.centerlines[3].vertices[2]
    pixel_m = window.canvas.pick_radius_m() / 8.0
    assert abs(end.x_m - 330.0) <= 2 * pixel_m and abs(end.y_m - 470.0) <= 2 * pixel_m
    assert len(window.document.stack) == 1 and window.actions_.undo.text() == "&Undo Move point"
    assert window.isWindowModified()
    window.actions_.undo.trigger()
    assert window.document.layout == before
    assert not window.isWindowModified()


def test_dragging_a_junction_keeps_the_lines_joined(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.canvas.zoom_to(-400.0, 150.0, 300.0)
    drag(qtbot, window, (-400.0, 190.0), (-380.0, 230.0))
    parallel, connector = window.document.layout.centerlines[0], window.document.layout.centerlines[1]
    assert parallel.vertices[1] == connector.vertices[1] and parallel.vertices[1].y_m > 200.0
    assert window.document.stack.undo_label == "Move junction"


def test_open_edit_save_round_trip(make_window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    original = tmp_path / "field.json"
    save_layout(demo_layout(), original)
    window = make_window()
    assert window.files.open_path(original)
    assert window.document.layout == load_layout(original)
    assert window.windowTitle() == "field.json[*] — taxiwright" and not window.isWindowModified()
    window.edit("Move point", lambda lay: move_vertex(lay, "twy-2", 0, -410.0, 0.0))
    assert window.isWindowModified()
    window.actions_.save.trigger()
    assert not window.isWindowModified() and load_layout(original) == window.document.layout
    copy = tmp_path / "copy.json"
    window.messages.ask_save_path = lambda start: copy  # type: ignore[method-assign]
    window.actions_.save_as.trigger()
    assert load_layout(copy) == window.document.layout and window.document.path == copy
    assert window.files.recent_files()[:2] == [copy.absolute(), original.absolute()]
    assert window.actions_.recent_menu.actions()[0].text() == "copy.json"


def test_a_file_that_does_not_open_is_reported_once(make_window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    broken = tmp_path / "broken.json"
    broken.write_text("{ not json", encoding="utf-8")
    window = make_window(demo_layout())
    assert not window.files.open_path(broken)
    assert [level for level, _ in window.messages.history] == ["error"]
    assert window.document.layout == demo_layout()


def test_closing_with_unsaved_changes_asks(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.edit("Rename layout", lambda lay: set_title_notes(lay, "Renamed", ""))
    asked: list[str] = []
    window.messages.ask_save_changes = lambda name: asked.append(name) or "cancel"  # type: ignore[method-assign]
    assert not window.close() and window.isVisible()
    window.messages.ask_save_changes = lambda name: asked.append(name) or "discard"  # type: ignore[method-assign]
    assert window.close()
    assert asked == ["Untitled layout", "Untitled layout"]


def test_autosave_and_the_offer_to_recover(make_window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "field.json"
    save_layout(demo_layout(), path)
    first = make_window(load_layout(path), path)
    assert first.files.autosave() is None  # nothing unsaved, nothing written
    first.edit("Move point", lambda lay: move_vertex(lay, "twy-2", 0, -420.0, 0.0))
    assert first.files.autosave() is not None and find_recovery(path) is not None
    edited = first.document.layout
    second = make_window()
    second.messages.ask_recover = lambda layout_path, recovery: True  # type: ignore[method-assign]
    assert second.files.open_path(path)
    assert second.document.layout == edited and second.document.is_dirty
    assert second.document.stack.undo_label == "Recover unsaved work"


def test_units_switch_changes_what_is_shown_not_the_geometry(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.actions_.units_ft.trigger()
    settle(window)
    assert window.document.layout.units == "ft"
    assert window.document.layout.centerlines == demo_layout().centerlines
    assert window.canvas.plotItem.getAxis("bottom").labelText == "East (ft)"
    assert window.actions_.undo.text() == "&Undo Show in feet"


def test_tools_have_single_key_shortcuts(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window()
    shortcuts = {key: action.shortcut().toString() for key, action in window.actions_.tools.items()}
    assert shortcuts["taxiway"] == "T" and shortcuts["select"] == "S"
    assert len(set(shortcuts.values())) == len(shortcuts) and "" not in shortcuts.values()
    assert window.actions_.undo.shortcut().toString() == "Ctrl+Z"


def test_clicking_a_finding_selects_and_zooms_to_it(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout(), analyze=synthetic_result)
    table = window.findings_panel.table
    assert table.rowCount() == 3 and table.item(0, 0).text() == "Error"  # sorted by severity
    finding = window.findings_panel.finding_at_row(0)
    table.cellClicked.emit(0, 2)
    settle(window)
    assert window.tools.selection.junction_id == finding.element_ids[0]
    (xmin, xmax), (ymin, ymax) = window.canvas.view_box.viewRange()
    assert xmin < finding.location_m[0] < xmax and ymin < finding.location_m[1] < ymax
    assert xmax - xmin < 400.0


def test_junction_inspector_excludes_a_movement_as_a_command(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout(), analyze=synthetic_result)
    click(qtbot, window, -400.0, 190.0)
    junction = window.junction_panel.junction
    assert junction is not None and window.tools.selection.junction_id == junction.junction_id
    table = window.junction_panel.movements
    assert table.rowCount() == len(junction.movements)
    include = table.item(0, table.columnCount() - 1)
    include.setCheckState(QtCore.Qt.CheckState.Unchecked)
    settle(window)
    assert junction.movements[0].key in window.document.layout.excluded_movements
    assert window.document.stack.undo_label == "Exclude movement"
    table.selectRow(1)
    assert window.canvas.overlay.movement.isVisible()


def test_properties_edit_the_selection_in_place(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.tools.set_selection(Selection(("twy-4",), ("twy-4", 1)))
    panel = window.properties_panel
    assert panel.line_name.text() == "Apron lane" and panel.corner.value() == pytest.approx(60.0)
    panel.line_name.setText("Apron lane north")
    panel.line_name.editingFinished.emit()
    panel.corner.setValue(75.0)
    panel.corner.editingFinished.emit()
    lane = window.document.layout.centerlines[3]
    assert lane.name == "Apron lane north" and lane.vertices[1].corner_radius_m == pytest.approx(75.0)
    assert window.document.stack.undo_label == "Set corner radius"
    panel.corner.editingFinished.emit()  # leaving the field unchanged records nothing
    assert len(window.document.stack) == 2


def test_fleet_adds_from_the_demo_library_with_derived_groups(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    actions = window.fleet_panel.library_menu.actions()
    assert actions
    actions[0].trigger()
    settle(window)
    assert len(window.document.layout.fleet) == 1
    table = window.fleet_panel.table
    assert table.rowCount() == 1 and table.item(0, 0).text() == actions[0].text()
    assert table.item(0, 5).text() not in ("", "beyond")  # a TDG was derived
    actions[0].trigger()
    assert len(window.document.layout.fleet) == 1  # the same aircraft twice is refused


def test_about_box_holds_the_caution_and_sources(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window()
    window.actions_.about.trigger()
    (level, html) = window.messages.history[-1]
    assert level == "about" and "licensed engineer" in html and "AC 150/5300-13B" in html


def test_delete_selected_removes_elements(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.tools.set_selection(Selection(("obj-1",)))
    window.actions_.delete.trigger()
    settle(window)
    assert window.document.layout.objects == () and window.tools.selection == Selection()


def test_new_asks_before_dropping_unsaved_work(make_window) -> None:  # type: ignore[no-untyped-def]
    window = make_window(demo_layout())
    window.edit("Rename layout", lambda lay: set_title_notes(lay, "Renamed", ""))
    window.messages.ask_save_changes = lambda name: "cancel"  # type: ignore[method-assign]
    window.actions_.new.trigger()
    assert window.document.layout.title == "Renamed"
    window.messages.ask_save_changes = lambda name: "discard"  # type: ignore[method-assign]
    window.actions_.new.trigger()
    settle(window)
    assert window.document.layout == Layout() and not window.isWindowModified()
    assert window.actions_.undo.text() == "&Undo" and not window.actions_.undo.isEnabled()


def test_aircraft_dialog_converts_display_units_to_metres(qtbot) -> None:  # type: ignore[no-untyped-def]
    from app.ui.panels.fleet_panel import AircraftDialog

    dialog = AircraftDialog("ft")
    qtbot.addWidget(dialog)
    values_ft = {"wingspan_m": 100.0, "mgw_m": 25.0, "cmg_m": 50.0, "wheelbase_m": 45.0,
                 "tyre_width_m": 1.5, "nose_x_m": 55.0, "tail_x_m": 60.0, "wingtip_x_m": -10.0,
                 "tail_height_m": 30.0}
    for field, value in values_ft.items():
        dialog.boxes[field].setValue(value)
    aircraft = dialog.aircraft()
    assert aircraft.wingspan_m == pytest.approx(30.48)  # identity: 100 ft x 0.3048 m/ft
    assert aircraft.tail_x_m == pytest.approx(-18.288)  # entered as a distance behind the gear
    dialog.boxes["mgw_m"].setValue(0.0)
    with pytest.raises(ValueError, match="mgw_m"):
        dialog.aircraft()


def test_opening_another_layout_drops_a_half_drawn_line(make_window, qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "field.json"
    save_layout(demo_layout(), path)
    window = make_window(Layout(units="m"))
    window.actions_.tools["taxiway"].trigger()
    click(qtbot, window, 0.0, 0.0)
    assert window.canvas.overlay.sketch_points.isVisible()
    assert window.files.open_path(path)
    settle(window)
    assert not window.canvas.overlay.sketch_points.isVisible()
    qtbot.keyClick(window.canvas, QtCore.Qt.Key.Key_Return)
    assert window.document.layout == load_layout(path)  # nothing drawn from the old click
