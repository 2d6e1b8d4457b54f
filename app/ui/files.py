"""New, Open, Save, Save As, recent files, autosave to a recovery file, and the question before
unsaved work is dropped. File formats live in :mod:`app.fileio`; this module only decides when
to read and write and tells the planner through :mod:`app.ui.messages`."""

from __future__ import annotations

from pathlib import Path

from PySide6 import QtCore

from app.fileio.atomic import FileWriteError
from app.fileio.layout_json import LayoutFileError, load_layout, save_layout
from app.fileio.recovery import discard_recovery, find_recovery, write_recovery
from app.model.document import Document
from app.model.elements import Layout
from app.ui.messages import Messages

AUTOSAVE_INTERVAL_MS = 30_000
MAX_RECENT_FILES = 8
RECENT_KEY = "files/recent"
UNTITLED = "Untitled layout"


def display_name(path: Path | None) -> str:
    return path.name if path is not None else UNTITLED


class FileController(QtCore.QObject):
    recent_changed = QtCore.Signal()

    def __init__(self, document: Document, messages: Messages, settings: QtCore.QSettings,
                 parent: QtCore.QObject | None = None) -> None:
        super().__init__(parent)
        self._document = document
        self._messages = messages
        self._settings = settings
        self.autosave_timer = QtCore.QTimer(self)
        self.autosave_timer.setInterval(AUTOSAVE_INTERVAL_MS)
        self.autosave_timer.timeout.connect(self.autosave)
        self.autosave_timer.start()

    # --- recent files ------------------------------------------------------------------------------

    def recent_files(self) -> list[Path]:
        stored = self._settings.value(RECENT_KEY, [])
        entries = [stored] if isinstance(stored, str) else list(stored or [])
        return [Path(entry) for entry in entries if entry]

    def _remember(self, path: Path) -> None:
        absolute = str(path.absolute())
        entries = [absolute] + [str(p) for p in self.recent_files() if str(p) != absolute]
        self._settings.setValue(RECENT_KEY, entries[:MAX_RECENT_FILES])
        self._settings.sync()
        self.recent_changed.emit()

    # --- asking before unsaved work goes ----------------------------------------------------------

    def confirm_discard(self) -> bool:
        """True when the current layout may be replaced or closed (saved, or the planner agreed)."""
        if not self._document.is_dirty:
            return True
        answer = self._messages.ask_save_changes(display_name(self._document.path))
        if answer == "save":
            return self.save()
        if answer == "discard":
            discard_recovery(self._document.path)
            return True
        return False

    # --- actions ---------------------------------------------------------------------------------

    def new(self) -> bool:
        if not self.confirm_discard():
            return False
        self._document.replace_all(Layout(), None)
        return True

    def open(self, path: Path | None = None) -> bool:
        if not self.confirm_discard():
            return False
        if path is None:
            current = self._document.path
            path = self._messages.ask_open_path(str(current.parent) if current else "")
            if path is None:
                return False
        return self.open_path(path)

    def open_path(self, path: Path) -> bool:
        """Open ``path`` without asking about the current layout (the caller did)."""
        try:
            layout = load_layout(path)
        except (LayoutFileError, OSError) as error:
            self._messages.error("Cannot open the layout", str(error))
            return False
        self._document.replace_all(layout, path)
        self._remember(path)
        self.offer_recovery()
        self._messages.note(f"Opened {path.name}")
        return True

    def offer_recovery(self) -> bool:
        """If a recovery copy newer than the file exists, offer it; True if it was taken. The
        recovered layout becomes one undoable change on top of the file, so it shows unsaved."""
        path = self._document.path
        recovery = find_recovery(path)
        if recovery is None:
            return False
        if not self._messages.ask_recover(path, recovery):
            discard_recovery(path)
            return False
        try:
            recovered = load_layout(recovery)
        except (LayoutFileError, OSError) as error:
            self._messages.error("Cannot read the recovery copy", str(error))
            return False
        self._document.execute("Recover unsaved work", recovered)
        return True

    def save(self) -> bool:
        path = self._document.path
        return self.save_as() if path is None else self._write(path)

    def save_as(self) -> bool:
        current = self._document.path
        start = str(current) if current else str(Path.home() / "layout.json")
        path = self._messages.ask_save_path(start)
        return False if path is None else self._write(path)

    def _write(self, path: Path) -> bool:
        previous = self._document.path
        try:
            save_layout(self._document.layout, path)
        except (LayoutFileError, FileWriteError, OSError) as error:
            self._messages.error("Cannot save the layout", str(error))
            return False
        self._document.mark_saved(path)
        discard_recovery(previous)
        discard_recovery(path)
        self._remember(path)
        self._messages.note(f"Saved {path.name}")
        return True

    def autosave(self) -> Path | None:
        """Write the recovery copy when there is unsaved work; its path, or None."""
        if not self._document.is_dirty:
            return None
        try:
            return write_recovery(self._document.layout, self._document.path)
        except (FileWriteError, OSError) as error:
            self._messages.warn(f"Autosave failed: {error}")
            return None
