"""Pointer tools as state machines, without Qt: events in, intents out, applied to a Document."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.model.document import Document
from app.model.drawing_tools import (
    DEFAULT_RUNWAY_WIDTH_M,
    DrawCenterlineTool,
    DrawRunwayTool,
    PlaceObjectTool,
    runway_designation,
)
from app.model.elements import Centerline, FixedObject, Layout, Runway, Vertex
from app.model.snapping import point_at, segment_at, snap
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
    radius_through,
)

PICK_M = 2.0


def line(line_id: str, *points: tuple[float, float], kind: str = "taxiway") -> Centerline:
    return Centerline(line_id, line_id, tuple(Vertex(x, y) for x, y in points), kind=kind)  # type: ignore[arg-type]


def tee_layout() -> Layout:
    """A through line along y = 0 with a vertex at the origin and a stem ending there (a junction)."""
    return Layout(units="m", centerlines=(line("twy-1", (-100.0, 0.0), (0.0, 0.0), (100.0, 0.0)),
                                          line("twy-2", (0.0, 0.0), (0.0, 80.0))))


def press(x: float, y: float, **kw: object) -> PointerEvent:
    return PointerEvent("press", x, y, "left", **kw)  # type: ignore[arg-type]


def move(x: float, y: float, **kw: object) -> PointerEvent:
    return PointerEvent("move", x, y, "left", **kw)  # type: ignore[arg-type]


def release(x: float, y: float) -> PointerEvent:
    return PointerEvent("release", x, y, "left")


def key(name: str) -> PointerEvent:
    return PointerEvent("key", key=name)


def feed(tool: Tool, document: Document, *events: PointerEvent, junctions=()) -> list[Intent]:
    intents = []
    for event in events:
        intent = tool.handle(event, ToolContext(document.layout, PICK_M, junctions))
        apply_intent(document, intent)
        intents.append(intent)
    return intents


# --- drawing ----------------------------------------------------------------------------------

def test_clicks_and_enter_draw_one_centerline_as_one_command() -> None:
    document = Document(Layout(units="m"))
    tool = DrawCenterlineTool()
    feed(tool, document, press(0, 0), release(0, 0), press(50, 3), release(50, 3), press(80, 40),
         release(80, 40))
    assert document.layout.centerlines == ()  # nothing is committed before the line is finished
    intents = feed(tool, document, key("Enter"))
    (drawn,) = document.layout.centerlines
    assert [v.xy for v in drawn.vertices] == [(0.0, 0.0), (50.0, 3.0), (80.0, 40.0)]
    assert drawn.kind == "taxiway" and drawn.id == "twy-1"
    assert intents[-1].select == Selection(("twy-1",))
    assert document.stack.undo_label == "Draw taxiway"
    document.undo()
    assert document.layout == Layout(units="m")


def test_backspace_drops_the_last_point_and_escape_cancels() -> None:
    document = Document(Layout(units="m"))
    tool = DrawCenterlineTool("taxilane")
    feed(tool, document, press(0, 0), press(40, 10, shift=True), press(90, 50), key("Backspace"))
    intents = feed(tool, document, PointerEvent("double", 40, 10, "left", shift=True))
    (drawn,) = document.layout.centerlines
    assert [v.xy for v in drawn.vertices] == [(0.0, 0.0), (40.0, 10.0)]  # double-click on the last point
    assert drawn.kind == "taxilane" and intents[-1].commit_label == "Draw taxilane"
    feed(tool, document, press(0, 200), press(30, 230))
    intents = feed(tool, document, key("Escape"))
    assert intents[-1].sketch == () and intents[-1].cancel
    feed(tool, document, key("Enter"))
    assert len(document.layout.centerlines) == 1


def test_finishing_with_one_point_asks_for_more() -> None:
    document = Document(Layout(units="m"))
    tool = DrawCenterlineTool()
    intents = feed(tool, document, press(0, 0), key("Enter"))
    assert intents[-1].commit_label is None and "at least 2 points" in intents[-1].status


def test_a_line_started_on_another_line_gives_that_line_a_shared_vertex() -> None:
    document = Document(Layout(units="m", centerlines=(line("twy-1", (-100.0, 0.0), (100.0, 0.0)),)))
    tool = DrawCenterlineTool()
    feed(tool, document, press(30.0, 1.2), press(30.0, 60.0), key("Enter"))
    through, stem = document.layout.centerlines
    assert stem.vertices[0].xy == (30.0, 0.0)  # snapped onto the line (within the pick radius)
    assert [v.xy for v in through.vertices] == [(-100.0, 0.0), (30.0, 0.0), (100.0, 0.0)]


def test_snapping_to_a_vertex_wins_over_a_line_and_shift_places_freely() -> None:
    layout = tee_layout()
    assert snap((1.0, 1.0), layout, PICK_M).kind == "vertex"
    assert snap((1.0, 1.0), layout, PICK_M).xy == (0.0, 0.0)
    on_line = snap((40.0, 1.5), layout, PICK_M)
    assert on_line.kind == "line" and on_line.xy == (40.0, 0.0)
    assert snap((40.0, 1.5), layout, PICK_M, free=True).xy == (40.0, 1.5)


def test_angle_snap_steps_of_15_degrees_from_the_last_leg() -> None:
    # 15-degree steps: the requirement (common practice in drafting, no source).
    landing = snap((100.0, 57.0), Layout(), PICK_M, anchor=(0.0, 0.0))
    heading = math.degrees(math.atan2(landing.xy[1], landing.xy[0]))
    assert landing.kind == "angle" and heading == pytest.approx(30.0)  # 29.68 deg snaps to 30
    assert snap((100.0, 46.7), Layout(), PICK_M, anchor=(0.0, 0.0)).kind == "free"  # 25.03 deg
    relative = snap((100.0, 46.7), Layout(), PICK_M, anchor=(0.0, 0.0), reference_deg=10.0)
    assert math.degrees(math.atan2(relative.xy[1], relative.xy[0])) == pytest.approx(25.0)
    assert relative.kind == "angle" and relative.angle_deg == pytest.approx(15.0)
    far_off = snap((100.0, 50.0), Layout(), PICK_M, anchor=(0.0, 0.0))  # 26.6 deg: 3 m off any ray
    assert far_off.kind == "free"


def test_drawing_follows_the_angle_of_the_previous_leg() -> None:
    document = Document(Layout(units="m"))
    tool = DrawCenterlineTool()
    leg = (100.0 * math.cos(math.radians(10.0)), 100.0 * math.sin(math.radians(10.0)))
    feed(tool, document, press(0, 0, shift=True), press(*leg, shift=True))
    turned = (leg[0] + 50.0 * math.cos(math.radians(99.0)), leg[1] + 50.0 * math.sin(math.radians(99.0)))
    feed(tool, document, press(*turned), key("Enter"))
    vertices = document.layout.centerlines[0].vertices
    last, before = vertices[-1].xy, vertices[1].xy
    heading = math.degrees(math.atan2(last[1] - before[1], last[0] - before[0]))
    assert heading == pytest.approx(100.0)  # 10 + 90 (identity of the relative step)


@settings(max_examples=60, deadline=None)
@given(st.floats(-150.0, 150.0), st.floats(-150.0, 150.0), st.floats(0.5, 10.0))
def test_a_snapped_point_is_never_farther_than_the_pick_radius(x: float, y: float, radius: float) -> None:
    landing = snap((x, y), tee_layout(), radius, anchor=(0.0, 80.0), reference_deg=7.0)
    assert math.dist(landing.xy, (x, y)) <= radius + 1e-9
    if landing.kind == "line":
        assert segment_at(tee_layout(), landing.xy, 1e-6) is not None


# --- moving points -------------------------------------------------------------------------------

def test_dragging_a_junction_moves_every_vertex_on_it_and_undoes_in_one_step() -> None:
    before = tee_layout()
    document = Document(before)
    tool = MovePointTool()
    intents = feed(tool, document, press(0.5, 0.5), move(5.0, 5.0), move(10.0, 20.0), release(10.0, 20.0))
    through, stem = document.layout.centerlines
    assert through.vertices[1].xy == (10.0, 20.0) and stem.vertices[0].xy == (10.0, 20.0)
    assert intents[-1].commit_label == "Move junction"
    assert len(document.stack) == 1
    document.undo()
    assert document.layout == before


def test_alt_moves_one_vertex_and_escape_cancels_a_drag() -> None:
    before = tee_layout()
    document = Document(before)
    tool = MovePointTool()
    feed(tool, document, press(0.0, 0.0), move(0.0, -30.0, alt=True), release(0.0, -30.0))
    through, stem = document.layout.centerlines
    assert through.vertices[1].xy == (0.0, -30.0) and stem.vertices[0].xy == (0.0, 0.0)
    assert document.stack.undo_label == "Move point"
    document.undo()
    feed(tool, document, press(0.0, 80.0), move(20.0, 90.0))
    assert document.is_previewing
    feed(tool, document, key("Escape"))
    assert not document.is_previewing and document.layout == before and len(document.stack) == 1


def test_a_dragged_point_snaps_to_another_vertex_but_not_to_itself() -> None:
    document = Document(tee_layout())
    feed(MovePointTool(), document, press(0.0, 80.0), move(99.0, 1.0), release(99.0, 1.0))
    assert document.layout.centerlines[1].vertices[-1].xy == (100.0, 0.0)


def test_select_click_picks_junction_vertex_line_or_nothing() -> None:
    document = Document(tee_layout())
    tool = SelectTool()
    junctions = (("J1", (0.0, 0.0)),)
    (_, picked) = feed(tool, document, press(0.5, 0.5), release(0.5, 0.5), junctions=junctions)
    assert picked.select is not None and picked.select.junction_id == "J1"
    assert picked.select.vertex in {("twy-1", 1), ("twy-2", 0)}
    (_, on_line) = feed(tool, document, press(50.0, 1.0), release(50.0, 1.0))
    assert on_line.select == Selection(("twy-1",))
    (_, empty) = feed(tool, document, press(50.0, 50.0), release(50.0, 50.0))
    assert empty.select == Selection()
    assert document.stack.can_undo is False  # selecting changes nothing


# --- points and corners --------------------------------------------------------------------------

def test_insert_and_delete_point() -> None:
    document = Document(tee_layout())
    feed(InsertPointTool(), document, press(50.0, 1.0))
    assert [v.xy for v in document.layout.centerlines[0].vertices][2] == (50.0, 0.0)
    assert document.stack.undo_label == "Insert point"
    feed(DeletePointTool(), document, press(50.5, 0.0))
    assert document.layout == tee_layout()
    refused = feed(DeletePointTool(), document, press(0.0, 80.0))[-1]
    assert refused.error and "at least 2" in refused.error and refused.commit_label is None


def test_corner_radius_by_dragging_out_from_the_corner() -> None:
    layout = Layout(units="m", centerlines=(line("twy-1", (0.0, 0.0), (100.0, 0.0), (100.0, 100.0)),))
    document = Document(layout)
    tool = CornerRadiusTool()
    # External distance E = R (sec(turn/2) - 1) of a circular curve (identity); 90-degree turn:
    # E = 10 m gives R = 10 / (sqrt(2) - 1) = 24.14 m, rounded to whole metres.
    assert radius_through(layout.centerlines[0], 1, (100.0 - 10.0 / math.sqrt(2), 10.0 / math.sqrt(2))) == (
        pytest.approx(10.0 / (math.sqrt(2.0) - 1.0)))
    feed(tool, document, press(100.0, 0.0), move(95.0, 5.0), move(92.929, 7.071), release(92.9, 7.1))
    assert document.layout.centerlines[0].vertices[1].corner_radius_m == 24.0
    assert document.stack.undo_label == "Set corner radius" and len(document.stack) == 1
    line_end = feed(tool, document, press(0.0, 0.0))[-1]
    assert "corner" in line_end.status


# --- runways and objects -------------------------------------------------------------------------

def test_runway_by_two_clicks_and_a_width() -> None:
    document = Document(Layout(units="m"))
    tool = DrawRunwayTool()
    feed(tool, document, press(-1000.0, 0.0, shift=True), press(1000.0, 0.0, shift=True), move(0.0, 29.0))
    feed(tool, document, press(0.0, 29.0))
    (runway,) = document.layout.runways
    assert runway.width_m == 60.0  # 2 x 29 m rounded to 5 m steps
    # from memory, verify against ICAO Annex 14 Vol I, runway designation marking
    assert runway.designation == "09/27"
    assert document.stack.undo_label == "Draw runway"


def test_enter_keeps_the_default_runway_width() -> None:
    document = Document(Layout(units="m"))
    feed(DrawRunwayTool(), document, press(0.0, 0.0), press(0.0, 2000.0), key("Enter"))
    assert document.layout.runways[0].width_m == DEFAULT_RUNWAY_WIDTH_M
    assert document.layout.runways[0].designation == "36/18"


def test_runway_designation_rounds_the_bearing_to_tens() -> None:
    # Designators: the nearest tenth of the bearing (from memory, verify against ICAO Annex 14
    # Vol I, runway designation marking); 0 is written 36.
    assert runway_designation((0.0, 0.0), (100.0, -1.0)) == "09/27"
    assert runway_designation((0.0, 0.0), (-100.0, 100.0)) == "32/14"
    assert runway_designation((0.0, 0.0), (1.0, 100.0)) == "36/18"


def test_place_point_object_or_building_outline() -> None:
    document = Document(Layout(units="m"))
    tool = PlaceObjectTool()
    feed(tool, document, press(10.0, 10.0), release(10.0, 10.0))
    feed(tool, document, press(50.0, 50.0), move(60.0, 55.0), move(90.0, 70.0), release(90.0, 70.0))
    point, building = document.layout.objects
    assert point.outline == ((10.0, 10.0),) and isinstance(point, FixedObject)
    assert building.kind == "building" and len(building.outline) == 4
    assert set(building.outline) == {(50.0, 50.0), (90.0, 50.0), (90.0, 70.0), (50.0, 70.0)}


def test_picking_helpers_find_coincident_vertices_and_runway_ends() -> None:
    layout = tee_layout()
    layout = Layout(centerlines=layout.centerlines,
                    runways=(Runway("rwy-1", "09/27", (Vertex(0.0, -300.0), Vertex(500.0, -300.0)), 45.0),))
    where, refs = point_at(layout, (0.3, 0.0), PICK_M) or ((0.0, 0.0), ())
    assert where == (0.0, 0.0) and set(refs) == {("twy-1", 1), ("twy-2", 0)}
    assert point_at(layout, (499.0, -300.5), PICK_M) == ((500.0, -300.0), (("rwy-1", 1),))
    assert point_at(layout, (250.0, 250.0), PICK_M) is None


def test_escape_with_the_select_tool_clears_the_selection_but_a_tool_switch_does_not() -> None:
    tool = SelectTool()
    ctx = ToolContext(tee_layout(), PICK_M, selection=Selection(("twy-1",)))
    assert tool.handle(key("Escape"), ctx).select == Selection()
    assert tool.abort().select is None
