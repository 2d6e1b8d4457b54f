"""Edits (app/model/edits.py): pure Layout -> Layout functions and their errors.

Every expected value here follows from the edit's own definition ("identity").
"""

import math
from dataclasses import replace

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.model import edits
from app.model.edits import EditError
from app.model.elements import (
    Centerline,
    DesignGroup,
    ExistingPavement,
    FixedObject,
    Layout,
    Runway,
    Vertex,
)
from geometry.aircraft import DesignAircraft

# Fictional demo aircraft: fleet content, not check values.
DEMO_A = DesignAircraft("Demo twin", cmg_m=20.0, wheelbase_m=18.0, mgw_m=10.0, tyre_width_m=0.5,
                        wingspan_m=34.0, wingtip_x_m=-2.0, nose_x_m=23.0, tail_x_m=-16.0, tail_height_m=12.0)
DEMO_B = replace(DEMO_A, name="Demo commuter", wingspan_m=20.0)


def line(element_id: str = "twy-1", *points: tuple[float, float]) -> Centerline:
    pts = points or ((0.0, 0.0), (100.0, 0.0), (100.0, 100.0))
    return Centerline(element_id, "A", tuple(Vertex(x, y) for x, y in pts))


def base() -> Layout:
    layout = edits.add_centerline(Layout(), line())
    layout = edits.add_centerline(layout, line("twy-2", (100.0, 0.0), (200.0, 0.0)))
    layout = edits.add_runway(layout, Runway("rwy-1", "09/27", (Vertex(0.0, -200.0), Vertex(2000.0, -200.0)),
                                             45.0))
    layout = edits.add_object(layout, FixedObject("obj-1", "Tower", ((50.0, 50.0),), 30.0, "navaid"))
    return edits.add_existing_pavement(layout, ExistingPavement("pav-1", "Apron",
                                                                ((0.0, 0.0), (10.0, 0.0), (10.0, 10.0))))


# --- adding and removing ---------------------------------------------------------------------------

def test_add_appends_and_keeps_other_elements_identical() -> None:
    before = base()
    after = edits.add_centerline(before, line("twy-3"))
    assert [c.id for c in after.centerlines] == ["twy-1", "twy-2", "twy-3"]  # identity
    assert after.centerlines[0] is before.centerlines[0]  # identity
    assert after.runways is before.runways  # identity
    assert len(before.centerlines) == 2  # identity: the argument is not changed


def test_add_rejects_a_used_id_even_of_another_kind() -> None:
    with pytest.raises(EditError, match="'rwy-1' is already used"):
        edits.add_centerline(base(), line("rwy-1"))


@pytest.mark.parametrize("bad, message", [
    (line("twy-9", (0.0, 0.0)), "at least 2 vertices"),
    (line("", (0.0, 0.0), (1.0, 0.0)), "non-empty id"),
    (Centerline("twy-9", "A", (Vertex(0.0, 0.0), Vertex(math.nan, 1.0))), "finite"),
    (Centerline("twy-9", "A", (Vertex(0.0, 0.0), Vertex(math.inf, 1.0))), "finite"),
    (Centerline("twy-9", "A", (Vertex(0.0, 0.0), Vertex(2e9, 1.0))), "limit"),
    (Centerline("twy-9", "A", (Vertex(0.0, 0.0, 5.0), Vertex(1.0, 1.0))), "end vertex"),
    (Centerline("twy-9", "A", (Vertex(0, 0), Vertex(1, 0, -5.0), Vertex(2, 2))), "greater than zero"),
    (Centerline("twy-9", "A", (Vertex(0, 0), Vertex(1, 0)), kind="road"), "kind"),  # type: ignore[arg-type]
    (Centerline("twy-9", "A", (Vertex(0, 0), Vertex(1, 0)), group=DesignGroup(tdg="9")), "TDG"),
    (Centerline("twy-9", "A", (Vertex(0, 0), Vertex(1, 0)), group=DesignGroup(adg="VII")), "ADG"),
    (Centerline("twy-9", "A", (Vertex(0, 0), Vertex(1, 0)), group=DesignGroup(code_letter="G")),
     "code letter"),
    (Centerline("twy-9", "A", (Vertex(0, 0), Vertex(1, 0)), width_override_m=0.0), "greater than zero"),
])
def test_add_centerline_rejects_bad_centerlines(bad: Centerline, message: str) -> None:
    with pytest.raises(EditError, match=message):
        edits.add_centerline(base(), bad)


def test_add_functions_check_the_kind_of_element() -> None:
    with pytest.raises(EditError, match="expected a runway"):
        edits.add_runway(base(), line("twy-9"))  # type: ignore[arg-type]


@pytest.mark.parametrize("bad, message", [
    (Runway("rwy-2", "x", (Vertex(0, 0),), 45.0), "exactly 2"),  # type: ignore[arg-type]
    (Runway("rwy-2", "x", (Vertex(0, 0), Vertex(9, 0)), -1.0), "greater than zero"),
    (Runway("rwy-2", "x", (Vertex(0, 0), Vertex(9, 0, 3.0)), 45.0), "no corner"),
])
def test_add_runway_rejects_bad_runways(bad: Runway, message: str) -> None:
    with pytest.raises(EditError, match=message):
        edits.add_runway(base(), bad)


@pytest.mark.parametrize("bad, message", [
    (FixedObject("obj-2", "x", (), 3.0), "at least 1"),
    (FixedObject("obj-2", "x", ((0.0, math.nan),), 3.0), "finite"),
    (FixedObject("obj-2", "x", ((0.0, 0.0),), -3.0), "negative"),
    (FixedObject("obj-2", "x", ((0.0, 0.0),), 3.0, "tree"), "kind"),  # type: ignore[arg-type]
])
def test_add_object_rejects_bad_objects(bad: FixedObject, message: str) -> None:
    with pytest.raises(EditError, match=message):
        edits.add_object(base(), bad)


def test_add_existing_pavement_needs_polygons() -> None:
    with pytest.raises(EditError, match="at least 3"):
        edits.add_existing_pavement(base(), ExistingPavement("pav-2", "x", ((0, 0), (1, 0))))
    with pytest.raises(EditError, match="hole 0 needs at least 3"):
        edits.add_existing_pavement(base(), ExistingPavement("pav-2", "x", ((0, 0), (9, 0), (9, 9)),
                                                             (((1, 1), (2, 1)),)))


def test_remove_elements_of_several_kinds() -> None:
    before = base()
    after = edits.remove_elements(before, ["twy-1", "obj-1"])
    assert [c.id for c in after.centerlines] == ["twy-2"]  # identity
    assert after.objects == ()  # identity
    assert after.runways is before.runways  # identity


def test_remove_unknown_id_names_it() -> None:
    with pytest.raises(EditError, match="'ghost'"):
        edits.remove_elements(base(), ["twy-1", "ghost"])


# --- vertices ------------------------------------------------------------------------------------

def test_move_vertex_keeps_the_corner_radius() -> None:
    layout = edits.set_corner_radius(base(), "twy-1", 1, 40.0)
    after = edits.move_vertex(layout, "twy-1", 1, 110.0, 5.0)
    assert after.centerlines[0].vertices[1] == Vertex(110.0, 5.0, 40.0)  # identity
    assert after.centerlines[1] is layout.centerlines[1]  # identity


def test_move_vertex_of_runway_object_and_pavement() -> None:
    after = edits.move_vertex(base(), "rwy-1", 1, 2100.0, -200.0)
    assert after.runways[0].vertices[1].xy == (2100.0, -200.0)  # identity
    after = edits.move_vertex(after, "obj-1", 0, 1.0, 2.0)
    assert after.objects[0].outline == ((1.0, 2.0),)  # identity
    after = edits.move_vertex(after, "pav-1", 2, 20.0, 20.0)
    assert after.existing_pavements[0].outline[2] == (20.0, 20.0)  # identity


@pytest.mark.parametrize("element_id, index, x, message", [
    ("ghost", 0, 1.0, "no element with id 'ghost'"),
    ("twy-1", 3, 1.0, "no vertex 3"),
    ("twy-1", -1, 1.0, "no vertex -1"),
    ("twy-1", True, 1.0, "no vertex True"),
    ("twy-1", 0, math.nan, "finite"),
    ("twy-1", 0, "12", "must be a number"),
])
def test_move_vertex_errors(element_id: str, index: int, x: float, message: str) -> None:
    with pytest.raises(EditError, match=message):
        edits.move_vertex(base(), element_id, index, x, 0.0)


def test_move_points_moves_a_junction_in_one_edit() -> None:
    after = edits.move_points(base(), [("twy-1", 1, 105.0, 1.0), ("twy-2", 0, 105.0, 1.0)])
    junction = (105.0, 1.0)
    assert after.centerlines[0].vertices[1].xy == after.centerlines[1].vertices[0].xy == junction  # identity


def test_move_points_rejects_moving_a_vertex_twice_and_empty_moves_change_nothing() -> None:
    with pytest.raises(EditError, match="moved twice"):
        edits.move_points(base(), [("twy-1", 1, 1.0, 1.0), ("twy-1", 1, 2.0, 2.0)])
    layout = base()
    assert edits.move_points(layout, []) is layout  # identity


def test_insert_vertex_before_index_and_at_the_end() -> None:
    after = edits.insert_vertex(base(), "twy-1", 1, 50.0, 0.0)
    expected = [(0, 0), (50, 0), (100, 0), (100, 100)]  # identity
    assert [v.xy for v in after.centerlines[0].vertices] == expected
    after = edits.insert_vertex(after, "twy-1", 4, 100.0, 200.0)
    assert after.centerlines[0].vertices[-1].xy == (100.0, 200.0)  # identity


def test_insert_vertex_at_an_end_drops_the_radius_of_the_new_end_only() -> None:
    layout = edits.set_corner_radius(base(), "twy-1", 1, 40.0)
    after = edits.insert_vertex(layout, "twy-1", 0, -50.0, 0.0)
    assert after.centerlines[0].vertices[2].corner_radius_m == 40.0  # identity


@pytest.mark.parametrize("centerline_id, index, message", [
    ("twy-1", 4, "no vertex 4"), ("rwy-1", 1, "not a centerline"), ("ghost", 0, "no centerline"),
])
def test_insert_vertex_errors(centerline_id: str, index: int, message: str) -> None:
    with pytest.raises(EditError, match=message):
        edits.insert_vertex(base(), centerline_id, index, 1.0, 1.0)


def test_delete_vertex_and_radius_of_a_new_end_is_cleared() -> None:
    layout = edits.set_corner_radius(base(), "twy-1", 1, 40.0)
    after = edits.delete_vertex(layout, "twy-1", 0)
    assert after.centerlines[0].vertices == (Vertex(100.0, 0.0), Vertex(100.0, 100.0))  # identity


def test_delete_vertex_keeps_two_vertices() -> None:
    with pytest.raises(EditError, match="at least 2 vertices"):
        edits.delete_vertex(base(), "twy-2", 0)
    with pytest.raises(EditError, match="no vertex 3"):
        edits.delete_vertex(base(), "twy-1", 3)


def test_set_corner_radius_and_reset() -> None:
    after = edits.set_corner_radius(base(), "twy-1", 1, 45.0)
    assert after.centerlines[0].vertices[1].corner_radius_m == 45.0  # identity
    assert edits.set_corner_radius(after, "twy-1", 1, None) == base()  # identity


@pytest.mark.parametrize("index, radius, message", [
    (0, 40.0, "end of centerline"), (2, 40.0, "end of centerline"), (1, 0.0, "greater than zero"),
    (1, math.inf, "finite"), (5, 40.0, "no vertex 5"),
])
def test_set_corner_radius_errors(index: int, radius: float, message: str) -> None:
    with pytest.raises(EditError, match=message):
        edits.set_corner_radius(base(), "twy-1", index, radius)


def test_translate_elements_moves_every_point() -> None:
    layout = edits.add_existing_pavement(base(), ExistingPavement(
        "pav-2", "Holed", ((0, 0), (9, 0), (9, 9)), (((1, 1), (2, 1), (2, 2)),)))
    after = edits.translate_elements(layout, ["twy-1", "rwy-1", "obj-1", "pav-2"], 10.0, -5.0)
    assert after.centerlines[0].vertices[0].xy == (10.0, -5.0)  # identity
    assert after.runways[0].vertices[1].xy == (2010.0, -205.0)  # identity
    assert after.objects[0].outline == ((60.0, 45.0),)  # identity
    assert after.existing_pavements[1].holes[0][0] == (11.0, -4.0)  # identity
    assert after.existing_pavements[0] is layout.existing_pavements[0]  # identity
    with pytest.raises(EditError, match="'ghost'"):
        edits.translate_elements(layout, ["ghost"], 1.0, 1.0)
    with pytest.raises(EditError, match="limit"):
        edits.translate_elements(layout, ["twy-1"], 1e9, 0.0)


# --- properties and settings ---------------------------------------------------------------------

def test_update_centerline_fields() -> None:
    after = edits.update_centerline(base(), "twy-1", name="K", kind="taxilane",
                                    group=DesignGroup(tdg="3", adg="III"), width_override_m=15.0)
    assert after.centerlines[0] == replace(base().centerlines[0], name="K", kind="taxilane",  # identity
                                           group=DesignGroup(tdg="3", adg="III"), width_override_m=15.0)


def test_update_rejects_unknown_fields_bad_values_and_wrong_kinds() -> None:
    with pytest.raises(EditError, match="no editable field vertices"):
        edits.update_centerline(base(), "twy-1", vertices=())
    with pytest.raises(EditError, match="kind"):
        edits.update_centerline(base(), "twy-1", kind="road")
    with pytest.raises(EditError, match="not a runway"):
        edits.update_runway(base(), "twy-1", width_m=30.0)
    with pytest.raises(EditError, match="greater than zero"):
        edits.update_runway(base(), "rwy-1", width_m=0.0)
    with pytest.raises(EditError, match="True or False"):
        edits.update_runway(base(), "rwy-1", instrument="yes")


def test_update_runway_object_and_pavement() -> None:
    after = edits.update_runway(base(), "rwy-1", designation="10/28", width_m=60.0, instrument=False)
    assert (after.runways[0].designation, after.runways[0].width_m, after.runways[0].instrument) == (
        "10/28", 60.0, False)  # identity
    after = edits.update_object(after, "obj-1", name="Mast", height_m=12.0, kind="sign")
    obj = after.objects[0]
    assert (obj.name, obj.height_m, obj.kind) == ("Mast", 12.0, "sign")  # identity
    after = edits.update_existing_pavement(after, "pav-1", name="Old apron")
    assert after.existing_pavements[0].name == "Old apron"  # identity


def test_fleet_rule_set_units_title() -> None:
    after = edits.set_fleet(base(), [DEMO_A, DEMO_B])
    assert after.fleet == (DEMO_A, DEMO_B)  # identity
    with pytest.raises(EditError, match="used twice"):
        edits.set_fleet(base(), [DEMO_A, DEMO_A])
    with pytest.raises(EditError, match="design aircraft only"):
        edits.set_fleet(base(), ["Demo twin"])  # type: ignore[list-item]
    assert edits.set_rule_set(base(), "ICAO").rule_set == "ICAO"  # identity
    with pytest.raises(EditError, match="rule set"):
        edits.set_rule_set(base(), "EASA")
    metric = edits.set_units(base(), "m")
    assert metric.units == "m" and metric.centerlines == base().centerlines  # identity: metres stored
    with pytest.raises(EditError, match="units"):
        edits.set_units(base(), "yd")  # type: ignore[arg-type]
    titled = edits.set_title_notes(base(), "North apron", "phase 1")
    assert (titled.title, titled.notes) == ("North apron", "phase 1")  # identity
    with pytest.raises(EditError, match="title"):
        edits.set_title_notes(base(), None, "")  # type: ignore[arg-type]


def test_movement_exclusion_toggles() -> None:
    excluded = edits.set_movement_excluded(base(), "j1:twy-1>twy-2", True)
    assert excluded.excluded_movements == frozenset({"j1:twy-1>twy-2"})  # identity
    assert edits.set_movement_excluded(excluded, "j1:twy-1>twy-2", False) == base()  # identity
    with pytest.raises(EditError, match="movement key"):
        edits.set_movement_excluded(base(), "", True)


def test_turn_radius_overrides_stay_sorted_so_equal_settings_compare_equal() -> None:
    one = edits.set_turn_radius_override(edits.set_turn_radius_override(base(), "b", 50.0), "a", 30.0)
    other = edits.set_turn_radius_override(edits.set_turn_radius_override(base(), "a", 30.0), "b", 50.0)
    assert one == other and one.turn_radius_overrides_m == (("a", 30.0), ("b", 50.0))  # identity
    reset = edits.set_turn_radius_override(one, "a", None)
    assert reset.turn_radius_overrides_m == (("b", 50.0),)  # identity
    with pytest.raises(EditError, match="turn radius"):
        edits.set_turn_radius_override(base(), "a", -1.0)


def test_check_layout_finds_duplicate_ids() -> None:
    layout = base()
    edits.check_layout(layout)
    twice = replace(layout, objects=(*layout.objects, replace(layout.objects[0])))
    with pytest.raises(EditError, match="used twice"):
        edits.check_layout(twice)


coordinate = st.floats(min_value=-1e6, max_value=1e6, allow_nan=False)


@settings(max_examples=40, deadline=None)
@given(dx=coordinate, dy=coordinate)
def test_translating_there_and_back_returns_close_to_the_start(dx: float, dy: float) -> None:
    layout = base()
    back = edits.translate_elements(edits.translate_elements(layout, ["twy-1"], dx, dy), ["twy-1"], -dx, -dy)
    for old, new in zip(layout.centerlines[0].vertices, back.centerlines[0].vertices, strict=True):
        # identity; floating addition is exact to within one rounding of the largest term
        assert new.x_m == pytest.approx(old.x_m, abs=1e-9 * max(1.0, abs(dx)))
        assert new.y_m == pytest.approx(old.y_m, abs=1e-9 * max(1.0, abs(dy)))
