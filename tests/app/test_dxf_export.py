"""Tests of the DXF export (app/fileio/dxf_export.py, dxf_content.py, dxf_layers.py, dxf_style.py).

Every export is read back twice: by ezdxf (structure, audit) and by GDAL through pyogrio, an
independent reader (shared/REFERENCES.md section 5). Inputs are hand-built in dxf_fixtures.py.
Check values: unit conversions are exact by the definition of the international foot
(1 ft = 0.3048 m, geometry/units.py); the rest are identities of the model or choices documented
in docs/dxf.md.
"""

from __future__ import annotations

import dataclasses
import math
import re
from pathlib import Path

import ezdxf
import numpy as np
import pyogrio
import pytest
import shapely
from ezdxf.entities.lwpolyline import LWPolylinePoints
from hypothesis import given, settings
from hypothesis import strategies as st

from app.fileio.dxf_content import bulge_rows, coordinate_decimals, label_anchor, off_arc_runs
from app.fileio.dxf_export import (
    CHORD_TOLERANCE,
    SAFETY_CAUTION,
    TRACK_TOLERANCE,
    DxfExportError,
    export_dxf,
    render_dxf,
    track_simplify_tolerance,
)
from app.fileio.dxf_layers import (
    DXF_LAYERS,
    UnknownLayerError,
    aircraft_token,
    aircraft_tokens,
    select_layers,
)
from app.fileio.dxf_style import (
    DIM_STYLE,
    MIN_EXTENT_SIZE,
    NICE_MANTISSAS,
    TEXT_FONT,
    TEXT_STYLE,
    PackedPolylinePoints,
    drawing_scale,
    mtext_content,
    text_content,
    wrap_lines,
)
from app.model.elements import Centerline, Layout, Vertex
from app.model.scene import clearance_half_widths_m
from geometry.centerline import flatten
from geometry.primitives import Arc
from geometry.sweep import DEFAULT_CHORD_TOLERANCE_M
from geometry.units import from_metres
from tests.app.dxf_fixtures import (
    CORNER_RADIUS_M,
    FILLET_RADIUS_M,
    FLEET,
    TURN_CENTER_M,
    TURN_RADIUS_M,
    TWY_A,
    empty_result,
    fillet_edge,
    sample_layout,
    sample_result,
    twy_b_segments,
)

UNITS = ("ft", "m")
UNITS_PER_M = {"ft": 1.0 / 0.3048, "m": 1.0}  # exact: international foot, 1959 (geometry/units.py)
GDAL_ARC_STEP_DEG = 0.05  # GDAL's chord sag on a 100 m arc at this step: 1e-5 m, far below the tolerance
VOLATILE_HEADER = {"$TDCREATE", "$TDUCREATE", "$TDUPDATE", "$TDUUPDATE", "$TDINDWG",
                   "$FINGERPRINTGUID", "$VERSIONGUID"}
RESULT = sample_result()


@pytest.fixture(scope="module")
def exports(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("dxf")
    return {units: export_dxf(sample_layout(units), RESULT, folder / f"layout_{units}.dxf").path
            for units in UNITS}


@pytest.fixture(scope="module", autouse=True)
def fine_gdal_arcs() -> object:
    pyogrio.set_gdal_config_options({"OGR_ARC_STEPSIZE": str(GDAL_ARC_STEP_DEG)})
    yield
    pyogrio.set_gdal_config_options({"OGR_ARC_STEPSIZE": None})


def gdal_features(path: Path) -> list[tuple[str, str, str | None, shapely.Geometry]]:
    """(layer, subclasses, text, geometry) of every entity, as GDAL's DXF driver reads them."""
    _meta, _fids, geometries, fields = pyogrio.raw.read(
        path, sql="SELECT Layer, SubClasses, Text, OGR_STYLE FROM entities")
    return [(fields[0][i], fields[1][i], fields[2][i], shapely.from_wkb(geometries[i]))
            for i in range(len(geometries))]


def gdal_geometry(path: Path, layer: str) -> shapely.Geometry:
    return shapely.GeometryCollection([g for name, _s, _t, g in gdal_features(path) if name == layer])


def scaled(geometry: shapely.Geometry, units: str) -> shapely.Geometry:
    return shapely.transform(geometry, lambda xy: xy * UNITS_PER_M[units])


def expected_layers(shoulders: bool = False) -> list[str]:
    tokens = ["DEMO_TWIN_36", "DEMO_REGIONAL_2"]  # fleet order; "/" and " " become "_"
    names: list[str] = []
    for key, spec in DXF_LAYERS.items():
        if key == "shoulders" and not shoulders:
            continue
        names += [spec.layer_name(token) for token in tokens] if spec.per_aircraft else [spec.name]
    return names


# ------------------------------------------------------------------ structure and readers

@pytest.mark.parametrize("units", UNITS)
def test_export_passes_audit_and_has_the_units_header(exports: dict[str, Path], units: str) -> None:
    doc = ezdxf.readfile(exports[units])
    auditor = doc.audit()
    assert not auditor.has_errors, [str(error) for error in auditor.errors]
    assert doc.dxfversion >= "AC1032"  # R2018
    assert doc.header["$INSUNITS"] == {"ft": 2, "m": 6}[units]  # DXF reference, $INSUNITS codes
    assert doc.header["$MEASUREMENT"] == {"ft": 0, "m": 1}[units]  # DXF reference, $MEASUREMENT


@pytest.mark.parametrize("units", UNITS)
def test_gdal_reads_every_expected_layer(exports: dict[str, Path], units: str) -> None:
    summary_layers = render_dxf(sample_layout(units), RESULT).layers
    assert list(summary_layers) == expected_layers()
    read_layers = {layer for layer, _s, _t, _g in gdal_features(exports[units])}
    assert set(expected_layers()) <= read_layers


@pytest.mark.parametrize("units", UNITS)
def test_written_layers_carry_their_colour_line_type_and_description(exports: dict[str, Path],
                                                                     units: str) -> None:
    doc = ezdxf.readfile(exports[units])
    for key, spec in DXF_LAYERS.items():
        for layer in doc.layers:
            if re.fullmatch(re.escape(spec.name).replace(re.escape("{aircraft}"), "[A-Z0-9_]+"),
                            layer.dxf.name):
                assert (layer.color, layer.dxf.linetype, layer.description) == (
                    spec.aci, spec.linetype, spec.description), key


# ------------------------------------------------------------------ geometry read back by GDAL

@pytest.mark.parametrize("units", UNITS)
def test_pavement_outline_agrees_with_the_input_within_the_chord_tolerance(exports: dict[str, Path],
                                                                           units: str) -> None:
    read = gdal_geometry(exports[units], "C-PVMT-EDGE-N")
    expected = scaled(RESULT.total_pavement.boundary, units)
    tolerance = CHORD_TOLERANCE[units] * 1.001
    read_vertices = shapely.points(shapely.get_coordinates(read))
    assert shapely.distance(read_vertices, expected).max() <= tolerance
    input_vertices = shapely.points(shapely.get_coordinates(expected))
    assert shapely.distance(input_vertices, read).max() <= tolerance


@pytest.mark.parametrize("units", UNITS)
def test_new_pavement_hatch_keeps_its_holes_and_area(exports: dict[str, Path], units: str) -> None:
    polygons = [g for g in gdal_geometry(exports[units], "C-PVMT-PATT-N").geoms if g.geom_type == "Polygon"]
    expected = scaled(RESULT.new_pavement, units)
    assert any(len(polygon.interiors) for polygon in polygons)  # the existing patch is a hole
    area_slack = expected.boundary.length * CHORD_TOLERANCE[units]
    assert sum(p.area for p in polygons) == pytest.approx(expected.area, abs=area_slack)


@pytest.mark.parametrize("units", UNITS)
def test_turn_and_fillet_arcs_keep_their_radius(exports: dict[str, Path], units: str) -> None:
    k = UNITS_PER_M[units]
    center = shapely.Point(TURN_CENTER_M[0] * k, TURN_CENTER_M[1] * k)
    turn = shapely.points(shapely.get_coordinates(gdal_geometry(exports[units], "C-TAXI-TURN")))
    assert len(turn) > 10
    assert np.allclose(shapely.distance(turn, center), TURN_RADIUS_M * k, atol=CHORD_TOLERANCE[units])
    fillet_lines = gdal_geometry(exports[units], "C-PVMT-FLLT-N").geoms
    radii = [shapely.distance(shapely.points(shapely.get_coordinates(g)), center) for g in fillet_lines]
    on_circle = [r for r in radii if np.allclose(r, FILLET_RADIUS_M * k, atol=CHORD_TOLERANCE[units])]
    assert len(on_circle) == 1 and len(on_circle[0]) > 10  # the ARC; the two tapers are straight


@pytest.mark.parametrize("units", UNITS)
def test_centerline_corner_is_a_true_arc(exports: dict[str, Path], units: str) -> None:
    k = UNITS_PER_M[units]
    lines = gdal_geometry(exports[units], "C-TAXI-CNTR").geoms
    twy_b = max(lines, key=lambda line: len(shapely.get_coordinates(line)))
    exact = shapely.LineString(flatten(twy_b_segments(), 1e-6) * k)
    assert shapely.hausdorff_distance(twy_b, exact) <= CHORD_TOLERANCE[units]
    corner = next(segment for segment in twy_b_segments() if isinstance(segment, Arc))
    center = shapely.Point(corner.center[0] * k, corner.center[1] * k)
    radii = shapely.distance(shapely.points(shapely.get_coordinates(twy_b)), center)
    on_arc = np.isclose(radii, CORNER_RADIUS_M * k, atol=CHORD_TOLERANCE[units])
    assert on_arc.sum() > 100  # many points read back on the 60 m circle: an arc, not one chord


@pytest.mark.parametrize("units", UNITS)
def test_tracks_are_simplified_within_the_track_tolerance(exports: dict[str, Path], units: str) -> None:
    # Tracks are guides drawn within TRACK_TOLERANCE of the true curve (docs/dxf.md); the engine's
    # sampling takes DEFAULT_CHORD_TOLERANCE_M of it, the simplification the rest, and rounding
    # to the written decimals moves a point by at most half a unit of the last decimal per axis.
    simplify = track_simplify_tolerance(units)
    # check value: identity (the drafting tolerances stated in docs/dxf.md; ezdxf's own output)
    assert simplify + from_metres(DEFAULT_CHORD_TOLERANCE_M, units) == pytest.approx(TRACK_TOLERANCE[units])
    rounding = math.sqrt(2.0) / 2.0 * 10.0 ** -coordinate_decimals(simplify)
    for aircraft, token in (("Demo Twin 36", "DEMO_TWIN_36"), ("Demo Regional/2", "DEMO_REGIONAL_2")):
        read = gdal_geometry(exports[units], f"C-TAXI-GEAR-{token}")
        tracks = next(t for t in RESULT.junctions["J:twy-a/twy-b#0"].movements[0].tracks
                      if t.aircraft_name == aircraft)
        dense = np.vstack((tracks.gear_left_edge_xy, tracks.gear_right_edge_xy)) * UNITS_PER_M[units]
        # check value: identity (the drafting tolerances stated in docs/dxf.md; ezdxf's own output)
        assert shapely.distance(shapely.points(dense), read).max() <= simplify + rounding
        assert len(shapely.get_coordinates(read)) < len(dense) / 10  # the dense arrays were thinned


def test_packed_polyline_points_write_the_text_ezdxf_writes() -> None:
    rng = np.random.default_rng(7)
    table = np.zeros((40, 5))
    table[:, :2] = rng.uniform(-1e5, 1e5, (40, 2))
    table[::3, 4] = rng.uniform(-1.0, 1.0, 14)  # bulges on some vertices, 0.0 on the others
    table[1, :2] = (-0.0, 1e-300)  # signed zero and a tiny value print as ezdxf prints them
    packed = PackedPolylinePoints()

    def ours_and_theirs() -> tuple[str, str]:
        packed.set(table)
        ours = "".join(tag.dxfstr() for tag in packed.dxftags())
        return ours, "".join(tag.dxfstr() for tag in LWPolylinePoints.dxftags(packed))  # ezdxf's own

    assert ours_and_theirs()[0] == ours_and_theirs()[1]  # identity
    table[:, 4] = 0.0  # no bulges: one template for the whole polyline
    # check value: identity (the drafting tolerances stated in docs/dxf.md; ezdxf's own output)
    assert ours_and_theirs()[0] == ours_and_theirs()[1]
    table[5, 2:4] = (0.5, 0.25)  # widths: written by ezdxf itself
    # check value: identity (the drafting tolerances stated in docs/dxf.md; ezdxf's own output)
    assert ours_and_theirs()[0] == ours_and_theirs()[1]


@pytest.mark.parametrize("units", UNITS)
def test_clearance_zone_edges_lie_at_the_object_separation(exports: dict[str, Path], units: str) -> None:
    k = UNITS_PER_M[units]
    half_width_m = clearance_half_widths_m(sample_layout(units))[TWY_A.kind]  # the canvas's value: identity
    assert half_width_m is not None
    read = gdal_geometry(exports[units], "C-SITE-CLRZ")
    for x_m in (50.0, 150.0, 500.0):  # along TWY A, clear of TWY B's band
        for y_m in (half_width_m, -half_width_m):
            edge_point = shapely.Point(x_m * k, y_m * k)
            assert shapely.distance(edge_point, read) <= CHORD_TOLERANCE[units]
    no_fleet = dataclasses.replace(sample_layout(units), fleet=())
    assert "C-SITE-CLRZ" not in render_dxf(no_fleet, RESULT).layers


# ------------------------------------------------------------------ layer selection, errors, determinism

def test_layer_selection_writes_only_those_layers(tmp_path: Path) -> None:
    summary = export_dxf(sample_layout("ft"), RESULT, tmp_path / "some.dxf",
                         layers=["pavement_edges", "C-ANNO-TEXT", "gear_tracks"])
    wanted = ["C-PVMT-EDGE-N", "C-TAXI-GEAR-DEMO_TWIN_36", "C-TAXI-GEAR-DEMO_REGIONAL_2", "C-ANNO-TEXT"]
    assert list(summary.layers) == wanted
    doc = ezdxf.readfile(summary.path)
    assert {layer.dxf.name for layer in doc.layers} - {"0", "Defpoints"} == set(wanted)
    assert {layer for layer, _s, _t, _g in gdal_features(summary.path)} == set(wanted)
    assert summary.count("C-PVMT-EDGE-N") == 2 and summary.count("C-RUNW-CNTR") == 0


def test_unknown_layer_is_refused_with_the_valid_keys() -> None:
    with pytest.raises(UnknownLayerError, match="pavement_edges") as caught:
        select_layers(["pavement_edge"])
    assert isinstance(caught.value, ValueError)
    assert select_layers("notes") == {"notes"}
    assert select_layers(None) == set(DXF_LAYERS)


@pytest.mark.parametrize("make_target", [lambda tmp: tmp / "missing" / "out.dxf",
                                         lambda tmp: tmp / "a_folder.dxf"])
def test_unwritable_path_raises_and_leaves_no_file(tmp_path: Path, make_target) -> None:
    (tmp_path / "a_folder.dxf").mkdir()
    before = sorted(tmp_path.rglob("*"))
    with pytest.raises(DxfExportError) as caught:
        export_dxf(sample_layout("m"), RESULT, make_target(tmp_path))
    assert isinstance(caught.value, OSError)
    assert "\n" not in str(caught.value) and str(caught.value).startswith("DXF export failed")
    assert sorted(tmp_path.rglob("*")) == before


def entity_list(doc: ezdxf.document.Drawing) -> list[tuple[object, ...]]:
    """Type, layer and rounded coordinates of every model space entity, in file order."""
    listed = []
    for entity in doc.modelspace():
        attributes = {name: value for name, value in entity.dxfattribs().items()
                      if name not in {"handle", "owner", "geometry"}}
        row = [entity.dxftype(), entity.dxf.layer, *sorted(
            (name, np.round(np.asarray(value, dtype=float), 6).tolist() if not isinstance(value, str)
             else value) for name, value in attributes.items())]
        if entity.dxftype() == "LWPOLYLINE":
            row.append(np.round(np.asarray(entity.get_points("xyb")), 6).tolist())
        if entity.dxftype() == "HATCH":
            row.append([np.round(np.asarray(path.vertices)[:, :2], 6).tolist() for path in entity.paths])
        listed.append(tuple(map(str, row)))
    return listed


def test_export_is_deterministic(tmp_path: Path) -> None:
    first = export_dxf(sample_layout("ft"), RESULT, tmp_path / "first.dxf")
    second = export_dxf(sample_layout("ft"), sample_result(), tmp_path / "second.dxf")
    assert entity_list(ezdxf.readfile(first.path)) == entity_list(ezdxf.readfile(second.path))
    lines_a = first.path.read_text(encoding="utf-8").splitlines()
    lines_b = second.path.read_text(encoding="utf-8").splitlines()
    assert len(lines_a) == len(lines_b)
    differing = [index for index, (a, b) in enumerate(zip(lines_a, lines_b, strict=True)) if a != b]
    for index in differing:  # only creation times, GUIDs and ezdxf's own time stamp may differ
        assert lines_a[index - 2] in VOLATILE_HEADER or lines_a[index].startswith(ezdxf.__version__ + " @ ")


# ------------------------------------------------------------------ drafting content

@pytest.mark.parametrize("units", UNITS)
def test_header_sizes_follow_the_extent(exports: dict[str, Path], units: str) -> None:
    doc = ezdxf.readfile(exports[units])
    size = 1000.0 * UNITS_PER_M[units]  # the fixture spans x -100..900 m (runway): identity
    assert size / 100.0 <= doc.header["$LTSCALE"] <= size / 50.0  # docs/dxf.md rule
    low, high = np.array(doc.header["$EXTMIN"])[:2], np.array(doc.header["$EXTMAX"])[:2]
    for entity in doc.modelspace().query("LWPOLYLINE ARC CIRCLE TEXT MTEXT"):
        if entity.dxftype() == "LWPOLYLINE":
            points = np.asarray(entity.get_points("xy"))
        else:
            anchor = entity.dxf.center if entity.dxftype() in ("ARC", "CIRCLE") else entity.dxf.insert
            points = np.array([(anchor.x, anchor.y)])
        assert np.all(points >= low - 1e-9) and np.all(points <= high + 1e-9)


@pytest.mark.parametrize("units", UNITS)
def test_notes_block_holds_title_units_rule_set_aircraft_and_caution(exports: dict[str, Path],
                                                                     units: str) -> None:
    doc = ezdxf.readfile(exports[units])
    (notes,) = doc.modelspace().query('MTEXT[layer=="C-ANNO-NOTE"]')
    text = " ".join(notes.plain_text().split())
    assert "Demo Field: north cross {draft}" in text  # braces kept literal
    assert {"ft": "Units: feet", "m": "Units: metres"}[units] in text and "Rule set: FAA" in text
    assert all(aircraft.name in text for aircraft in FLEET)
    wingspan = {"ft": "wingspan 118.1'", "m": "wingspan 36.00 m"}[units]  # 36 m / 0.3048: identity
    assert wingspan in text and SAFETY_CAUTION in text
    accuracy = {"ft": ("within 0.01 ft", "within 0.03 ft"), "m": ("within 0.003 m", "within 0.01 m")}[units]
    assert all(phrase in text for phrase in accuracy)  # CHORD_TOLERANCE and TRACK_TOLERANCE: identity


def test_text_and_dimension_styles_are_our_own(exports: dict[str, Path]) -> None:
    doc = ezdxf.readfile(exports["ft"])
    assert doc.styles.get(TEXT_STYLE).dxf.font == TEXT_FONT
    assert doc.header["$DIMSTYLE"] == DIM_STYLE and doc.header["$DIMTXSTY"] == TEXT_STYLE
    assert all(entity.dxf.style == TEXT_STYLE for entity in doc.modelspace().query("TEXT MTEXT"))
    dimensions = doc.modelspace().query("DIMENSION")
    assert {dimension.dxf.dimstyle for dimension in dimensions} == {DIM_STYLE}
    texts = {text.plain_text() for d in dimensions for text in doc.blocks.get(d.dxf.geometry)
             if text.dxftype() == "MTEXT"}
    assert texts == {"R147.6'", "R98.4'"}  # 45 m and 30 m in feet, 0.1 ft: identity


def test_labels_name_taxiways_runway_and_fillet(exports: dict[str, Path]) -> None:
    doc = ezdxf.readfile(exports["ft"])
    labels = {text.dxf.text for text in doc.modelspace().query('TEXT[layer=="C-ANNO-TEXT"]')}
    # 30 m, 40 m and 35 m in feet (identity):
    assert {"A", "B", "RWY 09/27", "Hangar 3", "FILLET R98.4' TAPERS 131.2'/114.8'"} <= labels
    finding_codes = {text.dxf.text for text in doc.modelspace().query('TEXT[layer=="C-ANNO-FIND"]')}
    assert finding_codes == {"W-EDGE-MARGIN", "E-STEERING"}


def test_hatches_come_before_the_lines_they_sit_under(exports: dict[str, Path]) -> None:
    types = [entity.dxftype() for entity in ezdxf.readfile(exports["m"]).modelspace()]
    assert max(i for i, t in enumerate(types) if t == "HATCH") < types.index("LWPOLYLINE")


def test_shoulders_layer_only_when_the_result_has_shoulders() -> None:
    assert "C-PVMT-SHLD-N" not in render_dxf(sample_layout("m"), RESULT).layers
    with_shoulders = render_dxf(sample_layout("m"), sample_result(shoulders=True))
    assert list(with_shoulders.layers) == expected_layers(shoulders=True)
    assert dict(with_shoulders.entity_counts)["C-PVMT-SHLD-N"] >= 4  # outer and inner rings


def test_one_turn_arc_for_both_directions_and_nothing_for_excluded_movements() -> None:
    assert dict(render_dxf(sample_layout("m"), RESULT).entity_counts)["C-TAXI-TURN"] == 1
    junction = RESULT.junctions["J:twy-a/twy-b#0"]
    excluded = tuple(dataclasses.replace(m, excluded=True) for m in junction.movements)
    result = dataclasses.replace(RESULT, junctions={junction.junction_id: dataclasses.replace(
        junction, movements=excluded)})
    layers = render_dxf(sample_layout("m"), result).layers
    assert "C-TAXI-TURN" not in layers and not any(name.startswith("C-TAXI-GEAR") for name in layers)


def test_corner_that_does_not_fit_is_drawn_through_its_vertices_with_a_warning(tmp_path: Path) -> None:
    tight = Centerline("twy-c", "C", (Vertex(0.0, 0.0), Vertex(10.0, 0.0, 100.0), Vertex(10.0, 10.0)))
    summary = export_dxf(Layout(units="m", centerlines=(tight,)), empty_result(), tmp_path / "c.dxf")
    assert len(summary.warnings) == 1 and "centerline C" in summary.warnings[0]
    (line,) = ezdxf.readfile(summary.path).modelspace().query('LWPOLYLINE[layer=="C-TAXI-CNTR"]')
    assert [tuple(p) for p in line.get_points("xy")] == [(0.0, 0.0), (10.0, 0.0), (10.0, 10.0)]


def test_empty_layout_exports_its_notes_only(tmp_path: Path) -> None:
    summary = export_dxf(Layout(), empty_result(), tmp_path / "empty.dxf")
    assert summary.layers == ("C-ANNO-NOTE",) and summary.total_entities == 1
    assert not ezdxf.readfile(summary.path).audit().has_errors


def test_non_finite_track_rows_split_the_polyline_and_never_reach_the_file() -> None:
    junction = RESULT.junctions["J:twy-a/twy-b#0"]
    turn = junction.movements[0]
    tracks = turn.tracks[0]
    broken_edge = tracks.gear_left_edge_xy.copy()
    broken_edge[500] = np.nan
    broken = dataclasses.replace(turn, tracks=(dataclasses.replace(tracks, gear_left_edge_xy=broken_edge),))
    result = dataclasses.replace(RESULT, junctions={junction.junction_id: dataclasses.replace(
        junction, movements=(broken,))})
    rendered = render_dxf(sample_layout("m"), result, layers=["gear_tracks"])
    assert dict(rendered.entity_counts) == {"C-TAXI-GEAR-DEMO_TWIN_36": 3}  # left in two, right whole
    assert b"nan" not in rendered.data.lower()


# ------------------------------------------------------------------ helpers: layers, style, content

def test_layer_names_follow_the_discipline_major_minor_pattern() -> None:
    pattern = re.compile(r"C-[A-Z]{4}-[A-Z]{4}(-[NE])?(-\{aircraft\})?")  # NCS form; docs/dxf.md
    assert all(pattern.fullmatch(spec.name) for spec in DXF_LAYERS.values())
    assert len({spec.name for spec in DXF_LAYERS.values()}) == len(DXF_LAYERS)
    assert all(1 <= spec.aci <= 255 for spec in DXF_LAYERS.values())


def test_aircraft_tokens_are_safe_and_distinct() -> None:
    assert aircraft_token("Demo Regional/2") == "DEMO_REGIONAL_2"
    assert aircraft_token("  ::  ") == "AIRCRAFT"
    assert len(aircraft_token("x" * 100)) <= 24
    assert aircraft_tokens(["Jet-1", "Jet 1", "Jet-1"]) == {"Jet-1": "JET_1", "Jet 1": "JET_1_2"}


@settings(max_examples=60, deadline=None)
@given(st.floats(min_value=1e-3, max_value=1e7, allow_nan=False))
def test_drawing_sizes_are_round_numbers_in_their_bands(extent: float) -> None:
    scale = drawing_scale(extent)
    size = max(extent, MIN_EXTENT_SIZE)
    assert size / 100.0 * (1 - 1e-9) <= scale.ltscale <= size / 50.0 * (1 + 1e-9)
    assert size / 400.0 * (1 - 1e-9) <= scale.text_height <= size / 200.0 * (1 + 1e-9)
    for value in (scale.ltscale, scale.text_height):
        mantissa = value / 10.0 ** math.floor(math.log10(value) + 1e-12)
        assert any(math.isclose(mantissa, nice) for nice in NICE_MANTISSAS)


def test_text_is_escaped_for_dxf() -> None:
    assert mtext_content(["a\\b {c}", "d^e"]) == "a\\\\b \\{c\\}\\Pd^ e"
    assert text_content("50%% slope\tnow\x07") == "50%%%%%% slope now"
    assert text_content("plain 5%") == "plain 5%"
    assert wrap_lines(["  one two three four"], 10) == ["  one two", "    three", "    four"]


def test_bulge_of_a_quarter_circle_is_tan_of_a_sixteenth_turn() -> None:
    quarter = Arc((0.0, 0.0), 0.0, 10.0, math.pi / 2.0)
    rows = bulge_rows((quarter,), 1.0)
    assert rows[0, 2] == pytest.approx(math.tan(math.pi / 8.0))  # DXF bulge = tan(angle / 4): identity
    assert rows[1, :2] == pytest.approx([10.0, 10.0])


def test_fillet_edge_splits_into_two_tapers_that_end_on_the_arc() -> None:
    edge, arc = fillet_edge()
    runs = off_arc_runs(edge, arc, 0.003)
    assert len(runs) == 2
    for run in runs:
        ends = (run[0], run[-1])
        assert sum(abs(math.dist(point, arc.center_m) - arc.radius_m) < 1e-9 for point in ends) == 1


def test_labels_keep_away_from_junctions() -> None:
    anchor = label_anchor([(0.0, 0.0), (600.0, 0.0)], [(300.0, 0.0)], 50.0)
    assert anchor is not None
    (x, _y), heading = anchor
    assert abs(x - 300.0) >= 50.0 and heading == pytest.approx(0.0)


def test_docs_layer_table_matches_the_code() -> None:
    docs = (Path(__file__).resolve().parents[2] / "docs" / "dxf.md").read_text(encoding="utf-8")
    rows = re.findall(r"^\| `(\w+)` \| `([^`]+)` \| (\d+) \| (\w+) \| (.+) \|$", docs, flags=re.MULTILINE)
    assert rows == [(key, spec.name, str(spec.aci), spec.linetype, spec.description)
                    for key, spec in DXF_LAYERS.items()]
