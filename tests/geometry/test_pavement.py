"""Tests of the required pavement: tyre bands, movement areas, straight pavement, unions and the
split into new and existing pavement. Demo aircraft are fictional."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.affinity import scale
from shapely.geometry import LineString, MultiPoint, Polygon

from geometry.errors import GeometryError, NonFiniteInputError
from geometry.path import CenterlinePath, standard_turn_path
from geometry.pavement import (
    ARC_SAGITTA_M,
    SIMPLIFY_TOLERANCE_M,
    containment_gap,
    junction_required_area,
    quad_segs_for,
    required_movement_area,
    required_movement_areas,
    simplified_tracks,
    split_new_existing,
    straight_pavement,
    summarize_pavement,
    tyre_band,
)
from geometry.primitives import Arc, Straight
from geometry.sweep import sweep
from tests.geometry.sweep_fixture import demo_aircraft, rk4_swept_path

FAST = settings(max_examples=20, deadline=None)
TOLERANCE_M = 0.001  # the accuracy the module promises: simplification plus arc sagitta, within 1 mm


def _straight_movement(length_m: float = 200.0, heading_rad: float = 0.4):
    return sweep(CenterlinePath((Straight((3.0, -7.0), heading_rad, length_m),)), demo_aircraft())


@pytest.mark.parametrize("heading_rad", [0.0, 0.7, -2.2])
@pytest.mark.parametrize(("width_m", "length_m"), [(23.0, 150.0), (10.5, 33.3)])
def test_straight_pavement_area_is_width_times_length(heading_rad: float, width_m: float,
                                                      length_m: float) -> None:
    pavement = straight_pavement(Straight((12.0, -4.0), heading_rad, length_m), width_m)
    assert pavement.area == pytest.approx(width_m * length_m, rel=1e-12)  # identity: a flat-capped strip


def test_straight_pavement_accepts_every_centerline_form() -> None:
    straight = Straight((0.0, 0.0), 0.25, 80.0)
    forms = [straight, CenterlinePath((straight,)), [straight],
             np.array([straight.start, straight.end]), LineString([straight.start, straight.end])]
    for form in forms:
        assert straight_pavement(form, 15.0).area == pytest.approx(15.0 * 80.0, rel=1e-12)  # identity


def test_straight_pavement_along_an_arc_is_an_annular_sector() -> None:
    arc = Arc((0.0, 0.0), 0.0, 60.0, math.pi / 3)
    expected_m2 = 15.0 * 60.0 * math.pi / 3  # identity: width x centerline length for an annular sector
    assert straight_pavement(arc, 15.0).area == pytest.approx(expected_m2, rel=1e-5)


def test_straight_pavement_rejects_bad_input() -> None:
    with pytest.raises(GeometryError):
        straight_pavement(Straight((0.0, 0.0), 0.0, 10.0), 0.0)
    with pytest.raises(NonFiniteInputError):
        straight_pavement(Straight((0.0, 0.0), 0.0, 10.0), math.nan)
    with pytest.raises(NonFiniteInputError):
        straight_pavement(np.array([[0.0, 0.0], [math.inf, 1.0]]), 10.0)
    with pytest.raises(GeometryError):
        straight_pavement(np.array([[1.0, 1.0], [1.0, 1.0]]), 10.0)


def test_required_area_of_a_straight_movement_is_gear_width_plus_two_margins_wide() -> None:
    swept = _straight_movement()
    margin_m = 4.5
    middle = shapely.box(40.0, -30.0, 100.0, 30.0)
    aligned = shapely.affinity.rotate(middle, 0.4, origin=(3.0, -7.0), use_radians=True)
    area = required_movement_area(swept, margin_m).intersection(aligned).area
    # identity: a settled straight needs mgw + 2 margins across, exactly (straight edges are exact)
    assert area == pytest.approx((swept.aircraft.mgw_m + 2.0 * margin_m) * 60.0, rel=1e-12)


def test_round_ends_stay_within_the_arc_tolerance() -> None:
    swept = _straight_movement(100.0)
    margin_m = 4.5
    band_m2 = tyre_band(swept).area
    perimeter_m = 2.0 * (100.0 + swept.aircraft.mgw_m)
    exact_m2 = band_m2 + perimeter_m * margin_m + math.pi * margin_m**2  # identity: Steiner's formula
    area_m2 = required_movement_area(swept, margin_m).area
    assert exact_m2 - 2.0 * math.pi * margin_m * ARC_SAGITTA_M <= area_m2 <= exact_m2 + 1e-9


def test_quad_segs_keep_the_sagitta() -> None:
    for radius_m in (0.1, 1.5, 4.5, 7.0, 30.0):
        quarter = quad_segs_for(radius_m)
        sagitta = radius_m * (1.0 - math.cos(math.pi / (4.0 * quarter)))  # identity: chord sagitta
        assert sagitta <= ARC_SAGITTA_M


@st.composite
def turns(draw: st.DrawFn):
    cmg_m = draw(st.floats(8.0, 35.0))
    mgw_m = draw(st.floats(3.0, 14.0))
    radius_m = cmg_m * draw(st.floats(1.2, 4.0))
    turn_rad = math.radians(draw(st.floats(20.0, 170.0))) * draw(st.sampled_from([1.0, -1.0]))
    margin_m = draw(st.floats(1.5, 4.5))
    return demo_aircraft(cmg_m, mgw_m), radius_m, turn_rad, margin_m


@FAST
@given(turns())
def test_required_area_contains_every_tyre_track_plus_the_margin(case) -> None:
    aircraft, radius_m, turn_rad, margin_m = case
    lead_m = 3.0 * aircraft.cmg_m
    swept = sweep(standard_turn_path(radius_m, turn_rad, lead_m, lead_m), aircraft)
    required = required_movement_area(swept, margin_m)
    reach_m = margin_m - TOLERANCE_M
    for track in (swept.gear_left_edge_xy, swept.gear_right_edge_xy):
        assert required.contains(LineString(track).buffer(reach_m))
    every_tenth = np.arange(0, len(swept.station_m), 10)
    axles = [LineString([left, right]) for left, right in
             zip(swept.gear_left_edge_xy[every_tenth], swept.gear_right_edge_xy[every_tenth], strict=True)]
    assert required.contains(shapely.union_all([axle.buffer(reach_m) for axle in axles]))
    points = MultiPoint(swept.gear_left_edge_xy[every_tenth])
    assert required.contains(points.buffer(reach_m))
    assert math.isfinite(required.area) and required.area > 0.0 and required.is_valid


@FAST
@given(turns())
def test_mirrored_movement_gives_the_mirrored_required_area(case) -> None:
    aircraft, radius_m, turn_rad, margin_m = case
    lead_m = 2.0 * aircraft.cmg_m
    area = required_movement_area(sweep(standard_turn_path(radius_m, turn_rad, lead_m, lead_m), aircraft),
                                  margin_m)
    mirrored = required_movement_area(sweep(standard_turn_path(radius_m, -turn_rad, lead_m, lead_m),
                                            aircraft), margin_m)
    # identity: reflection keeps areas; each polygon lies within the simplification tolerance of the
    # exact one, which bounds how far the simplified pair may differ
    bound_m2 = 2.0 * SIMPLIFY_TOLERANCE_M * area.length
    assert abs(mirrored.area - area.area) <= bound_m2
    assert scale(area, 1.0, -1.0, origin=(0.0, 0.0)).symmetric_difference(mirrored).area <= bound_m2


def test_required_area_from_independent_tracks_agrees() -> None:
    aircraft = demo_aircraft(30.0, 11.0)
    path = standard_turn_path(50.0, math.radians(115.0), 90.0, 150.0)
    engine = required_movement_area(sweep(path, aircraft), 4.5)
    reference = required_movement_area(rk4_swept_path(path, aircraft), 4.5)
    # identity: same model, different sampling; both polygons are within a few mm of the exact one
    assert engine.symmetric_difference(reference).area < 0.005 * engine.length


def _swept_quadrilaterals(swept) -> Polygon:
    """Union of the quadrilaterals the axle sweeps between stations (bow-ties kept whole)."""
    left, right = swept.gear_left_edge_xy, swept.gear_right_edge_xy
    quads = [shapely.make_valid(Polygon([left[i], left[i + 1], right[i + 1], right[i]]))
             for i in range(len(left) - 1)]
    return shapely.union_all(quads)


def test_tyre_band_of_a_looping_movement_is_valid() -> None:
    aircraft = demo_aircraft(20.0, 9.0)
    path = standard_turn_path(30.0, math.radians(330.0), 60.0, 120.0)  # the exit crosses the entry
    swept = rk4_swept_path(path, aircraft, step_m=0.5)
    band = tyre_band(swept)
    assert not Polygon(np.vstack((swept.gear_left_edge_xy, swept.gear_right_edge_xy[::-1]))).is_valid
    assert band.is_valid
    reference = _swept_quadrilaterals(swept)
    # identity: the band is the union of the quadrilaterals swept between stations
    assert band.symmetric_difference(reference).area < 1e-6 * reference.area
    simplified = tyre_band(swept, SIMPLIFY_TOLERANCE_M)
    assert simplified.is_valid and abs(simplified.area - band.area) < SIMPLIFY_TOLERANCE_M * band.length


def test_tyre_band_where_the_inner_wheel_rolls_backwards_is_valid() -> None:
    # gear radius about 10.2 m, less than mgw / 2 = 18 m: the inner wheel rolls backwards
    swept = sweep(standard_turn_path(21.0, math.pi, 40.0, 60.0), demo_aircraft(20.0, 36.0, wheelbase_m=18.0))
    assert not Polygon(np.vstack((swept.gear_left_edge_xy, swept.gear_right_edge_xy[::-1]))).is_valid
    band = tyre_band(swept)
    reference = _swept_quadrilaterals(swept)
    assert band.is_valid and band.symmetric_difference(reference).area < 1e-6 * reference.area  # identity
    assert required_movement_area(swept, 3.0).contains(reference.buffer(3.0 - TOLERANCE_M))


def test_required_area_rejects_bad_margins() -> None:
    swept = _straight_movement(50.0)
    with pytest.raises(GeometryError):
        required_movement_area(swept, -1.0)
    with pytest.raises(NonFiniteInputError):
        required_movement_area(swept, math.nan)
    assert required_movement_area(swept, 0.0).area == pytest.approx(tyre_band(swept).area)


def test_tyre_band_needs_both_tracks_at_every_station() -> None:
    swept = _straight_movement(50.0)
    uneven = dataclasses.replace(swept, gear_right_edge_xy=swept.gear_right_edge_xy[:-1])
    with pytest.raises(GeometryError):
        tyre_band(uneven, SIMPLIFY_TOLERANCE_M)


def test_simplifying_many_tracks_at_once_equals_one_at_a_time() -> None:
    rng = np.random.default_rng(7)
    tracks = [np.cumsum(rng.normal(0.0, 0.01, (count, 2)), axis=0) + np.array([count, 0.0])
              for count in (2, 3, 50, 400, 17)]
    together = simplified_tracks(tracks, 0.003)
    for track, simple in zip(tracks, together, strict=True):
        alone = shapely.get_coordinates(shapely.simplify(LineString(track), 0.003, preserve_topology=False))
        assert np.array_equal(simple, alone)  # identity: the same Douglas-Peucker, call by call


def test_required_areas_of_many_movements_at_once_equal_one_at_a_time() -> None:
    plane = demo_aircraft(20.0, 9.0)
    swept = [sweep(standard_turn_path(radius_m, turn_rad, 40.0, 60.0), plane)
             for radius_m, turn_rad in ((30.0, 1.2), (45.0, -2.0), (60.0, 0.5))]
    looping = standard_turn_path(30.0, math.radians(330.0), 60.0, 120.0)
    swept.append(rk4_swept_path(looping, plane, step_m=0.5))
    margins_m = [3.0, 4.5, 0.0, 3.0]  # the last band loops over itself: rebuilt piecewise
    together = required_movement_areas(swept, margins_m)
    for one, margin_m, area in zip(swept, margins_m, together, strict=True):
        assert shapely.equals_exact(area, required_movement_area(one, margin_m), 0.0)  # identity
    with pytest.raises(GeometryError):
        required_movement_areas(swept, margins_m[:-1])


def test_junction_required_area_is_the_union() -> None:
    movement = shapely.box(0.0, 0.0, 10.0, 10.0)
    straights = [shapely.box(5.0, 0.0, 20.0, 10.0), shapely.box(0.0, 5.0, 10.0, 30.0)]
    union = junction_required_area([movement], straights)
    assert union.area == pytest.approx(100.0 + 100.0 + 200.0)  # identity: 10x10 + 10x10 + 10x20 beyond
    assert junction_required_area([], []).is_empty


def test_split_new_existing_areas_add_up() -> None:
    required = shapely.box(0.0, 0.0, 10.0, 10.0)
    new, reused = split_new_existing(required, [shapely.box(5.0, -5.0, 15.0, 15.0)])
    assert new.area == pytest.approx(50.0) and reused.area == pytest.approx(50.0)  # identity
    summary = summarize_pavement(required, [shapely.box(5.0, -5.0, 15.0, 15.0), shapely.box(0, 0, 1, 1)])
    assert summary.new_area_m2 == pytest.approx(49.0) and summary.existing_area_m2 == pytest.approx(51.0)
    assert summary.total_area_m2 == pytest.approx(required.area)  # identity: new + existing = total
    nothing_existing = summarize_pavement(required, [])
    assert nothing_existing.new_area_m2 == pytest.approx(100.0) and nothing_existing.existing_area_m2 == 0.0


def test_containment_gap_measures_area_and_distance() -> None:
    gap = containment_gap(shapely.box(0.0, 0.0, 10.0, 10.0), shapely.box(0.0, 0.0, 10.0, 9.9))
    assert gap.area_m2 == pytest.approx(1.0) and gap.max_distance_m == pytest.approx(0.1)  # identity
    assert containment_gap(shapely.box(0, 0, 1, 1), shapely.box(-1, -1, 2, 2)).area_m2 == 0.0
