"""The window with the real analysis: what the planner sees after drawing, dragging, undoing,
checking and exporting (issue 4's tests, end to end)."""

from __future__ import annotations

from pathlib import Path

import ezdxf
import pytest
from PySide6 import QtCore

from app.fileio.aircraft_library import load_demo_library
from app.model.analysis import LayoutAnalyzer
from app.model.elements import Centerline, Layout, Vertex
from app.ui.export_dialog import write_dxf
from app.ui.launch import settle
from tests.ui.test_canvas import click, drag

FLEET = tuple(a for a in load_demo_library() if a.name == "Brindleway 50")


def fleet_layout(*centerlines: Centerline) -> Layout:
    return Layout(title="test", units="m", fleet=FLEET, centerlines=centerlines)


def test_drawing_two_crossing_centerlines_makes_a_junction_and_pavement(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(fleet_layout(Centerline("twy-1", "A", (Vertex(-300.0, 0.0), Vertex(300.0, 0.0)))),
                         analyze=LayoutAnalyzer().analyze)
    straight_only = window.result.total_area_m2
    window.canvas.zoom_to(0.0, 0.0, 800.0)
    window.actions_.tools["taxiway"].trigger()
    for point in [(0.0, -300.0), (0.0, 300.0)]:
        click(qtbot, window, *point)
    qtbot.keyClick(window.canvas, QtCore.Qt.Key.Key_Return)
    settle(window)
    assert len(window.document.layout.centerlines) == 2
    (junction,) = window.result.junctions.values()
    assert junction.kind == "crossing" and len(junction.fillets) == 4
    # the fillets add pavement beyond the two straights (identity)
    fillet_area_m2 = sum(fillet.area_m2 for fillet in junction.fillets)
    assert window.result.total_area_m2 > window.result.straight_pavement.area > straight_only
    assert window.result.total_area_m2 == pytest.approx(window.result.straight_pavement.area + fillet_area_m2,
                                                        rel=1e-3)


def test_dragging_a_junction_updates_pavement_and_one_undo_restores_it(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    layout = fleet_layout(Centerline("twy-1", "A", (Vertex(-300.0, 0.0), Vertex(300.0, 0.0))),
                          Centerline("twy-2", "B", (Vertex(0.0, 0.0), Vertex(0.0, 300.0))))
    window = make_window(layout, analyze=LayoutAnalyzer().analyze)
    before = window.result.total_area_m2
    window.canvas.zoom_to(0.0, 150.0, 700.0)
    window.actions_.tools["move"].trigger()
    drag(qtbot, window, (0.0, 300.0), (120.0, 300.0))  # the T becomes skewed: other fillets
    assert window.document.layout != layout
    assert window.result.total_area_m2 != pytest.approx(before, rel=1e-6)
    window.actions_.undo.trigger()
    settle(window)
    assert window.document.layout == layout
    assert window.result.total_area_m2 == pytest.approx(before, rel=1e-9)


def test_findings_panel_lists_a_separation_finding(make_window) -> None:  # type: ignore[no-untyped-def]
    # two parallel taxiways 20 m apart: far below any taxiway/taxiway separation
    # (AC 150/5300-13B Table 4-x, from memory: at least 69 ft for ADG I; docs/standards.md)
    layout = fleet_layout(Centerline("twy-1", "A", (Vertex(-300.0, 0.0), Vertex(300.0, 0.0))),
                          Centerline("twy-2", "B", (Vertex(-300.0, 20.0), Vertex(300.0, 20.0))))
    window = make_window(layout, analyze=LayoutAnalyzer().analyze)
    table = window.findings_panel.table
    codes = {table.item(row, 1).text() for row in range(table.rowCount())}
    assert "E-SEP-TWY-TWY" in codes


def test_selecting_a_junction_fills_the_inspector(make_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    layout = fleet_layout(Centerline("twy-1", "A", (Vertex(-300.0, 0.0), Vertex(300.0, 0.0))),
                          Centerline("twy-2", "B", (Vertex(0.0, -300.0), Vertex(0.0, 300.0))))
    window = make_window(layout, analyze=LayoutAnalyzer().analyze)
    window.canvas.zoom_to(0.0, 0.0, 400.0)
    window.actions_.tools["select"].trigger()
    click(qtbot, window, 0.0, 0.0)
    panel = window.junction_panel
    assert panel.junction is not None and panel.movements.rowCount() == 12  # identity: 4 legs


def test_exporting_from_the_window_writes_a_clean_dxf(make_window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    layout = fleet_layout(Centerline("twy-1", "A", (Vertex(-300.0, 0.0), Vertex(300.0, 0.0))),
                          Centerline("twy-2", "B", (Vertex(0.0, -300.0), Vertex(0.0, 300.0))))
    window = make_window(layout, analyze=LayoutAnalyzer().analyze)
    target = tmp_path / "out.dxf"
    assert write_dxf(window, target, None, False)
    assert not ezdxf.readfile(target).audit().has_errors
    assert not write_dxf(window, tmp_path / "missing-folder" / "out.dxf", None, False)
    assert window.messages.history[-1][0] == "error"


def test_the_inspector_sets_a_corner_turn_radius(make_window, qtbot, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    from app.ui.messages import Messages

    layout = fleet_layout(Centerline("twy-1", "A", (Vertex(-300.0, 0.0), Vertex(300.0, 0.0))),
                          Centerline("twy-2", "B", (Vertex(0.0, -300.0), Vertex(0.0, 300.0))))
    window = make_window(layout, analyze=LayoutAnalyzer().analyze)
    window.canvas.zoom_to(0.0, 0.0, 400.0)
    click(qtbot, window, 0.0, 0.0)
    panel = window.junction_panel
    row = next(r for r in range(panel.movements.rowCount())
               if panel.movements.item(r, 1).text() not in ("+0.0", "-0.0"))
    panel.movements.selectRow(row)
    assert panel.radius_button.isEnabled()
    # 90 m: the layout's own units are metres
    monkeypatch.setattr(Messages, "ask_radius", lambda self, prompt, current: 90.0)
    panel.radius_button.click()
    settle(window)
    (override,) = window.document.layout.turn_radius_overrides_m
    assert override[1] == pytest.approx(90.0)
    (junction,) = window.result.junctions.values()
    assert sum(1 for m in junction.movements if m.radius_m == pytest.approx(90.0)) == 2  # both directions
    window.actions_.undo.trigger()
    settle(window)
    assert window.document.layout == layout
