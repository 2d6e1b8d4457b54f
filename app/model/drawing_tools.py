"""Drawing tools (Qt-free state machines): taxiway and taxilane centerlines, runways, objects.

See :mod:`app.model.tools` for the event and intent records these tools share.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import Literal

from app.model import edits
from app.model.elements import XY, Centerline, FixedObject, Layout, Runway, Vertex
from app.model.ids import new_id
from app.model.snapping import COINCIDENT_M, Snap, segment_at, snap
from app.model.tools import (
    Intent,
    PointerEvent,
    Selection,
    Tool,
    ToolContext,
    format_length,
    round_to_display,
    try_edit,
)

# Runway width proposed before the planner sets one (common practice for large-aircraft
# runways, no source; the Properties panel edits it).
DEFAULT_RUNWAY_WIDTH_M = 45.0
DEFAULT_OBJECT_HEIGHT_M = 10.0  # proposed height of a placed object; edited in Properties


class DrawCenterlineTool(Tool):
    """Click vertices; Enter, double-click or right-click finishes; Backspace drops the last."""

    def __init__(self, kind: Literal["taxiway", "taxilane"] = "taxiway") -> None:
        self.kind = kind
        self.name = f"Draw {kind}"
        self.hint = (f"Click the points of the {kind}; Enter or double-click finishes, Backspace "
                     "removes the last point, Esc cancels. Hold Shift to place freely.")
        self.points: list[Snap] = []

    def _landing(self, event: PointerEvent, ctx: ToolContext) -> Snap:
        anchor = self.points[-1].xy if self.points else None
        return snap(event.xy, ctx.layout, ctx.pick_radius_m, free=event.shift, anchor=anchor,
                    reference_deg=self._reference_deg(ctx.layout))

    def _reference_deg(self, layout: Layout) -> float:
        """Angle steps count from the last drawn leg, else from the line the first point is on."""
        if len(self.points) >= 2:
            (x0, y0), (x1, y1) = self.points[-2].xy, self.points[-1].xy
            return math.degrees(math.atan2(y1 - y0, x1 - x0))
        if self.points and self.points[0].kind == "line":
            found = segment_at(layout, self.points[0].xy, COINCIDENT_M)
            if found is not None:
                line = next(c for c in layout.centerlines if c.id == found[0])
                (x0, y0), (x1, y1) = line.vertices[found[1]].xy, line.vertices[found[1] + 1].xy
                return math.degrees(math.atan2(y1 - y0, x1 - x0))
        return 0.0

    def _sketch(self, extra: Snap | None = None) -> tuple[XY, ...]:
        return tuple(p.xy for p in self.points) + ((extra.xy,) if extra is not None else ())

    def on_move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        landing = self._landing(event, ctx)
        status = self.hint
        if self.points:
            (x0, y0), (x1, y1) = self.points[-1].xy, landing.xy
            bearing = (90.0 - math.degrees(math.atan2(y1 - y0, x1 - x0))) % 360.0
            status = f"Leg {format_length(math.hypot(x1 - x0, y1 - y0), ctx.layout)}, bearing {bearing:.1f}°"
        return Intent(sketch=self._sketch(landing), snap=landing, status=status)

    def on_press(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if event.button == "right":
            return self.finish(ctx)
        if event.button != "left":
            return Intent()
        landing = self._landing(event, ctx)
        if not self.points or math.dist(self.points[-1].xy, landing.xy) > COINCIDENT_M:
            self.points.append(landing)
        return Intent(sketch=self._sketch(), snap=landing, status=self.hint)

    def on_double(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        return self.finish(ctx)

    def on_key(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if event.key == "Enter":
            return self.finish(ctx)
        if event.key == "Backspace" and self.points:
            self.points.pop()
            return Intent(sketch=self._sketch(), status=self.hint)
        return Intent()

    def abort(self) -> Intent:
        self.points = []
        return super().abort()

    def finish(self, ctx: ToolContext) -> Intent:
        if len(self.points) < 2:
            return Intent(status="A centerline needs at least 2 points: click more points or press Esc.")
        points, self.points = self.points, []
        line_id = new_id(ctx.layout, "twy")
        number = line_id.rpartition("-")[2]
        line = Centerline(line_id, f"{self.kind.capitalize()} {number}",
                          tuple(Vertex(*p.xy) for p in points), kind=self.kind)
        after = try_edit(lambda: _join_onto_lines(edits.add_centerline(ctx.layout, line), points, line_id))
        if isinstance(after, str):
            return Intent(error=after, sketch=())
        return Intent(commit_label=f"Draw {self.kind}", commit_layout=after, sketch=(), snap=None,
                      select=Selection((line_id,)), status=self.hint)


def _join_onto_lines(layout: Layout, points: list[Snap], new_line_id: str) -> Layout:
    """Give every other centerline a vertex where a new point landed on its side, so lines that
    meet share a vertex (a junction)."""
    for landing in points:
        if landing.kind != "line":
            continue
        others = replace(layout, centerlines=tuple(c for c in layout.centerlines if c.id != new_line_id))
        found = segment_at(others, landing.xy, COINCIDENT_M)
        if found is not None:
            layout = edits.insert_vertex(layout, found[0], found[1] + 1, *landing.xy)
    return layout


def runway_designation(start: XY, end: XY) -> str:
    """Designators from the true bearing (magnetic variation is for the planner to apply)."""
    bearing = (90.0 - math.degrees(math.atan2(end[1] - start[1], end[0] - start[0]))) % 360.0
    first = round(bearing / 10.0) % 36 or 36
    second = (first + 18) % 36 or 36
    return f"{first:02d}/{second:02d}"


class DrawRunwayTool(Tool):
    name = "Draw runway"
    hint = ("Click both runway ends, then move out to set the width and click (Enter keeps "
            f"{DEFAULT_RUNWAY_WIDTH_M:g} m). Esc cancels.")

    def __init__(self) -> None:
        self.ends: list[XY] = []
        self.width_m = DEFAULT_RUNWAY_WIDTH_M

    def _outline(self, width_m: float) -> tuple[XY, ...]:
        (x0, y0), (x1, y1) = self.ends
        length = math.hypot(x1 - x0, y1 - y0)
        nx, ny = -(y1 - y0) / length * width_m / 2.0, (x1 - x0) / length * width_m / 2.0
        return ((x0 + nx, y0 + ny), (x1 + nx, y1 + ny), (x1 - nx, y1 - ny), (x0 - nx, y0 - ny),
                (x0 + nx, y0 + ny))

    def on_move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        landing = snap(event.xy, ctx.layout, ctx.pick_radius_m, free=event.shift,
                       anchor=self.ends[0] if self.ends else None)
        if len(self.ends) < 2:
            return Intent(sketch=(*self.ends, landing.xy), snap=landing, status=self.hint)
        (x0, y0), (x1, y1) = self.ends
        length = math.hypot(x1 - x0, y1 - y0)
        offset = abs((x1 - x0) * (event.y_m - y0) - (y1 - y0) * (event.x_m - x0)) / length
        self.width_m = max(round_to_display(2.0 * offset, ctx.layout, 5.0), 1.0)
        return Intent(sketch=self._outline(self.width_m), snap=None,
                      status=f"Runway width {format_length(self.width_m, ctx.layout)}")

    def on_press(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if event.button != "left":
            return Intent()
        if len(self.ends) == 2:
            return self.finish(ctx)
        landing = snap(event.xy, ctx.layout, ctx.pick_radius_m, free=event.shift,
                       anchor=self.ends[0] if self.ends else None)
        if not self.ends or math.dist(self.ends[0], landing.xy) > ctx.pick_radius_m:
            self.ends.append(landing.xy)
        return Intent(sketch=tuple(self.ends), status=self.hint)

    def on_key(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if event.key == "Enter" and len(self.ends) == 2:
            return self.finish(ctx)
        if event.key == "Backspace" and self.ends:
            self.ends.pop()
            self.width_m = DEFAULT_RUNWAY_WIDTH_M
            return Intent(sketch=tuple(self.ends), status=self.hint)
        return Intent()

    def abort(self) -> Intent:
        self.ends, self.width_m = [], DEFAULT_RUNWAY_WIDTH_M
        return super().abort()

    def finish(self, ctx: ToolContext) -> Intent:
        runway_id = new_id(ctx.layout, "rwy")
        start, end = self.ends
        runway = Runway(runway_id, runway_designation(start, end), (Vertex(*start), Vertex(*end)),
                        self.width_m)
        self.ends, self.width_m = [], DEFAULT_RUNWAY_WIDTH_M
        after = try_edit(lambda: edits.add_runway(ctx.layout, runway))
        if isinstance(after, str):
            return Intent(error=after, sketch=())
        return Intent(commit_label="Draw runway", commit_layout=after, sketch=(),
                      select=Selection((runway_id,)), status=self.hint)


class PlaceObjectTool(Tool):
    name = "Place object"
    hint = "Click to place a point object, or drag a rectangle for a building. Esc cancels."

    def __init__(self) -> None:
        self.corner: XY | None = None
        self.far: XY | None = None

    def on_press(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if event.button == "left":
            self.corner = snap(event.xy, ctx.layout, ctx.pick_radius_m, free=event.shift).xy
            self.far = None
        return Intent()

    def on_move(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        if self.corner is None:
            landing = snap(event.xy, ctx.layout, ctx.pick_radius_m, free=event.shift)
            return Intent(snap=landing, status=self.hint)
        self.far = event.xy
        return Intent(sketch=_rectangle(self.corner, self.far, closed=True), snap=None)

    def on_release(self, event: PointerEvent, ctx: ToolContext) -> Intent:
        corner, far = self.corner, self.far
        self.corner = self.far = None
        if corner is None:
            return Intent()
        big = far is not None and min(abs(far[0] - corner[0]), abs(far[1] - corner[1])) > ctx.pick_radius_m
        object_id = new_id(ctx.layout, "obj")
        number = object_id.rpartition("-")[2]
        obj = (FixedObject(object_id, f"Building {number}", _rectangle(corner, far), DEFAULT_OBJECT_HEIGHT_M)
               if big and far is not None else
               FixedObject(object_id, f"Object {number}", (corner,), DEFAULT_OBJECT_HEIGHT_M, kind="other"))
        after = try_edit(lambda: edits.add_object(ctx.layout, obj))
        if isinstance(after, str):
            return Intent(error=after, sketch=())
        return Intent(commit_label="Place object", commit_layout=after, sketch=(),
                      select=Selection((object_id,)), status=self.hint)

    def abort(self) -> Intent:
        self.corner = self.far = None
        return super().abort()


def _rectangle(a: XY, b: XY, closed: bool = False) -> tuple[XY, ...]:
    ring = ((a[0], a[1]), (b[0], a[1]), (b[0], b[1]), (a[0], b[1]))
    return (*ring, ring[0]) if closed else ring
