"""Pointer tools as Qt-free state machines: plain event records in, :class:`Intent` records out.

The view turns mouse and key events into :class:`PointerEvent` (position in metres, already in
plan coordinates) and applies the returned intents: a live ``preview`` layout during a drag, a
``commit`` as one undoable command, a ``cancel``, the in-progress ``sketch`` line, the ``snap``
cue and a ``status`` sentence. A tool never touches the document, so every tool is tested
without Qt. Snapping (:mod:`app.model.snapping`) is off while Shift is held. Layout edits go
through :mod:`app.model.edits`; a refused edit comes back as ``Intent.error`` with the
planner-facing reason. The drawing tools live in :mod:`app.model.drawing_tools`.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import Literal, Protocol

from app.model import edits
from app.model.edits import EditError
from app.model.elements import XY, Centerline, Layout
from app.model.snapping import PointRef, Snap, element_at, point_at, segment_at, snap
from geometry.units import METRES_PER_FOOT, from_metres

PointerKind = Literal["press", "move", "release", "double", "key"]
MouseButton = Literal["none", "left", "middle", "right"]


@dataclass(frozen=True, slots=True)
class PointerEvent:
    """One pointer or key event; ``key`` is "Enter", "Escape", "Backspace" or "Delete"."""

    kind: PointerKind
    x_m: float = 0.0
    y_m: float = 0.0
    button: MouseButton = "none"
    shift: bool = False  # place freely: no snapping
    alt: bool = False    # move one vertex only, leaving a junction
    key: str = ""

    @property
    def xy(self) -> XY:
        return (self.x_m, self.y_m)


@dataclass(frozen=True, slots=True)
class Selection:
    element_ids: tuple[str, ...] = ()
    vertex: tuple[str, int] | None = None
    junction_id: str | None = None


@dataclass(frozen=True, slots=True)
class ToolContext:
    """What a tool may read: the current layout, the pick radius (a few pixels, in metres at the
    current zoom), junction points from the analysis, and the selection."""

    layout: Layout
    pick_radius_m: float
    junction_points: tuple[tuple[str, XY], ...] = ()
    selection: Selection = Selection()


@dataclass(frozen=True, slots=True)
class Intent:
    preview: Layout | None = None
    commit_label: str | None = None
    commit_layout: Layout | None = None
    cancel: bool = False
    sketch: tuple[XY, ...] | None = None  # None: leave as is; () clears
    snap: Snap | None = None
    status: str = ""
    error: str = ""
    select: Selection | None = None


class DocumentLike(Protocol):
    @property
    def is_previewing(self) -> bool: ...
    def begin_preview(self) -> None: ...
    def preview(self, after: Layout) -> None: ...
    def end_preview(self, label: str) -> None: ...
    def cancel_preview(self) -> bool: ...
    def execute(self, label: str, after: Layout) -> None: ...


def apply_intent(document: DocumentLike, intent: Intent) -> None:
    """Carry the layout part of ``intent`` out on ``document``: a drag is one command at the end."""
    if intent.cancel and document.is_previewing:
        document.cancel_preview()
    if intent.preview is not None:
        if not document.is_previewing:
            document.begin_preview()
        document.preview(intent.preview)
    if intent.commit_label is not None and intent.commit_layout is not None:
        if document.is_previewing:
            document.preview(intent.commit_layout)
            document.end_preview(intent.commit_label)
        else:
            document.execute(intent.commit_label, intent.commit_layout)

def format_length(value_m: float, layout: Layout) -> str:
    return f"{from_metres(value_m, layout.units):,.1f} {layout.units}"


def round_to_display(value_m: float, layout: Layout, step: float) -> float:
    """``value_m`` rounded to ``step`` display units (whole feet, half metres...)."""
    shown = round(from_metres(value_m, layout.units) / step) * step
    return shown * (METRES_PER_FOOT if layout.units == "ft" else 1.0)


def try_edit(build: Callable[[], Layout]) -> Layout | str:
    try:
        return build()
    except EditError as error:
        return str(error)



# --- tools ------------------------------------------------------------------------------------

class Tool:
    """Base: a tool ignores what it does not use. ``abort`` leaves any half-done action."""

    name = "Tool"
    hint = ""

    def handle(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if event.kind == "key" and event.key == "Escape":
            return self.on_escape()
        method = getattr(self, f"on_{event.kind}", None)
        return method(event, ctx) if method is not None else Intent()

    def abort(self) -> Intent:
        return Intent(cancel=True, sketch=(), status=self.hint)

    def on_escape(self) -> Intent:
        return self.abort()


class _PointDrag:
    """A drag of one point: every vertex at it (a junction), or with Alt the first one only."""

    def __init__(self, layout: Layout, where: XY, refs: tuple[PointRef, ...]) -> None:
        self.base, self.where, self.refs = layout, where, refs
        self.last: Layout | None = None
        self.moved_refs = refs
        adjacent = {(element_id, index + offset) for element_id, index in refs for offset in (-1, 0)}
        self.skip_segments = frozenset(adjacent)

    def move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        refs = self.refs[:1] if event.alt else self.refs
        self.moved_refs = refs
        landing = snap(event.xy, self.base, ctx.pick_radius_m, free=event.shift,
                       skip_points=frozenset(self.refs), skip_segments=self.skip_segments)
        after = try_edit(lambda: edits.move_points(self.base, [(e, i, *landing.xy) for e, i in refs]))
        if isinstance(after, str):
            return Intent(error=after)
        self.last = after
        shift = math.dist(self.where, landing.xy)
        return Intent(preview=after, snap=landing, status=f"Moved {format_length(shift, self.base)}")

    def finish(self) -> Intent:
        if self.last is None or self.last == self.base:
            return Intent(cancel=True, snap=None)
        label = "Move junction" if len({e for e, _ in self.moved_refs}) > 1 else "Move point"
        return Intent(commit_label=label, commit_layout=self.last, snap=None)


class MovePointTool(Tool):
    name = "Move point"
    hint = "Drag a point; every line meeting there moves with it (hold Alt to move one line's vertex)."

    def __init__(self) -> None:
        self.drag: _PointDrag | None = None

    def on_press(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if event.button != "left":
            return Intent()
        found = point_at(ctx.layout, event.xy, ctx.pick_radius_m)
        self.drag = _PointDrag(ctx.layout, *found) if found is not None else None
        return Intent()

    def on_move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if self.drag is not None:
            return self.drag.move(event, ctx)
        hovered = point_at(ctx.layout, event.xy, ctx.pick_radius_m)
        return Intent(snap=Snap("vertex", hovered[0]) if hovered else None, status=self.hint)

    def on_release(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        drag, self.drag = self.drag, None
        return drag.finish() if drag is not None else Intent()

    def abort(self) -> Intent:
        self.drag = None
        return super().abort()


class SelectTool(MovePointTool):
    name = "Select"
    hint = "Click a line, junction or object to select it; drag a point to move it."

    def on_release(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        moved = self.drag is not None and self.drag.last is not None
        intent = super().on_release(event, ctx)
        return intent if moved else replace(intent, select=pick_selection(ctx, event.xy))

    def on_escape(self) -> Intent:
        """Esc leaves a drag; with nothing going on it clears the selection."""
        busy = self.drag is not None
        intent = self.abort()
        return intent if busy else replace(intent, select=Selection())


def pick_selection(ctx: ToolContext, xy: XY) -> Selection:
    """What a click at ``xy`` selects: a junction (with the vertex there), a vertex, an element."""
    radius = ctx.pick_radius_m
    junctions = [(math.dist(p, xy), jid) for jid, p in ctx.junction_points if math.dist(p, xy) <= radius]
    junction_id = min(junctions)[1] if junctions else None
    found = point_at(ctx.layout, xy, radius)
    if found is not None:
        line_ids = {line.id for line in ctx.layout.centerlines}
        refs = sorted(found[1], key=lambda ref: ref[0] not in line_ids)  # centerlines first
        return Selection((refs[0][0],), refs[0], junction_id)
    element_id = element_at(ctx.layout, xy, radius)
    return Selection((element_id,) if element_id else (), None, junction_id)

class InsertPointTool(Tool):
    name = "Insert point"
    hint = "Click on a centerline to add a point there."

    def on_move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        found = segment_at(ctx.layout, event.xy, ctx.pick_radius_m)
        return Intent(snap=Snap("line", found[2], element_id=found[0]) if found else None, status=self.hint)

    def on_press(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        found = segment_at(ctx.layout, event.xy, ctx.pick_radius_m) if event.button == "left" else None
        if found is None:
            return Intent(status="Click on a centerline to insert a point.")
        line_id, segment, xy = found
        after = try_edit(lambda: edits.insert_vertex(ctx.layout, line_id, segment + 1, *xy))
        if isinstance(after, str):
            return Intent(error=after)
        return Intent(commit_label="Insert point", commit_layout=after,
                      select=Selection((line_id,), (line_id, segment + 1)), status=self.hint)


class DeletePointTool(Tool):
    name = "Delete point"
    hint = "Click a centerline point to delete it (a line keeps at least 2 points)."

    def on_move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        found = self._refs(ctx, event.xy)
        return Intent(snap=Snap("vertex", found[0]) if found else None, status=self.hint)

    def _refs(self, ctx: ToolContext, xy: XY) -> tuple[XY, list[PointRef]] | None:
        line_ids = {c.id for c in ctx.layout.centerlines}
        found = point_at(ctx.layout, xy, ctx.pick_radius_m)
        refs = [ref for ref in found[1] if ref[0] in line_ids] if found else []
        return (found[0], refs) if found and refs else None

    def on_press(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        found = self._refs(ctx, event.xy) if event.button == "left" else None
        if found is None:
            return Intent(status="Click on a centerline point to delete it.")

        def delete_all() -> Layout:
            layout = ctx.layout
            for line_id, index in found[1]:
                layout = edits.delete_vertex(layout, line_id, index)
            return layout

        after = try_edit(delete_all)
        if isinstance(after, str):
            return Intent(error=after)
        return Intent(commit_label="Delete point", commit_layout=after, select=Selection(), status=self.hint)


def corner_turn_rad(line: Centerline, index: int) -> float:
    """Change of heading at interior vertex ``index`` (0 for an end or a straight-through point)."""
    if not 0 < index < len(line.vertices) - 1:
        return 0.0
    (x0, y0), (x1, y1), (x2, y2) = (line.vertices[i].xy for i in (index - 1, index, index + 1))
    a, b = math.atan2(y1 - y0, x1 - x0), math.atan2(y2 - y1, x2 - x1)
    return math.remainder(b - a, 2.0 * math.pi)


def radius_through(line: Centerline, index: int, xy: XY) -> float | None:
    """The corner radius whose arc passes ``xy``'s distance from the vertex at the arc's middle:
    external distance E = R (sec(turn/2) - 1) (identity of a circular curve)."""
    turn = abs(corner_turn_rad(line, index))
    if turn < math.radians(1.0):
        return None
    distance = math.dist(xy, line.vertices[index].xy)
    return distance / (1.0 / math.cos(turn / 2.0) - 1.0)


class CornerRadiusTool(Tool):
    name = "Corner radius"
    hint = "Drag away from a corner point to round it; click a corner to type its radius in Properties."

    def __init__(self) -> None:
        self.corner: tuple[Layout, Centerline, int] | None = None
        self.last: Layout | None = None

    def on_press(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        found = point_at(ctx.layout, event.xy, ctx.pick_radius_m) if event.button == "left" else None
        lines = {c.id: c for c in ctx.layout.centerlines}
        corners = [(lines[e], i) for e, i in (found[1] if found else ()) if e in lines
                   and corner_turn_rad(lines[e], i) != 0.0]
        self.corner = (ctx.layout, *corners[0]) if corners else None
        self.last = None
        return Intent() if corners else Intent(status="Press on a corner point (not a line end).")

    def on_move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if self.corner is None:
            return Intent(status=self.hint)
        base, line, index = self.corner
        radius = radius_through(line, index, event.xy)
        if radius is None:
            return Intent(status="This point is straight: there is no corner to round.")
        radius = max(round_to_display(radius, base, 1.0), 1.0)
        after = try_edit(lambda: edits.set_corner_radius(base, line.id, index, radius))
        if isinstance(after, str):
            return Intent(error=after)
        self.last = after
        return Intent(preview=after, status=f"Corner radius {format_length(radius, base)}")

    def on_release(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        corner, last = self.corner, self.last
        self.corner = self.last = None
        if corner is None:
            return Intent()
        if last is None:
            return Intent(select=Selection((corner[1].id,), (corner[1].id, corner[2])), status=self.hint)
        return Intent(commit_label="Set corner radius", commit_layout=last, status=self.hint)

    def abort(self) -> Intent:
        self.corner = self.last = None
        return super().abort()
