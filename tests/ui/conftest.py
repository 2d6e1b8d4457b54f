"""Fixtures of the window tests: no real settings, no real recovery folder, no modal dialogs."""

from __future__ import annotations

from collections.abc import Callable, Iterator
from pathlib import Path

import pytest
from PySide6 import QtCore

from app.model.document import Document
from app.model.elements import Centerline, ExistingPavement, FixedObject, Layout, Runway, Vertex
from app.ui.launch import settle
from app.ui.main_window import Analyze, MainWindow
from app.ui.messages import Messages

UI_TESTS = Path(__file__).parent
# The offscreen platform has no window manager to tell about size limits of a window with docks;
# it says so on every layout pass. That is the platform, not the window: ignore only that line.
OFFSCREEN_SIZE_HINTS = r"This plugin does not support propagateSizeHints\(\)"


def pytest_collection_modifyitems(items: list[pytest.Item]) -> None:
    for item in items:
        if UI_TESTS in Path(str(item.fspath)).parents:
            item.add_marker(pytest.mark.qt_log_ignore(OFFSCREEN_SIZE_HINTS))


@pytest.fixture(autouse=True)
def private_state(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """Recovery copies go to the test's folder; dialogs answer without showing (a test that cares
    sets its own answer on ``window.messages``)."""
    monkeypatch.setenv("TAXIWRIGHT_STATE_DIR", str(tmp_path / "state"))
    monkeypatch.setattr(Messages, "ask_save_changes", lambda self, name: "discard")
    monkeypatch.setattr(Messages, "ask_recover", lambda self, path, recovery: False)
    monkeypatch.setattr(Messages, "ask_open_path", lambda self, start: None)
    monkeypatch.setattr(Messages, "ask_save_path", lambda self, start: None)
    monkeypatch.setattr(Messages, "error", lambda self, title, text: self.history.append(("error", text)))
    monkeypatch.setattr(Messages, "about", lambda self, title, html: self.history.append(("about", html)))


@pytest.fixture
def settings(tmp_path: Path) -> QtCore.QSettings:
    return QtCore.QSettings(str(tmp_path / "settings.ini"), QtCore.QSettings.Format.IniFormat)


def demo_layout() -> Layout:
    """A small fictional field in metres: a runway, a parallel taxiway with two connectors meeting
    it at shared vertices, an apron taxilane with a rounded corner, two objects, an apron."""
    parallel = Centerline("twy-1", "A", tuple(Vertex(x, 190.0) for x in (-600.0, -400.0, 0.0, 400.0, 600.0)))
    return Layout(
        title="Demo field", units="m",
        centerlines=(parallel,
                     Centerline("twy-2", "B1", (Vertex(-400.0, 0.0), Vertex(-400.0, 190.0))),
                     Centerline("twy-3", "B2", (Vertex(400.0, 0.0), Vertex(400.0, 190.0))),
                     Centerline("twy-4", "Apron lane", (Vertex(0.0, 190.0), Vertex(0.0, 320.0, 60.0),
                                                        Vertex(300.0, 420.0)), kind="taxilane")),
        runways=(Runway("rwy-1", "09/27", (Vertex(-700.0, 0.0), Vertex(700.0, 0.0)), 45.0),),
        objects=(FixedObject("obj-1", "Hangar 1", ((150.0, 250.0), (260.0, 250.0), (260.0, 300.0),
                                                   (150.0, 300.0)), 15.0),),
        existing_pavements=(ExistingPavement("pav-1", "Apron", ((-150.0, 340.0), (450.0, 340.0),
                                                                 (450.0, 520.0), (-150.0, 520.0))),))


WindowFactory = Callable[..., MainWindow]


def shown_window(qtbot, settings: QtCore.QSettings, document: Document,  # type: ignore[no-untyped-def]
                 analyze: Analyze | None = None, **options: object) -> MainWindow:
    """A main window on ``document``, shown at a fixed size, its first analysis drawn."""
    window = MainWindow(document, analyze, settings, **options)  # type: ignore[arg-type]
    qtbot.addWidget(window)
    window.resize(1300, 850)
    window.show()
    qtbot.waitExposed(window)
    assert settle(window)  # check value: identity (the first analysis is drawn)
    return window


@pytest.fixture
def make_window(qtbot, settings: QtCore.QSettings) -> Iterator[WindowFactory]:  # type: ignore[no-untyped-def]
    def make(layout: Layout | None = None, path: Path | None = None,
             analyze: Analyze | None = None) -> MainWindow:
        return shown_window(qtbot, settings, Document(layout, path), analyze)

    yield make
