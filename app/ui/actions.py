"""The window's actions, menus and tool bar, with a keyboard shortcut for every tool and for the
usual file and edit commands. Names are plain words; the main window connects the actions."""

from __future__ import annotations

from PySide6 import QtGui, QtWidgets

from app.ui.tool_controller import TOOL_TABLE

TOOL_NAMES = {"select": "Select", "move": "Move point", "taxiway": "Draw taxiway",
              "taxilane": "Draw taxilane", "runway": "Draw runway", "object": "Place object",
              "insert": "Insert point", "delete_point": "Delete point", "corner": "Corner radius"}
TOOL_TIPS = {"select": "Click to select a line, junction or object; drag a point to move it",
             "move": "Drag a point; every line meeting there moves with it (Alt: this line only)",
             "taxiway": "Click the points of a new taxiway centerline; Enter finishes",
             "taxilane": "Click the points of a new taxilane centerline; Enter finishes",
             "runway": "Click both runway ends, then set the width",
             "object": "Click for a point object, drag for a building outline",
             "insert": "Click on a centerline to add a point", "delete_point": "Click a point to delete it",
             "corner": "Drag away from a corner to round it with an arc"}

Keys = QtGui.QKeySequence.StandardKey


class WindowActions:
    """Every QAction of the main window, created with the window as parent."""

    def __init__(self, window: QtWidgets.QMainWindow) -> None:
        def act(text: str, shortcut: QtGui.QKeySequence | Keys | str | None = None,
                checkable: bool = False, tip: str = "") -> QtGui.QAction:
            action = QtGui.QAction(text, window)
            if shortcut is not None:
                action.setShortcut(QtGui.QKeySequence(shortcut))
            action.setCheckable(checkable)
            action.setStatusTip(tip)
            action.setToolTip(f"{text} ({action.shortcut().toString()})" if shortcut else text)
            return action

        self.new = act("&New", Keys.New)
        self.open = act("&Open…", Keys.Open)
        self.save = act("&Save", Keys.Save)
        self.save_as = act("Save &as…", "Ctrl+Shift+S")
        self.export_dxf = act("&Export DXF…", "Ctrl+E", tip="Write the layout as DXF linework for drafting")
        self.quit = act("&Quit", "Ctrl+Q")
        self.recent_menu = QtWidgets.QMenu("Open &recent", window)
        self.undo = act("&Undo", Keys.Undo)
        self.redo = act("&Redo", "Ctrl+Shift+Z")
        self.redo.setShortcuts([QtGui.QKeySequence("Ctrl+Shift+Z"), QtGui.QKeySequence("Ctrl+Y")])
        self.delete = act("&Delete selected", "Del")
        self.zoom_fit = act("&Zoom to fit", "F", tip="Show the whole layout")
        self.units_ft = act("Show in &feet", "Ctrl+Shift+F", checkable=True)
        self.units_m = act("Show in &metres", "Ctrl+Shift+M", checkable=True)
        self.units_group = QtGui.QActionGroup(window)
        for action in (self.units_ft, self.units_m):
            self.units_group.addAction(action)
        self.dark = act("&Dark background", "Ctrl+Shift+D", checkable=True)
        self.about = act("&About taxiwright")
        self.tools: dict[str, QtGui.QAction] = {}
        self.tool_group = QtGui.QActionGroup(window)
        for key, letter in TOOL_TABLE:
            action = act(TOOL_NAMES[key], letter, checkable=True, tip=TOOL_TIPS[key])
            action.setData(key)
            self.tool_group.addAction(action)
            self.tools[key] = action
        self.tools["select"].setChecked(True)

    def build_menus(self, window: QtWidgets.QMainWindow, panels: list[QtWidgets.QDockWidget]) -> None:
        bar = window.menuBar()
        file_menu = bar.addMenu("&File")
        file_menu.addActions([self.new, self.open])
        file_menu.addMenu(self.recent_menu)
        file_menu.addActions([self.save, self.save_as])
        file_menu.addSeparator()
        file_menu.addAction(self.export_dxf)
        file_menu.addSeparator()
        file_menu.addAction(self.quit)
        edit_menu = bar.addMenu("&Edit")
        edit_menu.addActions([self.undo, self.redo])
        edit_menu.addSeparator()
        edit_menu.addAction(self.delete)
        view_menu = bar.addMenu("&View")
        view_menu.addAction(self.zoom_fit)
        view_menu.addSeparator()
        view_menu.addActions([self.units_ft, self.units_m])
        view_menu.addSeparator()
        view_menu.addAction(self.dark)
        view_menu.addSeparator()
        view_menu.addActions([panel.toggleViewAction() for panel in panels])
        tools_menu = bar.addMenu("&Tools")
        tools_menu.addActions(list(self.tools.values()))
        help_menu = bar.addMenu("&Help")
        help_menu.addAction(self.about)

    def build_tool_bar(self, window: QtWidgets.QMainWindow) -> QtWidgets.QToolBar:
        bar = window.addToolBar("Tools")
        bar.setObjectName("tools")
        bar.setMovable(False)
        bar.setToolButtonStyle(QtGui.Qt.ToolButtonStyle.ToolButtonTextOnly)
        bar.addActions(list(self.tools.values()))
        bar.addSeparator()
        bar.addActions([self.zoom_fit, self.units_ft, self.units_m])
        return bar
