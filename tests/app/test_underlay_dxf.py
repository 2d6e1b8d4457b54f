"""Reading DXF base drawings (app/fileio/underlay_dxf.py).

The drawings are made here with ezdxf. Check values: 1 ft = 0.3048 m exactly (identity,
geometry/units.py); $INSUNITS codes (Autodesk help, "INSUNITS (System Variable)": 0 unspecified,
2 feet, 4 millimetres, 6 metres); the bulge is tan(sweep / 4), negative clockwise (Autodesk
ActiveX reference, "GetBulge Method"); a chord spanning angle t of a circle of radius r strays
r (1 - cos(t / 2)) from it (sagitta: identity).
"""

import math
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.fileio.underlay_dxf import (
    UNDERLAY_CHORD_TOLERANCE_M,
    add_base_drawings,
    arc_segments,
    bulge_arc_xy,
    bulge_polyline_xy,
    read_base_drawing,
)
from app.model.underlays import BaseDrawing, Underlay, UnderlayFileError

FT = 0.3048  # identity: the international foot


def pieces(xy: np.ndarray) -> list[np.ndarray]:
    """The NaN-separated pieces of a joined array."""
    breaks = np.flatnonzero(np.isnan(xy[:, 0]))
    kept = [part[np.isfinite(part).all(axis=1)] for part in np.split(xy, breaks)]
    return [part for part in kept if len(part)]


def make_drawing(path: Path, insunits: int | None = 2) -> Path:
    """Lines, a bulged closed polyline, an arc, a circle, a hatch with a hole, a text, a block."""
    doc = ezdxf.new("R2018")
    if insunits is not None:
        doc.header["$INSUNITS"] = insunits
    msp = doc.modelspace()
    msp.add_line((0, 0), (100, 0), dxfattribs={"layer": "EDGE"})
    # A 100 x 20 ft strip with a semicircular east end: bulge 1 from (100, 0) to (100, 20).
    msp.add_lwpolyline([(0, 0, 0), (100, 0, 1.0), (100, 20, 0), (0, 20, 0)], format="xyb", close=True,
                       dxfattribs={"layer": "APRON"})
    msp.add_arc((50, 50), 10, 0, 90, dxfattribs={"layer": "ARCS"})
    msp.add_circle((200, 200), 5, dxfattribs={"layer": "ARCS"})
    hatch = msp.add_hatch(dxfattribs={"layer": "HATCHED"})
    hatch.paths.add_polyline_path([(300, 0), (340, 0), (340, 40), (300, 40)], is_closed=True)
    hole = hatch.paths.add_edge_path()
    for start, end in (((310, 10), (320, 10)), ((320, 10), (320, 20)), ((320, 20), (310, 20)),
                       ((310, 20), (310, 10))):
        hole.add_line(start, end)
    msp.add_text("HANGAR", dxfattribs={"layer": "TEXT", "insert": (10, 30), "height": 2.5})
    msp.add_point((1, 1), dxfattribs={"layer": "EDGE"})  # a kind that is not drawn
    block = doc.blocks.new("MARK")
    block.add_line((0, 0), (1, 0))  # on layer 0: takes the reference's layer
    msp.add_blockref("MARK", (500, 500), dxfattribs={"layer": "MARKS", "xscale": 10, "yscale": 10})
    doc.layers.add("OFFLAYER").off()
    msp.add_line((0, 0), (1, 1), dxfattribs={"layer": "OFFLAYER"})
    doc.saveas(path)
    return path


@pytest.fixture(scope="module")
def drawing(tmp_path_factory: pytest.TempPathFactory) -> BaseDrawing:
    path = make_drawing(tmp_path_factory.mktemp("dxf") / "base.dxf")
    return read_base_drawing(path, assumed_units="m")


def test_feet_come_from_the_header_into_a_metric_layout(drawing: BaseDrawing) -> None:
    assert "feet ($INSUNITS 2)" in drawing.units_note
    assert drawing.metres_per_unit == FT
    (line,) = pieces(drawing.layers["EDGE"].polylines)
    assert line.tolist() == [[0.0, 0.0], [100 * FT, 0.0]]  # identity: 1 ft = 0.3048 m


def test_counts_of_read_and_skipped_entities(drawing: BaseDrawing) -> None:
    # 8 entities drawn or kept in model space + 1 from the block; the POINT is skipped.
    assert drawing.entity_count == 9
    assert drawing.skipped_count == 1
    assert drawing.hidden_in_file == frozenset({"OFFLAYER"})


def test_bulged_polyline_is_a_closed_outline_with_an_exact_arc_end(drawing: BaseDrawing) -> None:
    (ring,) = drawing.layers["APRON"].closed_outlines
    tol = UNDERLAY_CHORD_TOLERANCE_M
    east = ring[ring[:, 0] > 100 * FT + 1e-9]
    # Semicircle of radius 10 ft about (100, 10) ft (bulge 1: identity); every point on it.
    distances = np.hypot(east[:, 0] - 100 * FT, east[:, 1] - 10 * FT)
    assert np.allclose(distances, 10 * FT, rtol=0, atol=1e-9)
    assert ring[:, 0].max() == pytest.approx(110 * FT, abs=tol)
    # Area: rectangle + half disc (identity), within what the chords cut off.
    x, y = ring[:, 0], ring[:, 1]
    area = 0.5 * abs(np.dot(x, np.roll(y, 1)) - np.dot(y, np.roll(x, 1)))
    exact = (100 * 20 + math.pi * 10**2 / 2) * FT**2
    assert exact - math.pi * 10 * FT * tol <= area <= exact


def test_arc_and_circle_stay_within_the_chord_tolerance(drawing: BaseDrawing) -> None:
    arc, circle = pieces(drawing.layers["ARCS"].polylines)
    tol = UNDERLAY_CHORD_TOLERANCE_M
    assert np.allclose(np.hypot(*(arc - 50 * FT).T), 10 * FT, atol=1e-9)
    assert arc[0] == pytest.approx((60 * FT, 50 * FT)) and arc[-1] == pytest.approx((50 * FT, 60 * FT))
    mid = (arc[:-1] + arc[1:]) / 2  # chord middles are the farthest from the arc: the sagitta
    assert (10 * FT - np.hypot(*(mid - 50 * FT).T)).max() <= tol
    (ring,) = drawing.layers["ARCS"].closed_outlines
    assert np.allclose(np.hypot(*(ring - 200 * FT).T), 5 * FT, atol=1e-9)
    assert len(circle) == len(ring) + 1  # drawn closed: the first point repeated


def test_hatch_boundaries_become_closed_outlines(drawing: BaseDrawing) -> None:
    outer, hole = sorted(drawing.layers["HATCHED"].closed_outlines, key=len, reverse=True)
    assert {tuple(p) for p in np.round(outer / FT, 9)} == {(300, 0), (340, 0), (340, 40), (300, 40)}
    assert {tuple(p) for p in np.round(hole / FT, 9)} == {(310, 10), (320, 10), (320, 20), (310, 20)}


def test_texts_and_block_content(drawing: BaseDrawing) -> None:
    (text,) = drawing.layers["TEXT"].texts
    assert (text.text, text.x_m, text.y_m, text.height_m) == ("HANGAR", 10 * FT, 30 * FT, 2.5 * FT)
    (mark,) = pieces(drawing.layers["MARKS"].polylines)  # block line on layer 0, scaled by 10
    assert mark == pytest.approx(np.array([[500 * FT, 500 * FT], [510 * FT, 500 * FT]]))


@pytest.mark.parametrize(("insunits", "layout_units", "factor", "words"), [
    (None, "ft", FT, "states no units"),   # no $INSUNITS: the layout's feet are assumed
    (0, "m", 1.0, "states no units"),      # $INSUNITS 0: unitless
    (4, "ft", 0.001, "millimetres"),       # $INSUNITS 4: millimetres
    (99, "ft", FT, "unknown unit code"),
])
def test_units_when_the_header_says_other_things(tmp_path: Path, insunits: int | None, layout_units: str,
                                                 factor: float, words: str) -> None:
    doc = ezdxf.new("R2018")
    if insunits is None:
        del doc.header["$INSUNITS"]
    else:
        doc.header["$INSUNITS"] = insunits
    doc.modelspace().add_line((0, 0), (1000, 0))
    doc.saveas(tmp_path / "x.dxf")
    drawing = read_base_drawing(tmp_path / "x.dxf", assumed_units=layout_units)
    assert words in drawing.units_note
    assert drawing.layers["0"].polylines[1, 0] == pytest.approx(1000 * factor, rel=1e-12)


def test_base_drawings_copied_into_an_exported_dxf(tmp_path: Path) -> None:
    base = Underlay("ulay-1", "Base", "drawing", str(make_drawing(tmp_path / "base.dxf")),
                    hidden_layers=frozenset({"ARCS"}))
    hidden = Underlay("ulay-2", "Off", "drawing", str(tmp_path / "base.dxf"), visible=False)
    gone = Underlay("ulay-3", "Gone", "drawing", str(tmp_path / "gone.dxf"))
    doc = ezdxf.new("R2018")
    notes = add_base_drawings(doc, (base, hidden, gone), 1 / FT)  # exported in feet
    assert len(notes) == 1 and "'Gone' left out" in notes[0]
    by_layer: dict[str, list[list[tuple[float, float]]]] = {}
    for entity in doc.modelspace():
        by_layer.setdefault(entity.dxf.layer, []).append([tuple(p) for p in entity.get_points("xy")])
    assert "UNDERLAY-ARCS" not in by_layer and "UNDERLAY-APRON" in by_layer  # hidden layer left out
    ((start, end),) = by_layer["UNDERLAY-EDGE"]
    assert start == (0.0, 0.0) and end == pytest.approx((100.0, 0.0), abs=1e-9)  # feet back (identity)
    assert doc.audit().has_errors is False


# --- damaged, missing and foreign files -------------------------------------------------------------

def test_a_drawing_cut_short_after_its_entities_is_read_in_part_and_says_so(tmp_path: Path) -> None:
    text = make_drawing(tmp_path / "whole.dxf").read_text()
    cut = text.index("OBJECTS") + 200  # the end markers are lost, the entities are whole
    (tmp_path / "cut.dxf").write_text(text[:cut])
    drawing = read_base_drawing(tmp_path / "cut.dxf")
    assert drawing.partial_note is not None and "may be incomplete" in drawing.partial_note
    assert drawing.entity_count == 9  # as in the whole drawing


def test_a_drawing_cut_inside_its_entities_is_refused(tmp_path: Path) -> None:
    text = make_drawing(tmp_path / "whole.dxf").read_text()
    (tmp_path / "cut.dxf").write_text(text[: text.index("HATCH")])
    with pytest.raises(UnderlayFileError, match="recovery found nothing to draw"):
        read_base_drawing(tmp_path / "cut.dxf")


@pytest.mark.parametrize(("content", "words"), [
    (b"", "not a DXF drawing"),
    (b"\x00\x01 this is not a drawing" * 20, "not a DXF drawing"),
    (b"  0\nSECTION\n  2\nENTITIES\n  0\nLINE\nxyz\n1\n  0\nENDSEC\n  0\nEOF\n", "damaged beyond repair"),
])
def test_unreadable_files_raise_a_clear_error(tmp_path: Path, content: bytes, words: str) -> None:
    (tmp_path / "bad.dxf").write_bytes(content)
    with pytest.raises(UnderlayFileError, match=words):
        read_base_drawing(tmp_path / "bad.dxf")


def test_a_missing_file_says_so(tmp_path: Path) -> None:
    with pytest.raises(UnderlayFileError, match="does not exist"):
        read_base_drawing(tmp_path / "gone.dxf")


# --- flattening exact arcs ---------------------------------------------------------------------------

def test_arc_segments_from_the_sagitta() -> None:
    # r = 10, tolerance 0.05: a chord may span 2 acos(0.995) = 0.2003 rad; a quarter turn needs 8.
    assert arc_segments(10.0, math.pi / 2, 0.05) == 8
    assert arc_segments(0.01, math.pi, 0.05) == 2  # radius below the tolerance: quarter turns


def test_negative_bulge_turns_clockwise() -> None:
    start, end = np.array([0.0, 0.0]), np.array([10.0, 0.0])
    left = bulge_arc_xy(start, end, 1.0, 0.01)   # counter-clockwise from start to end: below the chord
    right = bulge_arc_xy(start, end, -1.0, 0.01)
    assert left[:, 1].min() == pytest.approx(-5.0, abs=0.01) and left[:, 1].max() == 0.0
    assert right[:, 1].max() == pytest.approx(5.0, abs=0.01) and right[:, 1].min() == 0.0


@settings(max_examples=60, deadline=None)
@given(bulge=st.floats(-3.0, 3.0).filter(lambda b: abs(b) > 1e-3),
       length=st.floats(0.5, 500.0), angle=st.floats(-math.pi, math.pi), tol=st.floats(0.001, 0.5))
def test_bulged_segment_is_on_its_circle_within_tolerance(bulge: float, length: float, angle: float,
                                                          tol: float) -> None:
    start = np.array([3.0, -7.0])
    end = start + length * np.array([math.cos(angle), math.sin(angle)])
    xy = np.vstack((bulge_arc_xy(start, end, bulge, tol), end))
    sweep = 4 * math.atan(bulge)  # bulge = tan(sweep / 4): ActiveX reference, GetBulge
    radius = length / (2 * math.sin(abs(sweep) / 2))  # chord = 2 r sin(sweep / 2): identity
    chords = np.hypot(*np.diff(xy, axis=0).T)
    sagitta = radius - np.sqrt(np.maximum(radius**2 - (chords / 2) ** 2, 0.0))
    assert sagitta.max() <= tol * (1 + 1e-9) + 1e-9
    assert xy[0].tolist() == start.tolist()
    # the arc length agrees with r * sweep within the chords' shortfall
    assert chords.sum() <= radius * abs(sweep) + 1e-9


def test_closed_bulge_polyline_returns_to_its_start() -> None:
    xy = np.array([[0.0, 0.0], [10.0, 0.0], [10.0, 10.0]])
    out = bulge_polyline_xy(xy, np.array([0.0, 0.0, 0.5]), True, 0.01)
    assert out[0].tolist() == out[-1].tolist() == [0.0, 0.0]
    assert out[:3].tolist() == xy.tolist()  # straight segments keep their vertices


# --- a large drawing ---------------------------------------------------------------------------------

def write_many_entities(path: Path, count: int) -> None:
    """A plain-text DXF of ``count`` LINE, ARC and CIRCLE entities on 10 layers (written directly:
    building it with ezdxf would take longer than reading it)."""
    rows = ["0", "SECTION", "2", "HEADER", "9", "$INSUNITS", "70", "6", "0", "ENDSEC",
            "0", "SECTION", "2", "ENTITIES"]
    for index in range(count):
        x, y, layer = (index % 200) * 10.0, (index // 200) * 10.0, f"L{index % 10}"
        kind = index % 3
        if kind == 0:
            rows += ["0", "LINE", "8", layer, "10", str(x), "20", str(y), "11", str(x + 8), "21", str(y + 3)]
        elif kind == 1:
            rows += ["0", "ARC", "8", layer, "10", str(x), "20", str(y), "40", "4", "50", "0", "51", "120"]
        else:
            rows += ["0", "CIRCLE", "8", layer, "10", str(x), "20", str(y), "40", "2"]
    rows += ["0", "ENDSEC", "0", "EOF"]
    path.write_text("\n".join(rows) + "\n")


@pytest.mark.slow
def test_a_twenty_thousand_entity_drawing_loads_as_one_array_per_layer(tmp_path: Path) -> None:
    write_many_entities(tmp_path / "big.dxf", 20_000)
    drawing = read_base_drawing(tmp_path / "big.dxf")
    assert drawing.entity_count == 20_000 and drawing.skipped_count == 0
    assert sorted(drawing.layers) == [f"L{i}" for i in range(10)]
    assert sum(len(pieces(layer.polylines)) for layer in drawing.layers.values()) == 20_000
    assert sum(len(layer.closed_outlines) for layer in drawing.layers.values()) == 6666  # the circles
