"""Underlays in the model (app/model/underlays.py), their edits (app/model/edits.py) and their
place in the layout file (app/fileio/layout_json.py).

Check values: world-file terms A, D, B, E, C, F with C, F the CENTRE of the upper-left pixel
(GDAL, "WLD -- ESRI World File" driver page), so the image's outer corner lies half a pixel
further out (identity); the two-point placement is a similarity fixed by two point pairs
(identity); 1 ft = 0.3048 m exactly (identity, geometry/units.py). Everything else follows from
the definitions in the modules ("identity").
"""

import json
import math
import os
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.fileio.layout_json import LayoutFileError, layout_from_dict, layout_to_dict, load_layout, save_layout
from app.model import edits
from app.model.edits import EditError
from app.model.elements import Centerline, ExistingPavement, Layout, Vertex
from app.model.underlays import (
    BaseDrawing,
    LayerLinework,
    OutlineRef,
    Placement,
    PlacementError,
    Underlay,
    join_pieces,
    new_underlay_id,
    outline_picker,
    pavement_parts,
    placement_from_two_points,
)
from geometry.aircraft import DesignAircraft

FIXTURES = Path(__file__).parent / "fixtures"
HALF_METRE = Placement(0.5, 0.0, 0.0, -0.5, 100.25, 200.75)  # fictional north-up image


def square(x0: float, y0: float, size: float) -> np.ndarray:
    return np.array([[x0, y0], [x0 + size, y0], [x0 + size, y0 + size], [x0, y0 + size]])


def drawing_underlay(underlay_id: str = "ulay-1", **fields: object) -> Underlay:
    return replace(Underlay(underlay_id, "Base", "drawing", "/data/base.dxf"), **fields)  # type: ignore[arg-type]


def image_underlay(underlay_id: str = "ulay-2", **fields: object) -> Underlay:
    return replace(Underlay(underlay_id, "Aerial", "image", "/data/aerial.png", placement=HALF_METRE),
                   **fields)  # type: ignore[arg-type]


# --- placement ---------------------------------------------------------------------------------------

def test_world_file_origin_is_the_centre_of_the_upper_left_pixel() -> None:
    assert HALF_METRE.plan_xy(0, 0) == (100.25, 200.75)  # GDAL WLD page: C, F


def test_corners_lie_half_a_pixel_outside_the_pixel_centres() -> None:
    # A 4 x 2 pixel image of 0.5 m pixels: outer edges at 100.25 - 0.25 and 100.25 + 3.5 * 0.5 in x,
    # 200.75 + 0.25 and 200.75 - 1.5 * 0.5 in y (hand computed from the world-file definition).
    assert HALF_METRE.corners_xy(4, 2) == ((100.0, 201.0), (102.0, 201.0), (102.0, 200.0), (100.0, 200.0))


def test_rotated_terms_turn_the_image() -> None:
    # Columns run north, rows run east (A = 0, D = 1, B = 1, E = 0): a quarter turn plus the row flip.
    placement = Placement(0.0, 1.0, 1.0, 0.0, 10.0, 20.0)
    assert placement.plan_xy(3, 0) == (10.0, 23.0) and placement.plan_xy(0, 2) == (12.0, 20.0)
    assert placement.corners_xy(1, 1)[0] == (9.5, 19.5)


@settings(max_examples=40, deadline=None)
@given(terms=st.tuples(*(st.floats(-5, 5) for _ in range(4)), st.floats(-1e6, 1e6), st.floats(-1e6, 1e6)),
       x=st.floats(-1e5, 1e5), y=st.floats(-1e5, 1e5))
def test_pixel_at_inverts_plan_xy(terms: tuple[float, ...], x: float, y: float) -> None:
    a, d, b, e = terms[:4]
    if abs(a * e - b * d) < 1e-3:
        return
    placement = Placement(*terms)
    back = placement.plan_xy(*placement.pixel_at(x, y))
    assert math.isclose(back[0], x, abs_tol=1e-6) and math.isclose(back[1], y, abs_tol=1e-6)


@pytest.mark.parametrize("terms", [(0.0, 0.0, 0.0, -1.0, 0.0, 0.0), (1.0, 2.0, 2.0, 4.0, 0.0, 0.0),
                                   (float("nan"), 0.0, 0.0, -1.0, 0.0, 0.0), (1.0, 0.0, 0.0, -1.0, 2e9, 0.0)])
def test_degenerate_or_absurd_placements_are_refused(terms: tuple[float, ...]) -> None:
    with pytest.raises(PlacementError):
        Placement(*terms)


def test_two_point_placement_is_exact_for_hand_picked_points() -> None:
    # Pixels (0, 0) and (10, 0) on (100, 200) and (120, 200): 2 m pixels, north up (identity).
    placement = placement_from_two_points((0, 0), (10, 0), (100.0, 200.0), (120.0, 200.0))
    assert placement.terms() == (2.0, 0.0, 0.0, -2.0, 100.0, 200.0)
    # Image down (row) on plan east: a quarter turn counter-clockwise, image right is north.
    turned = placement_from_two_points((0, 0), (0, 10), (0.0, 0.0), (10.0, 0.0))
    assert turned.plan_xy(5, 0) == pytest.approx((0.0, 5.0), abs=1e-12)


@settings(max_examples=40, deadline=None)
@given(scale=st.floats(0.01, 10), angle=st.floats(-math.pi, math.pi), shift=st.tuples(st.floats(-1e5, 1e5),
       st.floats(-1e5, 1e5)), p1=st.tuples(st.integers(0, 5000), st.integers(0, 5000)),
       p2=st.tuples(st.integers(0, 5000), st.integers(0, 5000)))
def test_two_points_recover_any_similarity(scale: float, angle: float, shift: tuple[float, float],
                                           p1: tuple[int, int], p2: tuple[int, int]) -> None:
    if p1 == p2:
        return
    c, s = scale * math.cos(angle), scale * math.sin(angle)
    truth = Placement(c, s, s, -c, *shift)  # a similarity in world-file terms (identity)
    found = placement_from_two_points(p1, p2, truth.plan_xy(*p1), truth.plan_xy(*p2))
    assert np.allclose(found.terms(), truth.terms(), rtol=1e-6, atol=1e-6 * max(1.0, scale) + 1e-6)


def test_two_point_placement_needs_two_different_points() -> None:
    with pytest.raises(PlacementError, match="same pixel"):
        placement_from_two_points((3, 4), (3, 4), (0.0, 0.0), (1.0, 0.0))
    with pytest.raises(PlacementError, match="plan points are the same"):
        placement_from_two_points((3, 4), (5, 4), (1.0, 1.0), (1.0, 1.0))


# --- outlines to pavement ----------------------------------------------------------------------------

def test_nested_rings_become_holes_and_islands() -> None:
    rings = [square(0, 0, 100), square(40, 40, 20), square(45, 45, 10), square(200, 0, 10)]
    parts, skipped = pavement_parts(rings)
    assert skipped == 0
    outlines = sorted(parts, key=lambda part: part.outline[0])
    assert [len(p.holes) for p in outlines] == [1, 0, 0]  # apron with a hole; island; separate pad
    assert set(outlines[0].holes[0]) == {(40.0, 40.0), (60.0, 40.0), (60.0, 60.0), (40.0, 60.0)}


def test_open_self_crossing_tiny_and_repeated_rings_are_left_out() -> None:
    bow_tie = np.array([[0, 0], [10, 10], [10, 0], [0, 10]], dtype=float)
    rings = [square(0, 0, 10), square(0, 0, 10), bow_tie, np.array([[0, 0], [1, 1]]), square(50, 50, 0.01)]
    parts, skipped = pavement_parts(rings)
    assert len(parts) == 1 and skipped == 4


def test_picker_finds_the_smallest_outline_around_the_point() -> None:
    layer = LayerLinework(join_pieces([square(0, 0, 100), square(10, 10, 5)]),
                          (square(0, 0, 100), square(10, 10, 5)))
    other = LayerLinework(join_pieces([square(11, 11, 1)]), (square(11, 11, 1),))
    picker = outline_picker(BaseDrawing({"APRON": layer, "MARKS": other}, "", 3, 0))
    assert picker.pick(12, 12, {"APRON"}) == OutlineRef("APRON", 1)
    assert picker.pick(11.5, 11.5, {"APRON", "MARKS"}) == OutlineRef("MARKS", 0)
    assert picker.pick(50, 50, {"APRON"}) == OutlineRef("APRON", 0)
    assert picker.pick(500, 500, {"APRON"}) is None


def test_outlines_become_existing_pavement_with_new_ids() -> None:
    layout = edits.add_existing_pavement(Layout(), ExistingPavement("pav-1", "old", ((0, 0), (1, 0), (0, 1))))
    rings = [square(0, 0, 100), square(40, 40, 20), square(300, 0, 5)]
    after = edits.add_pavements_from_outlines(layout, rings)
    added = after.existing_pavements[1:]
    assert [p.id for p in added] == ["pav-2", "pav-3"]
    assert [p.name for p in added] == ["Existing pavement 1", "Existing pavement 2"]
    big = next(p for p in added if len(p.holes) == 1)
    assert set(big.outline) == {(0.0, 0.0), (100.0, 0.0), (100.0, 100.0), (0.0, 100.0)}
    with pytest.raises(EditError, match="encloses an area"):
        edits.add_pavements_from_outlines(layout, [np.array([[0, 0], [1, 1]])])


DEMO = DesignAircraft("Demo twin", cmg_m=20.0, wheelbase_m=18.0, mgw_m=10.0, tyre_width_m=0.5,
                      wingspan_m=34.0, wingtip_x_m=-2.0, nose_x_m=23.0, tail_x_m=-16.0, tail_height_m=12.0)


def test_picked_pavement_reduces_the_new_pavement_of_the_analysis() -> None:
    analysis = pytest.importorskip("app.model.analysis")
    layout = edits.set_fleet(Layout(units="m"), [DEMO])
    layout = edits.add_centerline(layout, Centerline("twy-1", "A", (Vertex(0, 0), Vertex(300, 0))))
    before = analysis.analyze(layout)
    width_m = before.total_area_m2 / 300.0  # a straight taxiway, flat ends: area = length x width
    after = analysis.analyze(edits.add_pavements_from_outlines(layout, [square(100, -50, 100)]))
    # The picked 100 m square covers 100 m of the taxiway's length (identity).
    assert after.new_area_m2 == pytest.approx(before.new_area_m2 - 100.0 * width_m, rel=1e-9)


# --- underlay edits ----------------------------------------------------------------------------------

def test_add_update_move_remove() -> None:
    layout = edits.add_underlay(edits.add_underlay(Layout(), drawing_underlay()), image_underlay())
    assert new_underlay_id(layout) == "ulay-3"
    layout = edits.update_underlay(layout, "ulay-1", visible=False, opacity=0.25,
                                   hidden_layers=frozenset({"TEXT"}))
    expected = drawing_underlay(visible=False, opacity=0.25, hidden_layers=frozenset({"TEXT"}))
    assert layout.underlays[0] == expected
    layout = edits.move_underlay(layout, "ulay-1", 1)
    assert [u.id for u in layout.underlays] == ["ulay-2", "ulay-1"]
    layout = edits.remove_underlay(edits.update_underlay(layout, "ulay-2", locked=False), "ulay-2")
    assert [u.id for u in layout.underlays] == ["ulay-1"]


@pytest.mark.parametrize(("build", "words"), [
    (lambda lay: edits.add_underlay(lay, drawing_underlay()), "used twice"),
    (lambda lay: edits.add_underlay(lay, image_underlay(placement=None)), "an image needs a placement"),
    (lambda lay: edits.update_underlay(lay, "ulay-1", opacity=1.5), "between 0 and 1"),
    (lambda lay: edits.update_underlay(lay, "ulay-1", colour="red"), "no editable field colour"),
    (lambda lay: edits.update_underlay(lay, "ulay-2", placement=HALF_METRE), "no underlay with id"),
    (lambda lay: edits.remove_underlay(lay, "ulay-1"), "locked: unlock it before removing"),
    (lambda lay: edits.move_underlay(lay, "ulay-1", 1), "out of range"),
])
def test_refused_underlay_edits(build: object, words: str) -> None:
    layout = edits.add_underlay(Layout(), drawing_underlay())
    with pytest.raises(EditError, match=words):
        build(layout)  # type: ignore[operator]


def test_a_locked_image_keeps_its_placement_until_unlocked() -> None:
    layout = edits.add_underlay(Layout(), image_underlay())
    moved = replace(HALF_METRE, x0_m=0.0)
    with pytest.raises(EditError, match="locked"):
        edits.update_underlay(layout, "ulay-2", placement=moved)
    layout = edits.update_underlay(layout, "ulay-2", placement=moved, locked=False)
    assert layout.underlays[0].placement == moved
    layout = edits.update_underlay(layout, "ulay-2", locked=True)
    relinked = edits.update_underlay(layout, "ulay-2", path="/x.png")
    assert relinked.underlays[0].path == "/x.png"  # a locked underlay may still be relinked


# --- the layout file ---------------------------------------------------------------------------------

def test_older_files_without_underlays_still_load() -> None:
    assert load_layout(FIXTURES / "layout_v1_ft.json").underlays == ()


def test_round_trip_stores_paths_relative_to_the_layout_file(tmp_path: Path) -> None:
    (tmp_path / "base").mkdir()
    drawing = drawing_underlay(path=str(tmp_path / "base" / "field.dxf"), hidden_layers=frozenset({"B", "A"}),
                               assumed_units="ft")
    image = image_underlay(path=str(tmp_path / "aerial.png"), opacity=0.5)
    layout = edits.add_underlay(edits.add_underlay(Layout(units="ft"), drawing), image)
    save_layout(layout, tmp_path / "plan.json")
    data = json.loads((tmp_path / "plan.json").read_text())
    stored = data["underlays"]
    assert [u["path"] for u in stored] == ["base/field.dxf", "aerial.png"]
    assert stored[0]["hidden_layers"] == ["A", "B"]
    # Placement terms are lengths: written in the layout's feet (1 ft = 0.3048 m, identity).
    assert stored[1]["placement"] == pytest.approx([0.5 / 0.3048, 0, 0, -0.5 / 0.3048,
                                                    100.25 / 0.3048, 200.75 / 0.3048], rel=1e-12)
    again = load_layout(tmp_path / "plan.json")
    assert again.underlays[0] == layout.underlays[0]
    assert np.allclose(again.underlays[1].placement.terms(), HALF_METRE.terms(), rtol=1e-12)  # type: ignore[union-attr]


def test_a_layout_moved_without_its_underlays_finds_them_by_their_absolute_path(tmp_path: Path) -> None:
    (tmp_path / "a").mkdir()
    (tmp_path / "b").mkdir()
    (tmp_path / "a" / "field.dxf").write_text("")
    layout = edits.add_underlay(Layout(), drawing_underlay(path=str(tmp_path / "a" / "field.dxf")))
    save_layout(layout, tmp_path / "a" / "plan.json")
    os.replace(tmp_path / "a" / "plan.json", tmp_path / "b" / "plan.json")
    assert load_layout(tmp_path / "b" / "plan.json").underlays[0].path == str(tmp_path / "a" / "field.dxf")


def test_a_missing_underlay_file_does_not_stop_the_layout_loading(tmp_path: Path) -> None:
    layout = edits.add_underlay(Layout(), drawing_underlay(path=str(tmp_path / "gone.dxf")))
    save_layout(layout, tmp_path / "plan.json")
    assert load_layout(tmp_path / "plan.json") == layout  # kept as it was: nothing lost


@pytest.mark.parametrize(("change", "words"), [
    (lambda u: u.update(kind="video"), r"underlays\[0\].kind: expected one of drawing, image"),
    (lambda u: u.update(visible="yes"), r"underlays\[0\].visible: expected true or false"),
    (lambda u: u.update(placement=[1, 2, 3]), r"underlays\[0\].placement: expected the 6 terms"),
    (lambda u: u.update(placement=[0, 0, 0, 0, 0, 0]), r"underlays\[0\].placement: .*zero pixel size"),
    (lambda u: u.update(opacity=2), r"underlays\[0\]: .*opacity must be between 0 and 1"),
    (lambda u: u.pop("path"), r"underlays\[0\].path: missing required field"),
])
def test_bad_underlay_entries_name_their_field(change: object, words: str) -> None:
    data = layout_to_dict(edits.add_underlay(Layout(units="m"), image_underlay()))
    change(data["underlays"][0])  # type: ignore[operator]
    with pytest.raises(LayoutFileError, match=words):
        layout_from_dict(data)
