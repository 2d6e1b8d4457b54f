"""Undo and redo over every kind of edit (app/model/document.py, commands.py, edits.py).

tests/app/test_document.py already drives vertices, corner radii, removal, translation, drags and
three settings through random sequences. This module adds the edits it leaves out (fleet, title,
turn-radius overrides, element properties, new runways, objects and pavements, junction drags,
underlays) and mixes in undo, redo and saves at random points, against a model of the stack
written from the docstring of app/model/commands.py. Every expected value is an identity of those
docstrings: a command is the layout before and after; merging keeps the first before.
"""

from __future__ import annotations

import contextlib
from collections.abc import Callable, Hashable
from dataclasses import dataclass, field
from typing import Any

from hypothesis import given, settings
from hypothesis import strategies as st

from app.fileio.aircraft_library import load_demo_library
from app.model import edits
from app.model.commands import move_vertex_merge_key
from app.model.document import Document, LayoutChange
from app.model.edits import EditError
from app.model.elements import (
    Centerline,
    DesignGroup,
    ExistingPavement,
    FixedObject,
    Layout,
    Runway,
    Vertex,
    iter_elements,
)
from app.model.ids import new_id
from app.model.underlays import Placement, Underlay

FLEET = load_demo_library()[:4]  # fictional demo aircraft
ORIGINAL = Layout(
    title="Start", units="m",
    centerlines=(Centerline("twy-1", "A", (Vertex(0.0, 0.0), Vertex(300.0, 0.0, 40.0), Vertex(300.0, 300.0))),
                 Centerline("twy-2", "B", (Vertex(150.0, -200.0), Vertex(150.0, 0.0)))),
    runways=(Runway("rwy-1", "09/27", (Vertex(-100.0, -300.0), Vertex(900.0, -300.0)), 45.0),),
    objects=(FixedObject("obj-1", "Mast", ((50.0, 60.0),), 12.0),),
    existing_pavements=(ExistingPavement("pav-1", "Old", ((0.0, -20.0), (80.0, -20.0), (80.0, 20.0))),))

coordinate = st.floats(-400.0, 400.0, allow_nan=False)
element = st.sampled_from(["twy-1", "twy-2", "twy-3", "rwy-1", "obj-1", "pav-1", "ghost"])
line_id = st.sampled_from(["twy-1", "twy-1", "twy-2", "rwy-1"])  # mostly right, sometimes the wrong kind
runway_id = st.sampled_from(["rwy-1", "rwy-2", "twy-1"])
object_id = st.sampled_from(["obj-1", "obj-2", "pav-1"])
pavement_id = st.sampled_from(["pav-1", "pav-2", "obj-1"])
index = st.integers(0, 3)
radius = st.none() | st.sampled_from([0.0, 15.0, 60.0, 500.0])
corner = st.sampled_from(["J:twy-1/twy-2#0|twy-1+~twy-2-", "J:twy-1/twy-2#0|twy-1-~twy-2-", ""])


def _underlay(layout: Layout, name: str, image: bool) -> Underlay:
    placement = Placement(0.5, 0.0, 0.0, -0.5, 10.0, 20.0) if image else None
    return Underlay(f"ulay-{len(layout.underlays) + 1}", name, "image" if image else "drawing",
                    f"/data/{name}.{'png' if image else 'dxf'}", locked=False, placement=placement)


# Each edit: a strategy of arguments and a function (layout, *arguments) -> layout.
EDITS: dict[str, tuple[st.SearchStrategy[tuple[Any, ...]], Callable[..., Layout]]] = {
    "fleet": (st.tuples(st.lists(st.sampled_from(FLEET), max_size=3)), edits.set_fleet),
    "title": (st.tuples(st.text(max_size=5), st.text(max_size=5)), edits.set_title_notes),
    "units": (st.tuples(st.sampled_from(["ft", "m", "yd"])), edits.set_units),
    "rules": (st.tuples(st.sampled_from(["FAA", "ICAO"])), edits.set_rule_set),
    "exclude": (st.tuples(corner, st.booleans()), edits.set_movement_excluded),
    "override": (st.tuples(corner, radius), edits.set_turn_radius_override),
    "corner": (st.tuples(line_id, st.integers(0, 2), radius), edits.set_corner_radius),
    "line": (st.tuples(line_id, st.sampled_from(["taxiway", "taxilane", "road"]),
                       st.sampled_from([None, "2A", "4", "9"]), st.none() | st.floats(-5.0, 40.0)),
             lambda lay, i, kind, tdg, width: edits.update_centerline(
                 lay, i, kind=kind, group=DesignGroup(tdg=tdg), width_override_m=width)),
    "runway": (st.tuples(runway_id, st.floats(0.0, 80.0), st.booleans()),
               lambda lay, i, width, instrument: edits.update_runway(lay, i, width_m=width,
                                                                     instrument=instrument)),
    "object": (st.tuples(object_id, st.floats(-2.0, 50.0), st.sampled_from(["sign", "navaid", "tree"])),
               lambda lay, i, height, kind: edits.update_object(lay, i, height_m=height, kind=kind)),
    "pavement": (st.tuples(pavement_id, st.text(max_size=4)),
                 lambda lay, i, name: edits.update_existing_pavement(
                     lay, i, name=name, holes=(((10.0, -5.0), (20.0, -5.0), (15.0, 5.0)),))),
    "add": (st.tuples(st.sampled_from(["runway", "object", "pavement"]), coordinate, coordinate),
            lambda lay, what, x, y: {
                "runway": lambda: edits.add_runway(lay, Runway(new_id(lay, "rwy"), "18/36",
                                                               (Vertex(x, y), Vertex(x, y + 800.0)), 30.0)),
                "object": lambda: edits.add_object(lay, FixedObject(new_id(lay, "obj"), "Sign", ((x, y),),
                                                                    2.0)),
                "pavement": lambda: edits.add_pavements_from_outlines(
                    lay, [[(x, y), (x + 30.0, y), (x + 30.0, y + 30.0), (x, y + 30.0)]]),
            }[what]()),
    "remove": (st.tuples(st.lists(element, min_size=1, max_size=2)), edits.remove_elements),
    "junction": (st.tuples(coordinate, coordinate),  # drag the shared point of twy-1 and twy-2
                 lambda lay, x, y: edits.move_points(lay, [("twy-1", 0, x, y), ("twy-2", 1, x, y)])),
    "insert": (st.tuples(line_id, index, coordinate, coordinate), edits.insert_vertex),
    "delete": (st.tuples(line_id, index), edits.delete_vertex),
    "underlay": (st.tuples(st.text(min_size=1, max_size=4), st.booleans()),
                 lambda lay, name, image: edits.add_underlay(lay, _underlay(lay, name, image))),
    "underlay-edit": (st.tuples(st.sampled_from(["ulay-1", "ulay-2"]), st.floats(-0.5, 1.5), st.booleans()),
                      lambda lay, i, opacity, locked: edits.update_underlay(lay, i, opacity=opacity,
                                                                            locked=locked)),
    "underlay-order": (st.tuples(st.sampled_from(["ulay-1", "ulay-2"]), st.integers(0, 2)),
                       edits.move_underlay),
    "underlay-remove": (st.tuples(st.sampled_from(["ulay-1", "ulay-2"])), edits.remove_underlay),
}

actions = st.one_of(
    *(st.tuples(st.just(name), arguments) for name, (arguments, _) in EDITS.items()),
    st.tuples(st.just("nudge"), st.tuples(st.sampled_from(["twy-1", "obj-1"]), st.integers(0, 1),
                                          coordinate, coordinate)),
    st.tuples(st.just("drag"), st.tuples(st.lists(st.tuples(coordinate, coordinate), max_size=3))),
    st.tuples(st.sampled_from(["undo", "redo", "save"]), st.just(())),
)


@dataclass
class StackModel:
    """The undo stack as the docstring of app/model/commands.py describes it."""

    states: list[Layout]
    keys: list[Hashable | None] = field(default_factory=lambda: [None])
    index: int = 0
    clean: int | None = 0

    def push(self, after: Layout, key: Hashable | None) -> None:
        if after == self.states[self.index]:
            return  # Document.execute: nothing if the layout is unchanged
        del self.states[self.index + 1:], self.keys[self.index + 1:]
        if self.clean is not None and self.clean > self.index:
            self.clean = None
        if key is not None and self.index > 0 and self.clean != self.index and self.keys[self.index] == key:
            self.states[self.index] = after  # merged: the first before, the new after
            return
        self.states.append(after)
        self.keys.append(key)
        self.index += 1


def act(document: Document, model: StackModel, name: str, arguments: tuple[Any, ...]) -> None:
    layout = document.layout
    if name in ("undo", "redo"):
        getattr(document, name)()
        step = -1 if name == "undo" else 1
        model.index = min(max(model.index + step, 0), len(model.states) - 1)
        return
    if name == "save":
        document.mark_saved()
        model.clean = model.index
        return
    if name == "drag":
        document.begin_preview()
        for x, y in arguments[0]:
            with contextlib.suppress(EditError):  # the drag shows the last layout that was valid
                document.preview(edits.move_vertex(layout, "twy-2", 0, x, y))
        document.end_preview("Drag")
        model.push(document.layout, None)
        return
    try:
        if name == "nudge":
            element_id, vertex, x, y = arguments
            after = edits.move_vertex(layout, element_id, vertex, x, y)
            key = move_vertex_merge_key(element_id, vertex)
        else:
            after, key = EDITS[name][1](layout, *arguments), None
    except EditError:
        return  # refused: nothing changes
    document.execute(name, after, merge_key=key)
    model.push(after, key)


def brute_force_changed_ids(change: LayoutChange) -> frozenset[str]:
    before = {e.id: e for e in iter_elements(change.before)}
    after = {e.id: e for e in iter_elements(change.after)}
    return frozenset(i for i in before.keys() | after.keys() if before.get(i) != after.get(i))


@settings(max_examples=80, deadline=None)
@given(st.lists(actions, max_size=30))
def test_any_mix_of_edits_undo_redo_and_saves_follows_the_stack_model(
        steps: list[tuple[str, tuple[Any, ...]]]) -> None:
    document = Document(ORIGINAL)
    changes: list[LayoutChange] = []
    document.subscribe(changes.append)
    model = StackModel([ORIGINAL])
    for name, arguments in steps:
        act(document, model, name, arguments)
        assert document.layout == model.states[model.index], name
        assert document.is_dirty == (model.clean != model.index), name
        assert (document.stack.can_undo, document.stack.can_redo) == (
            model.index > 0, model.index < len(model.states) - 1), name
    for change in changes:
        assert change.changed_ids == brute_force_changed_ids(change)
        assert change.settings_changed == any(getattr(change.before, f) != getattr(change.after, f)
                                              for f in ("fleet", "rule_set", "units", "excluded_movements",
                                                        "turn_radius_overrides_m"))
    while document.undo():
        pass
    assert document.layout is ORIGINAL  # undo all restores the very original value
    while document.redo():
        pass
    assert document.layout == model.states[-1]  # redo all reproduces the last state of the history
    for state in model.states:
        edits.check_layout(state)  # a refused edit never left a half-changed layout on the stack
