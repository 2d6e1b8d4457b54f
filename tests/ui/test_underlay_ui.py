"""Underlays in the window (app/ui/underlay_controller.py, underlay_items.py, placement_dialog.py,
panels/underlay_panel.py), offscreen with pytest-qt.

Check values: world-file C, F are the centre of the upper-left pixel (GDAL, "WLD -- ESRI World
File" driver page), so an ``ImageItem`` pixel centre (u = col + 0.5) maps there (identity);
1 ft = 0.3048 m exactly (identity). Other expectations follow from the modules' definitions.
"""

from pathlib import Path

import numpy as np
import pyqtgraph as pg
import pytest
from PySide6 import QtCore, QtGui

from app.fileio.raster_image import ImageInfo, probe_image
from app.model.document import Document
from app.model.elements import Layout
from app.model.tools import PointerEvent
from app.model.underlays import Placement, Underlay
from app.ui.main_window import MainWindow
from app.ui.placement_dialog import TwoPointDialog
from app.ui.underlay_controller import UnderlayController, install_underlays
from app.ui.underlay_items import UNDERLAY_Z, ImagePixels
from tests.app.test_underlay_dxf import make_drawing, write_many_entities

FT = 0.3048  # identity: the international foot
WORLD_FILE = "0.5\n0.0\n0.0\n-0.5\n100.25\n200.75\n"  # fictional half-metre aerial


@pytest.fixture
def window(qtbot, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> MainWindow:
    monkeypatch.setenv("TAXIWRIGHT_STATE_DIR", str(tmp_path / "state"))
    settings = QtCore.QSettings(str(tmp_path / "settings.ini"), QtCore.QSettings.Format.IniFormat)
    win = MainWindow(Document(Layout(units="ft")), None, settings)
    monkeypatch.setattr(win.messages, "error",
                        lambda title, text: win.messages.history.append(("error", text)))
    monkeypatch.setattr(win.messages, "ask_save_changes", lambda name: "discard")
    install_underlays(win)
    qtbot.addWidget(win)
    return win


def controller_of(window: MainWindow) -> UnderlayController:
    found = window.findChild(UnderlayController)
    assert found is not None
    return found


def imported(window: MainWindow, path: Path) -> UnderlayController:
    controller = controller_of(window)
    controller.import_drawing(path)
    assert controller.view.content.wait()
    return controller


def curves(window: MainWindow) -> list[pg.PlotCurveItem]:
    """The underlay curves in the plan view (the picked-outline highlight is not one of them)."""
    return [item for item in window.canvas.view_box.childGroup.childItems()
            if isinstance(item, pg.PlotCurveItem) and item.zValue() < 0]


def write_png(path: Path, width: int, height: int, fmt: str = "PNG") -> Path:
    image = QtGui.QImage(width, height, QtGui.QImage.Format.Format_RGB32)
    image.fill(QtGui.QColor("#3a7d44"))
    assert image.save(str(path), fmt)
    return path


# --- installing --------------------------------------------------------------------------------------

def test_install_adds_the_panel_and_the_import_actions(window: MainWindow) -> None:
    assert controller_of(window).panel.parent() is window
    file_menu = next(a.menu() for a in window.menuBar().actions() if a.text() == "&File")
    texts = [a.text() for a in file_menu.actions()]
    assert texts.index("Import base &drawing…") < texts.index("&Quit")
    assert "Import aerial &image…" in texts


def test_the_file_menu_action_imports_a_drawing(window: MainWindow, tmp_path: Path,
                                                monkeypatch: pytest.MonkeyPatch) -> None:
    controller = controller_of(window)
    monkeypatch.setattr(controller, "ask_drawing_path", lambda: make_drawing(tmp_path / "base.dxf"))
    file_menu = next(a.menu() for a in window.menuBar().actions() if a.text() == "&File")
    next(a for a in file_menu.actions() if a.text() == "Import base &drawing…").trigger()
    assert controller.view.content.wait()
    assert [u.name for u in window.document.layout.underlays] == ["base.dxf"]


# --- base drawings -----------------------------------------------------------------------------------

def test_a_drawing_is_one_locked_dimmed_curve_per_layer_under_the_layout(window: MainWindow,
                                                                         tmp_path: Path) -> None:
    imported(window, make_drawing(tmp_path / "base.dxf"))
    (underlay,) = window.document.layout.underlays
    assert underlay.locked and underlay.opacity < 1.0 and underlay.hidden_layers == frozenset({"OFFLAYER"})
    drawn = curves(window)
    assert len(drawn) == 6  # EDGE, APRON, ARCS, HATCHED, MARKS, OFFLAYER (TEXT has no lines)
    assert all(UNDERLAY_Z <= c.zValue() < 0 for c in drawn)
    edge = next(c for c in drawn if c.xData is not None and len(c.xData) == 2)
    assert edge.xData.tolist() == [0.0, 100 * FT]  # feet in the file, metres on the plan (identity)
    assert window.document.stack.undo_label == "Import base drawing base.dxf"
    assert any("feet ($INSUNITS 2)" in text for _, text in window.messages.history)


def test_a_large_drawing_stays_a_few_batched_items(window: MainWindow, tmp_path: Path) -> None:
    write_many_entities(tmp_path / "many.dxf", 3000)
    controller = imported(window, tmp_path / "many.dxf")
    (graphics,) = [g for _, g in controller.view.graphics.values()]
    assert len(graphics.items) == 10  # one curve per DXF layer, not one item per entity
    assert "3,000 entities" in controller.panel.info.text()


def test_show_hide_lock_remove_and_undo(window: MainWindow, tmp_path: Path) -> None:
    controller = imported(window, make_drawing(tmp_path / "base.dxf"))
    panel, document = controller.panel, window.document
    panel.list.item(0).setCheckState(QtCore.Qt.CheckState.Unchecked)
    assert not document.layout.underlays[0].visible
    items = [item for _, graphics in controller.view.graphics.values() for item in graphics.items.values()]
    assert not any(item.isVisible() for item in items)
    document.undo()
    assert document.layout.underlays[0].visible
    assert not panel.remove.isEnabled()
    controller.remove("ulay-1")
    assert len(document.layout.underlays) == 1 and "locked" in window.messages.history[-1][1]
    panel.locked.setChecked(False)
    panel.remove.click()
    assert document.layout.underlays == () and controller.view.graphics == {}
    document.undo()
    assert len(document.layout.underlays) == 1


def test_layers_opacity_and_order(window: MainWindow, tmp_path: Path) -> None:
    controller = imported(window, make_drawing(tmp_path / "base.dxf"))
    controller.import_drawing(make_drawing(tmp_path / "second.dxf"))
    assert controller.view.content.wait()
    panel, document = controller.panel, window.document
    assert panel.row_texts()[0].startswith("second.dxf")  # the top of the list is drawn on top
    panel.list.setCurrentRow(1)  # base.dxf, the lower one
    rows = [panel.layers.item(i) for i in range(panel.layers.count())]
    apron = next(row for row in rows if row.text().startswith("APRON"))
    apron.setCheckState(QtCore.Qt.CheckState.Unchecked)
    assert "APRON" in document.layout.underlays[0].hidden_layers
    assert not controller.view.graphics["ulay-1"][1].items["APRON"].isVisible()
    panel.opacity.setValue(30)
    assert document.layout.underlays[0].opacity == pytest.approx(0.3)
    z_before = controller.view.graphics["ulay-1"][1].items["EDGE"].zValue()
    panel.up.click()
    assert [u.name for u in document.layout.underlays] == ["second.dxf", "base.dxf"]
    assert controller.view.graphics["ulay-1"][1].items["EDGE"].zValue() > z_before


def test_picked_outlines_and_a_whole_layer_become_existing_pavement(window: MainWindow,
                                                                    tmp_path: Path) -> None:
    controller = imported(window, make_drawing(tmp_path / "base.dxf"))
    controller.panel.pick.setChecked(True)
    window.canvas.pointer.emit(PointerEvent("press", 50 * FT, 10 * FT, "left"))  # inside the apron strip
    assert len(controller.picked) == 1 and controller.panel.make_pavement.isEnabled()
    window.canvas.pointer.emit(PointerEvent("key", key="Escape"))
    assert not controller.picking
    assert controller.pavement_from_picked()
    (pavement,) = window.document.layout.existing_pavements
    assert max(x for x, _ in pavement.outline) == pytest.approx(110 * FT, abs=0.05)  # the bulged end
    assert controller.pavement_from_layer("ulay-1", "HATCHED")
    hatched = window.document.layout.existing_pavements[1]
    assert len(hatched.holes) == 1 and hatched.id == "pav-2"
    window.document.undo()
    assert len(window.document.layout.existing_pavements) == 1


# --- bad and missing files ---------------------------------------------------------------------------

def test_a_damaged_drawing_is_refused_with_a_message(window: MainWindow, tmp_path: Path) -> None:
    (tmp_path / "bad.dxf").write_bytes(b"not a drawing at all")
    imported(window, tmp_path / "bad.dxf")
    assert window.document.layout.underlays == ()
    assert window.messages.history[-1][0] == "error" and "not a DXF drawing" in window.messages.history[-1][1]


def test_a_missing_underlay_shows_as_missing_and_nothing_is_lost(qtbot, tmp_path: Path,
                                                                 monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("TAXIWRIGHT_STATE_DIR", str(tmp_path / "state"))
    layout = Layout(underlays=(Underlay("ulay-1", "Old base", "drawing", str(tmp_path / "gone.dxf")),))
    settings = QtCore.QSettings(str(tmp_path / "s.ini"), QtCore.QSettings.Format.IniFormat)
    win = MainWindow(Document(layout), None, settings)
    qtbot.addWidget(win)
    install_underlays(win)
    controller = controller_of(win)
    assert "MISSING" in controller.panel.row_texts()[0]
    assert "does not exist" in controller.panel.info.text()
    assert any("Locate file" in text for _, text in win.messages.history)
    assert win.document.layout == layout and not win.document.is_dirty
    controller.locate("ulay-1", make_drawing(tmp_path / "found.dxf"))
    assert controller.view.content.wait()
    assert "MISSING" not in controller.panel.row_texts()[0] and controller.view.graphics


# --- images ------------------------------------------------------------------------------------------

def test_an_image_with_a_world_file_is_placed_by_it(window: MainWindow, tmp_path: Path) -> None:
    image = write_png(tmp_path / "aerial.png", 4, 2)
    (tmp_path / "aerial.pgw").write_text(WORLD_FILE)
    controller = controller_of(window)
    controller.import_image(image)
    assert controller.view.content.wait()
    (underlay,) = window.document.layout.underlays
    # World-file terms are read in the layout's units, feet here (1 ft = 0.3048 m, identity).
    assert underlay.placement == Placement(0.5 * FT, 0.0, 0.0, -0.5 * FT, 100.25 * FT, 200.75 * FT)
    item = controller.view.graphics[underlay.id][1].items[""]
    assert isinstance(item, pg.ImageItem)
    centre = item.transform().map(QtCore.QPointF(0.5, 0.5))  # centre of the upper-left pixel
    assert (centre.x(), centre.y()) == pytest.approx((100.25 * FT, 200.75 * FT))
    corner = item.transform().map(QtCore.QPointF(4.0, 2.0))  # outer lower-right corner
    assert (corner.x(), corner.y()) == pytest.approx((102.0 * FT, 200.0 * FT))


def test_an_image_without_placement_asks_for_two_points(window: MainWindow, tmp_path: Path,
                                                        monkeypatch: pytest.MonkeyPatch) -> None:
    image = write_png(tmp_path / "photo.png", 20, 10)
    controller = controller_of(window)
    monkeypatch.setattr(controller, "ask_two_points", lambda path, info, units: None)
    controller.import_image(image)
    assert window.document.layout.underlays == ()
    assert "was not imported" in window.messages.history[-1][1]
    placement = Placement(1.0, 0.0, 0.0, -1.0, 0.0, 0.0)
    monkeypatch.setattr(controller, "ask_two_points", lambda path, info, units: placement)
    controller.import_image(image)
    assert window.document.layout.underlays[0].placement == placement


def test_two_point_dialog_places_by_clicked_points_and_typed_coordinates(qtbot, tmp_path: Path) -> None:
    image = write_png(tmp_path / "photo.png", 40, 20)
    dialog = TwoPointDialog(image, ImageInfo("PNG", 40, 20), "ft")
    qtbot.addWidget(dialog)
    dialog.set_pixel(0, (0.0, 0.0))
    dialog.set_pixel(1, (10.0, 0.0))
    dialog.set_coordinates(0, 100.0, 200.0)
    dialog.set_coordinates(1, 120.0, 200.0)
    dialog.accept()
    assert dialog.placement is not None  # 2 ft pixels, north up (identity)
    assert dialog.placement.terms() == pytest.approx((2 * FT, 0.0, 0.0, -2 * FT, 100 * FT, 200 * FT))


def test_two_point_dialog_refuses_a_single_point(qtbot, tmp_path: Path) -> None:
    dialog = TwoPointDialog(write_png(tmp_path / "p.png", 8, 8), ImageInfo("PNG", 8, 8), "m")
    qtbot.addWidget(dialog)
    dialog.set_pixel(0, (1.0, 1.0))
    dialog.accept()
    assert dialog.placement is None and "two points" in dialog.error.text()


@pytest.mark.parametrize(("fmt", "suffix"), [("PNG", ".png"), ("JPEG", ".jpg"), ("TIFF", ".tif")])
def test_header_probe_agrees_with_qt(tmp_path: Path, fmt: str, suffix: str) -> None:
    path = write_png(tmp_path / f"image{suffix}", 37, 23, fmt)
    assert probe_image(path) == ImageInfo(fmt, 37, 23)


def test_image_pixels_keep_their_rows(qtbot, tmp_path: Path) -> None:
    from app.ui.underlay_items import load_image_pixels
    image = QtGui.QImage(3, 2, QtGui.QImage.Format.Format_RGB32)
    image.fill(QtGui.QColor("black"))
    image.setPixelColor(2, 0, QtGui.QColor("red"))  # upper-right pixel
    image.save(str(tmp_path / "tiny.png"))
    pixels = load_image_pixels(str(tmp_path / "tiny.png"))
    assert isinstance(pixels, ImagePixels) and pixels.rgba.shape == (2, 3, 4)
    assert pixels.rgba[0, 2].tolist() == [255, 0, 0, 255] and not np.any(pixels.rgba[1, :, 0])


def test_zoom_to_fit_takes_in_the_shown_underlays(window: MainWindow, tmp_path: Path) -> None:
    controller = imported(window, make_drawing(tmp_path / "base.dxf"))
    bounds = window.fit_bounds()  # the layout is empty: the drawing alone sets the extent
    assert bounds is not None
    xmin, ymin, xmax, ymax = bounds
    # invariant: the drawing's edge line (0 to 100 ft along y = 0) lies within what Zoom to fit shows
    assert xmin <= 0.0 and xmax >= 100 * FT and ymin <= 0.0 <= ymax
    window.canvas.zoom_to(5000.0, 5000.0, 10.0)  # far away from the drawing
    window.zoom_to_fit()
    view = window.canvas.visible_rect_m()
    # invariant: after Zoom to fit the view holds the drawing's edge line
    assert view.contains(QtCore.QPointF(0.0, 0.0)) and view.contains(QtCore.QPointF(100 * FT, 0.0))
    controller.panel.list.item(0).setCheckState(QtCore.Qt.CheckState.Unchecked)
    assert window.fit_bounds() is None  # invariant: a hidden underlay of an empty layout adds nothing
