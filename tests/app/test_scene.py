"""The scene: layouts and results turned into NaN-separated arrays per layer, rebuilt only where
their inputs changed."""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
import shapely

from app.model.edits import move_vertex, set_corner_radius
from app.model.elements import Centerline, ExistingPavement, FixedObject, Layout, Runway, Vertex
from app.model.scene import (
    LAYER_ORDER,
    build_scene,
    centerline_xy,
    join_pieces,
    layout_bounds,
    rings_xy,
    runway_outline_xy,
    selection_xy,
)
from geometry.aircraft import DesignAircraft
from geometry.rulesets import get_rule_set
from tests.ui.synthetic import synthetic_result


def nan_rows(xy: np.ndarray) -> int:
    return int(np.isnan(xy[:, 0]).sum())


def demo() -> Layout:
    return Layout(
        units="m",
        centerlines=(Centerline("twy-1", "A", (Vertex(-200.0, 0.0), Vertex(0.0, 0.0), Vertex(200.0, 0.0))),
                     Centerline("twy-2", "B", (Vertex(0.0, 0.0), Vertex(0.0, 150.0)))),
        runways=(Runway("rwy-1", "09/27", (Vertex(-500.0, -200.0), Vertex(500.0, -200.0)), 45.0),),
        objects=(FixedObject("obj-1", "Shed", ((50.0, 50.0), (70.0, 50.0), (70.0, 60.0)), 5.0),
                 FixedObject("obj-2", "Mast", ((-50.0, 60.0),), 12.0, kind="navaid")),
        existing_pavements=(ExistingPavement("pav-1", "Apron", ((-100.0, 100.0), (100.0, 100.0),
                                                                (100.0, 300.0), (-100.0, 300.0)),
                                             (((-10.0, 150.0), (10.0, 150.0), (10.0, 170.0)),)),))


def test_pieces_are_joined_with_one_nan_row_between_them() -> None:
    joined = join_pieces([np.zeros((3, 2)), np.empty((0, 2)), np.ones((2, 2))])
    assert joined.shape == (6, 2) and nan_rows(joined) == 1 and np.isnan(joined[3]).all()
    assert join_pieces([]).shape == (0, 2)


def test_polygon_rings_keep_holes_as_separate_pieces() -> None:
    square = shapely.Polygon([(0, 0), (10, 0), (10, 10), (0, 10)], [[(2, 2), (4, 2), (4, 4)]])
    both = shapely.MultiPolygon([square, shapely.box(20, 20, 30, 30)])
    assert nan_rows(rings_xy(both)) == 2  # three rings: exterior, hole, second exterior
    assert rings_xy(shapely.Polygon()).shape == (0, 2)


def test_a_rounded_corner_is_drawn_as_a_true_arc() -> None:
    vertices = (Vertex(0.0, 0.0), Vertex(100.0, 0.0, corner_radius_m=30.0), Vertex(100.0, 100.0))
    xy = centerline_xy(vertices)
    arc = xy[1:-1]
    # Identity of a circular fillet of a 90-degree corner: tangent length R tan(45 deg) = R, and
    # every arc point lies R from the centre (70, 30).
    assert tuple(arc[0]) == pytest.approx((70.0, 0.0)) and tuple(arc[-1]) == pytest.approx((100.0, 30.0))
    assert np.hypot(arc[:, 0] - 70.0, arc[:, 1] - 30.0) == pytest.approx(np.full(len(arc), 30.0))
    chords = np.hypot(*np.diff(arc, axis=0).T)
    # identity: a chord c of a circle of radius R has the sagitta R (1 - cos(asin(c / 2R)))
    sagitta = 30.0 * (1.0 - np.cos(np.arcsin(chords / 60.0)))
    assert sagitta.max() <= 0.05 + 1e-9


def test_a_corner_too_large_for_its_legs_is_drawn_with_the_radius_that_fits() -> None:
    vertices = (Vertex(0.0, 0.0), Vertex(20.0, 0.0, corner_radius_m=500.0), Vertex(20.0, 20.0))
    xy = centerline_xy(vertices)
    assert tuple(xy[1]) == pytest.approx((0.0, 0.0))  # the tangent length is cut to the 20 m leg
    assert np.isfinite(xy).all()


def test_runway_outline_has_the_runway_width() -> None:
    ring = runway_outline_xy(Runway("rwy-1", "05/23", (Vertex(0.0, 0.0), Vertex(300.0, 400.0)), 60.0))
    polygon = shapely.Polygon(ring)
    assert polygon.area == pytest.approx(500.0 * 60.0)  # identity: length x width
    assert layout_bounds(Layout(runways=(Runway("r", "09/27", (Vertex(0, 0), Vertex(100, 0)), 40.0),))) == (
        0.0, -20.0, 100.0, 20.0)
    assert layout_bounds(Layout()) is None


def test_layers_of_a_layout_without_results() -> None:
    scene = build_scene(demo())
    assert tuple(scene.layers) == LAYER_ORDER
    taxiways = scene.layers["centerlines"].shape("centerline.taxiway")
    assert taxiways is not None and nan_rows(taxiways.xy) == 1
    vertex_keys = scene.layers["centerlines"].point_set("vertex")
    assert vertex_keys is not None and vertex_keys.keys.count("twy-1") == 3
    existing = scene.layers["pavement"].shape("pavement.existing")
    assert existing is not None and existing.filled and nan_rows(existing.xy) == 1  # outline and hole
    assert scene.layers["pavement"].shape("pavement.new") is None
    assert scene.layers["gear_tracks"].shapes == () and scene.layers["findings"].points == ()
    point_objects = scene.layers["objects"].point_set("object.point")
    assert point_objects is not None and point_objects.keys == ("obj-2",)


def test_only_layers_whose_inputs_changed_are_rebuilt() -> None:
    layout = demo()
    first = build_scene(layout)
    moved = build_scene(move_vertex(layout, "twy-2", 1, 10.0, 160.0), previous=first)
    assert moved.layers["runways"] is first.layers["runways"]
    assert moved.layers["pavement"] is first.layers["pavement"]
    assert moved.layers["centerlines"] is not first.layers["centerlines"]
    again = build_scene(move_vertex(layout, "twy-2", 1, 10.0, 160.0), previous=moved)
    assert all(again.layers[name] is moved.layers[name] for name in LAYER_ORDER)


def test_result_layers_show_pavement_tracks_and_findings() -> None:
    layout = demo()
    result = synthetic_result(layout)
    scene = build_scene(layout, result)
    pavement = scene.layers["pavement"]
    assert pavement.shape("pavement.shoulder") is not None  # present, empty without shoulders
    for style in ("pavement.new", "pavement.fillet", "pavement.edge", "pavement.required"):
        shape = pavement.shape(style)
        assert shape is not None and len(shape.xy) > 0, style
    movements = [m for j in result.junctions.values() for m in j.movements]
    gear = scene.layers["gear_tracks"].shape("track.gear")
    assert gear is not None and nan_rows(gear.xy) == 2 * len(movements) - 1  # two tyre edges each
    wingtips = scene.layers["wingtip_tracks"].shape("track.wingtip")
    assert wingtips is not None and nan_rows(wingtips.xy) == 2 * len(movements) - 1
    errors = scene.layers["findings"].point_set("finding.error")
    assert errors is not None and len(errors.xy) == 1
    junctions = scene.layers["centerlines"].point_set("junction")
    assert junctions is not None and junctions.keys == tuple(result.junctions)


def test_excluded_movements_are_drawn_apart() -> None:
    layout = demo()
    result = synthetic_result(layout)
    junction = next(iter(result.junctions.values()))
    excluded = replace(junction, movements=tuple(replace(m, excluded=True) for m in junction.movements[:1])
                       + junction.movements[1:])
    scene = build_scene(layout, replace(result, junctions={junction.junction_id: excluded}))
    dimmed = scene.layers["gear_tracks"].shape("track.gear.excluded")
    assert dimmed is not None and nan_rows(dimmed.xy) == 1


def test_clearance_zone_lies_at_the_object_separation_of_the_rule_set() -> None:
    aircraft = DesignAircraft("Test jet", cmg_m=17.0, wheelbase_m=15.0, mgw_m=7.0, tyre_width_m=0.4,
                              wingspan_m=34.0, wingtip_x_m=-5.0, nose_x_m=19.0, tail_x_m=-18.0,
                              tail_height_m=11.0)
    line = Centerline("twy-1", "A", (Vertex(0.0, 0.0), Vertex(400.0, 0.0)))
    layout = Layout(rule_set="ICAO", fleet=(aircraft,), centerlines=(line,))
    zone = build_scene(layout).layers["objects"].shape("object.clearance")
    separation = get_rule_set("ICAO").separation("taxiway_object", aircraft).value_m
    assert zone is not None
    # identity: the zone edge is the centerline widened by the rule set's separation
    assert np.nanmax(zone.xy[:, 1]) == pytest.approx(separation)
    assert np.nanmin(zone.xy[:, 1]) == pytest.approx(-separation)
    no_fleet = build_scene(replace(layout, fleet=())).layers["objects"].shape("object.clearance")
    assert no_fleet is not None and no_fleet.xy.shape == (0, 2)


def test_selection_outline_follows_the_element() -> None:
    layout = set_corner_radius(demo(), "twy-1", 1, 20.0)
    xy = selection_xy(layout, ["twy-2", "rwy-1"])
    assert nan_rows(xy) == 1 and len(xy) == 2 + 1 + 5
    assert math.isclose(float(np.nanmax(xy[:, 1])), 150.0)


def test_a_moved_line_is_the_only_new_part_of_its_centerline_style() -> None:
    layout = demo()
    before = build_scene(layout).layers["centerlines"].shape("centerline.taxiway")
    after = build_scene(move_vertex(layout, "twy-2", 1, 10.0, 150.0)).layers["centerlines"].shape(
        "centerline.taxiway")
    assert before is not None and after is not None
    assert len(before.parts) == len(after.parts) == 2  # identity: a part per centerline
    assert after.parts[0] is before.parts[0]  # identity: the unmoved line hands over its very array
    assert after.parts[1] is not before.parts[1]  # identity: the moved line is drawn anew
    assert np.array_equal(after.xy, join_pieces(after.parts), equal_nan=True)  # identity: xy joins the parts


def test_rings_are_the_coordinates_of_each_polygon_ring_in_order() -> None:
    square = shapely.Polygon([(0, 0), (10, 0), (10, 10), (0, 10)], [[(2, 2), (4, 2), (4, 4)]])
    other = shapely.box(20, 20, 30, 30)
    mixed = shapely.GeometryCollection([square, shapely.LineString([(0, 0), (5, 5)]), other])
    rings = [shapely.get_coordinates(ring) for ring in shapely.get_rings(np.array([square, other]))]
    # identity: every ring of the polygons (the line left out), joined as join_pieces joins them
    assert np.array_equal(rings_xy(mixed), join_pieces(rings), equal_nan=True)
