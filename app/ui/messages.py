"""The one place where the window tells the planner something or asks a question.

Transient notes and refused edits go to the status line; errors that stop an action (a file that
will not open) get a dialog. Every dialog goes through a method of :class:`Messages`, so a test
replaces that method instead of facing a modal box.
"""

from __future__ import annotations

from pathlib import Path
from typing import Literal

from PySide6 import QtCore, QtWidgets

SaveAnswer = Literal["save", "discard", "cancel"]
NOTE_MS = 8000  # how long a note stays on the status line


class Messages(QtCore.QObject):
    status_changed = QtCore.Signal(str, str)  # text, level ("note" or "warning")

    def __init__(self, window: QtWidgets.QWidget, status_label: QtWidgets.QLabel) -> None:
        super().__init__(window)
        self._window = window
        self._label = status_label
        self._clear_timer = QtCore.QTimer(self)
        self._clear_timer.setSingleShot(True)
        self._clear_timer.timeout.connect(lambda: self._show("", "note"))
        self.history: list[tuple[str, str]] = []  # every message, for the record and for tests

    def _show(self, text: str, level: str) -> None:
        colour = "#c92a2a" if level == "warning" else ""
        self._label.setStyleSheet(f"color: {colour};" if colour else "")
        self._label.setText(text)
        self.status_changed.emit(text, level)

    def hint(self, text: str) -> None:
        """A standing hint of the active tool (stays until replaced)."""
        self._clear_timer.stop()
        self._show(text, "note")

    def note(self, text: str) -> None:
        self.history.append(("note", text))
        self._show(text, "note")
        self._clear_timer.start(NOTE_MS)

    def warn(self, text: str) -> None:
        """Something was refused or could not be computed; the work goes on."""
        self.history.append(("warning", text))
        self._show(text, "warning")
        self._clear_timer.start(NOTE_MS)

    def error(self, title: str, text: str) -> None:
        """An action failed (a file did not open or save): a dialog the planner must close."""
        self.history.append(("error", f"{title}: {text}"))
        QtWidgets.QMessageBox.critical(self._window, title, text)

    def ask_save_changes(self, name: str) -> SaveAnswer:
        box = QtWidgets.QMessageBox(QtWidgets.QMessageBox.Icon.Question, "Unsaved changes",
                                    f"Save the changes to {name} before closing it?",
                                    parent=self._window)
        buttons = QtWidgets.QMessageBox.StandardButton
        box.setStandardButtons(buttons.Save | buttons.Discard | buttons.Cancel)
        box.setDefaultButton(buttons.Save)
        answer = box.exec()
        if answer == buttons.Save:
            return "save"
        return "discard" if answer == buttons.Discard else "cancel"

    def ask_recover(self, layout_path: Path | None, recovery_path: Path) -> bool:
        name = layout_path.name if layout_path is not None else "an untitled layout"
        answer = QtWidgets.QMessageBox.question(
            self._window, "Recover unsaved work",
            f"There is a recovery copy of {name} newer than the file ({recovery_path.name}).\n"
            "Open the recovered work? (It stays unsaved until you save it.)")
        return answer == QtWidgets.QMessageBox.StandardButton.Yes

    def ask_open_path(self, start_dir: str) -> Path | None:
        path, _ = QtWidgets.QFileDialog.getOpenFileName(
            self._window, "Open layout", start_dir, "taxiwright layouts (*.json);;All files (*)")
        return Path(path) if path else None

    def ask_save_path(self, start: str) -> Path | None:
        path, _ = QtWidgets.QFileDialog.getSaveFileName(
            self._window, "Save layout as", start, "taxiwright layouts (*.json)")
        if not path:
            return None
        chosen = Path(path)
        return chosen if chosen.suffix else chosen.with_suffix(".json")

    def ask_radius(self, prompt: str, current: float) -> float | None:
        value, accepted = QtWidgets.QInputDialog.getDouble(self._window, "Turn radius", prompt, current,
                                                           0.0, 1e5, 2)
        return value if accepted else None

    def about(self, title: str, html: str) -> None:
        QtWidgets.QMessageBox.about(self._window, title, html)
