"""Junctions found from exact centerlines: kinds, legs, ids, snapping, incremental updates."""

from __future__ import annotations

import math
import random
from collections.abc import Sequence

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geometry.centerline import centerline_segments
from geometry.errors import NetworkError
from geometry.network import (
    Junction,
    LineKind,
    NetworkLine,
    build_network,
    find_junctions,
    junctions_touching,
    update_network,
)


def line(line_id: str, points: Sequence[tuple[float, float]], radii: Sequence[float | None] | None = None,
         kind: LineKind = "taxiway") -> NetworkLine:
    return NetworkLine(line_id, kind, centerline_segments(points, radii or [None] * len(points)))


def headings_deg(junction: Junction) -> dict[str, float]:
    return {leg.id.split("|")[1]: round(math.degrees(leg.heading_rad), 9) for leg in junction.legs}


def test_two_lines_crossing_make_one_crossing_with_four_legs() -> None:
    network = build_network([line("twy-1", [(0, 0), (200, 0)]), line("twy-2", [(100, -50), (100, 150)])])
    (junction,) = network.junctions
    assert junction.id == "J:twy-1/twy-2#0" and junction.kind == "crossing"
    assert junction.point == pytest.approx((100.0, 0.0))  # identity
    # identity: legs point east, west, north and south
    assert headings_deg(junction) == {"twy-1+": 0.0, "twy-1-": 180.0, "twy-2+": 90.0, "twy-2-": -90.0}
    lengths = {leg.id.split("|")[1]: (leg.length_m, network.station_m(junction, leg), leg.direction)
               for leg in junction.legs}
    assert lengths == {"twy-1+": (100.0, 100.0, 1), "twy-1-": (100.0, 100.0, -1),
                       "twy-2+": (150.0, 50.0, 1), "twy-2-": (50.0, 50.0, -1)}  # identity


def test_a_line_ending_on_another_makes_a_tee_without_a_zero_length_leg() -> None:
    (junction,) = find_junctions([line("a", [(0, 0), (200, 0)]), line("b", [(60, 0), (60, 80)])])
    assert junction.kind == "tee" and junction.point == pytest.approx((60.0, 0.0))  # identity
    assert sorted(headings_deg(junction)) == ["a+", "a-", "b+"]


@pytest.mark.parametrize(("gap_m", "found"), [(0.3, True), (0.49, True), (0.7, False), (-0.3, True)])
def test_an_end_near_another_line_snaps_within_the_tolerance(gap_m: float, found: bool) -> None:
    # The branch stops gap_m short of the through line (negative: it overshoots by that much).
    lines = [line("a", [(0, 0), (200, 0)]), line("b", [(60, 80), (60, gap_m)])]
    junctions = find_junctions(lines, snap_tolerance_m=0.5)
    assert len(junctions) == int(found)
    if found:
        (junction,) = junctions
        assert junction.kind == "tee"
        assert junction.point == pytest.approx((60.0, 0.0))  # on the through line (documented rule)
        (branch,) = [leg for leg in junction.legs if leg.line_id == "b"]
        assert branch.length_m == pytest.approx(80.0 - gap_m)  # identity: the whole branch


def test_ends_meeting_ends_make_an_elbow_at_their_midpoint() -> None:
    (junction,) = find_junctions([line("a", [(0, 0), (100, 0)]), line("b", [(100.2, 0.0), (100.2, 90)])])
    assert junction.kind == "elbow" and len(junction.legs) == 2
    assert junction.point == pytest.approx((100.1, 0.0))  # identity: midway between the two ends
    assert headings_deg(junction) == {"a-": 180.0, "b+": 90.0}  # identity


def test_several_lines_through_one_point_make_one_junction() -> None:
    lines = [line("a", [(-100, 0), (100, 0)]), line("b", [(0, -100), (0, 100)]),
             line("c", [(-100, -100.2), (100, 99.8)])]  # passes 0.14 m from the a/b crossing
    (junction,) = find_junctions(lines)
    assert junction.kind == "multi" and junction.id == "J:a/b/c#0" and len(junction.legs) == 6
    assert math.hypot(*junction.point) < 0.2  # within the merged contacts, 0.2 m from the a/b crossing


def test_a_corner_of_one_line_is_not_a_junction() -> None:
    assert find_junctions([line("a", [(0, 0), (100, 0), (100, 100)], [None, 40.0, None])]) == ()


def test_runway_crossings_are_kinded() -> None:
    runway = line("rwy", [(-1000, 0), (1000, 0)], kind="runway")
    other_runway = line("rwy-2", [(0, -800), (0, 800)], kind="runway")
    taxiway = line("twy", [(300, -200), (300, 200)])
    kinds = {junction.id: junction.kind for junction in find_junctions([runway, other_runway, taxiway])}
    assert kinds == {"J:rwy/rwy-2#0": "runway_runway", "J:rwy/twy#0": "taxiway_runway"}


def test_legs_reach_the_next_junction_and_stop_straight_at_a_corner() -> None:
    main = line("main", [(0, 0), (300, 0), (300, 300)], [None, 50.0, None])
    lines = [main, line("x1", [(100, -50), (100, 50)]), line("x2", [(200, -50), (200, 50)])]
    by_id = {junction.id: junction for junction in find_junctions(lines)}
    first, second = by_id["J:main/x1#0"], by_id["J:main/x2#0"]
    ahead = first.leg("J:main/x1#0|main+")
    # identity: 100 m to the next junction, all of it straight
    assert ahead.length_m == pytest.approx(100.0) and ahead.straight_length_m == pytest.approx(100.0)
    beyond = second.leg("J:main/x2#0|main+")
    # To the line's end: 50 m of straight, then a 90-degree arc of 50 m radius, then 250 m (identity).
    assert beyond.length_m == pytest.approx(50.0 + 25.0 * math.pi + 250.0)
    assert beyond.straight_length_m == pytest.approx(50.0)  # identity: 300 - tangent length 50 - 200


def test_a_crossing_on_a_corner_arc_has_a_tangent_heading_and_no_straight() -> None:
    bend = line("bend", [(0, 0), (100, 0), (100, 100)], [None, 50.0, None])  # arc centre (50, 50)
    diagonal = line("diag", [(50, 50), (120, -20)])  # along the radius at -45 degrees
    (junction,) = find_junctions([bend, diagonal])
    assert junction.point == pytest.approx((50 + 50 / math.sqrt(2), 50 - 50 / math.sqrt(2)))  # identity
    ahead = junction.leg(f"{junction.id}|bend+")
    assert math.degrees(ahead.heading_rad) == pytest.approx(45.0)  # identity: tangent at mid-arc
    assert ahead.straight_length_m == 0.0


def test_two_crossings_of_the_same_lines_are_numbered_along_the_first_line() -> None:
    straight = line("a", [(0, 0), (400, 0)])
    dog_leg = line("b", [(300, -100), (300, 100), (100, 100), (100, -100)])
    ids = [junction.id for junction in find_junctions([straight, dog_leg])]
    points = {junction.id: junction.point for junction in find_junctions([straight, dog_leg])}
    assert sorted(ids) == ["J:a/b#0", "J:a/b#1"]
    assert points["J:a/b#0"] == pytest.approx((100.0, 0.0))  # first along "a" (identity)


def test_ids_are_stable_under_small_moves() -> None:
    before = find_junctions([line("a", [(0, 0), (400, 0)]), line("b", [(100, -50), (100, 50)]),
                             line("c", [(300, -50), (300, 50)])])
    after = find_junctions([line("a", [(0, 0.4), (400, -0.3)]), line("b", [(101.5, -50), (99, 50)]),
                            line("c", [(300, -50), (300.2, 50)])])
    assert [junction.id for junction in before] == [junction.id for junction in after]
    assert [leg.id for j in before for leg in j.legs] == [leg.id for j in after for leg in j.legs]


def test_duplicate_line_ids_and_bad_tolerances_raise() -> None:
    with pytest.raises(NetworkError, match="share the id"):
        find_junctions([line("a", [(0, 0), (1, 0)]), line("a", [(0, 1), (1, 1)])])
    with pytest.raises(NetworkError, match="snap tolerance"):
        find_junctions([line("a", [(0, 0), (1, 0)])], snap_tolerance_m=0.0)
    assert find_junctions([]) == ()


def grid(count: int, spacing_m: float = 100.0) -> list[NetworkLine]:
    span = spacing_m * (count + 1)
    return ([line(f"h{i}", [(0, spacing_m * (i + 1)), (span, spacing_m * (i + 1))]) for i in range(count)]
            + [line(f"v{i}", [(spacing_m * (i + 1), 0), (spacing_m * (i + 1), span)]) for i in range(count)])


def test_moving_one_line_rebuilds_only_the_junctions_it_touches() -> None:
    lines = grid(5)
    network = build_network(lines)
    assert len(network.junctions) == 25  # identity: 5 x 5 crossings
    moved = [line("h2", [(0, 300), (600, 304)]) if item.id == "h2" else item for item in lines]
    updated = update_network(network, moved, ["h2"])
    assert updated.junctions == build_network(moved).junctions
    # The 5 junctions on h2 and their neighbours along the verticals (on h1 and h3) change.
    assert len(updated.recomputed_ids) == 15
    kept = [j for j in updated.junctions if j.id not in updated.recomputed_ids]
    assert all(any(j is old for old in network.junctions) for j in kept)
    assert {j.id for j in junctions_touching(updated, ["h2"])} == {f"J:h2/v{i}#0" for i in range(5)}


def test_dragging_a_vertex_keeps_the_junctions_farther_along_its_line() -> None:
    # An east-west line with a vertex at each of seven crossings; its middle vertex is dragged north
    # along the middle crossing line, as in the benchmark drag (tests/benchmarks/layouts.py).
    xs = [100.0 * (number + 1) for number in range(7)]

    def east_west(middle_y: float) -> NetworkLine:
        vertices = [(x, middle_y if number == 3 else 0.0) for number, x in enumerate(xs)]
        return line("ew", [(0.0, 0.0), *vertices, (800.0, 0.0)])

    crossing = [line(f"v{number}", [(x, -100.0), (x, 100.0)]) for number, x in enumerate(xs)]
    network = build_network([east_west(0.0), *crossing])
    for middle_y in (0.3, 0.6, 0.9):
        lines = [east_west(middle_y), *crossing]
        updated = update_network(network, lines)
        assert updated.junctions == build_network(lines).junctions  # identity: an update is a build
        # invariant: only the dragged junction and its neighbours along the line change
        assert updated.recomputed_ids == {"J:ew/v2#0", "J:ew/v3#0", "J:ew/v4#0"}
        before = {junction.id: junction for junction in network.junctions}
        for number in (0, 1, 5, 6):
            junction_id = f"J:ew/v{number}#0"
            kept = next(junction for junction in updated.junctions if junction.id == junction_id)
            assert kept is before[junction_id]  # invariant: two or more crossings away, the same object
        far_junction = before["J:ew/v6#0"]
        far = far_junction.leg("J:ew/v6#0|ew+")
        # invariant: its station along the line moved (the line grew), which the network keeps
        assert updated.station_m(far_junction, far) > network.station_m(far_junction, far)
        network = updated


def test_update_notices_added_and_removed_lines() -> None:
    lines = grid(3)
    network = build_network(lines)
    added = [*lines, line("d", [(0, 0), (400, 400)])]
    assert update_network(network, added).junctions == build_network(added).junctions
    assert update_network(network, lines[1:]).junctions == build_network(lines[1:]).junctions


@settings(max_examples=25, deadline=None)
@given(which=st.integers(0, 7), dx=st.floats(-120.0, 120.0), dy=st.floats(-120.0, 120.0),
       bend=st.floats(-60.0, 60.0))
def test_incremental_update_equals_a_full_recompute(which: int, dx: float, dy: float, bend: float) -> None:
    lines = grid(4)
    network = build_network(lines)
    old = lines[which]
    (x0, y0), (x1, y1) = old.segments[0].start, old.segments[-1].end
    middle = ((x0 + x1) / 2 + dx + bend, (y0 + y1) / 2 + dy - bend)
    moved_line = line(old.id, [(x0 + dx, y0 + dy), middle, (x1 + dx, y1 + dy)], [None, 80.0, None]) \
        if _corner_fits(middle, (x0 + dx, y0 + dy), (x1 + dx, y1 + dy)) \
        else line(old.id, [(x0 + dx, y0 + dy), (x1 + dx, y1 + dy)])
    moved = [moved_line if item.id == old.id else item for item in lines]
    assert update_network(network, moved, [old.id]).junctions == build_network(moved).junctions


def _corner_fits(middle: tuple[float, float], start: tuple[float, float], end: tuple[float, float]) -> bool:
    try:
        centerline_segments([start, middle, end], [None, 80.0, None])
    except ValueError:
        return False
    return True


coordinate = st.floats(-300.0, 300.0).map(lambda v: round(v, 1))


@settings(max_examples=40, deadline=None)
@given(st.lists(st.lists(st.tuples(coordinate, coordinate), min_size=2, max_size=4), min_size=2, max_size=6),
       st.floats(5.0, 40.0))
def test_any_layout_gives_well_formed_junctions(polylines: list[list[tuple[float, float]]],
                                                radius_m: float) -> None:
    lines = []
    for number, points in enumerate(polylines):
        radii: list[float | None] = [None] + [radius_m] * (len(points) - 2) + [None]
        try:
            lines.append(NetworkLine(f"l{number}", "taxiway", centerline_segments(points, radii)))
        except ValueError:
            continue  # corners that do not fit or a degenerate polyline: not a line
    junctions = find_junctions(lines)
    assert len({junction.id for junction in junctions}) == len(junctions)
    for junction in junctions:
        assert len(junction.line_ids) >= 2 and all(math.isfinite(v) for v in junction.point)
        assert junction.kind in {"crossing", "tee", "elbow", "multi"}
        assert len({leg.id for leg in junction.legs}) == len(junction.legs)
        for leg in junction.legs:
            assert leg.length_m > 0.0 and 0.0 <= leg.straight_length_m <= leg.length_m + 1e-9
            assert -math.pi < leg.heading_rad <= math.pi


def test_an_end_near_the_joint_of_two_pieces_snaps_to_the_nearer_piece() -> None:
    # The through line's first straight ends at (250, 0), where a 50 m arc begins. The branch ends
    # 0.45 m from the straight and 0.54 m from the arc's start: both are candidates, only the
    # straight is within the 0.5 m snap tolerance.
    through = line("a", [(0, 0), (300, 0), (300, 300)], [None, 50.0, None])
    branch = line("b", [(249.7, -100.0), (249.7, -0.45)])
    network = build_network([through, branch], snap_tolerance_m=0.5)
    (junction,) = network.junctions
    assert junction.kind == "tee" and junction.point == pytest.approx((249.7, 0.0))  # identity
    ahead = junction.leg(f"{junction.id}|a+")
    assert network.station_m(junction, ahead) == pytest.approx(249.7)  # identity
    assert ahead.straight_length_m == pytest.approx(0.3)  # identity: up to the arc at 250 m


def _random_line(rng: random.Random, line_id: str) -> NetworkLine:
    """Two to four vertices in a 500 m square, with corner radii where they fit (sometimes exactly
    on a grid line, so that ends, overlaps and crossings at vertices occur)."""
    for _ in range(50):
        points = [(float(rng.choice([rng.uniform(0, 500), 100.0 * rng.randrange(6)])),
                   float(rng.choice([rng.uniform(0, 500), 100.0 * rng.randrange(6)])))
                  for _ in range(rng.randrange(2, 5))]
        radii: list[float | None] = [None] + [rng.choice([None, 20.0])] * (len(points) - 2) + [None]
        try:
            return NetworkLine(line_id, "taxiway", centerline_segments(points, radii))
        except ValueError:
            continue
    return line(line_id, [(0.0, 0.0), (500.0, 500.0)])


@pytest.mark.parametrize("seed", range(6))
def test_a_long_random_edit_sequence_updates_like_a_fresh_build(seed: int) -> None:
    rng = random.Random(seed)
    lines = {item.id: item for item in grid(4)}
    network = build_network(list(lines.values()))
    for step in range(40):
        action = rng.random()
        if action < 0.15 and len(lines) > 2:
            del lines[rng.choice(sorted(lines))]
        elif action < 0.3:
            lines[f"n{step}"] = _random_line(rng, f"n{step}")
        else:
            for line_id in rng.sample(sorted(lines), rng.choice([1, 1, 2, 3])):
                lines[line_id] = _random_line(rng, line_id)
        updated = update_network(network, list(lines.values()))
        fresh = build_network(list(lines.values()))
        assert updated.junctions == fresh.junctions  # identity: an update must not change a result
        before = {junction.id: junction for junction in network.junctions}
        for junction in updated.junctions:
            if junction.id not in updated.recomputed_ids:
                assert junction is before[junction.id]  # identity: an untouched junction is kept
        network = updated
