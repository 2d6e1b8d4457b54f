"""TiledUnion: the union kept per tile equals the plain union of its pieces, whole, near a
rectangle and as drawn edges; a drag unites again only the tiles it touches and clips a changed
piece again only where it changed, with the very tiles of a fresh union; the analysis' total and
new pavement equal the plain unions on every sample."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from app.fileio.layout_json import load_layout
from app.model.analysis import LayoutAnalyzer
from app.model.edits import move_vertex
from app.model.results import LayoutResult
from app.model.tile_clips import changed_boxes
from app.model.unions import MAX_TILES_PER_SIDE, TiledGeometry, TiledUnion, TileGrid, with_gap_rows
from geometry.pavement import straight_pavement

SAMPLES = sorted((Path(__file__).resolve().parents[2] / "sample_layouts").glob("*.json"))
GRID = TileGrid(size_m=50.0)  # small tiles, so that the pieces below span several


def piece(key: int, shift_m: float) -> shapely.Geometry:
    """A long strip (many tiles) for even keys, a round pad (a few tiles) for odd ones."""
    if key % 2 == 0:
        return shapely.box(-200.0 + shift_m, 30.0 * key, 260.0 + shift_m, 30.0 * key + 18.0 + shift_m)
    return shapely.Point(40.0 * key + shift_m, 25.0 * key - shift_m).buffer(35.0 + key)


def runs(parts: tuple[np.ndarray, ...]) -> list[np.ndarray]:
    """The NaN-separated pieces of drawing arrays."""
    found = []
    for part in parts:
        for run in np.split(part, np.flatnonzero(np.isnan(part[:, 0]))):
            run = run[~np.isnan(run[:, 0])]
            if len(run) >= 2:
                found.append(run)
    return found


def drawn_lines(parts: tuple[np.ndarray, ...]) -> shapely.Geometry:
    return shapely.union_all([shapely.LineString(run) for run in runs(parts)])


def same_lines(drawn: shapely.Geometry, expected: shapely.Geometry) -> bool:
    """Equal lengths and every point of each within a micrometre of the other (identity)."""
    return (abs(drawn.length - expected.length) <= 1e-9 * expected.length
            and shapely.hausdorff_distance(drawn, expected, densify=0.05) < 1e-6)


def assert_same_area(tiled: TiledGeometry, expected: shapely.Geometry) -> None:
    assert tiled.area_m2 == pytest.approx(expected.area, rel=1e-6, abs=1e-6)  # identity
    assert tiled.whole().symmetric_difference(expected).area <= 1e-6 * max(expected.area, 1.0)  # identity


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.sets(st.integers(0, 7)), st.floats(-40.0, 40.0), st.booleans(), st.booleans()),
                min_size=1, max_size=8))
def test_matches_the_plain_union_after_any_sequence_of_changes(steps) -> None:  # type: ignore[no-untyped-def]
    union = TiledUnion(GRID)
    pieces = {f"p{k}": piece(k, 0.0) for k in range(8)}
    existing = shapely.box(-60.0, -20.0, 75.0, 95.0)
    for changed, shift_m, drop, with_existing in steps:
        for key in changed:
            pieces[f"p{key}"] = piece(key, shift_m)
        if drop and len(pieces) > 1:
            pieces.pop(sorted(pieces)[0])
        subtract = existing if with_existing else None
        total, new = union.update(pieces, subtract)
        expected = shapely.union_all(list(pieces.values()))
        assert_same_area(total, expected)
        assert_same_area(new, expected.difference(existing) if with_existing else expected)


def test_near_gives_exactly_the_union_within_a_rectangle() -> None:
    pieces = {f"p{k}": piece(k, 3.0) for k in range(8)}
    total, _ = TiledUnion(GRID).update(pieces)
    expected = shapely.union_all(list(pieces.values()))
    for bounds in ((-10.0, -10.0, 10.0, 10.0), (-150.0, 55.0, 230.0, 71.0), (100.0, 100.0, 400.0, 400.0)):
        near = total.near(bounds)
        assert near.symmetric_difference(shapely.clip_by_rect(expected, *bounds)).area < 1e-6  # identity


def test_drawn_edges_are_the_boundary_without_tile_seams() -> None:
    pieces = {f"p{k}": piece(k, 7.0) for k in range(8)}
    existing = shapely.box(-60.0, -20.0, 75.0, 95.0)
    total, new = TiledUnion(GRID).update(pieces, existing)
    expected = shapely.union_all(list(pieces.values()))
    edges = drawn_lines(total.edge_parts_xy())
    assert edges.length == pytest.approx(expected.boundary.length, rel=1e-9)  # identity
    assert same_lines(edges, expected.boundary)
    filled = shapely.Polygon()
    for ring in runs(new.fill_parts_xy()):  # the even-odd rule: each ring flips inside and outside
        filled = filled.symmetric_difference(shapely.Polygon(ring))
    assert filled.symmetric_difference(expected.difference(existing)).area < 1e-6  # identity


def test_a_drag_unites_again_only_the_tiles_it_touches() -> None:
    union = TiledUnion(GRID)
    pieces = {f"p{k}": piece(k, 0.0) for k in range(8)}
    union.update(pieces)
    for step in range(1, 4):
        pieces["p3"] = piece(3, 0.5 * step)
        drawn_before = union.update(pieces)[0].edge_parts_xy()
        assert union.last_united_tiles <= 9  # identity: the pad, 76 m across, spans 3 x 3 tiles of 50 m
    pieces["p3"] = piece(3, 2.5)
    drawn_after = union.update(pieces)[0].edge_parts_xy()
    kept = sum(a is b for a, b in zip(drawn_before, drawn_after, strict=False))
    assert kept >= len(drawn_after) - 9  # identity: the other tiles keep their arrays


def test_a_result_built_from_plain_geometries_reads_them_back() -> None:
    square = shapely.box(0.0, 0.0, 10.0, 10.0)
    result = LayoutResult({}, square, square, square, 100.0, 100.0, ())
    assert result.total_pavement is square and result.new_pavement is square  # identity
    assert result.straight_pavement is square  # identity
    assert result.pavement_near((-1.0, -1.0, 5.0, 5.0)).area == pytest.approx(25.0)  # identity
    assert drawn_lines(result.pavement_edges_xy()).length == pytest.approx(40.0)  # identity


def assert_plain_unions(layout, analyzer: LayoutAnalyzer, result: LayoutResult) -> None:  # type: ignore[no-untyped-def]
    pieces = list(analyzer._total_union._pieces.values())  # the pieces it united
    total = shapely.union_all(pieces)
    existing = [shapely.Polygon(p.outline, p.holes) for p in layout.existing_pavements]
    new = total.difference(shapely.union_all(existing)) if existing else total
    assert result.total_area_m2 == pytest.approx(total.area, rel=1e-6)  # identity
    assert result.new_area_m2 == pytest.approx(new.area, rel=1e-6)  # identity
    assert result.total_pavement.symmetric_difference(total).area < 1e-6 * total.area  # identity
    assert result.new_pavement.symmetric_difference(new).area < 1e-6 * total.area  # identity
    assert same_lines(drawn_lines(result.pavement_edges_xy()), total.boundary)


@pytest.mark.parametrize("path", SAMPLES, ids=lambda p: p.stem)
def test_the_analysis_pavement_equals_the_plain_union_on_the_samples(path: Path) -> None:
    layout = load_layout(path)
    analyzer = LayoutAnalyzer()
    assert_plain_unions(layout, analyzer, analyzer.analyze(layout))
    for centerline in layout.centerlines[:1]:  # an edit, answered in part from the tiles it did not touch
        x, y = centerline.vertices[-1].xy
        layout = move_vertex(layout, centerline.id, len(centerline.vertices) - 1, x + 3.0, y - 2.0)
        assert_plain_unions(layout, analyzer, analyzer.analyze(layout))


def test_a_layout_spanning_thousands_of_kilometres_gets_coarser_tiles_and_the_same_union() -> None:
    # A stray vertex far away (the robustness sketches reach 10^7 ft) must not make millions of tiles.
    pieces = {"near": shapely.box(0.0, 0.0, 60.0, 30.0),
              "far": shapely.LineString([(0.0, 0.0), (3.0e6, 2.0e6)]).buffer(20.0)}
    union = TiledUnion()
    total, _ = union.update(pieces)
    span_m = 3.0e6 + 40.0
    assert span_m / union.grid.size_m <= MAX_TILES_PER_SIDE  # identity (the tiling rule)
    plain = shapely.union_all(list(pieces.values()))
    assert total.area_m2 == pytest.approx(plain.area, rel=1e-9)  # identity
    assert union.last_united_tiles < 4 * MAX_TILES_PER_SIDE  # identity: only the tiles the pieces meet


# -- a changed piece is clipped again only where it changed ------------------------------------
def pavement_of(points: list[tuple[float, float]], width_m: float = 23.0) -> shapely.Geometry:
    """A line's straight pavement, as the analysis builds it (geometry/pavement.py)."""
    return straight_pavement(np.array(points), width_m)


def assert_tiles_as_fresh(union: TiledUnion, pieces: dict[str, shapely.Geometry]) -> None:
    """Every tile's parts and union are exactly those a fresh union clips and unites."""
    fresh = TiledUnion(union.grid)
    fresh.update(pieces)
    parts = {tile: keyed for tile, keyed in union._parts.items() if keyed}  # the tile contents compared
    assert parts.keys() == {tile for tile, keyed in fresh._parts.items() if keyed}  # identity
    for tile, keyed in parts.items():
        assert keyed.keys() == fresh._parts[tile].keys()  # identity
        assert all(shapely.equals_exact(part, fresh._parts[tile][key], tolerance=0.0)
                   for key, part in keyed.items())  # identity: the very coordinates
    assert union._union.keys() == fresh._union.keys()  # identity


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.integers(0, 5), st.floats(-30.0, 30.0), st.floats(-30.0, 30.0), st.booleans()),
                min_size=1, max_size=6))
def test_moving_vertices_of_long_pieces_gives_the_tiles_of_a_fresh_union(moves) -> None:  # type: ignore[no-untyped-def]
    # An axis-parallel line (its mitre points slide along it), a slanted one and a holed pad.
    axis = [(0.0, 10.0), (140.0, 10.0), (280.0, 10.0), (420.0, 10.0), (560.0, 10.0), (700.0, 10.0)]
    slant = [(0.0, 0.0), (130.0, 75.0), (260.0, 150.0), (390.0, 225.0), (520.0, 300.0), (650.0, 375.0)]
    pad = shapely.box(300.0, 200.0, 420.0, 320.0).difference(shapely.box(330.0, 230.0, 360.0, 260.0))
    union = TiledUnion(GRID)
    pieces = {"axis": pavement_of(axis), "slant": pavement_of(slant), "pad": pad}
    union.update(pieces)
    for index, dx_m, dy_m, on_axis in moves:
        points = axis if on_axis else slant
        x_m, y_m = points[index]
        points[index] = (x_m + (0.0 if on_axis else dx_m), y_m + dy_m)
        pieces = {**pieces, "axis" if on_axis else "slant": pavement_of(points)}
        pieces["pad"] = shapely.Polygon([(x + (dx_m if i == 0 else 0.0), y) for i, (x, y) in
                                         enumerate(pad.exterior.coords[:-1])], [pad.interiors[0].coords])
        union.update(pieces)
        assert_tiles_as_fresh(union, pieces)


@settings(max_examples=60, deadline=None)
@given(st.integers(0, 7), st.floats(-40.0, 40.0), st.floats(-40.0, 40.0))
def test_changed_boxes_cover_where_two_pieces_differ(index, dx_m, dy_m) -> None:  # type: ignore[no-untyped-def]
    points = [(0.0, 0.0), (90.0, 20.0), (180.0, 0.0), (270.0, 40.0), (360.0, 0.0), (450.0, 0.0),
              (540.0, 0.0), (630.0, 30.0)]
    before = pavement_of(points)
    points[index] = (points[index][0] + dx_m, points[index][1] + dy_m)
    after = pavement_of(points)
    boxes = changed_boxes(before, after, 0.0)
    if boxes is None:  # not built alike: the union clips the whole piece again
        return
    covered = shapely.union_all(shapely.box(boxes[:, 0], boxes[:, 1], boxes[:, 2], boxes[:, 3]))
    outside = before.symmetric_difference(after).difference(covered)
    assert outside.area <= 1e-9 * before.area  # invariant: every change lies in a box


def test_a_long_line_dragged_at_one_vertex_is_clipped_again_only_near_it() -> None:
    # A 5 km zigzag line over 100 tiles of 50 m a row; its middle vertex dragged frame after frame.
    points = [(float(x), 40.0 * (x // 500 % 2)) for x in range(0, 5001, 500)]
    union = TiledUnion(GRID)
    clipped = []
    for step in range(4):
        points[5] = (2500.0, 40.0 + 0.3 * step)
        union.update({"line": pavement_of(points)})
        clipped.append(union.last_clipped_tiles)
    # identity: the vertex moves its own mitre points and its neighbours', so the edges from the
    # second vertex before it to the second after it change: 2 km, 40 tiles a row, on 2 rows.
    assert clipped[-1] <= 2 * (2000 // 50 + 2) < clipped[0] / 2
    assert_tiles_as_fresh(union, {"line": pavement_of(points)})


def test_gap_rows_go_where_numpy_insert_puts_them() -> None:
    rng = np.random.default_rng(11)
    xy = rng.random((40, 2))
    breaks = rng.random(39) < 0.3
    drawn, rows = with_gap_rows(xy, breaks)
    # identity: the same array as np.insert of a NaN row after every break
    assert np.array_equal(drawn, np.insert(xy, np.flatnonzero(breaks) + 1, np.nan, axis=0), equal_nan=True)
    # identity: each point went to the row returned for it
    assert np.array_equal(drawn[rows], xy)
