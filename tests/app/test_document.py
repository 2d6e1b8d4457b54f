"""The observable document (app/model/document.py): notifications, previews, undo, dirty flag.

Expected values are identities of the document's own definitions (docstring of the module).
"""

from dataclasses import replace
from pathlib import Path
from typing import Any

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.model import edits
from app.model.commands import move_vertex_merge_key
from app.model.document import Document, DocumentStateError, LayoutChange, changed_element_ids
from app.model.edits import EditError
from app.model.elements import Centerline, FixedObject, Layout, Vertex, iter_elements
from app.model.ids import new_id


def line(element_id: str, y: float) -> Centerline:
    return Centerline(element_id, "", (Vertex(0.0, y), Vertex(100.0, y), Vertex(100.0, y + 100.0)))


def start_layout() -> Layout:
    return Layout(centerlines=(line("twy-1", 0.0), line("twy-2", 50.0)),
                  objects=(FixedObject("obj-1", "Mast", ((5.0, 5.0),), 10.0),))


def recorded(document: Document) -> list[LayoutChange]:
    changes: list[LayoutChange] = []
    document.subscribe(changes.append)
    return changes


# --- changed ids ---------------------------------------------------------------------------------

def test_changed_ids_for_add_move_remove_and_settings() -> None:
    document = Document(start_layout())
    changes = recorded(document)
    document.execute("Add", edits.add_centerline(document.layout, line("twy-3", 90.0)))
    document.execute("Move", edits.move_vertex(document.layout, "twy-1", 1, 101.0, 0.0))
    document.execute("Remove", edits.remove_elements(document.layout, ["obj-1", "twy-2"]))
    document.execute("Units", edits.set_units(document.layout, "m"))
    assert [c.changed_ids for c in changes] == [  # identity
        {"twy-3"}, {"twy-1"}, {"obj-1", "twy-2"}, frozenset()]
    assert [c.settings_changed for c in changes] == [False, False, False, True]  # identity
    assert [c.reason for c in changes] == ["execute"] * 4  # identity


def test_undo_and_redo_notify_with_the_same_ids() -> None:
    document = Document(start_layout())
    document.execute("Move", edits.move_vertex(document.layout, "twy-2", 0, 0.0, 55.0))
    moved = document.layout
    changes = recorded(document)
    assert document.undo() and document.redo()
    assert [(c.reason, c.changed_ids) for c in changes] == [  # identity
        ("undo", {"twy-2"}), ("redo", {"twy-2"})]
    assert changes[0].before is moved and changes[0].after == start_layout()  # identity
    assert changes[1].after is moved  # identity
    assert not document.redo()  # identity: nothing left to redo


def test_changed_ids_sees_a_replaced_but_equal_element_as_unchanged() -> None:
    before = start_layout()
    after = replace(before, centerlines=tuple(replace(c) for c in before.centerlines))
    assert changed_element_ids(before, after) == frozenset()  # identity
    assert changed_element_ids(before, before) == frozenset()  # identity


def test_execute_of_an_equal_layout_is_a_no_op() -> None:
    document = Document(start_layout())
    changes = recorded(document)
    document.execute("Nothing", replace(document.layout))
    assert changes == [] and not document.stack.can_undo and not document.is_dirty  # identity


# --- previews ------------------------------------------------------------------------------------

def drag(document: Document, element_id: str, index: int, steps: int) -> None:
    document.begin_preview()
    for step in range(1, steps + 1):
        document.preview(edits.move_vertex(document.layout, element_id, index, 100.0 + step, 0.0))


def test_a_drag_is_one_undo_entry_and_undo_restores_the_exact_pre_drag_layout() -> None:
    document = Document(start_layout())
    pre_drag = document.layout
    changes = recorded(document)
    drag(document, "twy-1", 1, steps=10)
    assert not document.stack.can_undo and document.is_previewing  # identity: previews are not on the stack
    document.end_preview("Move vertex")
    assert len(document.stack) == 1 and document.stack.undo_label == "Move vertex"  # identity
    assert document.layout.centerlines[0].vertices[1].xy == (110.0, 0.0)  # identity: last preview
    assert [c.reason for c in changes] == ["preview"] * 10 + ["execute"]  # identity
    assert changes[-1].before is pre_drag and changes[-1].changed_ids == {"twy-1"}  # identity
    document.undo()
    assert document.layout is pre_drag  # identity


def test_end_preview_without_change_records_nothing_and_keeps_the_original_value() -> None:
    document = Document(start_layout())
    pre_drag = document.layout
    document.begin_preview()
    document.preview(replace(document.layout))
    document.end_preview("Nothing")
    assert not document.stack.can_undo and not document.is_dirty  # identity
    assert document.layout is pre_drag  # identity: the equal copy is not kept


def test_cancel_preview_returns_to_the_pre_drag_layout() -> None:
    document = Document(start_layout())
    pre_drag = document.layout
    drag(document, "twy-1", 1, steps=3)
    changes = recorded(document)
    assert document.cancel_preview()
    assert document.layout is pre_drag and not document.stack.can_undo  # identity
    assert changes[-1].reason == "preview" and changes[-1].changed_ids == {"twy-1"}  # identity
    assert not document.cancel_preview()  # identity: nothing to cancel


def test_undo_during_a_preview_only_cancels_it() -> None:
    document = Document(start_layout())
    document.execute("Add", edits.add_centerline(document.layout, line("twy-3", 90.0)))
    with_three = document.layout
    drag(document, "twy-1", 1, steps=2)
    assert document.undo()
    assert document.layout is with_three and not document.is_previewing  # identity
    drag(document, "twy-1", 1, steps=2)
    assert document.redo() and document.layout is with_three  # identity


def test_preview_misuse_raises() -> None:
    document = Document(start_layout())
    with pytest.raises(DocumentStateError):
        document.preview(Layout())
    with pytest.raises(DocumentStateError):
        document.end_preview("x")
    document.begin_preview()
    with pytest.raises(DocumentStateError):
        document.begin_preview()
    with pytest.raises(DocumentStateError):
        document.execute("x", Layout())


def test_merge_key_merges_consecutive_nudges() -> None:
    document = Document(start_layout())
    for step in range(3):
        document.execute("Nudge", edits.move_vertex(document.layout, "twy-1", 1, 100.0, float(step + 1)),
                         merge_key=move_vertex_merge_key("twy-1", 1))
    assert len(document.stack) == 1  # identity
    document.undo()
    assert document.layout == start_layout()  # identity


# --- files and dirty flag ------------------------------------------------------------------------

def test_dirty_flag_save_and_replace_all(tmp_path: Path) -> None:
    document = Document(start_layout())
    statuses: list[bool] = []
    document.subscribe_status(lambda: statuses.append(document.is_dirty))
    document.execute("Add", edits.add_centerline(document.layout, line("twy-3", 90.0)))
    assert document.is_dirty  # identity
    document.mark_saved(tmp_path / "a.json")
    assert not document.is_dirty and document.path == tmp_path / "a.json"  # identity
    document.undo()
    assert document.is_dirty  # identity
    document.redo()
    assert not document.is_dirty  # identity
    changes = recorded(document)
    document.replace_all(Layout(title="new"), None)
    assert (document.path, document.is_dirty, document.stack.can_undo) == (None, False, False)  # identity
    assert changes[-1].reason == "replace"  # identity
    assert changes[-1].changed_ids == {"twy-1", "twy-2", "twy-3", "obj-1"}  # identity
    assert statuses == [True, False, True, False, False]  # identity: one call per change of state


# --- subscribers ---------------------------------------------------------------------------------

def test_a_failing_subscriber_does_not_stop_the_others_and_is_raised_after() -> None:
    document = Document(start_layout())
    seen: list[str] = []

    def broken(change: LayoutChange) -> None:
        raise RuntimeError("view bug")

    document.subscribe(broken)
    document.subscribe(lambda change: seen.append(change.reason))
    after = edits.add_centerline(document.layout, line("twy-3", 90.0))
    with pytest.raises(RuntimeError, match="view bug"):
        document.execute("Add", after)
    assert seen == ["execute"] and document.layout is after and document.stack.can_undo  # identity


def test_several_failing_subscribers_raise_a_group() -> None:
    document = Document(start_layout())
    for message in ("first", "second"):
        document.subscribe(lambda change, message=message: (_ for _ in ()).throw(ValueError(message)))
    with pytest.raises(ExceptionGroup) as caught:
        document.execute("Units", edits.set_units(document.layout, "m"))
    assert [str(e) for e in caught.value.exceptions] == ["first", "second"]  # identity


def test_unsubscribe_stops_notifications() -> None:
    document = Document(start_layout())
    changes: list[LayoutChange] = []
    unsubscribe = document.subscribe(changes.append)
    unsubscribe()
    unsubscribe()  # twice is harmless
    document.execute("Units", edits.set_units(document.layout, "m"))
    assert changes == []  # identity


# --- random edit sequences -----------------------------------------------------------------------

xy = st.floats(-500, 500)
which = st.integers(0, 9)
operation = st.one_of(
    st.tuples(st.just("add"), xy, xy),
    st.tuples(st.just("move"), which, st.integers(0, 4), xy, xy),
    st.tuples(st.just("insert"), which, st.integers(0, 5), xy, xy),
    st.tuples(st.just("delete"), which, st.integers(0, 4)),
    st.tuples(st.just("radius"), which, st.integers(0, 4), st.none() | st.floats(1, 200)),
    st.tuples(st.just("remove"), which),
    st.tuples(st.just("translate"), which, st.floats(-50, 50), st.floats(-50, 50)),
    st.tuples(st.just("drag"), which, st.integers(0, 4), st.lists(xy, max_size=4)),
    st.tuples(st.just("setting"), st.sampled_from(["m", "ft"]), st.sampled_from(["FAA", "ICAO"]),
              st.booleans()),
)


def apply(document: Document, op: tuple[Any, ...]) -> None:
    layout = document.layout
    ids = [element.id for element in iter_elements(layout)]
    pick = ids[op[1] % len(ids)] if ids and isinstance(op[1], int) else "none"
    kind = op[0]
    try:
        if kind == "drag":
            document.begin_preview()
            for x in op[3]:
                document.preview(edits.move_vertex(layout, pick, op[2], x, x / 2.0))
            document.end_preview("Drag")
            return
        after = {
            "add": lambda: edits.add_centerline(layout, Centerline(
                new_id(layout, "twy"), "", (Vertex(op[1], op[2]), Vertex(op[1] + 10.0, op[2])))),
            "move": lambda: edits.move_vertex(layout, pick, op[2], op[3], op[4]),
            "insert": lambda: edits.insert_vertex(layout, pick, op[2], op[3], op[4]),
            "delete": lambda: edits.delete_vertex(layout, pick, op[2]),
            "radius": lambda: edits.set_corner_radius(layout, pick, op[2], op[3]),
            "remove": lambda: edits.remove_elements(layout, [pick]),
            "translate": lambda: edits.translate_elements(layout, [pick], op[2], op[3]),
            "setting": lambda: edits.set_movement_excluded(
                edits.set_rule_set(edits.set_units(layout, op[1]), op[2]), "m-1", op[3]),
        }[kind]()
    except EditError:
        document.cancel_preview()
        return
    key = move_vertex_merge_key(pick, op[2]) if kind == "move" else None
    document.execute(kind, after, merge_key=key)


def brute_force_changed_ids(change: LayoutChange) -> frozenset[str]:
    before = {e.id: e for e in iter_elements(change.before)}
    after = {e.id: e for e in iter_elements(change.after)}
    return frozenset(i for i in before.keys() | after.keys() if before.get(i) != after.get(i))


@settings(max_examples=60, deadline=None)
@given(st.lists(operation, max_size=25))
def test_random_edits_undo_all_restores_the_original_and_redo_all_the_final(
        ops: list[tuple[Any, ...]]) -> None:
    original = start_layout()
    document = Document(original)
    document.subscribe(lambda change: _assert_ids_match(change))
    for op in ops:
        apply(document, op)
    final = document.layout
    while document.undo():
        pass
    assert document.layout is original and not document.is_dirty  # identity
    while document.redo():
        pass
    assert document.layout == final  # identity
    assert document.is_dirty == (len(document.stack) > 0)  # identity: clean only at the start


def _assert_ids_match(change: LayoutChange) -> None:
    assert change.changed_ids == brute_force_changed_ids(change)  # identity: definition of changed_ids
