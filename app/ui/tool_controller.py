"""Feeds the canvas' pointer events to the active tool and carries out the intents it returns:
the document for layout changes, the overlay for the sketch and snap cue, the status line, and
the selection (which this controller owns)."""

from __future__ import annotations

from PySide6 import QtCore

from app.model.document import Document
from app.model.drawing_tools import DrawCenterlineTool, DrawRunwayTool, PlaceObjectTool
from app.model.edits import EditError
from app.model.elements import XY, Layout
from app.model.ids import element_ids
from app.model.tools import (
    CornerRadiusTool,
    DeletePointTool,
    InsertPointTool,
    Intent,
    MovePointTool,
    PointerEvent,
    Selection,
    SelectTool,
    Tool,
    ToolContext,
    apply_intent,
)
from app.ui.canvas import PlanCanvas
from app.ui.messages import Messages

# Tool key, the tool, and its shortcut (a single letter, shown in menus and tooltips).
TOOL_TABLE: tuple[tuple[str, str], ...] = (
    ("select", "S"), ("move", "M"), ("taxiway", "T"), ("taxilane", "L"), ("runway", "R"),
    ("object", "O"), ("insert", "I"), ("delete_point", "X"), ("corner", "C"))
DRAGGING_TOOLS = frozenset({"select", "move", "corner"})


def make_tools() -> dict[str, Tool]:
    return {"select": SelectTool(), "move": MovePointTool(), "taxiway": DrawCenterlineTool("taxiway"),
            "taxilane": DrawCenterlineTool("taxilane"), "runway": DrawRunwayTool(),
            "object": PlaceObjectTool(), "insert": InsertPointTool(), "delete_point": DeletePointTool(),
            "corner": CornerRadiusTool()}


class ToolController(QtCore.QObject):
    selection_changed = QtCore.Signal(object)  # Selection
    tool_changed = QtCore.Signal(str)

    def __init__(self, document: Document, canvas: PlanCanvas, messages: Messages) -> None:
        super().__init__(canvas)
        self._document = document
        self._canvas = canvas
        self._messages = messages
        self.tools = make_tools()
        self.active = "select"
        self.selection = Selection()
        self.junction_points: tuple[tuple[str, XY], ...] = ()
        canvas.pointer.connect(self.handle)

    @property
    def tool(self) -> Tool:
        return self.tools[self.active]

    def set_tool(self, key: str) -> None:
        if key == self.active:
            return
        self._apply(self.tool.abort())
        self.active = key
        self._canvas.drag_enabled = key in DRAGGING_TOOLS
        self._messages.hint(self.tool.hint)
        self.tool_changed.emit(key)

    def reset(self) -> None:
        """Drop any half-drawn line and the selection (another layout was opened)."""
        self._apply(self.tool.abort())
        self.set_selection(Selection())

    def context(self) -> ToolContext:
        return ToolContext(self._document.layout, self._canvas.pick_radius_m(), self.junction_points,
                           self.selection)

    def handle(self, event: PointerEvent) -> None:
        self._apply(self.tool.handle(event, self.context()))

    def _apply(self, intent: Intent) -> None:
        try:
            apply_intent(self._document, intent)
        except EditError as error:
            self._messages.warn(str(error))
        overlay = self._canvas.overlay
        if intent.sketch is not None:
            overlay.set_sketch(intent.sketch)
        if intent.snap is not None or intent.sketch == () or intent.commit_label is not None:
            overlay.set_snap(intent.snap)
        if intent.error:
            self._messages.warn(intent.error)
        elif intent.status:
            self._messages.hint(intent.status)
        if intent.select is not None:
            self.set_selection(intent.select)

    def set_selection(self, selection: Selection) -> None:
        if selection != self.selection:
            self.selection = selection
            self.selection_changed.emit(selection)

    def prune_selection(self, layout: Layout, junction_ids: frozenset[str] | None) -> None:
        """Drop selected things that no longer exist (after an undo or a delete)."""
        alive = element_ids(layout)
        kept = tuple(i for i in self.selection.element_ids if i in alive)
        vertex = self.selection.vertex
        if vertex is not None and (vertex[0] not in alive or not _has_vertex(layout, *vertex)):
            vertex = None
        junction = self.selection.junction_id
        if junction is not None and junction_ids is not None and junction not in junction_ids:
            junction = None
        self.set_selection(Selection(kept, vertex, junction))


def _has_vertex(layout: Layout, element_id: str, index: int) -> bool:
    for line in (*layout.centerlines, *layout.runways):
        if line.id == element_id:
            return index < len(line.vertices)
    return True
