"""Take the screenshots of the user guide (docs/images/*.png) from the sample layouts.

Run from the repository root; it needs no display::

    QT_QPA_PLATFORM=offscreen python docs/scripts/make_screenshots.py            # docs/images/
    QT_QPA_PLATFORM=offscreen python docs/scripts/make_screenshots.py --out DIR  # another folder

Each picture is the real program: the main window opened on a sample layout with the real
analysis (``LayoutAnalyzer().analyze``), waited on until every result is drawn (``settle``), then
set up as a planner would (a junction selected, a movement picked, a finding clicked) and grabbed.
The window's settings come from a throwaway file, so a planner's own choices (dark background)
never leak into the pictures, and recovery copies go to a throwaway folder.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np
import numpy.typing as npt
from PySide6 import QtCore, QtGui, QtWidgets

from app.fileio.layout_json import load_layout
from app.model.analysis import LayoutAnalyzer
from app.model.document import Document
from app.model.tools import Selection
from app.ui.launch import settle
from app.ui.main_window import MainWindow
from geometry.units import to_metres

REPOSITORY = Path(__file__).resolve().parents[2]
SAMPLES = REPOSITORY / "sample_layouts"
DEFAULT_FOLDER = REPOSITORY / "docs" / "images"
WINDOW_SIZE = (1400, 900)
MAX_PNG_BYTES = 400_000  # the brief's limit per picture; larger grabs are scaled down
SCALE_STEP = 0.85


@dataclass(frozen=True)
class Shot:
    """One picture: the sample it opens, and what is done to the window before the grab."""

    file_name: str
    layout_name: str
    arrange: Callable[[MainWindow], None]


# --- arranging the window -------------------------------------------------------------------------

def _narrow_side_panels(window: MainWindow, left_px: int, right_px: int, findings_px: int) -> None:
    horizontal, vertical = QtCore.Qt.Orientation.Horizontal, QtCore.Qt.Orientation.Vertical
    window.resizeDocks([window.layers_panel, window.properties_panel], [left_px, right_px], horizontal)
    window.resizeDocks([window.findings_panel], [findings_px], vertical)


def _zoom_ft(window: MainWindow, x_ft: float, y_ft: float, span_ft: float) -> None:
    window.canvas.zoom_to(to_metres(x_ft, "ft"), to_metres(y_ft, "ft"), to_metres(span_ft, "ft"))


def _select_junction(window: MainWindow, junction_id: str, movement_row: int | None) -> None:
    """Select a junction as a click on its violet ring would, show the inspector, pick a row."""
    window.tools.set_selection(Selection((), None, junction_id))
    settle(window)
    window.junction_panel.raise_()
    if movement_row is not None:
        window.junction_panel.movements.selectRow(movement_row)


def _close(*panels: QtWidgets.QDockWidget) -> None:
    for panel in panels:
        panel.close()


def _panels_in(window: MainWindow, area: QtCore.Qt.DockWidgetArea) -> list[QtWidgets.QDockWidget]:
    panels = window.findChildren(QtWidgets.QDockWidget)
    return [panel for panel in panels if window.dockWidgetArea(panel) == area]


def whole_airfield(window: MainWindow) -> None:
    # The airfield is six times wider than deep: the right-hand panels are closed to give the
    # plan view the width (View menu, or the panel's close button).
    _close(*_panels_in(window, QtCore.Qt.DockWidgetArea.RightDockWidgetArea))
    _narrow_side_panels(window, 230, 300, 150)
    settle(window)
    window.zoom_to_fit()


def junction_inspector(window: MainWindow) -> None:
    # The four-way crossing of A4 and A on Marrowby Field: twelve movements, four fillets.
    _close(window.layers_panel, window.fleet_panel, window.findings_panel)
    _narrow_side_panels(window, 180, 700, 110)
    _select_junction(window, "J:twy-a/twy-a4#0", movement_row=1)
    settle(window)
    _zoom_ft(window, 5000.0, 600.0, 800.0)


def findings_panel(window: MainWindow) -> None:
    _narrow_side_panels(window, 200, 300, 330)
    settle(window)
    window.zoom_to_fit()
    table = window.findings_panel.table
    table.setColumnWidth(2, 760)
    # Click the first error, as a planner would: the window selects what it concerns and zooms.
    window.go_to_finding(window.findings_panel.finding_at_row(0))
    table.selectRow(0)


def _finding_row(window: MainWindow, code: str, element_id: str) -> int:
    panel = window.findings_panel
    for row in range(panel.table.rowCount()):
        finding = panel.finding_at_row(row)
        if finding.code == code and element_id in finding.element_ids:
            return row
    raise LookupError(f"no {code} finding about {element_id}")


def crossover(window: MainWindow) -> None:
    # Crossover B1 between parallels A and B of crossovers.json, with its spacing note clicked.
    _narrow_side_panels(window, 200, 300, 150)
    settle(window)
    row = _finding_row(window, "I-CROSSOVER-SPACING", "twy-b1")
    window.go_to_finding(window.findings_panel.finding_at_row(row))
    window.findings_panel.table.selectRow(row)
    window.findings_panel.table.setColumnWidth(2, 900)
    settle(window)
    _zoom_ft(window, 1500.0, 120.0, 700.0)


def _hide_layers(window: MainWindow, *names: str) -> None:
    """Untick layers in the Layers panel, as a planner would."""
    for name in names:
        window.layers_panel.boxes[name].setChecked(False)


def existing_and_proposed(window: MainWindow) -> None:
    _narrow_side_panels(window, 200, 300, 110)
    _hide_layers(window, "gear_tracks", "wingtip_tracks")
    settle(window)
    # The proposed connector A3 between runway 09/27 and the existing taxiway A.
    _zoom_ft(window, 2_108_000.0, 731_200.0, 900.0)


SHOTS: tuple[Shot, ...] = (
    Shot("main_window.png", "marrowby_field.json", whole_airfield),
    Shot("junction_inspector.png", "marrowby_field.json", junction_inspector),
    Shot("findings.png", "rule_breaker.json", findings_panel),
    Shot("crossover.png", "crossovers.json", crossover),
    Shot("existing_and_proposed.png", "existing_and_proposed.json", existing_and_proposed),
)


# --- taking and saving ------------------------------------------------------------------------------

def _application() -> QtWidgets.QApplication:
    existing = QtWidgets.QApplication.instance()
    if isinstance(existing, QtWidgets.QApplication):
        return existing
    return QtWidgets.QApplication(["taxiwright-screenshots"])


def open_window(layout_path: Path, settings_path: Path) -> MainWindow:
    settings = QtCore.QSettings(str(settings_path), QtCore.QSettings.Format.IniFormat)
    document = Document(load_layout(layout_path), layout_path)
    window = MainWindow(document, LayoutAnalyzer().analyze, settings=settings)
    window.resize(*WINDOW_SIZE)
    window.show()
    if not settle(window):
        raise RuntimeError(f"the window never finished computing {layout_path.name}")
    return window


def palette_image(image: QtGui.QImage, colours: int = 256) -> QtGui.QImage:
    """``image`` with its ``colours`` most frequent colours, every other pixel mapped to the
    nearest of them. A screenshot is mostly flat colour, so text and lines stay sharp and the
    legend's colours exact, at a third of the file size; Qt's own conversion dithers them."""
    rgb = image.convertToFormat(QtGui.QImage.Format.Format_RGB32)
    width, height = rgb.width(), rgb.height()
    pixels = np.frombuffer(rgb.constBits(), dtype=np.uint8).reshape(height, rgb.bytesPerLine() // 4, 4)
    bgr = pixels[:, :width, :3].reshape(-1, 3).astype(np.int64)
    codes = (bgr[:, 2] << 16) | (bgr[:, 1] << 8) | bgr[:, 0]
    unique, counts = np.unique(codes, return_counts=True)
    palette = unique[np.argsort(counts, kind="stable")[::-1][:colours]]

    def channels(code: npt.NDArray[np.int64]) -> npt.NDArray[np.int64]:
        return np.stack([(code >> 16) & 255, (code >> 8) & 255, code & 255], axis=1)

    distance = ((channels(unique)[:, None, :] - channels(palette)[None, :, :]) ** 2).sum(axis=2)
    index = distance.argmin(axis=1).astype(np.uint8)[np.searchsorted(unique, codes)].reshape(height, width)
    indexed = QtGui.QImage(width, height, QtGui.QImage.Format.Format_Indexed8)
    indexed.setColorTable([QtGui.qRgb(int(c >> 16) & 255, int(c >> 8) & 255, int(c) & 255) for c in palette])
    rows = np.zeros((height, indexed.bytesPerLine()), dtype=np.uint8)
    rows[:, :width] = index
    memoryview(indexed.bits())[:] = rows.tobytes()
    return indexed


def save_small_png(image: QtGui.QImage, path: Path) -> int:
    """Save ``image`` as PNG under MAX_PNG_BYTES: full colour if it fits, else with a palette of
    its own colours, else scaled down step by step. Returns the file's size."""
    candidates = [image, palette_image(image)]
    while True:
        for candidate in candidates:
            if not candidate.save(str(path), "PNG"):  # type: ignore[call-overload]
                raise OSError(f"cannot write {path}")
            if path.stat().st_size <= MAX_PNG_BYTES:
                return path.stat().st_size
        smaller = image.scaledToWidth(int(candidates[0].width() * SCALE_STEP),
                                      QtCore.Qt.TransformationMode.SmoothTransformation)
        candidates = [palette_image(smaller)]


def take(shot: Shot, folder: Path, state: Path) -> Path:
    window = open_window(SAMPLES / shot.layout_name, state / "settings.ini")
    try:
        shot.arrange(window)
        settle(window)
        image = window.grab().toImage()
        path = folder / shot.file_name
        size = save_small_png(image, path)
        print(f"{path.relative_to(REPOSITORY) if path.is_relative_to(REPOSITORY) else path}: "
              f"{image.width()} x {image.height()}, {size / 1000:.0f} kB")
        return path
    finally:
        window.files.autosave_timer.stop()
        window.close()


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=DEFAULT_FOLDER, help="folder for the PNG files")
    parser.add_argument("--only", nargs="+", metavar="NAME", help="only these pictures (file names)")
    args = parser.parse_args(argv)
    args.out.mkdir(parents=True, exist_ok=True)
    _application()
    with tempfile.TemporaryDirectory(prefix="taxiwright-shots-") as state:
        os.environ["TAXIWRIGHT_STATE_DIR"] = state  # recovery copies go here, not to the planner's
        for shot in SHOTS:
            if args.only is None or shot.file_name in args.only:
                take(shot, args.out, Path(state))
    return 0


if __name__ == "__main__":
    sys.exit(main())
