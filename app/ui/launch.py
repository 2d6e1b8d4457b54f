"""Start the window from the command line: ``run(layout_path, screenshot)``.

With ``screenshot`` the window opens on the layout, waits until every derived result is computed
and drawn, saves a picture of the whole window (``QWidget.grab``) as PNG and returns; this works
with ``QT_QPA_PLATFORM=offscreen`` and needs no display.
"""

from __future__ import annotations

import sys
from pathlib import Path

from PySide6 import QtWidgets

from app.fileio.layout_json import LayoutFileError, load_layout
from app.model.document import Document
from app.ui.main_window import Analyze, MainWindow

SCREENSHOT_SIZE = (1600, 1000)
MAX_SETTLE_ROUNDS = 1000  # event-loop passes to wait for recomputes before giving up


def _application() -> QtWidgets.QApplication:
    existing = QtWidgets.QApplication.instance()
    if isinstance(existing, QtWidgets.QApplication):
        return existing
    app = QtWidgets.QApplication([sys.argv[0] if sys.argv else "taxiwright"])
    app.setOrganizationName("taxiwright")
    app.setApplicationName("taxiwright")
    return app


def settle(window: MainWindow) -> bool:
    """Run the event loop until the window shows the current layout; False if it never did."""
    app = _application()
    for _ in range(MAX_SETTLE_ROUNDS):
        app.sendPostedEvents()  # layout requests too: a resize changes the view's scale
        app.processEvents()
        if window.is_settled():
            app.sendPostedEvents()
            app.processEvents()
            return window.is_settled()
    return False


def save_screenshot(window: MainWindow, path: str | Path) -> bool:
    settle(window)
    window.zoom_to_fit()
    settle(window)
    return bool(window.grab().save(str(path), "PNG"))


def run(layout_path: str | None, screenshot: str | None, *, analyze: Analyze | None = None,
        analyze_live: Analyze | None = None) -> int:
    """Open the window (on ``layout_path`` if given). Returns the exit status: 0, or 2 when the
    layout cannot be opened, 1 when the screenshot cannot be written."""
    app = _application()
    document = Document()
    if layout_path is not None:
        try:
            document = Document(load_layout(layout_path), Path(layout_path))
        except (LayoutFileError, OSError) as error:
            print(f"taxiwright: cannot open {layout_path}: {error}", file=sys.stderr)
            return 2
    window = MainWindow(document, analyze, analyze_live=analyze_live)
    if screenshot is not None:
        window.resize(*SCREENSHOT_SIZE)
        window.show()
        saved = save_screenshot(window, screenshot)
        window.close()
        if not saved:
            print(f"taxiwright: cannot write the screenshot {screenshot}", file=sys.stderr)
            return 1
        return 0
    window.show()
    window.files.offer_recovery()
    return int(app.exec())
